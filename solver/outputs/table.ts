// Angle tables for the actuator team, CSV or JSON: a metadata header (pattern and the SHA-256 of its file,
// branch, drive, units, sign convention, tolerance, largest residual over the table, program version, date,
// the cautions line and the command that wrote it), then one row per sample. Pure text in, text out: the
// caller supplies the date, version and command, so the core does no I/O and reads no clock.

import type { Pattern } from '../types';
import type { SweepEvent, SweepResult } from '../paths/sweep';
import type { ScheduleResult } from './schedule';
import type { FollowResult } from './schedule';
import type { GridResult } from './grid';
import { CAUTIONS } from '../formats/cautions';
import { RESIDUAL_TOLERANCE } from '../closure/newton';
import type { ChecksSummary, StateChecks } from './path-physics';

const DEG = 180 / Math.PI;

export const SIGN_CONVENTION = 'fold angle 0 = flat, valley positive, mountain negative, ±180 = folded flat';
export const TABLE_FORMAT = 'hingeplan-angle-table';
export const SCHEDULE_FORMAT = 'hingeplan-deployment-schedule';
export const FOLLOW_FORMAT = 'hingeplan-followed-schedule';
export const GRID_FORMAT = 'hingeplan-angle-grid';
export const TABLE_VERSION = 1;

export interface TableHeader {
  patternName: string;
  /** the pattern file's name as given on the command line */
  file: string;
  /** SHA-256 of the file's text (hex) */
  fileSha256: string;
  /** program version */
  version: string;
  /** ISO 8601 time the table was written */
  date: string;
  /** the command line that wrote it (reproduces every number) */
  command: string;
}

export type TableFormat = 'csv' | 'json';

export interface AngleTableOptions {
  format: TableFormat;
  /** the file's length unit, for the clearance in the header */
  units?: string;
  /** add a rate column per crease (degrees per degree of drive) */
  rates?: boolean;
  /** creases to list: every crease that is not a boundary edge (default) */
  creases?: number[];
}

/**
 * Numbers with 15 significant digits (what a double holds for certain), shortest form: a drive asked for as
 * 30° prints as 30, not as the 29.999999999999996 the degree → radian → degree round trip leaves.
 */
export function num(x: number | undefined): string {
  if (x === undefined || Number.isNaN(x)) return '';
  if (!Number.isFinite(x)) return x > 0 ? 'inf' : '-inf';
  const r = +x.toPrecision(15);
  return String(r === 0 ? 0 : r);
}

export function jsonNum(x: number | undefined): number | null {
  if (x === undefined || !Number.isFinite(x)) return null;
  const r = +x.toPrecision(15);
  return r === 0 ? 0 : r;
}

/** Degrees for JSON, to 15 significant digits (see num). */
function deg(x: number): number {
  return jsonNum(x * DEG) ?? NaN;
}

