// Exhaustive enumeration of closed states vertex by vertex.
//
// Whether a crease's fold angle is known does not depend on its value, so the order is fixed before any
// value is computed: repeatedly take the vertex with the fewest unknown fold angles (checks first, then one,
// two, three unknowns). A vertex with at most three unknowns has at most two closed states given its known
// angles, in closed form (solver/closure/vertex-solve.ts). The search branches over every root and prunes a
// branch as soon as a vertex cannot close. Every closed state of the pattern assigns each vertex one of its
// closed-form states, so when the order reaches every vertex, no vertex leaves a continuum and no cap stops
// the search, the leaves are all the closed states: the list is complete.

import type { Pattern } from '../types';
import type { ClosureSystem } from '../closure/blocks';
import { closeVertex, VERTEX_TOLERANCE } from '../closure/vertex-solve';

export interface EnumerationPlan {
  /** block indices in processing order */
  order: Int32Array;
  /** per position in the order: bit k set when local slot k is known before the block is processed */
  knownMask: Uint32Array;
  /** free creases that meet no interior vertex: each folds on its own (a degree of freedom of every state) */
  loose: number[];
}

export interface PlanOutcome {
  plan?: EnumerationPlan;
  /** why the vertex-by-vertex enumeration does not apply */
  reason?: string;
}

/**
 * The processing order for a pattern whose creases `known(c)` are given (drives, held creases; flat and
 * boundary creases are always known). Fails when at some point every remaining vertex has more than three
 * unknown fold angles, or a vertex has more than 32 creases.
 */
export function planEnumeration(pattern: Pattern, sys: ClosureSystem, known: (crease: number) => boolean): PlanOutcome {
  const isKnown = new Uint8Array(pattern.creases.length);
  for (const c of pattern.creases) if (c.assignment === 'B' || c.assignment === 'F' || known(c.index)) isKnown[c.index] = 1;
  const blocksOf = blocksOfCreases(pattern, sys);
  const unknownCount = new Int32Array(sys.blockCount);
  for (let b = 0; b < sys.blockCount; b++) {
    const s = sys.blockStart[b], e = sys.blockStart[b + 1];
    if (e - s > 32) return { reason: `vertex ${sys.blockVertex[b]} has more than 32 creases` };
    for (let p = s; p < e; p++) if (!isKnown[sys.slotCrease[p]]) unknownCount[b]++;
  }
  const loose: number[] = [];
  for (const c of pattern.creases) if (!isKnown[c.index] && blocksOf[c.index].length === 0) loose.push(c.index);
  // lazy bucket queue by unknown count (counts only fall while planning); FIFO inside a bucket keeps the
  // order local, so a wrong root is pruned a few vertices after it was taken
  const buckets: number[][] = [[], [], [], []];
  const heads = [0, 0, 0, 0];
  const done = new Uint8Array(sys.blockCount);
  for (let b = 0; b < sys.blockCount; b++) if (unknownCount[b] <= 3) buckets[unknownCount[b]].push(b);
  const order: number[] = [];
  const masks: number[] = [];
  while (order.length < sys.blockCount) {
    let b = -1;
    for (let k = 0; k <= 3 && b < 0; k++) {
      while (heads[k] < buckets[k].length) {
        const cand = buckets[k][heads[k]++];
        if (!done[cand] && unknownCount[cand] === k) { b = cand; break; }
      }
    }
    if (b < 0) {
      let worst = -1;
      for (let q = 0; q < sys.blockCount; q++) if (!done[q] && (worst < 0 || unknownCount[q] < unknownCount[worst])) worst = q;
      return {
        reason: `after ${order.length} of ${sys.blockCount} interior vertices every remaining vertex has more than three unknown fold angles (vertex ${sys.blockVertex[worst]} has ${unknownCount[worst]})`,
      };
    }
    done[b] = 1;
    let mask = 0;
    const s = sys.blockStart[b];
    for (let p = s; p < sys.blockStart[b + 1]; p++) {
      const c = sys.slotCrease[p];
      if (isKnown[c]) { mask |= 1 << (p - s); continue; }
      isKnown[c] = 1;
      for (const nb of blocksOf[c]) {
        if (done[nb]) continue;
        unknownCount[nb]--;
        if (unknownCount[nb] <= 3) buckets[unknownCount[nb]].push(nb);
      }
    }
    order.push(b);
    masks.push(mask);
  }
  return { plan: { order: Int32Array.from(order), knownMask: Uint32Array.from(masks), loose } };
}

const blocksCache = new WeakMap<ClosureSystem, number[][]>();

/** The blocks (interior vertices) each crease meets; depends on the pattern only, so kept per closure system. */
export function blocksOfCreases(pattern: Pattern, sys: ClosureSystem): number[][] {
  let out = blocksCache.get(sys);
  if (!out) {
    out = pattern.creases.map(() => []);
    for (let b = 0; b < sys.blockCount; b++) for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) out[sys.slotCrease[p]].push(b);
    blocksCache.set(sys, out);
  }
  return out;
}

