// How two panels of the flat sheet are related, which decides what counts as a contact between them:
//  - panels that share a crease turn about it and can only meet by folding past ±180°: never a contact;
//  - panels that share only a vertex (or several vertices) touch there by construction: only meeting
//    elsewhere counts; with a clearance c, the points within r of the shared vertex are left out, where
//    r = c / sin(min(γ, 90°)) and γ is the smaller flat angle between the two panels at that vertex, so the
//    flat sheet itself is never closer than c outside that zone;
//  - every other pair counts whenever the panels cross or come closer than c.
// Everything here is computed once per pattern and clearance, on the flat sheet.

import type { Pattern } from '../types';
import type { PanelTriangles } from './panel-triangles';

export const CREASE_PAIR = -1;

export interface VertexPair {
  p: number;
  q: number;
  /** vertices the two panels share (no crease between them) */
  shared: number[];
  /** with a clearance: the parts of p and of q outside the zones around the shared vertices (2D triangles) */
  outerP?: Float64Array;
  outerQ?: Float64Array;
}

export interface PairRelations {
  /** related panels of p (both orders) are other[start[p]] … other[start[p + 1] − 1] */
  start: Int32Array;
  other: Int32Array;
  /** CREASE_PAIR, or the index into `vertexPairs` */
  kind: Int32Array;
  vertexPairs: VertexPair[];
}

/** Sides of the polygon that stands for the disc left out around a shared vertex (drawn around the disc). */
const ZONE_SIDES = 16;

export function pairRelations(pattern: Pattern, triangles: PanelTriangles, clearance: number): PairRelations {
  const P = pattern.panels.length;
  const crease = new Set<number>();
  const key = (p: number, q: number) => (p < q ? p * P + q : q * P + p);
  for (const c of pattern.creases) if (c.leftPanel >= 0 && c.rightPanel >= 0 && c.leftPanel !== c.rightPanel) crease.add(key(c.leftPanel, c.rightPanel));
  const atVertex: number[][] = Array.from({ length: pattern.vertices.length }, () => []);
  pattern.panels.forEach((panel, p) => { for (const v of new Set(panel.vertices)) atVertex[v].push(p); });
  const shared = new Map<number, number[]>();
  for (let v = 0; v < atVertex.length; v++) {
    const ps = atVertex[v];
    for (let i = 0; i < ps.length; i++) for (let j = i + 1; j < ps.length; j++) {
      const k = key(ps[i], ps[j]);
      if (crease.has(k)) continue;
      const list = shared.get(k);
      if (list) list.push(v); else shared.set(k, [v]);
    }
  }
  const vertexPairs: VertexPair[] = [];
  const lists: { other: number; kind: number }[][] = Array.from({ length: P }, () => []);
  for (const k of crease) {
    const p = Math.floor(k / P), q = k % P;
    lists[p].push({ other: q, kind: CREASE_PAIR });
    lists[q].push({ other: p, kind: CREASE_PAIR });
  }
  for (const [k, vs] of shared) {
    const p = Math.floor(k / P), q = k % P;
    const vp: VertexPair = { p, q, shared: vs };
    if (clearance > 0) {
      const radii = vs.map((v) => zoneRadius(pattern, p, q, v, clearance));
      vp.outerP = outside(panelFlat(triangles, p), vs, radii, pattern);
      vp.outerQ = outside(panelFlat(triangles, q), vs, radii, pattern);
    }
    lists[p].push({ other: q, kind: vertexPairs.length });
    lists[q].push({ other: p, kind: vertexPairs.length });
    vertexPairs.push(vp);
  }
  const start = new Int32Array(P + 1);
  for (let p = 0; p < P; p++) start[p + 1] = start[p] + lists[p].length;
  const other = new Int32Array(start[P]);
  const kind = new Int32Array(start[P]);
  for (let p = 0; p < P; p++) lists[p].forEach((e, i) => { other[start[p] + i] = e.other; kind[start[p] + i] = e.kind; });
  return { start, other, kind, vertexPairs };
}

/** The relation of p and q: CREASE_PAIR, a vertex-pair index, or undefined when they share nothing. */
export function relationOf(rel: PairRelations, p: number, q: number): number | undefined {
  for (let i = rel.start[p], e = rel.start[p + 1]; i < e; i++) if (rel.other[i] === q) return rel.kind[i];
  return undefined;
}

