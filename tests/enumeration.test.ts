// The exact enumeration against slow, independent references written here: the closed-form vertex solution
// against the rotation product of three.js quaternions and against dense multistart; whole sheets against a
// brute-force walk over every root of the degree-4 closed form (solver/paths/propagate.ts, an independent
// derivation of the spherical four-bar) united with hundreds of random Newton starts, with isolation checked by
// ml-matrix's SVD.
import { describe, expect, it } from 'vitest';
import { Quaternion, Vector3 } from 'three';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { closeVertex } from '../solver/closure/vertex-solve';
import { degree4States } from '../solver/paths/propagate';
import { mulberry32 } from '../solver/math/random';
import { buildClosureSystem, type ClosureSystem } from '../solver/closure/blocks';
import { ClosureProblem } from '../solver/closure/newton';
import { solveDrives } from '../solver/search/solve';
import { wrapAngle } from '../solver/math/rotation';
import type { Pattern } from '../solver/types';
import { degree4Chain, miuraSheet } from './support/references';
import { directionsFromSectors, vertexPattern } from './support/vertex';

const D = Math.PI / 180;

/** Closure residual of one vertex by three.js quaternions (an independent rotation library). */
function quaternionResidual(dirs: number[], angles: ArrayLike<number>, o = 0): number {
  const q = new Quaternion();
  dirs.forEach((t, k) => q.multiply(new Quaternion().setFromAxisAngle(new Vector3(Math.cos(t), Math.sin(t), 0), angles[o + k])));
  // the rotation angle, from the vector part (acos of w loses half the digits near closure)
  return 2 * Math.atan2(Math.hypot(q.x, q.y, q.z), Math.abs(q.w));
}

function sameAngles(a: ArrayLike<number>, b: ArrayLike<number>, tol = 1e-6): boolean {
  for (let i = 0; i < a.length; i++) if (Math.abs(wrapAngle(a[i] - b[i])) > tol) return false;
  return true;
}

describe('the closed-form vertex closure', () => {
  it('three unknowns at degree 5 and 6: every state closes (three.js), and dense multistart finds no other', () => {
    const rand = mulberry32(41);
    let states = 0;
    for (let trial = 0; trial < 40; trial++) {
      const n = 5 + (trial % 2);
      const cuts = Array.from({ length: n }, () => 0.4 + rand());
      const total = cuts.reduce((a, b) => a + b, 0);
      const sectors = cuts.map((c) => (360 * c) / total);
      const dirs = directionsFromSectors(sectors);
      const unknown = [...Array(n).keys()].sort(() => rand() - 0.5).slice(0, 3).sort((a, b) => a - b);
      const known = Array.from({ length: n }, (_, k) => (unknown.includes(k) ? 0 : 1));
      const angles = Array.from({ length: n }, (_, k) => (known[k] ? (rand() * 2 - 1) * 0.9 : 0));
      const out = new Float64Array(2 * n), pivot = new Float64Array(2);
      const r = closeVertex(dirs.map(Math.cos), dirs.map(Math.sin), n, known, angles, out, pivot);
      expect(r.kind).toBe('states');
      expect(r.count).toBeLessThanOrEqual(2);
      for (let s = 0; s < r.count; s++) expect(quaternionResidual(dirs, out, s * n)).toBeLessThan(1e-12);
      states += r.count;
      // the reference: Newton/LM on this vertex from 60 random starts
      const p = vertexPattern(dirs);
      const problem = new ClosureProblem(p, (c) => !!known[c]);
      for (let s = 0; s < 60; s++) {
        const x = Float64Array.from(angles);
        for (const c of unknown) x[c] = (rand() * 2 - 1) * Math.PI;
        const res = problem.solve(x, { maxIterations: 100 });
        if (!res.converged) continue;
        const found = [...Array(r.count).keys()].some((k) => sameAngles(res.angles, out.subarray(k * n, k * n + n), 1e-5));
        expect(found, `multistart state ${Array.from(res.angles, (a) => (a / D).toFixed(3))} missing`).toBe(true);
      }
    }
    expect(states).toBeGreaterThan(20);
  });

  it('a straight crease line folded flat (180°) frees the other two creases: a family, not a sample of it', () => {
    // sectors 70/110/110/70: creases 0 and 2 are collinear; with crease 0 at 180° the two panels beside the
    // line are stacked and creases 1 and 3 turn together (ρ3 = −ρ1 for any ρ1)
    const dirs = directionsFromSectors([70, 110, 110, 70]);
    const out = new Float64Array(8), pivot = new Float64Array(2);
    const r = closeVertex(dirs.map(Math.cos), dirs.map(Math.sin), 4, [1, 0, 0, 0], [Math.PI, 0, 0, 0], out, pivot);
    expect(r.kind).toBe('family');
    // every member of that continuum closes (three.js)
    for (const t of [-2, -0.5, 0.3, 1.7]) expect(quaternionResidual(dirs, [Math.PI, t, Math.PI, -t])).toBeLessThan(1e-12);
  });

  it('known values that do not close are refused, and a double root is one state', () => {
    const dirs = directionsFromSectors([60, 100, 120, 80]);
    const out = new Float64Array(8), pivot = new Float64Array(2);
    const two = closeVertex(dirs.map(Math.cos), dirs.map(Math.sin), 4, [1, 1, 0, 0], [40 * D, 20 * D, 0, 0], out, pivot);
    expect(two).toMatchObject({ kind: 'states', count: 0 });
  });
});

