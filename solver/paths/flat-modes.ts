// Every curve leaving the flat state, vertex by vertex, where the structure decides it.
//
// At the flat state each vertex sees only its own creases: to first order Σ t_i u_i = 0 (two equations), to
// second order Σ_{i<j} t_i t_j sin(θ_j − θ_i) = 0. With at most four free creases at a vertex the first order
// leaves a plane (or a line) of rates and the second order cuts it to at most two lines: the vertex's modes
// (a flat-foldable degree-4 vertex: its two modes, a straight line through it among them). A direction of the
// whole sheet is in the flat state's tangent cone exactly when its rates at every vertex lie on one of that
// vertex's modes. A curve is such a direction whose moving vertices hang together through moving creases;
// directions made of curves that share no vertex are those curves folding together, in any proportion.
//
// Enumeration: for each free crease r in turn, every curve whose lowest moving crease is r, by branching over
// the modes of each vertex reached through a moving crease (vertices reached only through still creases stay
// flat). Every curve has one lowest moving crease, so the union over r is every curve, each found once.

import type { Pattern } from '../types';
import { buildClosureSystem, type ClosureSystem } from '../closure/blocks';
import { closeVertex } from '../closure/vertex-solve';
import { planEnumeration } from '../search/enumerate';
import { straightCreaseLines } from './cone';

export interface FlatCurve {
  /** unit tangent over every crease */
  tangent: Float64Array;
  /** interior vertices (blocks) whose creases move */
  blocks: number[];
  /** the straight crease line it folds alone, when it is one */
  line?: number[];
}

export interface FlatModes {
  /** every straight crease line folding alone first, then the other curves */
  curves: FlatCurve[];
  /** every curve was found (no cap stopped the enumeration) */
  complete: boolean;
  /** the cap on curves other than straight lines, when it stopped the enumeration */
  limit?: number;
  /** the search stopped at the first curve the caller was looking for */
  stopped?: boolean;
  /** some curves share no vertex, so they also fold together in any proportion */
  combinations: boolean;
}

export const DEFAULT_CURVE_CAP = 64;
const EPS = 1e-12;

interface VertexModes {
  /** slots of the block that are free (index into the block's slots) */
  free: number[];
  /** each mode: a unit vector over `free` */
  modes: number[][];
}

/** The modes of one vertex at flat, or a reason the structure does not decide them. */
function vertexModes(dirs: number[], free: number[]): VertexModes | string {
  const k = free.length;
  if (k > 4) return `has ${k} free creases, more than four`;
  if (k === 0) return { free, modes: [] };
  const cs = free.map((s) => Math.cos(dirs[s])), sn = free.map((s) => Math.sin(dirs[s]));
  // null space of the 2 × k first-order rows by a tiny Gram–Schmidt on the rows, then completion
  const basis = nullBasis2(cs, sn);
  const Q = (t: number[]) => {
    let q = 0;
    for (let i = 0; i < k; i++) for (let j = i + 1; j < k; j++) q += t[i] * t[j] * Math.sin(dirs[free[j]] - dirs[free[i]]);
    return q;
  };
  const unit = (t: number[]) => { const n = Math.hypot(...t); return t.map((x) => x / n); };
  if (basis.length === 0) return { free, modes: [] };
  if (basis.length === 1) return { free, modes: Math.abs(Q(basis[0])) < 1e-10 ? [unit(basis[0])] : [] };
  if (basis.length > 2) return 'leaves more than a plane of first-order rates';
  const [n1, n2] = basis;
  const mix = (a: number, b: number) => n1.map((x, i) => a * x + b * n2[i]);
  const A = Q(n1), C = Q(n2), B = (Q(mix(1, 1)) - A - C) / 2;
  const big = Math.max(Math.abs(A), Math.abs(B), Math.abs(C));
  if (big < 1e-10) return 'a vertex whose second order vanishes on its whole plane of rates';
  // A a² + 2B ab + C b² = 0 on the unit circle
  const modes: number[][] = [];
  const disc = B * B - A * C;
  if (disc < -1e-12 * big * big) return { free, modes };
  const sq = Math.sqrt(Math.max(0, disc));
  if (Math.abs(C) > 1e-12 * big) {
    for (const x of disc > 1e-12 * big * big ? [(-B + sq) / C, (-B - sq) / C] : [-B / C]) modes.push(unit(mix(1, x)));
  } else {
    modes.push(unit(mix(0, 1)));
    if (Math.abs(B) > 1e-12 * big) modes.push(unit(mix(1, -A / (2 * B))));
  }
  return { free, modes };
}

