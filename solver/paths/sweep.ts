// Following a family of folded states as one drive moves (the other drives held): samples solved exactly at
// the requested drive values, the rate and curvature of every hinge, the condition number, and the events
// on the way (turning point, branch point, hinge limit, folded flat, corrector failure).
//
// Two methods, chosen per pattern:
//  - propagation (solver/paths/propagate.ts) for meshes of degree-4 vertices with nothing held: every sample is
//    solved in closed form vertex by vertex, O(creases), and checked on the closure residual;
//  - pseudo-arclength continuation on the sparse Jacobian otherwise (and wherever propagation stops):
//    tangent from the null space of J (held-column split: J_{−k}·b = −J_k, t = (1, b)/|…|), a predictor
//    step along it, a Newton corrector on {closure, t·(y − y₀) = h}, and a step length adapted to the
//    corrector. Normal-matrix factors are reused along the path as preconditioners for conjugate gradients.
// Samples are never interpolated: each is a Newton solve (or a propagation) at exactly its drive value.

import type { Drive, Message, Pattern } from '../types';
import { buildClosureSystem, type ClosureSystem } from '../closure/blocks';
import { ClosureProblem, RESIDUAL_TOLERANCE } from '../closure/newton';
import { NEAR_SINGULAR_CONDITION } from '../closure/analysis';
import { planPropagation, propagate, propagationWork, type PropagationPlan, type PropagationWork, type RootChoice } from './propagate';
import { ConditionTracker, NormalSystem, dot } from './linear';
import { branchesAt, flatBranches, tangentMatchesAssignment, type Branch } from './branches';
import { matchesAssignment, solveDrives } from '../search/solve';
import { wrapAngle } from '../math/rotation';
import type { ChecksSummary, StateChecks } from '../outputs/path-physics';

const DEG = 180 / Math.PI;
/** A sample is kept when its largest vertex residual is at most this (radians); RESIDUAL_TOLERANCE is 1e-10. */
const SAMPLE_TOLERANCE = RESIDUAL_TOLERANCE;
/** Newton polishes samples and continuation points to this when it can (radians). */
const POLISH = 1e-13;
/** Largest drive step between two propagation solves (radians): keeps the root choice on the branch. */
const PROPAGATION_STEP = 2 / DEG;
/** Continuation step limits: arclength over the unknowns (radians), and the largest change of one angle per step. */
const H_MIN = 1e-9;
const MAX_ANGLE_STEP = 0.15;
/** At a drive of ±180°, a crease this close (radians) to ±180° or 0 on the path is taken to be exactly there. */
const FLAT_END_SNAP = 0.05;
/** A crease this close to ±180° is folded flat. */
const FLAT_FOLDED = 1e-7;
/** Samples this close to flat (radians) on a branch from flat come from the branch's series; see seriesSamples. */
const SERIES_LIMIT = 1e-3;
/** where the series' third-order term is fitted (radians, 0.5°) */
const SERIES_ANCHOR = 0.5 / DEG;
/** Samples above this count are refused (a request that would not fit in memory). */
export const MAX_SAMPLES = 100_000;

export type SweepMethod = 'propagate' | 'continue';

export interface SweepOptions {
  /** crease index of the drive */
  drive: number;
  /** radians */
  from: number;
  to: number;
  /** sample spacing in radians (> 0); or give `samples` */
  step?: number;
  /** explicit sample drive values (radians, monotonic from → to) */
  samples?: number[];
  /** other drives held at their values */
  holds?: Drive[];
  /** branch id (from flatBranches with the same holds) when the sweep starts at the flat state */
  branch?: number;
  /** with holds that are not zero: which solution of the start (1-based, in solveDrives order) */
  solution?: number;
  /** at a flat start without `branch`: take the ray closest to this direction (over creases) */
  prefer?: Float64Array;
  /** a closed state to start from (full crease vector); the sweep first follows it to `from` */
  start?: Float64Array;
  /** 'auto' (default): propagation when it applies, else continuation */
  method?: 'auto' | SweepMethod;
  /** hinge curvature d²ρ/dθ² per sample (needed for hinge accelerations); default false */
  curvature?: boolean;
  /** evaluate the condition number every k samples and at the last, Infinity for the last only, 0 for never (default: see defaultConditionEvery) */
  conditionEvery?: number;
  /** analyse the rays at branch points found (default true) */
  analyzeBranches?: boolean;
}

export interface SweepSample {
  /** drive value, radians (exactly the requested value) */
  drive: number;
  /** fold angle of every crease, radians */
  angles: Float64Array;
  maxResidual: number;
  /** dρ/dθ of every crease (rad/rad = deg/deg); 1 for the drive, 0 for held creases */
  rates: Float64Array;
  /** d²ρ/dθ² of every crease (rad/rad²), when asked for */
  curvature?: Float64Array;
  /** 2-norm condition number of the free creases' Jacobian; NaN when not evaluated at this sample */
  condition: number;
  nearSingular: boolean;
  /** what a caller's onSample hook found here (contact, torque), when it checks */
  checks?: StateChecks;
}

export type SweepEventType = 'turning-point' | 'branch-point' | 'hinge-limit' | 'folded-flat' | 'corrector-failed' | 'contact';

export interface SweepEvent {
  type: SweepEventType;
  /** drive value where it happens, radians */
  drive: number;
  text: string;
  crease?: number;
  /** the state at the event */
  angles: Float64Array;
  /** rays leaving a branch point */
  branches?: Branch[];
  /** contact: the two panels, a point of the contact and their distance there (file units) */
  panels?: [number, number];
  point?: [number, number, number];
  distance?: number;
}

export type SweepStatus = 'complete' | 'partial' | 'stopped' | 'failed';

export interface SweepResult {
  drive: number;
  samples: SweepSample[];
  events: SweepEvent[];
  messages: Message[];
  /** complete: every sample; partial: the path ended early (an event says why); stopped: interrupted; failed: no start */
  status: SweepStatus;
  requested: number;
  method: SweepMethod | 'mixed';
  branch?: { id?: number; name: string; matchesAssignment: boolean; text: string };
  conditionEvery: number;
  stats: { steps: number; factorizations: number; propagations: number };
  /** what the caller's per-sample checks found over the path (contact, peak torque), when it checks */
  checks?: ChecksSummary;
}

export interface SweepHooks {
  onProgress?(done: number, total: number): void;
  shouldStop?(): boolean;
  /** called with every sample as it is recorded; 'stop' ends the path there (status partial) */
  onSample?(sample: SweepSample): 'stop' | void;
}

/**
 * Samples between condition-number evaluations by default: every sample up to 400 free creases, one in ⌈n/100⌉
 * up to 4000 (and the last), and above that the last sample only (Infinity): an evaluation costs a
 * normal-matrix factorization and a few eigen-iterations, far more than a propagated sample on a large sheet.
 * Ask for more with conditionEvery; 0 evaluates none.
 */
export function defaultConditionEvery(unknowns: number): number {
  return unknowns <= 400 ? 1 : unknowns <= 4000 ? Math.ceil(unknowns / 100) : Infinity;
}

/** The requested drive values from → to every `step` (the end value included, also when the step does not divide). */
export function sampleValues(from: number, to: number, step: number): number[] {
  const out: number[] = [];
  if (from === to) return [from];
  const dir = Math.sign(to - from);
  const span = Math.abs(to - from);
  const count = Math.floor(span / step + 1e-9);
  for (let k = 0; k <= count; k++) out.push(from + dir * k * step);
  if (Math.abs(out[out.length - 1] - to) > 1e-12) out.push(to);
  else out[out.length - 1] = to;
  return out;
}

export function sweep(pattern: Pattern, options: SweepOptions, hooks: SweepHooks = {}): SweepResult {
  return runSteps(sweepSteps(pattern, options, hooks));
}

/**
 * The sweep as a sequence of steps (one per sample, or per continuation step): a caller that must stay
 * responsive (a command line waiting for Ctrl-C, a worker) resumes it a few at a time; `hooks.shouldStop`
 * is asked before every step and stops the sweep with what it has.
 */
export function* sweepSteps(pattern: Pattern, options: SweepOptions, hooks: SweepHooks = {}): Generator<void, SweepResult> {
  const run = createSweep(pattern, options, hooks);
  while (!run.finished) {
    if (hooks.shouldStop?.()) { run.stop(); break; }
    run.advance();
    hooks.onProgress?.(run.done, run.total);
    yield;
  }
  return run.result();
}

/** Drive a step sequence to its end and return its result. */
export function runSteps<T>(steps: Generator<void, T>): T {
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}

export function createSweep(pattern: Pattern, options: SweepOptions, hooks: SweepHooks = {}): SweepRun {
  return new SweepRun(pattern, options, hooks);
}

interface Point {
  /** full crease vector */
  y: Float64Array;
  /** tangent over the unknowns (continuation), oriented along the travel */
  t?: Float64Array;
  drive: number;
}

