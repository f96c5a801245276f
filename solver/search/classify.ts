// What each closed state is: isolated (local DOF 0, with its sensitivities) or a point of a family (a
// continuum through the drive values), and which family. The pieces the solve report is built from.

import type { Drive, Family, Pattern, Solution } from '../types';
import { ClosureProblem } from '../closure/newton';
import { analyzeState, RANK_TOLERANCE, type LocalAnalysis } from '../closure/analysis';
import { wrapAngle } from '../math/rotation';
import { orderedRates } from './ordered-rates';
import type { Candidate } from './candidates';
import { canonicalFoldedFlat, matchesAssignment, signPattern, stackedCreases } from './states';

const DEG_PER_RAD = 180 / Math.PI;
/** a drive column this far (residual norm, rad) from the range of the free creases' Jacobian cannot move */
const LOCKED = 1e-8;

export interface Analysed {
  candidate: Candidate;
  solution: Solution;
  /** free creases minus rank with the drives held */
  localDof: number;
  /** DOF with every movable crease free, when known without an extra analysis */
  allDof?: number;
  /** drives that cannot move from this state (their Jacobian column is not in the free creases' range) */
  lockedDrives: number[];
  /** the local analysis, when one was made */
  local?: LocalAnalysis;
  /** sensitivities (and locked drives) are known */
  detailed: boolean;
}

export interface AnalysisContext {
  pattern: Pattern;
  problem: ClosureProblem;
  drives: Drive[];
  free: number[];
  known: Uint8Array;
}

/**
 * Residual, signs and local DOF of a closed state: the DOF from the enumeration's order where it proves it
 * (no factorization), else by a rank analysis (which also gives the sensitivities and the condition number).
 * `detailed` asks for the sensitivities of a proven state at once (see detailState).
 */
export function analyseCandidate(ctx: AnalysisContext, cand: Candidate, detailed = true): Analysed {
  const { pattern, problem, drives, free } = ctx;
  let worst = problem.evaluate(cand.angles, !cand.regular || detailed);
  if (!(worst <= 1e-13)) {
    // closed-form states are exact to rounding; a hair off (a singular vertex) is polished here
    const p = problem.solve(cand.angles, { polishTolerance: 1e-15, maxIterations: 20, wrap: false });
    if (p.converged) {
      for (const c of problem.unknownCreases) cand.angles[c] = wrapAngle(p.angles[c]);
      canonicalFoldedFlat(pattern, cand.angles);
    }
    worst = problem.evaluate(cand.angles);
  }
  cand.maxResidual = worst;
  const vertexResiduals: number[] = [];
  for (let b = 0; b < problem.sys.blockCount; b++) vertexResiduals.push(Math.hypot(problem.residual[3 * b], problem.residual[3 * b + 1], problem.residual[3 * b + 2]));
  const driveCreases = drives.map((d) => d.crease);
  const sensitivity = new Map<number, Float64Array>();
  let localDof = 0;
  let condition = NaN;
  let local: LocalAnalysis | undefined;
  if (!cand.regular) {
    local = analyzeState(problem, free, driveCreases);
    localDof = local.localDof;
    condition = local.condition;
    if (local.sensitivity) {
      drives.forEach((d, j) => {
        const arr = new Float64Array(pattern.creases.length);
        free.forEach((c, k) => (arr[c] = local!.sensitivity![k][j]));
        sensitivity.set(d.crease, arr);
      });
    }
  }
  const stacked = stackedCreases(pattern, cand.angles);
  const solution: Solution = {
    angles: cand.angles,
    maxResidual: cand.maxResidual,
    vertexResiduals,
    matchesAssignment: matchesAssignment(pattern, cand.angles),
    localDof,
    sensitivity,
    condition,
    signs: signPattern(pattern, cand.angles),
    ...(stacked.length ? { stacked } : {}),
  };
  const a: Analysed = { candidate: cand, solution, localDof, lockedDrives: [], local, detailed: !cand.regular };
  // the Jacobian is fresh when the state was not proven by the enumeration or its details are asked for
  if (cand.order && (detailed || !cand.regular)) firstOrder(ctx, a);
  return a;
}

/** The sensitivities of a state proven isolated by the enumeration (one pass along its order), when not yet computed. */
export function detailState(ctx: AnalysisContext, a: Analysed): void {
  if (a.detailed) return;
  ctx.problem.evaluate(a.solution.angles);
  if (a.candidate.order) firstOrder(ctx, a);
  a.detailed = true;
}

