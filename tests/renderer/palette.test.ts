// Hingeplan's colour code against outside references: the simulation of colour-vision deficiency of
// Machado, Oliveira & Fernandes, "A Physiologically-based Model for Simulation of Color Vision Deficiency",
// IEEE TVCG 15(6), 2009 (severity 1, as culori's filterDeficiency* implement it), the CIEDE2000 colour
// difference (Sharma, Wu & Dalal, Color Research & Application 30(1), 2005; culori's differenceCiede2000)
// and CIELAB lightness L* (D65) for greyscale. A CIEDE2000 difference of about 1 to 2 is just noticeable;
// we ask for 10 or more between things that mean different things (common practice: "clearly different").
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { converter, differenceCiede2000, filterDeficiencyDeuter, filterDeficiencyProt, filterDeficiencyTrit, formatHex } from 'culori';
import { PALETTE, angleColor } from '../../renderer/palette';

const lab = converter('lab65');
const de = differenceCiede2000();
const VISIONS: Record<string, (c: string) => unknown> = {
  normal: (c: string) => c,
  protanopia: (c: string) => filterDeficiencyProt(1)(c as never),
  deuteranopia: (c: string) => filterDeficiencyDeuter(1)(c as never),
  tritanopia: (c: string) => filterDeficiencyTrit(1)(c as never),
};
const L = (c: string) => lab(c)!.l;
/** the smallest CIEDE2000 difference of two colours over normal vision and the three dichromacies */
const minDifference = (a: string, b: string) =>
  Math.min(...Object.values(VISIONS).map((f) => de(f(a) as never, f(b) as never)));
const scale = (step = 5) => Array.from({ length: 360 / step + 1 }, (_, i) => -180 + i * step);

describe('the fold-angle scale', () => {
  it('runs from mountain at −180° through flat at 0° to valley at +180°, clamped beyond', () => {
    // sign rule: valley positive, mountain negative (FOLD's edges_foldAngle; common practice)
    expect(angleColor(-180)).toBe(PALETTE.mountain);
    expect(angleColor(0)).toBe(PALETTE.flat);
    expect(angleColor(180)).toBe(PALETTE.valley);
    expect(angleColor(400)).toBe(PALETTE.valley);
    expect(angleColor(-1e9)).toBe(PALETTE.mountain);
  });

  it('grows lighter from mountain through flat to valley, so a greyscale print still orders every angle', () => {
    let last = -Infinity;
    for (const a of scale()) {
      const l = L(angleColor(a));
      expect(l, `L* at ${a}°`).toBeGreaterThan(last);
      last = l;
    }
  });

  it('tells mountain from valley at the same angle in greyscale and under every common deficiency', () => {
    for (const a of [30, 45, 90, 135, 180]) {
      const m = angleColor(-a), v = angleColor(a);
      // achromatopsia keeps lightness only: the valley side stays clearly lighter
      expect(L(v) - L(m), `ΔL* at ${a}°`).toBeGreaterThanOrEqual(15);
      expect(minDifference(m, v), `ΔE00 at ${a}°`).toBeGreaterThanOrEqual(25);
    }
    // even 10° of fold reads as mountain or valley
    expect(minDifference(angleColor(-10), angleColor(10))).toBeGreaterThanOrEqual(15);
  });

  it('keeps every crease line visible on the white panels (contrast against the panel colour)', () => {
    for (const a of scale(10)) expect(L(PALETTE.panelTop) - L(angleColor(a)), `${a}°`).toBeGreaterThanOrEqual(20);
  });
});

describe('the roles beside the scale', () => {
  const roles = { pastLimit: PALETTE.pastLimit, base: PALETTE.base, drive: PALETTE.drive, misfit: PALETTE.misfit } as const;

  it('past a limit, base panel, drive and misfit differ from each other under every vision', () => {
    const names = Object.keys(roles) as (keyof typeof roles)[];
    for (let i = 0; i < names.length; i++)
      for (let j = i + 1; j < names.length; j++)
        expect(minDifference(roles[names[i]], roles[names[j]]), `${names[i]} / ${names[j]}`).toBeGreaterThanOrEqual(15);
  });

  it('each differs from every colour of the scale under every vision', () => {
    for (const [name, c] of Object.entries(roles))
      for (const a of scale()) expect(minDifference(c, angleColor(a)), `${name} / ${a}°`).toBeGreaterThanOrEqual(15);
  });

  it('the past-limit and base colours stand out from both sides of a panel in 3D', () => {
    for (const c of [PALETTE.pastLimit, PALETTE.base])
      for (const side of [PALETTE.panelTop, PALETTE.panelUnder]) expect(minDifference(c, side)).toBeGreaterThanOrEqual(20);
    expect(minDifference(PALETTE.panelTop, PALETTE.panelUnder)).toBeGreaterThanOrEqual(10);
  });

  it('are the same colours the style sheet uses', () => {
    const css = readFileSync(path.resolve(__dirname, '../../renderer/styles.css'), 'utf8');
    const vars: Record<string, string> = { mountain: '--mountain', valley: '--valley', flat: '--flat', pastLimit: '--past-limit', base: '--base', drive: '--drive', misfit: '--misfit' };
    for (const [role, name] of Object.entries(vars)) {
      const m = css.match(new RegExp(`${name}:\\s*(#[0-9a-fA-F]{6})`));
      expect(m?.[1]?.toLowerCase(), name).toBe(formatHex(PALETTE[role as keyof typeof PALETTE]));
    }
  });
});
