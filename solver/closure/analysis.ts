// Local analysis of a closed state: rank of the closure Jacobian, local DOF, condition number, null space,
// and the sensitivity of every free crease to every drive (the implicit-function derivative −J_f⁺·J_d).

import type { ClosureProblem } from './newton';
import { EnvelopeMatrix } from '../math/envelope';
import { applyQt, nullBasisFromQR, pivotedQR, singularValueBounds, solveR11 } from '../math/qr';

/** Columns up to this count use a dense pivoted QR; larger problems use the sparse normal-matrix factor. */
export const DENSE_LIMIT = 700;
/** Singular values at or below this (the Jacobian's columns are unit folded directions) count as zero. */
export const RANK_TOLERANCE = 1e-8;
/**
 * A pivot of the normal matrix JᵀJ below this fraction of its diagonal counts as zero. Forming JᵀJ squares the
 * singular values and leaves rounding of ~1e-16·|J|² in every pivot, so the square of RANK_TOLERANCE would sit
 * at the rounding floor and miss rank drops; 1e-12 (σ ≈ 1e-6 of the column scale) is above it, and such a state
 * is near-singular anyway (see NEAR_SINGULAR_CONDITION).
 */
export const NORMAL_PIVOT_TOLERANCE = 1e-12;
/** Condition numbers above this get a near-singular warning. */
export const NEAR_SINGULAR_CONDITION = 1e6;

export interface LocalAnalysis {
  columns: number;
  rank: number;
  /** columns − rank */
  localDof: number;
  /** σ_max / σ_min over the non-zero singular values (∞ when rank is 0); estimated for large problems */
  condition: number;
  /** smallest non-zero singular value */
  sigmaMin: number;
  /** basis of the null space (each vector over the columns), dense path only */
  nullBasis?: number[][];
  /** sensitivity[k][d] = ∂(column k)/∂(drive d), only when drive columns were given */
  sensitivity?: number[][];
  /** for large problems: columns whose factor pivot vanished (candidates to drive) */
  dependentColumns?: number[];
  exact: boolean;
}

/**
 * Analyse the Jacobian of `problem` at its last evaluate() with respect to `columns` (creases), and optionally
 * the sensitivity of those columns to `drives` (creases).
 */
export function analyzeState(
  problem: ClosureProblem,
  columns: ArrayLike<number>,
  drives: ArrayLike<number> = [],
): LocalAnalysis {
  if (columns.length <= DENSE_LIMIT) return denseAnalysis(problem, columns, drives);
  return sparseAnalysis(problem, columns, drives);
}

function denseAnalysis(problem: ClosureProblem, columns: ArrayLike<number>, drives: ArrayLike<number>): LocalAnalysis {
  const nc = columns.length;
  const m = 3 * problem.sys.blockCount;
  if (nc === 0 || m === 0) {
    return {
      columns: nc, rank: 0, localDof: nc, condition: nc === 0 ? 1 : Infinity, sigmaMin: 0,
      nullBasis: identity(nc), sensitivity: Array.from({ length: nc }, () => Array.from(drives, () => 0)), exact: true,
    };
  }
  const J = columnMajor(problem, columns, m);
  const f = pivotedQR(J, m, nc, RANK_TOLERANCE);
  const rank = f.rank;
  const { max, min } = singularValueBounds(f);
  const condition = rank === 0 ? Infinity : max / min;
  const nullBasis = nullBasisFromQR(f);
  let sensitivity: number[][] | undefined;
  if (drives.length) {
    // basic least-squares solution of J_f x = −J_d (exact implicit-function derivative when rank is full)
    const Jd = columnMajor(problem, drives, m);
    sensitivity = Array.from({ length: nc }, () => new Array(drives.length).fill(0));
    const y = new Float64Array(rank);
    for (let d = 0; d < drives.length; d++) {
      const b = Jd.slice(d * m, (d + 1) * m);
      applyQt(f, b);
      solveR11(f, b, y);
      for (let i = 0; i < rank; i++) sensitivity[f.perm[i]][d] = -y[i];
    }
  }
  return { columns: nc, rank, localDof: nc - rank, condition, sigmaMin: min, nullBasis, sensitivity, exact: true };
}