export class SweepRun {
  readonly total: number;
  finished = false;
  private readonly targets: number[];
  private nextTarget = 0;
  private readonly samples: SweepSample[] = [];
  private readonly events: SweepEvent[] = [];
  private readonly messages: Message[] = [];
  private status: SweepStatus = 'complete';
  private readonly sys: ClosureSystem;
  private readonly problem: ClosureProblem;
  private readonly d: number;
  private readonly n: number;
  private readonly holdSet: Set<number>;
  private method: SweepMethod = 'continue';
  private usedMethods = new Set<SweepMethod>();
  private plan?: PropagationPlan;
  private work?: PropagationWork;
  private branchInfo?: SweepResult['branch'];
  private conditionEvery: number;
  private steps = 0;
  private propagations = 0;
  // continuation state
  private point?: Point;
  private h = 0.02;
  /** +1 when the drive should increase, −1 when it should decrease */
  private travel = 1;
  private approaching = true;
  // propagation state: the last two accepted states for the root choice
  private last?: { s: number; x: Float64Array };
  private before?: { s: number; x: Float64Array };
  private firstReference?: Float64Array;
  private firstAssignment = false;
  // linear algebra, built on first use
  private nsCurve?: NormalSystem;
  private nsFixed?: NormalSystem;
  private nsProp?: NormalSystem;
  private trackerFixed?: ConditionTracker;
  private trackerProp?: ConditionTracker;
  private sigmaHistory: { s: number; sigma: number }[] = [];
  private readonly rowsTmp: Float64Array;

  constructor(readonly pattern: Pattern, readonly options: SweepOptions, private readonly hooks: SweepHooks = {}) {
    const o = options;
    this.holdSet = new Set((o.holds ?? []).map((h) => h.crease));
    this.sys = buildClosureSystem(pattern);
    this.problem = new ClosureProblem(pattern, (c) => this.holdSet.has(c), this.sys);
    this.d = this.problem.unknownOf[o.drive] ?? -1;
    this.n = this.problem.unknownCount;
    this.rowsTmp = new Float64Array(3 * this.sys.blockCount);
    this.targets = o.samples ? [...o.samples] : sampleValues(o.from, o.to, o.step ?? 1 / DEG);
    this.total = this.targets.length;
    this.conditionEvery = Math.max(0, Math.round(o.conditionEvery ?? defaultConditionEvery(this.n)));
    if (this.conditionEvery === Infinity) {
      this.messages.push({ severity: 'info', code: 'condition-last-only', text: `With ${this.n} free creases the condition number is evaluated at the last sample only by default (each evaluation costs a factorization); ask for it every k samples with the condition option. Near-singular flags come from every vertex's own pivots at every sample.` });
    }
    const problem = this.validate();
    if (problem) {
      this.fail('invalid-sweep', problem);
      return;
    }
    this.setUp();
  }

  get done(): number {
    return this.samples.length;
  }

  private validate(): string | undefined {
    const o = this.options;
    const c = this.pattern.creases[o.drive];
    if (!c) return `The drive is not a crease of the pattern.`;
    if (c.assignment === 'B' || c.assignment === 'F') return `The drive ${c.label} is ${c.assignment === 'B' ? 'a boundary edge' : 'held flat'} and cannot be driven.`;
    if (this.holdSet.has(o.drive)) return `The drive ${c.label} is also held.`;
    for (const h of o.holds ?? []) {
      const hc = this.pattern.creases[h.crease];
      if (!hc) return 'A held crease is not a crease of the pattern.';
      if (!Number.isFinite(h.value) || Math.abs(h.value) > Math.PI + 1e-12) return `The held value of ${hc.label} is outside −180° … 180°.`;
    }
    for (const v of [o.from, o.to, ...(o.samples ?? [])]) {
      if (!Number.isFinite(v) || Math.abs(v) > Math.PI + 1e-12) return `A drive value (${(v * DEG).toFixed(6)}°) is outside −180° … 180°.`;
    }
    if (!o.samples && !(o.step !== undefined && o.step > 0 && Number.isFinite(o.step))) return 'The step must be a positive number.';
    if (this.targets.length > MAX_SAMPLES) return `${this.targets.length} samples is more than the ${MAX_SAMPLES} a sweep takes; use a larger step.`;
    if (this.targets.length === 0) return 'No sample values were asked for.';
    for (let i = 2; i < this.targets.length; i++) {
      if (Math.sign(this.targets[i] - this.targets[i - 1]) !== Math.sign(this.targets[1] - this.targets[0])) return 'Sample values must run one way, from → to.';
    }
    if (o.start && o.start.length !== this.pattern.creases.length) return 'The start state does not have one angle per crease.';
    return undefined;
  }

  private fail(code: string, text: string): void {
    this.messages.push({ severity: 'error', code, text });
    this.status = 'failed';
    this.finished = true;
  }

  private get label(): string {
    return this.pattern.creases[this.options.drive].label;
  }

  // ---------------------------------------------------------------------------------------------------
  // start

  private setUp(): void {
    const o = this.options;
    const wantPropagate = (o.method ?? 'auto') !== 'continue' && this.holdSet.size === 0;
    if (wantPropagate) {
      const r = planPropagation(this.pattern, this.sys, o.drive, (c) => this.holdSet.has(c));
      if (r.plan) {
        this.plan = r.plan;
        this.work = propagationWork(this.sys, this.pattern.creases.length);
        this.method = 'propagate';
      } else if (o.method === 'propagate') {
        this.messages.push({ severity: 'info', code: 'propagation-not-applicable', text: `Propagation does not apply (${r.reason}); using continuation.` });
      }
    } else if (o.method === 'propagate') {
      this.messages.push({ severity: 'info', code: 'propagation-not-applicable', text: 'Propagation does not apply with held creases; using continuation.' });
    }
    const first = this.targets[0];
    const holdsZero = (o.holds ?? []).every((h) => h.value === 0);

    // a start at the flat state is a flat start: the branch comes from the flat state's rays
    const startIsFlat = !!o.start && holdsZero && o.start.every((v, c) => Math.abs(v) < 1e-6 || this.pattern.creases[c].assignment === 'B');
    if (o.start && !startIsFlat) {
      const y = Float64Array.from(o.start);
      for (const h of o.holds ?? []) y[h.crease] = h.value;
      const fixed = new ClosureProblem(this.pattern, (c) => this.holdSet.has(c) || c === o.drive, this.sys);
      const r = fixed.solve(y, { polishTolerance: POLISH, maxStep: 0.05, wrap: false });
      if (!r.converged) {
        this.fail('start-not-closed', `The start state does not close (largest vertex residual ${r.maxResidual.toExponential(2)} rad after polishing).`);
        return;
      }
      if (o.branch !== undefined) {
        // a branch leaving a (singular) start state: a small step along its ray, then continuation
        const analysis = branchesAt(this.pattern, r.angles, { held: this.holdSet, drive: o.drive });
        const b = analysis.branches.find((x) => x.id === o.branch);
        if (!b) {
          this.fail('unknown-branch', `There is no branch ${o.branch} at the start state; branches: ${analysis.branches.map((x) => `${x.id} (${x.name})`).join(', ') || 'none'}.`);
          return;
        }
        const s0 = r.angles[o.drive];
        const dir = first !== s0 ? Math.sign(first - s0) : this.targets.length > 1 ? Math.sign(this.targets[1] - this.targets[0]) : 1;
        if (!(Math.sign(b.tangent[o.drive]) === dir && Math.abs(b.tangent[o.drive]) > 1e-9)) {
          this.fail('branch-does-not-drive', `Branch ${b.id} (${b.name}) does not move ${this.label} ${dir > 0 ? 'up' : 'down'} from the start state (towards the samples); branches that do: ${analysis.branches.filter((x) => Math.sign(x.tangent[o.drive]) === dir && Math.abs(x.tangent[o.drive]) > 1e-9).map((x) => `${x.id} (${x.name})`).join(', ') || 'none'}.`);
          return;
        }
        this.branchInfo = { id: b.id, name: b.name, matchesAssignment: b.matchesAssignment, text: analysis.groups.find((g) => g.name === b.group)?.text ?? '' };
        this.method = 'continue';
        const off = this.stepAlongRay(r.angles, b.tangent);
        if (!off) { this.fail('start-failed', `No closed state was found a small step along branch ${b.id} from the start state.`); return; }
        this.beginAt(off, b.tangent);
        return;
      }
      // the samples lie across the flat state from the start: the start's curve reaches flat along one of the
      // flat state's branches, where a solve could step onto another; go on from flat along that branch
      const s0 = r.angles[o.drive];
      if (holdsZero && s0 !== 0 && first * s0 <= 0) {
        const through = this.flatBranchThrough(r.angles);
        if (through) {
          this.travel = first !== 0 ? Math.sign(first) : Math.sign(this.targets[this.targets.length - 1] || 1);
          const ray = Math.sign(through.tangent[o.drive]) === this.travel ? through.tangent : through.tangent.map((x) => -x);
          const twin = Math.sign(through.tangent[o.drive]) === this.travel ? through : through.opposite ?? through;
          this.branchInfo = { id: twin.id, name: twin.name, matchesAssignment: twin.matchesAssignment, text: `the curve through the given start state, from flat along branch ${twin.name}` };
          this.messages.push({ severity: 'info', code: 'start-through-flat', text: `The start state's curve reaches the flat state along branch ${through.name}; the samples on the far side of flat follow ${twin.name}.` });
          this.beginAtFlat(ray);
          return;
        }
      }
      this.branchInfo = { name: 'start state', matchesAssignment: tangentMatchesAssignment(this.pattern, r.angles), text: 'the family through the given start state' };
      this.beginAt(r.angles, null);
      return;
    }
    if (!holdsZero) {
      // start from a solved state at the first sample value
      const drives = [...(o.holds ?? []), { crease: o.drive, value: first }];
      const report = solveDrives(this.pattern, drives);
      if (!report.solutions.length) {
        this.fail('start-unreachable', `No state has ${this.label} = ${(first * DEG).toFixed(6)}° with the held values (${report.status}).`);
        return;
      }
      let k = (o.solution ?? 0) - 1;
      if (o.solution === undefined) {
        const matching = report.solutions.map((s, i) => (s.matchesAssignment ? i : -1)).filter((i) => i >= 0);
        if (matching.length > 1) {
          this.messages.push({ severity: 'warning', code: 'branch-not-unique', text: `${matching.length} start states match the mountain/valley assignment (solutions ${matching.map((i) => i + 1).join(', ')}); following solution ${matching[0] + 1}. Choose another with the solution option.` });
        }
        if (matching.length === 0) {
          this.fail('no-matching-branch', `None of the ${report.solutions.length} start states matches the mountain/valley assignment; choose one with the solution option (1 … ${report.solutions.length}).`);
          return;
        }
        k = matching[0];
      }
      if (k < 0 || k >= report.solutions.length) {
        this.fail('bad-solution', `There are ${report.solutions.length} start solutions; solution ${o.solution} does not exist.`);
        return;
      }
      const sol = report.solutions[k];
      this.branchInfo = { id: k + 1, name: `solution ${k + 1}`, matchesAssignment: sol.matchesAssignment, text: `solution ${k + 1} of the start values` };
      this.beginAt(sol.angles, null);
      return;
    }
    // flat start: pick a ray
    this.travel = first !== 0 ? Math.sign(first) : Math.sign(this.targets[this.targets.length - 1] || 1);
    const ray = this.pickFlatRay();
    if (this.finished) return;
    this.beginAtFlat(ray);
  }

