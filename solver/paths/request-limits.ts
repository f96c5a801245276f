// How much a path, schedule, grid or followed schedule may ask for, counted in the work it makes rather
// than in rows alone: every row (sample, time row, grid node, schedule line) holds an angle and a rate per
// crease, so rows × creases is what fills memory and the table. The count is made from the request's
// numbers before anything is allocated, and a refusal is a Message naming the field and the limit, so the
// command line and the app's worker refuse the same requests the same way.

import type { Message } from '../types';

/** Largest table, in hinge values: rows × (creases + ROW_OVERHEAD). About 20 million doubles per array kind. */
export const MAX_TABLE_VALUES = 20_000_000;
/** What a row costs besides its creases (the row object, its drive value, residual, condition, flags), as hinge values. */
export const ROW_OVERHEAD = 32;

export function tableWork(rows: number, creases: number): number {
  return rows * (Math.max(0, creases) + ROW_OVERHEAD);
}

/** The most rows a table over this many creases may have. */
export function maxRows(creases: number): number {
  return Math.floor(MAX_TABLE_VALUES / (Math.max(0, creases) + ROW_OVERHEAD));
}

function big(n: number): string {
  if (!Number.isFinite(n)) return 'infinitely many';
  if (n < 1e6) return String(Math.round(n));
  if (n < 1e9) return `${+(n / 1e6).toPrecision(3)} million`;
  return n.toExponential(2);
}

/**
 * undefined when `rows` rows over `creases` creases fit; else the refusal. `what` names the rows ("samples",
 * "time rows", "grid nodes", "schedule rows"), `field` the request field that sets their number, `hint`
 * what to change.
 */
export function tableSizeMessage(code: string, field: string, what: string, rows: number, creases: number, hint: string): Message | undefined {
  if (Number.isFinite(rows) && tableWork(rows, creases) <= MAX_TABLE_VALUES) return undefined;
  return {
    severity: 'error',
    code,
    text:
      `That gives ${big(rows)} ${what} × ${creases} creases, more than the ${big(MAX_TABLE_VALUES)} hinge values a table takes ` +
      `(${what} × (creases + ${ROW_OVERHEAD}); at most ${maxRows(creases)} ${what} for this pattern); ${hint}.`,
    where: { field },
  };
}
