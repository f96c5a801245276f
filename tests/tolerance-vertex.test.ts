// Monte Carlo tolerance analysis of a single degree-4 vertex, where every perturbed sheet still folds, against
// published closed forms: the fold-angle multipliers of a flat-foldable vertex (Evans et al. 2015) differentiated
// by the sector angles, and the spherical four-bar input–output equation (McCarthy & Soh) for a generic vertex.
import { describe, expect, it } from 'vitest';
import { singleVertex } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { runSteps } from '../solver/paths/sweep';
import { nominalSteps, toleranceSteps, type ToleranceOptions } from '../solver/outputs/tolerance/run';
import { SheetSolver, type SheetResult } from '../solver/outputs/tolerance/sheet';
import { sheetStatistics } from '../solver/outputs/tolerance/stats';
import { linearSteps } from '../solver/outputs/tolerance/linear';
import { nominalDirections, sheetRandom, type PerturbationModel } from '../solver/outputs/tolerance/perturbation';
import { fourBar } from './support/references';
import type { Assignment } from '../solver/types';

const D = Math.PI / 180;

function vertexSheet(sectors: number[], assignments?: Assignment[]) {
  const g = singleVertex({ sectorsDeg: sectors, assignments });
  const { pattern } = buildPattern(g.project!.source);
  return pattern!;
}

/**
 * Flat-foldable vertex, sectors α, β, 180°−α, 180°−β (c0 between the 180°−β and α sectors). In the mode where
 * c2 = −c0 and c1 = c3: |tan(ρ1/2)| = |sin((α+β)/2) / sin((α−β)/2)|·|tan(ρ0/2)| (T. Evans, R. Lang, S. Magleby,
 * L. Howell, "Rigidly foldable origami gadgets and tessellations", R. Soc. Open Sci. 2:150067, 2015; which pair
 * is which in our conventions as derived in tests/vertex-modes.test.ts). Here with β > α, ρ0 > 0 and c1 a mountain.
 */
function evansRho1(alpha: number, beta: number, rho0: number): number {
  const k = Math.sin((alpha + beta) / 2) / Math.sin((beta - alpha) / 2);
  return -2 * Math.atan(k * Math.tan(rho0 / 2));
}
/** ∂ρ1/∂α and ∂ρ1/∂β of the closed form: ∂k/∂α = ½ sin β / sin²e, ∂k/∂β = −½ sin α / sin²e, e = (β−α)/2. */
function evansGradient(alpha: number, beta: number, rho0: number): [number, number] {
  const e = (beta - alpha) / 2;
  const k = Math.sin((alpha + beta) / 2) / Math.sin(e);
  const T = Math.tan(rho0 / 2);
  const dRho = -2 * T / (1 + k * k * T * T);
  return [dRho * (0.5 * Math.sin(beta)) / Math.sin(e) ** 2, dRho * (-0.5 * Math.sin(alpha)) / Math.sin(e) ** 2];
}

/**
 * Manufacturing errors that keep the vertex flat-foldable: α → α + δα and β → β + δβ (so 180° − α and 180° − β
 * follow), δα and δβ independent and uniform in ±τ.
 */
function flatFoldableModel(theta0: Float64Array, slotOf: number[], tau: number): PerturbationModel {
  // slot of crease k: θ1 moves with δα, θ2 with δα + δβ, θ3 with δβ (c0 stays)
  const moves = [[0, 0], [1, 0], [1, 1], [0, 1]];
  return {
    count: 2,
    draws: 2,
    variance: Float64Array.from([tau * tau / 3, tau * tau / 3]),
    description: 'flat-foldable sector errors',
    draw(rand, out) { out[0] = tau * (2 * rand() - 1); out[1] = tau * (2 * rand() - 1); },
    apply(p, theta, defect) {
      theta.set(theta0);
      defect.fill(0);
      for (let k = 0; k < 4; k++) theta[slotOf[k]] += moves[k][0] * p[0] + moves[k][1] * p[1];
    },
    effect(i) {
      return { slots: [0, 1, 2, 3].filter((k) => moves[k][i]).map((k) => [slotOf[k], 1] as [number, number]), blocks: [] };
    },
  };
}

/** Percentile of a + b with a, b independent, uniform in ±wa and ±wb (a trapezoidal distribution), and its density. */
function trapezoid(wa: number, wb: number, p: number): { x: number; density: number } {
  const a = Math.max(wa, wb), b = Math.min(wa, wb);
  const lower = (q: number) => {
    if (q <= b / (2 * a)) { const x = -a - b + Math.sqrt(8 * a * b * q); return { x, density: (x + a + b) / (4 * a * b) }; }
    return { x: 2 * a * q - a, density: 1 / (2 * a) };
  };
  if (p <= 0.5) return lower(p);
  const m = lower(1 - p);
  return { x: -m.x, density: m.density };
}

