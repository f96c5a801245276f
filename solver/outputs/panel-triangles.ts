// Every panel as triangles of the flat sheet, for the contact check. Panels are simple polygons, convex or
// not, often with straight corners (a vertex in the middle of a panel's side). earcut triangulates them:
// it is small, has no dependencies, is used by most web map and 3D libraries, and copes with collinear and
// nearly degenerate corners, which a hand-written ear clipper gets wrong in the corner cases. Its result is
// checked: the triangles' areas must add up to the panel's area, or the panel is reported.

import earcut from 'earcut';
import type { Message, Pattern } from '../types';

export interface PanelTriangles {
  /** triangles of panel p are start[p] … start[p + 1] − 1 */
  start: Int32Array;
  /** six numbers per triangle: its corners (x, y) on the flat sheet, counter-clockwise */
  flat: Float64Array;
  /** panels whose triangles did not add up to their area (left out of the check) */
  failed: number[];
  messages: Message[];
}

/** Relative mismatch of the triangles' total area that counts as a failed triangulation. */
const AREA_TOLERANCE = 1e-9;

export function panelTriangles(pattern: Pattern): PanelTriangles {
  const P = pattern.panels.length;
  const start = new Int32Array(P + 1);
  const parts: number[][] = [];
  const failed: number[] = [];
  const messages: Message[] = [];
  let count = 0;
  for (let p = 0; p < P; p++) {
    const panel = pattern.panels[p];
    const xy: number[] = [];
    for (const v of panel.vertices) xy.push(pattern.vertices[v][0], pattern.vertices[v][1]);
    const idx = earcut(xy);
    const tri: number[] = [];
    let area = 0;
    for (let k = 0; k + 2 < idx.length; k += 3) {
      const [a, b, c] = [idx[k], idx[k + 1], idx[k + 2]];
      const ax = xy[2 * a], ay = xy[2 * a + 1], bx = xy[2 * b], by = xy[2 * b + 1], cx = xy[2 * c], cy = xy[2 * c + 1];
      let twice = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
      if (twice === 0) continue;
      // earcut keeps the ring's orientation; store every triangle counter-clockwise
      if (twice < 0) { tri.push(ax, ay, cx, cy, bx, by); twice = -twice; } else tri.push(ax, ay, bx, by, cx, cy);
      area += twice / 2;
    }
    if (!(Math.abs(area - panel.area) <= AREA_TOLERANCE * Math.max(panel.area, 1e-300))) {
      failed.push(p);
      messages.push({ severity: 'warning', code: 'panel-not-triangulated', text: `Panel ${p} could not be split into triangles (their area ${area} differs from the panel's ${panel.area}); it is left out of the contact check.`, where: { panel: p } });
      parts.push([]);
    } else parts.push(tri);
    start[p] = count;
    count += parts[p].length / 6;
  }
  start[P] = count;
  const flat = new Float64Array(6 * count);
  let o = 0;
  for (const t of parts) { flat.set(t, o); o += t.length; }
  return { start, flat, failed, messages };
}