export interface EnumeratedState {
  /** fold angle of every crease (radians) */
  angles: Float64Array;
  /** smallest transversality met on the way (see closeVertex): > 0 means every vertex fixed its new angles to first order */
  minPivot: number;
  /** the blocks in the order they were closed (each fixes the creases of its vertex not fixed before) */
  order: Int32Array;
}

export interface FamilySeed {
  /** fold angles of the creases the enumeration could fix (others 0) */
  angles: Float64Array;
  /** the creases it could fix (drives, held creases and those closed vertex by vertex) */
  known: Uint8Array;
  /** vertices (blocks) left with a continuum or more than three unknowns */
  openBlocks: number[];
}

export interface Enumeration {
  states: EnumeratedState[];
  /** branches where some vertices keep a continuum however the others close: seeds for a family */
  familySeeds: FamilySeed[];
  /** every branch was followed to its end */
  exhausted: boolean;
  /** the state cap stopped the search */
  capped: boolean;
  /** the step budget stopped the search */
  outOfSteps: boolean;
  /** closed-form roots lost to rounding (then the list is not proven complete) */
  dropped: number;
  /** vertex solves done */
  steps: number;
}

export interface EnumerationOptions {
  /** stop after this many closed states (default 64) */
  cap?: number;
  /** stop after this many family seeds (default 64) */
  seedCap?: number;
  /** stop after this many vertex solves (default 4,000,000) */
  maxSteps?: number;
  /** how far a known angle may be from closing a vertex (radians) */
  tolerance?: number;
  /** preferred sign per crease (+1 valley, −1 mountain, 0 either): roots that follow it are tried first, so the
   * first state found is the one the mountain/valley assignment asks for, when there is one */
  prefer?: Float64Array;
}

export const DEFAULT_STATE_CAP = 64;
const DEFAULT_SEED_CAP = 64;
const DEFAULT_MAX_STEPS = 4_000_000;

interface Frame {
  block: number;
  /** candidate states, count, next to try; count −1 marks a postponed vertex (one child, no branching) */
  count: number;
  next: number;
  cursor: number;
  postponedLength: number;
  trailMark: number;
  minPivot: number;
  /** a vertex put off again: its entry in the put-off list and the count it had */
  repostponed?: { index: number; count: number };
}

/**
 * Every closed state with the known creases at their values in `base` (full crease vector, radians).
 *
 * The plan's order is followed; a vertex whose known values leave it a continuum (or more than three unknowns,
 * once an earlier one was put off) is put off until more of its creases are known, then closed; a branch that
 * ends with vertices still put off is a family seed.
 */
