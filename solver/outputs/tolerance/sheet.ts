// One manufactured sheet followed along the nominal path. At every drive value the sheet starts from the
// nominal state there plus its deviation at the previous drive values (extrapolated linearly in the drive):
// continuation from the nominal state, so it stays on the nominal path's branch. It then solves its closure
// equations in the least-squares sense: exactly where the perturbed sheet still closes, else the
// least-squares compromise (the state of least Σ|r|² over every vertex's closure residual r).
//
// The iteration is Newton's method on ½Σ|r|² with the Hessian JᵀJ + S, where S = Σ r·∇²r is taken from the
// second-order term of the product of rotations: perturbing creases k < l (in the order met around a vertex)
// by ε_k, ε_l turns the product by ε_k·w_k + ε_l·w_l + ½ε_kε_l·w_k×w_l (Baker–Campbell–Hausdorff, common
// practice), so S_kl = ½ r·(w_k × w_l), up to terms in |r|². Gauss–Newton alone (S left out) converges only
// linearly here, at a rate near the perturbation's relative size over the sheet's softest mode; with S it
// converges quadratically. The gradient Jᵀr is exact, so the fixed point is the sheet's own stationary point
// whatever the Hessian's small error. Between refactorizations the last factor is reused while it contracts
// well. Where Newton does not settle, the sheet falls back on ClosureProblem.solve (Gauss–Newton /
// Levenberg–Marquardt) and polishes its result by Newton.

import type { Drive, Pattern } from '../../types';
import { buildClosureSystem, geometryCopy, type ClosureSystem } from '../../closure/blocks';
import { ClosureProblem, RESIDUAL_TOLERANCE } from '../../closure/newton';
import { EnvelopeMatrix } from '../../math/envelope';
import { sheetPerturbation, sheetRandom, setGeometry, nominalDirections, type PerturbationModel, type ToleranceSpec } from './perturbation';

/** What following sheets needs, as plain data (it crosses to worker threads by structured clone). */
export interface ToleranceSetup {
  /** crease index of the drive */
  drive: number;
  holds: Drive[];
  /** drive values the nominal path reached (radians), in path order */
  at: number[];
  /** the nominal path's state at each (full crease vector, radians) */
  nominal: Float64Array[];
  tolerance: ToleranceSpec;
  seed: number;
}

/** Per drive value: the sheet closes (folds rigidly), takes a least-squares compromise, or was lost. */
export const SHEET_CLOSES = 0;
export const SHEET_COMPROMISE = 1;
export const SHEET_LOST = 2;

export interface SheetResult {
  index: number;
  /** hinge angles, drive-major: angles[j·hinges + h], radians (NaN where lost) */
  angles: Float64Array;
  /** largest vertex closure residual at each drive value, radians */
  misfit: Float64Array;
  /** the equivalent gap at panel edges at each drive value, file units (see vertexReach) */
  gap: Float64Array;
  /** SHEET_CLOSES, SHEET_COMPROMISE or SHEET_LOST per drive value */
  status: Uint8Array;
  /**
   * each vertex's share of Σ|r|² (drive-major: shares[j·blocks + b]), rounded to a multiple of 2⁻³² so that
   * sums over sheets are exact in double precision and do not depend on the order sheets arrive in
   */
  shares: Float64Array;
  /** Newton steps taken, and factorizations */
  iterations: number;
  factorizations: number;
  /** drive values where Newton did not settle and the general solve was used */
  fallbacks: number;
}

/** A state this far from nominal on some hinge (radians, ~29°) has left the nominal path's branch. */
export const BRANCH_GUARD = 0.5;
/** Largest change of one angle in one Newton step (radians) before the step counts as diverging. */
const STEP_LIMIT = 0.2;
/**
 * Newton stops when its next step would move no angle by more than this fraction of the sheet's largest
 * deviation from nominal (or by more than ABSOLUTE_STEP): the state is then that close to the stationary point.
 */
