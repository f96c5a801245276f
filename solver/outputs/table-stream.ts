// The machinery every table shares: where the text goes (a TextSink, a piece at a time), the number forms
// (full precision, or a number of significant digits), optional per-row fields (RowField), the header's
// common entries, and TableStream, which writes a header (what was asked), each row as it comes and a tail
// (what the computation found) in CSV or JSON. The table kinds themselves are in ./table.ts.

import type { Drive, Pattern } from '../types';
import type { SweepEvent } from '../paths/sweep';
import { CAUTIONS } from '../formats/cautions';
import { RESIDUAL_TOLERANCE } from '../closure/newton';
import { roundTo } from '../formats/numbers';
import { escapeControls, jsonSafe } from '../formats/escape';
import { jsonText } from '../formats/json-text';

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
 * `columns` CSV columns after the standard ones with `csv` giving their cells, `json` the members it adds to
 * each row object (none: undefined), and `tail` entries written after the rows (what the computation found).
 */
export interface RowField<R> {
  header?: Record<string, HeaderValue>;
  columns: string[];
  csv(row: R, n: NumberForm): string[];
  json(row: R, n: NumberForm): Record<string, unknown> | undefined;
  tail?(format: TableFormat): Record<string, HeaderValue | undefined>;
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

export function listed(pattern: Pattern, opts: { creases?: number[] }): number[] {
  return opts.creases ?? pattern.creases.filter((c) => c.assignment !== 'B').map((c) => c.index);
}

/** A crease's value in degrees: the value as given when this crease was set by the person (a drive, a hold). */
export class Degrees {
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

export function holdsText(pattern: Pattern, holds: Drive[], n: NumberForm = numberForm()): string {
  return holds.map((h) => `${pattern.creases[h.crease].label}=${n.csv(h.degrees ?? h.value * DEG)}`).join(' ') || 'none';
}

export function messagesJson(ms: { severity: string; code: string; text: string }[]) {
  return ms.map((m) => ({ severity: m.severity, code: m.code, text: m.text }));
}

export function eventsJson(pattern: Pattern, events: SweepEvent[], n: NumberForm) {
  return events.map((e) => ({
    type: e.type,
    drive: n.json(e.drive * DEG),
    ...(e.panels ? { panels: e.panels, point: e.point!.map((x) => n.json(x)), distance: n.json(e.distance) } : {}),
    text: e.text,
    ...(e.crease !== undefined ? { crease: pattern.creases[e.crease].label } : {}),
  }));
}

/** The header's source lines: what the table is, the pattern, its file and every other input's hash. */
export function sourceEntries(format: string, header: TableHeader): Record<string, HeaderValue> {
  const out: Record<string, HeaderValue> = { format, version: TABLE_VERSION, pattern: header.patternName, file: header.file, fileSha256: header.fileSha256 };
  for (const i of header.inputs ?? []) {
    out[`${i.role}File`] = i.file;
    out[`${i.role}Sha256`] = i.sha256;
  }
  return out;
}

/** Program, date, the command that reproduces every number, and the cautions. */
export function provenanceEntries(header: TableHeader): Record<string, HeaderValue> {
  return { signConvention: SIGN_CONVENTION, tolerance: `${RESIDUAL_TOLERANCE} rad largest vertex residual`, program: `hingeplan ${header.version}`, date: header.date, command: header.command, cautions: CAUTIONS };
}

// ---------------------------------------------------------------------------------------------------------
// the row stream shared by every table kind

export interface StreamSpec<R> {
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
export class TableStream<R> {
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
      for (const f of spec.fields) Object.assign(o, f.json(r, n) ?? {});
      const p = !!opts.pretty;
      this.sink.write((this.rows ? ',' : '') + (p ? '\n    ' : '\n') + jsonText(o, p, 2));
    }
    this.rows++;
  }

  /** `tail`: members after the rows; `csvLines`: comment lines after the rows (CSV only). */
  end(tail: Record<string, HeaderValue | undefined>, csvLines: string[] = []): void {
    const all = { ...tail };
    for (const f of this.spec.fields) Object.assign(all, f.tail?.(this.opts.format) ?? {});
    const defined = Object.entries(all).filter(([, v]) => v !== undefined) as [string, HeaderValue][];
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

export function metadataLines(meta: Record<string, HeaderValue>): string {
  // one "# key: value" line each; objects as JSON; values never carry line breaks or control characters
  return Object.entries(meta)
    .map(([k, v]) => `# ${k}: ${oneLine(v === null ? '' : typeof v === 'object' ? JSON.stringify(v) : String(v))}\n`)
    .join('');
}

/** Collects a sink's pieces into one string (for the callers that want the whole table). */
export function collect(write: (sink: TextSink) => void): string {
  const parts: string[] = [];
  write({ write: (t) => parts.push(t) });
  return parts.join('');
}