/** The Jacobian's columns for the given creases, column-major (m rows), from the last evaluate(). */
function columnMajor(problem: ClosureProblem, columns: ArrayLike<number>, m: number): Float64Array {
  const col = new Map<number, number>();
  for (let k = 0; k < columns.length; k++) col.set(columns[k], k);
  const out = new Float64Array(m * columns.length);
  const { blockStart, slotCrease, blockCount } = problem.sys;
  for (let b = 0; b < blockCount; b++) {
    for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
      const c = col.get(slotCrease[p]);
      if (c === undefined) continue;
      for (let k = 0; k < 3; k++) out[c * m + 3 * b + k] += problem.jacobian[3 * p + k];
    }
  }
  return out;
}

function identity(n: number): number[][] {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
}

function sparseAnalysis(problem: ClosureProblem, columns: ArrayLike<number>, drives: ArrayLike<number>): LocalAnalysis {
  const nc = columns.length;
  const colOf = new Map<number, number>();
  for (let k = 0; k < nc; k++) colOf.set(columns[k], k);
  const { blockStart, slotCrease, blockCount } = problem.sys;
  const J = problem.jacobian;
  const adj: Set<number>[] = Array.from({ length: nc }, () => new Set<number>());
  for (let b = 0; b < blockCount; b++) {
    for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
      const a = colOf.get(slotCrease[p]);
      if (a === undefined) continue;
      for (let q = blockStart[b]; q < blockStart[b + 1]; q++) {
        const c = colOf.get(slotCrease[q]);
        if (c !== undefined && c !== a) adj[a].add(c);
      }
    }
  }
  const env = new EnvelopeMatrix(adj.map((s) => [...s]));
  const assemble = () => {
    env.clear();
    for (let b = 0; b < blockCount; b++) {
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = colOf.get(slotCrease[p]);
        if (a === undefined) continue;
        for (let q = blockStart[b]; q <= p; q++) {
          const c = colOf.get(slotCrease[q]);
          if (c === undefined) continue;
          env.add(a, c, J[3 * p] * J[3 * q] + J[3 * p + 1] * J[3 * q + 1] + J[3 * p + 2] * J[3 * q + 2]);
        }
      }
    }
  };
  const applyNormal = (out: Float64Array, v: Float64Array) => {
    const t = new Float64Array(3 * blockCount);
    for (let b = 0; b < blockCount; b++)
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = colOf.get(slotCrease[p]);
        if (a === undefined) continue;
        for (let k = 0; k < 3; k++) t[3 * b + k] += J[3 * p + k] * v[a];
      }
    out.fill(0);
    for (let b = 0; b < blockCount; b++)
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = colOf.get(slotCrease[p]);
        if (a === undefined) continue;
        for (let k = 0; k < 3; k++) out[a] += J[3 * p + k] * t[3 * b + k];
      }
    return out;
  };
  assemble();
  // σ² tolerance relative to the normal matrix; zero pivots mark dependent columns
  env.factor(NORMAL_PIVOT_TOLERANCE);
  const zero = env.zeroPivots.map((k) => env.perm[k]);
  const rank = nc - zero.length;
  // λ_max by power iteration on JᵀJ; λ_min by inverse iteration with the factor (held columns excluded)
  const held = new Set(zero);
  let v: Float64Array = new Float64Array(nc).map((_, i) => (held.has(i) ? 0 : 1 + ((i * 7919) % 13) / 13));
  const w = new Float64Array(nc);
  let lmax = 0;
  for (let it = 0; it < 60; it++) {
    normalize(v);
    applyNormal(w, v);
    for (const h of held) w[h] = 0;
    const l = Math.hypot(...w);
    if (Math.abs(l - lmax) <= 1e-6 * l) { lmax = l; break; }
    lmax = l;
    v = Float64Array.from(w);
  }
  let u: Float64Array = new Float64Array(nc).map((_, i) => (held.has(i) ? 0 : 1 - ((i * 104729) % 17) / 17));
  let lminInv = 0;
  for (let it = 0; it < 60; it++) {
    normalize(u);
    const z = env.solve(new Float64Array(nc), u);
    const l = Math.hypot(...z);
    if (Math.abs(l - lminInv) <= 1e-6 * l) { lminInv = l; break; }
    lminInv = l;
    u = z;
  }
  const lmin = lminInv > 0 ? 1 / lminInv : 0;
  const sigmaMin = Math.sqrt(lmin);
  const condition = rank === 0 ? Infinity : Math.sqrt(lmax / (lmin || Number.MIN_VALUE));
  let sensitivity: number[][] | undefined;
  if (drives.length) {
    const colsD = new Map<number, number>();
    for (let d = 0; d < drives.length; d++) colsD.set(drives[d], d);
    const rhs = Array.from({ length: drives.length }, () => new Float64Array(nc));
    // Jᵀ J_d per drive column
    const jd = Array.from({ length: drives.length }, () => new Float64Array(3 * blockCount));
    for (let b = 0; b < blockCount; b++)
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const d = colsD.get(slotCrease[p]);
        if (d === undefined) continue;
        for (let k = 0; k < 3; k++) jd[d][3 * b + k] += J[3 * p + k];
      }
    for (let b = 0; b < blockCount; b++)
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = colOf.get(slotCrease[p]);
        if (a === undefined) continue;
        for (let d = 0; d < drives.length; d++)
          for (let k = 0; k < 3; k++) rhs[d][a] += J[3 * p + k] * jd[d][3 * b + k];
      }
    const sol = rhs.map((r) => env.solve(new Float64Array(nc), r));
    sensitivity = Array.from({ length: nc }, (_, k) => Array.from({ length: drives.length }, (_, d) => -sol[d][k]));
  }
  return { columns: nc, rank, localDof: nc - rank, condition, sigmaMin, sensitivity, dependentColumns: zero, exact: false };
}

