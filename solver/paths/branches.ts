// Branch analysis: the directions in which a pattern can leave a singular state, grouped into the curves
// that pass through it, each with its first-order angle ratios, whether its signs follow the mountain/valley
// assignment, and a short name of our own.
//
//  - At the flat state the tangent cone of solver/paths/cone.ts is used (linear Σρu = 0, quadratic Σρρ sin = 0).
//    Rays that only mix straight crease lines are not listed one by one: each line is listed alone, and
//    the group notes that lines may also fold together. Above the dense size limit, degree-4 meshes get their
//    mode pair by exact first-order propagation vertex by vertex (see flatModeOfMesh), plus the lines.
//  - At any other closed state the same two orders are taken from the real Jacobian: the null space N of J
//    (first order) and, for every left null vector y of J, the quadratic y·Q(Nc) = 0 with
//    Q(v) = Σ_{a<b} v_a v_b (w_a × w_b) per vertex (second order of the rotation product at a closed state,
//    by the Baker–Campbell–Hausdorff series: log Π exp(ε v_k [w_k]) = εΣ v_k w_k + ε²/2 Σ_{a<b} v_a v_b w_a × w_b).
//  - Every ray is then checked on the real equations a small step away (a constrained Newton solve).

import type { Drive, Message, Pattern } from '../types';
import { ClosureProblem, solveSmall } from '../closure/newton';
import { flatCone, nullSpace } from './cone';
import { mulberry32 } from '../math/random';
import { buildClosureSystem } from '../closure/blocks';
import { pivotedQR, nullBasisFromQR } from '../math/qr';
import { flatModesByVertex, rayClosesByVertex } from './flat-modes';

export type BranchKind = 'curve' | 'line' | 'direction';

export interface Branch {
  /** 1-based, stable for a given pattern, state and held set */
  id: number;
  /** short name of our own: the group and the sense, e.g. "A+", "L2−" */
  name: string;
  /** the curve (or straight line) the ray belongs to; both senses share it */
  group: string;
  kind: BranchKind;
  matchesAssignment: boolean;
  /** unit direction over every crease (0 on held creases) */
  tangent: Float64Array;
  /** crease the ratios are relative to */
  reference: number;
  /** first-order ratio dρ_c / dρ_reference for every crease that moves */
  ratios: Map<number, number>;
  /** creases of the straight line, for line rays */
  line?: number[];
  /** the ray was confirmed by a solve a small step along it */
  verified: boolean;
}

export interface BranchGroup {
  name: string;
  kind: BranchKind;
  /** ids of its rays */
  branches: number[];
  text: string;
}

export type StateKind = 'flat' | 'regular' | 'singular' | 'isolated';

export interface BranchAnalysis {
  state: StateKind;
  branches: Branch[];
  groups: BranchGroup[];
  /** dimension of the Jacobian's null space at the state (first-order directions) */
  nullity: number;
  /** true when the analysis could not be complete (large pattern) */
  partial: boolean;
  messages: Message[];
}

export interface BranchOptions {
  /** creases held at their values (not free to move) */
  held?: Iterable<number>;
  /** a drive: ratios are given relative to it, and names say the sense it moves in */
  drive?: number;
  /** largest number of free creases for the dense analysis (default 400 at flat, 600 elsewhere) */
  maxVariables?: number;
  /** check each ray a small step along it (default true) */
  verify?: boolean;
  /** most curves (besides straight lines) the vertex-by-vertex analysis lists (default 64) */
  maxCurves?: number;
  /** vertex by vertex: stop at the first curve for which this holds (either sense); the ids of what was found do not change */
  until?: (tangent: Float64Array) => boolean;
}

const SIGN_EPS = 1e-9;
const DENSE_LIMIT_FLAT = 400;
const DENSE_LIMIT_STATE = 600;
const VERIFY_STEP = 1e-3;