describe('flat-foldable degree-4 vertex: Monte Carlo percentiles against the Evans et al. multipliers to first order', () => {
  const alpha = 60 * D, beta = 100 * D;
  const pattern = vertexSheet([60, 100, 120, 80], ['V', 'M', 'M', 'M']);
  const c = (l: string) => pattern.labelIndex.get(l)!;
  const at = [30, 90, 150].map((d) => d * D);
  const tau = 0.05 * D;
  const n = 4000;
  const options: ToleranceOptions = { path: { drive: c('c0'), from: at[0], to: at[2], samples: at }, tolerance: {}, samples: n, seed: 11 };
  const setup = runSteps(nominalSteps(pattern, options)).setup!;

  it('percentiles of ρ1 within the Monte Carlo error of the sample quantiles; c2 = −c0 and c1 = c3 on every sheet', () => {
    const probe = new SheetSolver(pattern, setup);
    const sys = probe.nominalSys;
    const slotOf = [0, 1, 2, 3].map((k) => Array.from(sys.slotCrease).indexOf(c(`c${k}`)));
    const solver = new SheetSolver(pattern, setup, flatFoldableModel(nominalDirections(pattern, sys), slotOf, tau));
    const sheets: SheetResult[] = [];
    for (let i = 0; i < n; i++) sheets.push(solver.sheet(i));
    const hinges = Array.from(solver.hinges);
    const h1 = hinges.indexOf(c('c1')), h2 = hinges.indexOf(c('c2')), h3 = hinges.indexOf(c('c3'));
    const st = sheetStatistics(solver.reference, sheets, hinges.length, sys.blockCount, at.length);
    for (let j = 0; j < at.length; j++) {
      expect(st.rigidFraction[j]).toBe(1);
      expect(st.lost[j]).toBe(0);
      for (const s of sheets) {
        expect(Math.abs(s.angles[j * hinges.length + h2] + at[j])).toBeLessThan(1e-9);
        expect(Math.abs(s.angles[j * hinges.length + h1] - s.angles[j * hinges.length + h3])).toBeLessThan(1e-9);
      }
      // the nominal state is the published one
      expect(Math.abs(st.hinges[j][h1].nominal - evansRho1(alpha, beta, at[j]))).toBeLessThan(1e-10);
      const [A, B] = evansGradient(alpha, beta, at[j]);
      // the gradient of the closed form, checked against its own central differences
      const h = 1e-6;
      expect(Math.abs((evansRho1(alpha + h, beta, at[j]) - evansRho1(alpha - h, beta, at[j])) / (2 * h) - A)).toBeLessThan(1e-7);
      const spread = st.hinges[j][h1].deviation;
      for (const [p, got] of [[0.05, spread.p05], [0.5, spread.p50], [0.95, spread.p95]] as const) {
        const ref = trapezoid(Math.abs(A) * tau, Math.abs(B) * tau, p);
        // standard error of a sample p-quantile: √(p(1−p)/n) / f(x_p) (asymptotic normality of sample quantiles,
        // common practice); the second-order term of the closed form is below 1e-3 of the spread at τ = 0.05°
        const se = Math.sqrt(p * (1 - p) / n) / ref.density;
        expect(Math.abs(got - ref.x), `p${p} at ${at[j] / D}°`).toBeLessThan(4 * se + 2e-3 * (Math.abs(A) + Math.abs(B)) * tau);
      }
      // the standard deviation: first order (A² + B²)·τ²/3; the standard error of a sample standard deviation is
      // about σ·√((κ − 1)/(4n)) with κ the kurtosis (common practice), below σ·√(1/(2n)) here (κ < 3)
      const sigma = Math.sqrt((A * A + B * B) * tau * tau / 3);
      expect(Math.abs(spread.std - sigma)).toBeLessThan(4 * sigma * Math.sqrt(1 / (2 * n)) + 2e-3 * sigma);
      expect(Math.abs(spread.mean)).toBeLessThan(4 * sigma / Math.sqrt(n) + 2e-3 * sigma);
    }
  });

  it('the first-order estimate from the sensitivities equals the derivative of the closed form', () => {
    const probe = new SheetSolver(pattern, setup);
    const sys = probe.nominalSys;
    const slotOf = [0, 1, 2, 3].map((k) => Array.from(sys.slotCrease).indexOf(c(`c${k}`)));
    const solver = new SheetSolver(pattern, setup, flatFoldableModel(nominalDirections(pattern, sys), slotOf, tau));
    const linear = runSteps(linearSteps(solver));
    const h1 = Array.from(solver.hinges).indexOf(c('c1'));
    at.forEach((a, j) => {
      const [A, B] = evansGradient(alpha, beta, a);
      const sigma = Math.sqrt((A * A + B * B) * tau * tau / 3);
      expect(Math.abs(linear.hingeStd[j]![h1] - sigma) / sigma).toBeLessThan(1e-6);
      // the sheet still closes, so the first-order misfit is zero
      expect(Math.max(...linear.vertexRms[j]!)).toBeLessThan(1e-12);
    });
  });
});

