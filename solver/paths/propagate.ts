// Exact vertex-by-vertex propagation for meshes of degree-4 vertices. Each degree-4 vertex is a one-DOF
// spherical linkage: one known fold angle gives the other three in closed form (two roots). Walking the
// vertices breadth first from the drive crease solves a rigid-foldable quadrilateral mesh in O(creases),
// with the rates (first derivative) and curvature (second derivative) of every crease along the way.
// Every block is checked on the closure residual as it is finished; the caller polishes or falls back
// to the general solver when the mesh is not (numerically) rigid-foldable.

import type { Pattern } from '../types';
import { closureScratch, evaluateBlock, type ClosureScratch, type ClosureSystem } from '../closure/blocks';
import { wrapAngle } from '../math/rotation';

export interface PropagationPlan {
  drive: number;
  /** block indices in processing order */
  order: Int32Array;
  /** local slot (0…3) of the known crease each block starts from */
  input: Int32Array;
  /** bit k set when local slot k of the block is first given a value by this block */
  owns: Uint8Array;
}

export interface PlanResult {
  plan?: PropagationPlan;
  /** why propagation does not apply (the general solver is used instead) */
  reason?: string;
}

/**
 * A propagation plan when every interior vertex has degree 4, every crease at one is free to fold, every
 * free crease meets an interior vertex, and all vertices are reached from the drive through shared creases.
 */
export function planPropagation(
  pattern: Pattern,
  sys: ClosureSystem,
  drive: number,
  held: (crease: number) => boolean = () => false,
): PlanResult {
  if (sys.blockCount === 0) return { reason: 'the pattern has no interior vertex' };
  const blocksOf: number[][] = pattern.creases.map(() => []);
  for (let b = 0; b < sys.blockCount; b++) {
    const start = sys.blockStart[b];
    if (sys.blockStart[b + 1] - start !== 4) return { reason: `vertex ${sys.blockVertex[b]} does not have degree 4` };
    for (let k = 0; k < 4; k++) {
      const c = sys.slotCrease[start + k];
      const a = pattern.creases[c].assignment;
      if (a === 'F' || a === 'B') return { reason: `crease ${pattern.creases[c].label} at vertex ${sys.blockVertex[b]} is held flat` };
      if (c !== drive && held(c)) return { reason: `crease ${pattern.creases[c].label} is held` };
      blocksOf[c].push(b);
    }
  }
  for (const c of pattern.creases) {
    if (c.assignment === 'B' || c.assignment === 'F' || c.index === drive || held(c.index)) continue;
    if (blocksOf[c.index].length === 0) return { reason: `crease ${c.label} meets no interior vertex, so it folds freely` };
  }
  if (blocksOf[drive].length === 0) return { reason: 'the drive meets no interior vertex' };
  const known = new Uint8Array(pattern.creases.length);
  const queued = new Uint8Array(sys.blockCount);
  const order: number[] = [];
  const input: number[] = [];
  const owns: number[] = [];
  const queue: [number, number][] = [];
  known[drive] = 1;
  for (const b of blocksOf[drive]) { queued[b] = 1; queue.push([b, drive]); }
  for (let q = 0; q < queue.length; q++) {
    const [b, from] = queue[q];
    const start = sys.blockStart[b];
    let inSlot = 0;
    for (let k = 0; k < 4; k++) if (sys.slotCrease[start + k] === from) inSlot = k;
    let mask = 0;
    for (let k = 0; k < 4; k++) {
      const c = sys.slotCrease[start + k];
      if (known[c]) continue;
      known[c] = 1;
      mask |= 1 << k;
      for (const nb of blocksOf[c]) if (!queued[nb]) { queued[nb] = 1; queue.push([nb, c]); }
    }
    order.push(b);
    input.push(inSlot);
    owns.push(mask);
  }
  if (order.length !== sys.blockCount) {
    return { reason: `${sys.blockCount - order.length} interior vertices are not connected to the drive` };
  }
  return { plan: { drive, order: Int32Array.from(order), input: Int32Array.from(input), owns: Uint8Array.from(owns) } };
}

