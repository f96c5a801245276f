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
import type { SweepResult, SweepSample } from '../paths/sweep';
import { driveProfile, type ScheduleResult, type ScheduleRow, type ProfileSpec, type FollowResult, type FollowRow } from './schedule';
import type { GridNode, GridResult } from './grid';
import { decimalsText } from '../formats/numbers';
import { numberArrayJson } from '../formats/json-text';
import {
  collect, csvCell, Degrees, eventsJson, holdsText, listed, messagesJson, numberForm, provenanceEntries, sourceEntries, TableStream,
  FOLLOW_FORMAT, GRID_FORMAT, SCHEDULE_FORMAT, TABLE_FORMAT,
  type HeaderValue, type NumberForm, type RowField, type TableFormat, type TableHeader, type TableOptions, type TextSink,
} from './table-stream';
import { metadataLines as metadataText } from './table-stream';
import type { ChecksSummary, StateChecks } from './path-physics';
import { CAUTIONS } from '../formats/cautions';

export * from './table-stream';

const DEG = 180 / Math.PI;

export interface AngleTableOptions extends TableOptions {
  /** add a rate column per crease (degrees per degree of drive) */
  rates?: boolean;
  /** the drive values as the person gave them, in degrees, by their value in radians (echoed exactly) */
  driveDegrees?: Map<number, number>;
  /** optional per-sample fields (see RowField) */
  fields?: RowField<SweepSample>[];
  /** the file's length units (the clearance of the contact check is in them) */
  units?: string;
}

// ---------------------------------------------------------------------------------------------------------
// contact and torque: the physical checks a path ran (./path-physics.ts), as row fields of every table kind

/** What a path checks, known before its rows: contact (and its clearance) and the drives a torque is given for. */
export interface ChecksColumns {
  contact: { checked: boolean; clearance: number };
  /** the drives with a holding torque per row (the path's drive, then the held creases); none without loads */
  torqueDrives: number[];
  /** the file's length units, for the clearance */
  units?: string;
  /** what the checks found over the path (the first contact, the peak torques), read when the table ends */
  summary(): ChecksSummary | undefined;
}

/**
 * The checks as a row field: the header entry "contact" ({checked, clearance}) and, with loads, "torqueUnits"
 * and "torqueModel";
 * per row a CSV column "contact" (1 at or past the first contact) and "torque:<drive>" per drive (N·m), and in
 * JSON "contact": true (at or past the first contact), "contacts": [[p, q], …] (the panel pairs in contact)
 * and "torque": {"<drive>": N·m}; after the rows the first contact and each drive's peak torque.
 */
export function checksField<R extends { checks?: StateChecks }>(pattern: Pattern, c: ChecksColumns): RowField<R> {
  const label = (k: number) => pattern.creases[k].label;
  const u = c.units ? ` ${c.units}` : '';
  return {
    header: {
      // the clearance is in the file's units
      contact: { checked: c.contact.checked, clearance: c.contact.clearance },
      ...(c.torqueDrives.length
        ? { torqueUnits: 'N·m', torqueModel: 'static holding torque per drive (virtual work; positive: the actuator pushes towards valley); static only: no dynamics, friction or hinge play' }
        : {}),
    },
    columns: [...(c.contact.checked ? ['contact'] : []), ...c.torqueDrives.map((d) => `torque:${label(d)}`)],
    csv: (r, n) => [...(c.contact.checked ? [r.checks ? (r.checks.contact ? '1' : '0') : ''] : []), ...c.torqueDrives.map((d) => n.csv(r.checks?.torque?.get(d)))],
    json: (r, n) => {
      const k = r.checks;
      if (!k) return undefined;
      return {
        ...(k.contact ? { contact: true } : {}),
        ...(k.contacts.length ? { contacts: k.contacts } : {}),
        ...(k.torque ? { torque: Object.fromEntries([...k.torque].map(([d, v]) => [label(d), n.json(v)])) } : {}),
      };
    },
    tail: (format) => {
      const sum = c.summary();
      if (!sum) return {};
      const n = numberForm();
      const e = sum.event;
      const out: Record<string, HeaderValue | undefined> = {};
      if (c.contact.checked) {
        out.firstContact = format === 'json'
          ? (e ? { drive: n.json(e.drive * DEG), panels: e.panels, point: e.point.map((x) => n.json(x)), distance: n.json(e.distance) } : null)
          : e ? `at ${n.csv(e.drive * DEG)} deg, panels ${e.panels.join(' and ')} (clearance ${n.csv(c.contact.clearance)}${u})` : 'none';
      }
      if (sum.peakTorque) {
        out.peakTorque = format === 'json'
          ? Object.fromEntries([...sum.peakTorque].map(([d, p]) => [label(d), { torque: n.json(p.value), drive: n.json(p.at * DEG) }]))
          : [...sum.peakTorque].map(([d, p]) => `${label(d)} ${decimalsText(p.value, 6)} N·m at ${n.csv(p.at * DEG)} deg`).join('; ') || 'none';
      }
      return out;
    },
  };
}