export const RELATIVE_STEP = 1e-9;
const ABSOLUTE_STEP = 1e-14;
/** Below this largest residual (radians) a sheet is taken to be closing, and polished to CLOSES_AS_IS. */
const NEARLY_CLOSED = 1e-8;
/** Steps this small that no longer shrink are rounding noise (radians). */
const ROUNDING_STEP = 1e-12;
/** A state whose largest residual is at most this closes as it is (radians; the sweep polishes to the same). */
const CLOSES_AS_IS = 1e-13;
const MAX_NEWTON = 30;
/** The next step is taken as at most this many times the last step's contraction (see newton). */
const NEXT_STEP_MARGIN = 100;
/** A step with the last factor is taken while it shrinks the step at least this much; else the matrix is refactored. */
const STALE_CONTRACTION = 0.02;
/** Pivots below this fraction of their diagonal are zero (the matrix is singular in that direction). */
const PIVOT_TOLERANCE = 1e-12;
const SHARE_QUANTUM = 2 ** 32;
/** Deviations extrapolated from this many previous drive values (a quadratic in the drive). */
const EXTRAPOLATION_POINTS = 3;

/** Weights of the Lagrange polynomial through the nodes, evaluated at t (empty nodes: none). */
export function lagrangeWeights(nodes: number[], t: number, out: number[]): number[] {
  out.length = nodes.length;
  for (let k = 0; k < nodes.length; k++) {
    let w = 1;
    for (let m = 0; m < nodes.length; m++) if (m !== k) w *= (t - nodes[m]) / (nodes[k] - nodes[m]);
    out[k] = w;
  }
  return out;
}

/**
 * The equivalent gap of each vertex: a closure residual of r radians turns a panel at the vertex by r, which
 * opens a gap of up to r·ρ at an edge a distance ρ away; ρ is the farthest corner of a panel around the vertex.
 */
export function vertexReach(pattern: Pattern, sys: ClosureSystem): Float64Array {
  const reach = new Float64Array(sys.blockCount);
  const panelsOf = new Map<number, number[]>();
  pattern.panels.forEach((p) => p.vertices.forEach((v) => {
    const list = panelsOf.get(v) ?? [];
    list.push(p.index);
    panelsOf.set(v, list);
  }));
  for (let b = 0; b < sys.blockCount; b++) {
    const v = sys.blockVertex[b];
    const [x, y] = pattern.vertices[v];
    let far = 0;
    for (const p of panelsOf.get(v) ?? []) {
      for (const w of pattern.panels[p].vertices) far = Math.max(far, Math.hypot(pattern.vertices[w][0] - x, pattern.vertices[w][1] - y));
    }
    // a pattern without derived panels (hand-built tests): the longest crease at the vertex
    if (far === 0) for (let s = sys.blockStart[b]; s < sys.blockStart[b + 1]; s++) far = Math.max(far, pattern.creases[sys.slotCrease[s]].length);
    reach[b] = far;
  }
  return reach;
}

/** Follows manufactured sheets along the nominal path. One per thread; sheets are independent of each other. */
export class SheetSolver {
  readonly model: PerturbationModel;
  /** the free creases (every crease but the drive, the held ones, boundary edges and flat creases) */
  readonly hinges: Int32Array;
  readonly reach: Float64Array;
  readonly nominalSys: ClosureSystem;
  private readonly sys: ReturnType<typeof geometryCopy>;
  private readonly problem: ClosureProblem;
  private readonly nominalProblem: ClosureProblem;
  private readonly env: EnvelopeMatrix;
  private readonly theta: Float64Array;
  private readonly defect: Float64Array;
  private readonly params: Float64Array;
  private readonly grad: Float64Array;
  private readonly delta: Float64Array;
  private readonly squares: Float64Array;
  private referenceResult?: SheetResult;

