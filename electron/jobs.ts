// The solver jobs the worker runs: each turns a contract payload into solver calls and the solver's
// answer into a contract value (degrees, labels, no typed arrays). Plain functions over a small cache of
// built patterns and computed paths, so tests can call them in-process and the worker runs the same code.

import {
  buildPattern,
  degree5,
  foldedShape,
  loadPatternText,
  miura,
  resolveDrives,
  shapeToJSON,
  shapeToOBJ,
  shapeToSTL,
  singleVertex,
  solveDrives,
  waterbomb,
  writeDxf,
  writeFold,
  writeProject,
  writeSvg,
  type Drive,
  type Pattern,
  type PatternSource,
  type Project,
  type Solution,
  type SolveReport,
} from '../solver';
import type { GeneratorResult } from '../solver/model/generators';
import {
  DriveSpecSchema,
  ExportKindSchema,
  ExportOptionsSchema,
  GeneratorSpecSchema,
  PatternSourceSchema,
  ProjectSchema,
  DrawingOptionsSchema,
  finiteOrNull,
  type DriveSpec,
  type MessageDto,
  type ProjectDto,
  type ShapeDto,
  type SolutionDto,
  type SolveResultDto,
} from './contract';
import { JobFailure } from './worker-protocol';
import { fileText, isBytes } from './text-bytes';
import { ExportSweepSchema, storedPathFor } from './export-path';
import { checkAngleTableSize, checkScheduleSize } from './work-limits';
import { LruMap } from './lru';
import { runSteps, sampleDegrees, type SweepResult } from '../solver/paths/sweep';
import { angleTable, scheduleTable, type TableHeader } from '../solver/outputs/table';
import { scheduleSteps, type HingeLimits, type ScheduleOptions } from '../solver/outputs/schedule';
import { appTableHeader, scheduleCommand, tableCommand } from './table-header';
import type { SweepOptionsSchema } from './contract';
import type { JobContext } from './worker-protocol';
import { finishChecks } from '../solver/outputs/path-physics';
import { pathChecks } from './path-checks';
import { z } from 'zod';

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;

export interface JobState {
  patterns: LruMap<string, Pattern>;
  paths: LruMap<string, StoredPath>;
}

/** A computed path kept in the worker, so tables can be exported from it without sending it back. */
export interface StoredPath {
  key: string;
  driveCrease: number;
  /** the solver's own result, as its table writers take it */
  raw: unknown;
  /** what the sweep was asked for: the table header's command line repeats it */
  request: z.output<typeof SweepOptionsSchema>;
}

export function createJobState(): JobState {
  return { patterns: new LruMap(4), paths: new LruMap(2) };
}

