// Placing the panels fast, for display at frame rate and for the checks run at every sample of a path
// (contact, torque). The breadth-first walk of the panels from the base panel (the same walk as
// ./shape.ts's foldedShape, which tests hold this to) depends only on the pattern, so it is planned once; each
// state then composes one hinge rotation per panel into a preallocated buffer, allocating nothing.

import type { Pattern } from '../types';

export interface ShapePlan {
  panels: number;
  base: number;
  /** panels in walk order (base first), and for each its parent panel, hinge crease and side */
  order: Int32Array;
  parent: Int32Array;
  crease: Int32Array;
  /** +1: the child is left of the crease's a→b direction (turns by +ρ); −1: right (−ρ); 0: held flat (F) */
  sign: Int8Array;
  /** hinge line per panel: point (ax, ay) and unit direction (ux, uy) */
  ax: Float64Array;
  ay: Float64Array;
  ux: Float64Array;
  uy: Float64Array;
  /** panels the walk cannot reach keep the identity */
  reached: Uint8Array;
}

export function planShape(pattern: Pattern, basePanel = pattern.basePanel): ShapePlan {
  const P = pattern.panels.length;
  const base = basePanel >= 0 && basePanel < P ? basePanel : 0;
  const plan: ShapePlan = {
    panels: P,
    base,
    order: new Int32Array(P),
    parent: new Int32Array(P).fill(-1),
    crease: new Int32Array(P).fill(-1),
    sign: new Int8Array(P),
    ax: new Float64Array(P),
    ay: new Float64Array(P),
    ux: new Float64Array(P),
    uy: new Float64Array(P),
    reached: new Uint8Array(P),
  };
  if (!P) return plan;
  let n = 0;
  plan.order[n++] = base;
  plan.reached[base] = 1;
  for (let q = 0; q < n; q++) {
    const p = plan.order[q];
    for (const c of pattern.panels[p].creases) {
      const cr = pattern.creases[c];
      if (cr.assignment === 'B') continue;
      const child = cr.leftPanel === p ? cr.rightPanel : cr.leftPanel;
      if (child < 0 || plan.reached[child]) continue;
      const [a, b] = cr.vertices;
      const [x0, y0] = pattern.vertices[a];
      const [x1, y1] = pattern.vertices[b];
      const len = Math.hypot(x1 - x0, y1 - y0);
      plan.reached[child] = 1;
      plan.parent[child] = p;
      plan.crease[child] = c;
      plan.sign[child] = cr.assignment === 'F' ? 0 : cr.leftPanel === child ? 1 : -1;
      plan.ax[child] = x0;
      plan.ay[child] = y0;
      plan.ux[child] = (x1 - x0) / len;
      plan.uy[child] = (y1 - y0) / len;
      plan.order[n++] = child;
    }
  }
  // unreached panels are listed after the walk with no parent (identity)
  for (let p = 0; p < P; p++) if (!plan.reached[p]) plan.order[n++] = p;
  return plan;
}

/**
 * Panel transforms (3×4 row-major, 12 numbers per panel) for fold angles in radians per crease, into
 * `out` (length 12·panels). out[12p..12p+11] maps flat (x, y, 0) of panel p into space.
 */
export function placePanels(plan: ShapePlan, angles: ArrayLike<number>, out: Float64Array): Float64Array {
  for (let k = 0; k < plan.panels; k++) {
    const p = plan.order[k];
    const o = 12 * p;
    const parent = plan.parent[p];
    if (parent < 0) {
      out.fill(0, o, o + 12);
      out[o] = 1;
      out[o + 5] = 1;
      out[o + 10] = 1;
      continue;
    }
    // rotation about the hinge line: R = Rodrigues(u = (ux, uy, 0), sign·ρ), then x ↦ R(x − a) + a
    const rho = plan.sign[p] * (plan.sign[p] === 0 ? 0 : angles[plan.crease[p]]);
    const x = plan.ux[p], y = plan.uy[p];
    const c = Math.cos(rho), s = Math.sin(rho), t = 1 - c;
    const r00 = t * x * x + c, r01 = t * x * y, r02 = s * y;
    const r10 = t * x * y, r11 = t * y * y + c, r12 = -s * x;
    const r20 = -s * y, r21 = s * x, r22 = c;
    const ax = plan.ax[p], ay = plan.ay[p];
    const hx = ax - (r00 * ax + r01 * ay);
    const hy = ay - (r10 * ax + r11 * ay);
    const hz = -(r20 * ax + r21 * ay);
    const q = 12 * parent;
    for (let i = 0; i < 3; i++) {
      const t0 = out[q + 4 * i], t1 = out[q + 4 * i + 1], t2 = out[q + 4 * i + 2], t3 = out[q + 4 * i + 3];
      out[o + 4 * i] = t0 * r00 + t1 * r10 + t2 * r20;
      out[o + 4 * i + 1] = t0 * r01 + t1 * r11 + t2 * r21;
      out[o + 4 * i + 2] = t0 * r02 + t1 * r12 + t2 * r22;
      out[o + 4 * i + 3] = t0 * hx + t1 * hy + t2 * hz + t3;
    }
  }
  return out;
}

/**
 * The largest gap between two placements of one vertex reached through different panels (foldedShape's
 * maxMismatch) for transforms from placePanels. `scratch` holds 3 numbers per vertex and is overwritten.
 */
export function placementMismatch(pattern: Pattern, transforms: Float64Array, scratch: Float64Array, seen: Uint8Array): number {
  seen.fill(0);
  let worst = 0;
  const panels = pattern.panels;
  for (let p = 0; p < panels.length; p++) {
    const o = 12 * p;
    const vs = panels[p].vertices;
    for (let k = 0; k < vs.length; k++) {
      const v = vs[k];
      const xy = pattern.vertices[v];
      const x = xy[0], y = xy[1];
      const X = transforms[o] * x + transforms[o + 1] * y + transforms[o + 3];
      const Y = transforms[o + 4] * x + transforms[o + 5] * y + transforms[o + 7];
      const Z = transforms[o + 8] * x + transforms[o + 9] * y + transforms[o + 11];
      if (!seen[v]) {
        seen[v] = 1;
        scratch[3 * v] = X; scratch[3 * v + 1] = Y; scratch[3 * v + 2] = Z;
      } else {
        const d = Math.hypot(X - scratch[3 * v], Y - scratch[3 * v + 1], Z - scratch[3 * v + 2]);
        if (d > worst) worst = d;
      }
    }
  }
  return worst;
}