/** Signs of a direction agree with the mountain/valley assignment (unassigned creases agree with either). */
export function tangentMatchesAssignment(pattern: Pattern, t: Float64Array): boolean {
  let moves = false;
  for (const c of pattern.creases) {
    const v = t[c.index];
    if (Math.abs(v) > SIGN_EPS) moves = true;
    if (c.assignment === 'M' && v > SIGN_EPS) return false;
    if (c.assignment === 'V' && v < -SIGN_EPS) return false;
  }
  return moves;
}

function heldSet(opts: BranchOptions): Set<number> {
  return new Set(opts.held ?? []);
}

/** Branches at the flat state: vertex by vertex where the structure decides them, else the dense tangent cone. */
export function flatBranches(pattern: Pattern, opts: BranchOptions = {}): BranchAnalysis {
  const held = heldSet(opts);
  const messages: Message[] = [];
  const movable = pattern.creases.filter((c) => c.assignment !== 'B' && c.assignment !== 'F' && !held.has(c.index)).length;
  const assignment = new Float64Array(pattern.creases.length);
  for (const c of pattern.creases) if (!held.has(c.index)) assignment[c.index] = c.assignment === 'V' ? 1 : c.assignment === 'M' ? -1 : 0;
  if (pattern.interiorVertices.length === 0) {
    messages.push({ severity: 'info', code: 'no-interior-vertex', text: 'The pattern has no interior vertex: every free crease folds on its own.' });
  }
  const structural = flatModesByVertex(pattern, held, { cap: opts.maxCurves, prefer: assignment, until: opts.until });
  if (!('reason' in structural)) {
    const raw: RawRay[] = [];
    for (const c of structural.curves) raw.push({ tangent: c.tangent, line: c.line }, { tangent: c.tangent.map((x) => -x), line: c.line });
    const sys = buildClosureSystem(pattern);
    const problem = new ClosureProblem(pattern, (c) => held.has(c), sys);
    const base = new Float64Array(pattern.creases.length);
    const check = (t: Float64Array) => rayClosesByVertex(pattern, sys, t, held) ?? verifyRay(problem, base, t);
    const result = organize(pattern, raw, held, opts, 'flat', NaN, messages, problem, base, { structural: true, check });
    result.partial = !structural.complete;
    if (structural.stopped) {
      messages.push({ severity: 'info', code: 'branches-stopped', text: 'The vertex-by-vertex search stopped at the first curve asked for; `hingeplan branches` lists them all (with the same ids).' });
    } else if (!structural.complete) {
      messages.push({
        severity: 'info',
        code: 'branches-partial',
        text: `Every straight crease line is listed, and the first ${structural.limit} other curves found vertex by vertex (the cap): more curves leave the flat state.`,
      });
    }
    if (structural.combinations) {
      messages.push({ severity: 'info', code: 'curves-together', text: 'Curves that move no vertex in common can also fold together, in any proportion.' });
    }
    return result;
  }
  const limit = opts.maxVariables ?? DENSE_LIMIT_FLAT;
  const cone = flatCone(pattern, {
    held: (c) => held.has(c),
    seeds: [assignment, assignment.map((x) => -x)],
    maxVariables: limit,
  });
  // the flat sheet's mirror symmetry (z → −z turns every fold angle around) makes −t a ray with t
  const raw: RawRay[] = [];
  for (const r of cone.rays) raw.push({ tangent: r.tangent, line: r.straightLine }, { tangent: r.tangent.map((x) => -x), line: r.straightLine });
  if (cone.partial) {
    messages.push({
      severity: 'warning',
      code: 'branches-partial',
      text: `The vertex-by-vertex analysis does not apply (${structural.reason}), and ${movable} free creases is above the ${limit} the dense flat-state analysis handles: only straight crease lines folding alone are listed.`,
    });
  }
  if (!cone.partial && !cone.complete) messages.push(searchedNote('the flat state', cone.linearDimension, cone.starts));
  const result = organize(pattern, raw, held, opts, 'flat', cone.partial ? NaN : cone.linearDimension, messages);
  result.partial = cone.partial || !cone.complete;
  return result;
}

interface RawRay {
  tangent: Float64Array;
  line?: number[];
}