/**
 * The two closed-form states of one degree-4 vertex with crease directions (ux[k], uy[k]) (ccw) when the
 * crease at local slot `input` folds by `rho`. out[0…3] and out[4…7] get the fold angles of the four slots
 * for the two roots. Returns the number of real roots (0 when that input value cannot be reached).
 *
 * Derivation (the closure R0·R1·R2·R3 = I from the input slot on): R0R1 = R3ᵀR2ᵀ applied to u2 and dotted
 * with u3 gives (R0ᵀu3)·(R1u2) = u2·u3, a cos/sin equation in ρ1; then R2R3 = (R0R1)ᵀ gives ρ2 from the
 * image of u3 and ρ3 from the image of the sheet normal.
 */
export function degree4States(ux: ArrayLike<number>, uy: ArrayLike<number>, input: number, rho: number, out: Float64Array): number {
  const n = degree4FirstOutput(ux, uy, input, rho, rootPair);
  if (n === 0) return 0;
  degree4Complete(ux, uy, input, rho, rootPair[0], out, 0);
  degree4Complete(ux, uy, input, rho, rootPair[1], out, 4);
  return n;
}

const rootPair = new Float64Array(2);

/**
 * The two values of ρ1 (the crease after the input, ccw) that close the vertex: roots of A cos ρ1 + B sin ρ1 = C.
 * Returns the number of distinct real roots (0, 1 or 2); roots[0], roots[1] get them (equal for one).
 */
export function degree4FirstOutput(ux: ArrayLike<number>, uy: ArrayLike<number>, input: number, rho: number, roots: Float64Array): number {
  const i0 = input, i1 = (input + 1) & 3, i2 = (input + 2) & 3, i3 = (input + 3) & 3;
  const ax = ux[i0], ay = uy[i0], bx = ux[i1], by = uy[i1], cx = ux[i2], cy = uy[i2], dx = ux[i3], dy = uy[i3];
  const c0 = Math.cos(rho), s0 = Math.sin(rho);
  // v = R(u0, −ρ0)·u3 = u3 cos − (u0 × u3) sin + u0 (u0·u3)(1 − cos)
  const d03 = ax * dx + ay * dy;
  const cross03 = ax * dy - ay * dx; // z of u0 × u3
  const vx = dx * c0 + ax * d03 * (1 - c0);
  const vy = dy * c0 + ay * d03 * (1 - c0);
  const vz = -cross03 * s0;
  const c12 = bx * cx + by * cy;
  const n12 = bx * cy - by * cx; // z of u1 × u2
  const c23 = cx * dx + cy * dy;
  const vu1 = vx * bx + vy * by;
  const A = vx * cx + vy * cy - c12 * vu1;
  const B = vz * n12;
  const C = c23 - c12 * vu1;
  const R = Math.hypot(A, B);
  if (R < 1e-14) return 0;
  let cd = C / R;
  if (cd > 1 + 1e-12 || cd < -1 - 1e-12) return 0;
  cd = Math.max(-1, Math.min(1, cd));
  const phi = Math.atan2(B, A);
  const delta = Math.acos(cd);
  roots[0] = wrapAngle(phi + delta);
  roots[1] = wrapAngle(phi - delta);
  return delta === 0 ? 1 : 2;
}

