// Cross-checks of our numerics against general-purpose libraries from the npm registry.
import { describe, expect, it } from 'vitest';
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { solveDrives } from '../solver/search/solve';
import { axisAngleRotation, mat3, multiplyMat3 } from '../solver/math/rotation';
import { nullBasisFromQR, pivotedQR, singularValueBounds } from '../solver/math/qr';
import { directionsFromSectors, vertexPattern } from './support/vertex';

const D = Math.PI / 180;

describe('closure solutions agree with ml-levenberg-marquardt (general curve fitter)', () => {
  it('a generic degree-4 vertex: the fitter, started near our solution, lands on it', () => {
    const sectors = [70, 95, 100, 95];
    const dirs = directionsFromSectors(sectors);
    const p = vertexPattern(dirs);
    const drive = 35 * D;
    const report = solveDrives(p, [{ crease: 0, value: drive }]);
    expect(report.solutions.length).toBeGreaterThan(0);
    for (const sol of report.solutions) {
      // model: entry i of R(u0, ρ0)·R(u1, ρ1)·R(u2, ρ2)·R(u3, ρ3) − I, fitted to zeros
      const model = (params: number[]) => (i: number) => {
        const angles = [drive, ...params];
        let m = axisAngleRotation(mat3(), 1, 0, 0, 0);
        for (let k = 0; k < 4; k++) {
          const r = axisAngleRotation(mat3(), Math.cos(dirs[k]), Math.sin(dirs[k]), 0, angles[k]);
          m = multiplyMat3(mat3(), m, r);
        }
        return m[i] - (i % 4 === 0 ? 1 : 0);
      };
      const start = [sol.angles[1] + 0.03, sol.angles[2] - 0.02, sol.angles[3] + 0.02];
      const fit = levenbergMarquardt(
        { x: [0, 1, 2, 3, 4, 5, 6, 7, 8], y: new Array(9).fill(0) },
        model,
        { initialValues: start, damping: 1e-3, gradientDifference: 1e-7, centralDifference: true, maxIterations: 500, errorTolerance: 1e-24 },
      );
      for (let k = 0; k < 3; k++) expect(Math.abs(fit.parameterValues[k] - sol.angles[k + 1])).toBeLessThan(1e-6);
    }
  });
});

describe('pivoted QR agrees with ml-matrix SVD (rank, null space, extreme singular values)', () => {
  it('random rank-deficient matrices', () => {
    let seed = 3;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) - 0.5;
    for (let trial = 0; trial < 30; trial++) {
      const m = 6 + (trial % 7) * 3;
      const n = 4 + (trial % 5) * 2;
      const r = Math.max(1, Math.min(m, n) - 1 - (trial % 3));
      const A = Matrix.zeros(m, n);
      for (let k = 0; k < r; k++) {
        const u = Array.from({ length: m }, rand);
        const v = Array.from({ length: n }, rand);
        for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) A.set(i, j, A.get(i, j) + u[i] * v[j]);
      }
      const svd = new SingularValueDecomposition(A, { autoTranspose: true });
      const sv = svd.diagonal;
      const rankSvd = sv.filter((s) => s > 1e-8).length;
      const colMajor = new Float64Array(m * n);
      for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) colMajor[i + j * m] = A.get(i, j);
      const f = pivotedQR(colMajor, m, n, 1e-8);
      expect(f.rank).toBe(rankSvd);
      const { max, min } = singularValueBounds(f, 500);
      const nonzero = sv.filter((s) => s > 1e-8);
      expect(Math.abs(max - Math.max(...nonzero)) / Math.max(...nonzero)).toBeLessThan(1e-6);
      expect(Math.abs(min - Math.min(...nonzero)) / Math.min(...nonzero)).toBeLessThan(1e-6);
      const N = nullBasisFromQR(f);
      expect(N.length).toBe(n - rankSvd);
      for (const v of N) {
        const Av = A.mmul(Matrix.columnVector(v));
        expect(Av.norm()).toBeLessThan(1e-9);
      }
    }
  });
});