/**
 * Branches at a closed state `angles` (full crease vector, radians). At a regular state of a one-DOF family
 * the answer is the family's two senses; at a singular state, the rays of its tangent cone.
 */
export function branchesAt(pattern: Pattern, angles: Float64Array, opts: BranchOptions = {}): BranchAnalysis {
  const held = heldSet(opts);
  let flat = true;
  for (const c of pattern.creases) if (c.assignment !== 'B' && Math.abs(angles[c.index]) > 1e-12) flat = false;
  if (flat) return flatBranches(pattern, opts);
  const messages: Message[] = [];
  const problem = new ClosureProblem(pattern, (c) => held.has(c));
  const n = problem.unknownCount;
  const worst = problem.evaluate(angles);
  if (worst > 1e-8) {
    messages.push({ severity: 'error', code: 'not-closed', text: `The state does not close (largest vertex residual ${worst.toExponential(2)} rad), so it has no branches.` });
    return { state: 'isolated', branches: [], groups: [], nullity: 0, partial: false, messages };
  }
  const limit = opts.maxVariables ?? DENSE_LIMIT_STATE;
  if (n > limit) {
    messages.push({ severity: 'warning', code: 'branches-too-large', text: `${n} free creases is above the ${limit} the dense branch analysis handles; the rays were not analysed.` });
    return { state: 'singular', branches: [], groups: [], nullity: NaN, partial: true, messages };
  }
  const m = 3 * problem.sys.blockCount;
  const cols = Array.from(problem.unknownCreases);
  const J = new Float64Array(m * n);
  const { blockStart, slotCrease, blockCount } = problem.sys;
  for (let b = 0; b < blockCount; b++)
    for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
      const a = problem.unknownOf[slotCrease[p]];
      if (a < 0) continue;
      for (let k = 0; k < 3; k++) J[a * m + 3 * b + k] += problem.jacobian[3 * p + k];
    }
  // tolerance relative to the unit columns: a located singular point is singular to ~1e-9
  const f = pivotedQR(J, m, n, 1e-7);
  const N = nullBasisFromQR(f);
  const k = N.length;
  const toFull = (c: number[]): Float64Array => {
    const t = new Float64Array(pattern.creases.length);
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let a = 0; a < k; a++) s += c[a] * N[a][j];
      t[cols[j]] = Math.abs(s) < 1e-13 ? 0 : s;
    }
    normalizeFull(t);
    return t;
  };
  if (k === 0) {
    messages.push({ severity: 'info', code: 'rigid-state', text: 'The Jacobian has full rank: no motion leaves this state with these creases held.' });
    return { state: 'isolated', branches: [], groups: [], nullity: 0, partial: false, messages };
  }
  if (k === 1) {
    const t = toFull([1]);
    return organize(pattern, [{ tangent: t }, { tangent: t.map((x) => -x) }], held, { ...opts, verify: false }, 'regular', 1, messages, problem, angles);
  }
  // left null space of J from the Householder reflectors: Q·e_j for j ≥ rank
  const Y = leftNullSpace(f);
  const forms: number[][][] = [];
  let scale = 0;
  for (const y of Y) {
    const M = Array.from({ length: k }, () => new Array(k).fill(0));
    for (let b = 0; b < blockCount; b++) {
      const yx = y[3 * b], yy = y[3 * b + 1], yz = y[3 * b + 2];
      if (Math.abs(yx) + Math.abs(yy) + Math.abs(yz) < 1e-15) continue;
      for (let p = blockStart[b]; p < blockStart[b + 1]; p++) {
        const ap = problem.unknownOf[slotCrease[p]];
        if (ap < 0) continue;
        const wp = problem.jacobian.subarray(3 * p, 3 * p + 3);
        for (let q = p + 1; q < blockStart[b + 1]; q++) {
          const aq = problem.unknownOf[slotCrease[q]];
          if (aq < 0) continue;
          const wq = problem.jacobian.subarray(3 * q, 3 * q + 3);
          const cx = wp[1] * wq[2] - wp[2] * wq[1], cy = wp[2] * wq[0] - wp[0] * wq[2], cz = wp[0] * wq[1] - wp[1] * wq[0];
          const s = 0.5 * (yx * cx + yy * cy + yz * cz);
          if (s === 0) continue;
          for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) M[i][j] += s * (N[i][ap] * N[j][aq] + N[i][aq] * N[j][ap]);
        }
      }
    }
    let big = 0;
    for (const row of M) for (const v of row) big = Math.max(big, Math.abs(v));
    scale = Math.max(scale, big);
    forms.push(M);
  }
  const live = forms.filter((M) => M.some((row) => row.some((v) => Math.abs(v) > 1e-9 * Math.max(scale, 1e-300))));
  if (live.length === 0) {
    messages.push({
      severity: 'info',
      code: 'multi-dof-state',
      text: `${k} independent directions leave this state and no second-order condition ties them: it is a point of a ${k}-DOF family, not a branch point.`,
    });
    const raw: RawRay[] = [];
    for (let a = 0; a < k; a++) {
      const c = new Array(k).fill(0);
      c[a] = 1;
      const t = toFull(c);
      raw.push({ tangent: t }, { tangent: t.map((x) => -x) });
    }
    return organize(pattern, raw, held, { ...opts, verify: false }, 'regular', k, messages, problem, angles);
  }
  const coeffs = commonZeros(live, k);
  const raw: RawRay[] = coeffs.map((c) => ({ tangent: toFull(c) }));
  // two directions: the rays are the roots of a binary quadratic, all of them; more: a search
  if (k > 2) messages.push(searchedNote('this state', k, commonZeroStarts(k)));
  const result = organize(pattern, raw, held, opts, 'singular', k, messages, problem, angles);
  if (k > 2) result.partial = true;
  return result;
}