  private pickFlatRay(): Float64Array | null {
    const o = this.options;
    const sense = this.travel;
    // without a branch or a direction to follow, the search vertex by vertex stops at the first curve that
    // moves the drive this way with the assignment's signs (the ids of what it found are those of the full list)
    const wanted = (t: Float64Array) => Math.abs(t[o.drive]) > 1e-9 && tangentMatchesAssignment(this.pattern, Math.sign(t[o.drive]) === sense ? t : t.map((x) => -x));
    const analysis = flatBranches(this.pattern, { held: this.holdSet, drive: o.drive, ...(o.branch === undefined && !o.prefer ? { until: wanted } : {}) });
    const moving = analysis.branches.filter((b) => Math.abs(b.tangent[o.drive]) > 1e-9 && Math.sign(b.tangent[o.drive]) === sense);
    const list = (bs: Branch[]) => bs.map((b) => `${b.id} (${b.name}${b.matchesAssignment ? ', matches' : ''})`).join(', ');
    if (o.branch !== undefined) {
      const b = analysis.branches.find((x) => x.id === o.branch);
      if (!b) {
        this.fail('unknown-branch', `There is no branch ${o.branch} at the flat state; branches: ${list(analysis.branches) || 'none'}.`);
        return null;
      }
      if (!moving.includes(b)) {
        this.fail('branch-does-not-drive', `Branch ${b.id} (${b.name}) does not move ${this.label} ${sense > 0 ? 'up' : 'down'} from flat; branches that do: ${list(moving) || 'none'}.`);
        return null;
      }
      this.branchInfo = { id: b.id, name: b.name, matchesAssignment: b.matchesAssignment, text: analysis.groups.find((g) => g.name === b.group)?.text ?? '' };
      return b.tangent;
    }
    if (o.prefer && moving.length) {
      // continuity with a neighbouring path (a grid row next to this one)
      const score = (b: Branch) => b.tangent.reduce((acc, x, c) => acc + x * o.prefer![c], 0);
      const b = moving.reduce((p, q) => (score(q) > score(p) ? q : p));
      this.branchInfo = { id: b.id, name: b.name, matchesAssignment: b.matchesAssignment, text: analysis.groups.find((g) => g.name === b.group)?.text ?? '' };
      return b.tangent;
    }
    // curves before straight lines folding alone, then by id
    const matching = moving.filter((b) => b.matchesAssignment && b.verified).sort((p, q) => Number(p.kind === 'line') - Number(q.kind === 'line') || p.id - q.id);
    if (matching.length === 0) {
      if (analysis.partial && this.pattern.creases.some((c) => c.assignment === 'M' || c.assignment === 'V')) {
        // a sheet too large for the full flat analysis: start by the assignment's signs (vertex by vertex
        // for a degree-4 mesh, else as the first Newton guess a small step from flat)
        this.messages.push({ severity: 'info', code: 'branch-by-assignment', text: 'The start follows the mountain/valley assignment (the flat-state analysis is partial for a sheet this large).' });
        this.branchInfo = { name: 'assignment', matchesAssignment: true, text: 'the mode whose signs follow the assignment' };
        this.firstAssignment = true;
        return null;
      }
      this.fail('no-matching-branch', `No branch from flat moves ${this.label} ${sense > 0 ? 'up' : 'down'} with signs that match the mountain/valley assignment; choose one with the branch option: ${list(moving) || 'none moves the drive'}.`);
      return null;
    }
    if (matching.length > 1) {
      this.messages.push({ severity: 'warning', code: 'branch-not-unique', text: `${matching.length} branches from flat match the assignment: ${list(matching)}; following ${matching[0].id}. Choose another with the branch option.` });
    } else if (analysis.messages.some((m) => m.code === 'branches-stopped')) {
      this.messages.push({ severity: 'info', code: 'branch-first-matching', text: `Following the first branch found vertex by vertex that moves ${this.label} ${sense > 0 ? 'up' : 'down'} with the assignment's signs (${matching[0].id}, ${matching[0].name}); \`hingeplan branches\` lists every branch, and another is chosen with the branch option.` });
    }
    const b = matching[0];
    this.branchInfo = { id: b.id, name: b.name, matchesAssignment: true, text: analysis.groups.find((g) => g.name === b.group)?.text ?? '' };
    return b.tangent;
  }

  /** Start on a ray at the flat state (or by the assignment, when ray is null). */
  private beginAtFlat(ray: Float64Array | null): void {
    const flat = new Float64Array(this.pattern.creases.length);
    const first = this.targets[0];
    if (ray) this.firstReference = ray;
    if (first === 0) {
      // the flat state itself is the first sample: rates are the ray's first-order ratios; its curvature is
      // zero because the mirror image (z → −z) of the curve is the same curve run backwards
      const rates = new Float64Array(flat.length);
      if (ray) for (let c = 0; c < flat.length; c++) rates[c] = ray[c] / ray[this.options.drive];
      else rates[this.options.drive] = 1;
      this.pushSample({ drive: 0, angles: flat, maxResidual: 0, rates, curvature: this.options.curvature ? new Float64Array(flat.length) : undefined, condition: Infinity, nearSingular: true });
      this.nextTarget = 1;
      this.messages.push({ severity: 'info', code: 'flat-sample', text: 'The flat state is singular: its rates are the first-order ratios of the branch followed.' });
    }
    if (ray) this.seriesSamples(ray);
    if (this.finished) return;
    if (this.method === 'propagate') {
      this.last = { s: 0, x: flat };
      this.approaching = this.targets[this.nextTarget] !== 0;
      return;
    }
    // continuation: solve a small step along the ray, then continue
    const next = this.targets[this.nextTarget] ?? first;
    const s1 = this.travel * Math.min(0.5 / DEG, Math.abs(next) || 0.5 / DEG);
    const guess = new Float64Array(flat.length);
    if (ray) for (let c = 0; c < flat.length; c++) guess[c] = (s1 / ray[this.options.drive]) * ray[c];
    else for (const c of this.pattern.creases) guess[c.index] = c.assignment === 'V' ? Math.abs(s1) : c.assignment === 'M' ? -Math.abs(s1) : 0;
    for (const h of this.options.holds ?? []) guess[h.crease] = h.value;
    guess[this.options.drive] = s1;
    const fixed = new ClosureProblem(this.pattern, (c) => this.holdSet.has(c) || c === this.options.drive, this.sys);
    const r = fixed.solve(guess, { polishTolerance: POLISH, maxStep: Math.abs(s1) / 2, maxIterations: 80, wrap: false });
    if (!r.converged) {
      this.fail('start-failed', `No closed state was found a small step from flat along the chosen branch (residual ${r.maxResidual.toExponential(2)} rad).`);
      return;
    }
    if (!ray && this.branchInfo) this.branchInfo.matchesAssignment = matchesAssignment(this.pattern, r.angles);
    this.beginAt(r.angles, ray);
  }

