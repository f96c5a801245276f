// The pieces of the tolerance analysis against outside references: closure of a vertex whose corners do not
// add up to 360° (spherical trigonometry), the derivatives of the closure residual with respect to the flat
// geometry and the second-order Hessian term (central finite differences), and the random sheets (uniform in
// a disc and in an interval, checked by Kolmogorov–Smirnov tests).
import { describe, expect, it } from 'vitest';
import { buildClosureSystem, blockGeometryJacobian, closureScratch, evaluateClosure, geometryCopy } from '../solver/closure/blocks';
import { ClosureProblem } from '../solver/closure/newton';
import { runSteps } from '../solver/paths/sweep';
import { toleranceSteps } from '../solver/outputs/tolerance/run';
import { nominalDirections, setGeometry, sheetPerturbation, sheetRandom } from '../solver/outputs/tolerance/perturbation';
import { secondOrderTerm } from '../solver/outputs/tolerance/sheet';
import { directionsFromSectors, vertexPattern } from './support/vertex';
import { miuraSheet } from './support/references';

const D = Math.PI / 180;

/** Kolmogorov–Smirnov statistic of a sample against a distribution function. */
function ksStatistic(values: number[], cdf: (x: number) => number): number {
  const v = [...values].sort((a, b) => a - b);
  let d = 0;
  v.forEach((x, i) => {
    const f = cdf(x);
    d = Math.max(d, Math.abs(f - i / v.length), Math.abs(f - (i + 1) / v.length));
  });
  return d;
}
// Critical value of the one-sample Kolmogorov–Smirnov test at α = 0.001 for large n: 1.95/√n (F. J. Massey,
// "The Kolmogorov-Smirnov test for goodness of fit", J. Am. Stat. Assoc. 46, 1951, table 1; from memory).
const ks001 = (n: number) => 1.95 / Math.sqrt(n);

describe('a vertex whose corners do not add up to 360° (closure with a defect)', () => {
  // A degree-3 vertex with sectors a, b, c summing below 360° folds into a rigid cone. Its dihedral angle at
  // the crease between sectors a and b is the spherical triangle's angle opposite side c:
  // cos D = (cos c − cos a·cos b)/(sin a·sin b) (spherical law of cosines, e.g. I. Todhunter, "Spherical
  // Trigonometry", 1886, art. 41), and the fold angle there is ±(180° − D).
  for (const sectors of [[100, 110, 120], [80, 90, 100], [60, 120, 150], [45, 50, 60]]) {
    it(`sectors ${sectors.join('/')}`, () => {
      const [a, b, c] = sectors.map((s) => s * D);
      const p = vertexPattern(directionsFromSectors(sectors));
      const sys = geometryCopy(buildClosureSystem(p));
      sys.blockDefect[0] = 2 * Math.PI - (a + b + c);
      const problem = new ClosureProblem(p, () => false, sys);
      const dihedral = (x: number, y: number, opposite: number) => Math.acos((Math.cos(opposite) - Math.cos(x) * Math.cos(y)) / (Math.sin(x) * Math.sin(y)));
      // crease 0 lies between sectors c and a, crease 1 between a and b, crease 2 between b and c
      const expected = [Math.PI - dihedral(c, a, b), Math.PI - dihedral(a, b, c), Math.PI - dihedral(b, c, a)];
      for (const sign of [1, -1]) {
        const r = problem.solve(Float64Array.from([0.6, 0.6, 0.6].map((v) => sign * v)), { maxStep: 0.2 });
        expect(r.maxResidual).toBeLessThan(1e-12);
        for (let k = 0; k < 3; k++) expect(Math.abs(Math.abs(r.angles[k]) - expected[k])).toBeLessThan(1e-9);
        // a cone: every crease folds the same way
        expect(new Set(Array.from(r.angles, Math.sign)).size).toBe(1);
      }
    });
  }
});