/** The rays of a tangent cone of three or more dimensions come from a search, which cannot prove it found them all. */
function searchedNote(where: string, dimension: number, starts: number | undefined): Message {
  return {
    severity: 'warning',
    code: 'branches-searched',
    text: `The rays leaving ${where} were found by a search on the second-order closure conditions (${starts ?? 'several'} starts in a ${dimension}-dimensional space of first-order motions): every ray listed satisfies them, but the list is not proven to hold every ray.`,
  };
}

/** Orthonormal basis of the left null space of the factored matrix (columns rank … m−1 of Q). */
function leftNullSpace(f: ReturnType<typeof pivotedQR>): Float64Array[] {
  const { m, rank, qr, tau } = f;
  const out: Float64Array[] = [];
  for (let j = rank; j < m; j++) {
    const v = new Float64Array(m);
    v[j] = 1;
    // Q = H_0 H_1 … H_{r−1}; apply from the last reflector to the first
    for (let step = rank - 1; step >= 0; step--) {
      const c0 = step * m;
      let s = v[step];
      for (let i = step + 1; i < m; i++) s += qr[c0 + i] * v[i];
      s *= tau[step];
      v[step] -= s;
      for (let i = step + 1; i < m; i++) v[i] -= s * qr[c0 + i];
    }
    out.push(v);
  }
  return out;
}

function quadValue(M: number[][], c: number[]): number {
  let s = 0;
  for (let a = 0; a < c.length; a++) for (let b = 0; b < c.length; b++) s += c[a] * M[a][b] * c[b];
  return s;
}

function formNorm(M: number[][]): number {
  let s = 0;
  for (const row of M) for (const v of row) s = Math.max(s, Math.abs(v));
  return s;
}

/** Random starts of the search for common zeros of the quadratic forms on a k-dimensional space. */
const commonZeroStarts = (k: number) => Math.min(200, 30 + 10 * k);