function parse<T extends z.ZodType>(schema: T, payload: unknown, what: string): z.output<T> {
  const r = schema.safeParse(payload);
  if (!r.success) throw new JobFailure('bad-request', `${what}: ${r.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  return r.data;
}

export function patternFor(state: JobState, key: string): Pattern {
  const p = state.patterns.get(key);
  if (!p) throw new JobFailure('pattern-unknown', `the solver has no pattern ${key}; send it first`);
  return p;
}

export function toProjectDto(project: Project): ProjectDto {
  // the project is plain data already; the schema drops nothing a project carries
  return ProjectSchema.parse(project);
}

function messages(list: { severity: string; code: string; text: string; where?: object }[]): MessageDto[] {
  return list.map((m) => ({ severity: m.severity as MessageDto['severity'], code: m.code, text: m.text, ...(m.where ? { where: m.where } : {}) }));
}

// ---------- load and save ----------

/** A file as main read it: its bytes (bounded by main before reading), decoded here as the readers take them. */
const FileBytes = z.custom<Uint8Array>(isBytes, 'expected the bytes of a file');
const LoadRequest = z.object({ bytes: FileBytes, fileName: z.string().max(4096), drawing: DrawingOptionsSchema.optional() });

export function loadJob(_state: JobState, payload: unknown) {
  const { bytes, fileName, drawing } = parse(LoadRequest, payload, 'load');
  const decoded = fileText(bytes, fileName);
  const format = /\.fold$/i.test(fileName) ? ('fold' as const) : /\.svg$/i.test(fileName) ? ('svg' as const) : ('project' as const);
  if (!decoded.ok) return { ok: false as const, format, messages: [{ severity: 'error' as const, code: decoded.code, text: decoded.message, where: { line: decoded.line } }] };
  const loaded = loadPatternText(decoded.text, fileName, drawing ?? {});
  const msgs = messages(loaded.messages);
  // a file whose pattern does not build cannot be shown; its messages say why and where
  if (!loaded.project || !loaded.pattern) return { ok: false as const, format: loaded.format ?? 'project', messages: msgs };
  return {
    ok: true as const,
    format: loaded.format ?? 'project',
    project: toProjectDto(loaded.project),
    messages: msgs,
    ...(loaded.layers ? { drawingLayers: loaded.layers, drawingColours: loaded.colours ?? [] } : {}),
  };
}

export function writeProjectJob(_state: JobState, payload: unknown): string {
  const { project } = parse(z.object({ project: ProjectSchema }), payload, 'write-project');
  return writeProject(project as Project);
}

/** A new document from one of the generators; its parameter problems come back as messages. */
export function generateJob(_state: JobState, payload: unknown) {
  const spec = parse(GeneratorSpecSchema, payload, 'generate');
  let r: GeneratorResult;
  switch (spec.kind) {
    case 'single-vertex':
      r = singleVertex({ sectorsDeg: spec.sectorsDeg, radius: spec.radius, driveDeg: spec.driveDeg, name: spec.name });
      break;
    case 'miura':
      r = miura({ rows: spec.rows, cols: spec.cols, a: spec.a, b: spec.b, alphaDeg: spec.alphaDeg, driveDeg: spec.driveDeg, name: spec.name });
      break;
    case 'waterbomb':
      r = waterbomb({ size: spec.size, allMidlines: spec.allMidlines, name: spec.name });
      break;
    case 'degree5':
      r = degree5({ sectorsDeg: spec.sectorsDeg, radius: spec.radius, name: spec.name });
      break;
  }
  const msgs = messages(r.messages);
  if (!r.project) return { ok: false as const, messages: msgs };
  if (spec.units?.trim()) r.project.units = spec.units.trim();
  const built = buildPattern(r.project.source);
  if (!built.pattern) return { ok: false as const, messages: [...msgs, ...messages(built.messages)] };
  return { ok: true as const, project: toProjectDto(r.project), messages: [...msgs, ...messages(built.messages)] };
}

// ---------- patterns ----------

const SetPatternRequest = z.object({ key: z.string(), source: PatternSourceSchema });

export function setPatternJob(state: JobState, payload: unknown) {
  const { key, source } = parse(SetPatternRequest, payload, 'set-pattern');
  const built = buildPattern(source as PatternSource);
  if (!built.pattern) return { ok: false, summary: null, messages: messages(built.messages) };
  state.patterns.set(key, built.pattern);
  const p = built.pattern;
  return {
    ok: true,
    summary: { creases: p.creases.length, panels: p.panels.length, interiorVertices: p.interiorVertices.length, patternDof: null },
    messages: messages(built.messages),
  };
}

// ---------- solve ----------

const SolveRequest = z.object({ key: z.string(), drives: z.array(DriveSpecSchema) });

export function resolveOrFail(pattern: Pattern, specs: DriveSpec[]): { drives: Drive[]; messages: MessageDto[]; failed: boolean } {
  const resolved = resolveDrives(pattern, specs.map((d, i) => ({ ...d, field: `drives[${i}]` })));
  const msgs = messages(resolved.messages);
  return { drives: resolved.drives, messages: msgs, failed: msgs.some((m) => m.severity === 'error') };
}

export function solutionDto(s: Solution): SolutionDto {
  const sensitivity: [number, number, number][] = [];
  for (const [drive, values] of s.sensitivity)
    values.forEach((v, crease) => { if (v !== 0 && Number.isFinite(v) && !s.sensitivity.has(crease)) sensitivity.push([crease, drive, v]); });
  return {
    anglesDeg: Array.from(s.angles, (a) => a * DEG),
    maxResidual: Number.isFinite(s.maxResidual) ? s.maxResidual : Number.MAX_VALUE,
    vertexResiduals: s.vertexResiduals.map((r) => (Number.isFinite(r) ? r : Number.MAX_VALUE)),
    matchesAssignment: s.matchesAssignment,
    localDof: s.localDof,
    condition: finiteOrNull(s.condition),
    signs: s.signs,
    sensitivity,
  };
}

export function solveReportDto(pattern: Pattern, report: SolveReport, extra: MessageDto[] = []): SolveResultDto {
  const label = (c: number) => pattern.creases[c]?.label ?? String(c);
  const out: SolveResultDto = {
    status: report.status,
    dof: report.dof,
    patternDof: report.patternDof,
    solutions: report.solutions.map(solutionDto),
    families: report.families.map((f) => ({
      dof: f.dof,
      representative: solutionDto(f.representative),
      directions: f.directions.map((d) => [...d].map(([c, v]) => [c, v] as [number, number])),
      matchesAssignment: f.matchesAssignment,
    })),
    search: { ...report.search },
    messages: [...extra, ...messages(report.messages)],
    iterations: report.iterations,
  };
  if (report.excluded?.length) out.excluded = report.excluded.map(solutionDto);
  if (report.compromise) {
    out.compromise = solutionDto(report.compromise);
    out.worstVertices = report.compromise.vertexResiduals
      .map((r, i) => [pattern.interiorVertices[i]?.vertex ?? i, r] as [number, number])
      .filter(([, r]) => r > 1e-9)
      .sort((a, b) => b[1] - a[1])
      .slice(0, 3);
  }
  if (report.suggestedDrives) out.suggestedDrives = report.suggestedDrives.map(label);
  if (report.conflictingDrives) out.conflictingDrives = report.conflictingDrives.map(label);
  if (report.reachableRange) out.reachableRangeDeg = report.reachableRange.map(([a, b]) => [a * DEG, b * DEG]);
  return out;
}

export function solveJob(state: JobState, payload: unknown): SolveResultDto {
  const { key, drives } = parse(SolveRequest, payload, 'solve');
  const pattern = patternFor(state, key);
  const resolved = resolveOrFail(pattern, drives);
  if (resolved.failed) {
    return { status: 'invalid', dof: 0, patternDof: 0, solutions: [], families: [], search: { complete: false, method: 'none', found: 0, note: 'the drives were refused' }, messages: resolved.messages, iterations: 0 };
  }
  return solveReportDto(pattern, solveDrives(pattern, resolved.drives), resolved.messages);
}

// ---------- shape ----------

const ShapeRequest = z.object({ key: z.string(), anglesDeg: z.array(z.number()), basePanel: z.number().int().optional() });

export function anglesFromDegrees(pattern: Pattern, anglesDeg: readonly number[]): Float64Array {
  if (anglesDeg.length !== pattern.creases.length) {
    throw new JobFailure('bad-angles', `expected ${pattern.creases.length} fold angles (one per crease), got ${anglesDeg.length}`);
  }
  return Float64Array.from(anglesDeg, (a) => a * RAD);
}

export function shapeJob(state: JobState, payload: unknown): ShapeDto {
  const { key, anglesDeg, basePanel } = parse(ShapeRequest, payload, 'shape');
  const pattern = patternFor(state, key);
  const shape = foldedShape(pattern, anglesFromDegrees(pattern, anglesDeg), basePanel);
  return { vertices: shape.vertices, maxMismatch: shape.maxMismatch, basePanel: shape.basePanel };
}

// ---------- exports ----------

const ExportRequest = z.object({
  kind: ExportKindSchema,
  project: ProjectSchema,
  key: z.string(),
  /** tables: the sweep whose path they are written from (see export-path.ts) */
  sweep: ExportSweepSchema.optional(),
  options: ExportOptionsSchema,
  /** tables: the document's file name and its bytes on disk (absent when never saved), and the program version */
  file: z.object({ name: z.string().max(4096), bytes: FileBytes.optional() }).optional(),
  version: z.string().max(100).optional(),
  /** tables: send the text to main in pieces as it is written (main writes the file as they come) */
  stream: z.boolean().optional(),
});

export interface ExportData {
  /** the file's text; empty when it went to main in pieces (`streamed`) */
  data: string;
  extension: string;
  streamed?: boolean;
}

/** Pieces of about a megabyte: few messages, and main's memory holds a piece, not the table. */
const PIECE = 1 << 20;

/** A table goes to main in pieces when main writes it as it comes (the request asks, the context can), else whole. */
function deliver(text: string, extension: string, stream: boolean | undefined, ctx?: JobContext): ExportData {
  if (!stream || !ctx?.write) return { data: text, extension };
  for (let i = 0; i < text.length; i += PIECE) ctx.write(text.slice(i, i + PIECE));
  return { data: '', extension, streamed: true };
}

export function exportJob(state: JobState, payload: unknown, ctx?: JobContext): ExportData {
  const req = parse(ExportRequest, payload, 'export');
  const pattern = patternFor(state, req.key);
  const base = req.options.basePanel;
  const angles = () => {
    if (!req.options.anglesDeg) throw new JobFailure('no-state', 'there is no folded state to export yet; set a drive first');
    return anglesFromDegrees(pattern, req.options.anglesDeg);
  };
  switch (req.kind) {
    case 'fold':
      return { data: writeFold(req.project as Project, req.options.anglesDeg ? { foldAngles: angles() } : {}), extension: 'fold' };
    case 'dxf':
      return { data: writeDxf(req.project as Project), extension: 'dxf' };
    case 'svg':
      return { data: writeSvg(req.project as Project), extension: 'svg' };
    case 'obj':
      return { data: shapeToOBJ(pattern, foldedShape(pattern, angles(), base)), extension: 'obj' };
    case 'stl':
      return { data: shapeToSTL(pattern, foldedShape(pattern, angles(), base)), extension: 'stl' };
    case 'shape-json':
      return { data: JSON.stringify(shapeToJSON(pattern, foldedShape(pattern, angles(), base)), null, 1) + '\n', extension: 'json' };
    case 'angle-table':
    case 'schedule': {
      const stored = storedPathFor(state, pattern, req.key, req.sweep, req.kind === 'angle-table', ctx);
      const file = req.file ?? { name: 'pattern.hingeplan.json' };
      const header = (command: string) => appTableHeader(pattern, req.project, file, req.version ?? 'unknown', command);
      const table = req.kind === 'angle-table' ? writeAngleTable(pattern, stored, req.options, file.name, header, req.project) : writeSchedule(pattern, stored, req.options, file.name, header, req.project, ctx);
      return deliver(table.data, table.extension, req.stream, ctx);
    }
  }
}

type Options = z.output<typeof ExportOptionsSchema>;

/** Crease labels (or indices) of the dialog's selection as indices; a name the pattern lacks is refused by name. */
function chosenCreases(pattern: Pattern, labels: string[]): number[] | undefined {
  if (!labels.length) return undefined;
  return labels.map((label) => {
    const i = pattern.labelIndex.get(label) ?? (/^\d+$/.test(label) && Number(label) < pattern.creases.length ? Number(label) : undefined);
    if (i === undefined) throw new JobFailure('unknown-crease', `the table asks for crease "${label}", which the pattern does not have`);
    return i;
  });
}

/** The holds of the path as the solver took them (radians), for the header's held line. */
function heldDrives(pattern: Pattern, path: StoredPath): Drive[] {
  const r = resolveOrFail(pattern, path.request.held);
  if (r.failed) throw new JobFailure('bad-holds', r.messages.map((m) => m.text).join(' '));
  return r.drives;
}

function writeAngleTable(pattern: Pattern, path: StoredPath, options: Options, fileName: string, header: (command: string) => TableHeader, project: ProjectDto): ExportData {
  const creases = chosenCreases(pattern, options.creases);
  const columns = creases?.length ?? pattern.creases.filter((c) => c.assignment !== 'B').length;
  checkAngleTableSize((path.raw as SweepResult).samples.length, columns, options.rates);
  const text = angleTable(pattern, path.raw as SweepResult, header(tableCommand(pattern, fileName, path.request, options)), heldDrives(pattern, path), {
    format: options.format,
    rates: options.rates,
    ...(creases ? { creases } : {}),
    // the drive column as the sweep was asked for (in degrees), as the command line writes it
    driveDegrees: new Map((sampleDegrees(path.request.fromDeg, path.request.toDeg, path.request.stepDeg).values ?? []).map((d) => [d * RAD, d])),
    ...(project.units ? { units: project.units } : {}),
  });
  return { data: text, extension: options.format };
}

/** The dialog's limits of single hinges as the solver takes them (rad/s, rad/s²), over the ones for every hinge. */
function hingeLimitsByCrease(pattern: Pattern, options: Options, global: HingeLimits): Map<number, HingeLimits> {
  const out = new Map<number, HingeLimits>();
  for (const l of options.hingeLimits) {
    const [c] = chosenCreases(pattern, [l.crease]) ?? [];
    out.set(c, {
      ...global,
      ...(l.maxRateDegPerS !== undefined ? { maxRate: l.maxRateDegPerS * RAD } : {}),
      ...(l.maxAccelDegPerS2 !== undefined ? { maxAcceleration: l.maxAccelDegPerS2 * RAD } : {}),
    });
  }
  return out;
}

/**
 * The schedule over the path's drive range, solved anew at its time rows (the profile's drive values, as
 * `hingeplan schedule` does), never picked or interpolated from the path's samples.
 */
function writeSchedule(pattern: Pattern, path: StoredPath, options: Options, fileName: string, header: (command: string) => TableHeader, project: ProjectDto, ctx?: JobContext): ExportData {
  const sweep = path.request;
  const limits: HingeLimits = {
    ...(options.maxRateDegPerS !== undefined ? { maxRate: options.maxRateDegPerS * RAD } : {}),
    ...(options.maxAccelDegPerS2 !== undefined ? { maxAcceleration: options.maxAccelDegPerS2 * RAD } : {}),
  };
  checkScheduleSize(options.timeS, options.dtS, options.rows, pattern.creases.length);
  const timed = options.profile !== 'constant';
  const holds = heldDrives(pattern, path);
  const scheduleOptions: ScheduleOptions = {
    drive: path.driveCrease,
    profile: {
      kind: options.profile,
      from: sweep.fromDeg * RAD,
      to: sweep.toDeg * RAD,
      duration: options.timeS,
      ...(timed && options.accelTimeS !== undefined ? { accelTime: options.accelTimeS } : {}),
      ...(options.profile === 's-curve' && options.jerkTimeS !== undefined ? { jerkTime: options.jerkTimeS } : {}),
    },
    ...(options.dtS !== undefined ? { dt: options.dtS } : options.rows !== undefined ? { rows: options.rows } : {}),
    holds,
    ...(sweep.branchId !== undefined && /^\d+$/.test(sweep.branchId) ? { branch: Number(sweep.branchId) } : {}),
    ...(sweep.startAnglesDeg ? { start: anglesFromDegrees(pattern, sweep.startAnglesDeg) } : {}),
    limits,
    hingeLimits: hingeLimitsByCrease(pattern, options, limits),
  };
  // the document's units and loads, as the command in the header reads them from the file
  const { checks } = pathChecks(pattern, { ...sweep, units: project.units, loads: project.loads }, path.driveCrease, holds);
  const result = runSteps(scheduleSteps(pattern, scheduleOptions, {
    onProgress: (done, total) => ctx?.progress(done, total, 'schedule'),
    shouldStop: () => ctx?.shouldStop() ?? false,
    ...(checks ? {
      onSample: (s) => {
        const c = checks.observe({ drive: s.drive, angles: s.angles, rates: s.rates });
        s.checks = { contact: c.contact, contacts: c.contacts, ...(c.torque ? { torque: c.torque } : {}) };
      },
    } : {}),
  }));
  if (checks && result.sweep) finishChecks(result.sweep, checks);
  if (result.status === 'failed' && !result.rows.length) {
    throw new JobFailure(result.messages[0]?.code ?? 'schedule-failed', result.messages.map((m) => m.text).join(' ') || 'the schedule could not be solved');
  }
  const text = scheduleTable(pattern, result, header(scheduleCommand(pattern, fileName, sweep, options)), path.driveCrease, holds, options.format, undefined, {
    fromDegrees: sweep.fromDeg, toDegrees: sweep.toDeg, ...(project.units ? { units: project.units } : {}),
  });
  return { data: text, extension: options.format };
}

// ---------- the job table ----------
