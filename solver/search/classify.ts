// What each closed state is: isolated (local DOF 0, with its sensitivities) or a point of a family (a
// continuum through the drive values), and which family. The pieces the solve report is built from.

import type { Drive, Family, Pattern, Solution } from '../types';
import { ClosureProblem } from '../closure/newton';
import { analyzeState, estimateCondition, NORMAL_PIVOT_TOLERANCE, type LocalAnalysis } from '../closure/analysis';
import { flatCone } from '../paths/cone';
import { wrapAngle } from '../math/rotation';
import { orderedRates } from './ordered-rates';
import type { Candidate } from './candidates';
import { canonicalFoldedFlat, limitViolations, matchesAssignment, SAME_STATE_TOLERANCE, signPattern, stackedCreases } from './states';

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
  env.factor(NORMAL_PIVOT_TOLERANCE);
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
  const reps: { a: Analysed; loop?: Float64Array[]; step: number }[] = [];
  const sorted = [...members].sort((p, q) => Number(q.solution.matchesAssignment) - Number(p.solution.matchesAssignment));
  for (const m of sorted) {
    const joined = reps.some((r) => r.a.localDof === m.localDof && (r.loop
      ? onLoop(ctx.problem, r.loop, m.solution.angles, r.step)
      : sameFamily(ctx.problem, r.a.solution.angles, m.solution.angles)));
    if (joined) continue;
    // a one-DOF family is a closed curve: traced once, every other point is tested against it
    const traced = m.localDof === 1 ? traceLoop(ctx, m.solution.angles) : undefined;
    reps.push({ a: m, ...(traced ? { loop: traced.points, step: traced.step } : { step: 0 }) });
  }
  return reps.map(({ a: r }) => ({
    dof: r.localDof,
    representative: { ...r.solution, sensitivity: new Map() },
    directions: familyDirections(ctx.problem, ctx.free, r.local, r.solution.angles),
    matchesAssignment: r.solution.matchesAssignment,
  }));
}

const LOOP_STEP = 0.05;
const LOOP_STEPS = 800;

/**
 * The closed curve of states through `start` of a one-DOF family (drives held), traced by pseudo-arclength
 * steps: tangent from the Jacobian's null space, a predictor step, a corrector with the arclength equation.
 * Undefined when it does not close within the step budget (then the walk between points groups them).
 */
function traceLoop(ctx: AnalysisContext, start: Float64Array): { points: Float64Array[]; step: number } | undefined {
  const { problem, free } = ctx;
  const uc = problem.unknownCreases;
  const n = uc.length;
  const tangentAt = (x: Float64Array, prev?: Float64Array): Float64Array | undefined => {
    problem.evaluate(x);
    const dirs = familyDirections(problem, free, analyzeState(problem, free), x);
    if (dirs.length !== 1) return undefined;
    const t = new Float64Array(n);
    for (const [c, v] of dirs[0]) t[problem.unknownOf[c]] = v;
    if (prev) {
      let dot = 0;
      for (let a = 0; a < n; a++) dot += t[a] * prev[a];
      if (dot < 0) for (let a = 0; a < n; a++) t[a] = -t[a];
    }
    return t;
  };
  let x: Float64Array = Float64Array.from(start);
  let t: Float64Array | undefined = tangentAt(x);
  if (!t) return undefined;
  const points = [Float64Array.from(x)];
  let h = LOOP_STEP;
  for (let k = 0; k < LOOP_STEPS; k++) {
    const guess = Float64Array.from(x);
    let target = 0;
    for (let a = 0; a < n; a++) { guess[uc[a]] += h * t[a]; target += t[a] * x[uc[a]]; }
    const r = problem.solve(guess, { constraints: [{ coef: t, target: target + h }], maxStep: h, maxIterations: 20, wrap: false });
    if (!r.converged) {
      h /= 2;
      if (h < 1e-4) return undefined;
      continue;
    }
    const tn = tangentAt(r.angles, t);
    if (!tn) return undefined;
    x = r.angles;
    t = tn;
    points.push(Float64Array.from(x));
    if (h < LOOP_STEP) h = Math.min(LOOP_STEP, h * 2);
    if (k > 4 && distance(uc, x, start) < 0.75 * LOOP_STEP) return { points, step: LOOP_STEP };
  }
  return undefined;
}