/** Unit vectors c (both signs) on which every quadratic form vanishes, relative to the forms' size. */
function commonZeros(forms: number[][][], k: number): number[][] {
  const big = Math.max(...forms.map(formNorm));
  const ok = (c: number[]) => forms.every((M) => Math.abs(quadValue(M, c)) <= 1e-6 * big);
  const out: number[][] = [];
  const add = (c: number[]) => {
    const n = Math.hypot(...c);
    const u = c.map((x) => x / n);
    if (!ok(u)) return;
    for (const v of out) if (u.every((x, i) => Math.abs(x - v[i]) < 1e-6)) return;
    out.push(u);
    out.push(u.map((x) => -x));
  };
  if (k === 2) {
    // roots of the largest binary form A cos² + 2B cos sin + C sin², kept where all forms vanish
    const M = forms.reduce((a, b) => (formNorm(b) > formNorm(a) ? b : a));
    const A = M[0][0], B = M[0][1], C = M[1][1];
    const ts: number[] = [];
    if (Math.abs(C) > 1e-12 * big) {
      const disc = B * B - A * C;
      if (disc >= -1e-12 * big * big) {
        const sq = Math.sqrt(Math.max(0, disc));
        for (const x of [(-B + sq) / C, (-B - sq) / C]) ts.push(Math.atan(x));
      }
    } else {
      ts.push(Math.PI / 2);
      if (Math.abs(B) > 1e-12 * big) ts.push(Math.atan2(-A, 2 * B));
    }
    for (const t of ts) add([Math.cos(t), Math.sin(t)]);
    return out;
  }
  // k > 2: Gauss–Newton on the sphere from deterministic random starts
  const rand = mulberry32(7);
  const starts = commonZeroStarts(k);
  for (let s = 0; s < starts; s++) {
    let c = Array.from({ length: k }, () => rand() * 2 - 1);
    for (let it = 0; it < 60; it++) {
      const norm = Math.hypot(...c);
      c = c.map((x) => x / norm);
      const R = forms.map((M) => quadValue(M, c) / big);
      const Jr = forms.map((M) => M.map((row) => 2 * row.reduce((acc, v, j) => acc + v * c[j], 0) / big));
      R.push(c.reduce((a, v) => a + v * v, 0) - 1);
      Jr.push(c.map((v) => 2 * v));
      if (Math.max(...R.map(Math.abs)) < 1e-13) break;
      const G = Array.from({ length: k }, (_, a) => Array.from({ length: k }, (_, b) => (a === b ? 1e-12 : 0) + Jr.reduce((acc, row) => acc + row[a] * row[b], 0)));
      const g = Array.from({ length: k }, (_, a) => Jr.reduce((acc, row, r) => acc + row[a] * R[r], 0));
      const d = solveSmall(G, g);
      c = c.map((v, i) => v - d[i]);
    }
    add(c);
  }
  return out;
}

function normalizeFull(t: Float64Array): void {
  let s = 0;
  for (const x of t) s += x * x;
  const n = Math.sqrt(s) || 1;
  for (let i = 0; i < t.length; i++) t[i] /= n;
}

interface OrganizeOptions {
  /** the rays come from the vertex-by-vertex enumeration: each is a curve of its own (no mixtures to drop) */
  structural?: boolean;
  /** how to check a ray on the real equations (default: a constrained Newton step) */
  check?: (t: Float64Array) => boolean;
}

/**
 * Group rays into curves (a ray and its opposite) and straight lines, drop rays that only mix lines (dense
 * analysis), check each ray a small step along it, order, name and number them. Ids and names depend on the
 * pattern and the held creases only: a curve's "+" sense is the one in which its lowest-numbered moving crease
 * folds valley-wards. Vertex by vertex, straight lines come first (by their lowest crease), then the curves in
 * the order the search finds them (the one the assignment asks for first), so a search stopped early gives the
 * same ids to what it found; the dense analysis orders curves that follow the assignment first, then by their
 * sign patterns, lines after. The drive only chooses what the ratios are relative to.
 */