/** A CSV cell, quoted when it holds a comma, quote or line break (RFC 4180). */
export function csvCell(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function listed(pattern: Pattern, opts: { creases?: number[] }): number[] {
  return opts.creases ?? pattern.creases.filter((c) => c.assignment !== 'B').map((c) => c.index);
}

/** The header's first lines: what the table is and which file it comes from. */
export function sourceMeta(format: string, header: TableHeader) {
  return { format, version: TABLE_VERSION, pattern: header.patternName, file: header.file, fileSha256: header.fileSha256 };
}

/** Sign convention, tolerance and the largest residual over the table. */
function accuracyMeta(largest: number) {
  return { signConvention: SIGN_CONVENTION, tolerance: `${RESIDUAL_TOLERANCE} rad largest vertex residual`, largestResidual: largest };
}

/** The header's last lines: program, date, the command that reproduces every number, and the cautions. */
export function provenanceMeta(header: TableHeader) {
  return { program: `hingeplan ${header.version}`, date: header.date, command: header.command, cautions: CAUTIONS };
}

/** { label: value } for the listed creases, each value passed through `f` (e.g. radians → degrees). */
function byLabel(pattern: Pattern, cols: number[], values: ArrayLike<number>, f: (x: number) => number | null = (x) => x) {
  return Object.fromEntries(cols.map((c) => [pattern.creases[c].label, f(values[c])]));
}

export function metadataLines(meta: Record<string, string | number | boolean | null>): string {
  // one "# key: value" line each; values never carry line breaks
  return Object.entries(meta).map(([k, v]) => `# ${k}: ${String(v ?? '').replace(/[\r\n]+/g, ' ')}`).join('\n') + '\n';
}

function eventsJson(pattern: Pattern, events: SweepEvent[]) {
  return events.map((e) => ({
    type: e.type,
    drive: deg(e.drive),
    ...(e.panels ? { panels: e.panels, point: e.point!.map((x) => jsonNum(x)), distance: jsonNum(e.distance) } : {}),
    text: e.text,
    ...(e.crease !== undefined ? { crease: pattern.creases[e.crease].label } : {}),
  }));
}

/** Header lines for what the path checked: contact (and its clearance) and the torque's units and peaks. */
function checksMeta(pattern: Pattern, checks: ChecksSummary | undefined, units: string | undefined): Record<string, string> {
  if (!checks) return {};
  const u = units ? ` ${units}` : '';
  const out: Record<string, string> = {
    contact: checks.contact.checked
      ? `checked at every row, clearance ${num(checks.contact.clearance)}${u}${checks.event ? `; first contact at ${num(checks.event.drive * DEG)} deg, panels ${checks.event.panels.join(' and ')}` : '; none'}`
      : 'not checked',
  };
  if (checks.peakTorque) {
    out.torque = 'N·m static holding torque per drive (virtual work; positive: the actuator pushes towards valley); static only: no dynamics, friction or hinge play';
    out.peakTorque = [...checks.peakTorque].map(([c, p]) => `${pattern.creases[c].label} ${num(p.value)} N·m at ${num(p.at * DEG)} deg`).join('; ') || 'none';
  }
  return out;
}

function checksJson(pattern: Pattern, checks: ChecksSummary | undefined) {
  if (!checks) return {};
  return {
    contact: { checked: checks.contact.checked, clearance: checks.contact.clearance },
    ...(checks.peakTorque
      ? { torqueUnits: 'N·m', peakTorque: Object.fromEntries([...checks.peakTorque].map(([c, p]) => [pattern.creases[c].label, { torque: jsonNum(p.value), drive: deg(p.at) }])) }
      : {}),
  };
}

/** The drives a torque column is written for, in order (the path's drive first). */
function torqueDrives(checks: ChecksSummary | undefined): number[] {
  return checks?.peakTorque ? [...checks.peakTorque.keys()] : [];
}

function stateJson(pattern: Pattern, c: StateChecks | undefined) {
  if (!c) return {};
  return {
    ...(c.contact ? { contact: true } : {}),
    ...(c.contacts.length ? { contacts: c.contacts } : {}),
    ...(c.torque ? { torque: Object.fromEntries([...c.torque].map(([k, v]) => [pattern.creases[k].label, jsonNum(v)])) } : {}),
  };
}

function stateCells(c: StateChecks | undefined, checks: ChecksSummary | undefined, drives: number[]): string[] {
  if (!checks) return [];
  return [...(checks.contact.checked ? [c ? (c.contact ? '1' : '0') : ''] : []), ...drives.map((d) => num(c?.torque?.get(d)))];
}

function stateHead(pattern: Pattern, checks: ChecksSummary | undefined, drives: number[]): string[] {
  if (!checks) return [];
  return [...(checks.contact.checked ? ['contact'] : []), ...drives.map((d) => `torque:${pattern.creases[d].label}`)];
}

export function holdsText(pattern: Pattern, holds: { crease: number; value: number }[]): string {
  return holds.map((h) => `${pattern.creases[h.crease].label}=${num(h.value * DEG)}`).join(' ') || 'none';
}

/** The branch a table followed, as its header says it: id and name, and whether it follows the assignment. */
function branchMeta(b: SweepResult['branch'] | undefined): string {
  if (!b) return 'none';
  return `${b.id !== undefined ? `${b.id} ` : ''}${b.name}${b.matchesAssignment ? ' (matches the mountain/valley assignment)' : ''}`;
}

/** The angle table of a sweep. */
export function angleTable(
  pattern: Pattern,
  result: SweepResult,
  header: TableHeader,
  holds: { crease: number; value: number }[],
  opts: AngleTableOptions,
): string {
  const cols = listed(pattern, opts);
  const label = (c: number) => pattern.creases[c].label;
  const largest = result.samples.reduce((m, s) => Math.max(m, s.maxResidual), 0);
  const meta = {
    ...sourceMeta(TABLE_FORMAT, header),
    branch: branchMeta(result.branch),
    drive: label(result.drive),
    held: holdsText(pattern, holds),
    units: 'degrees (angles), degrees per degree of drive (rates), radians (residuals)',
    ...accuracyMeta(largest),
    status: result.status,
    samples: `${result.samples.length} of ${result.requested}`,
    method: result.method,
    ...checksMeta(pattern, result.checks, opts.units),
    ...provenanceMeta(header),
  };
  const tq = torqueDrives(result.checks);
  if (opts.format === 'json') {
    return JSON.stringify({
      ...meta,
      ...checksJson(pattern, result.checks),
      largestResidual: jsonNum(largest),
      columns: cols.map(label),
      samples: result.samples.map((s) => ({
        drive: deg(s.drive),
        angles: byLabel(pattern, cols, s.angles, deg),
        ...(opts.rates ? { rates: byLabel(pattern, cols, s.rates) } : {}),
        maxResidual: s.maxResidual,
        condition: jsonNum(s.condition),
        nearSingular: s.nearSingular,
        ...stateJson(pattern, s.checks),
      })),
      events: eventsJson(pattern, result.events),
      messages: result.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text })),
    }, null, 2) + '\n';
  }
  const head = ['drive', ...cols.map(label), ...(opts.rates ? cols.map((c) => `rate:${label(c)}`) : []), 'max_residual', 'condition', 'near_singular', ...stateHead(pattern, result.checks, tq)];
  const lines = [metadataLines(meta) + head.map(csvCell).join(',')];
  for (const s of result.samples) {
    lines.push([num(s.drive * DEG), ...cols.map((c) => num(s.angles[c] * DEG)), ...(opts.rates ? cols.map((c) => num(s.rates[c])) : []), num(s.maxResidual), num(s.condition), s.nearSingular ? '1' : '0', ...stateCells(s.checks, result.checks, tq)].join(','));
  }
  for (const e of result.events) lines.push(`# event: ${e.type} at ${num(e.drive * DEG)} deg: ${e.text.replace(/[\r\n]+/g, ' ')}`);
  return lines.join('\n') + '\n';
}