/** Along the enumeration's order (the Jacobian evaluated at the state): which drives can move, and the rates of a proven state. */
function firstOrder(ctx: AnalysisContext, a: Analysed): void {
  const driveCreases = ctx.drives.map((d) => d.crease);
  const r = orderedRates(ctx.problem.sys, ctx.problem.jacobian, a.candidate.order!, ctx.known, driveCreases);
  a.lockedDrives = [];
  r.inconsistency.forEach((v, i) => { if (v > LOCKED) a.lockedDrives.push(driveCreases[i]); });
  if (a.candidate.regular) {
    ctx.drives.forEach((d, i) => a.solution.sensitivity.set(d.crease, zeroKnown(r.rates[i], ctx.known, d.crease)));
    if (a.lockedDrives.length === 0) a.allDof = ctx.drives.length;
    else if (ctx.drives.length === 1) a.allDof = 0;
    a.detailed = true;
  }
}

function zeroKnown(rates: Float64Array, known: Uint8Array, drive: number): Float64Array {
  const out = Float64Array.from(rates);
  for (let c = 0; c < out.length; c++) if (known[c] && c !== drive) out[c] = 0;
  out[drive] = 0; // a drive's sensitivity to itself is not a free crease's
  return out;
}

/** Does a curve of closed states with the same drives leave this state? Step along each null direction. */
export function familyThrough(problem: ClosureProblem, angles: Float64Array, local: LocalAnalysis, free: number[]): boolean {
  const basis = local.nullBasis ?? (local.dependentColumns ?? []).map((k) => free.map((_, j) => (j === k ? 1 : 0)));
  for (const v of basis) {
    for (const eps of [1e-3, -1e-3]) {
      const coef = Float64Array.from(v);
      let target = 0;
      for (let k = 0; k < free.length; k++) target += v[k] * angles[free[k]];
      const start = Float64Array.from(angles);
      for (let k = 0; k < free.length; k++) start[free[k]] += eps * v[k];
      const r = problem.solve(start, { constraints: [{ coef, target: target + eps }], maxStep: 0.01, maxIterations: 40 });
      if (r.converged) return true;
    }
  }
  return false;
}

/**
 * Are two closed states on one family? Walk from a towards b in small steps, each pulled back onto the closed
 * states by a least-squares solve with the drives held; they are one family when the walk arrives at b.
 */
export function sameFamily(problem: ClosureProblem, a: Float64Array, b: Float64Array): boolean {
  const steps = 24;
  const uc = problem.unknownCreases;
  const delta = new Float64Array(a.length);
  for (const c of uc) delta[c] = wrapAngle(b[c] - a[c]) / steps;
  let y: Float64Array = Float64Array.from(a);
  for (let k = 1; k <= steps; k++) {
    const guess = Float64Array.from(y);
    for (const c of uc) guess[c] += delta[c];
    const r = problem.solve(guess, { maxStep: 0.05, maxIterations: 30, wrap: false });
    if (!r.converged) return false;
    // the walk must stay near the straight line between the two (a jump means another sheet of states)
    let off = 0;
    for (const c of uc) off = Math.max(off, Math.abs(wrapAngle(r.angles[c] - guess[c])));
    if (off > 0.2) return false;
    y = r.angles;
  }
  for (const c of uc) if (Math.abs(wrapAngle(y[c] - b[c])) > 1e-4) return false;
  return true;
}

/** Orthonormal free directions of a family at its representative, as crease → component maps. */
export function familyDirections(problem: ClosureProblem, free: number[], local: LocalAnalysis | undefined, angles: Float64Array): Map<number, number>[] {
  const vectors: Float64Array[] = local?.nullBasis
    // (dense path: the basis over the free creases)
    ? local.nullBasis.map((v) => Float64Array.from(v))
    : sparseNullVectors(problem, angles);
  // Gram–Schmidt twice over the free creases
  const basis: Float64Array[] = [];
  for (const v0 of vectors) {
    const v = Float64Array.from(v0);
    for (let pass = 0; pass < 2; pass++)
      for (const u of basis) {
        let d = 0;
        for (let i = 0; i < v.length; i++) d += u[i] * v[i];
        for (let i = 0; i < v.length; i++) v[i] -= d * u[i];
      }
    let n = 0;
    for (const x of v) n += x * x;
    n = Math.sqrt(n);
    if (n < 1e-9) continue;
    for (let i = 0; i < v.length; i++) v[i] /= n;
    basis.push(v);
  }
  return basis.map((v) => {
    const m = new Map<number, number>();
    v.forEach((x, k) => { if (Math.abs(x) > 1e-12) m.set(free[k], x); });
    return m;
  });
}

/**
 * Null vectors of the free creases' Jacobian from the sparse normal-matrix factor: each column the factor
 * drops (a zero pivot) is set to 1, the other dropped ones to 0, and the rest solved in least squares.
 */
