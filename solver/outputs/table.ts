// Tables for the actuator team, CSV or JSON, written row by row to a sink while the rows are computed (so a
// large table is never held as one string): a metadata header (pattern and the SHA-256 of its file and of any
// other input, drive, holds, units, sign convention, tolerance, program version, date, the command that wrote
// it, the cautions line), one row per sample, time row, schedule line or grid node, then what the computation
// found (branch, status, largest residual, events, messages). Pure text in, text out: the caller supplies
// the date, version and command, so the core does no I/O and reads no clock.
//
// Version 2 of the table formats: JSON rows are columnar (the `columns` list of crease labels once, then per
// row an array of numbers for angles, one for rates, …, in that order); JSON is compact unless asked to be
// indented; numbers are full precision unless a number of significant digits is asked for. Fields that the
// computation decides (branch, method, status, counts, largest residual, events, messages) come after the
// rows, in JSON as in CSV ("# key: value" lines after the last row).
//
// Optional per-row fields (RowField) are declared in one place and written to both formats: a header entry,
// CSV columns after the standard ones, a JSON member of each row.

import type { Drive, Pattern } from '../types';
import type { SweepEvent, SweepResult, SweepSample } from '../paths/sweep';
import { driveProfile, type ScheduleResult, type ScheduleRow, type ProfileSpec, type FollowResult, type FollowRow } from './schedule';
import type { GridNode, GridResult } from './grid';
import { CAUTIONS } from '../formats/cautions';
import { RESIDUAL_TOLERANCE } from '../closure/newton';
import { decimalsText, roundTo } from '../formats/numbers';
import { escapeControls, jsonSafe } from '../formats/escape';
import { jsonText, numberArrayJson, RawJson } from '../formats/json-text';

const DEG = 180 / Math.PI;

export const SIGN_CONVENTION = 'fold angle 0 = flat, valley positive, mountain negative, ±180 = folded flat';
export const TABLE_FORMAT = 'hingeplan-angle-table';
export const SCHEDULE_FORMAT = 'hingeplan-deployment-schedule';
export const FOLLOW_FORMAT = 'hingeplan-followed-schedule';
export const GRID_FORMAT = 'hingeplan-angle-grid';
/** 2: columnar JSON rows, computed fields after the rows, full precision. */
export const TABLE_VERSION = 2;

/** Another file the numbers depend on (a start state, a supplied schedule), named and hashed in the header. */
export interface TableInput {
  /** header key prefix: "start" → startFile, startSha256 */
  role: string;
  file: string;
  /** SHA-256 of the file's bytes (hex) */
  sha256: string;
}

export interface TableHeader {
  patternName: string;
  /** the pattern file's name as given on the command line */
  file: string;
  /** SHA-256 of the file's bytes (hex) */
  fileSha256: string;
  /** program version */
  version: string;
  /** ISO 8601 time the table was written */
  date: string;
  /** the command line that wrote it (with `inputs`, it reproduces every number) */
  command: string;
  inputs?: TableInput[];
}

export type TableFormat = 'csv' | 'json';

/** Where a table goes, a piece at a time. */
export interface TextSink {
  write(text: string): void;
}

export interface TableOptions {
  format: TableFormat;
  /** JSON indented for people (default compact) */
  pretty?: boolean;
  /** significant digits of every number (default: full precision) */
  digits?: number;
  /** creases to list: every crease that is not a boundary edge (default) */
  creases?: number[];
}

export interface AngleTableOptions extends TableOptions {
  /** add a rate column per crease (degrees per degree of drive) */
  rates?: boolean;
  /** the drive values as the person gave them, in degrees, by their value in radians (echoed exactly) */
  driveDegrees?: Map<number, number>;
  /** optional per-sample fields (see RowField) */
  fields?: RowField<SweepSample>[];
}

export type HeaderValue = string | number | boolean | null | HeaderValue[] | { [key: string]: HeaderValue };