function panelFlat(triangles: PanelTriangles, p: number): Float64Array {
  return triangles.flat.subarray(6 * triangles.start[p], 6 * triangles.start[p + 1]);
}

/** The angle a panel covers at one of its corners: [start direction, span], radians, counter-clockwise. */
function sectorAt(pattern: Pattern, p: number, v: number): [number, number] {
  const vs = pattern.panels[p].vertices;
  const k = vs.indexOf(v);
  const n = vs.length;
  const [x, y] = pattern.vertices[v];
  const [nx, ny] = pattern.vertices[vs[(k + 1) % n]];
  const [px, py] = pattern.vertices[vs[(k - 1 + n) % n]];
  const a = Math.atan2(ny - y, nx - x);
  const b = Math.atan2(py - y, px - x);
  return [a, mod2pi(b - a)];
}

function mod2pi(x: number): number {
  const t = x % (2 * Math.PI);
  return t < 0 ? t + 2 * Math.PI : t;
}

/** r = c / sin(min(γ, 90°)), γ the smaller angle between the two panels around v on the flat sheet. */
export function zoneRadius(pattern: Pattern, p: number, q: number, v: number, clearance: number): number {
  const [a0, sa] = sectorAt(pattern, p, v);
  const [b0, sb] = sectorAt(pattern, q, v);
  const gap = Math.min(mod2pi(b0 - (a0 + sa)), mod2pi(a0 - (b0 + sb)));
  const s = Math.sin(Math.min(gap, Math.PI / 2));
  return s > 1e-12 ? clearance / s : Infinity;
}

/** 2D triangles `tris` less the zones (a 16-gon drawn around the disc of radius r at each vertex). */
function outside(tris: Float64Array, vs: number[], radii: number[], pattern: Pattern): Float64Array {
  let pieces: number[][] = [];
  for (let t = 0; t < tris.length; t += 6) pieces.push(Array.from(tris.subarray(t, t + 6)));
  vs.forEach((v, i) => {
    const r = radii[i];
    const [cx, cy] = pattern.vertices[v];
    const next: number[][] = [];
    for (const poly of pieces) {
      if (!Number.isFinite(r)) continue;
      let rest: number[] | null = poly;
      for (let k = 0; k < ZONE_SIDES && rest; k++) {
        const f = (2 * Math.PI * k) / ZONE_SIDES;
        const nx = Math.cos(f), ny = Math.sin(f);
        // beyond this side of the polygon: outside the zone; the rest goes on to the next side
        const out = clip(rest, -nx, -ny, -(nx * cx + ny * cy + r));
        if (out) next.push(out);
        rest = clip(rest, nx, ny, nx * cx + ny * cy + r);
      }
    }
    pieces = next;
  });
  const out: number[] = [];
  for (const poly of pieces) {
    // convex pieces: a fan from the first corner
    for (let k = 2; k + 1 < poly.length; k += 2) {
      const tw = (poly[k] - poly[0]) * (poly[k + 3] - poly[1]) - (poly[k + 1] - poly[1]) * (poly[k + 2] - poly[0]);
      if (tw > 0) out.push(poly[0], poly[1], poly[k], poly[k + 1], poly[k + 2], poly[k + 3]);
    }
  }
  return Float64Array.from(out);
}

/** The convex polygon (x, y pairs) cut to n·x ≤ h, or null when nothing with area is left. */
function clip(poly: number[], nx: number, ny: number, h: number): number[] | null {
  const out: number[] = [];
  const m = poly.length / 2;
  for (let i = 0; i < m; i++) {
    const ax = poly[2 * i], ay = poly[2 * i + 1];
    const bx = poly[(2 * i + 2) % poly.length], by = poly[(2 * i + 3) % poly.length];
    const da = nx * ax + ny * ay - h, db = nx * bx + ny * by - h;
    if (da <= 0) out.push(ax, ay);
    if ((da < 0 && db > 0) || (da > 0 && db < 0)) {
      const f = da / (da - db);
      out.push(ax + f * (bx - ax), ay + f * (by - ay));
    }
  }
  if (out.length < 6) return null;
  let twice = 0;
  for (let i = 0; i < out.length; i += 2) {
    const j = (i + 2) % out.length;
    twice += out[i] * out[j + 1] - out[j] * out[i + 1];
  }
  return twice > 1e-24 * Math.max(1, Math.abs(out[0]) + Math.abs(out[1])) ** 2 ? out : null;
}