/** Orthonormal null basis of the rows (cs, sn) over k variables. */
function nullBasis2(cs: number[], sn: number[]): number[][] {
  const k = cs.length;
  const rows: number[][] = [];
  for (const r0 of [cs, sn]) {
    const r = [...r0];
    for (const q of rows) { const d = r.reduce((s, x, i) => s + x * q[i], 0); for (let i = 0; i < k; i++) r[i] -= d * q[i]; }
    const n = Math.hypot(...r);
    if (n > 1e-9) rows.push(r.map((x) => x / n));
  }
  const out: number[][] = [];
  for (let e = 0; e < k && out.length < k - rows.length; e++) {
    const v: number[] = Array.from({ length: k }, (_, i) => (i === e ? 1 : 0));
    for (const q of [...rows, ...out]) { const d = v.reduce((s, x, i) => s + x * q[i], 0); for (let i = 0; i < k; i++) v[i] -= d * q[i]; }
    const n = Math.hypot(...v);
    if (n > 1e-6) out.push(v.map((x) => x / n));
  }
  return out;
}

interface Frame {
  block: number;
  /** candidate local states: values for the block's free slots */
  options: number[][];
  next: number;
  trailMark: number;
  queueLength: number;
  queueHead: number;
}

/**
 * Every curve leaving the flat state with the creases in `held` (and flat and boundary creases) kept flat, or
 * the reason the vertices' structure does not decide them (then the dense tangent-cone analysis is needed).
 */