  /**
   * The flat-state branch along which the curve through `start` reaches flat: the curve is followed to
   * SERIES_ANCHOR from flat, where x(θ)/θ is the branch's tangent to O(θ²), and the nearest branch of the flat
   * analysis is taken (and its opposite sense); undefined when the curve does not reach there or no branch is near.
   */
  private flatBranchThrough(start: Float64Array): (Branch & { opposite?: Branch }) | undefined {
    const d = this.options.drive;
    const s0 = start[d];
    const near = Math.sign(s0) * SERIES_ANCHOR;
    const approach = sweep(this.pattern, { drive: d, from: near, to: near, samples: [near], start, holds: this.options.holds, conditionEvery: 0, analyzeBranches: false, method: this.options.method });
    const x = approach.samples[0]?.angles;
    if (!x) return undefined;
    let norm = 0;
    for (const v of x) norm += v * v;
    norm = Math.sqrt(norm);
    const analysis = flatBranches(this.pattern, { held: this.holdSet, drive: d });
    let best: Branch | undefined, bestDot = 0;
    for (const b of analysis.branches) {
      let dot = 0;
      for (let c = 0; c < x.length; c++) dot += (b.tangent[c] * x[c]) / norm;
      if (dot > bestDot) { bestDot = dot; best = b; }
    }
    if (!best || bestDot < 0.999) return undefined;
    const opposite = analysis.branches.find((b) => b.group === best!.group && b.id !== best!.id);
    return { ...best, ...(opposite ? { opposite } : {}) };
  }

  /**
   * Samples within SERIES_LIMIT of flat on a branch from flat. Near the singular flat state the closure
   * residual is second order in the distance, so a solve there (Newton, or the closed form, whose two roots
   * merge) fixes the state only to about the square root of the tolerance: off the branch by as much as the
   * drive itself at 1e-6°. The branch is odd in the drive (its mirror image z → −z is the same curve run
   * backwards), so x(θ) = θ·r + θ³·c + O(θ⁵), with r the ray's ratios and c from a well-solved state at
   * SERIES_ANCHOR; at |θ| ≤ 1e-3 rad the truncation is below rounding.
   */
  private seriesSamples(ray: Float64Array): void {
    const d = this.options.drive;
    const tiny = () => {
      const t = this.targets[this.nextTarget];
      return t !== undefined && t !== 0 && Math.abs(t) <= SERIES_LIMIT && Math.sign(t) === this.travel;
    };
    if (!tiny()) return;
    const n = this.pattern.creases.length;
    const r = ray.map((x) => x / ray[d]);
    const s1 = this.travel * SERIES_ANCHOR;
    let x1: Float64Array | undefined;
    if (this.method === 'propagate') {
      x1 = this.propagateAt(s1, { s: 0, x: new Float64Array(n) }, undefined)?.x;
    } else {
      const guess = r.map((v) => v * s1);
      for (const h of this.options.holds ?? []) guess[h.crease] = h.value;
      const fixed = new ClosureProblem(this.pattern, (c) => this.holdSet.has(c) || c === d, this.sys);
      const res = fixed.solve(guess, { polishTolerance: POLISH, maxStep: SERIES_ANCHOR / 2, maxIterations: 80, wrap: false });
      if (res.converged) x1 = res.angles;
    }
    if (!x1) return;
    const c3 = x1.map((v, c) => (this.holdSet.has(c) || c === d ? 0 : (v - s1 * r[c]) / (s1 * s1 * s1)));
    while (tiny()) {
      const t = this.targets[this.nextTarget];
      const angles = r.map((v, c) => (this.holdSet.has(c) ? 0 : t * v + t * t * t * c3[c]));
      angles[d] = t;
      for (const h of this.options.holds ?? []) angles[h.crease] = h.value;
      const rates = r.map((v, c) => (this.holdSet.has(c) ? 0 : v + 3 * t * t * c3[c]));
      rates[d] = 1;
      const curvature = this.options.curvature ? c3.map((v) => 6 * t * v) : undefined;
      const maxResidual = this.problem.evaluate(angles, false);
      this.pushSample({ drive: t, angles, maxResidual, rates, ...(curvature ? { curvature } : {}), condition: Infinity, nearSingular: true });
      this.nextTarget++;
    }
    this.messages.push({ severity: 'info', code: 'near-flat-series', text: `Samples within ${(SERIES_LIMIT * DEG).toPrecision(3)}° of flat come from the branch's series through flat (θ·r + θ³·c, fitted at ${(SERIES_ANCHOR * DEG).toPrecision(3)}°): a solve cannot tell the branch from its neighbours that close so near the singular flat state.` });
    if (this.nextTarget >= this.targets.length) this.finish();
  }

  /** A closed state a small step (1e-3 rad) along the ray t from y: closure and t·(x − y) = step. */
  private stepAlongRay(y: Float64Array, t: Float64Array): Float64Array | undefined {
    const n = this.n;
    const uc = this.problem.unknownCreases;
    const coef = new Float64Array(n);
    let target = 0;
    for (let a = 0; a < n; a++) { coef[a] = t[uc[a]]; target += t[uc[a]] * y[uc[a]]; }
    const step = 1e-3;
    const guess = Float64Array.from(y);
    for (let a = 0; a < n; a++) guess[uc[a]] += step * t[uc[a]];
    const r = this.problem.solve(guess, { constraints: [{ coef, target: target + step }], maxStep: step / 4, maxIterations: 80, polishTolerance: POLISH, wrap: false });
    return r.converged ? r.angles : undefined;
  }

  /** Continuation (or propagation) from a closed state y. */
  private beginAt(y: Float64Array, ray: Float64Array | null): void {
    const s0 = y[this.options.drive];
    const first = this.targets[this.nextTarget] ?? this.targets[0];
    if (s0 !== first) this.travel = Math.sign(first - s0);
    else this.travel = this.targets.length > 1 ? Math.sign(this.targets[1] - this.targets[0]) : 1;
    this.approaching = s0 !== first;
    if (this.method === 'propagate') {
      this.last = { s: s0, x: Float64Array.from(y) };
      return;
    }
    this.startContinuation(y, ray);
  }

  private startContinuation(y: Float64Array, ray: Float64Array | null): void {
    this.problem.evaluate(y, true);
    let prefer: Float64Array | null = null;
    if (ray) {
      prefer = new Float64Array(this.n);
      for (let a = 0; a < this.n; a++) prefer[a] = ray[this.problem.unknownCreases[a]];
    }
    const t = this.tangent(prefer);
    if (!t) {
      this.fail('no-tangent', 'The Jacobian at the start has no usable null direction that moves the drive.');
      return;
    }
    if (Math.sign(t[this.d]) !== this.travel) for (let i = 0; i < this.n; i++) t[i] = -t[i];
    if (Math.abs(t[this.d]) < 1e-12) {
      this.messages.push({ severity: 'warning', code: 'start-at-turning-point', text: `The start is at a turning point of ${this.label}: it cannot move further ${this.travel > 0 ? 'up' : 'down'} on this branch.` });
    }
    this.point = { y: Float64Array.from(y), t, drive: y[this.options.drive] };
    this.usedMethods.add('continue');
    if (this.checkUnderdetermined()) {
      // recompute the tangent with the damped solves
      this.problem.evaluate(y, true);
      const td = this.tangent(prefer);
      if (td) {
        if (Math.sign(td[this.d]) !== this.travel) for (let i = 0; i < this.n; i++) td[i] = -td[i];
        this.point.t = td;
      }
    }
  }

  /**
   * More freedom than the drive (zero pivots besides the held column): the path is not unique. From then on
   * the solves are damped, so the path takes the smallest motion of the other creases (least squares).
   */
  private checkUnderdetermined(): boolean {
    const ns = this.nsCurve!;
    if (ns.zeroPivots === 0 || ns.damping > 0) return false;
    this.messages.push({
      severity: 'warning',
      code: 'underdetermined-path',
      text: `${ns.zeroPivots} more degree(s) of freedom remain besides the drive: the path is not unique. It takes the smallest motion of the other creases (least squares) and their rates are those of that motion; hold creases to choose another. The condition number is not evaluated (that Jacobian is singular by construction).`,
    });
    const damping = 1e-10;
    ns.damping = damping;
    ns.factored = false;
    const fixed = this.fixedSystem();
    fixed.damping = damping;
    fixed.factored = false;
    return true;
  }

  // ---------------------------------------------------------------------------------------------------
  // the loop

  /** Advance until one more sample is recorded or the sweep ends. */
  advance(): void {
    if (this.finished) return;
    if (this.nextTarget >= this.targets.length) { this.finish(); return; }
    const before = this.samples.length;
    for (let guard = 0; guard < 100000 && !this.finished && this.samples.length === before; guard++) {
      if (this.method === 'propagate') this.propagationStep();
      else this.continuationStep();
      if (this.nextTarget >= this.targets.length && !this.finished) this.finish();
    }
  }

  /** Stop now (Ctrl-C): what was computed stays. */
  stop(): void {
    if (this.finished) return;
    this.status = 'stopped';
    this.messages.push({ severity: 'warning', code: 'stopped', text: `Stopped after ${this.samples.length} of ${this.total} samples; the samples so far are complete and exact.` });
    this.finished = true;
  }

  private finish(): void {
    this.finished = true;
    if (this.status === 'complete' && this.samples.length < this.total) this.status = 'partial';
  }

  result(): SweepResult {
    const methods = [...this.usedMethods];
    return {
      drive: this.options.drive,
      samples: this.samples,
      events: this.events,
      messages: this.messages,
      status: this.status,
      requested: this.total,
      method: methods.length > 1 ? 'mixed' : methods[0] ?? this.method,
      ...(this.branchInfo ? { branch: this.branchInfo } : {}),
      conditionEvery: this.conditionEvery,
      stats: {
        steps: this.steps,
        factorizations: (this.nsCurve?.factorizations ?? 0) + (this.nsFixed?.factorizations ?? 0) + (this.nsProp?.factorizations ?? 0),
        propagations: this.propagations,
      },
    };
  }