function organize(
  pattern: Pattern,
  raw: RawRay[],
  held: Set<number>,
  opts: BranchOptions,
  state: StateKind,
  nullity: number,
  messages: Message[],
  problem?: ClosureProblem,
  angles?: Float64Array,
  how: OrganizeOptions = {},
): BranchAnalysis {
  const lines = raw.filter((r) => r.line);
  const others = raw.filter((r) => !r.line);
  let mixed = 0;
  let combined = 0;
  const curves: RawRay[] = [];
  if (how.structural) curves.push(...others);
  else {
    // the span of the line rays: rays inside it are lines folding together
    const lineBasis = lines.length ? nullSpaceComplement(lines.map((l) => l.tangent)) : [];
    // rays that are combinations of rays already listed (lines, or curves taken earlier) are not listed one by
    // one: the assignment's own rays first, then the sparsest
    const moving = (t: Float64Array) => t.reduce((a, x) => a + (Math.abs(x) > 1e-9 ? 1 : 0), 0);
    const ranked = [...others].sort((a, b) => {
      const ma = tangentMatchesAssignment(pattern, a.tangent) || tangentMatchesAssignment(pattern, a.tangent.map((x) => -x));
      const mb = tangentMatchesAssignment(pattern, b.tangent) || tangentMatchesAssignment(pattern, b.tangent.map((x) => -x));
      if (ma !== mb) return ma ? -1 : 1;
      return moving(a.tangent) - moving(b.tangent);
    });
    const span = [...lineBasis];
    for (const r of ranked) {
      if (lineBasis.length && residualOffSpan(r.tangent, lineBasis) < 1e-6) { mixed++; continue; }
      const inCurves = curves.some((c) => residualOffSpan(r.tangent, nullSpaceComplement([normalized(c.tangent)])) < 1e-6);
      if (!inCurves && span.length > lineBasis.length && residualOffSpan(r.tangent, span) < 1e-6) { combined++; continue; }
      curves.push(r);
      if (!inCurves) span.push(...nullSpaceComplement([r.tangent].map((t) => { const v = Float64Array.from(t); for (let pass = 0; pass < 2; pass++) for (const u of span) subtractProjection(v, u); return v; })));
    }
  }
  // verify on the real equations
  const verify = opts.verify ?? true;
  const base = angles ?? new Float64Array(pattern.creases.length);
  const prob = problem ?? new ClosureProblem(pattern, (c) => held.has(c));
  const checked = (t: Float64Array): boolean => (!verify ? true : how.check ? how.check(t) : verifyRay(prob, base, t));
  // pair ±: each entry is one curve (or line) with the ray of each sense found
  interface Pending { rays: Float64Array[]; line?: number[]; kind: BranchKind; verified: boolean }
  const pending: Pending[] = [];
  const same = (a: Float64Array, b: Float64Array) => { for (let i = 0; i < a.length; i++) if (Math.abs(a[i] - b[i]) > 1e-6) return false; return true; };
  const opposite = (a: Float64Array, b: Float64Array) => { for (let i = 0; i < a.length; i++) if (Math.abs(a[i] + b[i]) > 1e-6) return false; return true; };
  let dropped = 0, unconfirmed = 0;
  const addLines = () => {
    for (const r of lines) {
      const key = [...r.line!].sort((a, b) => a - b).join(',');
      const p = pending.find((q) => q.line && [...q.line].sort((a, b) => a - b).join(',') === key);
      if (p) { if (!p.rays.some((q) => same(q, r.tangent))) p.rays.push(r.tangent); continue; }
      pending.push({ rays: [r.tangent], line: r.line, kind: 'line', verified: true });
    }
  };
  // vertex by vertex the order is the search's own (lines, then curves as found), so ids do not depend on how
  // many curves were looked for or on a check: a curve that does not close stays in the list, marked
  if (how.structural) addLines();
  for (const r of curves) {
    if (pending.some((p) => p.rays.some((q) => same(q, r.tangent)))) continue;
    const twin = pending.find((p) => !p.line && p.rays.length === 1 && opposite(p.rays[0], r.tangent));
    // at flat the mirror image (z → −z turns every angle around) of a closed state closes: one check per curve
    if (twin && state === 'flat') { twin.rays.push(r.tangent); continue; }
    const ok = checked(r.tangent);
    if (!ok && !how.structural) { dropped++; continue; }
    if (!ok) unconfirmed++;
    if (twin) twin.rays.push(r.tangent);
    else pending.push({ rays: [r.tangent], kind: state === 'regular' ? 'direction' : 'curve', verified: ok && verify });
  }
  if (!how.structural) addLines();
  if (dropped) {
    messages.push({ severity: 'info', code: 'ray-not-confirmed', text: `${dropped} direction(s) satisfy the first two orders but no state a small step along them closes; they are left out.` });
  }
  if (unconfirmed) {
    messages.push({ severity: 'warning', code: 'ray-not-confirmed', text: `${unconfirmed} curve(s) satisfy the first two orders at every vertex but no state a small step along them closes; they are listed, marked not verified, and cannot be followed.` });
  }
  // the canonical crease of a curve: its lowest-numbered moving crease (independent of the drive)
  const canonical = (t: Float64Array): number => {
    for (let c = 0; c < t.length; c++) if (Math.abs(t[c]) > 1e-9) return c;
    return -1;
  };
  const plusOf = (p: Pending) => { const ref = canonical(p.rays[0]); return p.rays.find((t) => ref < 0 || t[ref] > 0) ?? p.rays[0]; };
  const key = (t: Float64Array) => Array.from(t, (x) => (x > SIGN_EPS ? '+' : x < -SIGN_EPS ? '-' : '0')).join('');
  const matches = (p: Pending) => p.rays.some((t) => tangentMatchesAssignment(pattern, t) || tangentMatchesAssignment(pattern, t.map((x) => -x)));
  if (!how.structural) pending.sort((a, b) => {
    if ((a.kind === 'line') !== (b.kind === 'line')) return a.kind === 'line' ? 1 : -1;
    if (a.kind === 'line') return Math.min(...a.line!) - Math.min(...b.line!);
    if (matches(a) !== matches(b)) return matches(a) ? -1 : 1;
    const ka = key(plusOf(a)), kb = key(plusOf(b));
    return ka < kb ? -1 : ka > kb ? 1 : 0;
  });
  const groupsOut: BranchGroup[] = [];
  const branches: Branch[] = [];
  let curveIndex = 0, lineIndex = 0;
  for (const p of pending) {
    const group = p.kind === 'line' ? `L${++lineIndex}` : letters(curveIndex++);
    const canon = canonical(p.rays[0]);
    const ordered = [...p.rays].sort((a, b) => (canon < 0 ? 0 : b[canon] - a[canon]));
    const ids: number[] = [];
    for (const t of ordered) {
      const sense = canon < 0 || t[canon] > 0 ? '+' : '-';
      // ratios relative to the drive when it moves, else to the canonical crease; signed for this ray
      const ref = opts.drive !== undefined && Math.abs(t[opts.drive]) > 1e-9 ? opts.drive : canon;
      const ratios = new Map<number, number>();
      if (ref >= 0) for (let c = 0; c < t.length; c++) if (Math.abs(t[c]) > 1e-12) ratios.set(c, t[c] / Math.abs(t[ref]));
      const id = branches.length + 1;
      ids.push(id);
      branches.push({
        id,
        name: `${group}${sense}`,
        group,
        kind: p.kind,
        matchesAssignment: tangentMatchesAssignment(pattern, t),
        tangent: t,
        reference: ref,
        ratios,
        ...(p.line ? { line: p.line } : {}),
        verified: p.kind === 'line' || p.verified,
      });
    }
    const canonLabel = canon >= 0 ? pattern.creases[canon].label : '?';
    const text =
      p.kind === 'line'
        ? `straight crease line ${describeLine(pattern, p.line!)} folding alone`
        : p.kind === 'direction'
          ? `the family through this state (+: ${canonLabel} folds valley-wards)`
          : `a curve through this state (+: ${canonLabel} folds valley-wards)`;
    groupsOut.push({ name: group, kind: p.kind, branches: ids, text });
  }
  if (mixed > 0 || (lines.length > 1 && state === 'flat')) {
    messages.push({
      severity: 'info',
      code: 'lines-together',
      text: `Straight crease lines can also fold together, in any proportion${mixed ? ` (${mixed} such direction(s) found and not listed one by one)` : ''}.`,
    });
  }
  if (combined > 0) {
    messages.push({
      severity: 'info',
      code: 'rays-combine',
      text: `${combined} further direction(s) are combinations of the listed curves with straight-line folds; they are not listed one by one.`,
    });
  }
  return { state, branches, groups: groupsOut, nullity, partial: false, messages };
}

