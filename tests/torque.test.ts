// Static drive torque by virtual work against statics, and every derivative against finite differences.
import { describe, expect, it } from 'vitest';
import type { Assignment, Pattern } from '../solver/types';
import { buildPattern } from '../solver/model/pattern';
import { degree5 } from '../solver/model/generators';
import { solveDrives } from '../solver/search/solve';
import { sweep } from '../solver/paths/sweep';
import { LoadModel, STANDARD_GRAVITY, metresPerUnit, ratesFromSensitivity, type LoadSpec } from '../solver/outputs/torque';
import { miuraSheet } from './support/references';
import { mulberry32 } from '../solver/math/random';

const DEG = Math.PI / 180;

/**
 * A base panel [0, 0.5 L] × [0, W] held flat and a panel [−L, 0] × [0, W] lifted about the valley crease
 * x = 0, in the given length unit (k = file units per metre).
 */
function hingedPanel(L: number, W: number, k: number) {
  const vertices: [number, number][] = [[-L * k, 0], [0, 0], [0.5 * L * k, 0], [0.5 * L * k, W * k], [0, W * k], [-L * k, W * k]];
  const edges: [number, number][] = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 0], [1, 4]];
  const assignments: Assignment[] = ['B', 'B', 'B', 'B', 'B', 'B', 'V'];
  const { pattern } = buildPattern({ name: 'lift', vertices, edges, assignments, labels: [undefined, undefined, undefined, undefined, undefined, undefined, 'h'], limits: [] });
  const p = pattern!;
  const base = p.panels.findIndex((panel) => panel.centroid[0] > 0);
  return { pattern: { ...p, basePanel: base } as Pattern, hinge: p.labelIndex.get('h')!, lifted: 1 - base };
}

function model(pattern: Pattern, spec: LoadSpec, units: string): LoadModel {
  const r = LoadModel.create(pattern, spec, units);
  expect(r.messages).toEqual([]);
  return r.model!;
}

describe('one panel lifted off a fixed base by its hinge: τ = m g (L/2) cos θ (statics, common practice)', () => {
  const L = 0.4, W = 0.25, density = 3.2;
  const m = density * L * W;
  for (const [units, k] of [['m', 1], ['mm', 1000], ['cm', 100], ['in', 1 / 0.0254]] as const) {
    it(`drawn in ${units}`, () => {
      const { pattern, hinge } = hingedPanel(L, W, k);
      const loads = model(pattern, { arealDensity: density }, units);
      const rates = new Float64Array(pattern.creases.length);
      rates[hinge] = 1;
      for (const deg of [0, 10, 45, 90, 120, 170]) {
        const angles = new Float64Array(pattern.creases.length);
        angles[hinge] = deg * DEG;
        const expected = m * STANDARD_GRAVITY * (L / 2) * Math.cos(deg * DEG);
        expect(loads.torque(angles, rates)).toBeCloseTo(expected, 10);
      }
    });
  }

  it('with a torsion spring: τ = m g (L/2) cos θ + k (θ − θ₀)', () => {
    const { pattern, hinge } = hingedPanel(L, W, 1000);
    const stiffness = 0.8, rest = 30 * DEG;
    const loads = model(pattern, { arealDensity: density, springs: [{ crease: hinge, stiffness, rest }] }, 'mm');
    const rates = new Float64Array(pattern.creases.length);
    rates[hinge] = 1;
    for (const deg of [0, 30, 75, 150]) {
      const angles = new Float64Array(pattern.creases.length);
      angles[hinge] = deg * DEG;
      expect(loads.torque(angles, rates)).toBeCloseTo(m * STANDARD_GRAVITY * (L / 2) * Math.cos(deg * DEG) + stiffness * (deg * DEG - rest), 10);
    }
  });

  it('a panel mass of its own replaces the areal density; gravity along −x tilts the answer to sin θ', () => {
    const { pattern, hinge, lifted } = hingedPanel(L, W, 1000);
    const rates = new Float64Array(pattern.creases.length);
    rates[hinge] = 1;
    const angles = new Float64Array(pattern.creases.length);
    angles[hinge] = 40 * DEG;
    const own = model(pattern, { arealDensity: density, panelMasses: new Map([[lifted, 2.5]]) }, 'mm');
    expect(own.torque(angles, rates)).toBeCloseTo(2.5 * STANDARD_GRAVITY * (L / 2) * Math.cos(40 * DEG), 10);
    // gravity (g, 0, 0) in the base frame: the lifted centroid is at x = −(L/2) cos θ, V = −m g x
    const sideways = model(pattern, { arealDensity: density, gravity: [9.8, 0, 0] }, 'mm');
    expect(sideways.torque(angles, rates)).toBeCloseTo(-m * 9.8 * (L / 2) * Math.sin(40 * DEG), 10);
  });

  it('units other than mm, cm, m and in, or none, are refused by name', () => {
    const { pattern } = hingedPanel(L, W, 1);
    for (const units of ['ft', 'furlong', '', undefined]) {
      const r = LoadModel.create(pattern, { arealDensity: 1 }, units);
      expect(r.model).toBeUndefined();
      expect(r.messages[0].code).toBe('units-unknown');
      expect(r.messages[0].where?.field).toBe('units');
    }
    expect(metresPerUnit('MM').scale).toBe(1e-3);
    expect(LoadModel.create(pattern, { arealDensity: -1 }, 'm').messages[0].code).toBe('bad-areal-density');
  });
});