  private pushSample(s: SweepSample): void {
    this.samples.push(s);
    if (this.hooks.onSample?.(s) === 'stop' && !this.finished) {
      // the caller's check ends the path here (its own event says why)
      if (this.status === 'complete') this.status = 'partial';
      this.finished = true;
    }
  }

  private end(type: SweepEventType, drive: number, text: string, angles: Float64Array, extra: Partial<SweepEvent> = {}): void {
    this.events.push({ type, drive, text, angles: Float64Array.from(angles), ...extra });
    if (this.status === 'complete') this.status = 'partial';
    this.finished = true;
  }

  // ---------------------------------------------------------------------------------------------------
  // propagation

  private propagationStep(): void {
    const last = this.last!;
    const target = this.targets[this.nextTarget];
    const dist = target - last.s;
    const s = Math.abs(dist) > PROPAGATION_STEP * (1 + 1e-6) ? last.s + Math.sign(dist) * PROPAGATION_STEP : target;
    const solved = this.propagateAt(s, last, this.before);
    if (!solved && s === target && Math.abs(s) >= Math.PI - 1e-15 && this.samples.length >= 2) {
      // the drive folded flat: the closed form's roots merge there; the sheet's folded-flat state is exact
      const a = this.samples[this.samples.length - 2], b = this.samples[this.samples.length - 1];
      const end = this.foldedFlatEnd(s, { y: a.angles, drive: a.drive }, { y: b.angles, drive: b.drive }, [a.rates, b.rates]);
      if (end) {
        this.pushSample({ drive: s, angles: end.y, maxResidual: end.maxResidual, rates: end.rates, ...(end.curvature ? { curvature: end.curvature } : {}), condition: Infinity, nearSingular: true });
        this.nextTarget++;
        this.checkFoldedFlatAtSample(s, end.y);
        return;
      }
    }
    if (!solved) {
      // out of reach of some vertex (a turning point of the drive, or a state the mesh cannot take):
      // continuation from the last good state finds out which
      this.messages.push({ severity: 'info', code: 'propagation-stopped', text: `Vertex-by-vertex propagation found no state at ${this.label} = ${(s * DEG).toFixed(4)}°; continuing with the general solver from ${(last.s * DEG).toFixed(4)}°.` });
      this.switchToContinuation();
      return;
    }
    const { x, rates, curvature, maxResidual, minPivot } = solved;
    this.propagations++;
    // events between the last state and this one
    if (this.checkCrossings(last.s, last.x, s, x, (v) => this.propagateAt(v, last, this.before)?.x)) return;
    this.before = last;
    this.last = { s, x };
    if (s === target) {
      const cond = this.conditionAt('prop', s);
      this.checkBranchFlip(s, cond, (v) => this.propagateAt(v, this.before!, undefined)?.x);
      this.pushSample({
        drive: s,
        angles: Float64Array.from(x),
        maxResidual,
        rates,
        ...(curvature ? { curvature } : {}),
        condition: cond?.condition ?? NaN,
        nearSingular: (cond ? cond.condition > NEAR_SINGULAR_CONDITION : false) || minPivot < 1e-8,
      });
      this.nextTarget++;
      this.approaching = false;
      this.checkFoldedFlatAtSample(s, x);
    }
  }

  /** A propagated state at drive s, the root choice guided by the last states (or the start ray). */
  private propagateAt(
    s: number,
    last: { s: number; x: Float64Array },
    before: { s: number; x: Float64Array } | undefined,
  ): { x: Float64Array; rates: Float64Array; curvature?: Float64Array; maxResidual: number; minPivot: number } | undefined {
    const n = this.pattern.creases.length;
    const reference = new Float64Array(n);
    const fromFlat = last.s === 0 && last.x.every((v) => v === 0);
    if (fromFlat && this.firstReference) {
      const t = this.firstReference;
      for (let c = 0; c < n; c++) reference[c] = (s / t[this.options.drive]) * t[c];
    } else if (before && Math.abs(before.s - last.s) > 1e-6) {
      // linear extrapolation of the last two states (a step much shorter than this one would blow it up)
      const f = (s - last.s) / (last.s - before.s);
      for (let c = 0; c < n; c++) reference[c] = last.x[c] + wrapAngle(last.x[c] - before.x[c]) * f;
    } else reference.set(last.x);
    const choice: RootChoice = fromFlat && this.firstAssignment
      ? { kind: 'assignment', signs: assignmentSigns(this.pattern), reference }
      : { kind: 'nearest', reference };
    const x = new Float64Array(n);
    x[this.options.drive] = s;
    const rates = new Float64Array(n);
    const curvature = this.options.curvature ? new Float64Array(n) : undefined;
    const out = propagate(this.sys, this.plan!, x, choice, this.work!, rates, curvature);
    if (!out.ok) return undefined;
    if (out.maxResidual > SAMPLE_TOLERANCE || out.maxDisagreement > 1e-9) return undefined;
    this.usedMethods.add('propagate');
    return { x, rates, curvature, maxResidual: out.maxResidual, minPivot: out.minPivot };
  }

  private switchToContinuation(): void {
    const last = this.last!;
    this.method = 'continue';
    const y = last.x;
    if (last.s === 0 && y.every((v) => v === 0)) {
      this.beginAtFlatContinuation();
      return;
    }
    this.problem.evaluate(y, true);
    // orient by the propagation's own direction of travel
    let prefer: Float64Array | null = null;
    if (this.before) {
      prefer = new Float64Array(this.n);
      for (let a = 0; a < this.n; a++) { const c = this.problem.unknownCreases[a]; prefer[a] = wrapAngle(y[c] - this.before.x[c]); }
    }
    const t = this.tangent(prefer);
    if (!t) { this.fail('no-tangent', 'The Jacobian has no usable null direction at the last propagated state.'); return; }
    // the way the drive was travelling decides the sense, unless the drive barely moves here
    let tmax = 0;
    for (let i = 0; i < this.n; i++) tmax = Math.max(tmax, Math.abs(t[i]));
    const towards = this.nextTarget < this.targets.length ? Math.sign(this.targets[this.nextTarget] - y[this.options.drive]) || this.travel : this.travel;
    const flip = Math.abs(t[this.d]) > 1e-3 * tmax ? Math.sign(t[this.d]) !== towards : !!prefer && dot(t, prefer) < 0;
    if (flip) for (let i = 0; i < this.n; i++) t[i] = -t[i];
    this.point = { y: Float64Array.from(y), t, drive: y[this.options.drive] };
    this.usedMethods.add('continue');
  }

  private beginAtFlatContinuation(): void {
    this.method = 'continue';
    const ray = this.firstReference ?? null;
    const savedTarget = this.nextTarget;
    this.beginAtFlatGeneral(ray);
    this.nextTarget = savedTarget;
  }

  private beginAtFlatGeneral(ray: Float64Array | null): void {
    const n = this.pattern.creases.length;
    const first = this.targets[this.nextTarget] ?? this.targets[0];
    const s1 = this.travel * Math.min(0.5 / DEG, Math.abs(first) || 0.5 / DEG);
    const guess = new Float64Array(n);
    if (ray) for (let c = 0; c < n; c++) guess[c] = (s1 / ray[this.options.drive]) * ray[c];
    else for (const c of this.pattern.creases) guess[c.index] = c.assignment === 'V' ? Math.abs(s1) : c.assignment === 'M' ? -Math.abs(s1) : 0;
    guess[this.options.drive] = s1;
    const fixed = new ClosureProblem(this.pattern, (c) => this.holdSet.has(c) || c === this.options.drive, this.sys);
    const r = fixed.solve(guess, { polishTolerance: POLISH, maxStep: Math.abs(s1) / 2, maxIterations: 80, wrap: false });
    if (!r.converged) { this.fail('start-failed', 'No closed state was found a small step from flat along the chosen branch.'); return; }
    this.startContinuation(r.angles, ray);
  }

  // ---------------------------------------------------------------------------------------------------
  // continuation

  private curveSystem(): NormalSystem {
    this.nsCurve ??= new NormalSystem(this.sys, this.problem.unknownOf, this.n, this.problem.jacobian);
    return this.nsCurve;
  }

  private fixedSystem(): NormalSystem {
    this.nsFixed ??= new NormalSystem(this.sys, this.problem.unknownOf, this.n, this.problem.jacobian);
    return this.nsFixed;
  }

  /**
   * Unit tangent over the unknowns at the state last evaluated into problem.jacobian: J_{−k} b = −J_k with
   * the column k held (k = the drive unless the drive barely moves), t = (1 at k, b) / |…|. Oriented along
   * `prefer` when given.
   */
  private tangent(prefer: Float64Array | null): Float64Array | undefined {
    const ns = this.curveSystem();
    let k = this.d;
    if (prefer) {
      let big = 0, arg = this.d;
      for (let i = 0; i < this.n; i++) if (Math.abs(prefer[i]) > big) { big = Math.abs(prefer[i]); arg = i; }
      if (Math.abs(prefer[this.d]) < 0.2 * big) k = arg;
    }
    const b = this.splitSolve(ns, k, null);
    if (!b) return undefined;
    const t = b;
    t[k] = 1;
    const norm = Math.sqrt(dot(t, t));
    for (let i = 0; i < this.n; i++) t[i] /= norm;
    if (prefer && dot(t, prefer) < 0) for (let i = 0; i < this.n; i++) t[i] = -t[i];
    return t;
  }

