// Solving from a partial specification: find every consistent set of the free fold angles for the given
// drives, then say what kind of specification it was.
//
// Where solutions come from (documented in DEVELOPERS.md):
//  1. the flat state's tangent cone restricted to the drives' ratio: each ray is followed from flat to the
//     drive values by homotopy in the drive scale (small steps, Newton at each);
//  2. a start with every crease folded a little the way its mountain/valley assignment says;
//  3. a deterministic multistart: uniformly random free angles in [−180°, 180°] (mulberry32, seed 1), each
//     polished by Newton/LM; 24 starts up to 200 free creases, 8 up to 600, none above.

import type { Drive, Message, Pattern, Solution, SolveReport, SolveStatus } from '../types';
import { ClosureProblem, RESIDUAL_TOLERANCE, type LsqResult } from '../closure/newton';
import { analyzeState, NEAR_SINGULAR_CONDITION, type LocalAnalysis } from '../closure/analysis';
import { flatCone, mulberry32 } from '../paths/cone';
import { blockResiduals } from '../closure/blocks';
import { wrapAngle } from '../math/rotation';

export interface SolveOptions {
  /** random starts; default by size (see above) */
  multistart?: number;
  seed?: number;
  /** stop collecting after this many distinct solutions */
  maxSolutions?: number;
  /** skip the search for the pattern's own DOF (used by callers that know it) */
  patternDof?: number;
  /** keep states beyond a hinge limit apart from the solutions (default true) */
  respectLimits?: boolean;
}

const DEDUPE_TOLERANCE = 1e-6;
// At singular states (flat, folded flat) Newton reaches a residual of 1e-15 only within ~1e-7 rad of the
// exact state (the residual grows with the square of the distance there), so signs are read with that margin.
const SIGN_EPS = 1e-7;
const FLAT_FOLDED_EPS = 1e-6;
const DEG_PER_RAD = 180 / Math.PI;

export function isMovable(pattern: Pattern, c: number): boolean {
  const a = pattern.creases[c].assignment;
  return a !== 'B' && a !== 'F';
}

function label(pattern: Pattern, c: number): string {
  return pattern.creases[c].label;
}

function listLabels(pattern: Pattern, cs: number[], max = 8): string {
  const names = cs.slice(0, max).map((c) => label(pattern, c));
  return names.join(', ') + (cs.length > max ? ` and ${cs.length - max} more` : '');
}

export function signPattern(pattern: Pattern, angles: Float64Array): string {
  return pattern.creases
    .map((c) => (c.assignment === 'B' ? '' : angles[c.index] > SIGN_EPS ? '+' : angles[c.index] < -SIGN_EPS ? '-' : '0'))
    .join('');
}

export function matchesAssignment(pattern: Pattern, angles: Float64Array): boolean {
  for (const c of pattern.creases) {
    const a = angles[c.index];
    if (Math.abs(a) >= Math.PI - FLAT_FOLDED_EPS) continue; // folded flat: either side closes the same way
    if (c.assignment === 'M' && a > SIGN_EPS) return false;
    if (c.assignment === 'V' && a < -SIGN_EPS) return false;
  }
  return true;
}

/** Unit vector of the mountain/valley signs (valley +1, mountain −1, others 0). */
export function assignmentDirection(pattern: Pattern): Float64Array {
  const v = new Float64Array(pattern.creases.length);
  for (const c of pattern.creases) v[c.index] = c.assignment === 'V' ? 1 : c.assignment === 'M' ? -1 : 0;
  return v;
}