/** The remaining two angles (ρ2, ρ3) of a degree-4 vertex for input ρ0 and first output ρ1, into out[o…o+3] by slot. */
export function degree4Complete(ux: ArrayLike<number>, uy: ArrayLike<number>, input: number, rho: number, rho1: number, out: Float64Array, o: number): void {
  const i0 = input, i1 = (input + 1) & 3, i2 = (input + 2) & 3, i3 = (input + 3) & 3;
  const ax = ux[i0], ay = uy[i0], bx = ux[i1], by = uy[i1], cx = ux[i2], cy = uy[i2], dx = ux[i3], dy = uy[i3];
  const c23 = cx * dx + cy * dy;
  out[o + i0] = rho;
  out[o + i1] = rho1;
  // N = (R0·R1)ᵀ; image of u3 under N, then ρ2 = angle about u2 taking u3 there
  const M = rotProduct(ax, ay, rho, bx, by, rho1);
  const nx = M[0] * dx + M[3] * dy, ny = M[1] * dx + M[4] * dy, nz = M[2] * dx + M[5] * dy;
  const nu2 = nx * cx + ny * cy;
  const px = dx - c23 * cx, py = dy - c23 * cy; // u3 projected off u2 (z = 0)
  const qx = nx - nu2 * cx, qy = ny - nu2 * cy, qz = nz;
  // u2 · (p × q) with p_z = 0
  const rho2 = Math.atan2(cx * py * qz - cy * px * qz, px * qx + py * qy);
  out[o + i2] = rho2;
  // R3 = R2ᵀ·N; ρ3 from R3·e_z = e_z cos ρ3 + (u3 × e_z) sin ρ3, u3 × e_z = (u3y, −u3x, 0); N·e_z = (M[6], M[7], M[8])
  const c2 = Math.cos(rho2), s2 = Math.sin(rho2);
  const wx = M[6], wy = M[7], wz = M[8];
  // R(u2, −ρ2)·w = w c − (u2 × w) s + u2 (u2·w)(1 − c)
  const uw = cx * wx + cy * wy;
  const crx = cy * wz, cry = -cx * wz, crz = cx * wy - cy * wx;
  const zx = wx * c2 - crx * s2 + cx * uw * (1 - c2);
  const zy = wy * c2 - cry * s2 + cy * uw * (1 - c2);
  const zz = wz * c2 - crz * s2;
  out[o + i3] = Math.atan2(dy * zx - dx * zy, zz);
}

const scratchM = new Float64Array(9);

/** R(a, α)·R(b, β) for in-plane unit axes a, b (row-major, into a shared scratch matrix). */
function rotProduct(ax: number, ay: number, alpha: number, bx: number, by: number, beta: number): Float64Array {
  const ca = Math.cos(alpha), sa = Math.sin(alpha), ta = 1 - ca;
  const cb = Math.cos(beta), sb = Math.sin(beta), tb = 1 - cb;
  const a0 = ta * ax * ax + ca, a1 = ta * ax * ay, a2 = sa * ay;
  const a3 = ta * ax * ay, a4 = ta * ay * ay + ca, a5 = -sa * ax;
  const a6 = -sa * ay, a7 = sa * ax, a8 = ca;
  const b0 = tb * bx * bx + cb, b1 = tb * bx * by, b2 = sb * by;
  const b3 = tb * bx * by, b4 = tb * by * by + cb, b5 = -sb * bx;
  const b6 = -sb * by, b7 = sb * bx, b8 = cb;
  const m = scratchM;
  m[0] = a0 * b0 + a1 * b3 + a2 * b6; m[1] = a0 * b1 + a1 * b4 + a2 * b7; m[2] = a0 * b2 + a1 * b5 + a2 * b8;
  m[3] = a3 * b0 + a4 * b3 + a5 * b6; m[4] = a3 * b1 + a4 * b4 + a5 * b7; m[5] = a3 * b2 + a4 * b5 + a5 * b8;
  m[6] = a6 * b0 + a7 * b3 + a8 * b6; m[7] = a6 * b1 + a7 * b4 + a8 * b7; m[8] = a6 * b2 + a7 * b5 + a8 * b8;
  return m;
}

/** How a block picks between its two roots. */
export type RootChoice =
  /** closest (wrapped) to the reference angles, preferring creases already set in this pass */
  | { kind: 'nearest'; reference: Float64Array }
  /** signs closest to the mountain/valley assignment (valley +, mountain −); ties go to `reference` */
  | { kind: 'assignment'; signs: Float64Array; reference: Float64Array };

export interface PropagationOutput {
  ok: boolean;
  /** largest closure residual over all blocks (radians) */
  maxResidual: number;
  /** largest difference between a crease value and the value a later block computed for it */
  maxDisagreement: number;
  /** block where no real root existed (the drive is out of that vertex's reach) */
  failedBlock?: number;
  /** smallest |det| of a block's 3 × 3 output Jacobian (a local near-singularity measure) */
  minPivot: number;
}

