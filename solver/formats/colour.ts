// Colours of drawn lines, for `--stroke <colour>=<assignment>`: CSS colour text (names, #rgb, #rrggbb,
// rgb(), hsl()) read by color-string, and DXF colour numbers (the drawing's colour index, 1 … 255).
// No colour means anything by default: colour codes differ between programs, so the person says theirs.
import colorString from 'color-string';

export interface Colour {
  /** '#rrggbb', when the colour has an RGB value */
  rgb?: string;
  /** DXF colour number 1 … 255, when the line was given one */
  index?: number;
}

/**
 * RGB of the seven DXF colour numbers whose colour every CAD program agrees on (common practice); 7 draws
 * black on a light background and white on a dark one, so it matches both.
 */
const STANDARD_INDEX: Record<number, string[]> = {
  1: ['#ff0000'],
  2: ['#ffff00'],
  3: ['#00ff00'],
  4: ['#00ffff'],
  5: ['#0000ff'],
  6: ['#ff00ff'],
  7: ['#ffffff', '#000000'],
};

const hex2 = (v: number) => Math.round(Math.min(255, Math.max(0, v))).toString(16).padStart(2, '0');
export const rgbHex = (r: number, g: number, b: number) => `#${hex2(r)}${hex2(g)}${hex2(b)}`;

/** hsl → rgb (CSS Color 4, §7.1). */
function hslToRgb(h: number, s: number, l: number): [number, number, number] {
  const sat = s / 100;
  const lig = l / 100;
  const f = (n: number) => {
    const k = (n + h / 30) % 12;
    const a = sat * Math.min(lig, 1 - lig);
    return 255 * (lig - a * Math.max(-1, Math.min(k - 3, 9 - k, 1)));
  };
  return [f(0), f(8), f(4)];
}

/** A CSS colour as '#rrggbb', or undefined when the text is not a colour (or is fully transparent). */
export function cssColour(text: string): string | undefined {
  const t = text.trim();
  if (t === '' || /^(none|transparent|currentcolor|inherit)$/i.test(t)) return undefined;
  const got = colorString.get(t);
  if (!got) return undefined;
  const [a, b, c] = got.value;
  if (got.model === 'rgb') return rgbHex(a, b, c);
  if (got.model === 'hsl') return rgbHex(...hslToRgb(a, b, c));
  return undefined;
}

/** A colour as a person gives it on the command line: a DXF colour number or CSS colour text. */
export function parseColourOption(text: string): Colour | undefined {
  const t = text.trim();
  if (/^\d+$/.test(t)) {
    const n = Number(t);
    if (n < 1 || n > 255) return undefined;
    return { index: n };
  }
  const rgb = cssColour(t);
  return rgb ? { rgb } : undefined;
}

/** Does a drawn line's colour match a colour the person named? */
export function colourMatches(line: Colour | undefined, wanted: Colour): boolean {
  if (!line) return false;
  if (wanted.index !== undefined) return line.index === wanted.index;
  if (wanted.rgb === undefined) return false;
  if (line.rgb === wanted.rgb) return true;
  return line.index !== undefined && (STANDARD_INDEX[line.index]?.includes(wanted.rgb) ?? false);
}

/** Short text of a colour for messages. */
export function colourText(c: Colour | undefined): string {
  if (!c) return 'no colour';
  if (c.rgb && c.index !== undefined) return `${c.rgb} (colour number ${c.index})`;
  return c.rgb ?? `colour number ${c.index}`;
}