/** Follow a flat-state ray to the drive values by homotopy in the drive scale. */
export function followRay(
  problem: ClosureProblem,
  drives: Drive[],
  tangent: Float64Array,
  base: Float64Array,
): { result?: LsqResult; reached: number } {
  const maxAbs = Math.max(...drives.map((d) => Math.abs(d.value)));
  let dd = 0, dt = 0;
  for (const d of drives) { dd += tangent[d.crease] * tangent[d.crease]; dt += tangent[d.crease] * d.value; }
  if (drives.length && (dd < 1e-18 || dt <= 0)) return { reached: 0 };
  const setDrives = (x: Float64Array, t: number) => { for (const d of drives) x[d.crease] = t * d.value; };
  const first = maxAbs > 0.02 ? 0.02 / maxAbs : 1;
  const scaleAt = (t: number) => (drives.length ? (t * dt) / dd : t * 0.02);
  let t = first;
  let x: Float64Array = Float64Array.from(base);
  for (let c = 0; c < x.length; c++) if (problem.unknownOf[c] >= 0) x[c] = scaleAt(t) * tangent[c];
  setDrives(x, t);
  const res = problem.solve(x, { maxStep: 0.05, maxIterations: 40, wrap: false });
  if (!res.converged) return { reached: 0 };
  x = res.angles;
  let prev: Float64Array | null = null;
  let tPrev = 0;
  let h = Math.min(0.1, 1 - t);
  let last = res;
  while (t < 1 - 1e-15) {
    const tn = Math.min(1, t + h);
    const guess = Float64Array.from(x);
    if (prev) {
      const f = (tn - t) / (t - tPrev);
      for (let c = 0; c < x.length; c++) guess[c] = x[c] + (x[c] - prev[c]) * f;
    } else {
      for (let c = 0; c < x.length; c++) if (problem.unknownOf[c] >= 0) guess[c] = (x[c] * tn) / t;
    }
    setDrives(guess, tn);
    // the end point may be singular (folded flat), where Newton converges only linearly: allow more steps there
    const r = problem.solve(guess, { maxStep: 0.25, maxIterations: tn === 1 ? 80 : 12, wrap: false });
    if (r.converged) {
      prev = x;
      tPrev = t;
      x = r.angles;
      t = tn;
      last = r;
      h = r.iterations <= 3 ? Math.min(h * 2, 0.25) : h;
    } else {
      h /= 2;
      if (h < 1e-6) return { reached: t };
    }
  }
  // polish hard (a singular end point converges linearly), then wrap at the end only, so the path never jumps
  const polished = problem.solve(last.angles, { polishTolerance: 1e-15, maxIterations: 60, wrap: false });
  if (polished.converged) last = polished;
  const out = Float64Array.from(last.angles);
  for (let c = 0; c < out.length; c++) if (problem.unknownOf[c] >= 0) out[c] = wrapAngle(out[c]);
  return { result: { ...last, angles: out }, reached: 1 };
}

interface Found {
  angles: Float64Array;
  maxResidual: number;
}

// +180° and −180° are the same hinge rotation: states that differ only there are one solution, and the
// first found (reached along a branch from flat, so its signs are the limit of a real motion) is kept.
function sameState(a: Float64Array, b: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (Math.abs(wrapAngle(a[i] - b[i])) > DEDUPE_TOLERANCE) return false;
  return true;
}

function defaultStarts(unknowns: number): number {
  return unknowns <= 200 ? 24 : unknowns <= 600 ? 8 : 0;
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
    const a = analyzeState(problem, movable);
    best = Math.min(best, a.localDof);
  }
  if (!Number.isFinite(best)) {
    // fall back on the generic count (creases minus three equations per vertex)
    best = Math.max(0, movable.length - 3 * pattern.interiorVertices.length);
  }
  return best;
}

