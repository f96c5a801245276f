// A perturbed Miura-ori sheet no longer folds rigidly: its state is the least-squares compromise. Checked against
// an independent least-squares minimum: the closure residual rebuilt from the perturbed vertex positions with
// three.js quaternions, minimized by ml-levenberg-marquardt (a general-purpose fitter from the npm registry)
// with its own finite-difference Jacobian. Also the path-level behaviour on a small sheet: misfit grows with the
// tolerance, shares add up, the run is reproducible and the statistics do not depend on how sheets are split.
import { describe, expect, it } from 'vitest';
import { Quaternion, Vector3 } from 'three';
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { runSteps } from '../solver/paths/sweep';
import { nominalSteps, toleranceResult, toleranceSteps, type ToleranceOptions } from '../solver/outputs/tolerance/run';
import { SheetSolver } from '../solver/outputs/tolerance/sheet';
import { miuraSheet } from './support/references';

const D = Math.PI / 180;

describe('perturbed Miura sheet: the compromise equals an independent least-squares minimum', () => {
  const { pattern, drive, sign } = miuraSheet(3, 3, 40, 30, 70);
  const at = [sign * 60 * D];
  const options: ToleranceOptions = { path: { drive, from: at[0], to: at[0], samples: at }, tolerance: { position: 0.5 }, samples: 1, seed: 1 };
  const setup = runSteps(nominalSteps(pattern, options)).setup!;
  const solver = new SheetSolver(pattern, setup);
  const model = solver.model;
  // offsets of our own choosing inside the zone (radius 0.25), a different one for every vertex
  const offsets = new Map<number, [number, number]>();
  const frac = (x: number) => x - Math.floor(x);
  model.vertices!.forEach((v, i) => {
    const r = 0.25 * Math.sqrt(frac(Math.sin(12.9898 * (i + 1)) * 43758.5453));
    const phi = 2 * Math.PI * frac(Math.sin(78.233 * (i + 1)) * 12345.678);
    offsets.set(v, [r * Math.cos(phi), r * Math.sin(phi)]);
  });
  const params = new Float64Array(model.count);
  model.vertices!.forEach((v, i) => { params[2 * i] = offsets.get(v)![0]; params[2 * i + 1] = offsets.get(v)![1]; });

  // the reference residual: every interior vertex's crease directions from the moved points, the product of
  // the hinge rotations as quaternions, and its rotation vector 2·atan2(|v|, w)·v/|v|
  const moved = (v: number) => [pattern.vertices[v][0] + (offsets.get(v)?.[0] ?? 0), pattern.vertices[v][1] + (offsets.get(v)?.[1] ?? 0)];
  const vertices = pattern.interiorVertices.map((iv) => ({
    creases: iv.creases,
    axes: iv.creases.map((c) => {
      const cr = pattern.creases[c];
      const far = moved(cr.vertices[0] === iv.vertex ? cr.vertices[1] : cr.vertices[0]);
      const centre = moved(iv.vertex);
      return new Vector3(far[0] - centre[0], far[1] - centre[1], 0).normalize();
    }),
  }));
  const residual = (angles: ArrayLike<number>): number[] => {
    const out: number[] = [];
    const q = new Quaternion();
    const step = new Quaternion();
    for (const v of vertices) {
      q.identity();
      v.creases.forEach((c, k) => q.multiply(step.setFromAxisAngle(v.axes[k], angles[c])));
      const s = q.w < 0 ? -1 : 1;
      const n = Math.hypot(q.x, q.y, q.z);
      const f = n < 1e-300 ? 2 : (2 * Math.atan2(n, s * q.w)) / n;
      out.push(s * q.x * f, s * q.y * f, s * q.z * f);
    }
    return out;
  };
  const free = Array.from(solver.hinges);
  const nominal = setup.nominal[0];

  it('to 1e-6 relative in the deviation from nominal and in the cost', () => {
    const sheet = solver.follow(params, 0);
    expect(sheet.status[0]).toBe(1); // a compromise: the perturbed sheet does not close
    const ours = Float64Array.from(nominal);
    free.forEach((c, h) => (ours[c] = sheet.angles[h]));

    let cache: { key: number[]; r: number[] } | undefined;
    const full = (p: number[]) => { const x = Float64Array.from(nominal); free.forEach((c, h) => (x[c] = p[h])); return x; };
    const model = (p: number[]) => {
      if (!cache || cache.key !== p) cache = { key: p, r: residual(full(p)) };
      const r = cache.r;
      return (i: number) => r[i];
    };
    const m = 3 * vertices.length;
    const fit = levenbergMarquardt(
      { x: Array.from({ length: m }, (_, i) => i), y: new Array(m).fill(0) },
      model,
      { initialValues: free.map((c) => nominal[c]), damping: 1e-2, gradientDifference: 1e-7, centralDifference: true, maxIterations: 400, errorTolerance: 1e-40 },
    );
    const ref = full(fit.parameterValues);
    let devRef = 0, diff = 0;
    for (const c of free) { devRef = Math.max(devRef, Math.abs(ref[c] - nominal[c])); diff = Math.max(diff, Math.abs(ours[c] - ref[c])); }
    expect(devRef).toBeGreaterThan(1e-4); // the compromise is really away from nominal
    expect(diff / devRef).toBeLessThan(1e-6);
    const cost = (x: Float64Array) => residual(x).reduce((s, v) => s + v * v, 0);
    expect(Math.abs(cost(ours) - cost(ref)) / cost(ref)).toBeLessThan(1e-6);
    // the misfit we report is the largest vertex residual of that state
    const r = residual(ours);
    let worst = 0;
    for (let b = 0; b < vertices.length; b++) worst = Math.max(worst, Math.hypot(r[3 * b], r[3 * b + 1], r[3 * b + 2]));
    expect(Math.abs(sheet.misfit[0] - worst) / worst).toBeLessThan(1e-9);
  });
});