describe('torque is the derivative of the potential energy', () => {

  it('along any direction of the fold angles (central differences, any state, springs and tilted gravity)', () => {
    const { pattern } = miuraSheet(3, 4, 40, 30, 70);
    const rand = mulberry32(4);
    const hinges = pattern.creases.filter((c) => c.assignment !== 'B').map((c) => c.index);
    const springs = hinges.slice(0, 5).map((crease, i) => ({ crease, stiffness: 0.1 * (i + 1), rest: (i - 2) * 20 * DEG }));
    const loads = model(pattern, { arealDensity: 1.7, gravity: [1.2, -3.1, -9.3], springs }, 'mm');
    for (let trial = 0; trial < 10; trial++) {
      const angles = new Float64Array(pattern.creases.length);
      const rates = new Float64Array(pattern.creases.length);
      for (const c of hinges) { angles[c] = (rand() - 0.5) * 2; rates[c] = rand() - 0.5; }
      const h = 1e-5;
      const plus = angles.map((a, c) => a + h * rates[c]);
      const minus = angles.map((a, c) => a - h * rates[c]);
      const fd = (loads.energy(plus) - loads.energy(minus)) / (2 * h);
      const tau = loads.torque(angles, rates);
      expect(Math.abs(tau - fd)).toBeLessThan(1e-7 * Math.max(1, Math.abs(fd)));
    }
  });

  it('a Miura sheet along its path: τ from the hinge rates equals the difference of V between solved samples', () => {
    const { pattern, drive, sign } = miuraSheet(4, 5, 40, 30, 70);
    const loads = model(pattern, { arealDensity: 2.4 }, 'mm');
    const h = 1e-3;
    const degs = [20, 75, 130];
    const samples = degs.flatMap((deg) => [sign * deg * DEG - h, sign * deg * DEG, sign * deg * DEG + h]).sort((a, b) => sign * (a - b));
    const path = sweep(pattern, { drive, from: samples[0], to: samples[samples.length - 1], samples });
    expect(path.status).toBe('complete');
    for (let k = 0; k < degs.length; k++) {
      const [lo, at, hi] = path.samples.slice(3 * k, 3 * k + 3);
      const fd = (loads.energy(hi.angles) - loads.energy(lo.angles)) / (hi.drive - lo.drive);
      const tau = loads.torque(at.angles, at.rates);
      // central difference: error h² V'''/6, far below 1e-5 of the torque here
      expect(Math.abs(tau - fd)).toBeLessThan(1e-5 * Math.abs(fd));
    }
  });

  it('several drives: each drive\'s torque from the sensitivities equals the difference of V with the other held', () => {
    const g = degree5({});
    const { pattern } = buildPattern(g.project!.source);
    const p = pattern!;
    const loads = model(p, { arealDensity: 5 }, 'mm');
    const drives = g.project!.drives.map((d) => ({ crease: p.labelIndex.get(d.crease)!, value: d.angleDeg * DEG }));
    const report = solveDrives(p, drives);
    const sol = report.solutions[0];
    const h = 1e-4;
    for (const d of drives) {
      const near = (value: number) => {
        const moved = drives.map((x) => (x.crease === d.crease ? { ...x, value } : x));
        const r = solveDrives(p, moved);
        // the solution on the same branch: the one closest to the state we differentiate at
        return r.solutions.reduce((best, s) => (dist(s.angles, sol.angles) < dist(best.angles, sol.angles) ? s : best)).angles;
      };
      const fd = (loads.energy(near(d.value + h)) - loads.energy(near(d.value - h))) / (2 * h);
      const tau = loads.torque(sol.angles, ratesFromSensitivity(p, sol.sensitivity, d.crease));
      expect(Math.abs(tau - fd)).toBeLessThan(1e-5 * Math.max(1e-3, Math.abs(fd)));
    }
  });
});

function dist(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return s;
}