  constructor(readonly pattern: Pattern, readonly setup: ToleranceSetup, model?: PerturbationModel) {
    this.nominalSys = buildClosureSystem(pattern);
    const held = new Set([setup.drive, ...setup.holds.map((h) => h.crease)]);
    this.nominalProblem = new ClosureProblem(pattern, (c) => held.has(c), this.nominalSys);
    this.sys = geometryCopy(this.nominalSys);
    this.problem = new ClosureProblem(pattern, (c) => held.has(c), this.sys);
    this.hinges = this.problem.unknownCreases;
    this.model = model ?? sheetPerturbation(pattern, this.nominalSys, setup.tolerance);
    this.reach = vertexReach(pattern, this.nominalSys);
    this.theta = nominalDirections(pattern, this.nominalSys);
    this.defect = new Float64Array(this.nominalSys.blockCount);
    this.params = new Float64Array(this.model.count);
    const n = this.problem.unknownCount;
    this.grad = new Float64Array(n);
    this.delta = new Float64Array(n);
    this.squares = new Float64Array(this.nominalSys.blockCount);
    this.env = new EnvelopeMatrix(normalAdjacency(this.problem));
  }

  /** The unperturbed sheet through the same routine: the reference every deviation is measured from. */
  get reference(): SheetResult {
    if (!this.referenceResult) {
      this.params.fill(0);
      this.referenceResult = this.follow(this.params, -1);
    }
    return this.referenceResult;
  }

  /** Sheet `index` of the run: its parameters come from its own stretch of the seeded stream. */
  sheet(index: number): SheetResult {
    const rand = sheetRandom(this.setup.seed, index, this.model.draws);
    this.model.draw(rand, this.params);
    return this.follow(this.params, index);
  }

  /** Follow the sheet with parameters p along the path. */
  follow(p: Float64Array, index: number): SheetResult {
    const { at, nominal } = this.setup;
    const H = this.hinges.length;
    const B = this.nominalSys.blockCount;
    const out: SheetResult = {
      index,
      angles: new Float64Array(at.length * H),
      misfit: new Float64Array(at.length),
      gap: new Float64Array(at.length),
      status: new Uint8Array(at.length),
      shares: new Float64Array(at.length * B),
      iterations: 0,
      factorizations: 0,
      fallbacks: 0,
    };
    this.model.apply(p, this.theta, this.defect);
    setGeometry(this.sys, this.theta, this.defect);
    const x = new Float64Array(this.pattern.creases.length);
    // the sheet's deviations from nominal at the last drive values solved (most recent first), and where
    const history: { at: number; dev: Float64Array }[] = [];
    const weights: number[] = [];
    for (let j = 0; j < at.length; j++) {
      x.set(nominal[j]);
      // start: the nominal state plus the deviation extrapolated from the last (up to three) drive values
      lagrangeWeights(history.map((h) => h.at), at[j], weights);
      history.forEach((h, k) => {
        const w = weights[k];
        for (let i = 0; i < H; i++) x[this.hinges[i]] += w * h.dev[i];
      });
      if (!this.solveAt(j, x, out)) {
        out.status[j] = SHEET_LOST;
        out.misfit[j] = NaN;
        out.gap[j] = NaN;
        for (let h = 0; h < H; h++) out.angles[j * H + h] = NaN;
        history.length = 0;
        continue;
      }
      const dev = new Float64Array(H);
      for (let h = 0; h < H; h++) {
        out.angles[j * H + h] = x[this.hinges[h]];
        dev[h] = x[this.hinges[h]] - nominal[j][this.hinges[h]];
      }
      history.unshift({ at: at[j], dev });
      if (history.length > EXTRAPOLATION_POINTS) history.pop();
      this.record(j, out);
    }
    return out;
  }

  /** Solve the sheet at drive value j from x (in place). False when it does not settle or leaves the branch. */
  private solveAt(j: number, x: Float64Array, out: SheetResult): boolean {
    const worst = this.problem.evaluate(x, true);
    if (worst <= CLOSES_AS_IS) return true;
    const start = Float64Array.from(x);
    if (this.newton(j, x, out, worst) && this.onBranch(j, x)) return true;
    // the general solve from the same start, then Newton from its result
    out.fallbacks++;
    const lsq = this.problem.solve(start, { maxStep: 0.05, maxIterations: 100, polishTolerance: CLOSES_AS_IS, wrap: false });
    out.iterations += lsq.iterations;
    x.set(lsq.angles);
    const after = this.problem.evaluate(x, true);
    if (after <= CLOSES_AS_IS) return this.onBranch(j, x);
    return this.newton(j, x, out, after) && this.onBranch(j, x);
  }