export interface PropagationWork {
  residual: Float64Array;
  jacobian: Float64Array;
  scratch: ClosureScratch;
  states: Float64Array;
  set: Uint8Array;
  ux: Float64Array;
  uy: Float64Array;
  cre: Int32Array;
  /** 3 × 3 system, right-hand side and solution for the small solves */
  G: Float64Array;
  g: Float64Array;
  x: Float64Array;
  rhs: Float64Array;
  slots: Int32Array;
  roots: Float64Array;
}

export function propagationWork(sys: ClosureSystem, creases: number): PropagationWork {
  return {
    residual: new Float64Array(3 * sys.blockCount),
    jacobian: new Float64Array(3 * sys.slotCount),
    scratch: closureScratch(),
    states: new Float64Array(8),
    set: new Uint8Array(creases),
    ux: new Float64Array(4),
    uy: new Float64Array(4),
    cre: new Int32Array(4),
    G: new Float64Array(9),
    g: new Float64Array(3),
    x: new Float64Array(3),
    rhs: new Float64Array(3),
    slots: new Int32Array(4),
    roots: new Float64Array(2),
  };
}

/** Score of root r of a block: squared wrapped distance to the reference (plus sign penalties). */
function rootScore(w: PropagationWork, r: number, inSlot: number, angles: Float64Array, choice: RootChoice): number {
  const { states, cre, set } = w;
  let s = 0;
  for (let k = 0; k < 4; k++) {
    if (k === inSlot) continue;
    const v = states[4 * r + k];
    const c = cre[k];
    if (choice.kind === 'assignment' && !set[c]) {
      // a disagreeing sign costs more than any angle difference
      const sg = choice.signs[c];
      if (sg !== 0 && v * sg < 0) s += 100;
      const d = wrapAngle(v - choice.reference[c]);
      s += 1e-3 * d * d;
    } else {
      const d = wrapAngle(v - (set[c] ? angles[c] : choice.reference[c]));
      s += d * d;
    }
  }
  return s;
}

/**
 * Solve the mesh for angles[plan.drive] (already set in `angles`): every other free crease is written.
 * With `rates` (d crease / d drive) and optionally `curvature` (d² crease / d drive²), those are filled too.
 */
export function propagate(
  sys: ClosureSystem,
  plan: PropagationPlan,
  angles: Float64Array,
  choice: RootChoice,
  work: PropagationWork,
  rates?: Float64Array,
  curvature?: Float64Array,
): PropagationOutput {
  const { order, input, owns } = plan;
  const { residual, jacobian, scratch, states, set, ux, uy, cre } = work;
  set.fill(0);
  set[plan.drive] = 1;
  if (rates) { rates.fill(0); rates[plan.drive] = 1; }
  if (curvature) curvature.fill(0);
  let maxResidual = 0;
  let maxDisagreement = 0;
  let minPivot = Infinity;
  for (let q = 0; q < order.length; q++) {
    const b = order[q];
    const start = sys.blockStart[b];
    for (let k = 0; k < 4; k++) { ux[k] = sys.slotUx[start + k]; uy[k] = sys.slotUy[start + k]; cre[k] = sys.slotCrease[start + k]; }
    const inSlot = input[q];
    const rho = angles[cre[inSlot]];
    let best = 0;
    if (choice.kind === 'assignment') {
      const n = degree4States(ux, uy, inSlot, rho, states);
      if (n === 0) return { ok: false, maxResidual: Infinity, maxDisagreement, failedBlock: b, minPivot };
      best = n === 2 && rootScore(work, 1, inSlot, angles, choice) < rootScore(work, 0, inSlot, angles, choice) ? 1 : 0;
    } else {
      // the two roots differ in ρ1 (equal ρ1 is a double root): pick by it, then complete only that one
      const roots = work.roots;
      const n = degree4FirstOutput(ux, uy, inSlot, rho, roots);
      if (n === 0) return { ok: false, maxResidual: Infinity, maxDisagreement, failedBlock: b, minPivot };
      const c1 = cre[(inSlot + 1) & 3];
      const ref = set[c1] ? angles[c1] : choice.reference[c1];
      const d0 = Math.abs(wrapAngle(roots[0] - ref)), d1 = Math.abs(wrapAngle(roots[1] - ref));
      if (n === 1 || d0 < 0.25 * d1 || d1 < 0.25 * d0) {
        degree4Complete(ux, uy, inSlot, rho, d1 < d0 ? roots[1] : roots[0], states, 0);
      } else {
        // not clear from ρ1 alone (e.g. one root is a straight-line fold): compare the whole states
        degree4Complete(ux, uy, inSlot, rho, roots[0], states, 0);
        degree4Complete(ux, uy, inSlot, rho, roots[1], states, 4);
        best = rootScore(work, 1, inSlot, angles, choice) < rootScore(work, 0, inSlot, angles, choice) ? 1 : 0;
      }
    }
    const mask = owns[q];
    for (let k = 0; k < 4; k++) {
      if (k === inSlot) continue;
      const v = states[4 * best + k];
      const c = cre[k];
      if (mask & (1 << k)) { angles[c] = v; set[c] = 1; }
      else maxDisagreement = Math.max(maxDisagreement, Math.abs(wrapAngle(v - angles[c])));
    }
    let res = evaluateBlock(sys, b, angles, residual, jacobian, scratch);
    if (res > 1e-13 && mask) {
      // one Newton step on the block's own outputs cleans the closed form's rounding
      if (solveOutputs(work, start, inSlot, mask, 3 * b, angles) > 0) res = evaluateBlock(sys, b, angles, residual, jacobian, scratch);
    }
    if (res > maxResidual) maxResidual = res;
    if (rates || curvature) {
      const pivot = blockDerivatives(work, start, inSlot, mask, rates, curvature);
      if (pivot < minPivot) minPivot = pivot;
    }
  }
  return { ok: true, maxResidual, maxDisagreement, minPivot };
}

