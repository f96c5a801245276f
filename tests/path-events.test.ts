// Events along a path, each on a pattern built for it, checked against relations from outside the solver.
import { describe, expect, it } from 'vitest';
import { sweep } from '../solver/paths/sweep';
import { ClosureProblem } from '../solver/closure/newton';
import { miura } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import type { Pattern } from '../solver/types';
import { directionsFromSectors, vertexPattern } from './support/vertex';
import { fourBar } from './support/references';

const D = Math.PI / 180;

describe('turning point (generic degree-4 vertex whose driven crease has a limited range)', () => {
  const sectors = [100, 95, 70, 95];
  const p = vertexPattern(directionsFromSectors(sectors));
  for (const method of ['propagate', 'continue'] as const) {
    it(`is found where the four-bar discriminant A² + B² − C² vanishes (${method})`, () => {
      const r = sweep(p, { drive: 0, from: 1 * D, to: 179 * D, step: 1 * D, branch: 1, method });
      const tp = r.events.find((e) => e.type === 'turning-point');
      expect(tp, 'turning point').toBeDefined();
      expect(r.status).toBe('partial');
      // independent root of the discriminant by bisection on the four-bar equation
      const g = (r0: number) => { const { A, B, C } = fourBar(sectors.map((x) => x * D), r0); return A * A + B * B - C * C; };
      let lo = 100 * D, hi = 179 * D;
      expect(g(lo)).toBeGreaterThan(0);
      expect(g(hi)).toBeLessThan(0);
      for (let i = 0; i < 200; i++) { const m = (lo + hi) / 2; if (g(m) > 0) lo = m; else hi = m; }
      expect(Math.abs(tp!.drive - lo) / D).toBeLessThan(1e-7);
      // every sample up to the turning point is there, none beyond
      expect(r.samples.length).toBe(Math.floor(lo / D));
      expect(tp!.angles[0]).toBeCloseTo(tp!.drive, 12);
      expect(tp!.text).toMatch(/cannot go above/);
    });
  }
});