export function flatModesByVertex(
  pattern: Pattern,
  held: Set<number>,
  options: { cap?: number; prefer?: Float64Array; until?: (tangent: Float64Array) => boolean } = {},
): FlatModes | { reason: string } {
  const cap = options.cap ?? DEFAULT_CURVE_CAP;
  const prefer = options.prefer;
  let stopped = false;
  const sys = buildClosureSystem(pattern);
  const nc = pattern.creases.length;
  const isFree = (c: number) => pattern.creases[c].assignment !== 'B' && pattern.creases[c].assignment !== 'F' && !held.has(c);
  const modes: VertexModes[] = [];
  const blocksOf: number[][] = pattern.creases.map(() => []);
  for (let b = 0; b < sys.blockCount; b++) {
    const s = sys.blockStart[b], n = sys.blockStart[b + 1] - s;
    const dirs: number[] = [], free: number[] = [];
    for (let k = 0; k < n; k++) {
      dirs.push(Math.atan2(sys.slotUy[s + k], sys.slotUx[s + k]));
      const c = sys.slotCrease[s + k];
      if (isFree(c)) { free.push(k); blocksOf[c].push(b); }
    }
    const m = vertexModes(dirs, free);
    // (a vertex with more than four free creases, or a whole plane of second-order rates, needs the dense analysis)
    if (typeof m === 'string') return { reason: `vertex ${sys.blockVertex[b]} ${m}` };
    modes.push(m);
  }
  // straight crease lines folding alone: from the geometry, always listed
  const curves: FlatCurve[] = straightCreaseLines(pattern, (c) => held.has(c)).map((line) => {
    const tangent = new Float64Array(nc);
    for (const c of line) tangent[c] = 1 / Math.sqrt(line.length);
    const blocks = [...new Set(line.flatMap((c) => blocksOf[c]))];
    return { tangent, blocks, line };
  });
  const lineOf = new Map<string, number>();
  curves.forEach((c, i) => lineOf.set([...c.line!].sort((a, b) => a - b).join(','), i));
  let others = 0;
  let capped = false;
  const t = new Float64Array(nc);
  const set = new Uint8Array(nc);
  const done = new Uint8Array(sys.blockCount);
  const trail: number[] = [];
  const queue: number[] = [];

  for (let r = 0; r < nc && !capped && !stopped; r++) {
    if (!isFree(r)) continue;
    if (blocksOf[r].length === 0) {
      // a crease at no interior vertex folds alone
      const tangent = new Float64Array(nc);
      tangent[r] = 1;
      curves.push({ tangent, blocks: [] });
      continue;
    }
    t.fill(0); set.fill(0); done.fill(0); trail.length = 0; queue.length = 0;
    // the sense the assignment asks of the reference crease, so the preferred modes are the matching ones
    t[r] = prefer && prefer[r] < 0 ? -1 : 1; set[r] = 1;
    queue.push(...blocksOf[r]);
    const frames: Frame[] = [];
    let head = 0;
    const nextBlock = (): number => {
      while (head < queue.length && done[queue[head]]) head++;
      return head < queue.length ? queue[head] : -1;
    };
    const localStates = (b: number): number[][] => {
      const s = sys.blockStart[b];
      const vm = modes[b];
      const val = vm.free.map((k) => t[sys.slotCrease[s + k]]);
      const known = vm.free.map((k) => !!set[sys.slotCrease[s + k]]);
      const scale = Math.max(...val.map(Math.abs));
      if (scale < EPS) return [vm.free.map(() => 0)]; // reached through still creases only: stays flat
      const out: number[][] = [];
      for (const w of vm.modes) {
        let pivot = -1;
        for (let i = 0; i < w.length; i++) if (known[i] && Math.abs(val[i]) > EPS && Math.abs(w[i]) > 1e-9 && (pivot < 0 || Math.abs(w[i]) > Math.abs(w[pivot]))) pivot = i;
        if (pivot < 0) continue;
        const lambda = val[pivot] / w[pivot];
        let ok = true;
        for (let i = 0; i < w.length && ok; i++) if (known[i] && Math.abs(lambda * w[i] - val[i]) > 1e-9 * scale) ok = false;
        if (!ok) continue;
        const local = w.map((x) => lambda * x);
        // a curve is listed from its lowest moving crease: a lower one moving here was listed before
        if (vm.free.some((k, i) => !known[i] && Math.abs(local[i]) > EPS && sys.slotCrease[s + k] < r)) continue;
        out.push(local);
      }
      // the modes whose signs follow the assignment first, so the first curve found is the one it asks for
      if (prefer && out.length > 1) {
        const miss = (local: number[]) => {
          let m = 0;
          vm.free.forEach((k, i) => { const sg = prefer[sys.slotCrease[s + k]]; if (sg !== 0 && local[i] * sg < -EPS) m++; });
          return m;
        };
        out.sort((p, q) => miss(p) - miss(q));
      }
      return out;
    };
    const push = (b: number) => { frames.push({ block: b, options: localStates(b), next: 0, trailMark: trail.length, queueLength: queue.length, queueHead: head }); };
    push(nextBlock());
    while (frames.length) {
      const f = frames[frames.length - 1];
      while (trail.length > f.trailMark) { const c = trail.pop()!; set[c] = 0; t[c] = 0; }
      queue.length = f.queueLength;
      head = f.queueHead;
      if (f.next >= f.options.length) { done[f.block] = 0; frames.pop(); continue; }
      const local = f.options[f.next++];
      done[f.block] = 1;
      const s = sys.blockStart[f.block];
      modes[f.block].free.forEach((k, i) => {
        const c = sys.slotCrease[s + k];
        if (set[c]) return;
        set[c] = 1;
        t[c] = Math.abs(local[i]) > EPS ? local[i] : 0;
        trail.push(c);
        if (t[c] !== 0) for (const nb of blocksOf[c]) if (!done[nb]) queue.push(nb);
      });
      const b = nextBlock();
      if (b >= 0) { push(b); continue; }
      // every vertex reached is closed to second order: a curve
      const tangent = Float64Array.from(t);
      let n = 0;
      for (const x of tangent) n += x * x;
      n = Math.sqrt(n);
      for (let c = 0; c < nc; c++) tangent[c] /= n;
      const blocks: number[] = [];
      for (let q = 0; q < sys.blockCount; q++) {
        let moves = false;
        for (let p = sys.blockStart[q]; p < sys.blockStart[q + 1] && !moves; p++) if (tangent[sys.slotCrease[p]] !== 0) moves = true;
        if (moves) blocks.push(q);
      }
      // a straight line folding alone is listed already
      const support: number[] = [];
      for (let c = 0; c < nc; c++) if (tangent[c] !== 0) support.push(c);
      const li = lineOf.get(support.join(','));
      if (li !== undefined && support.every((c) => Math.abs(Math.abs(tangent[c]) - Math.abs(tangent[support[0]])) < 1e-9)) continue;
      curves.push({ tangent, blocks });
      if (options.until?.(tangent) || options.until?.(tangent.map((x) => -x))) { stopped = true; break; }
      if (++others >= cap) { capped = true; break; }
    }
    if (stopped) break;
  }
  // curves that share no moving vertex fold together too
  const combinations = disjointPair(curves);
  return { curves, complete: !capped && !stopped, ...(capped ? { limit: cap } : {}), ...(stopped ? { stopped: true } : {}), combinations };
}

