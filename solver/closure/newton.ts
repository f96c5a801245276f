// Newton (Gauss–Newton on the closure residual) with a Levenberg–Marquardt fallback, on the analytic sparse
// Jacobian. Our own LM rather than ml-levenberg-marquardt: that package fits curves with a dense
// finite-difference Jacobian, while closure needs the exact sparse Jacobian and a normal-matrix factor
// that is reused; see DEVELOPERS.md.

import type { Pattern } from '../types';
import { buildClosureSystem, closureScratch, evaluateClosure, type ClosureScratch, type ClosureSystem } from './blocks';
import { EnvelopeMatrix } from '../math/envelope';
import { wrapAngle } from '../math/rotation';

/** Converged means the largest vertex residual is at most this (radians). */
export const RESIDUAL_TOLERANCE = 1e-10;

export interface LinearConstraint {
  /** coefficient per unknown (length = unknown count) */
  coef: Float64Array;
  /** coef · x = target, x = unknown angles (radians) */
  target: number;
}

export interface LsqOptions {
  maxIterations?: number;
  /** largest change of one angle in one step, radians; keeps the iteration on the branch it starts on */
  maxStep?: number;
  /** stop once the largest residual is below this (default 1e-12: one more step after convergence) */
  polishTolerance?: number;
  constraints?: LinearConstraint[];
  /** wrap the free angles to (−180°, 180°] at the end (default true); homotopies keep them unwrapped */
  wrap?: boolean;
}

export type LsqStop = 'converged' | 'stalled' | 'max-iterations';

export interface LsqResult {
  angles: Float64Array;
  maxResidual: number;
  /** ½ Σ r² over closure rows and constraints */
  cost: number;
  iterations: number;
  stop: LsqStop;
  converged: boolean;
  /** largest constraint violation */
  constraintError: number;
}

/** The closure equations of a pattern with a chosen set of held creases (drives, flat, boundary). */
export class ClosureProblem {
  readonly sys: ClosureSystem;
  readonly unknownCreases: Int32Array;
  /** unknownOf[crease] = unknown index, or −1 when the crease is held */
  readonly unknownOf: Int32Array;
  readonly residual: Float64Array;
  readonly jacobian: Float64Array;
  private env: EnvelopeMatrix | null = null;
  private readonly scratch: ClosureScratch = closureScratch();

  constructor(
    readonly pattern: Pattern,
    held: (crease: number) => boolean,
    sys?: ClosureSystem,
  ) {
    this.sys = sys ?? buildClosureSystem(pattern);
    const n = pattern.creases.length;
    this.unknownOf = new Int32Array(n).fill(-1);
    const list: number[] = [];
    for (let c = 0; c < n; c++) {
      const a = pattern.creases[c].assignment;
      if (a === 'B' || a === 'F' || held(c)) continue;
      this.unknownOf[c] = list.length;
      list.push(c);
    }
    this.unknownCreases = Int32Array.from(list);
    this.residual = new Float64Array(3 * this.sys.blockCount);
    this.jacobian = new Float64Array(3 * this.sys.slotCount);
  }

  get unknownCount(): number {
    return this.unknownCreases.length;
  }

