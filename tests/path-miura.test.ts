// Paths on Miura-ori sheets against M. Schenk, S. D. Guest, "Geometry of Miura-folded metamaterials",
// PNAS 110(9):3276, 2013: θ = half the zigzag fold angle, straight creases fold by
// tan(ρ_s/2) = cos α · tan(ρ_z/2), and the unit cell measures 2L × 2S with
// L = a·√(1 − sin²θ sin²α), S = b·cosθ·tanα / √(1 + cos²θ tan²α).
import { describe, expect, it } from 'vitest';
import { foldedShape } from '../solver/outputs/shape';
import { miuraSheet as sheet } from './support/references';
import { sweep, type SweepSample } from '../solver/paths/sweep';
import type { Pattern } from '../solver/types';

const D = Math.PI / 180;


const dist = (u: number[], v: number[]) => Math.hypot(u[0] - v[0], u[1] - v[1], u[2] - v[2]);

/** Largest deviation (degrees) of a sample from the published fold-angle relation. */
function angleError(pattern: Pattern, s: SweepSample, alpha: number): number {
  const rz = Math.abs(s.drive);
  const rs = 2 * Math.atan(Math.cos(alpha) * Math.tan(rz / 2));
  let worst = 0;
  for (const c of pattern.creases) {
    if (c.assignment === 'B') continue;
    const expected = c.label.startsWith('z') ? rz : rs;
    worst = Math.max(worst, Math.abs(Math.abs(s.angles[c.index]) - expected) / D);
  }
  return worst;
}

describe('Miura-ori path from 1° to 179° (Schenk & Guest 2013)', () => {
  for (const method of ['propagate', 'continue'] as const) {
    it(`every sample matches the fold-angle relation and the cell dimensions to 1e-9 (${method})`, () => {
      const a = 40, b = 30, alpha = 70 * D;
      const { pattern, drive, sign, vid } = sheet(3, 3, a, b, 70);
      const r = sweep(pattern, { drive, from: sign * 1 * D, to: sign * 179 * D, step: 1 * D, method });
      expect(r.status).toBe('complete');
      expect(r.method).toBe(method);
      expect(r.samples.length).toBe(179);
      expect(r.branch?.matchesAssignment).toBe(true);
      for (const [k, s] of r.samples.entries()) {
        // exact drive values, never interpolated
        expect(Math.abs(s.drive - sign * (1 + k) * D)).toBeLessThan(1e-15);
        expect(s.angles[drive]).toBe(s.drive);
        expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
        expect(angleError(pattern, s, alpha), `angles at ${k + 1}°`).toBeLessThan(1e-9);
        const shape = foldedShape(pattern, s.angles);
        const th = Math.abs(s.drive) / 2;
        const L = a * Math.sqrt(1 - Math.sin(th) ** 2 * Math.sin(alpha) ** 2);
        const S = (b * Math.cos(th) * Math.tan(alpha)) / Math.sqrt(1 + Math.cos(th) ** 2 * Math.tan(alpha) ** 2);
        expect(Math.abs(dist(shape.vertices[vid(1, 2)], shape.vertices[vid(3, 2)]) / 2 - L) / L, `L at ${k + 1}°`).toBeLessThan(1e-9);
        expect(Math.abs(dist(shape.vertices[vid(2, 1)], shape.vertices[vid(2, 3)]) / 2 - S) / S, `S at ${k + 1}°`).toBeLessThan(1e-9);
      }
    });
  }

  it('hinge rates equal the derivative of the published relation (dρ_s/dρ_z = cos α sec²(ρ_z/2) / (1 + cos²α tan²(ρ_z/2)))', () => {
    const alpha = 55 * D;
    const { pattern, drive, sign } = sheet(4, 5, 25, 12, 55);
    const r = sweep(pattern, { drive, from: sign * 5 * D, to: sign * 175 * D, step: 10 * D });
    expect(r.status).toBe('complete');
    for (const s of r.samples) {
      const rz = Math.abs(s.drive);
      const expected = (Math.cos(alpha) / Math.cos(rz / 2) ** 2) / (1 + Math.cos(alpha) ** 2 * Math.tan(rz / 2) ** 2);
      for (const c of pattern.creases) {
        if (c.assignment === 'B') continue;
        // the sign of each rate follows the crease's own sign relative to the drive
        const rel = Math.sign(s.angles[c.index]) * Math.sign(s.drive);
        const want = c.label.startsWith('z') ? rel : rel * expected;
        expect(Math.abs(s.rates[c.index] - want), `${c.label} at ${(s.drive / D).toFixed(0)}°`).toBeLessThan(1e-8);
      }
    }
  });

  it('curvature d²ρ/dθ² from both methods matches a finite difference of the rates', () => {
    const { pattern, drive, sign } = sheet(2, 3, 40, 30, 70);
    for (const method of ['propagate', 'continue'] as const) {
      const h = 1e-5;
      for (const at of [20, 75, 140]) {
        const vals = [at * D - h, at * D, at * D + h].map((v) => sign * v);
        const r = sweep(pattern, { drive, from: vals[0], to: vals[2], samples: vals, curvature: true, method });
        expect(r.samples.length).toBe(3);
        const [lo, mid, hi] = r.samples;
        for (const c of pattern.creases) {
          if (c.assignment === 'B') continue;
          const fd = (hi.rates[c.index] - lo.rates[c.index]) / (hi.drive - lo.drive);
          expect(Math.abs(mid.curvature![c.index] - fd), `${method} ${c.label} at ${at}°`).toBeLessThan(1e-6);
        }
      }
    }
  });

  it('propagation and continuation give the same samples', () => {
    const { pattern, drive, sign } = sheet(3, 4, 40, 30, 60);
    const opts = { drive, from: sign * 10 * D, to: sign * 170 * D, step: 20 * D };
    const p = sweep(pattern, { ...opts, method: 'propagate' });
    const c = sweep(pattern, { ...opts, method: 'continue' });
    expect(p.samples.length).toBe(c.samples.length);
    for (let k = 0; k < p.samples.length; k++) {
      for (let i = 0; i < pattern.creases.length; i++) {
        expect(Math.abs(p.samples[k].angles[i] - c.samples[k].angles[i])).toBeLessThan(1e-10);
        expect(Math.abs(p.samples[k].rates[i] - c.samples[k].rates[i])).toBeLessThan(1e-7);
      }
      expect(Math.abs(p.samples[k].condition - c.samples[k].condition) / c.samples[k].condition).toBeLessThan(0.05);
    }
  });

  it('starting at flat: the first sample is the flat state with the ray ratios as rates (ratio cos α, first order of Schenk & Guest)', () => {
    const { pattern, drive, sign } = sheet(2, 2, 40, 30, 70);
    const r = sweep(pattern, { drive, from: 0, to: sign * 30 * D, step: 10 * D });
    expect(r.samples[0].drive).toBe(0);
    expect(r.samples[0].nearSingular).toBe(true);
    for (const c of pattern.creases) {
      if (c.assignment === 'B') continue;
      const want = c.label.startsWith('z') ? 1 : Math.cos(70 * D);
      expect(Math.abs(Math.abs(r.samples[0].rates[c.index]) - want)).toBeLessThan(1e-9);
    }
    expect(r.samples.length).toBe(4);
  });
});