/**
 * Newton step for the owned output slots of one block: J_o·δ = −r (least squares over the 3 rows when fewer
 * than 3 slots are owned). Returns |det| of the normal matrix used (0 when singular).
 */
function solveOutputs(w: PropagationWork, start: number, inSlot: number, mask: number, r0: number, angles: Float64Array): number {
  const { jacobian: J, residual, G, g, x, slots, cre } = w;
  let m = 0;
  for (let k = 0; k < 4; k++) if (k !== inSlot && mask & (1 << k)) slots[m++] = k;
  if (m === 0) return 0;
  for (let a = 0; a < m; a++) {
    const pa = 3 * (start + slots[a]);
    g[a] = -(J[pa] * residual[r0] + J[pa + 1] * residual[r0 + 1] + J[pa + 2] * residual[r0 + 2]);
    for (let c = 0; c < m; c++) {
      const pc = 3 * (start + slots[c]);
      G[3 * a + c] = J[pa] * J[pc] + J[pa + 1] * J[pc + 1] + J[pa + 2] * J[pc + 2];
    }
  }
  const det = solveSym3(G, g, m, x);
  if (det === 0) return 0;
  for (let a = 0; a < m; a++) angles[cre[slots[a]]] += x[a];
  return det;
}

/** Solve the m × m (m ≤ 3) system G x = g (row-major 3 × 3 storage). Returns |det|, 0 when singular. */
function solveSym3(G: Float64Array, g: Float64Array, m: number, x: Float64Array): number {
  if (m === 1) {
    if (G[0] === 0) return 0;
    x[0] = g[0] / G[0];
    return Math.abs(G[0]);
  }
  if (m === 2) {
    const det = G[0] * G[4] - G[1] * G[3];
    if (det === 0) return 0;
    x[0] = (g[0] * G[4] - G[1] * g[1]) / det;
    x[1] = (G[0] * g[1] - G[3] * g[0]) / det;
    return Math.abs(det);
  }
  const [a, b, c, d, e, f, h, i, j] = G;
  const A = e * j - f * i, B = -(d * j - f * h), C = d * i - e * h;
  const det = a * A + b * B + c * C;
  if (det === 0) return 0;
  x[0] = (A * g[0] + (c * i - b * j) * g[1] + (b * f - c * e) * g[2]) / det;
  x[1] = (B * g[0] + (a * j - c * h) * g[1] + (c * d - a * f) * g[2]) / det;
  x[2] = (C * g[0] + (b * h - a * i) * g[1] + (a * e - b * d) * g[2]) / det;
  return Math.abs(det);
}