  /** b = −A_k⁻¹ J_{−k}ᵀ (J_k) or, with rows given, −A_k⁻¹ J_{−k}ᵀ rows; refactors when the old factor stops helping. */
  private splitSolve(ns: NormalSystem, k: number, rows: Float64Array | null): Float64Array | undefined {
    if (!ns.factored || ns.held !== k) ns.factor(k);
    const r = rows ?? ns.column(this.rowsTmp, k);
    const rhs = new Float64Array(this.n);
    ns.transposeTimes(rhs, r);
    for (let i = 0; i < this.n; i++) rhs[i] = -rhs[i];
    const x = new Float64Array(this.n);
    ns.precondition(x, rhs);
    let res = ns.solve(x, rhs, 1e-12, 25);
    if (!res.converged) {
      ns.factor(k);
      ns.precondition(x, rhs);
      res = ns.solve(x, rhs, 1e-12, 25);
      if (!res.converged && res.iterations === 0) return undefined;
    }
    return x;
  }

  private continuationStep(): void {
    const p = this.point!;
    let h = this.h;
    for (let attempt = 0; attempt < 60; attempt++) {
      if (h < H_MIN) {
        this.end('corrector-failed', p.drive, `The corrector failed at ${this.label} = ${(p.drive * DEG).toFixed(6)}°: no closed state a step of ${H_MIN} rad further along the path. The last good state is kept.`, p.y);
        return;
      }
      const c = this.correct(p, h);
      if (!c) { h /= 2; continue; }
      const { y, iterations } = c;
      this.problem.evaluate(y, true);
      const t = this.tangent(p.t!);
      if (!t) { h /= 2; continue; }
      // a sharp turn of the tangent means the step jumped too far (or across to another branch)
      if (dot(t, p.t!) < 0.9) { h /= 2; continue; }
      this.steps++;
      const next: Point = { y, t, drive: y[this.options.drive] };
      let tmax = 0;
      for (let i = 0; i < this.n; i++) tmax = Math.max(tmax, Math.abs(t[i]));
      this.h = Math.min(MAX_ANGLE_STEP / Math.max(tmax, 1e-12), iterations <= 3 ? h * 1.6 : iterations >= 6 ? h * 0.6 : h);
      // turning point: the drive reverses
      if (Math.sign(t[this.d]) !== Math.sign(p.t![this.d]) && Math.abs(p.t![this.d]) > 0) {
        const tp = this.locateTurningPoint(p, h);
        // samples up to the turning point are still reachable
        this.collectSamples(p, tp, true);
        if (this.finished) return;
        if (this.nextTarget < this.targets.length) {
          this.end('turning-point', tp.drive, `Turning point at ${this.label} = ${(tp.drive * DEG).toFixed(6)}°: the drive reverses there, so ${this.label} cannot go ${this.travel > 0 ? 'above' : 'below'} that value on this branch.`, tp.y);
        } else {
          this.events.push({ type: 'turning-point', drive: tp.drive, text: `Turning point at ${this.label} = ${(tp.drive * DEG).toFixed(6)}°.`, angles: Float64Array.from(tp.y) });
        }
        return;
      }
      if (this.checkCrossings(p.drive, p.y, next.drive, y, (v) => this.solveFixed(v, p, next)?.y)) return;
      if (this.collectSamples(p, next, false) || this.finished) return;
      this.point = next;
      return;
    }
    this.end('corrector-failed', p.drive, `The corrector failed at ${this.label} = ${(p.drive * DEG).toFixed(6)}°; the last good state is kept.`, p.y);
  }

  /**
   * Newton corrector for the point at arclength h along the tangent from p: closure and t·(z − y) = h.
   * The held-column split gives the bordered step without forming the bordered matrix.
   */
  private correct(p: Point, h: number): { y: Float64Array; iterations: number } | undefined {
    const ns = this.curveSystem();
    const t0 = p.t!;
    const uc = this.problem.unknownCreases;
    const z = Float64Array.from(p.y);
    for (let a = 0; a < this.n; a++) z[uc[a]] += h * t0[a];
    let k = this.d;
    let big = 0, arg = this.d;
    for (let i = 0; i < this.n; i++) if (Math.abs(t0[i]) > big) { big = Math.abs(t0[i]); arg = i; }
    if (Math.abs(t0[this.d]) < 0.2 * big) k = arg;
    let prevNorm = Infinity;
    for (let it = 1; it <= 12; it++) {
      const worst = this.problem.evaluate(z, true);
      let g = -h;
      for (let a = 0; a < this.n; a++) g += t0[a] * (z[uc[a]] - p.y[uc[a]]);
      if (worst <= POLISH && Math.abs(g) <= 1e-13) return { y: z, iterations: it };
      if (worst <= SAMPLE_TOLERANCE * 1e-2 && Math.abs(g) <= 1e-12 && it > 6) return { y: z, iterations: it };
      if (!Number.isFinite(worst) || worst > 10 * prevNorm || worst > 1) return undefined;
      prevNorm = Math.min(prevNorm, worst);
      const a = this.splitSolve(ns, k, this.problem.residual);
      const b = this.splitSolve(ns, k, null);
      if (!a || !b) return undefined;
      let num = -g, den = t0[k];
      for (let i = 0; i < this.n; i++) if (i !== k) { num -= t0[i] * a[i]; den += t0[i] * b[i]; }
      if (Math.abs(den) < 1e-14) return undefined;
      const dk = num / den;
      let stepNorm = 0;
      for (let i = 0; i < this.n; i++) {
        const di = i === k ? dk : a[i] + b[i] * dk;
        z[uc[i]] += di;
        stepNorm = Math.max(stepNorm, Math.abs(di));
      }
      if (stepNorm > Math.max(0.5, 4 * h)) return undefined;
    }
    const worst = this.problem.evaluate(z, true);
    return worst <= SAMPLE_TOLERANCE * 1e-2 ? { y: z, iterations: 12 } : undefined;
  }

  /**
   * Solve every requested sample whose drive value lies between p and q (q included; both on the curve).
   * Returns true when the path restarted from the first sample (the approach came from the other side).
   */
  private collectSamples(p: Point, q: Point, toTurning: boolean): boolean {
    for (;;) {
      if (this.nextTarget >= this.targets.length) return false;
      const s = this.targets[this.nextTarget];
      const lo = Math.min(p.drive, q.drive), hi = Math.max(p.drive, q.drive);
      const inside = s >= lo - 1e-15 && s <= hi + 1e-15;
      if (!inside) return false;
      const solved = this.solveFixed(s, p, q);
      if (!solved) {
        if (toTurning) return false;
        this.end('corrector-failed', s, `No closed state was found at ${this.label} = ${(s * DEG).toFixed(6)}° between two points of the path; the last good state is kept.`, p.y);
        return false;
      }
      const cond = this.conditionAt('fixed', s);
      this.pushSample({
        drive: s,
        angles: solved.y,
        maxResidual: solved.maxResidual,
        rates: solved.rates,
        ...(solved.curvature ? { curvature: solved.curvature } : {}),
        condition: cond?.condition ?? NaN,
        nearSingular: cond ? cond.condition > NEAR_SINGULAR_CONDITION : false,
      });
      this.nextTarget++;
      this.checkBranchFlip(s, cond, (v) => this.solveFixed(v, p, q)?.y);
      this.checkFoldedFlatAtSample(s, solved.y);
      if (this.finished) return false;
      if (this.approaching) {
        this.approaching = false;
        // from here the sweep runs from → to; reverse along the curve when the approach came the other way
        const dir = this.targets.length > 1 ? Math.sign(this.targets[1] - this.targets[0]) : this.travel;
        if (dir !== this.travel) {
          this.travel = dir;
          const t = this.tangentAtState(solved.y);
          if (!t) { this.fail('no-tangent', 'No tangent at the first sample.'); return false; }
          if (Math.sign(t[this.d]) !== dir) for (let i = 0; i < this.n; i++) t[i] = -t[i];
          this.point = { y: Float64Array.from(solved.y), t, drive: s };
          return true;
        }
      }
    }
  }

  private tangentAtState(y: Float64Array): Float64Array | undefined {
    this.problem.evaluate(y, true);
    return this.tangent(null);
  }