/** A deployment schedule: time rows, drive position/velocity/acceleration, every hinge angle, velocity and acceleration. */
export function scheduleTable(
  pattern: Pattern,
  result: ScheduleResult,
  header: TableHeader,
  drive: number,
  holds: { crease: number; value: number }[],
  format: TableFormat,
  creases?: number[],
  units?: string,
): string {
  const cols = listed(pattern, { creases });
  const label = (c: number) => pattern.creases[c].label;
  const largest = result.rows.reduce((m, r) => Math.max(m, r.maxResidual ?? 0), 0);
  const prof = result.profile;
  const checks = result.sweep?.checks;
  const tq = torqueDrives(checks);
  const meta = {
    ...sourceMeta(SCHEDULE_FORMAT, header),
    branch: branchMeta(result.sweep?.branch),
    drive: label(drive),
    held: holdsText(pattern, holds),
    profile: prof ? `${prof.spec.kind} from ${num(prof.spec.from * DEG)} to ${num(prof.spec.to * DEG)} deg in ${num(prof.spec.duration)} s, acceleration time ${num(prof.accelTime)} s, jerk time ${num(prof.jerkTime)} s, peak drive velocity ${num(prof.peakVelocity * DEG)} deg/s, peak drive acceleration ${num(prof.peakAcceleration * DEG)} deg/s^2` : '',
    units: 'seconds, degrees, degrees/s, degrees/s^2; residuals in radians',
    ...accuracyMeta(largest),
    status: result.status,
    unreachableRows: result.rows.filter((r) => r.unreachable).length,
    ...checksMeta(pattern, checks, units),
    ...provenanceMeta(header),
  };
  const flags = (r: ScheduleResult['rows'][number]) =>
    r.unreachable ? 'unreachable' : [...r.overRate.map((c) => `rate:${label(c)}`), ...r.overAcceleration.map((c) => `accel:${label(c)}`)].join(' ');
  if (format === 'json') {
    return JSON.stringify({
      ...meta,
      ...checksJson(pattern, checks),
      largestResidual: jsonNum(largest),
      columns: cols.map(label),
      rows: result.rows.map((r) => ({
        t: r.t,
        drive: deg(r.drive),
        driveVelocity: deg(r.driveVelocity),
        driveAcceleration: deg(r.driveAcceleration),
        ...(r.angles
          ? {
              angles: byLabel(pattern, cols, r.angles!, deg),
              velocities: byLabel(pattern, cols, r.velocities!, deg),
              accelerations: byLabel(pattern, cols, r.accelerations!, deg),
              maxResidual: r.maxResidual,
            }
          : { unreachable: r.unreachable }),
        overRate: r.overRate.map(label),
        overAcceleration: r.overAcceleration.map(label),
        ...stateJson(pattern, r.checks),
      })),
      hinges: result.hinges.filter((h) => cols.includes(h.crease)).map((h) => ({
        crease: label(h.crease),
        peakVelocity: deg(h.peakRate),
        peakVelocityAt: h.peakRateAt,
        peakAcceleration: deg(h.peakAcceleration),
        peakAccelerationAt: h.peakAccelerationAt,
        rowsOverRate: h.rowsOverRate,
        rowsOverAcceleration: h.rowsOverAcceleration,
        overBetweenRows: h.overBetweenRows,
      })),
      events: eventsJson(pattern, result.events),
      messages: result.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text })),
    }, null, 2) + '\n';
  }
  const head = ['t', 'drive', 'drive_velocity', 'drive_acceleration', ...cols.map(label), ...cols.map((c) => `velocity:${label(c)}`), ...cols.map((c) => `acceleration:${label(c)}`), 'max_residual', 'flags', ...stateHead(pattern, checks, tq)];
  const lines = [metadataLines(meta) + head.map(csvCell).join(',')];
  for (const r of result.rows) {
    const a = r.angles, v = r.velocities, ac = r.accelerations;
    lines.push([
      num(r.t), num(r.drive * DEG), num(r.driveVelocity * DEG), num(r.driveAcceleration * DEG),
      ...cols.map((c) => (a ? num(a[c] * DEG) : '')),
      ...cols.map((c) => (v ? num(v[c] * DEG) : '')),
      ...cols.map((c) => (ac ? num(ac[c] * DEG) : '')),
      num(r.maxResidual), csvCell(flags(r)), ...stateCells(r.checks, checks, tq),
    ].join(','));
  }
  for (const h of result.hinges) {
    if (!cols.includes(h.crease) || !(h.rowsOverRate || h.rowsOverAcceleration || h.overBetweenRows)) continue;
    lines.push(`# over limit: ${label(h.crease)}: peak velocity ${num(h.peakRate * DEG)} deg/s at t = ${num(h.peakRateAt)} s (${h.rowsOverRate} rows over), peak acceleration ${num(h.peakAcceleration * DEG)} deg/s^2 at t = ${num(h.peakAccelerationAt)} s (${h.rowsOverAcceleration} rows over)${h.overBetweenRows ? '; over between rows too' : ''}`);
  }
  for (const r of result.rows) if (r.unreachable) lines.push(`# unreachable at t = ${num(r.t)} s: ${r.unreachable.replace(/[\r\n]+/g, ' ')}`);
  for (const e of result.events) if (e.type === 'contact') lines.push(`# event: ${e.type} at ${num(e.drive * DEG)} deg: ${e.text.replace(/[\r\n]+/g, ' ')}`);
  return lines.join('\n') + '\n';
}