describe('where the condition number is evaluated (as the README and --help say)', () => {
  it('every sample up to 400 free creases, every ⌈n/100⌉ and the last up to 4000, the last only above', async () => {
    const { defaultConditionEvery } = await import('../solver/paths/sweep');
    expect(defaultConditionEvery(400)).toBe(1);
    expect(defaultConditionEvery(401)).toBe(5);
    expect(defaultConditionEvery(4000)).toBe(40);
    expect(defaultConditionEvery(4001)).toBe(Infinity);
    const { pattern, drive, sign } = sheet(3, 3, 40, 30, 70);
    const r = sweep(pattern, { drive, from: sign * 10 * D, to: sign * 60 * D, step: 10 * D, conditionEvery: Infinity });
    expect(r.samples.map((s) => Number.isFinite(s.condition))).toEqual([false, false, false, false, false, true]);
    expect(r.messages.some((m) => m.code === 'condition-last-only')).toBe(true);
  });
});

describe('the drive folded flat at 180° (the last sample of a full path)', () => {
  it('is the exact folded-flat state, and its rates are the limit of the published relation (1/cos α for the straight creases)', () => {
    const alpha = 70 * D;
    const { pattern, drive, sign } = sheet(3, 3, 40, 30, 70);
    for (const method of ['propagate', 'continue'] as const) {
      const r = sweep(pattern, { drive, from: 0, to: sign * Math.PI, step: D, method });
      expect(r.status).toBe('complete');
      const last = r.samples[r.samples.length - 1];
      expect(last.drive).toBe(sign * Math.PI);
      expect(last.maxResidual).toBeLessThanOrEqual(1e-10);
      for (const c of pattern.creases) {
        if (c.assignment === 'B') continue;
        expect(Math.abs(last.angles[c.index])).toBe(Math.PI);
        // Schenk & Guest 2013: tan(ρs/2) = cos α tan(ρz/2), so dρs/dρz → 1/cos α as ρz → 180°; zigzag rates → 1
        const want = c.label.startsWith('s') ? 1 / Math.cos(alpha) : 1;
        expect(Math.abs(Math.abs(last.rates[c.index]) - want), c.label).toBeLessThan(2e-3);
      }
    }
  });
});
