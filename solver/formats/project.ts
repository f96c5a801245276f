// The Hingeplan project file: versioned JSON described by schema/project.schema.json (degrees in the
// file, radians inside). Also loadStructuredText, the reader of project and FOLD files (./load.ts adds drawings).
//
// Limits (see ./limits.ts): at most MAX_TEXT_BYTES (32 MiB) of text, MAX_VERTICES (250,000) vertices
// and MAX_CREASES (250,000) creases; more is refused before any other work is done.
import type { ErrorObject } from 'ajv';
import { validate as validateSchema } from './project-validator';
import type { Assignment, Drive, HingeLimit, Message, Pattern, PatternSource, Where } from '../types';
import { buildPattern } from '../model/pattern';
import { resolveDrives, type DriveSpec } from '../model/drives';
import { MAX_CREASES, MAX_TEXT_BYTES, MAX_VERTICES, readJsonText } from './limits';
import { parseFoldValue } from './fold';
import { decodeUtf8 } from './text';
import { decodeDxf } from './dxf-text';
import { loadsValue, readLoads, type FileLoads } from './loads';
import type { CleanCounts } from '../model/clean';
import type { DrawingColour, DrawingLayer } from './drawing';

export { MAX_CREASES, MAX_TEXT_BYTES, MAX_VERTICES };

export const PROJECT_FORMAT = 'hingeplan-project';
export const PROJECT_VERSION = 1;

/** A pattern with what a person adds to it: drives, units, notes; plus what a FOLD file carried. */
export interface Project {
  source: PatternSource;
  /** degrees, as in the file */
  drives: DriveSpec[];
  units?: string;
  notes?: string;
  /** a folded state to start from: one fold angle per crease, radians, valley positive; not drives */
  foldAngles?: number[];
  /** loads for the static drive torque (SI; springs by crease label, rest angles in degrees) */
  loads?: FileLoads;
  /** what a FOLD file carried that the project does not use, so it can be written back */
  fold?: {
    /** top-level keys this program does not read, untouched, in file order */
    extra: Record<string, unknown>;
    /** the common z of 3D vertex coordinates, when the file gave them */
    z?: number;
  };
}

export interface ParseResult {
  project?: Project;
  messages: Message[];
}

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;
/** Degrees as written: 15 significant digits drop the last-bit noise of the radian round trip. */
export const toDegrees = (rad: number) => +(rad * DEG).toPrecision(15);
export const toRadians = (deg: number) => deg * RAD;

const MAX_SCHEMA_MESSAGES = 40;

/**
 * The schema's validator, compiled ahead of time by ajv (scripts/build-validator.mjs → ./project-validator.ts),
 * so reading a file neither loads ajv nor compiles the schema.
 */
type Validator = ((data: unknown) => boolean) & { errors?: ErrorObject[] | null };
function validate(): Validator {
  return validateSchema as Validator;
}

/** `/creases/12/assignment` → `creases[12].assignment` */
export function jsonPath(pointer: string): string {
  let out = '';
  for (const raw of pointer.split('/').slice(1)) {
    const part = raw.replace(/~1/g, '/').replace(/~0/g, '~');
    if (/^\d+$/.test(part)) out += `[${part}]`;
    else out += out === '' ? part : `.${part}`;
  }
  return out;
}

function valueAt(root: unknown, pointer: string): unknown {
  let v: unknown = root;
  for (const raw of pointer.split('/').slice(1)) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string, unknown>)[raw.replace(/~1/g, '/').replace(/~0/g, '~')];
  }
  return v;
}

function whereOf(pointer: string, field: string): Where {
  const w: Where = { field };
  const m = /^\/(vertices|creases|faces)\/(\d+)/.exec(pointer);
  if (m) {
    const k = Number(m[2]);
    if (m[1] === 'vertices') w.vertex = k;
    else if (m[1] === 'creases') w.crease = k;
    else w.panel = k;
  }
  return w;
}