export function enumerateStates(sys: ClosureSystem, plan: EnumerationPlan, base: Float64Array, isKnown: Uint8Array, options: EnumerationOptions = {}): Enumeration {
  const cap = options.cap ?? DEFAULT_STATE_CAP;
  const seedCap = options.seedCap ?? DEFAULT_SEED_CAP;
  const maxSteps = options.maxSteps ?? DEFAULT_MAX_STEPS;
  const tolerance = options.tolerance ?? VERTEX_TOLERANCE;
  const nb = plan.order.length;
  const angles = Float64Array.from(base);
  const known = Uint8Array.from(isKnown);
  const out: Enumeration = { states: [], familySeeds: [], exhausted: false, capped: false, outOfSteps: false, dropped: 0, steps: 0 };
  if (nb === 0) {
    out.states.push({ angles, minPivot: Infinity, order: new Int32Array(0) });
    out.exhausted = true;
    return out;
  }
  let maxDegree = 0;
  for (let b = 0; b < sys.blockCount; b++) maxDegree = Math.max(maxDegree, sys.blockStart[b + 1] - sys.blockStart[b]);
  const frames: Frame[] = [];
  // per frame depth (a vertex put off takes a frame too, so depth may exceed the vertex count)
  const candidates: Float64Array[] = [];
  const pivots: Float64Array[] = [];
  const processed = new Uint8Array(sys.blockCount);
  const postponed: number[] = [];
  const postponedAt: number[] = [];
  const trail: number[] = [];
  const ux = new Float64Array(maxDegree), uy = new Float64Array(maxDegree), local = new Float64Array(maxDegree);
  const localKnown = new Uint8Array(maxDegree);
  let cursor = 0;

  const unknownAt = (b: number): number => {
    let u = 0;
    for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) if (!known[sys.slotCrease[p]]) u++;
    return u;
  };
  /** the next vertex to close: a put-off one that has gained a known crease, else the next of the plan */
  const select = (): number => {
    for (let k = 0; k < postponed.length; k++) {
      const b = postponed[k];
      if (!processed[b] && unknownAt(b) < postponedAt[k]) return b;
    }
    while (cursor < nb && processed[plan.order[cursor]]) cursor++;
    return cursor < nb ? plan.order[cursor] : -1;
  };
  const open = (): number[] => postponed.filter((b) => !processed[b]);

  /** Push a frame for block b: close it (or put it off). */
  const push = (b: number, minPivot: number): void => {
    const d = frames.length;
    const s = sys.blockStart[b], n = sys.blockStart[b + 1] - s;
    for (let k = 0; k < n; k++) {
      ux[k] = sys.slotUx[s + k];
      uy[k] = sys.slotUy[s + k];
      localKnown[k] = known[sys.slotCrease[s + k]];
      local[k] = angles[sys.slotCrease[s + k]];
    }
    out.steps++;
    const frame: Frame = { block: b, count: 0, next: 0, cursor, postponedLength: postponed.length, trailMark: trail.length, minPivot };
    processed[b] = 1;
    candidates[d] ??= new Float64Array(2 * maxDegree);
    pivots[d] ??= new Float64Array(2);
    const r = closeVertex(ux, uy, n, localKnown, local, candidates[d], pivots[d], tolerance);
    out.dropped += r.dropped;
    if (r.kind === 'states') {
      frame.count = r.count;
      if (r.count === 2 && options.prefer && mismatches(d, 1, s, n) < mismatches(d, 0, s, n)) swapCandidates(d, n);
    } else {
      // a continuum here (or too many unknowns): decide it when more of its creases are known
      processed[b] = 0;
      const index = postponed.indexOf(b);
      if (index >= 0) {
        frame.repostponed = { index, count: postponedAt[index] };
        postponedAt[index] = unknownAt(b);
      } else {
        postponed.push(b);
        postponedAt.push(unknownAt(b));
      }
      frame.count = -1;
    }
    frames.push(frame);
  };

  const prefer = options.prefer;
  /** sign disagreements of candidate k with the preferred signs, on the creases this vertex fixes */
  const mismatches = (d: number, k: number, s: number, n: number): number => {
    let m = 0;
    for (let q = 0; q < n; q++) {
      if (localKnown[q]) continue;
      const v = candidates[d][k * n + q], sg = prefer![sys.slotCrease[s + q]];
      if (sg !== 0 && Math.abs(v) < Math.PI - 1e-9 && v * sg < -1e-12) m++;
    }
    return m;
  };
  const swapCandidates = (d: number, n: number): void => {
    const c = candidates[d], p = pivots[d];
    for (let q = 0; q < n; q++) { const t = c[q]; c[q] = c[n + q]; c[n + q] = t; }
    const t = p[0]; p[0] = p[1]; p[1] = t;
  };
  const leafOrder = (): Int32Array => {
    const o: number[] = [];
    for (const f of frames) if (f.count >= 0) o.push(f.block);
    return Int32Array.from(o);
  };

  push(select(), Infinity);
  while (frames.length) {
    const d = frames.length - 1;
    const f = frames[d];
    // undo what the last child of this frame set
    while (trail.length > f.trailMark) known[trail.pop()!] = 0;
    let childPivot: number;
    if (f.count === -1) {
      if (f.next > 0) {
        postponed.length = f.postponedLength;
        postponedAt.length = f.postponedLength;
        if (f.repostponed) postponedAt[f.repostponed.index] = f.repostponed.count;
        cursor = f.cursor;
        frames.pop();
        continue;
      }
      f.next = 1;
      // the put-off vertex stays on the list while its descendants run
      if (cursor < nb && plan.order[cursor] === f.block) cursor++;
      childPivot = f.minPivot;
    } else {
      if (f.next >= f.count) {
        processed[f.block] = 0;
        postponed.length = f.postponedLength;
        postponedAt.length = f.postponedLength;
        cursor = f.cursor;
        frames.pop();
        continue;
      }
      const k = f.next++;
      const s = sys.blockStart[f.block], n = sys.blockStart[f.block + 1] - s;
      const cand = candidates[d];
      for (let q = 0; q < n; q++) {
        const c = sys.slotCrease[s + q];
        if (known[c]) continue;
        angles[c] = cand[k * n + q];
        known[c] = 1;
        trail.push(c);
      }
      postponed.length = f.postponedLength;
      postponedAt.length = f.postponedLength;
      cursor = f.cursor;
      childPivot = Math.min(f.minPivot, pivots[d][k]);
    }
    const b = select();
    if (b < 0) {
      const left = open();
      if (left.length === 0) {
        out.states.push({ angles: Float64Array.from(angles), minPivot: childPivot, order: leafOrder() });
        if (out.states.length >= cap) { out.capped = true; return out; }
      } else {
        const seed = Float64Array.from(angles);
        for (let c = 0; c < seed.length; c++) if (!known[c]) seed[c] = 0;
        out.familySeeds.push({ angles: seed, known: Uint8Array.from(known), openBlocks: left });
        if (out.familySeeds.length >= seedCap) { out.capped = true; return out; }
      }
      continue;
    }
    if (out.steps >= maxSteps) { out.outOfSteps = true; return out; }
    push(b, childPivot);
  }
  out.exhausted = true;
  return out;
}

/** Local slots first given a value by the block at position d of the order. */
export function newSlots(sys: ClosureSystem, plan: EnumerationPlan, d: number): number[] {
  const b = plan.order[d];
  const n = sys.blockStart[b + 1] - sys.blockStart[b];
  const out: number[] = [];
  for (let k = 0; k < n; k++) if (!((plan.knownMask[d] >>> k) & 1)) out.push(k);
  return out;
}