describe('branch point (degree-6 vertex with two creases held: a change-point spherical four-bar)', () => {
  // Holding c1 and c4 merges sectors 50° + 60° into one rigid link each, of arc L with
  // cos L = cos 50° cos 60° − sin 50° sin 60° cos ρ_held (spherical law of cosines, handbook formula). With
  // L = 70° the remaining links 70°, 70°, 70°, 70° satisfy Grashof's equality (L1 + L2 = s2 + s5), the
  // change-point case in which the linkage has a configuration with its four joints on one great circle
  // where two motions cross (common practice in linkage theory; McCarthy & Soh ch. 5, from memory).
  const sectors = [50, 60, 70, 50, 60, 70];
  const p = vertexPattern(directionsFromSectors(sectors));
  const held = Math.acos((Math.cos(50 * D) * Math.cos(60 * D) - Math.cos(70 * D)) / (Math.sin(50 * D) * Math.sin(60 * D)));
  const holds = [{ crease: 1, value: held }, { crease: 4, value: held }];

  it('is detected at an interior drive value, with its four joints on a great circle and four rays in two curves', () => {
    // (c3 folds flat near c0 = 46°, so the sweep stops before that)
    const r = sweep(p, { drive: 0, from: -170 * D, to: 40 * D, step: 1 * D, holds, solution: 1 });
    expect(r.status).toBe('complete');
    const bp = r.events.filter((e) => e.type === 'branch-point');
    expect(bp.length).toBe(1);
    const e = bp[0];
    expect(Math.abs(e.drive)).toBeGreaterThan(10 * D);
    expect(Math.abs(e.drive)).toBeLessThan(170 * D);
    // the folded directions of the four free creases are coplanar: det of any three vanishes
    const problem = new ClosureProblem(p, (c) => c === 1 || c === 4);
    expect(problem.evaluate(e.angles)).toBeLessThan(1e-10);
    const w = (slot: number) => Array.from(problem.jacobian.subarray(3 * slot, 3 * slot + 3));
    const det = (a: number[], b: number[], c: number[]) =>
      a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0]) + a[2] * (b[0] * c[1] - b[1] * c[0]);
    expect(Math.abs(det(w(0), w(2), w(3)))).toBeLessThan(1e-7);
    expect(Math.abs(det(w(0), w(2), w(5)))).toBeLessThan(1e-7);
    // the merged links really are 70°: the angle between the folded directions of c0 and c2
    expect(Math.acos(w(0).reduce((s, x, i) => s + x * w(2)[i], 0)) / D).toBeCloseTo(70, 9);
    expect(e.branches!.length).toBe(4);
    expect(new Set(e.branches!.map((b) => b.group)).size).toBe(2);
    // the path's own direction there is one of the rays
    const k = r.samples.findIndex((s) => s.drive > e.drive);
    const before = r.samples[k - 1], after = r.samples[k];
    const dir = new Float64Array(6).map((_, c) => after.angles[c] - before.angles[c]);
    const n = Math.hypot(...dir);
    const best = Math.max(...e.branches!.map((b) => b.tangent.reduce((s, x, c) => s + x * dir[c], 0) / n));
    expect(best).toBeGreaterThan(0.999);
  });

  it('each ray leaving it can be followed: a new sweep from the branch point on a chosen branch', () => {
    const r = sweep(p, { drive: 0, from: -170 * D, to: 40 * D, step: 5 * D, holds, solution: 1 });
    const e = r.events.find((x) => x.type === 'branch-point')!;
    for (const b of e.branches!) {
      const dir = Math.sign(b.tangent[0]);
      const r2 = sweep(p, { drive: 0, start: e.angles, from: e.drive + dir * 2 * D, to: e.drive + dir * 16 * D, step: 2 * D, holds, branch: b.id });
      expect(r2.status, b.name).toBe('complete');
      expect(r2.branch?.name).toBe(b.name);
      // first step off the branch point goes along the ray
      const d0 = r2.samples[0].angles.map((x, c) => x - e.angles[c]);
      const n0 = Math.hypot(...d0);
      expect(b.tangent.reduce((s, x, c) => s + x * d0[c], 0) / n0).toBeGreaterThan(0.99);
    }
  });
});

function miuraSheet(rows: number, cols: number, alphaDeg: number, limits: Record<string, { min?: number; max?: number }> = {}): { pattern: Pattern; drive: number; sign: number } {
  const g = miura({ rows, cols, a: 40, b: 30, alphaDeg });
  const src = g.project!.source;
  src.limits = src.labels.map((l) => (l && limits[l]) || undefined);
  const { pattern } = buildPattern(src);
  return { pattern: pattern!, drive: pattern!.labelIndex.get(g.project!.drives[0].crease)!, sign: Math.sign(g.project!.drives[0].angleDeg) };
}

describe('hinge limit', () => {
  it('ends the path where a straight crease reaches its limit, at the drive the published relation gives', () => {
    // Schenk & Guest 2013: tan(ρ_s/2) = cos α tan(ρ_z/2), so ρ_s = 40° at ρ_z = 2 atan(tan 20° / cos α)
    const probe = miuraSheet(2, 2, 60);
    const s = probe.pattern.creases.find((c) => c.label.startsWith('s') && c.assignment !== 'B')!;
    const limit = 40 * D;
    const lim = s.assignment === 'V' ? { max: limit } : { min: -limit };
    const { pattern, drive, sign } = miuraSheet(2, 2, 60, { [s.label]: lim });
    for (const method of ['propagate', 'continue'] as const) {
      const r = sweep(pattern, { drive, from: sign * 1 * D, to: sign * 179 * D, step: 1 * D, method });
      const e = r.events.find((x) => x.type === 'hinge-limit');
      expect(e, method).toBeDefined();
      expect(e!.crease).toBe(s.index);
      const expected = 2 * Math.atan(Math.tan(20 * D) / Math.cos(60 * D));
      expect(Math.abs(Math.abs(e!.drive) - expected) / D).toBeLessThan(1e-7);
      expect(Math.abs(Math.abs(e!.angles[s.index]) - limit) / D).toBeLessThan(1e-6);
      expect(r.status).toBe('partial');
      expect(r.samples.length).toBe(Math.floor(expected / D));
    }
  });
});