  /**
   * Newton at exactly drive = s (guess: linear between p and q on the curve), then rates (J_free ṙ = −J_d) and
   * curvature (J_free r̈ = −Q(ṙ), Q the second order of the closure).
   */
  private solveFixed(s: number, p: Point, q: Point): { y: Float64Array; maxResidual: number; rates: Float64Array; curvature?: Float64Array } | undefined {
    if (Math.abs(s) >= Math.PI - 1e-15) {
      const end = this.foldedFlatEnd(s, p, q);
      if (end) return end;
    }
    const ns = this.fixedSystem();
    const uc = this.problem.unknownCreases;
    const f = q.drive === p.drive ? 0 : (s - p.drive) / (q.drive - p.drive);
    const z = new Float64Array(p.y.length);
    for (let c = 0; c < z.length; c++) z[c] = p.y[c] + f * (q.y[c] - p.y[c]);
    z[this.options.drive] = s;
    let worst = Infinity;
    // polish to the rounding floor: near flat the condition number amplifies the last residual into the angles
    for (let it = 0; it < 20; it++) {
      const before = worst;
      worst = this.problem.evaluate(z, true);
      if (worst <= 1e-16 || (worst <= POLISH && worst > 0.5 * before)) break;
      const delta = this.splitSolve(ns, this.d, this.problem.residual);
      if (!delta) return undefined;
      let big = 0;
      for (let i = 0; i < this.n; i++) if (i !== this.d) { z[uc[i]] += delta[i]; big = Math.max(big, Math.abs(delta[i])); }
      if (big < 1e-15) { worst = this.problem.evaluate(z, true); break; }
    }
    if (!(worst <= SAMPLE_TOLERANCE)) {
      // the general least-squares solver as a last resort
      const fixed = new ClosureProblem(this.pattern, (c) => this.holdSet.has(c) || c === this.options.drive, this.sys);
      const r = fixed.solve(z, { polishTolerance: POLISH, maxStep: 0.05, wrap: false });
      if (!r.converged) return undefined;
      z.set(r.angles);
      worst = this.problem.evaluate(z, true);
    }
    for (const c of uc) z[c] = wrapAngle(z[c]);
    worst = this.problem.evaluate(z, true);
    const b = this.splitSolve(ns, this.d, null);
    if (!b) return undefined;
    const rates = new Float64Array(z.length);
    for (let i = 0; i < this.n; i++) rates[uc[i]] = i === this.d ? 1 : b[i];
    let curvature: Float64Array | undefined;
    if (this.options.curvature) {
      const q2 = secondOrderRows(this.sys, this.problem.jacobian, rates, this.rowsTmp);
      const cvec = this.splitSolve(ns, this.d, q2);
      curvature = new Float64Array(z.length);
      if (cvec) for (let i = 0; i < this.n; i++) if (i !== this.d) curvature[uc[i]] = cvec[i];
    }
    return { y: z, maxResidual: worst, rates, curvature };
  }

  /**
   * The drive at exactly ±180° with every crease going to ±180° or 0 with it (a sheet folding flat): that
   * state is exact, and a solve there converges only linearly (the closure is singular). Each crease is taken
   * to the value it goes to, and the state kept when it closes; the rates are the limit of the path's
   * (extrapolated from p and q to the end in the square of the distance), since at the end itself they are not
   * defined by the closure.
   */
  private foldedFlatEnd(s: number, p: Point, q: Point, known?: [Float64Array, Float64Array]): { y: Float64Array; maxResidual: number; rates: Float64Array; curvature?: Float64Array } | undefined {
    const uc = this.problem.unknownCreases;
    const f = q.drive === p.drive ? 0 : (s - p.drive) / (q.drive - p.drive);
    const z = new Float64Array(p.y.length);
    for (let c = 0; c < z.length; c++) z[c] = p.y[c] + f * (q.y[c] - p.y[c]);
    for (const c of uc) {
      const a = wrapAngle(z[c]);
      if (Math.abs(a) >= Math.PI - FLAT_END_SNAP) z[c] = Math.sign(a) * Math.PI;
      else if (Math.abs(a) <= FLAT_END_SNAP) z[c] = 0;
      else return undefined;
    }
    z[this.options.drive] = s;
    const worst = this.problem.evaluate(z, false);
    if (!(worst <= SAMPLE_TOLERANCE)) return undefined;
    const d = this.d;
    const ratesOf = (pt: Point) => { const r = new Float64Array(z.length); if (pt.t) for (let i = 0; i < this.n; i++) r[uc[i]] = pt.t[i] / pt.t[d]; r[this.options.drive] = 1; return r; };
    const [rp, rq] = known ?? [ratesOf(p), ratesOf(q)];
    // a curve through the folded-flat state is its own mirror image about it (z → −z, θ → −θ is the same
    // rotation at ±180°), so the rates are even in u = s − θ: r(u) = r(0) + c·u² + O(u⁴), extrapolated in u²
    const up = (s - p.drive) ** 2, uq = (s - q.drive) ** 2;
    const rates = up === uq ? Float64Array.from(rq) : rp.map((v, c) => (v * uq - rq[c] * up) / (uq - up));
    if (!this.messages.some((m) => m.code === 'folded-flat-end')) {
      this.messages.push({ severity: 'info', code: 'folded-flat-end', text: `At ${this.label} = ${(s * DEG).toFixed(4)}° the sheet is folded flat (every crease at ±180° or 0): that sample is exact, and its rates are the limit of the path's rates, extrapolated to the end.` });
    }
    return { y: z, maxResidual: worst, rates, ...(this.options.curvature ? { curvature: new Float64Array(z.length) } : {}) };
  }

  /** Bisection on the arclength from p for the point where the drive's tangent component vanishes. */
  private locateTurningPoint(p: Point, h: number): Point {
    let lo = 0, hi = h;
    let best: Point = p;
    const sign0 = Math.sign(p.t![this.d]);
    for (let it = 0; it < 60 && hi - lo > 1e-12; it++) {
      const mid = (lo + hi) / 2;
      const c = this.correct(p, mid);
      if (!c) { hi = mid; continue; }
      this.problem.evaluate(c.y, true);
      const t = this.tangent(p.t!);
      if (!t) { hi = mid; continue; }
      if (Math.sign(t[this.d]) === sign0) { lo = mid; best = { y: c.y, t, drive: c.y[this.options.drive] }; } else hi = mid;
    }
    return best;
  }

  // ---------------------------------------------------------------------------------------------------
  // events shared by both methods

  /**
   * Hinge limits and folded-flat creases crossed between (s0, x0) and (s1, x1): located by bisection on the
   * drive with `solveAt`, reported, and the sweep ends there. Samples before the event are collected first by
   * the caller's flow (the event ends the path at its drive value).
   */
  private checkCrossings(s0: number, x0: Float64Array, s1: number, x1: Float64Array, solveAt: (s: number) => Float64Array | undefined): boolean {
    const cross = (x: Float64Array): { type: SweepEventType; crease: number } | undefined => {
      for (const c of this.pattern.creases) {
        if (c.assignment === 'B' || c.assignment === 'F') continue;
        const a = x[c.index], a0 = x0[c.index];
        const lim = c.limit;
        if (lim && ((lim.max !== undefined && a > lim.max + 1e-12 && !(a0 > lim.max + 1e-12)) || (lim.min !== undefined && a < lim.min - 1e-12 && !(a0 < lim.min - 1e-12)))) {
          return { type: 'hinge-limit', crease: c.index };
        }
        if (c.index === this.options.drive) continue;
        // reaching ±180° exactly is reported at the sample; going past it (the unwrapped angle leaves
        // [−180°, 180°], or the wrapped one jumps by about 360°) ends the path
        if (Math.abs(Math.abs(a) - Math.PI) < FLAT_FOLDED) continue;
        if (Math.abs(a - a0) > Math.PI || (Math.abs(a0) <= Math.PI && Math.abs(a) > Math.PI)) return { type: 'folded-flat', crease: c.index };
      }
      return undefined;
    };
    const hit = cross(x1);
    if (!hit) return false;
    // the drive reaching ±180° with the sheet folding flat with it (the last sample) is not an early end: one
    // solve just before the end tells it from a crease folding flat earlier (then the bisection below locates it)
    const endsAtFlat = Math.abs(this.targets[this.targets.length - 1]) >= Math.PI - 1e-12;
    if (hit.type === 'folded-flat' && this.targets.slice(this.nextTarget).every((t) => Math.abs(t) >= Math.PI - 1e-12)) {
      const end = Math.sign(s1 || s0) * Math.PI;
      const probe = end - Math.sign(end) * 5e-4;
      if ((s0 - probe) * Math.sign(end) >= 0) return false;
      const before = (s1 - probe) * Math.sign(end) >= 0 ? solveAt(probe) : undefined;
      if (before && !cross(before)) return false;
    }
    // bisection on the drive for the first crossing
    let lo = s0, hi = s1;
    let loX = x0;
    for (let it = 0; it < 50 && Math.abs(hi - lo) > 1e-12; it++) {
      const mid = (lo + hi) / 2;
      const x = solveAt(mid);
      if (!x) { hi = mid; continue; }
      if (cross(x)) hi = mid; else { lo = mid; loX = x; }
    }
    const c = this.pattern.creases[hit.crease];
    // creases that fold flat together with the drive itself (a sheet folding flat at drive ±180°, the last
    // sample): not an early end; the samples before it are taken, and the last one at exactly ±180° reports it
    if (hit.type === 'folded-flat' && Math.PI - Math.abs(lo) < 1e-3 && endsAtFlat) {
      this.collectUpTo(lo, solveAt);
      return this.finished;
    }
    // samples up to the event are reachable: the caller has not collected them yet
    this.collectUpTo(lo, solveAt);
    if (this.finished) return true;
    // beyond the last requested sample: not part of the range asked for
    if (this.nextTarget >= this.targets.length) { this.finish(); return true; }
    if (hit.type === 'hinge-limit') {
      const lim = c.limit!;
      const which = loX[hit.crease] > 0 && lim.max !== undefined ? `maximum ${(lim.max * DEG).toFixed(4)}°` : `minimum ${((lim.min ?? 0) * DEG).toFixed(4)}°`;
      this.end('hinge-limit', lo, `Crease ${c.label} reaches its hinge limit (${which}) at ${this.label} = ${(lo * DEG).toFixed(6)}°; the path ends there.`, loX, { crease: hit.crease });
    } else {
      this.end('folded-flat', lo, `Crease ${c.label} folds flat (±180°) at ${this.label} = ${(lo * DEG).toFixed(6)}°: panels meet and the path ends there.`, loX, { crease: hit.crease });
    }
    return true;
  }