/** A followed schedule: every input row with every hinge angle, or the reason it has none. */
export function followTable(
  pattern: Pattern,
  result: FollowResult,
  header: TableHeader,
  holds: { crease: number; value: number }[],
  format: TableFormat,
  opts: { rates?: boolean; creases?: number[]; units?: string } = {},
): string {
  const cols = listed(pattern, opts);
  const checks = result.checks;
  const tq = torqueDrives(checks);
  const label = (c: number) => pattern.creases[c].label;
  const largest = result.rows.reduce((m, r) => Math.max(m, r.maxResidual ?? 0), 0);
  const meta = {
    ...sourceMeta(FOLLOW_FORMAT, header),
    drives: result.drives.map(label).join(' '),
    branch: branchMeta(result.branch),
    held: holdsText(pattern, holds),
    units: 'seconds, degrees; residuals in radians' + (opts.rates ? '; rates in degrees per degree of the drive' : ''),
    ...accuracyMeta(largest),
    status: result.status,
    unreachableRows: result.rows.filter((r) => r.unreachable).length,
    ...checksMeta(pattern, checks, opts.units),
    ...provenanceMeta(header),
  };
  if (format === 'json') {
    return JSON.stringify({
      ...meta,
      ...checksJson(pattern, checks),
      largestResidual: jsonNum(largest),
      columns: cols.map(label),
      rows: result.rows.map((r) => ({
        time: r.time,
        line: r.line,
        drives: Object.fromEntries([...r.values].map(([c, v]) => [label(c), deg(v)])),
        ...(r.angles ? { angles: byLabel(pattern, cols, r.angles!, deg), maxResidual: r.maxResidual } : { unreachable: r.unreachable }),
        ...(r.rates ? { rates: byLabel(pattern, cols, r.rates!) } : {}),
        ...stateJson(pattern, r.checks),
      })),
      events: eventsJson(pattern, result.events),
      messages: result.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text })),
    }, null, 2) + '\n';
  }
  const head = ['time', ...cols.map(label), ...(opts.rates ? cols.map((c) => `rate:${label(c)}`) : []), 'max_residual', 'flag', ...stateHead(pattern, checks, tq)];
  const lines = [metadataLines(meta) + head.map(csvCell).join(',')];
  for (const r of result.rows) {
    lines.push([
      num(r.time),
      ...cols.map((c) => (r.angles ? num(r.angles[c] * DEG) : '')),
      ...(opts.rates ? cols.map((c) => (r.rates ? num(r.rates[c]) : '')) : []),
      num(r.maxResidual),
      csvCell(r.unreachable ? `unreachable: ${r.unreachable}` : ''),
      ...stateCells(r.checks, checks, tq),
    ].join(','));
  }
  for (const e of result.events) if (e.type === 'contact') lines.push(`# event: ${e.type} at ${num(e.drive * DEG)} deg: ${e.text.replace(/[\r\n]+/g, ' ')}`);
  return lines.join('\n') + '\n';
}