export function solveDrives(pattern: Pattern, drives: Drive[], options: SolveOptions = {}): SolveReport {
  const messages: Message[] = [];
  const driveSet = new Set(drives.map((d) => d.crease));
  const problem = new ClosureProblem(pattern, (c) => driveSet.has(c));
  const free = Array.from(problem.unknownCreases);
  const driveCreases = drives.map((d) => d.crease);
  const movable = pattern.creases.filter((c) => isMovable(pattern, c.index)).map((c) => c.index);
  const base = new Float64Array(pattern.creases.length);
  for (const d of drives) base[d.crease] = d.value;
  const maxSolutions = options.maxSolutions ?? 64;
  let iterations = 0;
  const found: Found[] = [];
  let best: LsqResult | undefined;
  const consider = (r: LsqResult | undefined) => {
    if (!r) return;
    iterations += r.iterations;
    if (!best || r.cost < best.cost) best = r;
    if (!r.converged || found.length >= maxSolutions) return;
    // polish hard: at a singular state Newton converges only linearly, and states a hair away from it
    // would otherwise pass the residual test as separate solutions
    const polished = problem.solve(r.angles, { polishTolerance: 1e-15, maxIterations: 60, wrap: false });
    if (!polished.converged) return;
    const angles = Float64Array.from(polished.angles);
    for (const c of free) angles[c] = wrapAngle(angles[c]);
    const twin = found.find((f) => sameState(f.angles, angles));
    if (twin) {
      // the same rotation state folded flat from the other side: prefer the sides the assignment asks for
      if (!matchesAssignment(pattern, twin.angles) && matchesAssignment(pattern, angles)) {
        twin.angles = angles;
        twin.maxResidual = polished.maxResidual;
      }
      return;
    }
    found.push({ angles, maxResidual: polished.maxResidual });
  };

  if (pattern.interiorVertices.length === 0) {
    messages.push({ severity: 'info', code: 'no-interior-vertex', text: 'The pattern has no interior vertex: every free crease folds independently.' });
  }

  // 1. the flat state itself when every drive is zero
  const allZero = drives.every((d) => d.value === 0);
  if (allZero) consider(problem.solve(base));

  // 2. rays of the flat state's tangent cone, restricted to the drives' ratio, followed to the drive values
  if (!allZero && free.length > 0) {
    const cone = flatCone(pattern, { ratio: drives.map((d) => ({ crease: d.crease, value: d.value })), seeds: [assignmentDirection(pattern)] });
    for (const ray of cone.rays) {
      if (found.length >= maxSolutions) break;
      consider(followRay(problem, drives, ray.tangent, base).result);
    }
    // too large for the dense cone: follow the mountain/valley direction itself from flat
    if (cone.partial) consider(followRay(problem, drives, assignmentDirection(pattern), base).result);
  }

  // 3. the assignment's own direction
  {
    const x = Float64Array.from(base);
    const scale = Math.max(0.1, ...drives.map((d) => Math.abs(d.value)));
    for (const c of free) {
      const a = pattern.creases[c].assignment;
      x[c] = a === 'V' ? scale : a === 'M' ? -scale : 0;
    }
    consider(problem.solve(x, { maxStep: 0.3, maxIterations: 80 }));
  }

  // 4. deterministic multistart
  const starts = options.multistart ?? defaultStarts(free.length);
  const rand = mulberry32(options.seed ?? 1);
  for (let s = 0; s < starts && found.length < maxSolutions; s++) {
    const x = Float64Array.from(base);
    for (const c of free) x[c] = (rand() * 2 - 1) * Math.PI;
    consider(problem.solve(x, { maxStep: 0.6, maxIterations: 80 }));
  }
  if (free.length === 0) consider(problem.solve(base));

  let patternDofCache = options.patternDof;
  // the pattern's DOF: the smallest local DOF (all movable creases free) at a folded state we know of
  let knownDof = Infinity;
  const patternDof = () => (patternDofCache ??= Number.isFinite(knownDof) ? knownDof : patternDegreesOfFreedom(pattern));

  const analyze = (angles: Float64Array) => {
    problem.evaluate(angles);
    const local = analyzeState(problem, free, driveCreases);
    const all = analyzeState(problem, movable);
    return { local, all };
  };

  const toSolution = (f: Found, local: LocalAnalysis): Solution => {
    const sensitivity = new Map<number, Map<number, number>>();
    free.forEach((c, k) => {
      const m = new Map<number, number>();
      drives.forEach((d, j) => m.set(d.crease, local.sensitivity ? local.sensitivity[k][j] : 0));
      sensitivity.set(c, m);
    });
    const sys = problem.sys;
    return {
      angles: f.angles,
      maxResidual: f.maxResidual,
      vertexResiduals: blockResiduals(sys, f.angles),
      matchesAssignment: matchesAssignment(pattern, f.angles),
      localDof: local.localDof,
      sensitivity,
      condition: local.condition,
      signs: signPattern(pattern, f.angles),
    };
  };

  const held: { excluded?: Solution[] } = {};
  const finish = (status: SolveStatus, dof: number, solutions: Solution[], extra: Partial<SolveReport> = {}): SolveReport => ({
    status,
    dof,
    patternDof: patternDof(),
    solutions,
    families: [],
    search: { complete: false, method: 'homotopy from flat rays and multistart', found: found.length, note: 'a numerical search; states it did not reach may exist' },
    messages,
    iterations,
    ...(held.excluded?.length ? { excluded: held.excluded } : {}),
    ...extra,
  });

  // solutions beyond a hinge limit are kept apart: reported, but not counted as solutions
  const excluded: Found[] = [];
  if (options.respectLimits ?? true) {
    for (let i = found.length - 1; i >= 0; i--) {
      if (limitViolations(pattern, found[i].angles).length) excluded.unshift(...found.splice(i, 1));
    }
  }
  const excludedSolutions = () => excluded.map((f) => toSolution(f, analyze(f.angles).local));
  held.excluded = excluded.length ? excludedSolutions() : undefined;
  if (excluded.length) {
    const v = limitViolations(pattern, excluded[0].angles);
    messages.push({
      severity: found.length ? 'info' : 'error',
      code: 'outside-hinge-limits',
      text: `${excluded.length} state(s) close the pattern but put a hinge past its limit (e.g. ${listLabels(pattern, v)}); they are listed apart.`,
    });
  }
  if (found.length === 0 && excluded.length) {
    return finish('unreachable', 0, [], { excluded: excludedSolutions() });
  }
  if (found.length === 0) return classifyFailure();

  // order: matching the assignment first, then by sign pattern, then by angles
  const analysed = found.map((f) => ({ f, ...analyze(f.angles) }));
  for (const a of analysed) {
    let folded = false;
    for (const c of free) if (Math.abs(a.f.angles[c]) > 1e-3 && Math.abs(a.f.angles[c]) < Math.PI - 1e-3) folded = true;
    if (folded) knownDof = Math.min(knownDof, a.all.localDof);
  }
  const solutions = analysed.map((a) => ({ sol: toSolution(a.f, a.local), a }));
  solutions.sort((p, q) => {
    if (p.sol.matchesAssignment !== q.sol.matchesAssignment) return p.sol.matchesAssignment ? -1 : 1;
    if (p.sol.signs !== q.sol.signs) return p.sol.signs < q.sol.signs ? -1 : 1;
    for (let i = 0; i < p.sol.angles.length; i++) {
      const d = p.sol.angles[i] - q.sol.angles[i];
      if (Math.abs(d) > DEDUPE_TOLERANCE) return d;
    }
    return 0;
  });
  const sols = solutions.map((s) => s.sol);
  for (const [k, s] of solutions.entries()) {
    if (s.sol.condition > NEAR_SINGULAR_CONDITION && s.sol.localDof === 0) {
      messages.push({
        severity: 'warning',
        code: 'near-singular',
        text: `Solution ${k + 1} is near-singular (condition number ${s.sol.condition.toExponential(2)}): small drive errors move the passive hinges a lot.`,
      });
    }
  }
  const first = solutions[0].a;
  const nD = drives.length;
  const rankDrive = (a: { local: LocalAnalysis; all: LocalAnalysis }) => a.all.localDof - a.local.localDof;
  // a single drive that cannot move at a state is a family through it (handled below), not a dependence
  const worstDependence = nD >= 2 ? solutions.find((s) => rankDrive(s.a) < nD) : undefined;
  if (worstDependence) {
    const dependent = dependentDrives(problem, worstDependence.sol.angles, drives, movable, free);
    if (nD > patternDof()) {
      messages.push({
        severity: 'warning',
        code: 'overspecified',
        text: `${nD} drives are set but the pattern has ${patternDof()} degree(s) of freedom; the values are consistent. Implied by the others: ${listLabels(pattern, dependent)}.`,
      });
      return finish('overspecified', worstDependence.sol.localDof, sols, { conflictingDrives: dependent });
    }
    messages.push({
      severity: 'warning',
      code: 'dependent-drives',
      text: `The drives ${listLabels(pattern, dependent)} cannot be set independently: at this state they move together.`,
    });
    return finish('dependent-drives', worstDependence.sol.localDof, sols, { conflictingDrives: dependent });
  }
  if (first.local.localDof > 0) {
    const suggestions = suggestDrives(first.local, free);
    if (nD < patternDof()) {
      messages.push({
        severity: 'warning',
        code: 'underspecified',
        text: `Underspecified: ${first.local.localDof} degree(s) of freedom remain. Add a drive on ${listLabels(pattern, suggestions)} to complete the specification.`,
      });
      return finish('underspecified', first.local.localDof, sols, { suggestedDrives: suggestions });
    }
    if (familyThrough(problem, solutions[0].sol.angles, first.local, free)) {
      messages.push({
        severity: 'warning',
        code: 'not-isolated',
        text: `A whole family of states passes through these drive values (${first.local.localDof} direction(s) left free, e.g. ${listLabels(pattern, suggestions)}); the solution is not isolated.`,
      });
      return finish('not-isolated', first.local.localDof, sols, { suggestedDrives: suggestions });
    }
    messages.push({
      severity: 'warning',
      code: 'singular-isolated',
      text: 'The state is singular (the Jacobian loses rank) but isolated: no family passes through it with these drives.',
    });
  }
  const status: SolveStatus = sols.length > 1 ? 'several-solutions' : 'solved';
  messages.unshift({
    severity: 'info',
    code: status,
    text: status === 'solved' ? 'Solved: the drives fix the pattern locally.' : `${sols.length} solutions for these drive values.`,
  });
  return finish(status, 0, sols);

  function classifyFailure(): SolveReport {
    const compromiseAngles = best ? best.angles : base;
    const comp: Found = { angles: compromiseAngles, maxResidual: best ? best.maxResidual : Infinity };
    const a = analyze(comp.angles);
    const compromise = toSolution(comp, a.local);
    const worst = compromise.vertexResiduals
      .map((r, i) => [r, pattern.interiorVertices[i].vertex] as const)
      .sort((p, q) => q[0] - p[0])
      .slice(0, 3);
    const worstText = worst.map(([r, v]) => `vertex ${v} (${(r * DEG_PER_RAD).toPrecision(3)}°)`).join(', ');
    const nD = drives.length;
    // which single drives, released, leave a consistent pattern?
    const conflicting: number[] = [];
    let dependentWhenReleased = false;
    if (nD >= 2) {
      for (const d of drives) {
        const rest = drives.filter((e) => e !== d);
        const restSet = new Set(rest.map((e) => e.crease));
        const sub = new ClosureProblem(pattern, (c) => restSet.has(c), problem.sys);
        const r = sub.solve(compromiseAngles, { maxStep: 0.3, maxIterations: 80 });
        if (r.converged) {
          conflicting.push(d.crease);
          sub.evaluate(r.angles);
          const all = analyzeState(sub, movable);
          const loc = analyzeState(sub, free);
          if (all.localDof - loc.localDof < nD) dependentWhenReleased = true;
        }
      }
    }
    if (nD > patternDof() || dependentWhenReleased) {
      const list = conflicting.length ? conflicting : drives.map((d) => d.crease);
      messages.push({
        severity: 'error',
        code: 'inconsistent',
        text: `Inconsistent: no state closes every vertex with these drives. Conflicting drives: ${listLabels(pattern, list)}. Least-squares compromise leaves ${(comp.maxResidual * DEG_PER_RAD).toPrecision(3)}° at worst, at ${worstText}.`,
      });
      return finish('inconsistent', 0, [], { compromise, conflictingDrives: list });
    }
    const extra: Partial<SolveReport> = { compromise };
    let rangeText = '';
    if (nD === 1) {
      const ranges = reachableRange(pattern, problem, drives[0]);
      extra.reachableRange = ranges;
      if (ranges.length)
        rangeText = ` Reachable drive range from flat: ${ranges.map(([lo, hi]) => `${(lo * DEG_PER_RAD).toFixed(3)}° to ${(hi * DEG_PER_RAD).toFixed(3)}°`).join('; ')}.`;
    }
    messages.push({
      severity: 'error',
      code: 'unreachable',
      text: `Unreachable: no real state has these drive values.${rangeText} Least-squares compromise leaves ${(comp.maxResidual * DEG_PER_RAD).toPrecision(3)}° at worst, at ${worstText}.`,
    });
    return finish('unreachable', 0, [], extra);
  }
}

