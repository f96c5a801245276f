// JSON text for the shells' outputs: compact by default, or indented for people (--pretty) with arrays of
// plain values kept on one line, so a table of numbers stays a line per row. Numbers are written at full
// precision (the shortest text that reads back to the same double); non-finite numbers become null (JSON
// has no ∞). Parts already serialized (a row's number arrays) pass through as RawJson.

import { jsonSafe } from './escape';

/** Text that is already JSON, written as it is. */
export class RawJson {
  constructor(readonly text: string) {}
}

/**
 * A JSON array whose items are made one at a time as writeJson reaches them, so a long list of large
 * objects (the solutions of a big sheet, each with an angle and a sensitivity per crease) never exists
 * whole. JSON.stringify sees an ordinary array (toJSON).
 */
export class LazyArray<T> {
  constructor(readonly length: number, readonly item: (i: number) => T) {}
  toJSON(): T[] {
    return Array.from({ length: this.length }, (_, i) => this.item(i));
  }
}

function isPlain(v: unknown): boolean {
  return v === null || typeof v !== 'object' || v instanceof RawJson;
}

function scalar(v: unknown): string | undefined {
  if (v === null) return 'null';
  if (v instanceof RawJson) return v.text;
  switch (typeof v) {
    case 'number':
      return Number.isFinite(v) ? String(v === 0 ? 0 : v) : 'null';
    case 'boolean':
      return v ? 'true' : 'false';
    case 'string':
      return jsonSafe(JSON.stringify(v));
    case 'undefined':
    case 'function':
    case 'symbol':
      return undefined;
    case 'bigint':
      return String(v);
    default:
      return undefined;
  }
}

/**
 * `value` as JSON. Objects skip undefined members (as JSON.stringify does); typed arrays are arrays. With
 * `pretty`, members go on their own lines indented by two spaces per level, starting at `level`.
 */
export function jsonText(value: unknown, pretty = false, level = 0): string {
  const s = scalar(value);
  if (s !== undefined || isPlain(value)) return s ?? 'null';
  const pad = pretty ? '\n' + '  '.repeat(level + 1) : '';
  const end = pretty ? '\n' + '  '.repeat(level) : '';
  if (value instanceof LazyArray) return jsonText(value.toJSON(), pretty, level);
  if (Array.isArray(value) || ArrayBuffer.isView(value)) {
    const items = Array.from(value as ArrayLike<unknown>);
    if (!items.length) return '[]';
    if (!pretty) return '[' + items.map((x) => jsonText(x)).join(',') + ']';
    if (items.every(isPlain)) return '[' + items.map((x) => scalar(x) ?? 'null').join(', ') + ']';
    return '[' + items.map((x) => pad + jsonText(x, true, level + 1)).join(',') + end + ']';
  }
  const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined && typeof v !== 'function');
  if (!entries.length) return '{}';
  const colon = pretty ? ': ' : ':';
  return '{' + entries.map(([k, v]) => pad + jsonSafe(JSON.stringify(k)) + colon + jsonText(v, pretty, level + 1)).join(',') + end + '}';
}

/** A number array as JSON text, each value passed through `f` (non-finite → null). */
export function numberArrayJson(n: number, value: (i: number) => number, pretty = false): RawJson {
  let s = '[';
  const sep = pretty ? ', ' : ',';
  for (let i = 0; i < n; i++) {
    const x = value(i);
    s += (i ? sep : '') + (Number.isFinite(x) ? String(x === 0 ? 0 : x) : 'null');
  }
  return new RawJson(s + ']');
}

/** A number as JSON text: the shortest round trip, −0 as 0, non-finite as null (JSON has no ∞). */
export function numberText(x: number): string {
  return Number.isFinite(x) ? String(x === 0 ? 0 : x) : 'null';
}

/** A member name as JSON text (quoted, escaped as every string here is). */
export function keyText(name: string): string {
  return jsonSafe(JSON.stringify(name));
}

/**
 * An object as compact JSON text in one piece: `keys[i]` the i-th member's name already as keyText, and
 * `member(i)` its value as JSON text (undefined leaves the member out). For objects with a member per crease,
 * which would otherwise be built as objects of thousands of members and then written member by member.
 */
export function keyedJson(keys: readonly string[], member: (i: number) => string | undefined): RawJson {
  const parts: string[] = [];
  for (let i = 0; i < keys.length; i++) {
    const v = member(i);
    if (v !== undefined) parts.push(keys[i] + ':' + v);
  }
  return new RawJson('{' + parts.join(',') + '}');
}

/**
 * `value` as JSON (the same text as jsonText), written to `write` a piece at a time, so a large value (the
 * rays of a big sheet) never has to fit in one string.
 */
export function writeJson(write: (text: string) => void, value: unknown, pretty = false, level = 0): void {
  const s = scalar(value);
  if (s !== undefined || isPlain(value)) { write(s ?? 'null'); return; }
  const pad = pretty ? '\n' + '  '.repeat(level + 1) : '';
  const end = pretty ? '\n' + '  '.repeat(level) : '';
  if (value instanceof LazyArray) {
    write('[');
    for (let i = 0; i < value.length; i++) {
      write((i ? ',' : '') + pad);
      writeJson(write, value.item(i), pretty, level + 1);
    }
    write((value.length ? end : '') + ']');
    return;
  }
  if (Array.isArray(value) || ArrayBuffer.isView(value)) {
    const items = Array.from(value as ArrayLike<unknown>);
    if (!items.length) { write('[]'); return; }
    if (!pretty || items.every(isPlain)) {
      // plain values on one line; objects one after another
      write('[');
      items.forEach((x, i) => {
        if (i) write(pretty ? ', ' : ',');
        writeJson(write, x, false);
      });
      write(']');
      return;
    }
    write('[');
    items.forEach((x, i) => {
      write((i ? ',' : '') + pad);
      writeJson(write, x, true, level + 1);
    });
    write(end + ']');
    return;
  }
  const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined && typeof v !== 'function');
  if (!entries.length) { write('{}'); return; }
  write('{');
  entries.forEach(([k, v], i) => {
    write((i ? ',' : '') + pad + jsonSafe(JSON.stringify(k)) + (pretty ? ': ' : ':'));
    writeJson(write, v, pretty, level + 1);
  });
  write(end + '}');
}