/** A grid over two drives: one row per node (x, y), every hinge angle, or the reason the node was not reached. */
export function gridTable(
  pattern: Pattern,
  result: GridResult,
  header: TableHeader,
  axes: { x: number; y: number },
  holds: { crease: number; value: number }[],
  format: TableFormat,
  creases?: number[],
): string {
  const cols = listed(pattern, { creases });
  const label = (c: number) => pattern.creases[c].label;
  const all = result.nodes.flat();
  const largest = all.reduce((m, n) => Math.max(m, n.maxResidual ?? 0), 0);
  const meta = {
    ...sourceMeta(GRID_FORMAT, header),
    x: label(axes.x),
    y: label(axes.y),
    held: holdsText(pattern, holds),
    units: 'degrees; residuals in radians',
    ...accuracyMeta(largest),
    status: result.status,
    unreachableNodes: all.filter((n) => n.unreachable).length,
    ...provenanceMeta(header),
  };
  if (format === 'json') {
    return JSON.stringify({
      ...meta,
      largestResidual: jsonNum(largest),
      columns: cols.map(label),
      nodes: all.map((n) => ({
        x: deg(n.x),
        y: deg(n.y),
        ...(n.angles ? { angles: byLabel(pattern, cols, n.angles!, deg), maxResidual: n.maxResidual } : { unreachable: n.unreachable }),
      })),
      messages: result.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text })),
    }, null, 2) + '\n';
  }
  const head = [label(axes.x), label(axes.y), ...cols.map(label), 'max_residual', 'flag'];
  const lines = [metadataLines(meta) + head.map(csvCell).join(',')];
  for (const n of all) {
    lines.push([num(n.x * DEG), num(n.y * DEG), ...cols.map((c) => (n.angles ? num(n.angles[c] * DEG) : '')), num(n.maxResidual), csvCell(n.unreachable ? `unreachable: ${n.unreachable}` : '')].join(','));
  }
  return lines.join('\n') + '\n';
}