function schemaMessage(e: ErrorObject, root: unknown): Message {
  const pointer = e.instancePath;
  const path = jsonPath(pointer);
  const at = path === '' ? 'The project' : path;
  const where = whereOf(pointer, path || '(top level)');
  const value = valueAt(root, pointer);
  const shown = (() => {
    const s = JSON.stringify(value);
    return s === undefined ? String(value) : s.length > 40 ? s.slice(0, 40) + '…' : s;
  })();
  const params = e.params as Record<string, unknown>;
  const err = (code: string, text: string): Message => ({ severity: 'error', code, text, where });
  switch (e.keyword) {
    case 'required': {
      const p = String(params.missingProperty);
      const full = path ? `${path}.${p}` : p;
      return { severity: 'error', code: 'missing-field', text: `${full} is missing; ${path ? `every entry of ${path.replace(/\[\d+\]$/, '')}` : 'a project file'} needs it.`, where: { ...where, field: full } };
    }
    case 'additionalProperties':
      return err('unknown-field', `${at} has a field "${String(params.additionalProperty)}" that this format does not have (a misspelling?).`);
    case 'type':
      if (typeof value === 'number' && !Number.isFinite(value)) {
        return err(/^\/vertices\//.test(pointer) ? 'vertex-not-finite' : 'not-finite', `${at} is not a finite number.`);
      }
      return err('wrong-type', `${at} should be ${params.type === 'integer' ? 'an integer' : `a ${String(params.type)}`}, not ${shown}.`);
    case 'enum':
      if (/^\/creases\/\d+\/assignment$/.test(pointer)) {
        return err('bad-assignment', `${at} is ${shown}; expected one of M (mountain), V (valley), U (unassigned), F (flat) or B (boundary).`);
      }
      return err('bad-value', `${at} is ${shown}; expected one of ${(params.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(', ')}.`);
    case 'minimum':
    case 'maximum':
      if (/limits\/(min|max)$/.test(pointer) || /^\/foldAngles\//.test(pointer)) {
        return err(/^\/foldAngles\//.test(pointer) ? 'fold-angle-out-of-range' : 'limit-out-of-range', `${at} is ${shown}°, outside −180° … 180°.`);
      }
      return err('bad-value', `${at} is ${shown}; it must be ${e.keyword === 'minimum' ? 'at least' : 'at most'} ${String(params.limit)}.`);
    case 'minItems':
    case 'maxItems':
      return err('wrong-length', `${at} has ${Array.isArray(value) ? value.length : '?'} entries; it must have ${e.keyword === 'minItems' ? 'at least' : 'at most'} ${String(params.limit)}.`);
    case 'minLength':
      return err(/label$/.test(pointer) ? 'bad-label' : 'bad-value', `${at} is empty.`);
    default:
      return err('bad-value', `${at} ${e.message ?? 'is not valid'}.`);
  }
}

/** Read a project file. Never throws; refused files give messages with the JSON path at fault. */
export function parseProject(text: string): ParseResult {
  const read = readJsonText(text, 'project file');
  if (read.value === undefined) return { messages: read.messages };
  return parseProjectValue(read.value);
}

function kindOf(v: unknown): string {
  return v === null ? 'null' : Array.isArray(v) ? 'an array' : typeof v === 'object' ? 'an object' : `a ${typeof v}`;
}

export function parseProjectValue(value: unknown): ParseResult {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    return { messages: [{ severity: 'error', code: 'not-a-project', text: `The file holds ${kindOf(value)}, not a Hingeplan project (a JSON object).` }] };
  }
  const obj = value as Record<string, unknown>;
  if (obj.format !== PROJECT_FORMAT) {
    const hint = 'vertices_coords' in obj ? ' It looks like a FOLD file: open it as .fold.' : '';
    const text =
      obj.format === undefined
        ? `The file has no "format" field, so it is not a Hingeplan project file.${hint}`
        : `The file's format is ${JSON.stringify(obj.format)}, not "${PROJECT_FORMAT}".${hint}`;
    return { messages: [{ severity: 'error', code: 'wrong-format', text, where: { field: 'format' } }] };
  }
  if (obj.version !== PROJECT_VERSION) {
    const v = obj.version;
    const text =
      typeof v === 'number' && Number.isInteger(v) && v > PROJECT_VERSION
        ? `The project file is version ${v}, made by a newer Hingeplan; this one reads version ${PROJECT_VERSION}.`
        : `The project file's version is ${JSON.stringify(v) ?? 'missing'}; this program reads version ${PROJECT_VERSION}.`;
    return { messages: [{ severity: 'error', code: 'unsupported-version', text, where: { field: 'version' } }] };
  }
  const counts: Message[] = [];
  if (Array.isArray(obj.vertices) && obj.vertices.length > MAX_VERTICES) {
    counts.push({ severity: 'error', code: 'too-many-vertices', text: `The file has ${obj.vertices.length} vertices; at most ${MAX_VERTICES} are accepted.`, where: { field: 'vertices' } });
  }
  if (Array.isArray(obj.creases) && obj.creases.length > MAX_CREASES) {
    counts.push({ severity: 'error', code: 'too-many-creases', text: `The file has ${obj.creases.length} creases; at most ${MAX_CREASES} are accepted.`, where: { field: 'creases' } });
  }
  if (counts.length) return { messages: counts };

  const check = validate();
  if (!check(value)) {
    const errors = check.errors ?? [];
    const messages = errors.slice(0, MAX_SCHEMA_MESSAGES).map((e) => schemaMessage(e, value));
    if (errors.length > MAX_SCHEMA_MESSAGES) {
      messages.push({ severity: 'error', code: 'schema-violation', text: `… and ${errors.length - MAX_SCHEMA_MESSAGES} more problems in the file.` });
    }
    return { messages };
  }

  type FileCrease = { vertices: [number, number]; assignment: Assignment; label?: string; limits?: { min?: number; max?: number } };
  const creases = obj.creases as FileCrease[];
  const limits: (HingeLimit | undefined)[] = creases.map((c) => {
    if (!c.limits) return undefined;
    const l: HingeLimit = {};
    if (c.limits.min !== undefined) l.min = toRadians(c.limits.min);
    if (c.limits.max !== undefined) l.max = toRadians(c.limits.max);
    return l;
  });
  const source: PatternSource = {
    name: obj.name as string,
    vertices: (obj.vertices as [number, number][]).map(([x, y]) => [x, y]),
    edges: creases.map((c) => [c.vertices[0], c.vertices[1]]),
    assignments: creases.map((c) => c.assignment),
    labels: creases.map((c) => c.label),
    limits,
  };
  if (obj.faces !== undefined) source.faces = (obj.faces as number[][]).map((f) => f.slice());
  if (obj.basePanel !== undefined) source.basePanel = obj.basePanel as number;
  if (obj.panelNames !== undefined) {
    const names: (string | undefined)[] = [];
    for (const [k, v] of Object.entries(obj.panelNames as Record<string, string>)) names[Number(k)] = v;
    source.panelNames = Array.from(names, (v) => v);
  }
  const drives: DriveSpec[] = ((obj.drives as { crease: string; angle: number }[] | undefined) ?? []).map((d, k) => ({
    crease: d.crease,
    angleDeg: d.angle,
    field: `drives[${k}]`,
  }));
  const project: Project = { source, drives };
  if (typeof obj.units === 'string') project.units = obj.units;
  if (typeof obj.notes === 'string') project.notes = obj.notes;
  if (obj.loads !== undefined) {
    const r = readLoads(obj.loads, 'loads');
    if (!r.loads) return { messages: r.messages };
    project.loads = r.loads;
  }
  if (obj.foldAngles !== undefined) {
    const fa = obj.foldAngles as number[];
    if (fa.length !== creases.length) {
      return {
        messages: [
          { severity: 'error', code: 'wrong-length', text: `foldAngles has ${fa.length} entries but there are ${creases.length} creases; give one angle per crease.`, where: { field: 'foldAngles' } },
        ],
      };
    }
    project.foldAngles = fa.map(toRadians);
  }
  return { project, messages: [] };
}

// ---------------------------------------------------------------------------------------------------
// Writing: stable key order, one vertex / crease / face / drive per line so diffs stay readable.

const j = (v: unknown) => JSON.stringify(v);

/** Lines of a JSON array, one compact entry per line, indented under a top-level key. */
export function arrayLines(items: unknown[]): string {
  if (items.length === 0) return '[]';
  return '[\n' + items.map((it) => '    ' + j(it)).join(',\n') + '\n  ]';
}

export function writeProject(project: Project): string {
  const src = project.source;
  const entries: [string, string][] = [
    ['format', j(PROJECT_FORMAT)],
    ['version', j(PROJECT_VERSION)],
    ['name', j(src.name)],
  ];
  if (project.units !== undefined) entries.push(['units', j(project.units)]);
  if (project.notes !== undefined) entries.push(['notes', j(project.notes)]);
  entries.push(['vertices', arrayLines(src.vertices.map(([x, y]) => [x, y]))]);
  const creases = src.edges.map((e, k) => {
    const c: Record<string, unknown> = { vertices: [e[0], e[1]], assignment: src.assignments[k] };
    const label = src.labels[k];
    if (label !== undefined) c.label = label;
    const lim = src.limits[k];
    if (lim && (lim.min !== undefined || lim.max !== undefined)) {
      const l: Record<string, number> = {};
      if (lim.min !== undefined) l.min = toDegrees(lim.min);
      if (lim.max !== undefined) l.max = toDegrees(lim.max);
      c.limits = l;
    }
    return c;
  });
  entries.push(['creases', arrayLines(creases)]);
  if (src.faces !== undefined) entries.push(['faces', arrayLines(src.faces)]);
  if (src.basePanel !== undefined) entries.push(['basePanel', j(src.basePanel)]);
  const named = (src.panelNames ?? []).map((n, k) => [String(k), n] as const).filter(([, n]) => n !== undefined && n !== '');
  if (named.length) entries.push(['panelNames', j(Object.fromEntries(named))]);
  if (project.drives.length > 0) entries.push(['drives', arrayLines(project.drives.map((d) => ({ crease: d.crease, angle: d.angleDeg })))]);
  if (project.foldAngles !== undefined) entries.push(['foldAngles', j(project.foldAngles.map(toDegrees))]);
  if (project.loads !== undefined) entries.push(['loads', j(loadsValue(project.loads))]);
  return '{\n' + entries.map(([k, v]) => `  ${j(k)}: ${v}`).join(',\n') + '\n}\n';
}

// ---------------------------------------------------------------------------------------------------

export type PatternFormat = 'project' | 'fold' | 'dxf' | 'svg';

export interface LoadResult {
  /** which reader took the file */
  format?: PatternFormat;
  project?: Project;
  /** present when the pattern built without errors (drive errors do not remove it) */
  pattern?: Pattern;
  /** the project's drives that passed the checks, resolved to crease indices and radians */
  drives?: Drive[];
  /** DXF and SVG: what the geometry cleaning did, step by step, and the snap it used */
  cleaning?: CleanCounts & { snap: number };
  /** DXF and SVG: the layers or groups that assigned the lines, and how */
  layers?: DrawingLayer[];
  /** DXF and SVG: the colours the lines are drawn in */
  colours?: DrawingColour[];
  messages: Message[];
}

/** A drawing format told by the file's extension, else by its first characters; undefined for JSON. */
export function drawingFormat(text: string, fileName?: string): 'dxf' | 'svg' | undefined {
  if (typeof fileName === 'string') {
    if (/\.dxf$/i.test(fileName)) return 'dxf';
    if (/\.svg$/i.test(fileName)) return 'svg';
    if (/\.(json|fold)$/i.test(fileName)) return undefined;
  }
  if (typeof text !== 'string') return undefined;
  const head = text.slice(0, 4096).replace(/^\uFEFF/, '').trimStart();
  if (head.startsWith('{') || head.startsWith('[')) return undefined;
  if (head.startsWith('<') && /<svg[\s>]/.test(head)) return 'svg';
  if (/^(0\s*\r?\n\s*SECTION|999\s*\r?\n)/.test(head) || head.startsWith('AutoCAD Binary DXF')) return 'dxf';
  return undefined;
}

/**
 * Read a project or FOLD file (told apart by the `.fold` extension or a `vertices_coords` key), build the
 * pattern and check the drives. Never throws. Drawings (DXF, SVG) are read by ./load.ts, which this module
 * does not import, so a reader of project files alone does not load the drawing readers.
 */
export function loadStructuredText(text: string, fileName?: string): LoadResult {
  const read = readJsonText(text, 'file');
  if (read.value === undefined) return { messages: read.messages };
  const value = read.value;
  const obj = value !== null && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : undefined;
  const isFold =
    !!obj && obj.format !== PROJECT_FORMAT && ((typeof fileName === 'string' && /\.fold$/i.test(fileName)) || 'vertices_coords' in obj);
  const format = isFold ? 'fold' : 'project';
  const parsed = isFold ? parseFoldValue(value, fileName) : parseProjectValue(value);
  const messages = [...read.messages, ...parsed.messages];
  if (!parsed.project) return { format, messages };
  const project = parsed.project;
  const built = buildPattern(project.source);
  messages.push(...built.messages.map((m) => withField(m, format, project.source.faces !== undefined)));
  if (!built.pattern) return { format, project, messages };
  const resolved = resolveDrives(built.pattern, project.drives);
  messages.push(...resolved.messages);
  return { format, project, pattern: built.pattern, drives: resolved.drives, messages };
}

/** A file's bytes as text: a DXF as DXF says (./dxf-text.ts), anything else as UTF-8, refused with its place when it is not. */
export function patternFileText(bytes: Uint8Array, fileName?: string): { text?: string; messages: Message[] } {
  if (typeof fileName === 'string' && /\.dxf$/i.test(fileName)) return { text: decodeDxf(bytes).text, messages: [] };
  return decodeUtf8(bytes, 'file');
}

/** Point a pattern message at the place in the file, in that file's own field names. */
function withField(m: Message, format: 'project' | 'fold', hasFaces: boolean): Message {
  const w = m.where;
  if (!w) return m;
  if (w.field !== undefined) {
    if (format !== 'fold') return m;
    const renamed = w.field.replace(/^faces\b/, 'faces_vertices').replace(/^basePanel$/, 'hingeplan:basePanel').replace(/^panelNames\.(\d+)$/, 'hingeplan:faces_name[$1]');
    return renamed === w.field ? m : { ...m, where: { ...w, field: renamed } };
  }
  let field: string | undefined;
  if (w.crease !== undefined) field = format === 'fold' ? `edges_vertices[${w.crease}]` : `creases[${w.crease}]`;
  else if (w.panel !== undefined && hasFaces) field = format === 'fold' ? `faces_vertices[${w.panel}]` : `faces[${w.panel}]`;
  else if (w.vertex !== undefined) field = format === 'fold' ? `vertices_coords[${w.vertex}]` : `vertices[${w.vertex}]`;
  return field === undefined ? m : { ...m, where: { ...w, field } };
}