function normalize(v: Float64Array): void {
  let s = 0;
  for (const x of v) s += x * x;
  const n = Math.sqrt(s) || 1;
  for (let i = 0; i < v.length; i++) v[i] /= n;
}

/**
 * The 2-norm condition number of the free creases' Jacobian at the last evaluate(), for a state whose rank is
 * already known: estimated from the normal matrix JᵀJ in the problem's own envelope, λ_max by power iteration
 * and λ_min by inverse iteration on its Cholesky factor, κ = √(λ_max/λ_min) (∞ when a pivot vanishes). Two or
 * three digits are enough for a condition number: the iterations stop when the Rayleigh quotients settle to 1e-4.
 */
export function estimateCondition(problem: ClosureProblem): { condition: number; sigmaMin: number; sigmaMax: number } {
  const n = problem.unknownCount;
  if (n === 0) return { condition: 1, sigmaMin: 0, sigmaMax: 0 };
  const env = problem.normalMatrix();
  problem.assembleNormal(env, new Float64Array(n), 0);
  const t = new Float64Array(3 * problem.sys.blockCount);
  const v = new Float64Array(n).map((_, i) => 1 + ((i * 7919) % 13) / 13);
  const w = new Float64Array(n);
  let lmax = 0;
  for (let it = 0; it < 60; it++) {
    normalize(v);
    problem.transposeTimes(w, problem.jacobianTimes(t, v));
    let l = 0;
    for (let i = 0; i < n; i++) l += v[i] * w[i];
    v.set(w);
    if (it > 2 && Math.abs(l - lmax) <= 1e-4 * l) { lmax = l; break; }
    lmax = l;
  }
  env.factor(NORMAL_PIVOT_TOLERANCE);
  if (env.zeroPivots.length) return { condition: Infinity, sigmaMin: 0, sigmaMax: Math.sqrt(lmax) };
  const u = new Float64Array(n).map((_, i) => 1 - ((i * 104729) % 17) / 17);
  const z = new Float64Array(n);
  let inv = 0;
  for (let it = 0; it < 60; it++) {
    normalize(u);
    env.solve(z, u);
    let l = 0;
    for (let i = 0; i < n; i++) l += u[i] * z[i];
    u.set(z);
    if (it > 2 && Math.abs(l - inv) <= 1e-4 * l) { inv = l; break; }
    inv = l;
  }
  const lmin = inv > 0 ? 1 / inv : 0;
  return { condition: lmin > 0 ? Math.sqrt(lmax / lmin) : Infinity, sigmaMin: Math.sqrt(lmin), sigmaMax: Math.sqrt(lmax) };
}
