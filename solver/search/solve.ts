// Solving from a partial specification: find the closed states for the given drives (search), say what each
// is (classification: isolated solution or family), then what kind of specification it was (the report).
//
//  1. search (solver/search/candidates.ts): exhaustive enumeration vertex by vertex where it applies, with a
//     cap that is reported; a numerical search with a fixed budget elsewhere;
//  2. classification (solver/search/classify.ts): local DOF with the drives held (proven by the enumeration,
//     else one rank analysis per state), sensitivities, families grouped by a walk between their points;
//  3. the report: status from every state found (never from the first alone), messages, the search summary.

import type { Drive, Family, Message, Pattern, SearchSummary, Solution, SolveReport, SolveStatus } from '../types';
import { ClosureProblem, RESIDUAL_TOLERANCE, type LsqResult } from '../closure/newton';
import { analyzeState, estimateCondition, NEAR_SINGULAR_CONDITION } from '../closure/analysis';
import { flatCone } from '../paths/cone';
import { searchStates, followRay, type Candidate } from './candidates';
import {
  analyseCandidate, dependentDrives, detailState, familyThrough, groupFamilies, suggestDrives, worstVerticesText,
  type AnalysisContext, type Analysed,
} from './classify';
import { isMovable, limitViolations, SAME_STATE_TOLERANCE } from './states';

export { isMovable, matchesAssignment, limitViolations, signPattern, assignmentSigns } from './states';
export { followRay } from './candidates';

export interface SolveOptions {
  /** most closed states to collect (default 64); a search stopped by it says so */
  cap?: number;
  /** random starts of the numerical search where the enumeration does not apply (default 24) */
  starts?: number;
  seed?: number;
  /** the pattern's own DOF when the caller knows it */
  patternDof?: number;
  /** keep states beyond a hinge limit apart from the solutions (default true) */
  respectLimits?: boolean;
  /**
   * the precision the drive values were stated to (radians, default 0.005°, half the last digit of a value
   * shown to two decimals): drives that agree with the others to within it are overspecified, not inconsistent
   */
  drivePrecision?: number;
  /** vertex solves the enumeration may take */
  maxSteps?: number;
  /** solutions (in the report's order) whose sensitivities are computed (default all; 'matching': those that follow the assignment, else the first); the others carry none */
  detail?: number | 'matching';
  /** solutions (in the report's order) whose condition number is evaluated (default 1: each costs a factorization; the rest are NaN, said in a message) */
  conditions?: number | 'matching';
}

const DEFAULT_CONDITIONS = 1;

const DEG_PER_RAD = 180 / Math.PI;
export const DEFAULT_DRIVE_PRECISION = 0.005 / DEG_PER_RAD;

function label(pattern: Pattern, c: number): string {
  return pattern.creases[c].label;
}

export function listLabels(pattern: Pattern, cs: number[], max = 8): string {
  const names = cs.slice(0, max).map((c) => label(pattern, c));
  return names.join(', ') + (cs.length > max ? ` and ${cs.length - max} more` : '');
}