describe('generic degree-4 vertex with positional tolerance: every sheet against the spherical four-bar equation', () => {
  const sectors = [70, 95, 100, 95];
  const pattern = vertexSheet(sectors, ['V', 'M', 'V', 'V']);
  const c0 = pattern.labelIndex.get('c0')!, c3 = pattern.labelIndex.get('c3')!;
  const at = [40, 100].map((d) => d * D);
  const t = 0.4; // diameter of the positional zone, on a vertex of radius 50
  const options: ToleranceOptions = { path: { drive: c0, from: at[0], to: at[1], samples: at }, tolerance: { position: t }, samples: 300, seed: 5 };

  /** ρ3 from the four-bar equation A cos ρ3 + B sin ρ3 = C for sectors a (radians), the root nearest `near`. */
  const rho3 = (a: number[], rho0: number, near: number) => {
    const { A, B, C } = fourBar(a, rho0);
    const base = Math.atan2(B, A), w = Math.acos(Math.max(-1, Math.min(1, C / Math.hypot(A, B))));
    const roots = [base + w, base - w].map((r) => Math.atan2(Math.sin(r), Math.cos(r)));
    return roots.reduce((p, q) => (Math.abs(q - near) < Math.abs(p - near) ? q : p));
  };
  /** The sectors (c0→c1, …, c3→c0) of the vertex with its points moved by offsets (per vertex index). */
  const sectorsOf = (offsets: Map<number, [number, number]>) => {
    const at0 = (v: number) => [pattern.vertices[v][0] + (offsets.get(v)?.[0] ?? 0), pattern.vertices[v][1] + (offsets.get(v)?.[1] ?? 0)];
    const centre = at0(0);
    const dirs = [0, 1, 2, 3].map((k) => {
      const cr = pattern.creases[pattern.labelIndex.get(`c${k}`)!];
      const far = at0(cr.vertices[0] === 0 ? cr.vertices[1] : cr.vertices[0]);
      return Math.atan2(far[1] - centre[1], far[0] - centre[0]);
    });
    return dirs.map((d, k) => { let s = dirs[(k + 1) % 4] - d; while (s <= 0) s += 2 * Math.PI; return s; });
  };

  it('each sheet closes, and its c3 is the four-bar output for that sheet\'s own sectors', () => {
    const result = runSteps(toleranceSteps(pattern, options));
    expect(result.status).toBe('complete');
    const setup = runSteps(nominalSteps(pattern, options)).setup!;
    const solver = new SheetSolver(pattern, setup);
    const model = solver.model;
    const p = new Float64Array(model.count);
    const h3 = Array.from(solver.hinges).indexOf(c3);
    for (let i = 0; i < options.samples; i++) {
      const sheet = solver.sheet(i);
      model.draw(sheetRandom(options.seed, i, model.draws), p);
      const offsets = new Map(model.vertices!.map((v, k) => [v, [p[2 * k], p[2 * k + 1]] as [number, number]]));
      const a = sectorsOf(offsets);
      at.forEach((drive, j) => {
        expect(sheet.status[j]).toBe(0);
        const got = sheet.angles[j * solver.hinges.length + h3];
        expect(Math.abs(got - rho3(a, drive, got))).toBeLessThan(1e-9);
      });
    }
    expect(result.statistics!.rigidFraction).toEqual([1, 1]);
  });

  it('the first-order spread of c3 equals the four-bar equation differentiated by the vertex positions', () => {
    const result = runSteps(toleranceSteps(pattern, options));
    const h3 = result.hinges.indexOf(c3);
    const nominalSectors = sectors.map((s) => s * D);
    at.forEach((drive, j) => {
      const nominal = rho3(nominalSectors, drive, result.statistics!.hinges[j][h3].nominal);
      // the gradient of ρ3 over every coordinate of every vertex, by central differences of the closed form
      let variance = 0;
      const h = 1e-6;
      for (let v = 0; v < pattern.vertices.length; v++) {
        for (let k = 0; k < 2; k++) {
          const plus = new Map([[v, (k === 0 ? [h, 0] : [0, h]) as [number, number]]]);
          const minus = new Map([[v, (k === 0 ? [-h, 0] : [0, -h]) as [number, number]]]);
          const g = (rho3(sectorsOf(plus), drive, nominal) - rho3(sectorsOf(minus), drive, nominal)) / (2 * h);
          // uniform in a disc of radius t/2: each coordinate has variance (t/2)²/4 (common practice)
          variance += g * g * (t / 2) ** 2 / 4;
        }
      }
      const sigma = Math.sqrt(variance);
      expect(Math.abs(result.linear!.hingeStd[j]![h3] - sigma) / sigma).toBeLessThan(1e-6);
      // and the Monte Carlo standard deviation within its standard error (about σ/√(2n) for a near-normal sum)
      const mc = result.statistics!.hinges[j][h3].deviation.std;
      expect(Math.abs(mc - sigma)).toBeLessThan(4 * sigma / Math.sqrt(2 * options.samples) + 5e-3 * sigma);
    });
  });
});
