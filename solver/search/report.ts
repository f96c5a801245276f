// The solve report: what kind of specification it was, decided from every state found (never from the first
// alone), and the messages a person reads.
//
// Order of the tests: no state at all → inconsistent or unreachable (releasing each drive in turn finds the
// conflict; a release that lands within the drives' stated precision of the given value makes it
// overspecified instead); several drives that lose rank together at a state → overspecified (more drives
// than DOF) or dependent; no isolated state → underspecified (fewer drives than DOF) or not-isolated; else
// solved (one isolated state, no family) or several-solutions.

import type { Drive, Family, Message, Pattern, SearchSummary, SolveReport, SolveStatus } from '../types';
import { ClosureProblem, type LsqResult } from '../closure/newton';
import { analyzeState, NEAR_SINGULAR_CONDITION } from '../closure/analysis';
import { flatCone } from '../paths/cone';
import { followRay, type Candidate, type SearchOutcome } from './candidates';
import {
  analyseCandidate, dependentDrives, detailState, suggestDrives, worstVerticesText,
  type AnalysisContext, type Analysed, type Classification,
} from './classify';
import { limitViolations } from './states';

const DEG_PER_RAD = 180 / Math.PI;

export function listLabels(pattern: Pattern, cs: number[], max = 8): string {
  const names = cs.slice(0, max).map((c) => pattern.creases[c].label);
  return names.join(', ') + (cs.length > max ? ` and ${cs.length - max} more` : '');
}

function listIndices(ks: number[], max = 10): string {
  return ks.slice(0, max).map((k) => `#${k + 1}`).join(', ') + (ks.length > max ? ` and ${ks.length - max} more` : '');
}

export interface ReportContext extends AnalysisContext {
  movable: number[];
  search: SearchOutcome;
  cls: Classification;
  messages: Message[];
  /** drives that agree with the others to within this (radians) are overspecified, not inconsistent */
  drivePrecision: number;
}

