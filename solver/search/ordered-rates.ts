// First-order analysis of a state along the order in which the enumeration closed its vertices.
//
// Each vertex fixes the creases of its own not fixed before it, so with rows ordered by vertex and columns by
// the vertex that fixed them, the free creases' Jacobian is block lower triangular. When every diagonal block
// has full column rank (the enumeration's transversality > 0), the whole Jacobian has full column rank: the
// state is isolated with local DOF 0, and J_f·ṙ = −J_d is solved block by block in O(creases). When the drive
// column is in the range of J_f (every row residual vanishes) ṙ is the exact derivative of the state along the
// drive (the sensitivity); when it is not, no closed state moves with that drive and the state is rigid there.

import type { ClosureSystem } from '../closure/blocks';

export interface OrderedRates {
  /** per drive: d(crease)/d(drive) over every crease (1 on the drive itself, 0 on other known creases) */
  rates: Float64Array[];
  /** per drive: largest row residual |J·ṙ| over the vertices (0 when the drive moves a closed family) */
  inconsistency: number[];
}

/**
 * `jacobian` is the closure Jacobian (3 per slot) at the state; `known` marks the creases known before any
 * vertex (drives, held, flat and boundary creases); `order` lists every block once.
 */
export function orderedRates(sys: ClosureSystem, jacobian: Float64Array, order: Int32Array, known: Uint8Array, drives: number[]): OrderedRates {
  const set = new Uint8Array(known.length);
  const rates = drives.map((d) => {
    const r = new Float64Array(known.length);
    r[d] = 1;
    return r;
  });
  const inconsistency = drives.map(() => 0);
  const slots = new Int32Array(3);
  const G = new Float64Array(9), x = new Float64Array(3), g = new Float64Array(3);
  for (let q = 0; q < order.length; q++) {
    const b = order[q];
    const s = sys.blockStart[b], e = sys.blockStart[b + 1];
    let m = 0;
    for (let p = s; p < e && m < 4; p++) {
      const c = sys.slotCrease[p];
      if (!known[c] && !set[c]) { if (m < 3) slots[m] = p; m++; }
    }
    // the enumeration closes a vertex with at most three new creases
    if (m > 3) throw new Error('orderedRates: a vertex fixes more than three creases in this order');
    for (let a = 0; a < m; a++)
      for (let c = 0; c < m; c++) {
        const pa = 3 * slots[a], pc = 3 * slots[c];
        G[3 * a + c] = jacobian[pa] * jacobian[pc] + jacobian[pa + 1] * jacobian[pc + 1] + jacobian[pa + 2] * jacobian[pc + 2];
      }
    for (let di = 0; di < drives.length; di++) {
      const r = rates[di];
      // right-hand side: −Σ over the block's creases fixed before it
      let hx = 0, hy = 0, hz = 0;
      for (let p = s; p < e; p++) {
        const c = sys.slotCrease[p];
        if (!known[c] && !set[c]) continue;
        const v = r[c];
        if (v === 0) continue;
        hx -= jacobian[3 * p] * v; hy -= jacobian[3 * p + 1] * v; hz -= jacobian[3 * p + 2] * v;
      }
      if (m > 0) {
        for (let a = 0; a < m; a++) {
          const pa = 3 * slots[a];
          g[a] = jacobian[pa] * hx + jacobian[pa + 1] * hy + jacobian[pa + 2] * hz;
        }
        if (solveSym(G, g, m, x)) for (let a = 0; a < m; a++) r[sys.slotCrease[slots[a]]] = x[a];
        for (let a = 0; a < m; a++) {
          const pa = 3 * slots[a], v = r[sys.slotCrease[slots[a]]];
          hx -= jacobian[pa] * v; hy -= jacobian[pa + 1] * v; hz -= jacobian[pa + 2] * v;
        }
      }
      const res = Math.hypot(hx, hy, hz);
      if (res > inconsistency[di]) inconsistency[di] = res;
    }
    for (let a = 0; a < m; a++) set[sys.slotCrease[slots[a]]] = 1;
  }
  return { rates, inconsistency };
}

function solveSym(G: Float64Array, g: Float64Array, m: number, x: Float64Array): boolean {
  if (m === 1) {
    if (!(G[0] > 0)) return false;
    x[0] = g[0] / G[0];
    return true;
  }
  if (m === 2) {
    const det = G[0] * G[4] - G[1] * G[3];
    if (det === 0) return false;
    x[0] = (g[0] * G[4] - G[1] * g[1]) / det;
    x[1] = (G[0] * g[1] - G[3] * g[0]) / det;
    return true;
  }
  const a = G[0], b = G[1], c = G[2], d = G[3], e = G[4], f = G[5], h = G[6], i = G[7], j = G[8];
  const A = e * j - f * i, B = -(d * j - f * h), C = d * i - e * h;
  const det = a * A + b * B + c * C;
  if (det === 0) return false;
  x[0] = (A * g[0] + (c * i - b * j) * g[1] + (b * f - c * e) * g[2]) / det;
  x[1] = (B * g[0] + (a * j - c * h) * g[1] + (c * d - a * f) * g[2]) / det;
  x[2] = (C * g[0] + (b * h - a * i) * g[1] + (a * e - b * d) * g[2]) / det;
  return true;
}