/** The checks' columns from a finished path's summary (the drives with a torque, in the order they were checked). */
export function checksColumns(summary: ChecksSummary, units?: string): ChecksColumns {
  return { contact: summary.contact, torqueDrives: summary.peakTorque ? [...summary.peakTorque.keys()] : [], ...(units ? { units } : {}), summary: () => summary };
}

// ---------------------------------------------------------------------------------------------------------
// the header helpers of version 1, for tables that keep that form (the tolerance analysis)

/** Numbers to 15 significant digits for JSON (see num). */
export function jsonNum(x: number | undefined): number | null {
  if (x === undefined || !Number.isFinite(x)) return null;
  const r = +x.toPrecision(15);
  return r === 0 ? 0 : r;
}

/** The header's first lines: what the table is and which file it comes from. */
export function sourceMeta(format: string, header: TableHeader, version = 1) {
  return { format, version, pattern: header.patternName, file: header.file, fileSha256: header.fileSha256 };
}

/** The header's last lines: program, date, the command that reproduces every number, and the cautions. */
export function provenanceMeta(header: TableHeader) {
  return { program: `hingeplan ${header.version}`, date: header.date, command: header.command, cautions: CAUTIONS };
}

/** "# key: value" lines, control characters escaped. */
export function metadataLines(meta: Record<string, string | number | boolean | null>): string {
  return metadataText(meta);
}

/** The branch a table followed, as its tail says it: id and name, and whether it follows the assignment. */
function branchText(b: SweepResult['branch'] | undefined): string {
  if (!b) return 'none';
  return `${b.id !== undefined ? `${b.id} ` : ''}${b.name}${b.matchesAssignment ? ' (matches the mountain/valley assignment)' : ''}`;
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
      this.stream.end({
        branch: branchText(r.branch),
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
  const checks = result.checks ? [checksField<SweepSample>(pattern, checksColumns(result.checks, opts.units))] : [];
  return collect((sink) => {
    const w = new AngleTableWriter(pattern, header, result.drive, holds, { ...opts, fields: [...(opts.fields ?? []), ...checks] }, sink);
    w.begin();
    for (const s of result.samples) w.sample(s);
    w.end(result);
  });
}

// ---------------------------------------------------------------------------------------------------------
// deployment schedules

export interface ScheduleTableOptions extends TableOptions {
  /** the file's length units (the clearance of the contact check is in them) */
  units?: string;
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
      const over = result.hinges.filter((h) => cols.includes(h.crease) && (h.rowsOverRate || h.rowsOverAcceleration || h.overBetweenRows));
      // peaks for people: four decimals (the rows themselves keep every digit)
      const lines = over.map((h) => `over limit: ${label(h.crease)}: peak velocity ${decimalsText(h.peakRate * DEG, 4)} deg/s at t = ${decimalsText(h.peakRateAt, 6)} s (${h.rowsOverRate} rows over), peak acceleration ${decimalsText(h.peakAcceleration * DEG, 4)} deg/s^2 at t = ${decimalsText(h.peakAccelerationAt, 6)} s (${h.rowsOverAcceleration} rows over)${h.overBetweenRows ? '; over between rows too' : ''}`);
      this.stream.end({
        branch: branchText(result.sweep?.branch),
        status: result.status,
        rowCount: result.rowCount,
        unreachableRows: this.unreachable,
        largestResidual: n.json(this.largest),
        ...(opts.format === 'json'
          ? {
              hinges: result.hinges.filter((h) => cols.includes(h.crease)).map((h) => ({
                crease: label(h.crease),
                peakVelocity: n.json(h.peakRate * DEG),
                peakVelocityAt: n.json(h.peakRateAt),
                peakAcceleration: n.json(h.peakAcceleration * DEG),
                peakAccelerationAt: n.json(h.peakAccelerationAt),
                rowsOverRate: h.rowsOverRate,
                rowsOverAcceleration: h.rowsOverAcceleration,
                overBetweenRows: h.overBetweenRows,
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
  const checks = result.sweep?.checks ? [checksField<ScheduleRow>(pattern, checksColumns(result.sweep.checks, opts.units))] : [];
  return collect((sink) => {
    const w = new ScheduleTableWriter(pattern, header, drive, holds, spec, { ...opts, format, ...(creases ? { creases } : {}), fields: [...(opts.fields ?? []), ...checks] }, sink);
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
    branch: branchText(result.branch),
    status: result.status,
    rowCount: result.rows.length,
    unreachableRows: result.rows.filter((r) => r.unreachable).length,
    largestResidual: n.json(largest),
    ...(opts.format === 'json' ? { events: eventsJson(pattern, result.events, n) as HeaderValue, messages: messagesJson(result.messages) as HeaderValue } : {}),
  }, result.events.map((e) => `event: ${e.type} at ${n.csv(e.drive * DEG)} deg: ${e.text}`));
}

export function followTable(pattern: Pattern, result: FollowResult, header: TableHeader, holds: Drive[], format: TableFormat, opts: { rates?: boolean; creases?: number[]; units?: string } = {}): string {
  const { units, ...rest } = opts;
  const checks = result.checks ? [checksField<FollowRow>(pattern, checksColumns(result.checks, units))] : [];
  return collect((sink) => writeFollowTable(pattern, result, header, holds, { format, ...rest, fields: checks }, sink));
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