describe('derivatives of the closure residual with respect to the flat geometry (central differences)', () => {
  const { pattern } = miuraSheet(2, 2, 40, 30, 70);
  const base = buildClosureSystem(pattern);
  const theta0 = nominalDirections(pattern, base);
  const sys = geometryCopy(base);
  const defect = new Float64Array(base.blockCount).map((_, b) => 0.01 * (b % 3) - 0.01);
  // a state that does not close, so that J_l⁻¹(r) matters
  const angles = new Float64Array(pattern.creases.length).map((_, c) => 0.4 * Math.sin(1.7 * c + 0.3));
  it('∂r/∂θ of every slot and ∂r/∂d of every block', () => {
    setGeometry(sys, theta0, defect);
    const dTheta = new Float64Array(3 * sys.slotCount);
    const dDefect = new Float64Array(3);
    const s = closureScratch();
    const r = (th: Float64Array, d: Float64Array) => {
      setGeometry(sys, th, d);
      const out = new Float64Array(3 * sys.blockCount);
      evaluateClosure(sys, angles, out, null);
      return out;
    };
    const h = 1e-6;
    let worst = 0;
    for (let b = 0; b < sys.blockCount; b++) {
      setGeometry(sys, theta0, defect);
      blockGeometryJacobian(sys, b, angles, dTheta, dDefect, s);
      for (let slot = sys.blockStart[b]; slot < sys.blockStart[b + 1]; slot++) {
        const plus = Float64Array.from(theta0); plus[slot] += h;
        const minus = Float64Array.from(theta0); minus[slot] -= h;
        const rp = r(plus, defect), rm = r(minus, defect);
        for (let k = 0; k < 3; k++) worst = Math.max(worst, Math.abs((rp[3 * b + k] - rm[3 * b + k]) / (2 * h) - dTheta[3 * slot + k]));
      }
      const dp = Float64Array.from(defect); dp[b] += h;
      const dm = Float64Array.from(defect); dm[b] -= h;
      const rp = r(theta0, dp), rm = r(theta0, dm);
      for (let k = 0; k < 3; k++) worst = Math.max(worst, Math.abs((rp[3 * b + k] - rm[3 * b + k]) / (2 * h) - dDefect[k]));
    }
    expect(worst).toBeLessThan(1e-8);
  });

  it('∂r/∂ρ with a defect is still J_l⁻¹(r)·w (a constant right factor)', () => {
    setGeometry(sys, theta0, defect);
    const problem = new ClosureProblem(pattern, () => false, sys);
    problem.evaluate(angles, true);
    const J = Float64Array.from(problem.jacobian);
    const h = 1e-6;
    let worst = 0;
    for (let p = 0; p < sys.slotCount; p++) {
      const c = sys.slotCrease[p];
      const b = [...sys.blockStart].findIndex((s, i) => i < sys.blockCount && p >= s && p < sys.blockStart[i + 1]);
      const plus = Float64Array.from(angles); plus[c] += h;
      const minus = Float64Array.from(angles); minus[c] -= h;
      problem.evaluate(plus, false);
      const rp = Float64Array.from(problem.residual);
      problem.evaluate(minus, false);
      for (let k = 0; k < 3; k++) worst = Math.max(worst, Math.abs((rp[3 * b + k] - problem.residual[3 * b + k]) / (2 * h) - J[3 * p + k]));
    }
    expect(worst).toBeLessThan(1e-8);
  });
});