/** Curve names A, B, …, Z, AA, …; the letter L is left out (straight lines are L1, L2, …). */
function letters(i: number): string {
  const alphabet = 'ABCDEFGHIJKMNOPQRSTUVWXYZ';
  let s = '';
  i++;
  while (i > 0) { const r = (i - 1) % alphabet.length; s = alphabet[r] + s; i = Math.floor((i - 1) / alphabet.length); }
  return s;
}

function describeLine(pattern: Pattern, line: number[]): string {
  const labels = line.map((c) => pattern.creases[c].label);
  return labels.length <= 4 ? labels.join('–') : `${labels[0]}–…–${labels[labels.length - 1]} (${labels.length} creases)`;
}

/** Orthonormal basis of the span of the vectors (Gram–Schmidt twice; dot products over each basis vector's support). */
interface SpanVector { v: Float64Array; support: Int32Array }

function supportOf(v: Float64Array): Int32Array {
  const idx: number[] = [];
  for (let i = 0; i < v.length; i++) if (v[i] !== 0) idx.push(i);
  return Int32Array.from(idx);
}

function nullSpaceComplement(vs: Float64Array[]): SpanVector[] {
  const out: SpanVector[] = [];
  for (const v0 of vs) {
    const v = Float64Array.from(v0);
    for (let pass = 0; pass < 2; pass++) for (const u of out) subtractProjection(v, u);
    let n = 0;
    for (const x of v) n += x * x;
    n = Math.sqrt(n);
    if (n > 1e-8) { for (let i = 0; i < v.length; i++) v[i] /= n; out.push({ v, support: supportOf(v) }); }
  }
  return out;
}