/** Whether two curves move no vertex in common. */
function disjointPair(curves: FlatCurve[]): boolean {
  for (let i = 0; i < curves.length; i++) {
    const mine = new Set(curves[i].blocks);
    for (let j = i + 1; j < curves.length; j++) if (!curves[j].blocks.some((b) => mine.has(b))) return true;
  }
  return false;
}

/**
 * A curve is real when, a small step ε along it, every vertex closes (in the enumeration's order, taking at
 * each vertex the closed-form state nearest the first-order prediction) and the state found lies within
 * O(ε²) of the ray. O(creases), no factorization; undefined when a vertex leaves a continuum there.
 */
export function rayClosesByVertex(pattern: Pattern, sys: ClosureSystem, tangent: Float64Array, held: Set<number>, step = 1e-3): boolean | undefined {
  let ref = -1;
  for (let c = 0; c < tangent.length; c++) if (Math.abs(tangent[c]) > 1e-9 && (ref < 0 || Math.abs(tangent[c]) > Math.abs(tangent[ref]))) ref = c;
  if (ref < 0) return false;
  const scale = step / Math.abs(tangent[ref]);
  const predicted = tangent.map((x) => x * scale);
  const planned = planEnumeration(pattern, sys, (c) => c === ref || held.has(c));
  if (!planned.plan) return undefined;
  if (planned.plan.loose.some((c) => tangent[c] !== 0)) return true; // a crease at no vertex folds alone
  const angles = new Float64Array(tangent.length);
  angles[ref] = predicted[ref];
  let maxDegree = 0;
  for (let b = 0; b < sys.blockCount; b++) maxDegree = Math.max(maxDegree, sys.blockStart[b + 1] - sys.blockStart[b]);
  const out = new Float64Array(2 * maxDegree), pivot = new Float64Array(2);
  const ux = new Float64Array(maxDegree), uy = new Float64Array(maxDegree), local = new Float64Array(maxDegree), known = new Uint8Array(maxDegree);
  const { order, knownMask } = planned.plan;
  for (let q = 0; q < order.length; q++) {
    const b = order[q];
    const s = sys.blockStart[b], n = sys.blockStart[b + 1] - s;
    for (let k = 0; k < n; k++) {
      ux[k] = sys.slotUx[s + k]; uy[k] = sys.slotUy[s + k];
      known[k] = (knownMask[q] >>> k) & 1;
      local[k] = angles[sys.slotCrease[s + k]];
    }
    const r = closeVertex(ux, uy, n, known, local, out, pivot, 1e-7);
    if (r.kind !== 'states') return undefined;
    if (r.count === 0) return false;
    let best = 0, bestD = Infinity;
    for (let k = 0; k < r.count; k++) {
      let d = 0;
      for (let j = 0; j < n; j++) if (!known[j]) d = Math.max(d, Math.abs(out[k * n + j] - predicted[sys.slotCrease[s + j]]));
      if (d < bestD) { bestD = d; best = k; }
    }
    for (let j = 0; j < n; j++) if (!known[j]) angles[sys.slotCrease[s + j]] = out[best * n + j];
  }
  let off = 0;
  for (let c = 0; c < angles.length; c++) off = Math.max(off, Math.abs(angles[c] - predicted[c]));
  // second-order drift: a few times ε² (the curve bends away from its tangent)
  return off <= 50 * step * step;
}
