// Numbers as text for people and for tables: one way to write an angle in a message, and the number forms
// of the table writers (full precision by default, fewer significant digits on request).

const DEG = 180 / Math.PI;

/**
 * A drive or hinge value in degrees for a message: six decimals (a micro-degree), trailing zeros dropped,
 * so 170° reads "170" and a turning point "155.282128". One form for every event and message.
 */
export function degreesText(rad: number): string {
  return decimalsText(rad * DEG, 6);
}

/** x with at most `decimals` decimals, trailing zeros (and a bare point) dropped; −0 as 0. */
export function decimalsText(x: number, decimals: number): string {
  if (!Number.isFinite(x)) return String(x);
  const t = x.toFixed(decimals);
  const trimmed = t.includes('.') ? t.replace(/0+$/, '').replace(/\.$/, '') : t;
  return trimmed === '-0' ? '0' : trimmed;
}

/**
 * A number as a table writes it: the shortest text that reads back to the same double (full precision),
 * or rounded to `digits` significant digits when asked; −0 as 0; undefined and NaN as undefined (an empty
 * cell or null), ±∞ kept for the caller to write.
 */
export function roundTo(x: number, digits?: number): number {
  if (digits === undefined || !Number.isFinite(x)) return x === 0 ? 0 : x;
  const r = +x.toPrecision(digits);
  return r === 0 ? 0 : r;
}