function distance(uc: Int32Array, a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (const c of uc) { const d = wrapAngle(a[c] - b[c]); s += d * d; }
  return Math.sqrt(s);
}

/** A state on a traced loop: within a step of one of its points (the points are at most a step apart). */
function onLoop(problem: ClosureProblem, loop: Float64Array[], x: Float64Array, step: number): boolean {
  for (const p of loop) if (distance(problem.unknownCreases, p, x) < 0.6 * step + 1e-9) return true;
  return false;
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

export interface ClassifyOptions {
  respectLimits?: boolean;
  patternDof?: number;
  detail?: number | 'matching';
  conditions?: number | 'matching';
}

/** Every state found, sorted into isolated solutions, family points and families, states past a hinge limit. */
export interface Classification {
  /** isolated states in the report's order (matching the assignment first), singular ones included */
  isolated: Analysed[];
  familyPoints: Analysed[];
  families: Family[];
  /** states past a hinge limit, analysed the same way */
  excluded: Analysed[];
  /** singular but isolated states among `isolated` */
  singularIsolated: number;
  /** the pattern's DOF at a generic state */
  patternDof: number;
  /** how many leading solutions got sensitivities and condition numbers, and how many did not */
  detail: number;
  conditions: number;
  undetailed: number;
  unconditioned: number;
}

const DEFAULT_CONDITIONS = 1;

/**
 * The classification: local DOF of every state (proven by the enumeration, else one rank analysis), family
 * points grouped into families, the report's order, sensitivities and condition numbers for the leading
 * solutions, and the pattern's DOF.
 */
export function classifyStates(ctx: AnalysisContext, candidates: Candidate[], movable: number[], options: ClassifyOptions): Classification {
  const { pattern, problem, drives, free } = ctx;
  const within: Candidate[] = [];
  const beyond: Candidate[] = [];
  for (const c of candidates) ((options.respectLimits ?? true) && limitViolations(pattern, c.angles).length ? beyond : within).push(c);
  const analysed = within.map((c) => analyseCandidate(ctx, c, false));
  const isolated: Analysed[] = [];
  const familyPoints: Analysed[] = [];
  let singularIsolated = 0;
  for (const a of analysed) {
    if (a.localDof === 0) isolated.push(a);
    else if (familyThrough(problem, a.solution.angles, a.local!, free)) familyPoints.push(a);
    else {
      // singular but isolated: no closed state near it with these drives
      a.solution.nullity = a.localDof;
      a.solution.localDof = 0;
      a.localDof = 0;
      isolated.push(a);
      singularIsolated++;
    }
  }
  const families = groupFamilies(ctx, familyPoints);
  isolated.sort((p, q) => compareSolutions(p.solution, q.solution));
  // 'matching': the solutions that follow the assignment (they lead the order), else the first
  const leading = (n: number | 'matching' | undefined, fallback: number) =>
    n === 'matching' ? Math.max(1, isolated.filter((x) => x.solution.matchesAssignment).length) : Math.max(0, n ?? fallback);
  // sensitivities for the leading solutions (one pass each along the enumeration's order)
  const detail = leading(options.detail, Infinity);
  isolated.forEach((a, k) => { if (k < detail || drives.length >= 2) detailState(ctx, a); });
  const excluded = beyond.map((c) => analyseCandidate(ctx, c, false)).sort((p, q) => compareSolutions(p.solution, q.solution));
  excluded.forEach((a, k) => { if (k < detail) detailState(ctx, a); });
  // the enumeration proves isolation without a factorization; condition numbers for the leading solutions
  const conditions = leading(options.conditions, DEFAULT_CONDITIONS);
  let unconditioned = 0;
  isolated.forEach((a, k) => {
    if (!Number.isNaN(a.solution.condition)) return;
    if (k >= conditions) { unconditioned++; return; }
    problem.evaluate(a.solution.angles);
    a.solution.condition = estimateCondition(problem).condition;
  });
  return {
    isolated, familyPoints, families, excluded, singularIsolated,
    patternDof: options.patternDof ?? patternDofOf(ctx, analysed, movable),
    detail, conditions, undetailed: isolated.filter((a) => !a.detailed).length, unconditioned,
  };
}

/** A folded state away from flat and from folded flat, where the pattern's DOF is its generic value. */
function generic(free: number[], angles: Float64Array): boolean {
  let folded = false;
  for (const c of free) {
    const a = Math.abs(angles[c]);
    if (a >= Math.PI - 1e-3) return false;
    if (a > 1e-3) folded = true;
  }
  return folded;
}

/** The pattern's DOF: from the enumeration's first-order analysis of a generic state, else one rank analysis there. */
function patternDofOf(ctx: AnalysisContext, analysed: Analysed[], movable: number[]): number {
  const { problem, free } = ctx;
  let known = analysed.filter((a) => a.allDof !== undefined && generic(free, a.solution.angles)).map((a) => a.allDof!);
  if (!known.length) {
    const first = analysed.find((a) => !a.detailed && a.candidate.regular && generic(free, a.solution.angles));
    if (first) { detailState(ctx, first); if (first.allDof !== undefined) known = [first.allDof]; }
  }
  if (known.length) return Math.min(...known);
  const at = analysed.find((a) => generic(free, a.solution.angles)) ?? analysed[0];
  if (!at) return patternDegreesOfFreedom(ctx.pattern);
  problem.evaluate(at.solution.angles);
  at.allDof = analyzeState(problem, movable).localDof;
  return at.allDof;
}

/** Matching the assignment first, then by sign pattern, then by angles. */
export function compareSolutions(p: Solution, q: Solution): number {
  if (p.matchesAssignment !== q.matchesAssignment) return p.matchesAssignment ? -1 : 1;
  if (p.signs !== q.signs) return p.signs < q.signs ? -1 : 1;
  for (let i = 0; i < p.angles.length; i++) {
    const d = p.angles[i] - q.angles[i];
    if (Math.abs(d) > SAME_STATE_TOLERANCE) return d;
  }
  return 0;
}

/** DOF of the pattern with no drives, at generic folded states reached from flat (smallest found). */
export function patternDegreesOfFreedom(pattern: Pattern): number {
  const problem = new ClosureProblem(pattern, () => false);
  const movable = Array.from(problem.unknownCreases);
  if (movable.length === 0) return 0;
  if (pattern.interiorVertices.length === 0) return movable.length;
  const cone = flatCone(pattern, { starts: 48 });
  const rays = [...cone.rays].sort((a, b) => Number(!!a.straightLine) - Number(!!b.straightLine));
  let best = Infinity;
  for (const ray of rays.slice(0, 6)) {
    let big = 0;
    for (const v of ray.tangent) big = Math.max(big, Math.abs(v));
    if (big === 0) continue;
    const x = new Float64Array(pattern.creases.length);
    for (let c = 0; c < x.length; c++) x[c] = (0.35 * ray.tangent[c]) / big;
    const r = problem.solve(x, { maxStep: 0.1 });
    if (!r.converged) continue;
    problem.evaluate(r.angles);
    best = Math.min(best, analyzeState(problem, movable).localDof);
  }
  // fall back on the generic count (creases minus three equations per vertex)
  return Number.isFinite(best) ? best : Math.max(0, movable.length - 3 * pattern.interiorVertices.length);
}
