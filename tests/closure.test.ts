import { describe, expect, it } from 'vitest';
import { Quaternion, Vector3 } from 'three';
import { buildClosureSystem, closureScratch, evaluateBlock } from '../solver/closure/blocks';
import { axisAngleRotation, mat3, multiplyMat3, rotationVector, vec3 } from '../solver/math/rotation';
import { directionsFromSectors, vertexPattern } from './support/vertex';
import { mulberry32 } from '../solver/math/random';

const rng = mulberry32;

describe('rotation kernels', () => {
  it('compose like three.js quaternions (independent library from the npm registry)', () => {
    const rand = rng(1);
    for (let trial = 0; trial < 200; trial++) {
      const n = 2 + Math.floor(rand() * 5);
      let m = mat3();
      axisAngleRotation(m, 1, 0, 0, 0);
      const q = new Quaternion();
      for (let k = 0; k < n; k++) {
        const axis = new Vector3(rand() - 0.5, rand() - 0.5, rand() - 0.5).normalize();
        const angle = (rand() - 0.5) * 2 * Math.PI;
        const r = axisAngleRotation(mat3(), axis.x, axis.y, axis.z, angle);
        const next = multiplyMat3(mat3(), m, r);
        m = next;
        q.multiply(new Quaternion().setFromAxisAngle(axis, angle));
      }
      const v = new Vector3(0.3, -0.7, 0.2);
      const w = v.clone().applyQuaternion(q);
      const mv = [m[0] * v.x + m[1] * v.y + m[2] * v.z, m[3] * v.x + m[4] * v.y + m[5] * v.z, m[6] * v.x + m[7] * v.y + m[8] * v.z];
      expect(mv[0]).toBeCloseTo(w.x, 12);
      expect(mv[1]).toBeCloseTo(w.y, 12);
      expect(mv[2]).toBeCloseTo(w.z, 12);
    }
  });

  it('rotation vector inverts Rodrigues, including angles near and at 180° (where the skew part vanishes)', () => {
    const rand = rng(2);
    const angles = [0, 1e-9, 1e-5, 0.3, 2, Math.PI - 1e-2, Math.PI - 1e-4, Math.PI - 1e-7, Math.PI];
    for (const angle of angles) {
      for (let k = 0; k < 20; k++) {
        const a = [rand() - 0.5, rand() - 0.5, rand() - 0.5];
        const n = Math.hypot(...a);
        const axis = a.map((x) => x / n);
        const m = axisAngleRotation(mat3(), axis[0], axis[1], axis[2], angle);
        const phi = rotationVector(vec3(), m);
        const got = Math.hypot(phi[0], phi[1], phi[2]);
        expect(Math.abs(got - angle)).toBeLessThan(1e-8);
        if (angle > 1e-6 && angle < Math.PI) {
          for (let i = 0; i < 3; i++) expect(Math.abs(phi[i] / got - axis[i])).toBeLessThan(1e-6);
        }
        // the reconstructed rotation equals the input (covers ±axis ambiguity at π)
        const back = axisAngleRotation(mat3(), phi[0] / (got || 1), phi[1] / (got || 1), phi[2] / (got || 1), got);
        for (let i = 0; i < 9; i++) expect(Math.abs(back[i] - m[i])).toBeLessThan(1e-7);
      }
    }
  });
});

describe('vertex closure block', () => {
  it('two collinear creases close exactly when their fold angles are equal (straight fold; common practice)', () => {
    const p = vertexPattern([0, Math.PI]);
    const sys = buildClosureSystem(p);
    const r = new Float64Array(3);
    const s = closureScratch();
    expect(evaluateBlock(sys, 0, Float64Array.from([0.7, 0.7]), r, null, s)).toBeLessThan(1e-15);
    expect(evaluateBlock(sys, 0, Float64Array.from([0.7, 0.5]), r, null, s)).toBeCloseTo(0.2, 12);
    // a 180° fold: the product is the identity, not a 180° rotation
    expect(evaluateBlock(sys, 0, Float64Array.from([Math.PI, Math.PI]), r, null, s)).toBeLessThan(1e-12);
    expect(evaluateBlock(sys, 0, Float64Array.from([Math.PI, 0]), r, null, s)).toBeCloseTo(Math.PI, 9);
  });

  it('analytic Jacobian matches central finite differences away from closure', () => {
    const rand = rng(3);
    for (let trial = 0; trial < 50; trial++) {
      const n = 3 + Math.floor(rand() * 6);
      const cuts = Array.from({ length: n }, () => 0.2 + rand());
      const total = cuts.reduce((a, b) => a + b, 0);
      const dirs = directionsFromSectors(cuts.map((c) => (360 * c) / total));
      const sys = buildClosureSystem(vertexPattern(dirs));
      const s = closureScratch();
      const angles = Float64Array.from({ length: n }, () => (rand() - 0.5) * 2.4);
      const r = new Float64Array(3);
      const J = new Float64Array(3 * n);
      const norm = evaluateBlock(sys, 0, angles, r, J, s);
      if (norm > 3) continue; // stay clear of the log map's cut at π
      const h = 1e-6;
      for (let k = 0; k < n; k++) {
        const plus = Float64Array.from(angles);
        const minus = Float64Array.from(angles);
        plus[k] += h;
        minus[k] -= h;
        const rp = new Float64Array(3);
        const rm = new Float64Array(3);
        evaluateBlock(sys, 0, plus, rp, null, s);
        evaluateBlock(sys, 0, minus, rm, null, s);
        for (let i = 0; i < 3; i++) expect(Math.abs((rp[i] - rm[i]) / (2 * h) - J[3 * k + i])).toBeLessThan(1e-6);
      }
    }
  });
});
