// Where closed states come from, and how sure the list is.
//
//  - Exhaustive enumeration vertex by vertex (solver/search/enumerate.ts) wherever the pattern's vertices can
//    be closed one after another with at most three unknowns each (a single vertex with three free creases,
//    sheets of degree-4 vertices with a drive, …). It proves the list complete unless a cap stops it or some
//    vertices keep a continuum (folded-flat creases can free them); those regions are searched numerically.
//  - Elsewhere a numerical search with a fixed budget, whatever the size: the flat state's tangent-cone rays
//    restricted to the drives' ratio, each followed from flat by homotopy; a start folded the way the
//    assignment says; deterministic random starts (mulberry32). It never claims to be complete.

import type { Drive, Pattern, SearchSummary } from '../types';
import { ClosureProblem, type LsqResult } from '../closure/newton';
import { CONE_MAX_VARIABLES, flatCone } from '../paths/cone';
import { mulberry32 } from '../math/random';
import { wrapAngle } from '../math/rotation';
import { DEFAULT_STATE_CAP, enumerateStates, planEnumeration } from './enumerate';
import { assignmentSigns, canonicalFoldedFlat, isMovable, sameState } from './states';

export interface Candidate {
  /** fold angle of every crease, radians */
  angles: Float64Array;
  /** largest vertex residual (radians); NaN until measured */
  maxResidual: number;
  /** from the enumeration: the blocks in the order they were closed */
  order?: Int32Array;
  /** from the enumeration: every vertex fixed its new angles to first order (so local DOF 0, proven) */
  regular?: boolean;
}

export interface SearchOutcome {
  candidates: Candidate[];
  summary: SearchSummary;
  /** the lowest-cost least-squares state met (the compromise when nothing closes) */
  best?: LsqResult;
  iterations: number;
  /** creases known before any vertex is closed (drives, flat and boundary creases) */
  known: Uint8Array;
  /** free creases at no interior vertex: each folds on its own */
  loose: number[];
}

export interface SearchOptions {
  /** most closed states to collect (default 64) */
  cap?: number;
  /** random starts of the numerical search (default 24, whatever the size) */
  starts?: number;
  seed?: number;
  /** vertex solves the enumeration may take (default 4,000,000) */
  maxSteps?: number;
}

export const DEFAULT_STARTS = 24;
/** transversality below this counts as singular: such states are analysed numerically */
export const PIVOT_MIN = 1e-7;
const SEEDS_RESOLVED = 16;

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

/** Collects candidate states from numerical solves: polished hard, de-duplicated, the best cost kept. */
class Collector {
  readonly found: Candidate[] = [];
  best?: LsqResult;
  iterations = 0;
  constructor(readonly pattern: Pattern, readonly problem: ClosureProblem, readonly cap: number) {}

  get full(): boolean {
    return this.found.length >= this.cap;
  }

  consider(r: LsqResult | undefined): void {
    if (!r) return;
    this.iterations += r.iterations;
    if (!this.best || r.cost < this.best.cost) this.best = r;
    if (!r.converged || this.full) return;
    // polish hard: at a singular state Newton converges only linearly, and states a hair away from it
    // would otherwise pass the residual test as separate solutions
    const polished = this.problem.solve(r.angles, { polishTolerance: 1e-15, maxIterations: 60, wrap: false });
    if (!polished.converged) return;
    this.add(polished.angles, polished.maxResidual);
  }

  add(values: Float64Array, maxResidual: number, extra: Partial<Candidate> = {}): void {
    const angles = Float64Array.from(values);
    for (const c of this.problem.unknownCreases) angles[c] = wrapAngle(angles[c]);
    canonicalFoldedFlat(this.pattern, angles);
    if (this.found.some((f) => sameState(f.angles, angles))) return;
    // the residual of the angles as returned (wrapping and the sign at ±180° do not change the rotations)
    const residual = this.problem.evaluate(angles, false);
    this.found.push({ angles, maxResidual: Math.max(maxResidual, residual), ...extra });
  }
}