describe('folded flat', () => {
  it('a crease reaching ±180° before the drive ends the path there', () => {
    // generic vertex: on branch 3 crease c1 folds flat while the drive c0 is about 103°
    const p = vertexPattern(directionsFromSectors([70, 95, 100, 95]));
    for (const method of ['propagate', 'continue'] as const) {
      const r = sweep(p, { drive: 0, from: 1 * D, to: 179 * D, step: 1 * D, branch: 3, method });
      const e = r.events.find((x) => x.type === 'folded-flat');
      expect(e, method).toBeDefined();
      expect(e!.crease).toBe(1);
      expect(Math.abs(Math.abs(e!.angles[1]) - Math.PI)).toBeLessThan(1e-6);
      expect(e!.drive / D).toBeGreaterThan(102);
      expect(e!.drive / D).toBeLessThan(104);
      // the state there closes
      const problem = new ClosureProblem(p, () => false);
      expect(problem.evaluate(e!.angles, false)).toBeLessThan(1e-9);
    }
  });

  it('a flat-foldable vertex driven to 180° reports the folded-flat state at the last sample (Maekawa: 3 of one kind, 1 of the other)', () => {
    const p = vertexPattern(directionsFromSectors([60, 100, 120, 80]), ['V', 'M', 'M', 'M']);
    const r = sweep(p, { drive: 0, from: 0, to: 180 * D, step: 10 * D });
    expect(r.status).toBe('complete');
    const e = r.events.find((x) => x.type === 'folded-flat');
    expect(e).toBeDefined();
    expect(e!.drive).toBe(Math.PI);
    const last = r.samples[r.samples.length - 1];
    for (let c = 0; c < 4; c++) expect(Math.abs(Math.abs(last.angles[c]) - Math.PI)).toBeLessThan(1e-6);
  });
});

describe('a path started from a folded state whose samples lie across flat', () => {
  it('reaches flat along the start state\'s own branch and goes on along it: the same samples as the path from flat, through the start', async () => {
    const { loadPatternText } = await import('../solver/formats/project');
    const { solveDrives } = await import('../solver/search/solve');
    const { readFileSync } = await import('node:fs');
    const loaded = loadPatternText(readFileSync('samples/sunshade-panel.hingeplan.json', 'utf8'), 'sunshade-panel.hingeplan.json');
    const p = loaded.pattern!, d = loaded.drives![0];
    const rep = solveDrives(p, [d], { detail: 1, cap: 4 });
    const D = Math.PI / 180, sign = Math.sign(d.value);
    for (const k of [0, 1]) {
      const st = rep.solutions[k].angles;
      const fromFlat = sweep(p, { drive: d.crease, from: 0, to: sign * 90 * D, step: 5 * D, branch: undefined });
      const fromStart = sweep(p, { drive: d.crease, from: 0, to: sign * 90 * D, step: 5 * D, start: st });
      expect(fromStart.status).toBe('complete');
      const at60 = fromStart.samples.find((x) => Math.abs(x.drive - d.value) < 1e-12)!;
      // the path passes through the start state
      for (let c = 0; c < st.length; c++) expect(Math.abs(at60.angles[c] - st[c])).toBeLessThan(1e-9);
      if (k === 0) {
        // the start is the assignment's own state: the path is the default path from flat
        fromFlat.samples.forEach((x, i) => {
          for (let c = 0; c < st.length; c++) {
            expect(Math.abs(x.angles[c] - fromStart.samples[i].angles[c])).toBeLessThan(1e-9);
            expect(Math.abs(x.rates[c] - fromStart.samples[i].rates[c])).toBeLessThan(1e-7);
          }
        });
      }
    }
  });
});