/** The report for a classified search. */
export function buildReport(rc: ReportContext): SolveReport {
  const { pattern, drives, cls, messages } = rc;
  const solutions = cls.isolated.map((a) => a.solution);
  const families = cls.families;
  const report = (status: SolveStatus, dof: number, extra: Partial<SolveReport> = {}): SolveReport => ({
    status,
    dof,
    patternDof: cls.patternDof,
    solutions,
    families,
    search: rc.search.summary,
    messages,
    iterations: rc.search.iterations,
    ...(cls.excluded.length ? { excluded: cls.excluded.map((a) => a.solution) } : {}),
    ...extra,
  });
  detailNotes(rc);
  if (solutions.length === 0 && families.length === 0) {
    if (cls.excluded.length) return report('unreachable', 0);
    return failure(rc, report);
  }
  solutionNotes(rc);
  const nD = drives.length;
  if (nD >= 2) {
    const dependence = cls.isolated.find((a) => rankOfDrives(rc, a) < nD) ?? cls.familyPoints.find((a) => rankOfDrives(rc, a) < nD);
    if (dependence) {
      const dependent = dependentDrives(rc.problem, dependence.solution.angles, drives, rc.movable, rc.free);
      if (nD > cls.patternDof) {
        // when every drive could be the implied one, say so rather than listing all of them as implied
        const implied = dependent.length === nD ? `any one of ${listLabels(pattern, dependent)}` : listLabels(pattern, dependent);
        messages.push({
          severity: 'warning',
          code: 'overspecified',
          text: `${nD} drives are set but the pattern has ${cls.patternDof} degree(s) of freedom; the values are consistent. Implied by the others: ${implied}.`,
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
    const rep = cls.familyPoints.find((a) => a.solution.angles === f.representative.angles) ?? cls.familyPoints[0];
    const suggestions = suggestDrives(rep.local!, rc.free);
    if (nD < cls.patternDof) {
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
  messages.unshift({ severity: 'info', code: status, text: statusText(status, solutions.length, families, rc.search.summary) });
  if (cls.singularIsolated) {
    messages.push({ severity: 'warning', code: 'singular-isolated', text: `${cls.singularIsolated} solution(s) are singular (the Jacobian loses rank there) but isolated: no family passes through them with these drives.` });
  }
  return report(status, 0);
}

/** How many independent directions the drives see at a state (all-crease DOF minus local DOF). */
function rankOfDrives(rc: ReportContext, a: Analysed): number {
  detailState(rc, a);
  if (a.allDof === undefined) {
    rc.problem.evaluate(a.solution.angles);
    a.allDof = analyzeState(rc.problem, rc.movable).localDof;
  }
  return a.allDof - a.localDof;
}

function statusText(status: SolveStatus, count: number, families: Family[], search: SearchSummary): string {
  const sure = search.complete ? 'the list is complete' : search.limit !== undefined ? `the search stopped at its cap of ${search.limit}: more exist` : 'the search is not exhaustive for this pattern';
  const fam = families.length ? `; ${families.length === 1 ? 'a family' : `${families.length} families`} of states also pass${families.length === 1 ? 'es' : ''} through these drive values` : '';
  if (status === 'solved') return `Solved: the drives fix the pattern locally (${search.complete ? 'the only state' : 'the only state found; ' + sure}).`;
  return `${count} isolated solution${count === 1 ? '' : 's'} for these drive values (${sure})${fam}.`;
}

/** What was left out of the detail, and states past a hinge limit. */
function detailNotes({ pattern, cls, messages }: ReportContext): void {
  if (cls.undetailed) {
    messages.push({ severity: 'info', code: 'sensitivity-not-evaluated', text: `Sensitivities are computed for the first ${cls.detail === 1 ? 'solution only (the one shown in full)' : `${cls.detail} solutions only (those shown in full)`}; the other ${cls.undetailed} are proven isolated vertex by vertex.` });
  }
  if (cls.unconditioned) {
    messages.push({ severity: 'info', code: 'condition-not-evaluated', text: `The condition number is evaluated for the first ${cls.conditions === 1 ? 'solution' : `${cls.conditions} solutions`} only (each costs a factorization of the whole sheet); the other ${cls.unconditioned} are proven isolated vertex by vertex.` });
  }
  if (cls.excluded.length) {
    const v = limitViolations(pattern, cls.excluded[0].solution.angles);
    messages.push({
      severity: cls.isolated.length || cls.families.length ? 'info' : 'error',
      code: 'outside-hinge-limits',
      text: `${cls.excluded.length} state(s) close the pattern but put a hinge past its limit (e.g. ${listLabels(pattern, v)}); they are listed apart.`,
    });
  }
}

/** Near-singular, locked-drive and stacked solutions, in words. */
function solutionNotes({ drives, cls, messages }: ReportContext): void {
  cls.isolated.forEach(({ solution: s }, k) => {
    if (s.condition > NEAR_SINGULAR_CONDITION && s.localDof === 0) {
      messages.push({
        severity: 'warning',
        code: 'near-singular',
        text: `Solution #${k + 1} is near-singular (condition number ${s.condition.toExponential(2)}): small drive errors move the passive hinges a lot.`,
      });
    }
  });
  const locked = cls.isolated.map((a, k) => (a.lockedDrives.length && drives.length === 1 ? k : -1)).filter((k) => k >= 0);
  if (locked.length) {
    messages.push({
      severity: 'info',
      code: 'drive-locked',
      text: `At solution(s) ${listIndices(locked)} the drive cannot move (the sheet is rigid there): those states are reached only by assembly, not by driving, and their sensitivities are least-squares values, not rates along a motion.`,
    });
  }
  const stacked = cls.isolated.map((a, k) => (a.solution.stacked?.length ? k : -1)).filter((k) => k >= 0);
  if (stacked.length) {
    messages.push({
      severity: 'info',
      code: 'stacked',
      text: `${stacked.length} solution(s) fold some creases flat (±180°), stacking their panels: ${listIndices(stacked)}.`,
    });
  }
}

/** No state closes: inconsistent, unreachable, or overspecified to within the drives' precision. */
function failure(rc: ReportContext, report: (status: SolveStatus, dof: number, extra?: Partial<SolveReport>) => SolveReport): SolveReport {
  const { pattern, problem, drives, messages, movable, free } = rc;
  const best: LsqResult | undefined = rc.search.best;
  const compAngles = best ? best.angles : Float64Array.from(problem.unknownCreases, () => 0);
  const comp: Candidate = { angles: compAngles, maxResidual: best ? best.maxResidual : Infinity };
  const compromise = analyseCandidate(rc, comp).solution;
  const worstText = worstVerticesText(pattern, compromise.vertexResiduals);
  const exhaustive = rc.search.summary.complete ? ' (the search was exhaustive)' : '';
  const nD = drives.length;
  // which single drives, released, leave a consistent pattern? (and by how much would they move?)
  const conflicting: number[] = [];
  let dependentWhenReleased = false;
  let withinPrecision: { drive: number; angles: Float64Array; implied: number; residual: number } | undefined;
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
      if (Math.abs(implied - d.value) <= rc.drivePrecision + 1e-12 && !withinPrecision) withinPrecision = { drive: d.crease, angles: r.angles, implied, residual: r.maxResidual };
      sub.evaluate(r.angles);
      const all = analyzeState(sub, movable);
      const loc = analyzeState(sub, free);
      if (all.localDof - loc.localDof < nD) dependentWhenReleased = true;
    }
  }
  if (withinPrecision) {
    // consistent to the precision the drives were given in: overspecified, with the implied value stated
    const w = withinPrecision;
    const sol = analyseCandidate(rc, { angles: w.angles, maxResidual: w.residual });
    const given = drives.find((d) => d.crease === w.drive)!.value;
    messages.push({
      severity: 'warning',
      code: 'overspecified',
      text: `${nD} drives are set but the pattern has ${rc.cls.patternDof} degree(s) of freedom. ${pattern.creases[w.drive].label} is implied by the others: ${(w.implied * DEG_PER_RAD).toFixed(6)}° (given ${(given * DEG_PER_RAD).toFixed(6)}°; they agree to within the drives' stated precision of ${(rc.drivePrecision * DEG_PER_RAD).toPrecision(3)}°). The solution uses the implied value.`,
    });
    return report('overspecified', sol.localDof, { solutions: [sol.solution], families: [], conflictingDrives: [w.drive] });
  }
  if (nD > rc.cls.patternDof || dependentWhenReleased) {
    const list = conflicting.length ? conflicting : drives.map((d) => d.crease);
    messages.push({
      severity: 'error',
      code: 'inconsistent',
      text: `Inconsistent: no state closes every vertex with these drives${exhaustive}. Conflicting drives: ${listLabels(pattern, list)}. Least-squares compromise leaves ${(comp.maxResidual * DEG_PER_RAD).toPrecision(3)}° at worst, at ${worstText}.`,
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
    text: `Unreachable: no real state has these drive values${exhaustive}.${rangeText} Least-squares compromise leaves ${(comp.maxResidual * DEG_PER_RAD).toPrecision(3)}° at worst, at ${worstText}.`,
  });
  return report('unreachable', 0, extra);
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