export function searchStates(pattern: Pattern, problem: ClosureProblem, drives: Drive[], options: SearchOptions = {}): SearchOutcome {
  const cap = options.cap ?? DEFAULT_STATE_CAP;
  const driveSet = new Set(drives.map((d) => d.crease));
  const base = new Float64Array(pattern.creases.length);
  for (const d of drives) base[d.crease] = d.value;
  const known = new Uint8Array(pattern.creases.length);
  for (const c of pattern.creases) if (!isMovable(pattern, c.index) || driveSet.has(c.index)) known[c.index] = 1;
  const collector = new Collector(pattern, problem, cap);
  const planned = planEnumeration(pattern, problem.sys, (c) => driveSet.has(c));
  if (planned.plan) {
    const plan = planned.plan;
    const e = enumerateStates(problem.sys, plan, base, known, { cap, maxSteps: options.maxSteps, prefer: assignmentSigns(pattern) });
    for (const s of e.states) {
      canonicalFoldedFlat(pattern, s.angles);
      // the residual is measured (and the state polished where needed) when it is classified
      collector.found.push({ angles: s.angles, maxResidual: NaN, order: s.order, regular: s.minPivot > PIVOT_MIN && plan.loose.length === 0 });
    }
    // regions where vertices keep a continuum: a few numerical solves inside each, its closed creases held
    const seeds = e.familySeeds.slice(0, SEEDS_RESOLVED);
    for (const seed of seeds) {
      const sub = new ClosureProblem(pattern, (c) => !!seed.known[c], problem.sys);
      const signs = assignmentSigns(pattern);
      const rand = mulberry32(options.seed ?? 1);
      for (let k = 0; k < 4; k++) {
        const x = Float64Array.from(seed.angles);
        for (const c of sub.unknownCreases) x[c] = k === 0 ? 0 : k === 1 ? 0.3 * signs[c] : (rand() * 2 - 1) * Math.PI;
        const r = sub.solve(x, { maxStep: 0.3, maxIterations: 80 });
        collector.iterations += r.iterations;
        if (!r.converged) continue;
        const p = problem.solve(r.angles, { polishTolerance: 1e-15, maxIterations: 40, wrap: false });
        if (p.converged) collector.add(p.angles, p.maxResidual);
      }
    }
    const found = collector.found.length;
    const complete = e.exhausted && e.familySeeds.length === 0 && e.dropped === 0;
    const degree4 = isDegree4Mesh(problem);
    const method = problem.sys.blockCount === 1
      ? `closed form at the vertex (${degree4 ? 'the spherical four-bar' : 'a spherical RRR closure'})`
      : `vertex-by-vertex enumeration, closed form at every vertex (${e.steps} vertex solves)`;
    const notes: string[] = [];
    if (complete) notes.push(`every closed state was enumerated: the list is complete`);
    if (e.capped) notes.push(`stopped at the cap of ${cap} states; more exist`);
    if (e.outOfSteps) notes.push(`stopped after ${e.steps} vertex solves; more states may exist`);
    if (e.dropped) notes.push(`${e.dropped} closed-form root(s) were lost to rounding, so states may be missing`);
    if (e.familySeeds.length) {
      notes.push(
        `${e.familySeeds.length}${e.capped ? '+' : ''} branch(es) end where creases folded flat leave vertices free to move; those were searched numerically` +
          (e.familySeeds.length > SEEDS_RESOLVED ? ` (the first ${SEEDS_RESOLVED})` : '') +
          ', so states inside them (isolated ones among them) may be missing',
      );
    }
    if (plan.loose.length) notes.push(`${plan.loose.length} free crease(s) meet no interior vertex and fold on their own`);
    const summary: SearchSummary = {
      complete,
      method,
      found,
      ...(e.capped ? { limit: cap } : {}),
      note: notes.join('; ') || 'enumerated',
    };
    if (found === 0) numericalSearch(pattern, problem, drives, base, collector, options, true);
    return { candidates: collector.found, summary, best: collector.best, iterations: collector.iterations, known, loose: plan.loose };
  }
  const done = numericalSearch(pattern, problem, drives, base, collector, options, false);
  const summary: SearchSummary = {
    complete: false,
    method: 'numerical search (homotopy from flat-state rays, an assignment start and random starts)',
    found: collector.found.length,
    ...(collector.full ? { limit: cap } : {}),
    note: `${done}; the vertex-by-vertex enumeration does not apply (${planned.reason}), so states it did not reach may exist`,
  };
  return { candidates: collector.found, summary, best: collector.best, iterations: collector.iterations, known, loose: [] };
}

function isDegree4Mesh(problem: ClosureProblem): boolean {
  for (let b = 0; b < problem.sys.blockCount; b++) if (problem.sys.blockStart[b + 1] - problem.sys.blockStart[b] !== 4) return false;
  return problem.sys.blockCount > 0;
}

/** The numerical search; returns what it did, in words. `compromiseOnly`: only to find a least-squares compromise. */
function numericalSearch(
  pattern: Pattern,
  problem: ClosureProblem,
  drives: Drive[],
  base: Float64Array,
  collector: Collector,
  options: SearchOptions,
  compromiseOnly: boolean,
): string {
  const free = Array.from(problem.unknownCreases);
  const did: string[] = [];
  const allZero = drives.every((d) => d.value === 0);
  if (allZero) collector.consider(problem.solve(base));
  // rays of the flat state's tangent cone, restricted to the drives' ratio, followed to the drive values
  if (!allZero && free.length > 0) {
    const direction = assignmentSigns(pattern);
    const cone = flatCone(pattern, { ratio: drives.map((d) => ({ crease: d.crease, value: d.value })), seeds: [direction] });
    let followed = 0;
    for (const ray of cone.rays) {
      if (collector.full) break;
      collector.consider(followRay(problem, drives, ray.tangent, base).result);
      followed++;
    }
    if (cone.partial) {
      collector.consider(followRay(problem, drives, direction, base).result);
      did.push(`${followed} straight-crease-line ray(s) and the assignment direction followed from flat (the full flat-state analysis takes at most ${CONE_MAX_VARIABLES} free creases)`);
    } else did.push(`${followed} flat-state ray(s) followed from flat`);
  }
  // the assignment's own direction
  {
    const x = Float64Array.from(base);
    const scale = Math.max(0.1, ...drives.map((d) => Math.abs(d.value)));
    for (const c of free) {
      const a = pattern.creases[c].assignment;
      x[c] = a === 'V' ? scale : a === 'M' ? -scale : 0;
    }
    collector.consider(problem.solve(x, { maxStep: 0.3, maxIterations: 80 }));
    did.push('a start folded as the assignment says');
  }
  if (compromiseOnly) return did.join(', ');
  const starts = options.starts ?? DEFAULT_STARTS;
  const rand = mulberry32(options.seed ?? 1);
  let s = 0;
  for (; s < starts && !collector.full; s++) {
    const x = Float64Array.from(base);
    for (const c of free) x[c] = (rand() * 2 - 1) * Math.PI;
    collector.consider(problem.solve(x, { maxStep: 0.6, maxIterations: 80 }));
  }
  did.push(`${s} random start(s) (seed ${options.seed ?? 1})`);
  if (free.length === 0) collector.consider(problem.solve(base));
  return did.join(', ');
}