/** Every interior vertex of the pattern, and the creases known at the start. */
interface Sheet { pattern: Pattern; sys: ClosureSystem; drive: number; value: number }

/**
 * Independent brute force: vertices in breadth-first order from the drive, at each the two roots of the
 * degree-4 closed form from one known crease, kept when they agree with every crease already set.
 */
function bruteForce({ pattern, sys, drive, value }: Sheet): Float64Array[] {
  const out: Float64Array[] = [];
  const angles = new Float64Array(pattern.creases.length);
  angles[drive] = value;
  const set = new Uint8Array(pattern.creases.length);
  set[drive] = 1;
  for (const c of pattern.creases) if (c.assignment === 'B') set[c.index] = 1;
  const blocks = [...Array(sys.blockCount).keys()];
  const walk = (done: Set<number>) => {
    const next = blocks.find((b) => !done.has(b) && [0, 1, 2, 3].some((k) => set[sys.slotCrease[sys.blockStart[b] + k]]));
    if (next === undefined) { out.push(Float64Array.from(angles)); return; }
    const s = sys.blockStart[next];
    const cs = [0, 1, 2, 3].map((k) => sys.slotCrease[s + k]);
    const input = cs.findIndex((c) => set[c]);
    const states = new Float64Array(8);
    const n = degree4States([0, 1, 2, 3].map((k) => sys.slotUx[s + k]), [0, 1, 2, 3].map((k) => sys.slotUy[s + k]), input, angles[cs[input]], states);
    for (let r = 0; r < n; r++) {
      if (cs.some((c, k) => set[c] && Math.abs(wrapAngle(states[4 * r + k] - angles[c])) > 1e-7)) continue;
      const fresh = cs.filter((c) => !set[c]);
      cs.forEach((c, k) => { if (!set[c]) angles[c] = states[4 * r + k]; });
      fresh.forEach((c) => (set[c] = 1));
      walk(new Set([...done, next]));
      fresh.forEach((c) => (set[c] = 0));
    }
  };
  walk(new Set());
  return out;
}

/** Closed states found by Newton/LM from random starts, with the drive held. */
function multistart({ pattern, drive, value }: Sheet, starts: number, seed: number): Float64Array[] {
  const problem = new ClosureProblem(pattern, (c) => c === drive);
  const rand = mulberry32(seed);
  const out: Float64Array[] = [];
  for (let s = 0; s < starts; s++) {
    const x = new Float64Array(pattern.creases.length);
    x[drive] = value;
    for (const c of problem.unknownCreases) x[c] = (rand() * 2 - 1) * Math.PI;
    const r = problem.solve(x, { maxStep: 0.6, maxIterations: 200 });
    if (!r.converged) continue;
    const p = problem.solve(r.angles, { polishTolerance: 1e-15, maxIterations: 60 });
    if (p.converged && !out.some((q) => sameAngles(q, p.angles))) out.push(p.angles);
  }
  return out;
}