function sparseNullVectors(problem: ClosureProblem, angles: Float64Array): Float64Array[] {
  const n = problem.unknownCount;
  problem.evaluate(angles);
  const env = problem.normalMatrix();
  problem.assembleNormal(env, new Float64Array(n), 0);
  env.factor(RANK_TOLERANCE * RANK_TOLERANCE);
  const zero = env.zeroPivots.map((k) => env.perm[k]);
  const { blockStart, slotCrease, blockCount } = problem.sys;
  const J = problem.jacobian;
  const out: Float64Array[] = [];
  const e = new Float64Array(n), w = new Float64Array(3 * blockCount), rhs = new Float64Array(n);
  for (const z of zero) {
    e.fill(0);
    e[z] = 1;
    problem.jacobianTimes(w, e);
    rhs.fill(0);
    for (let b = 0; b < blockCount; b++)
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const a = problem.unknownOf[slotCrease[p]];
        if (a >= 0) rhs[a] -= J[3 * p] * w[3 * b] + J[3 * p + 1] * w[3 * b + 1] + J[3 * p + 2] * w[3 * b + 2];
      }
    const v = new Float64Array(n);
    env.solve(v, rhs);
    v[z] = 1;
    out.push(v);
  }
  return out;
}

/** Group family points: one family per group of states joined by a walk; the representative matches the assignment when one does. */
export function groupFamilies(ctx: AnalysisContext, members: Analysed[]): Family[] {
  const reps: Analysed[] = [];
  const sorted = [...members].sort((p, q) => Number(q.solution.matchesAssignment) - Number(p.solution.matchesAssignment));
  for (const m of sorted) {
    if (reps.some((r) => r.localDof === m.localDof && sameFamily(ctx.problem, r.solution.angles, m.solution.angles))) continue;
    reps.push(m);
  }
  return reps.map((r) => ({
    dof: r.localDof,
    representative: { ...r.solution, sensitivity: new Map() },
    directions: familyDirections(ctx.problem, ctx.free, r.local, r.solution.angles),
    matchesAssignment: r.solution.matchesAssignment,
  }));
}

/** Drives whose value is implied by the other drives at this state. */
export function dependentDrives(problem: ClosureProblem, angles: Float64Array, drives: Drive[], movable: number[], free: number[]): number[] {
  problem.evaluate(angles);
  const all = analyzeState(problem, movable);
  const local = analyzeState(problem, free);
  const rank = all.localDof - local.localDof;
  const out: number[] = [];
  for (const d of drives) {
    // releasing d: if the projection rank of the remaining drives is unchanged, d depends on them
    const others = free.concat([d.crease]);
    const loc = analyzeState(problem, others);
    const r = all.localDof - loc.localDof;
    if (r === rank) out.push(d.crease);
  }
  return out.length ? out : drives.map((d) => d.crease);
}

/** Free creases that complete the rank (greedy pivoting on the null-space basis rows). */
export function suggestDrives(local: LocalAnalysis, free: number[]): number[] {
  if (local.dependentColumns) return local.dependentColumns.map((k) => free[k]);
  const basis = (local.nullBasis ?? []).map((v) => [...v]);
  const picks: number[] = [];
  for (let q = 0; q < basis.length; q++) {
    let bestRow = -1, bestVal = 1e-9;
    for (let k = 0; k < free.length; k++) {
      if (picks.includes(k)) continue;
      let s = 0;
      for (let j = q; j < basis.length; j++) s += basis[j][k] * basis[j][k];
      if (s > bestVal + 1e-12) { bestVal = s; bestRow = k; }
    }
    if (bestRow < 0) break;
    picks.push(bestRow);
    // eliminate the chosen row from the remaining vectors (Gram–Schmidt on the rows)
    let pivot = q;
    for (let j = q; j < basis.length; j++) if (Math.abs(basis[j][bestRow]) > Math.abs(basis[pivot][bestRow])) pivot = j;
    [basis[q], basis[pivot]] = [basis[pivot], basis[q]];
    for (let j = q + 1; j < basis.length; j++) {
      const f = basis[j][bestRow] / basis[q][bestRow];
      for (let k = 0; k < free.length; k++) basis[j][k] -= f * basis[q][k];
    }
  }
  return picks.map((k) => free[k]);
}

/** The worst vertices of a compromise, in words. */
export function worstVerticesText(pattern: Pattern, residuals: number[]): string {
  return residuals
    .map((r, i) => [r, pattern.interiorVertices[i].vertex] as const)
    .sort((p, q) => q[0] - p[0])
    .slice(0, 3)
    .map(([r, v]) => `vertex ${v} (${(r * DEG_PER_RAD).toPrecision(3)}°)`)
    .join(', ');
}