/** Creases whose angle is outside their hinge limits. */
export function limitViolations(pattern: Pattern, angles: Float64Array): number[] {
  const out: number[] = [];
  for (const c of pattern.creases) {
    const l = c.limit;
    if (!l) continue;
    const a = angles[c.index];
    if ((l.min !== undefined && a < l.min - 1e-9) || (l.max !== undefined && a > l.max + 1e-9)) out.push(c.index);
  }
  return out;
}

/** Drives whose value is implied by the other drives at this state. */
function dependentDrives(problem: ClosureProblem, angles: Float64Array, drives: Drive[], movable: number[], free: number[]): number[] {
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
function suggestDrives(local: LocalAnalysis, free: number[]): number[] {
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
    // eliminate the chosen row from the remaining vectors (Householder-free Gram–Schmidt on the rows)
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

/** Does a curve of closed states with the same drives leave this state? Step along each null direction. */
function familyThrough(problem: ClosureProblem, angles: Float64Array, local: LocalAnalysis, free: number[]): boolean {
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

/** Reachable range of a single drive along each flat ray, by homotopy towards ±180°. */
function reachableRange(pattern: Pattern, problem: ClosureProblem, drive: Drive): [number, number][] {
  const cone = flatCone(pattern, { ratio: [{ crease: drive.crease, value: 1 }] });
  let hi = 0, lo = 0;
  const base = new Float64Array(pattern.creases.length);
  for (const sign of [1, -1]) {
    const target = [{ crease: drive.crease, value: sign * Math.PI }];
    const rays = flatCone(pattern, { ratio: target }).rays;
    for (const ray of rays.length ? rays : cone.rays) {
      const { reached } = followRay(problem, target, ray.tangent, base);
      if (sign > 0) hi = Math.max(hi, reached * Math.PI);
      else lo = Math.min(lo, -reached * Math.PI);
    }
  }
  return hi === 0 && lo === 0 ? [] : [[lo, hi]];
}

export { RESIDUAL_TOLERANCE };