  private onBranch(j: number, x: Float64Array): boolean {
    const nominal = this.setup.nominal[j];
    for (const c of this.hinges) if (!(Math.abs(x[c] - nominal[c]) <= BRANCH_GUARD)) return false;
    return true;
  }

  /**
   * Newton on ½Σ|r|² from x (in place; the problem holds r and J at x, whose largest residual is `worst`).
   * Settled when the next step is below the tolerance: x is then reported as it is, with the residuals of its
   * last evaluation. A sheet that is about to close is polished until it does (a relative tolerance there
   * could leave a closing sheet's residual above the closure test on a large deviation).
   */
  private newton(j: number, x: Float64Array, out: SheetResult, worst: number): boolean {
    const { problem, grad, delta, env } = this;
    const uc = problem.unknownCreases;
    const nominal = this.setup.nominal[j];
    let fresh = false;
    let factored = false;
    let previous = Infinity;
    // the tolerance scales with the sheet's deviation from nominal (taken at the start: it hardly changes)
    let deviation = 0;
    for (let a = 0; a < uc.length; a++) deviation = Math.max(deviation, Math.abs(x[uc[a]] - nominal[uc[a]]));
    const relative = Math.max(ABSOLUTE_STEP, RELATIVE_STEP * deviation);
    for (let it = 0; it < MAX_NEWTON; it++) {
      const tolerance = worst <= NEARLY_CLOSED ? ABSOLUTE_STEP : relative;
      this.gradient(grad);
      if (!factored) { this.factorHessian(); out.factorizations++; factored = fresh = true; }
      env.solve(delta, grad);
      let step = 0;
      for (let a = 0; a < delta.length; a++) step = Math.max(step, Math.abs(delta[a]));
      if (!fresh && !(step <= STALE_CONTRACTION * previous)) {
        // the last factor no longer contracts well: refactor here
        this.factorHessian();
        out.factorizations++;
        fresh = true;
        env.solve(delta, grad);
        step = 0;
        for (let a = 0; a < delta.length; a++) step = Math.max(step, Math.abs(delta[a]));
      }
      if (step <= tolerance) return true;
      // at rounding level the steps stop shrinking: that is as close as the iteration gets
      if (step <= ROUNDING_STEP && step > 0.5 * previous) return true;
      if (!(step < STEP_LIMIT)) return false;
      for (let a = 0; a < delta.length; a++) x[uc[a]] -= delta[a];
      out.iterations++;
      // the next step, from the contraction seen (with a wide margin): when it is below the tolerance, this
      // state is the answer and only its residuals are needed
      const next = Number.isFinite(previous) ? step * Math.min(1, NEXT_STEP_MARGIN * (step / previous)) : step;
      previous = step;
      fresh = false;
      if (next <= tolerance && worst > NEARLY_CLOSED) { problem.evaluate(x, false); return true; }
      worst = problem.evaluate(x, true);
      if (worst <= CLOSES_AS_IS) return true;
    }
    return false;
  }