describe('the Hessian of ½Σ|r|² used by the sheet iteration (central differences of the exact gradient)', () => {
  // JᵀJ + S agrees with the true Hessian up to terms in |r|², JᵀJ alone only up to terms in |r|: shrinking the
  // residual tenfold shrinks the first error a hundredfold and the second tenfold.
  const { pattern, drive } = miuraSheet(2, 2, 40, 30, 70);
  const problem = new ClosureProblem(pattern, (c) => c === drive);
  const n = problem.unknownCount;
  const closed = (() => {
    const x = new Float64Array(pattern.creases.length);
    for (const c of pattern.creases) x[c.index] = c.assignment === 'V' ? 0.5 : c.assignment === 'M' ? -0.5 : 0;
    return problem.solve(x, { maxStep: 0.1 }).angles;
  })();
  const gradient = (x: Float64Array) => {
    problem.evaluate(x, true);
    const g = new Float64Array(n);
    const { sys, unknownOf, jacobian: J, residual: r } = problem;
    for (let b = 0; b < sys.blockCount; b++) {
      for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
        const a = unknownOf[sys.slotCrease[p]];
        if (a >= 0) for (let k = 0; k < 3; k++) g[a] += J[3 * p + k] * r[3 * b + k];
      }
    }
    return g;
  };
  const errors = (scale: number) => {
    const x = Float64Array.from(closed);
    problem.unknownCreases.forEach((c, a) => (x[c] += scale * Math.sin(3.1 * a + 1)));
    problem.evaluate(x, true);
    const gn: number[][] = Array.from({ length: n }, () => new Array(n).fill(0));
    const { sys, unknownOf, jacobian: J } = problem;
    for (let b = 0; b < sys.blockCount; b++) {
      for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
        for (let q = sys.blockStart[b]; q < sys.blockStart[b + 1]; q++) {
          const a = unknownOf[sys.slotCrease[p]], c = unknownOf[sys.slotCrease[q]];
          if (a >= 0 && c >= 0) gn[a][c] += J[3 * p] * J[3 * q] + J[3 * p + 1] * J[3 * q + 1] + J[3 * p + 2] * J[3 * q + 2];
        }
      }
    }
    const full = gn.map((row) => [...row]);
    secondOrderTerm(problem, (a, c, v) => { full[a][c] += v; full[c][a] += v; });
    const h = 1e-6;
    let errFull = 0, errGn = 0;
    problem.unknownCreases.forEach((cr, a) => {
      const plus = Float64Array.from(x); plus[cr] += h;
      const minus = Float64Array.from(x); minus[cr] -= h;
      const gp = gradient(plus), gm = gradient(minus);
      for (let c = 0; c < n; c++) {
        const fd = (gp[c] - gm[c]) / (2 * h);
        errFull = Math.max(errFull, Math.abs(fd - full[c][a]));
        errGn = Math.max(errGn, Math.abs(fd - gn[c][a]));
      }
    });
    return { errFull, errGn };
  };
  it('errors shrink with |r|² (with S) and with |r| (without)', () => {
    const big = errors(2e-2);
    const small = errors(2e-3);
    expect(big.errGn / small.errGn).toBeGreaterThan(5);
    expect(big.errGn / small.errGn).toBeLessThan(20);
    expect(big.errFull / small.errFull).toBeGreaterThan(50);
    expect(small.errFull).toBeLessThan(small.errGn / 20);
  });
});

