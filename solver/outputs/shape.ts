// The folded shape: hold the base panel, walk the panel adjacency breadth first, and give each panel its
// parent's transform composed with the rotation about the shared crease line.

import type { Pattern, Shape } from '../types';
import { axisAngleRotation, mat3 } from '../math/rotation';

/** 3×4 row-major rigid transform [R | t]. */
function identityTransform(): Float64Array {
  return Float64Array.from([1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0]);
}

/** out = T · (rotation by `angle` about the line through (ax, ay) with unit direction (ux, uy)). */
function composeHinge(out: Float64Array, T: Float64Array, ax: number, ay: number, ux: number, uy: number, angle: number): void {
  const R = axisAngleRotation(mat3(), ux, uy, 0, angle);
  // hinge: x ↦ R (x − a) + a, so its translation is a − R a
  const hx = ax - (R[0] * ax + R[1] * ay);
  const hy = ay - (R[3] * ax + R[4] * ay);
  const hz = -(R[6] * ax + R[7] * ay);
  for (let i = 0; i < 3; i++) {
    const t0 = T[4 * i], t1 = T[4 * i + 1], t2 = T[4 * i + 2];
    out[4 * i] = t0 * R[0] + t1 * R[3] + t2 * R[6];
    out[4 * i + 1] = t0 * R[1] + t1 * R[4] + t2 * R[7];
    out[4 * i + 2] = t0 * R[2] + t1 * R[5] + t2 * R[8];
    out[4 * i + 3] = t0 * hx + t1 * hy + t2 * hz + T[4 * i + 3];
  }
}

export function applyTransform(T: Float64Array, x: number, y: number): [number, number, number] {
  return [T[0] * x + T[1] * y + T[3], T[4] * x + T[5] * y + T[7], T[8] * x + T[9] * y + T[11]];
}

/**
 * Place every panel for the fold angles `angles` (radians, per crease). Panels not connected to the base
 * panel through folding creases keep the identity and are counted in `unreached`.
 */
export function foldedShape(pattern: Pattern, angles: Float64Array, basePanel = pattern.basePanel): Shape & { unreached: number } {
  const P = pattern.panels.length;
  const transforms: (Float64Array | undefined)[] = new Array(P);
  const base = basePanel >= 0 && basePanel < P ? basePanel : 0;
  let unreached = 0;
  if (P > 0) {
    transforms[base] = identityTransform();
    const queue = [base];
    for (let q = 0; q < queue.length; q++) {
      const p = queue[q];
      const panel = pattern.panels[p];
      for (const c of panel.creases) {
        const crease = pattern.creases[c];
        if (crease.assignment === 'B') continue;
        const child = crease.leftPanel === p ? crease.rightPanel : crease.leftPanel;
        if (child < 0 || transforms[child]) continue;
        const [a, b] = crease.vertices;
        const [ax, ay] = pattern.vertices[a];
        const [bx, by] = pattern.vertices[b];
        const len = Math.hypot(bx - ax, by - ay);
        const ux = (bx - ax) / len, uy = (by - ay) / len;
        // valley positive: the panel on the left of a→b turns by +ρ about a→b; on the right by −ρ
        const rho = crease.assignment === 'F' ? 0 : angles[c];
        const sign = crease.leftPanel === child ? 1 : -1;
        const T = new Float64Array(12);
        composeHinge(T, transforms[p]!, ax, ay, ux, uy, sign * rho);
        transforms[child] = T;
        queue.push(child);
      }
    }
  }
  const panelTransforms = transforms.map((T) => {
    if (!T) unreached++;
    return T ?? identityTransform();
  });
  const V = pattern.vertices.length;
  const vertices: [number, number, number][] = new Array(V);
  const placed = new Uint8Array(V);
  let maxMismatch = 0;
  pattern.panels.forEach((panel, p) => {
    const T = panelTransforms[p];
    for (const v of panel.vertices) {
      const [x, y] = pattern.vertices[v];
      const pos = applyTransform(T, x, y);
      if (!placed[v]) {
        vertices[v] = pos;
        placed[v] = 1;
      } else {
        const o = vertices[v];
        maxMismatch = Math.max(maxMismatch, Math.hypot(pos[0] - o[0], pos[1] - o[1], pos[2] - o[2]));
      }
    }
  });
  for (let v = 0; v < V; v++) if (!placed[v]) vertices[v] = [pattern.vertices[v][0], pattern.vertices[v][1], 0];
  return { vertices, panelTransforms, maxMismatch, basePanel: base, unreached };
}