describe('tolerance along a path on a small Miura sheet', () => {
  const { pattern, drive, sign } = miuraSheet(2, 3, 40, 30, 70);
  const at = [10, 40, 70, 100].map((d) => sign * d * D);
  const opts = (position: number, samples: number, seed = 2): ToleranceOptions => ({
    path: { drive, from: at[0], to: at[3], samples: at }, tolerance: { position }, samples, seed,
  });

  it('no perturbed sheet folds rigidly; misfit and spread scale with the tolerance to first order', () => {
    const small = runSteps(toleranceSteps(pattern, opts(0.01, 16)));
    const large = runSteps(toleranceSteps(pattern, opts(0.02, 16)));
    expect(small.status).toBe('complete');
    for (let j = 0; j < at.length; j++) {
      expect(small.statistics!.rigidFraction[j]).toBe(0);
      // the same sheets with twice the offsets (the same random numbers): misfit doubles to first order
      const ratio = large.statistics!.misfit[j].p50 / small.statistics!.misfit[j].p50;
      expect(Math.abs(ratio - 2)).toBeLessThan(0.02);
      // shares of the misfit add up to one over the vertices
      expect(Math.abs(small.statistics!.share.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-6);
      // the first-order estimate of a hinge's spread scales exactly
      const h = 3;
      expect(large.linear!.hingeStd[j]![h] / small.linear!.hingeStd[j]![h]).toBeCloseTo(2, 10);
    }
  });

  it('reproducible from the seed, and the same statistics however the sheets are split and ordered', () => {
    const o = opts(0.1, 10, 77);
    const whole = runSteps(toleranceSteps(pattern, o));
    const setup = runSteps(nominalSteps(pattern, o)).setup!;
    // two "threads", each with its own solver, taking sheets in an interleaved and reversed order
    const a = new SheetSolver(pattern, setup);
    const b = new SheetSolver(pattern, setup);
    const sheets = [9, 7, 5, 3, 1].map((i) => a.sheet(i)).concat([8, 6, 4, 2, 0].map((i) => b.sheet(i)));
    const split = toleranceResult(o, { sweep: whole.nominalPath, solver: a, sheets, stopped: false });
    expect(split.statistics).toEqual(whole.statistics);
    // a run stopped after some sheets keeps the longest run 0, 1, 2, …: the statistics of a shorter run
    const partial = toleranceResult(o, { sweep: whole.nominalPath, solver: a, sheets: sheets.filter((s) => s.index !== 4), stopped: true });
    const four = runSteps(toleranceSteps(pattern, { ...o, samples: 4 }));
    expect(partial.status).toBe('stopped');
    expect(partial.statistics!.samples).toBe(4);
    expect(partial.statistics).toEqual(four.statistics);
    // another seed gives other sheets
    const other = runSteps(toleranceSteps(pattern, { ...o, seed: 78 }));
    expect(other.statistics!.hinges[1][0].deviation.p50).not.toBe(whole.statistics!.hinges[1][0].deviation.p50);
  });
});