/** Number forms of one table (full precision, or `digits` significant digits). */
export interface NumberForm {
  /** a CSV cell: '' for undefined and NaN, inf / -inf */
  csv(x: number | undefined): string;
  /** a JSON number (null for non-finite) */
  json(x: number | undefined): number | null;
  /** round only (for values written through RawJson arrays) */
  round(x: number): number;
}

export function numberForm(digits?: number): NumberForm {
  return {
    csv: (x) => (x === undefined || Number.isNaN(x) ? '' : !Number.isFinite(x) ? (x > 0 ? 'inf' : '-inf') : String(roundTo(x, digits))),
    json: (x) => (x === undefined || !Number.isFinite(x) ? null : roundTo(x, digits)),
    round: (x) => roundTo(x, digits),
  };
}

/**
 * An optional per-row field, declared once for both formats: `header` entries written before the rows,
 * `columns` CSV columns after the standard ones with `csv` giving their cells, and `json` the member `key` of
 * each row object (undefined leaves it out of that row).
 */
export interface RowField<R> {
  key: string;
  header?: Record<string, HeaderValue>;
  columns: string[];
  csv(row: R, n: NumberForm): string[];
  json(row: R, n: NumberForm): unknown;
}

/**
 * Numbers with 15 significant digits, shortest form (kept for callers that round for display; tables write
 * full precision through numberForm).
 */
export function num(x: number | undefined): string {
  if (x === undefined || Number.isNaN(x)) return '';
  if (!Number.isFinite(x)) return x > 0 ? 'inf' : '-inf';
  const r = +x.toPrecision(15);
  return String(r === 0 ? 0 : r);
}