  /** Samples with drive values up to (and including) s, solved with solveAt (used before an event ends the path). */
  private collectUpTo(s: number, solveAt: (s: number) => Float64Array | undefined): void {
    while (this.nextTarget < this.targets.length) {
      const v = this.targets[this.nextTarget];
      if ((v - s) * this.travel > 1e-12) return;
      const x = solveAt(v);
      if (!x) return;
      this.pushSample(this.sampleFromState(v, x));
      this.nextTarget++;
    }
  }

  /** A sample from a closed state (rates and curvature from the general formulas). */
  private sampleFromState(s: number, x: Float64Array): SweepSample {
    const worst = this.problem.evaluate(x, true);
    const ns = this.fixedSystem();
    const b = this.splitSolve(ns, this.d, null);
    const rates = new Float64Array(x.length);
    const uc = this.problem.unknownCreases;
    if (b) for (let i = 0; i < this.n; i++) rates[uc[i]] = i === this.d ? 1 : b[i];
    let curvature: Float64Array | undefined;
    if (this.options.curvature && b) {
      const q2 = secondOrderRows(this.sys, this.problem.jacobian, rates, this.rowsTmp);
      const cv = this.splitSolve(ns, this.d, q2);
      curvature = new Float64Array(x.length);
      if (cv) for (let i = 0; i < this.n; i++) if (i !== this.d) curvature[uc[i]] = cv[i];
    }
    const cond = this.conditionAt('fixed', s);
    return { drive: s, angles: Float64Array.from(x), maxResidual: worst, rates, ...(curvature ? { curvature } : {}), condition: cond?.condition ?? NaN, nearSingular: cond ? cond.condition > NEAR_SINGULAR_CONDITION : false };
  }

  private checkFoldedFlatAtSample(s: number, x: Float64Array): void {
    const flat: number[] = [];
    // a folded-flat state is singular: the residual grows with the square of the distance there, so angles settle
    // only to about the square root of the tolerance (1e-5 rad); read them with a margin
    for (const c of this.pattern.creases) if (c.assignment !== 'B' && c.assignment !== 'F' && Math.abs(x[c.index]) >= Math.PI - 1e-4) flat.push(c.index);
    if (!flat.length) return;
    const names = flat.slice(0, 6).map((c) => this.pattern.creases[c].label).join(', ') + (flat.length > 6 ? ` and ${flat.length - 6} more` : '');
    const text = `${flat.length} crease(s) fold flat (±180°) at ${this.label} = ${(s * DEG).toFixed(6)}° (${names}): panels meet${this.nextTarget < this.targets.length ? ' and the path ends there' : ''}.`;
    if (this.nextTarget < this.targets.length) this.end('folded-flat', s, text, x, { crease: flat[0] });
    else this.events.push({ type: 'folded-flat', drive: s, text, angles: Float64Array.from(x), crease: flat[0] });
  }

  /**
   * Condition number at the state whose Jacobian was just evaluated (every `conditionEvery` samples, and at
   * the first and last). 'prop' reads the propagation's Jacobian, 'fixed' the problem's.
   */
  private conditionAt(which: 'prop' | 'fixed', s: number): ReturnType<ConditionTracker['estimate']> | undefined {
    const k = this.samples.length;
    const lastOne = this.nextTarget === this.targets.length - 1;
    if (this.conditionEvery === 0) return undefined;
    if (!lastOne && (this.conditionEvery === Infinity || k % this.conditionEvery !== 0)) return undefined;
    // an underdetermined path: the free creases' Jacobian is singular by construction
    if (this.nsCurve && this.nsCurve.damping > 0) return undefined;
    let tracker: ConditionTracker;
    if (which === 'prop') {
      this.nsProp ??= new NormalSystem(this.sys, this.problem.unknownOf, this.n, this.work!.jacobian);
      this.trackerProp ??= new ConditionTracker(this.nsProp, this.d);
      tracker = this.trackerProp;
    } else {
      const ns = this.fixedSystem();
      this.trackerFixed ??= new ConditionTracker(ns, this.d);
      tracker = this.trackerFixed;
      // the tracker factors with the drive held; keep the fixed system's factor in that form
    }
    const e = tracker.estimate();
    this.sigmaHistory.push({ s, sigma: e.sigmaMin / Math.max(e.sigmaMax, 1e-300) });
    return e;
  }

  /**
   * A branch point between the last two evaluated samples: the smallest singular value of the free creases'
   * Jacobian passed through zero (its singular vector's image flipped) while the drive kept its direction.
   * Located by golden-section search on σ_min, analysed, reported; the sweep stays on its curve.
   */
  private checkBranchFlip(s: number, cond: ReturnType<ConditionTracker['estimate']> | undefined, solveAt: (s: number) => Float64Array | undefined): void {
    if (!cond || cond.flip > 0 || this.sigmaHistory.length < 2) return;
    const prev = this.sigmaHistory[this.sigmaHistory.length - 2];
    let a = Math.min(prev.s, s), b = Math.max(prev.s, s);
    const tracker = this.method === 'propagate' ? this.trackerProp! : this.trackerFixed!;
    const sigmaAt = (v: number): { sigma: number; x?: Float64Array } => {
      const x = solveAt(v);
      if (!x) return { sigma: Infinity };
      if (this.method === 'propagate') {
        // the propagation left its Jacobian in work.jacobian
      } else this.problem.evaluate(x, true);
      const e = tracker.estimate();
      return { sigma: e.sigmaMin / Math.max(e.sigmaMax, 1e-300), x };
    };
    const gr = (Math.sqrt(5) - 1) / 2;
    let c = b - gr * (b - a), d = a + gr * (b - a);
    let fc = sigmaAt(c), fd = sigmaAt(d);
    for (let it = 0; it < 60 && b - a > 1e-11; it++) {
      if (fc.sigma < fd.sigma) { b = d; d = c; fd = fc; c = b - gr * (b - a); fc = sigmaAt(c); }
      else { a = c; c = d; fc = fd; d = a + gr * (b - a); fd = sigmaAt(d); }
    }
    const best = fc.sigma < fd.sigma ? fc : fd;
    const at = fc.sigma < fd.sigma ? c : d;
    // re-evaluate at the last sample so the tracker continues from it
    solveAt(s);
    if (this.method !== 'propagate') this.problem.evaluate(this.samples[this.samples.length - 1]?.angles ?? best.x!, true);
    tracker.estimate();
    if (!best.x || !(best.sigma < 1e-6)) return;
    let branches: Branch[] | undefined;
    let raysText = '';
    if (this.options.analyzeBranches ?? true) {
      const analysis = branchesAt(this.pattern, best.x, { held: this.holdSet, drive: this.options.drive });
      branches = analysis.branches;
      if (branches.length) raysText = `; ${branches.length} rays leave it: ${analysis.groups.map((g) => `${g.name} (${g.branches.map((id) => branches!.find((x) => x.id === id)!.name).join(', ')})`).join('; ')}`;
      else if (analysis.messages.length) raysText = `; ${analysis.messages[0].text}`;
    }
    this.events.push({
      type: 'branch-point',
      drive: at,
      text: `Branch point at ${this.label} = ${(at * DEG).toFixed(6)}°: the Jacobian loses rank there${raysText}. The sweep stays on its own curve; start a new sweep from this state to follow another.`,
      angles: Float64Array.from(best.x),
      ...(branches ? { branches } : {}),
    });
  }
}

/** Valley +1, mountain −1, others 0. */
function assignmentSigns(pattern: Pattern): Float64Array {
  const v = new Float64Array(pattern.creases.length);
  for (const c of pattern.creases) v[c.index] = c.assignment === 'V' ? 1 : c.assignment === 'M' ? -1 : 0;
  return v;
}

/**
 * Rows Q(v) = Σ_{a<b} v_a v_b (w_a × w_b) per vertex: the second derivative of the closure residual along v at
 * a closed state (w = the Jacobian's columns there). Used for the curvature J·r̈ = −Q(ṙ).
 */
export function secondOrderRows(sys: ClosureSystem, jacobian: Float64Array, v: Float64Array, out: Float64Array): Float64Array {
  out.fill(0);
  for (let b = 0; b < sys.blockCount; b++) {
    let x = 0, y = 0, z = 0;
    const s = sys.blockStart[b], e = sys.blockStart[b + 1];
    for (let p = s; p < e; p++) {
      const vp = v[sys.slotCrease[p]];
      if (vp === 0) continue;
      const ax = jacobian[3 * p], ay = jacobian[3 * p + 1], az = jacobian[3 * p + 2];
      for (let q = p + 1; q < e; q++) {
        const vq = v[sys.slotCrease[q]];
        if (vq === 0) continue;
        const bx = jacobian[3 * q], by = jacobian[3 * q + 1], bz = jacobian[3 * q + 2];
        const f = vp * vq;
        x += f * (ay * bz - az * by);
        y += f * (az * bx - ax * bz);
        z += f * (ax * by - ay * bx);
      }
    }
    out[3 * b] = x; out[3 * b + 1] = y; out[3 * b + 2] = z;
  }
  return out;
}

