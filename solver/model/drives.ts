// Drives as a person or a file states them (a crease reference and an angle in degrees), checked against
// a built pattern and turned into solver drives (crease index, radians).
import type { Drive, Message, Pattern, Where } from '../types';
import { findCrease } from './pattern';

export interface DriveSpec {
  /** crease label, or a decimal crease index */
  crease: string;
  /** fold angle in degrees, valley positive */
  angleDeg: number;
  /** where the spec came from, for messages (e.g. `drives[2]`, `--set`) */
  field?: string;
}

const RAD_PER_DEG = Math.PI / 180;
const SHOWN_LABELS = 6;

function movable(pattern: Pattern, c: number): boolean {
  const a = pattern.creases[c].assignment;
  return a !== 'B' && a !== 'F';
}

/** A few labels a person could drive instead, for messages. */
export function someDrivableLabels(pattern: Pattern, max = SHOWN_LABELS): string {
  const labels: string[] = [];
  let total = 0;
  for (const c of pattern.creases) {
    if (!movable(pattern, c.index)) continue;
    total++;
    if (labels.length < max) labels.push(c.label);
  }
  if (total === 0) return 'none: the pattern has no foldable crease';
  return labels.join(', ') + (total > max ? ` (and ${total - max} more)` : '');
}

export function resolveDrives(pattern: Pattern, specs: readonly DriveSpec[]): { drives: Drive[]; messages: Message[] } {
  const drives: Drive[] = [];
  const messages: Message[] = [];
  const first = new Map<number, number>();
  if (!Array.isArray(specs)) {
    return { drives, messages: [{ severity: 'error', code: 'drive-malformed', text: 'The drives are not a list.', where: { field: 'drives' } }] };
  }
  specs.forEach((spec, k) => {
    const field = typeof spec?.field === 'string' ? spec.field : `drives[${k}]`;
    const ref = spec?.crease;
    if (typeof ref !== 'string' || ref.trim() === '') {
      messages.push({ severity: 'error', code: 'drive-malformed', text: `Drive ${k + 1} names no crease.`, where: { field } });
      return;
    }
    const c = findCrease(pattern, ref);
    if (c === undefined) {
      messages.push({
        severity: 'error',
        code: 'unknown-crease',
        text: `Drive ${k + 1}: there is no crease "${ref}". Creases that can be driven: ${someDrivableLabels(pattern)}.`,
        where: { field },
      });
      return;
    }
    const crease = pattern.creases[c];
    const where: Where = { field, crease: c, creaseLabel: crease.label };
    const name = `crease ${crease.label}` + (crease.label !== String(c) ? ` (index ${c})` : '');
    if (crease.assignment === 'B') {
      messages.push({ severity: 'error', code: 'drive-on-boundary', text: `Drive ${k + 1}: ${name} is on the sheet's rim (B); only creases between two panels can be driven.`, where });
      return;
    }
    if (crease.assignment === 'F') {
      messages.push({ severity: 'error', code: 'drive-on-flat', text: `Drive ${k + 1}: ${name} is a flat crease (F), held at 0°; mark it M, V or U to drive it.`, where });
      return;
    }
    const deg = spec.angleDeg;
    if (typeof deg !== 'number' || !Number.isFinite(deg) || deg < -180 || deg > 180) {
      messages.push({
        severity: 'error',
        code: 'drive-out-of-range',
        text: `Drive ${k + 1}: the angle ${String(deg)}° for ${name} is not a number in −180° … 180° (0 = flat, valley positive).`,
        where,
      });
      return;
    }
    const prev = first.get(c);
    if (prev !== undefined) {
      messages.push({ severity: 'error', code: 'duplicate-drive', text: `Drive ${k + 1}: ${name} is already driven by drive ${prev + 1}.`, where });
      return;
    }
    const lim = crease.limit;
    const tol = 1e-9;
    if (lim && ((lim.min !== undefined && deg * RAD_PER_DEG < lim.min - tol) || (lim.max !== undefined && deg * RAD_PER_DEG > lim.max + tol))) {
      const lo = lim.min === undefined ? '−180' : String(+((lim.min * 180) / Math.PI).toPrecision(6));
      const hi = lim.max === undefined ? '180' : String(+((lim.max * 180) / Math.PI).toPrecision(6));
      messages.push({ severity: 'error', code: 'drive-outside-limit', text: `Drive ${k + 1}: ${deg}° for ${name} is outside its hinge limits ${lo}° … ${hi}°.`, where });
      return;
    }
    if ((crease.assignment === 'M' && deg > 0) || (crease.assignment === 'V' && deg < 0)) {
      messages.push({
        severity: 'warning',
        code: 'drive-against-assignment',
        text: `Drive ${k + 1}: ${name} is a ${crease.assignment === 'M' ? 'mountain' : 'valley'} crease but is driven to ${deg}° (valley positive, mountain negative).`,
        where,
      });
    }
    first.set(c, k);
    drives.push({ crease: c, value: deg * RAD_PER_DEG, degrees: deg });
  });
  return { drives, messages };
}

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Read a command-line drive such as `z3=45`, `z3 = -30.5` or `12=90deg` (crease reference = degrees). */
export function parseSetOption(text: string): { drive?: DriveSpec; messages: Message[] } {
  const bad = (why: string) => ({
    messages: [{ severity: 'error' as const, code: 'bad-set-option', text: `--set ${JSON.stringify(text)}: ${why} Write it as CREASE=DEGREES, e.g. --set z3=45.`, where: { field: '--set' } }],
  });
  if (typeof text !== 'string') return bad('not text.');
  const eq = text.lastIndexOf('=');
  if (eq < 0) return bad('there is no "=".');
  const crease = text.slice(0, eq).trim();
  let value = text.slice(eq + 1).trim();
  if (crease === '') return bad('the crease is missing before "=".');
  value = value.replace(/\s*(?:°|deg|degrees?)$/i, '');
  if (value === '') return bad('the angle is missing after "=".');
  if (!NUMBER.test(value)) return bad(`"${value}" is not a number of degrees.`);
  return { drive: { crease, angleDeg: Number(value), field: '--set' }, messages: [] };
}