  /** The normal matrix's envelope, built on first use (its ordering depends only on the pattern). */
  normalMatrix(): EnvelopeMatrix {
    if (!this.env) {
      const adj: Set<number>[] = Array.from({ length: this.unknownCount }, () => new Set<number>());
      const { blockStart, slotCrease } = this.sys;
      for (let b = 0; b < this.sys.blockCount; b++) {
        for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
          const a = this.unknownOf[slotCrease[p]];
          if (a < 0) continue;
          for (let q = blockStart[b]; q < blockStart[b + 1]; q++) {
            const c = this.unknownOf[slotCrease[q]];
            if (c >= 0 && c !== a) adj[a].add(c);
          }
        }
      }
      this.env = new EnvelopeMatrix(adj.map((s) => [...s]));
    }
    return this.env;
  }

  /** Evaluate residual and Jacobian at `angles` (full crease vector). Returns the largest block residual. */
  evaluate(angles: Float64Array, withJacobian = true): number {
    return evaluateClosure(this.sys, angles, this.residual, withJacobian ? this.jacobian : null, this.scratch);
  }

  /** Assemble JᵀJ (+ λI) and Jᵀr from the last evaluate(). */
  assembleNormal(env: EnvelopeMatrix, gradient: Float64Array, lambda: number): void {
    const { blockStart, slotCrease, blockCount } = this.sys;
    const J = this.jacobian;
    const r = this.residual;
    env.clear();
    gradient.fill(0);
    for (let b = 0; b < blockCount; b++) {
      const r0 = r[3 * b], r1 = r[3 * b + 1], r2 = r[3 * b + 2];
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = this.unknownOf[slotCrease[p]];
        if (a < 0) continue;
        const px = J[3 * p], py = J[3 * p + 1], pz = J[3 * p + 2];
        gradient[a] += px * r0 + py * r1 + pz * r2;
        for (let q = blockStart[b]; q <= p; q++) {
          const c = this.unknownOf[slotCrease[q]];
          if (c < 0) continue;
          const v = px * J[3 * q] + py * J[3 * q + 1] + pz * J[3 * q + 2];
          env.add(a, c, v);
        }
      }
    }
    if (lambda > 0) env.addDiagonal(lambda);
  }

  /** J·v for a vector over unknowns, from the last evaluate(); out has 3·blockCount entries. */
  jacobianTimes(out: Float64Array, v: Float64Array): Float64Array {
    const { blockStart, slotCrease, blockCount } = this.sys;
    const J = this.jacobian;
    out.fill(0);
    for (let b = 0; b < blockCount; b++) {
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = this.unknownOf[slotCrease[p]];
        if (a < 0) continue;
        out[3 * b] += J[3 * p] * v[a];
        out[3 * b + 1] += J[3 * p + 1] * v[a];
        out[3 * b + 2] += J[3 * p + 2] * v[a];
      }
    }
    return out;
  }

  /** Jᵀ·r for a vector over the rows (3·blockCount), from the last evaluate(); out is over unknowns. */
  transposeTimes(out: Float64Array, r: Float64Array): Float64Array {
    const { blockStart, slotCrease, blockCount } = this.sys;
    const J = this.jacobian;
    out.fill(0);
    for (let b = 0; b < blockCount; b++) {
      const r0 = r[3 * b], r1 = r[3 * b + 1], r2 = r[3 * b + 2];
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = this.unknownOf[slotCrease[p]];
        if (a >= 0) out[a] += J[3 * p] * r0 + J[3 * p + 1] * r1 + J[3 * p + 2] * r2;
      }
    }
    return out;
  }

  /** Dense Jacobian (rows 3·blockCount, columns for the given creases) from the last evaluate(). */
  denseJacobian(columns: ArrayLike<number>): number[][] {
    const col = new Map<number, number>();
    for (let k = 0; k < columns.length; k++) col.set(columns[k], k);
    const rows: number[][] = Array.from({ length: 3 * this.sys.blockCount }, () => new Array(columns.length).fill(0));
    const { blockStart, slotCrease, blockCount } = this.sys;
    for (let b = 0; b < blockCount; b++) {
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const c = col.get(slotCrease[p]);
        if (c === undefined) continue;
        for (let k = 0; k < 3; k++) rows[3 * b + k][c] += this.jacobian[3 * p + k];
      }
    }
    return rows;
  }

  /**
   * Least-squares solve of the closure equations over the unknowns, starting at `start` (a full crease vector;
   * held creases keep their values). Newton steps first; when a step does not lower the cost, LM damping grows.
   */
  solve(start: Float64Array, opts: LsqOptions = {}): LsqResult {
    const maxIterations = opts.maxIterations ?? 60;
    const maxStep = opts.maxStep ?? 0.6;
    const polish = opts.polishTolerance ?? 1e-12;
    const constraints = opts.constraints ?? [];
    const n = this.unknownCount;
    const x = Float64Array.from(start);
    const trial = new Float64Array(x.length);
    const grad = new Float64Array(n);
    const delta = new Float64Array(n);
    const env = n > 0 ? this.normalMatrix() : null;

    const constraintValues = (angles: Float64Array): Float64Array => {
      const out = new Float64Array(constraints.length);
      constraints.forEach((c, i) => {
        let s = -c.target;
        for (let a = 0; a < n; a++) s += c.coef[a] * angles[this.unknownCreases[a]];
        out[i] = s;
      });
      return out;
    };
    const costOf = (worst: number, cv: Float64Array): [number, number] => {
      let s = 0;
      for (let i = 0; i < this.residual.length; i++) s += this.residual[i] * this.residual[i];
      let ce = 0;
      for (const v of cv) { s += v * v; ce = Math.max(ce, Math.abs(v)); }
      return [0.5 * s, Math.max(worst, ce)];
    };

    let worst = this.evaluate(x, true);
    let cv = constraintValues(x);
    let [cost, measure] = costOf(worst, cv);
    let lambda = 0;
    let iterations = 0;
    let stop: LsqStop = 'max-iterations';

    for (; iterations < maxIterations; iterations++) {
      if (measure <= polish || n === 0) { stop = 'converged'; break; }
      let accepted = false;
      for (let attempt = 0; attempt < 12 && !accepted; attempt++) {
        this.assembleNormal(env!, grad, 0);
        let maxDiag = 0;
        for (let a = 0; a < n; a++) maxDiag = Math.max(maxDiag, env!.diagonal(a));
        const damping = Math.max(lambda, 1e-13) * (maxDiag || 1);
        env!.addDiagonal(damping);
        env!.factor(1e-14);
        this.stepWithConstraints(env!, grad, cv, constraints, delta);
        let big = 0;
        for (let a = 0; a < n; a++) big = Math.max(big, Math.abs(delta[a]));
        const scale = big > maxStep ? maxStep / big : 1;
        trial.set(x);
        for (let a = 0; a < n; a++) trial[this.unknownCreases[a]] += scale * delta[a];
        const tWorst = this.evaluate(trial, false);
        const tcv = constraintValues(trial);
        const [tCost, tMeasure] = costOf(tWorst, tcv);
        if (tCost < cost || tMeasure < measure * 0.5) {
          x.set(trial);
          cost = tCost;
          measure = tMeasure;
          cv = tcv;
          lambda = lambda > 1e-9 ? lambda / 10 : 0;
          accepted = true;
          worst = this.evaluate(x, true);
        } else {
          // restore the Jacobian at x and damp harder
          this.evaluate(x, true);
          lambda = lambda === 0 ? 1e-6 : lambda * 10;
        }
      }
      if (!accepted) { stop = 'stalled'; break; }
    }
    if (measure <= polish) stop = 'converged';
    if (opts.wrap ?? true) {
      for (let a = 0; a < n; a++) {
        const c = this.unknownCreases[a];
        x[c] = wrapAngle(x[c]);
      }
    }
    const maxResidual = this.evaluate(x, true);
    cv = constraintValues(x);
    let constraintError = 0;
    for (const v of cv) constraintError = Math.max(constraintError, Math.abs(v));
    [cost] = costOf(maxResidual, cv);
    return {
      angles: x,
      maxResidual,
      cost,
      iterations,
      stop,
      converged: maxResidual <= RESIDUAL_TOLERANCE && constraintError <= RESIDUAL_TOLERANCE,
      constraintError,
    };
  }

  /**
   * δ = −(A + Σ c cᵀ)⁻¹ (g + Σ c·e) for the factored A = JᵀJ + λI and constraint rows c with errors e,
   * by the Woodbury identity so the dense constraint rows never enter the envelope.
   */
  private stepWithConstraints(
    env: EnvelopeMatrix,
    grad: Float64Array,
    cv: Float64Array,
    constraints: LinearConstraint[],
    delta: Float64Array,
  ): void {
    const n = this.unknownCount;
    const rhs = Float64Array.from(grad);
    constraints.forEach((c, i) => { for (let a = 0; a < n; a++) rhs[a] += c.coef[a] * cv[i]; });
    env.solve(delta, rhs);
    const m = constraints.length;
    if (m > 0) {
      const Z = constraints.map((c) => env.solve(new Float64Array(n), c.coef)); // A⁻¹ c_i
      // S = I + Cᵀ A⁻¹ C
      const S = Array.from({ length: m }, (_, i) =>
        Array.from({ length: m }, (_, j) => (i === j ? 1 : 0) + dot(constraints[i].coef, Z[j])),
      );
      const t = constraints.map((c) => dot(c.coef, delta));
      const u = solveSmall(S, t);
      for (let j = 0; j < m; j++) for (let a = 0; a < n; a++) delta[a] -= Z[j][a] * u[j];
    }
    for (let a = 0; a < n; a++) delta[a] = -delta[a];
  }
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** Gaussian elimination with partial pivoting for a small dense system. */
export function solveSmall(A: number[][], b: number[]): number[] {
  const n = b.length;
  const M = A.map((row, i) => [...row, b[i]]);
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(M[i][k]) > Math.abs(M[p][k])) p = i;
    [M[k], M[p]] = [M[p], M[k]];
    const d = M[k][k] || 1e-300;
    for (let i = k + 1; i < n; i++) {
      const f = M[i][k] / d;
      for (let j = k; j <= n; j++) M[i][j] -= f * M[k][j];
    }
  }
  const x = new Array(n).fill(0);
  for (let i = n - 1; i >= 0; i--) {
    let s = M[i][n];
    for (let j = i + 1; j < n; j++) s -= M[i][j] * x[j];
    x[i] = s / (M[i][i] || 1e-300);
  }
  return x;
}