describe('random sheets', () => {
  const { pattern } = miuraSheet(2, 2, 40, 30, 70);
  const sys = buildClosureSystem(pattern);

  it('vertex offsets are uniform in the disc of diameter t (Kolmogorov–Smirnov on r² and on the direction)', () => {
    const t = 0.3;
    const model = sheetPerturbation(pattern, sys, { position: t });
    const p = new Float64Array(model.count);
    const radius: number[] = [];
    const direction: number[] = [];
    for (let k = 0; radius.length < 20000; k++) {
      model.draw(sheetRandom(5, k, model.draws), p);
      for (let i = 0; i < model.vertices!.length; i++) {
        radius.push(Math.hypot(p[2 * i], p[2 * i + 1]) / (t / 2));
        direction.push(Math.atan2(p[2 * i + 1], p[2 * i]));
      }
    }
    // uniform in a disc of radius R: P(r ≤ ρ) = (ρ/R)² (common practice); directions uniform
    expect(Math.max(...radius)).toBeLessThanOrEqual(1);
    expect(ksStatistic(radius, (x) => x * x)).toBeLessThan(ks001(radius.length));
    expect(ksStatistic(direction, (x) => (x + Math.PI) / (2 * Math.PI))).toBeLessThan(ks001(direction.length));
    // the variance each coordinate is credited with: R²/4 (common practice for a uniform disc)
    expect(model.variance[0]).toBeCloseTo((t / 2) ** 2 / 4, 15);
  });

  it('sector offsets are uniform within ±τ (Kolmogorov–Smirnov) and every sheet has its own numbers', () => {
    const tau = 0.2 * D;
    const model = sheetPerturbation(pattern, sys, { sector: tau });
    const p = new Float64Array(model.count);
    const values: number[] = [];
    const firsts = new Set<number>();
    for (let k = 0; k < 600; k++) {
      model.draw(sheetRandom(9, k, model.draws), p);
      values.push(...p);
      firsts.add(p[0]);
    }
    expect(firsts.size).toBe(600);
    expect(Math.max(...values.map(Math.abs))).toBeLessThanOrEqual(tau);
    expect(ksStatistic(values, (x) => (x + tau) / (2 * tau))).toBeLessThan(ks001(values.length));
  });

  it('the model\'s first-order effect of each parameter matches central differences of its exact geometry', () => {
    const model = sheetPerturbation(pattern, sys, { position: 0.2, sector: 0.1 * D });
    const theta = new Float64Array(sys.slotCount), defect = new Float64Array(sys.blockCount);
    const tp = new Float64Array(sys.slotCount), dp = new Float64Array(sys.blockCount);
    const p = new Float64Array(model.count);
    const h = 1e-6;
    let worst = 0;
    for (let i = 0; i < model.count; i++) {
      p.fill(0); p[i] = h; model.apply(p, tp, dp);
      p[i] = -h; model.apply(p, theta, defect);
      const fdTheta = tp.map((v, s) => (v - theta[s]) / (2 * h));
      const fdDefect = dp.map((v, b) => (v - defect[b]) / (2 * h));
      const e = model.effect(i);
      const an = new Float64Array(sys.slotCount), ad = new Float64Array(sys.blockCount);
      for (const [s, c] of e.slots) an[s] += c;
      for (const [b, c] of e.blocks) ad[b] += c;
      for (let s = 0; s < sys.slotCount; s++) worst = Math.max(worst, Math.abs(an[s] - fdTheta[s]));
      for (let b = 0; b < sys.blockCount; b++) worst = Math.max(worst, Math.abs(ad[b] - fdDefect[b]));
    }
    expect(worst).toBeLessThan(1e-7);
  });

  it('a zero tolerance gives zero spread exactly', () => {
    const { pattern: sheet, drive, sign } = miuraSheet(2, 2, 40, 30, 70);
    const at = [20, 50, 80].map((d) => sign * d * D);
    for (const tolerance of [{ position: 0 }, { sector: 0 }]) {
      const r = runSteps(toleranceSteps(sheet, { path: { drive, from: at[0], to: at[2], samples: at }, tolerance, samples: 12, seed: 3 }));
      expect(r.status).toBe('complete');
      const st = r.statistics!;
      expect(st.samples).toBe(12);
      for (const row of st.hinges) {
        for (const h of row) {
          for (const v of [h.deviation.mean, h.deviation.std, h.deviation.p05, h.deviation.p50, h.deviation.p95, h.deviation.max]) expect(v).toBe(0);
          expect(h.angle.p05).toBe(h.nominal);
          expect(h.angle.p95).toBe(h.nominal);
        }
      }
      st.misfit.forEach((m) => { expect(m.p50).toBe(m.max); expect(m.std).toBe(0); });
      expect(st.rigidFraction).toEqual([1, 1, 1]);
    }
  });
});