/** Isolated by the rank of the free creases' Jacobian, from ml-matrix's SVD. */
function isolatedBySvd({ pattern, drive }: Sheet, angles: Float64Array): boolean {
  const problem = new ClosureProblem(pattern, (c) => c === drive);
  problem.evaluate(angles);
  const cols = Array.from(problem.unknownCreases);
  const svd = new SingularValueDecomposition(new Matrix(problem.denseJacobian(cols)), { autoTranspose: true });
  return svd.diagonal.filter((s) => s > 1e-8).length === cols.length;
}

function checkSheet(sheet: Sheet, starts: number) {
  const report = solveDrives(sheet.pattern, [{ crease: sheet.drive, value: sheet.value }], { cap: 100_000, conditions: 0 });
  const reference = [...bruteForce(sheet), ...multistart(sheet, starts, 5)].filter((a) => isolatedBySvd(sheet, a));
  const distinct: Float64Array[] = [];
  for (const a of reference) if (!distinct.some((b) => sameAngles(a, b))) distinct.push(a);
  // every isolated state the references find is listed …
  for (const a of distinct) {
    expect(report.solutions.some((s) => sameAngles(s.angles, a)), `reference state ${Array.from(a, (x) => (x / D).toFixed(2)).join(' ')} missing`).toBe(true);
  }
  // … and everything listed is closed and isolated
  for (const s of report.solutions) {
    expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
    expect(isolatedBySvd(sheet, s.angles) || s.nullity !== undefined).toBe(true);
  }
  return { report, reference: distinct };
}

function miuraCase(rows: number, cols: number): Sheet {
  const { pattern, drive, sign } = miuraSheet(rows, cols, 40, 30, 70);
  return { pattern, sys: buildClosureSystem(pattern), drive, value: sign * 60 * D };
}

function chain(count: number): Sheet {
  const pattern = degree4Chain(count);
  return { pattern, sys: buildClosureSystem(pattern), drive: pattern.labelIndex.get('in')!, value: 50 * D };
}

describe('exhaustive enumeration of sheets against independent references', () => {
  it('Miura-ori 2 × 2 with one zigzag drive: exactly the isolated states that 600 random starts and the brute force find', () => {
    const { report, reference } = checkSheet(miuraCase(2, 2), 600);
    expect(report.solutions.length).toBe(reference.length);
    // regions where crease lines folded flat free some vertices: searched numerically, said so
    expect(report.search.complete).toBe(false);
    expect(report.search.note).toMatch(/folded flat/);
    expect(report.families.length).toBeGreaterThan(0);
    expect(report.status).toBe('several-solutions');
  });

  it('Miura-ori 2 × 3 and 3 × 2: every state the references find is listed', () => {
    for (const [r, c] of [[2, 3], [3, 2]]) {
      // 400 starts find most of them (a few hundred more find the rest; the bench runs that)
      const { report, reference } = checkSheet(miuraCase(r, c), 400);
      expect(report.solutions.length).toBeGreaterThanOrEqual(reference.length);
      expect(reference.length).toBeGreaterThan(0.8 * report.solutions.length);
    }
  });

  it('a chain of three generic degree-4 vertices: all 8 states, and the search proves the list complete', () => {
    const sheet = chain(3);
    const { report, reference } = checkSheet(sheet, 300);
    expect(bruteForce(sheet).length).toBe(report.solutions.length);
    expect(reference.length).toBe(report.solutions.length);
    expect(report.search.complete).toBe(true);
    expect(report.search.limit).toBeUndefined();
  });

  it('a cap stops the search and says so; the status does not change with it', () => {
    const sheet = miuraCase(3, 2);
    const small = solveDrives(sheet.pattern, [{ crease: sheet.drive, value: sheet.value }], { cap: 10, conditions: 0 });
    expect(small.search).toMatchObject({ complete: false, found: 10, limit: 10 });
    expect(small.solutions.length).toBe(10);
    expect(small.status).toBe('several-solutions');
    // the first found is the one the assignment asks for
    expect(small.solutions[0].matchesAssignment).toBe(true);
  });
});