  /** Jᵀr over the unknowns, from the last evaluate(). */
  private gradient(out: Float64Array): void {
    const { sys, unknownOf, jacobian: J, residual: r } = this.problem;
    out.fill(0);
    for (let b = 0; b < sys.blockCount; b++) {
      const r0 = r[3 * b], r1 = r[3 * b + 1], r2 = r[3 * b + 2];
      for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
        const a = unknownOf[sys.slotCrease[p]];
        if (a >= 0) out[a] += J[3 * p] * r0 + J[3 * p + 1] * r1 + J[3 * p + 2] * r2;
      }
    }
  }

  /** Factor JᵀJ + S at the last evaluate() (see secondOrderTerm). */
  private factorHessian(): void {
    const { env, problem } = this;
    problem.assembleNormal(env, this.grad, 0); // also writes Jᵀr into grad: the same gradient
    secondOrderTerm(problem, (a, c, v) => env.add(a, c, v));
    env.factor(PIVOT_TOLERANCE);
  }

  /** Misfit, gap, status and vertex shares of the state whose residuals the problem holds, at drive value j. */
  private record(j: number, out: SheetResult): void {
    const r = this.problem.residual;
    const B = this.nominalSys.blockCount;
    let total = 0;
    let gap = 0;
    let worst = 0;
    for (let b = 0; b < B; b++) {
      const sq = r[3 * b] * r[3 * b] + r[3 * b + 1] * r[3 * b + 1] + r[3 * b + 2] * r[3 * b + 2];
      this.squares[b] = sq;
      total += sq;
      const norm = Math.sqrt(sq);
      worst = Math.max(worst, norm);
      gap = Math.max(gap, norm * this.reach[b]);
    }
    out.misfit[j] = worst;
    out.gap[j] = gap;
    out.status[j] = worst <= RESIDUAL_TOLERANCE ? SHEET_CLOSES : SHEET_COMPROMISE;
    if (out.status[j] === SHEET_COMPROMISE && total > 0) {
      for (let b = 0; b < B; b++) out.shares[j * B + b] = Math.round((this.squares[b] / total) * SHARE_QUANTUM) / SHARE_QUANTUM;
    }
  }

  /**
   * The drawn sheet's normal matrix J_fᵀJ_f at a nominal state, factored (for the first-order estimates), and
   * whether it is singular there (the free creases' Jacobian loses rank, e.g. at the flat state).
   */
  nominalFactor(state: Float64Array): { env: EnvelopeMatrix; singular: boolean; problem: ClosureProblem } {
    this.nominalProblem.evaluate(state, true);
    this.nominalProblem.assembleNormal(this.env, this.grad, 0);
    const zero = this.env.factor(PIVOT_TOLERANCE);
    return { env: this.env, singular: zero > 0 || this.hinges.length === 0, problem: this.nominalProblem };
  }
}

/**
 * The second-order part S = Σ r·∇²r of the Hessian of ½Σ|r|² at the problem's last evaluate(), up to terms in
 * |r|²: S_kl = ½ r·(w_k × w_l) for creases k met before l around a vertex (w from the Jacobian; the diagonal is
 * of order |r|²). `add(a, c, v)` receives each pair of unknowns once (a met before c).
 */
export function secondOrderTerm(problem: ClosureProblem, add: (a: number, c: number, v: number) => void): void {
  const { sys, unknownOf, jacobian: J, residual: r } = problem;
  for (let b = 0; b < sys.blockCount; b++) {
    const r0 = r[3 * b], r1 = r[3 * b + 1], r2 = r[3 * b + 2];
    const s0 = sys.blockStart[b], s1 = sys.blockStart[b + 1];
    for (let p = s0; p < s1; p++) {
      const a = unknownOf[sys.slotCrease[p]];
      if (a < 0) continue;
      const px = J[3 * p], py = J[3 * p + 1], pz = J[3 * p + 2];
      for (let q = p + 1; q < s1; q++) {
        const c = unknownOf[sys.slotCrease[q]];
        if (c < 0) continue;
        const qx = J[3 * q], qy = J[3 * q + 1], qz = J[3 * q + 2];
        add(a, c, 0.5 * (r0 * (py * qz - pz * qy) + r1 * (pz * qx - px * qz) + r2 * (px * qy - py * qx)));
      }
    }
  }
}

/** Adjacency of the unknowns in JᵀJ (two unknowns are neighbours when they meet at a vertex). */
function normalAdjacency(problem: ClosureProblem): number[][] {
  const adj: Set<number>[] = Array.from({ length: problem.unknownCount }, () => new Set<number>());
  const { sys, unknownOf } = problem;
  for (let b = 0; b < sys.blockCount; b++) {
    for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
      const a = unknownOf[sys.slotCrease[p]];
      if (a < 0) continue;
      for (let q = sys.blockStart[b]; q < sys.blockStart[b + 1]; q++) {
        const c = unknownOf[sys.slotCrease[q]];
        if (c >= 0 && c !== a) adj[a].add(c);
      }
    }
  }
  return adj.map((s) => [...s]);
}