/** A CSV cell, control characters escaped (see ../formats/escape.ts), quoted when it holds a comma, quote or line break (RFC 4180). */
export function csvCell(s: string): string {
  const t = escapeControls(s);
  return /[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
}

function listed(pattern: Pattern, opts: { creases?: number[] }): number[] {
  return opts.creases ?? pattern.creases.filter((c) => c.assignment !== 'B').map((c) => c.index);
}

/** A crease's value in degrees: the value as given when this crease was set by the person (a drive, a hold). */
class Degrees {
  private readonly given = new Map<number, Map<number, number>>();
  readonly echoed: Uint8Array;

  constructor(n: number) {
    this.echoed = new Uint8Array(n);
  }

  add(crease: number, rad: number, deg: number | undefined): void {
    if (deg === undefined) return;
    let m = this.given.get(crease);
    if (!m) this.given.set(crease, (m = new Map()));
    m.set(rad, deg);
    this.echoed[crease] = 1;
  }

  of(crease: number, rad: number): number {
    return this.echoed[crease] ? this.given.get(crease)!.get(rad) ?? rad * DEG : rad * DEG;
  }
}

function holdsText(pattern: Pattern, holds: Drive[], n: NumberForm): string {
  return holds.map((h) => `${pattern.creases[h.crease].label}=${n.csv(h.degrees ?? h.value * DEG)}`).join(' ') || 'none';
}

function messagesJson(ms: { severity: string; code: string; text: string }[]) {
  return ms.map((m) => ({ severity: m.severity, code: m.code, text: m.text }));
}

function eventsJson(pattern: Pattern, events: SweepEvent[], n: NumberForm) {
  return events.map((e) => ({
    type: e.type,
    drive: n.json(e.drive * DEG),
    text: e.text,
    ...(e.crease !== undefined ? { crease: pattern.creases[e.crease].label } : {}),
  }));
}

/** The header's source lines: what the table is, the pattern, its file and every other input's hash. */
function sourceEntries(format: string, header: TableHeader): Record<string, HeaderValue> {
  const out: Record<string, HeaderValue> = { format, version: TABLE_VERSION, pattern: header.patternName, file: header.file, fileSha256: header.fileSha256 };
  for (const i of header.inputs ?? []) {
    out[`${i.role}File`] = i.file;
    out[`${i.role}Sha256`] = i.sha256;
  }
  return out;
}

/** Program, date, the command that reproduces every number, and the cautions. */
function provenanceEntries(header: TableHeader): Record<string, HeaderValue> {
  return { signConvention: SIGN_CONVENTION, tolerance: `${RESIDUAL_TOLERANCE} rad largest vertex residual`, program: `hingeplan ${header.version}`, date: header.date, command: header.command, cautions: CAUTIONS };
}

// ---------------------------------------------------------------------------------------------------------
// the row stream shared by every table kind

interface StreamSpec<R> {
  format: string;
  head: Record<string, HeaderValue>;
  /** JSON: the crease labels that the row arrays follow */
  columns: string[];
  /** CSV column names */
  csvColumns: string[];
  /** JSON key of the row array */
  rowsKey: string;
  csvRow(row: R): string[];
  jsonRow(row: R): Record<string, unknown>;
  fields: RowField<R>[];
}

/** Writes a header, rows and a tail to a sink, in CSV or JSON. */
class TableStream<R> {
  private rows = 0;

  constructor(private readonly sink: TextSink, private readonly opts: TableOptions, private readonly spec: StreamSpec<R>) {}

  begin(): void {
    const { spec, opts } = this;
    const head: Record<string, HeaderValue> = { ...spec.head };
    for (const f of spec.fields) Object.assign(head, f.header ?? {});
    if (opts.format === 'csv') {
      const cols = [...spec.csvColumns, ...spec.fields.flatMap((f) => f.columns)];
      this.sink.write(metadataLines(head) + cols.map(csvCell).join(',') + '\n');
      return;
    }
    const p = !!opts.pretty;
    const members = Object.entries({ ...head, columns: spec.columns }).map(([k, v]) => member(k, v, p));
    this.sink.write('{' + members.join(',') + (p ? ',\n  ' : ',') + JSON.stringify(spec.rowsKey) + (p ? ': [' : ':['));
  }

  row(r: R): void {
    const { spec, opts } = this;
    const n = numberForm(opts.digits);
    if (opts.format === 'csv') {
      const cells = spec.csvRow(r);
      for (const f of spec.fields) cells.push(...f.csv(r, n));
      this.sink.write(cells.join(',') + '\n');
    } else {
      const o = spec.jsonRow(r);
      for (const f of spec.fields) {
        const v = f.json(r, n);
        if (v !== undefined) o[f.key] = v;
      }
      const p = !!opts.pretty;
      this.sink.write((this.rows ? ',' : '') + (p ? '\n    ' : '\n') + jsonText(o, p, 2));
    }
    this.rows++;
  }

  /** `tail`: members after the rows; `csvLines`: comment lines after the rows (CSV only). */
  end(tail: Record<string, HeaderValue | undefined>, csvLines: string[] = []): void {
    const defined = Object.entries(tail).filter(([, v]) => v !== undefined) as [string, HeaderValue][];
    if (this.opts.format === 'csv') {
      const simple = defined.filter(([, v]) => v === null || typeof v !== 'object');
      this.sink.write(metadataLines(Object.fromEntries(simple)) + csvLines.map((l) => `# ${oneLine(l)}\n`).join(''));
      return;
    }
    const p = !!this.opts.pretty;
    const close = this.rows ? (p ? '\n  ]' : '\n]') : ']';
    this.sink.write(close + defined.map(([k, v]) => ',' + member(k, v, p)).join('') + (p ? '\n}\n' : '}\n'));
  }
}

function member(key: string, value: unknown, pretty: boolean): string {
  return (pretty ? '\n  ' : '') + jsonSafe(JSON.stringify(key)) + (pretty ? ': ' : ':') + jsonText(value, pretty, 1);
}

/** A value on one line, control characters escaped. */
function oneLine(s: string): string {
  return escapeControls(s.replace(/\r\n|\r|\n/g, ' '));
}

function metadataLines(meta: Record<string, HeaderValue>): string {
  // one "# key: value" line each; objects as JSON; values never carry line breaks or control characters
  return Object.entries(meta)
    .map(([k, v]) => `# ${k}: ${oneLine(v === null ? '' : typeof v === 'object' ? JSON.stringify(v) : String(v))}\n`)
    .join('');
}

/** Collects a sink's pieces into one string (for the callers that want the whole table). */
function collect(write: (sink: TextSink) => void): string {
  const parts: string[] = [];
  write({ write: (t) => parts.push(t) });
  return parts.join('');
}

// ---------------------------------------------------------------------------------------------------------
// angle tables (a sweep)

/** The angle table of a sweep, written while the sweep runs: begin(), sample() per sample, end(result). */
export class AngleTableWriter {
  private readonly stream: TableStream<SweepSample>;
  private largest = 0;

  constructor(pattern: Pattern, header: TableHeader, drive: number, holds: Drive[], opts: AngleTableOptions, sink: TextSink) {
    const cols = listed(pattern, opts);
    const label = (c: number) => pattern.creases[c].label;
    const n = numberForm(opts.digits);
    const deg = new Degrees(pattern.creases.length);
    for (const [rad, d] of opts.driveDegrees ?? []) deg.add(drive, rad, d);
    for (const h of holds) deg.add(h.crease, h.value, h.degrees);
    const angle = (s: SweepSample, c: number) => n.round(deg.of(c, s.angles[c]));
    const pretty = !!opts.pretty;
    this.stream = new TableStream(sink, opts, {
      format: opts.format,
      head: {
        ...sourceEntries(TABLE_FORMAT, header),
        drive: label(drive),
        held: holdsText(pattern, holds, n),
        units: 'degrees (angles), degrees per degree of drive (rates), radians (residuals)',
        ...provenanceEntries(header),
      },
      columns: cols.map(label),
      csvColumns: ['drive', ...cols.map(label), ...(opts.rates ? cols.map((c) => `rate:${label(c)}`) : []), 'max_residual', 'condition', 'near_singular'],
      rowsKey: 'samples',
      csvRow: (s) => {
        const cells = [n.csv(deg.of(drive, s.drive))];
        for (const c of cols) cells.push(n.csv(angle(s, c)));
        if (opts.rates) for (const c of cols) cells.push(n.csv(s.rates[c]));
        cells.push(n.csv(s.maxResidual), n.csv(s.condition), s.nearSingular ? '1' : '0');
        return cells;
      },
      jsonRow: (s) => ({
        drive: n.json(deg.of(drive, s.drive)),
        angles: numberArrayJson(cols.length, (i) => angle(s, cols[i]), pretty),
        ...(opts.rates ? { rates: numberArrayJson(cols.length, (i) => n.round(s.rates[cols[i]]), pretty) } : {}),
        maxResidual: n.json(s.maxResidual),
        condition: n.json(s.condition),
        nearSingular: s.nearSingular,
      }),
      fields: opts.fields ?? [],
    });
    this.finish = (r: SweepResult) => {
      const b = r.branch;
      this.stream.end({
        branch: b ? `${b.id !== undefined ? `${b.id} ` : ''}${b.name}${b.matchesAssignment ? ' (matches the mountain/valley assignment)' : ''}` : 'none',
        method: r.method,
        status: r.status,
        sampleCount: r.recorded,
        requested: r.requested,
        largestResidual: n.json(this.largest),
        ...(opts.format === 'json' ? { events: eventsJson(pattern, r.events, n) as HeaderValue, messages: messagesJson(r.messages) as HeaderValue } : {}),
      }, r.events.map((e) => `event: ${e.type} at ${n.csv(e.drive * DEG)} deg: ${e.text}`));
    };
  }

  private readonly finish: (r: SweepResult) => void;

  begin(): void {
    this.stream.begin();
  }

  sample(s: SweepSample): void {
    if (s.maxResidual > this.largest) this.largest = s.maxResidual;
    this.stream.row(s);
  }

  end(result: SweepResult): void {
    this.finish(result);
  }
}

/** The whole angle table of a finished sweep as one string (the app's export). */
export function angleTable(pattern: Pattern, result: SweepResult, header: TableHeader, holds: Drive[], opts: AngleTableOptions): string {
  return collect((sink) => {
    const w = new AngleTableWriter(pattern, header, result.drive, holds, opts, sink);
    w.begin();
    for (const s of result.samples) w.sample(s);
    w.end(result);
  });
}

// ---------------------------------------------------------------------------------------------------------
// deployment schedules

export interface ScheduleTableOptions extends TableOptions {
  /** the drive's start and end as given, in degrees (echoed exactly where a row is at them) */
  fromDegrees?: number;
  toDegrees?: number;
  fields?: RowField<ScheduleRow>[];
}

/** The profile in words, for the header. */
export function profileText(spec: ProfileSpec, n: NumberForm = numberForm(), fromDeg?: number, toDeg?: number): string {
  const p = driveProfile(spec).profile;
  const from = fromDeg ?? spec.from * DEG, to = toDeg ?? spec.to * DEG;
  if (!p) return `${spec.kind} from ${n.csv(from)} to ${n.csv(to)} deg in ${n.csv(spec.duration)} s`;
  return `${spec.kind} from ${n.csv(from)} to ${n.csv(to)} deg in ${n.csv(spec.duration)} s, acceleration time ${n.csv(p.accelTime)} s, jerk time ${n.csv(p.jerkTime)} s, peak drive velocity ${n.csv(p.peakVelocity * DEG)} deg/s, peak drive acceleration ${n.csv(p.peakAcceleration * DEG)} deg/s^2`;
}

/** A deployment schedule, written while it is computed: begin(), row() per time row, end(result). */
export class ScheduleTableWriter {
  private readonly stream: TableStream<ScheduleRow>;
  private largest = 0;
  private readonly finish: (r: ScheduleResult) => void;

  constructor(pattern: Pattern, header: TableHeader, drive: number, holds: Drive[], profile: ProfileSpec, opts: ScheduleTableOptions, sink: TextSink) {
    const cols = listed(pattern, opts);
    const label = (c: number) => pattern.creases[c].label;
    const n = numberForm(opts.digits);
    const deg = new Degrees(pattern.creases.length);
    deg.add(drive, profile.from, opts.fromDegrees);
    deg.add(drive, profile.to, opts.toDegrees);
    for (const h of holds) deg.add(h.crease, h.value, h.degrees);
    const pretty = !!opts.pretty;
    const flags = (r: ScheduleRow) => (r.unreachable ? 'unreachable' : [...r.overRate.map((c) => `rate:${label(c)}`), ...r.overAcceleration.map((c) => `accel:${label(c)}`)].join(' '));
    const arr = (v: Float64Array, f: (x: number) => number) => numberArrayJson(cols.length, (i) => n.round(f(v[cols[i]])), pretty);
    this.stream = new TableStream(sink, opts, {
      format: opts.format,
      head: {
        ...sourceEntries(SCHEDULE_FORMAT, header),
        drive: label(drive),
        held: holdsText(pattern, holds, n),
        profile: profileText(profile, n, opts.fromDegrees, opts.toDegrees),
        units: 'seconds, degrees, degrees/s, degrees/s^2; residuals in radians',
        ...provenanceEntries(header),
      },
      columns: cols.map(label),
      csvColumns: ['t', 'drive', 'drive_velocity', 'drive_acceleration', ...cols.map(label), ...cols.map((c) => `velocity:${label(c)}`), ...cols.map((c) => `acceleration:${label(c)}`), 'max_residual', 'flags'],
      rowsKey: 'rows',
      csvRow: (r) => {
        const a = r.angles, v = r.velocities, ac = r.accelerations;
        const cells = [n.csv(r.t), n.csv(deg.of(drive, r.drive)), n.csv(r.driveVelocity * DEG), n.csv(r.driveAcceleration * DEG)];
        for (const c of cols) cells.push(a ? n.csv(deg.of(c, a[c])) : '');
        for (const c of cols) cells.push(v ? n.csv(v[c] * DEG) : '');
        for (const c of cols) cells.push(ac ? n.csv(ac[c] * DEG) : '');
        cells.push(n.csv(r.maxResidual), csvCell(flags(r)));
        return cells;
      },
      jsonRow: (r) => ({
        t: n.json(r.t),
        drive: n.json(deg.of(drive, r.drive)),
        driveVelocity: n.json(r.driveVelocity * DEG),
        driveAcceleration: n.json(r.driveAcceleration * DEG),
        ...(r.angles
          ? {
              angles: numberArrayJson(cols.length, (i) => n.round(deg.of(cols[i], r.angles![cols[i]])), pretty),
              velocities: arr(r.velocities!, (x) => x * DEG),
              accelerations: arr(r.accelerations!, (x) => x * DEG),
              maxResidual: n.json(r.maxResidual),
            }
          : { unreachable: r.unreachable }),
        overRate: r.overRate.map(label),
        overAcceleration: r.overAcceleration.map(label),
      }),
      fields: opts.fields ?? [],
    });
    this.finish = (result) => {
      const over = result.hinges.filter((h) => cols.includes(h.crease) && (h.rowsOverRate || h.rowsOverAcceleration));
      // peaks for people: four decimals (the rows themselves keep every digit)
      const lines = over.map((h) => `over limit: ${label(h.crease)}: peak velocity ${decimalsText(h.peakRate * DEG, 4)} deg/s (${h.rowsOverRate} rows over), peak acceleration ${decimalsText(h.peakAcceleration * DEG, 4)} deg/s^2 (${h.rowsOverAcceleration} rows over)`);
      this.stream.end({
        branch: result.sweep?.branch ? `${result.sweep.branch.id ?? ''} ${result.sweep.branch.name}`.trim() : 'none',
        status: result.status,
        rowCount: result.rowCount,
        unreachableRows: this.unreachable,
        largestResidual: n.json(this.largest),
        ...(opts.format === 'json'
          ? {
              hinges: result.hinges.filter((h) => cols.includes(h.crease)).map((h) => ({
                crease: label(h.crease),
                peakVelocity: n.json(h.peakRate * DEG),
                peakAcceleration: n.json(h.peakAcceleration * DEG),
                rowsOverRate: h.rowsOverRate,
                rowsOverAcceleration: h.rowsOverAcceleration,
              })),
              events: eventsJson(pattern, result.events, n) as HeaderValue,
              messages: messagesJson(result.messages) as HeaderValue,
            }
          : {}),
      }, [...lines, ...this.unreachableLines, ...result.events.map((e) => `event: ${e.type} at ${n.csv(e.drive * DEG)} deg: ${e.text}`)]);
    };
  }

  private unreachable = 0;
  private readonly unreachableLines: string[] = [];

  begin(): void {
    this.stream.begin();
  }

  row(r: ScheduleRow): void {
    if (r.maxResidual !== undefined && r.maxResidual > this.largest) this.largest = r.maxResidual;
    if (r.unreachable) {
      this.unreachable++;
      if (this.unreachableLines.length < 20) this.unreachableLines.push(`unreachable at t = ${numberForm().csv(r.t)} s: ${r.unreachable}`);
    }
    this.stream.row(r);
  }

  end(result: ScheduleResult): void {
    if (this.unreachable > this.unreachableLines.length) this.unreachableLines.push(`… and ${this.unreachable - this.unreachableLines.length} more unreachable rows`);
    this.finish(result);
  }
}

/** The whole schedule of a finished computation as one string (the app's export). */
export function scheduleTable(
  pattern: Pattern,
  result: ScheduleResult,
  header: TableHeader,
  drive: number,
  holds: Drive[],
  format: TableFormat,
  creases?: number[],
  opts: Omit<ScheduleTableOptions, 'format' | 'creases'> = {},
): string {
  const spec = result.profile?.spec ?? { kind: 'constant', from: 0, to: 0, duration: 0 };
  return collect((sink) => {
    const w = new ScheduleTableWriter(pattern, header, drive, holds, spec, { ...opts, format, ...(creases ? { creases } : {}) }, sink);
    w.begin();
    for (const r of result.rows) w.row(r);
    w.end(result);
  });
}

// ---------------------------------------------------------------------------------------------------------
// followed schedules and grids (written from the finished result, a row at a time)

/** A followed schedule: every input row with every hinge angle, or the reason it has none. */
export function writeFollowTable(
  pattern: Pattern,
  result: FollowResult,
  header: TableHeader,
  holds: Drive[],
  opts: TableOptions & { rates?: boolean; fields?: RowField<FollowRow>[] },
  sink: TextSink,
): void {
  const cols = listed(pattern, opts);
  const label = (c: number) => pattern.creases[c].label;
  const n = numberForm(opts.digits);
  const pretty = !!opts.pretty;
  const largest = result.rows.reduce((m, r) => Math.max(m, r.maxResidual ?? 0), 0);
  // the schedule's own values are echoed as the file gave them (degrees → radians → degrees drifts)
  const given = (r: FollowRow, c: number, rad: number) => (r.degrees?.has(c) && r.values.get(c) === rad ? r.degrees.get(c)! : rad * DEG);
  const deg = new Degrees(pattern.creases.length);
  for (const h of holds) deg.add(h.crease, h.value, h.degrees);
  const angle = (r: FollowRow, c: number) => (r.values.has(c) ? given(r, c, r.angles![c]) : deg.of(c, r.angles![c]));
  const stream = new TableStream<FollowRow>(sink, opts, {
    format: opts.format,
    head: {
      ...sourceEntries(FOLLOW_FORMAT, header),
      drives: result.drives.map(label).join(' '),
      held: holdsText(pattern, holds, n),
      units: 'seconds, degrees; residuals in radians' + (opts.rates ? '; rates in degrees per degree of the drive' : ''),
      ...provenanceEntries(header),
    },
    columns: cols.map(label),
    csvColumns: ['time', ...cols.map(label), ...(opts.rates ? cols.map((c) => `rate:${label(c)}`) : []), 'max_residual', 'flag'],
    rowsKey: 'rows',
    csvRow: (r) => [
      n.csv(r.time),
      ...cols.map((c) => (r.angles ? n.csv(angle(r, c)) : '')),
      ...(opts.rates ? cols.map((c) => (r.rates ? n.csv(r.rates[c]) : '')) : []),
      n.csv(r.maxResidual),
      csvCell(r.unreachable ? `unreachable: ${r.unreachable}` : ''),
    ],
    jsonRow: (r) => ({
      time: n.json(r.time),
      line: r.line,
      drives: Object.fromEntries([...r.values].map(([c, v]) => [label(c), n.json(given(r, c, v))])),
      ...(r.angles ? { angles: numberArrayJson(cols.length, (i) => n.round(angle(r, cols[i])), pretty), maxResidual: n.json(r.maxResidual) } : { unreachable: r.unreachable }),
      ...(r.rates ? { rates: numberArrayJson(cols.length, (i) => n.round(r.rates![cols[i]]), pretty) } : {}),
    }),
    fields: opts.fields ?? [],
  });
  stream.begin();
  for (const r of result.rows) stream.row(r);
  stream.end({
    status: result.status,
    rowCount: result.rows.length,
    unreachableRows: result.rows.filter((r) => r.unreachable).length,
    largestResidual: n.json(largest),
    ...(opts.format === 'json' ? { events: eventsJson(pattern, result.events, n) as HeaderValue, messages: messagesJson(result.messages) as HeaderValue } : {}),
  }, result.events.map((e) => `event: ${e.type} at ${n.csv(e.drive * DEG)} deg: ${e.text}`));
}

export function followTable(pattern: Pattern, result: FollowResult, header: TableHeader, holds: Drive[], format: TableFormat, opts: { rates?: boolean; creases?: number[] } = {}): string {
  return collect((sink) => writeFollowTable(pattern, result, header, holds, { format, ...opts }, sink));
}

/**
 * A grid over two drives: one row per node (x, y), every hinge angle, or the reason the node was not reached.
 * CSV names the axis columns "x" and "y" (the header's x and y lines say which creases they are), so no
 * column name repeats a crease's.
 */
export function writeGridTable(
  pattern: Pattern,
  result: GridResult,
  header: TableHeader,
  axes: { x: number; y: number; xDegrees?: Map<number, number>; yDegrees?: Map<number, number> },
  holds: Drive[],
  opts: TableOptions & { fields?: RowField<GridNode>[] },
  sink: TextSink,
): void {
  const cols = listed(pattern, opts);
  const label = (c: number) => pattern.creases[c].label;
  const n = numberForm(opts.digits);
  const pretty = !!opts.pretty;
  const all = result.nodes.flat();
  const largest = all.reduce((m, q) => Math.max(m, q.maxResidual ?? 0), 0);
  const deg = new Degrees(pattern.creases.length);
  for (const h of holds) deg.add(h.crease, h.value, h.degrees);
  // the axis values as given (degrees, by their value in radians)
  const xDeg = (v: number) => axes.xDegrees?.get(v) ?? v * DEG;
  const yDeg = (v: number) => axes.yDegrees?.get(v) ?? v * DEG;
  const angle = (q: GridNode, c: number) => (c === axes.x && q.angles![c] === q.x ? xDeg(q.x) : c === axes.y && q.angles![c] === q.y ? yDeg(q.y) : deg.of(c, q.angles![c]));
  const stream = new TableStream<GridNode>(sink, opts, {
    format: opts.format,
    head: {
      ...sourceEntries(GRID_FORMAT, header),
      x: label(axes.x),
      y: label(axes.y),
      held: holdsText(pattern, holds, n),
      units: 'degrees; residuals in radians',
      ...provenanceEntries(header),
    },
    columns: cols.map(label),
    csvColumns: ['x', 'y', ...cols.map(label), 'max_residual', 'flag'],
    rowsKey: 'nodes',
    csvRow: (q) => [n.csv(xDeg(q.x)), n.csv(yDeg(q.y)), ...cols.map((c) => (q.angles ? n.csv(angle(q, c)) : '')), n.csv(q.maxResidual), csvCell(q.unreachable ? `unreachable: ${q.unreachable}` : '')],
    jsonRow: (q) => ({
      x: n.json(xDeg(q.x)),
      y: n.json(yDeg(q.y)),
      ...(q.angles ? { angles: numberArrayJson(cols.length, (i) => n.round(angle(q, cols[i])), pretty), maxResidual: n.json(q.maxResidual) } : { unreachable: q.unreachable }),
    }),
    fields: opts.fields ?? [],
  });
  stream.begin();
  for (const q of all) stream.row(q);
  stream.end({
    status: result.status,
    nodeCount: all.length,
    unreachableNodes: all.filter((q) => q.unreachable).length,
    largestResidual: n.json(largest),
    ...(opts.format === 'json' ? { messages: messagesJson(result.messages) as HeaderValue } : {}),
  });
}

export function gridTable(pattern: Pattern, result: GridResult, header: TableHeader, axes: { x: number; y: number }, holds: Drive[], format: TableFormat, creases?: number[]): string {
  return collect((sink) => writeGridTable(pattern, result, header, axes, holds, { format, ...(creases ? { creases } : {}) }, sink));
}

export { RawJson };
