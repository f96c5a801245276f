// The closed-form degree-4 vertex and the vertex-by-vertex propagation.
import { describe, expect, it } from 'vitest';
import { degree4States, planPropagation, propagate, propagationWork } from '../solver/paths/propagate';
import { buildClosureSystem, evaluateBlock, closureScratch } from '../solver/closure/blocks';
import { miura, waterbomb, degree5 } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { sweep } from '../solver/paths/sweep';
import { directionsFromSectors, vertexPattern } from './support/vertex';
import { fourBarResidual } from './support/references';
import { axisAngleRotation, multiplyMat3, rotationVector } from '../solver/math/rotation';

const D = Math.PI / 180;


describe('closed-form degree-4 vertex', () => {
  const sets = [[70, 95, 100, 95], [80, 90, 110, 80], [60, 85, 120, 95], [60, 100, 120, 80]];
  for (const s of sets) {
    it(`sectors ${s.join('/')}: both roots close the vertex and satisfy the four-bar equation, from any input slot`, () => {
      const dirs = directionsFromSectors(s);
      const ux = dirs.map(Math.cos), uy = dirs.map(Math.sin);
      const p = vertexPattern(dirs);
      const sys = buildClosureSystem(p);
      const out = new Float64Array(8);
      const res = new Float64Array(3);
      const jac = new Float64Array(12);
      let checked = 0;
      for (const input of [0, 1, 2, 3]) {
        for (const rho of [-150, -60, -5, 5, 40, 100, 160].map((x) => x * D)) {
          const n = degree4States(ux, uy, input, rho, out);
          for (let r = 0; r < n; r++) {
            const angles = out.subarray(4 * r, 4 * r + 4);
            expect(angles[input]).toBe(rho);
            expect(evaluateBlock(sys, 0, Float64Array.from(angles), res, jac, closureScratch())).toBeLessThan(1e-12);
            expect(Math.abs(fourBarResidual(s.map((x) => x * D), angles[0], angles[3]))).toBeLessThan(1e-12);
            checked++;
          }
        }
      }
      expect(checked).toBeGreaterThan(20);
    });
  }
});

describe('the closure block written out for in-plane axes', () => {
  it('gives the residual of the general rotation product (Rodrigues matrices multiplied in order, log map)', () => {
    const p = vertexPattern(directionsFromSectors([70, 95, 100, 95]));
    const sys = buildClosureSystem(p);
    const scratch = closureScratch();
    for (const angles of [[0.3, -0.2, 0.5, 1.1], [2.9, -3.0, 0.1, -1.4], [0, 0, 0, 0], [Math.PI, 0.2, -Math.PI, 0.7]]) {
      const x = Float64Array.from(angles);
      const r1 = new Float64Array(3), j1 = new Float64Array(12);
      const n1 = evaluateBlock(sys, 0, x, r1, j1, scratch);
      // the general product: R(u₁, ρ₁)·…·R(u₄, ρ₄) with 3-D axes, by the general-purpose kernels
      let P = new Float64Array([1, 0, 0, 0, 1, 0, 0, 0, 1]);
      const R = new Float64Array(9), Q = new Float64Array(9), phi = new Float64Array(3);
      for (let k = 0; k < 4; k++) {
        axisAngleRotation(R, sys.slotUx[k], sys.slotUy[k], 0, x[sys.slotCrease[k]]);
        multiplyMat3(Q, P, R);
        P = Float64Array.from(Q);
      }
      rotationVector(phi, P);
      expect(Math.abs(n1 - Math.hypot(...phi))).toBeLessThan(1e-14);
      for (let i = 0; i < 3; i++) expect(Math.abs(r1[i] - phi[i])).toBeLessThan(1e-14);
    }
  });

  it('its Jacobian is the derivative of its residual (central differences)', () => {
    const p = vertexPattern(directionsFromSectors([70, 95, 100, 95]));
    const sys = buildClosureSystem(p);
    const x = Float64Array.from([0.7, -0.4, 1.2, -2.1]);
    const r = new Float64Array(3), J = new Float64Array(12);
    evaluateBlock(sys, 0, x, r, J, closureScratch());
    const h = 1e-6;
    for (let k = 0; k < 4; k++) {
      const rp = new Float64Array(3), rm = new Float64Array(3), tmp = new Float64Array(12);
      const xp = Float64Array.from(x), xm = Float64Array.from(x);
      xp[sys.slotCrease[k]] += h; xm[sys.slotCrease[k]] -= h;
      evaluateBlock(sys, 0, xp, rp, tmp, closureScratch());
      evaluateBlock(sys, 0, xm, rm, tmp, closureScratch());
      for (let i = 0; i < 3; i++) expect(Math.abs((rp[i] - rm[i]) / (2 * h) - J[3 * k + i])).toBeLessThan(1e-8);
    }
  });
});

describe('propagation', () => {
  it('applies to Miura-ori (every interior vertex degree 4) and not to a degree-8 or degree-5 vertex or with a crease held', () => {
    const m = buildPattern(miura({ rows: 2, cols: 3, a: 40, b: 30, alphaDeg: 70 }).project!.source).pattern!;
    expect(planPropagation(m, buildClosureSystem(m), 0 + m.labelIndex.get('z3_2')!).plan).toBeDefined();
    const held = planPropagation(m, buildClosureSystem(m), m.labelIndex.get('z3_2')!, (c) => c === m.labelIndex.get('z1_1'));
    expect(held.plan).toBeUndefined();
    expect(held.reason).toMatch(/held/);
    const w = buildPattern(waterbomb().project!.source).pattern!;
    expect(planPropagation(w, buildClosureSystem(w), 1).reason).toMatch(/degree 4/);
    const d5 = buildPattern(degree5().project!.source).pattern!;
    expect(planPropagation(d5, buildClosureSystem(d5), 0).reason).toMatch(/degree 4/);
  });

  it('rates and curvature of a generic vertex match central differences of the propagated states', () => {
    const s = [70, 95, 100, 95];
    const p = vertexPattern(directionsFromSectors(s));
    const sys = buildClosureSystem(p);
    const { plan } = planPropagation(p, sys, 0);
    const work = propagationWork(sys, 4);
    const at = (v: number, ref: Float64Array) => {
      const x = new Float64Array(4);
      x[0] = v;
      const rates = new Float64Array(4), curv = new Float64Array(4);
      const out = propagate(sys, plan!, x, { kind: 'nearest', reference: ref }, work, rates, curv);
      expect(out.ok).toBe(true);
      return { x, rates, curv };
    };
    const path = sweep(p, { drive: 0, from: 10 * D, to: 90 * D, step: 40 * D, branch: 1 });
    for (const sample of path.samples) {
      const h = 1e-5;
      const mid = at(sample.drive, sample.angles);
      const lo = at(sample.drive - h, mid.x), hi = at(sample.drive + h, mid.x);
      for (let c = 1; c < 4; c++) {
        expect(Math.abs(mid.rates[c] - (hi.x[c] - lo.x[c]) / (2 * h))).toBeLessThan(1e-8);
        expect(Math.abs(mid.curv[c] - (hi.rates[c] - lo.rates[c]) / (2 * h))).toBeLessThan(1e-6);
        expect(Math.abs(mid.rates[c] - sample.rates[c])).toBeLessThan(1e-12);
      }
    }
  });
});