function listIndices(ks: number[], max = 10): string {
  return ks.slice(0, max).map((k) => `#${k + 1}`).join(', ') + (ks.length > max ? ` and ${ks.length - max} more` : '');
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

export function solveDrives(pattern: Pattern, drives: Drive[], options: SolveOptions = {}): SolveReport {
  const messages: Message[] = [];
  const driveSet = new Set(drives.map((d) => d.crease));
  const problem = new ClosureProblem(pattern, (c) => driveSet.has(c));
  const free = Array.from(problem.unknownCreases);
  const movable = pattern.creases.filter((c) => isMovable(pattern, c.index)).map((c) => c.index);
  if (pattern.interiorVertices.length === 0) {
    messages.push({ severity: 'info', code: 'no-interior-vertex', text: 'The pattern has no interior vertex: every free crease folds independently.' });
  }

  // 1. search
  const search = searchStates(pattern, problem, drives, { cap: options.cap, starts: options.starts, seed: options.seed, maxSteps: options.maxSteps });
  const ctx: AnalysisContext = { pattern, problem, drives, free, known: search.known };

  // 2. classification: states past a hinge limit apart, then isolated states and family points
  const within: Candidate[] = [];
  const beyond: Candidate[] = [];
  for (const c of search.candidates) ((options.respectLimits ?? true) && limitViolations(pattern, c.angles).length ? beyond : within).push(c);
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
  const solutions = isolated.map((a) => a.solution);
  // sensitivities for the leading solutions (one pass each along the enumeration's order)
  // 'matching': the solutions that follow the assignment (they lead the order), else the first
  const leading = (n: number | 'matching' | undefined, fallback: number) =>
    n === 'matching' ? Math.max(1, solutions.filter((x) => x.matchesAssignment).length) : Math.max(0, n ?? fallback);
  const detail = leading(options.detail, Infinity);
  isolated.forEach((a, k) => { if (k < detail || drives.length >= 2) detailState(ctx, a); });
  const beyondAnalysed = beyond.map((c) => analyseCandidate(ctx, c, false));
  beyondAnalysed.sort((p, q) => compareSolutions(p.solution, q.solution));
  beyondAnalysed.forEach((a, k) => { if (k < detail) detailState(ctx, a); });
  const excluded = beyondAnalysed.map((a) => a.solution);
  const undetailed = isolated.filter((a) => !a.detailed).length;

  // the pattern's DOF: known from the enumeration's first-order analysis, else one rank analysis at a generic state
  let patternDof = options.patternDof;
  if (patternDof === undefined) {
    let known = analysed.filter((a) => a.allDof !== undefined && generic(free, a.solution.angles)).map((a) => a.allDof!);
    if (!known.length) {
      const first = analysed.find((a) => !a.detailed && a.candidate.regular && generic(free, a.solution.angles));
      if (first) { detailState(ctx, first); if (first.allDof !== undefined) known = [first.allDof]; }
    }
    if (known.length) patternDof = Math.min(...known);
  }
  if (patternDof === undefined) {
    const at = analysed.find((a) => generic(free, a.solution.angles)) ?? analysed[0];
    if (at) {
      problem.evaluate(at.solution.angles);
      at.allDof = analyzeState(problem, movable).localDof;
      patternDof = at.allDof;
    } else patternDof = patternDegreesOfFreedom(pattern);
  }

  // the enumeration proves isolation without a factorization; condition numbers for the leading solutions
  const conditions = leading(options.conditions, DEFAULT_CONDITIONS);
  let skipped = 0;
  solutions.forEach((s, k) => {
    if (!Number.isNaN(s.condition)) return;
    if (k >= conditions) { skipped++; return; }
    problem.evaluate(s.angles);
    s.condition = estimateCondition(problem).condition;
  });
  if (undetailed) {
    messages.push({ severity: 'info', code: 'sensitivity-not-evaluated', text: `Sensitivities are computed for the first ${detail} solution(s) only, as asked; the other ${undetailed} are proven isolated vertex by vertex.` });
  }
  if (skipped) {
    messages.push({ severity: 'info', code: 'condition-not-evaluated', text: `The condition number is evaluated for the first ${conditions} solution(s) only (each costs a factorization); the other ${skipped} are proven isolated vertex by vertex.` });
  }
  if (excluded.length) {
    const v = limitViolations(pattern, excluded[0].angles);
    messages.push({
      severity: solutions.length || families.length ? 'info' : 'error',
      code: 'outside-hinge-limits',
      text: `${excluded.length} state(s) close the pattern but put a hinge past its limit (e.g. ${listLabels(pattern, v)}); they are listed apart.`,
    });
  }

  const report = (status: SolveStatus, dof: number, extra: Partial<SolveReport> = {}): SolveReport => ({
    status,
    dof,
    patternDof: patternDof!,
    solutions: extra.solutions ?? solutions,
    families: extra.families ?? families,
    search: search.summary,
    messages,
    iterations: search.iterations,
    ...(excluded.length ? { excluded } : {}),
    ...extra,
  });

  // 3. the report
  if (solutions.length === 0 && families.length === 0) {
    if (excluded.length) return report('unreachable', 0);
    return failure();
  }
  addSolutionNotes();
  const nD = drives.length;
  if (nD >= 2) {
    const dependence = isolated.find((a) => rankOfDrives(a) < nD) ?? familyPoints.find((a) => rankOfDrives(a) < nD);
    if (dependence) {
      const dependent = dependentDrives(problem, dependence.solution.angles, drives, movable, free);
      if (nD > patternDof) {
        messages.push({
          severity: 'warning',
          code: 'overspecified',
          text: `${nD} drives are set but the pattern has ${patternDof} degree(s) of freedom; the values are consistent. ${impliedText(dependent)}`,
        });
        return report('overspecified', dependence.localDof, { conflictingDrives: dependent });
      }
      messages.push({
        severity: 'warning',
        code: 'dependent-drives',
        text: `The drives ${listLabels(pattern, dependent)} cannot be set independently: at this state they move together.`,
      });
      return report('dependent-drives', dependence.localDof, { conflictingDrives: dependent });
    }
  }
  if (solutions.length === 0) {
    const f = families[0];
    const rep = familyPoints.find((a) => a.solution.angles === f.representative.angles) ?? familyPoints[0];
    const suggestions = suggestDrives(rep.local!, free);
    if (nD < patternDof) {
      messages.push({
        severity: 'warning',
        code: 'underspecified',
        text: `Underspecified: ${f.dof} degree(s) of freedom remain (${families.length === 1 ? 'one family' : `${families.length} families`} of states, not a list of solutions). Add a drive on ${listLabels(pattern, suggestions)} to complete the specification.`,
      });
      return report('underspecified', f.dof, { suggestedDrives: suggestions });
    }
    messages.push({
      severity: 'warning',
      code: 'not-isolated',
      text: `A whole family of states passes through these drive values (${f.dof} direction(s) left free, e.g. ${listLabels(pattern, suggestions)}); no isolated solution was found.`,
    });
    return report('not-isolated', f.dof, { suggestedDrives: suggestions });
  }
  const status: SolveStatus = solutions.length > 1 || families.length > 0 ? 'several-solutions' : 'solved';
  messages.unshift({ severity: 'info', code: status, text: statusText(status, solutions.length, families, search.summary) });
  if (singularIsolated) {
    messages.push({ severity: 'warning', code: 'singular-isolated', text: `${singularIsolated} solution(s) are singular (the Jacobian loses rank there) but isolated: no family passes through them with these drives.` });
  }
  return report(status, 0);

  function rankOfDrives(a: Analysed): number {
    detailState(ctx, a);
    if (a.allDof === undefined) {
      problem.evaluate(a.solution.angles);
      a.allDof = analyzeState(problem, movable).localDof;
    }
    return a.allDof - a.localDof;
  }

  function impliedText(dependent: number[]): string {
    // when every drive could be the implied one, say so rather than listing all of them as implied
    return `Implied by the others: ${dependent.length === drives.length ? `any one of ${listLabels(pattern, dependent)}` : listLabels(pattern, dependent)}.`;
  }

  function addSolutionNotes(): void {
    solutions.forEach((s, k) => {
      if (s.condition > NEAR_SINGULAR_CONDITION && s.localDof === 0) {
        messages.push({
          severity: 'warning',
          code: 'near-singular',
          text: `Solution #${k + 1} is near-singular (condition number ${s.condition.toExponential(2)}): small drive errors move the passive hinges a lot.`,
        });
      }
    });
    const locked = isolated.map((a, k) => (a.lockedDrives.length && drives.length === 1 ? k : -1)).filter((k) => k >= 0);
    if (locked.length) {
      messages.push({
        severity: 'info',
        code: 'drive-locked',
        text: `At solution(s) ${listIndices(locked)} the drive cannot move (the sheet is rigid there): those states are reached only by assembly, not by driving, and their sensitivities are least-squares values, not rates along a motion.`,
      });
    }
    const stacked = solutions.map((s, k) => (s.stacked?.length ? k : -1)).filter((k) => k >= 0);
    if (stacked.length) {
      messages.push({
        severity: 'info',
        code: 'stacked',
        text: `${stacked.length} solution(s) fold some creases flat (±180°), stacking their panels: ${listIndices(stacked)}.`,
      });
    }
  }

  function failure(): SolveReport {
    const best: LsqResult | undefined = search.best;
    const compAngles = best ? best.angles : Float64Array.from(problem.unknownCreases, () => 0);
    const comp: Candidate = { angles: best ? best.angles : compAngles, maxResidual: best ? best.maxResidual : Infinity };
    const compromise = analyseCandidate(ctx, comp).solution;
    const worstText = worstVerticesText(pattern, compromise.vertexResiduals);
    const nD = drives.length;
    // which single drives, released, leave a consistent pattern? (and by how much would they move?)
    const conflicting: number[] = [];
    let dependentWhenReleased = false;
    let withinPrecision: { drive: number; angles: Float64Array; implied: number; residual: number } | undefined;
    const precision = options.drivePrecision ?? DEFAULT_DRIVE_PRECISION;
    if (nD >= 2) {
      for (const d of drives) {
        const restSet = new Set(drives.filter((e) => e !== d).map((e) => e.crease));
        const sub = new ClosureProblem(pattern, (c) => restSet.has(c), problem.sys);
        const start = Float64Array.from(compAngles);
        for (const e of drives) start[e.crease] = e.value;
        const r = sub.solve(start, { maxStep: 0.3, maxIterations: 80 });
        if (!r.converged) continue;
        conflicting.push(d.crease);
        const implied = r.angles[d.crease];
        if (Math.abs(implied - d.value) <= precision + 1e-12 && !withinPrecision) withinPrecision = { drive: d.crease, angles: r.angles, implied, residual: r.maxResidual };
        sub.evaluate(r.angles);
        const all = analyzeState(sub, movable);
        const loc = analyzeState(sub, free);
        if (all.localDof - loc.localDof < nD) dependentWhenReleased = true;
      }
    }
    if (withinPrecision) {
      // consistent to the precision the drives were given in: overspecified, with the implied value stated
      const w = withinPrecision;
      const sol = analyseCandidate(ctx, { angles: w.angles, maxResidual: w.residual });
      const given = drives.find((d) => d.crease === w.drive)!.value;
      messages.push({
        severity: 'warning',
        code: 'overspecified',
        text: `${nD} drives are set but the pattern has ${patternDof} degree(s) of freedom. ${label(pattern, w.drive)} is implied by the others: ${(w.implied * DEG_PER_RAD).toFixed(6)}° (given ${(given * DEG_PER_RAD).toFixed(6)}°; they agree to within the drives' stated precision of ${(precision * DEG_PER_RAD).toPrecision(3)}°). The solution uses the implied value.`,
      });
      return report('overspecified', sol.localDof, { solutions: [sol.solution], families: [], conflictingDrives: [w.drive] });
    }
    if (nD > patternDof! || dependentWhenReleased) {
      const list = conflicting.length ? conflicting : drives.map((d) => d.crease);
      messages.push({
        severity: 'error',
        code: 'inconsistent',
        text: `Inconsistent: no state closes every vertex with these drives${search.summary.complete ? ' (the search was exhaustive)' : ''}. Conflicting drives: ${listLabels(pattern, list)}. Least-squares compromise leaves ${(comp.maxResidual * DEG_PER_RAD).toPrecision(3)}° at worst, at ${worstText}.`,
      });
      return report('inconsistent', 0, { compromise, conflictingDrives: list });
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
      text: `Unreachable: no real state has these drive values${search.summary.complete ? ' (the search was exhaustive)' : ''}.${rangeText} Least-squares compromise leaves ${(comp.maxResidual * DEG_PER_RAD).toPrecision(3)}° at worst, at ${worstText}.`,
    });
    return report('unreachable', 0, extra);
  }
}

function statusText(status: SolveStatus, count: number, families: Family[], search: SearchSummary): string {
  const sure = search.complete ? 'the list is complete' : search.limit !== undefined ? `the search stopped at its cap of ${search.limit}: more exist` : 'the search is not exhaustive for this pattern';
  const fam = families.length ? `; ${families.length === 1 ? 'a family' : `${families.length} families`} of states also pass${families.length === 1 ? 'es' : ''} through these drive values` : '';
  if (status === 'solved') return `Solved: the drives fix the pattern locally (${search.complete ? 'the only state' : 'the only state found; ' + sure}).`;
  return `${count} isolated solution${count === 1 ? '' : 's'} for these drive values (${sure})${fam}.`;
}

/** Matching the assignment first, then by sign pattern, then by angles. */
function compareSolutions(p: Solution, q: Solution): number {
  if (p.matchesAssignment !== q.matchesAssignment) return p.matchesAssignment ? -1 : 1;
  if (p.signs !== q.signs) return p.signs < q.signs ? -1 : 1;
  for (let i = 0; i < p.angles.length; i++) {
    const d = p.angles[i] - q.angles[i];
    if (Math.abs(d) > SAME_STATE_TOLERANCE) return d;
  }
  return 0;
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