function subtractProjection(v: Float64Array, u: SpanVector): void {
  let d = 0;
  for (const i of u.support) d += u.v[i] * v[i];
  if (d !== 0) for (const i of u.support) v[i] -= d * u.v[i];
}

function normalized(t: Float64Array): Float64Array {
  const v = Float64Array.from(t);
  normalizeFull(v);
  return v;
}

function residualOffSpan(t: Float64Array, basis: SpanVector[]): number {
  const v = Float64Array.from(t);
  for (let pass = 0; pass < 2; pass++) for (const u of basis) subtractProjection(v, u);
  let n = 0;
  for (const x of v) n += x * x;
  return Math.sqrt(n);
}

/** A ray is real when a state a small step along it closes and still points along it. */
function verifyRay(problem: ClosureProblem, base: Float64Array, t: Float64Array): boolean {
  const n = problem.unknownCount;
  const coef = new Float64Array(n);
  let target = 0;
  for (let a = 0; a < n; a++) {
    const c = problem.unknownCreases[a];
    coef[a] = t[c];
    target += t[c] * base[c];
  }
  const start = Float64Array.from(base);
  for (let a = 0; a < n; a++) start[problem.unknownCreases[a]] += VERIFY_STEP * t[problem.unknownCreases[a]];
  const r = problem.solve(start, { constraints: [{ coef, target: target + VERIFY_STEP }], maxStep: VERIFY_STEP / 4, maxIterations: 60, wrap: false });
  if (!r.converged) return false;
  let dot = 0, norm = 0;
  for (let a = 0; a < n; a++) {
    const c = problem.unknownCreases[a];
    const d = r.angles[c] - base[c];
    dot += d * t[c];
    norm += d * d;
  }
  // the step's direction stays within a few degrees of the ray (second-order drift is O(step))
  return norm > 0 && dot / Math.sqrt(norm) > 0.99;
}

/** Helper for callers: the held set of a list of drives. */
export function heldOf(drives: Drive[]): Set<number> {
  return new Set(drives.map((d) => d.crease));
}

// nullSpace is re-exported for callers that build their own linear rows
export { nullSpace };