/**
 * Rates and curvature of a block's owned outputs from its input (and any creases already set):
 * J_o·ṙ_o = −Σ_known J_k ṙ_k, and J_o·r̈_o = −(Σ_known J_k r̈_k + Σ_{a<b} ṙ_a ṙ_b (w_a × w_b)), the second
 * order of the rotation product at a closed state (BCH: log Π exp(ε v_k [w_k]) = εΣ v_k w_k + ε²/2 Σ_{a<b} v_a v_b w_a × w_b).
 * Returns |det| of the 3 × 3 Jacobian of the three non-input slots (unit folded directions as columns), a
 * local near-singularity measure.
 */
function blockDerivatives(
  w: PropagationWork,
  start: number,
  inSlot: number,
  mask: number,
  rates: Float64Array | undefined,
  curvature: Float64Array | undefined,
): number {
  const { jacobian: J, G, g, x, rhs, slots, cre } = w;
  const i1 = 3 * (start + ((inSlot + 1) & 3)), i2 = 3 * (start + ((inSlot + 2) & 3)), i3 = 3 * (start + ((inSlot + 3) & 3));
  const detAll = Math.abs(
    J[i1] * (J[i2 + 1] * J[i3 + 2] - J[i2 + 2] * J[i3 + 1]) -
      J[i2] * (J[i1 + 1] * J[i3 + 2] - J[i1 + 2] * J[i3 + 1]) +
      J[i3] * (J[i1 + 1] * J[i2 + 2] - J[i1 + 2] * J[i2 + 1]),
  );
  let m = 0;
  for (let k = 0; k < 4; k++) if (k !== inSlot && mask & (1 << k)) slots[m++] = k;
  if (m === 0 || !rates) return detAll;
  for (let a = 0; a < m; a++) for (let c = 0; c < m; c++) {
    const pa = 3 * (start + slots[a]), pc = 3 * (start + slots[c]);
    G[3 * a + c] = J[pa] * J[pc] + J[pa + 1] * J[pc + 1] + J[pa + 2] * J[pc + 2];
  }
  rhs.fill(0);
  for (let k = 0; k < 4; k++) {
    if (k !== inSlot && mask & (1 << k)) continue; // owned here: unknown
    const p = 3 * (start + k), v = rates[cre[k]];
    rhs[0] -= J[p] * v; rhs[1] -= J[p + 1] * v; rhs[2] -= J[p + 2] * v;
  }
  for (let a = 0; a < m; a++) { const p = 3 * (start + slots[a]); g[a] = J[p] * rhs[0] + J[p + 1] * rhs[1] + J[p + 2] * rhs[2]; }
  if (solveSym3(G, g, m, x) === 0) return 0;
  for (let a = 0; a < m; a++) rates[cre[slots[a]]] = x[a];
  if (!curvature) return detAll;
  rhs.fill(0);
  for (let k = 0; k < 4; k++) {
    if (k !== inSlot && mask & (1 << k)) continue; // owned here: unknown
    const p = 3 * (start + k), v = curvature[cre[k]];
    rhs[0] -= J[p] * v; rhs[1] -= J[p + 1] * v; rhs[2] -= J[p + 2] * v;
  }
  for (let p = 0; p < 4; p++) {
    const vp = rates[cre[p]];
    if (vp === 0) continue;
    const pp = 3 * (start + p);
    for (let q = p + 1; q < 4; q++) {
      const vq = rates[cre[q]];
      if (vq === 0) continue;
      const pq = 3 * (start + q);
      const ax = J[pp], ay = J[pp + 1], az = J[pp + 2], bx = J[pq], by = J[pq + 1], bz = J[pq + 2];
      const f = vp * vq;
      rhs[0] -= f * (ay * bz - az * by);
      rhs[1] -= f * (az * bx - ax * bz);
      rhs[2] -= f * (ax * by - ay * bx);
    }
  }
  for (let a = 0; a < m; a++) { const p = 3 * (start + slots[a]); g[a] = J[p] * rhs[0] + J[p + 1] * rhs[1] + J[p + 2] * rhs[2]; }
  if (solveSym3(G, g, m, x) === 0) return 0;
  for (let a = 0; a < m; a++) curvature[cre[slots[a]]] = x[a];
  return detAll;
}
