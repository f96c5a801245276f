// Panel contact in a folded state: which pairs of panels cross each other, or come closer than a clearance.
// Each panel is its flat triangles placed by its own rigid transform (solver/outputs/shape.ts). A hierarchy
// of panel boxes, built once on the flat sheet and refitted per state, gives the pairs whose boxes overlap;
// each pair is then settled exactly: first by the panels' planes (one panel wholly on one side of the other's
// plane), then triangle against triangle (crossing, or distance below the clearance).
//
// What counts (see ./contact-pairs.ts): panels sharing a crease never; panels sharing only a vertex when
// they meet away from it; panels of one sheet lying in one plane with overlapping faces (folded flat, ±180°)
// are `stacked`, not a contact, unless a clearance is given.

import type { Message, Pattern, Shape } from '../types';
import { BoxTree } from '../math/bvh';
import { CROSSING, intersectTriangles, overlap2D, triangleDistance } from '../math/triangles';
import { panelTriangles, type PanelTriangles } from './panel-triangles';
import { CREASE_PAIR, pairRelations, type PairRelations, type VertexPair } from './contact-pairs';
import { placePanels, planShape, type ShapePlan } from './placement';

/** Panels whose normals are this close to parallel (radians) and that lie in one plane are stacked. */
export const STACK_ANGLE = 1e-4;
const COS_STACK = Math.cos(STACK_ANGLE);
const NO_RELATION = -2;

export interface ContactOptions {
  /** file units; 0 (the default) checks interpenetration only */
  clearance?: number;
  /** the panel held still (default: the pattern's base panel); contact points are in its frame */
  basePanel?: number;
}

export interface PanelContact {
  /** the two panels, lower index first */
  panels: [number, number];
  /** a point of the contact (the middle of the crossing, or between the closest points), in the base panel's frame */
  point: [number, number, number];
  /** the panels' distance there: 0 when they cross */
  distance: number;
}

export interface ContactReport {
  /** every pair in contact, by panel indices */
  contacts: PanelContact[];
  /** pairs lying on each other in one plane (folded flat) with no clearance asked for */
  stacked: [number, number][];
  /** pairs whose boxes overlapped and were tested exactly */
  tested: number;
}

/**
 * The contact check of one pattern and clearance, reused for every state of a path (it keeps its buffers,
 * so one checker serves one caller at a time).
 */
export class ContactChecker {
  readonly clearance: number;
  readonly messages: Message[];
  readonly triangles: PanelTriangles;
  private readonly rel: PairRelations;
  private readonly tree: BoxTree;
  private readonly P: number;
  /** corners of each panel: cornerStart[p] … cornerStart[p + 1] − 1, three numbers each once placed */
  private readonly cornerStart: Int32Array;
  private readonly cornerVertex: Int32Array;
  private readonly flatCorners: Float64Array;
  private readonly corners: Float64Array;
  private readonly world: Float64Array;
  private readonly boxes: Float64Array;
  private readonly normals: Float64Array;
  private readonly offsets: Float64Array;
  private readonly diameter: Float64Array;
  private readonly transforms: Float64Array;
  private readonly skip: Uint8Array;
  private tol = 0;
  private tolVertex = 0;
  private outerBuf = new Float64Array(0);
  private readonly seg = new Float64Array(6);
  private readonly close = new Float64Array(6);
  private readonly tri2 = new Float64Array(6);
  private readonly plan: ShapePlan;
  /** which state each panel's placed triangles belong to */
  private readonly worldStamp: Int32Array;
  private stamp = 0;
  private readonly vertexScratch: Float64Array;
  private readonly vertexSeen: Uint8Array;

  constructor(readonly pattern: Pattern, options: ContactOptions = {}) {
    const c = options.clearance ?? 0;
    this.clearance = Number.isFinite(c) && c > 0 ? c : 0;
    this.P = pattern.panels.length;
    this.triangles = panelTriangles(pattern);
    this.messages = [...this.triangles.messages];
    this.skip = new Uint8Array(this.P);
    for (const p of this.triangles.failed) this.skip[p] = 1;
    this.rel = pairRelations(pattern, this.triangles, this.clearance);
    const P = this.P;
    this.cornerStart = new Int32Array(P + 1);
    for (let p = 0; p < P; p++) this.cornerStart[p + 1] = this.cornerStart[p] + pattern.panels[p].vertices.length;
    const nc = this.cornerStart[P];
    this.cornerVertex = new Int32Array(nc);
    this.flatCorners = new Float64Array(2 * nc);
    this.diameter = new Float64Array(P);
    const places = new Float64Array(3 * P);
    pattern.panels.forEach((panel, p) => {
      let mnx = Infinity, mny = Infinity, mxx = -Infinity, mxy = -Infinity;
      panel.vertices.forEach((v, k) => {
        const i = this.cornerStart[p] + k;
        const [x, y] = pattern.vertices[v];
        this.cornerVertex[i] = v;
        this.flatCorners[2 * i] = x;
        this.flatCorners[2 * i + 1] = y;
        mnx = Math.min(mnx, x); mny = Math.min(mny, y); mxx = Math.max(mxx, x); mxy = Math.max(mxy, y);
      });
      this.diameter[p] = Math.hypot(mxx - mnx, mxy - mny);
      places[3 * p] = panel.centroid[0];
      places[3 * p + 1] = panel.centroid[1];
    });
    this.corners = new Float64Array(3 * nc);
    this.world = new Float64Array(9 * this.triangles.start[P]);
    this.boxes = new Float64Array(6 * P);
    this.normals = new Float64Array(3 * P);
    this.offsets = new Float64Array(P);
    this.transforms = new Float64Array(12 * P);
    this.worldStamp = new Int32Array(P).fill(-1);
    this.tree = new BoxTree(places, P);
    this.plan = planShape(pattern, options.basePanel ?? pattern.basePanel);
    this.vertexScratch = new Float64Array(3 * pattern.vertices.length);
    this.vertexSeen = new Uint8Array(pattern.vertices.length);
  }

  /** Contacts of the folded state `shape` (panel transforms from foldedShape). */
  check(shape: Shape): ContactReport {
    for (let p = 0; p < this.P; p++) this.transforms.set(shape.panelTransforms[p], 12 * p);
    return this.evaluate(shape.maxMismatch);
  }

  /** Contacts of the state with these fold angles (radians per crease), placed from the base panel. */
  checkAngles(angles: ArrayLike<number>): ContactReport {
    placePanels(this.plan, angles, this.transforms);
    return this.evaluate();
  }

  /** `given`: the placement's own mismatch when the caller knows it (else measured here). */
  private evaluate(given?: number): ContactReport {
    const measured = this.place();
    const size = this.pattern.size;
    // lengths below this are rounding: the sheet's size and how well the panels' placements agree (a closed
    // state agrees to far better than 1e-6 of the sheet; a worse one does not widen the tolerances further)
    const mismatch = Math.min(Number.isFinite(given) ? given! : measured, 1e-6 * size);
    this.tol = 1e-9 * size + 4 * mismatch;
    this.tolVertex = 1e-7 * size + 10 * mismatch;
    this.tree.refit(this.boxes);
    const contacts: PanelContact[] = [];
    const stacked: [number, number][] = [];
    let tested = 0;
    const { start: rs, other: ro, kind: rk, vertexPairs } = this.rel;
    const skip = this.skip, anySkipped = this.triangles.failed.length > 0;
    this.tree.overlappingPairs(this.clearance + this.tol, (a, b) => {
      const p = a < b ? a : b, q = a < b ? b : a;
      if (anySkipped && (skip[p] || skip[q])) return;
      let kind = NO_RELATION;
      for (let i = rs[p], e = rs[p + 1]; i < e; i++) if (ro[i] === q) { kind = rk[i]; break; }
      if (kind === CREASE_PAIR) return;
      tested++;
      const r = this.pair(p, q, kind === NO_RELATION ? undefined : vertexPairs[kind]);
      if (r === 'stacked') stacked.push([p, q]);
      else if (r) contacts.push(r);
    });
    const order = (x: [number, number], y: [number, number]) => x[0] - y[0] || x[1] - y[1];
    contacts.sort((x, y) => order(x.panels, y.panels));
    stacked.sort(order);
    return { contacts, stacked, tested };
  }

  /**
   * Place every corner and triangle; boxes, normals and plane offsets per panel. Returns the largest gap
   * between two placements of one vertex through different panels (the closure's imprecision in space).
   */
  private place(): number {
    const T = this.transforms, C = this.corners, FC = this.flatCorners, CV = this.cornerVertex;
    const seen = this.vertexSeen, first = this.vertexScratch;
    seen.fill(0);
    let worst = 0;
    for (let p = 0; p < this.P; p++) {
      const o = 12 * p;
      const t00 = T[o], t01 = T[o + 1], t03 = T[o + 3], t10 = T[o + 4], t11 = T[o + 5], t13 = T[o + 7], t20 = T[o + 8], t21 = T[o + 9], t23 = T[o + 11];
      let mnx = Infinity, mny = Infinity, mnz = Infinity, mxx = -Infinity, mxy = -Infinity, mxz = -Infinity;
      for (let i = this.cornerStart[p], e = this.cornerStart[p + 1]; i < e; i++) {
        const x = FC[2 * i], y = FC[2 * i + 1];
        const X = t00 * x + t01 * y + t03, Y = t10 * x + t11 * y + t13, Z = t20 * x + t21 * y + t23;
        C[3 * i] = X; C[3 * i + 1] = Y; C[3 * i + 2] = Z;
        if (X < mnx) mnx = X;
        if (X > mxx) mxx = X;
        if (Y < mny) mny = Y;
        if (Y > mxy) mxy = Y;
        if (Z < mnz) mnz = Z;
        if (Z > mxz) mxz = Z;
        const v = CV[i];
        if (!seen[v]) {
          seen[v] = 1;
          first[3 * v] = X; first[3 * v + 1] = Y; first[3 * v + 2] = Z;
        } else {
          const dx = X - first[3 * v], dy = Y - first[3 * v + 1], dz = Z - first[3 * v + 2];
          const d2 = dx * dx + dy * dy + dz * dz;
          if (d2 > worst) worst = d2;
        }
      }
      const b = 6 * p;
      this.boxes[b] = mnx; this.boxes[b + 1] = mny; this.boxes[b + 2] = mnz;
      this.boxes[b + 3] = mxx; this.boxes[b + 4] = mxy; this.boxes[b + 5] = mxz;
      const nx = T[o + 2], ny = T[o + 6], nz = T[o + 10];
      this.normals[3 * p] = nx; this.normals[3 * p + 1] = ny; this.normals[3 * p + 2] = nz;
      this.offsets[p] = nx * t03 + ny * t13 + nz * t23;
    }
    this.stamp++;
    return Math.sqrt(worst);
  }

  /** Place panel p's triangles for the current state (only panels that reach the exact tests need them). */
  private triangulated(p: number): void {
    if (this.worldStamp[p] === this.stamp) return;
    this.worldStamp[p] = this.stamp;
    const { start, flat } = this.triangles;
    const T = this.transforms, o = 12 * p;
    const t00 = T[o], t01 = T[o + 1], t03 = T[o + 3], t10 = T[o + 4], t11 = T[o + 5], t13 = T[o + 7], t20 = T[o + 8], t21 = T[o + 9], t23 = T[o + 11];
    for (let t = start[p], e = start[p + 1]; t < e; t++) {
      for (let k = 0; k < 3; k++) {
        const x = flat[6 * t + 2 * k], y = flat[6 * t + 2 * k + 1];
        const w = 9 * t + 3 * k;
        this.world[w] = t00 * x + t01 * y + t03;
        this.world[w + 1] = t10 * x + t11 * y + t13;
        this.world[w + 2] = t20 * x + t21 * y + t23;
      }
    }
  }

  /** Signed distance of a placed point to the plane of panel p. */
  private side(p: number, x: number, y: number, z: number): number {
    return this.normals[3 * p] * x + this.normals[3 * p + 1] * y + this.normals[3 * p + 2] * z - this.offsets[p];
  }

  /**
   * Is panel q (less its corners at the `except` vertices) wholly beyond `margin` on one side of p's plane?
   * Then the two cannot meet (q lies in the hull of its corners).
   */
  private beyondPlane(p: number, q: number, margin: number, except: number[] | undefined): boolean {
    const N = this.normals, C = this.corners, CV = this.cornerVertex;
    const nx = N[3 * p], ny = N[3 * p + 1], nz = N[3 * p + 2], off = this.offsets[p];
    let above = false, below = false, any = false;
    for (let i = this.cornerStart[q], e = this.cornerStart[q + 1]; i < e; i++) {
      if (except !== undefined && (except.length === 1 ? CV[i] === except[0] : except.includes(CV[i]))) continue;
      const d = nx * C[3 * i] + ny * C[3 * i + 1] + nz * C[3 * i + 2] - off;
      any = true;
      if (d > margin) above = true;
      else if (d < -margin) below = true;
      else return false;
      if (above && below) return false;
    }
    return any;
  }

  private pair(p: number, q: number, vp: VertexPair | undefined): PanelContact | 'stacked' | undefined {
    const c = this.clearance;
    const shared = vp?.shared;
    const tol = this.tol;
    // (nearly) one plane: stacked when the faces overlap; a folded-flat state settles its angles only to
    // about 1e-5 rad, so this comes before the plane test, with a tolerance to match
    const N = this.normals;
    const dot = N[3 * p] * N[3 * q] + N[3 * p + 1] * N[3 * q + 1] + N[3 * p + 2] * N[3 * q + 2];
    if (Math.abs(dot) >= COS_STACK) {
      this.triangulated(p);
      this.triangulated(q);
      const tolStack = STACK_ANGLE * (this.diameter[p] + this.diameter[q]) + tol;
      if (this.inPlane(p, q, tolStack)) {
        if (c > 0) return this.distanceContact(p, q, vp);
        return this.overlapInPlane(p, q, tolStack) ? 'stacked' : undefined;
      }
    }
    // panels whose planes keep them apart
    if (!shared || c === 0) {
      if (this.beyondPlane(p, q, c + tol, shared) || this.beyondPlane(q, p, c + tol, shared)) return undefined;
    }
    this.triangulated(p);
    this.triangulated(q);
    const crossing = this.crossing(p, q, shared);
    if (crossing) return crossing;
    if (c > 0) return this.distanceContact(p, q, vp);
    return undefined;
  }

  /** Every corner of q within tolStack of p's plane. */
  private inPlane(p: number, q: number, tolStack: number): boolean {
    for (let i = this.cornerStart[q]; i < this.cornerStart[q + 1]; i++) {
      if (Math.abs(this.side(p, this.corners[3 * i], this.corners[3 * i + 1], this.corners[3 * i + 2])) > tolStack) return false;
    }
    return true;
  }

  /** q's triangle t in p's flat frame (the inverse of p's transform, dropping the out-of-plane part). */
  private toFrame(p: number, t: number, out: Float64Array): void {
    const T = this.transforms, o = 12 * p;
    for (let k = 0; k < 3; k++) {
      const w = 9 * t + 3 * k;
      const dx = this.world[w] - T[o + 3], dy = this.world[w + 1] - T[o + 7], dz = this.world[w + 2] - T[o + 11];
      out[2 * k] = T[o] * dx + T[o + 4] * dy + T[o + 8] * dz;
      out[2 * k + 1] = T[o + 1] * dx + T[o + 5] * dy + T[o + 9] * dz;
    }
  }

  private overlapInPlane(p: number, q: number, tolStack: number): boolean {
    const { start, flat } = this.triangles;
    for (let u = start[q]; u < start[q + 1]; u++) {
      this.toFrame(p, u, this.tri2);
      for (let t = start[p]; t < start[p + 1]; t++) if (overlap2D(flat, 6 * t, this.tri2, 0, tolStack)) return true;
    }
    return false;
  }

  /** The first pair of triangles that cross (away from the shared vertices), as a contact. */
  private crossing(p: number, q: number, shared: number[] | undefined): PanelContact | undefined {
    const { start } = this.triangles;
    const W = this.world, s = this.seg;
    for (let t = start[p]; t < start[p + 1]; t++) {
      for (let u = start[q]; u < start[q + 1]; u++) {
        const r = intersectTriangles(W, 9 * t, W, 9 * u, this.tol, s);
        if (r !== CROSSING) continue;
        if (shared && this.atSharedVertex(p, shared, s)) continue;
        return { panels: [p, q], point: [(s[0] + s[3]) / 2, (s[1] + s[4]) / 2, (s[2] + s[5]) / 2], distance: 0 };
      }
    }
    return undefined;
  }

  /** Both ends of the crossing segment at one shared vertex (where the panels meet by construction). */
  private atSharedVertex(p: number, shared: number[], s: Float64Array): boolean {
    const T = this.transforms, o = 12 * p;
    const tv = this.tolVertex;
    for (const v of shared) {
      const [x, y] = this.pattern.vertices[v];
      const X = T[o] * x + T[o + 1] * y + T[o + 3], Y = T[o + 4] * x + T[o + 5] * y + T[o + 7], Z = T[o + 8] * x + T[o + 9] * y + T[o + 11];
      if (Math.hypot(s[0] - X, s[1] - Y, s[2] - Z) <= tv && Math.hypot(s[3] - X, s[4] - Y, s[5] - Z) <= tv) return true;
    }
    return false;
  }

  /** With a clearance: the closest approach below it (outside the shared vertices' zones), as a contact. */
  private distanceContact(p: number, q: number, vp: VertexPair | undefined): PanelContact | undefined {
    const c = this.clearance;
    const { start } = this.triangles;
    let best = Infinity;
    const point: [number, number, number] = [0, 0, 0];
    const consider = (A: Float64Array, a: number, B: Float64Array, b: number) => {
      const d = triangleDistance(A, a, B, b, this.tol, this.close);
      if (d < best) {
        best = d;
        for (let k = 0; k < 3; k++) point[k] = (this.close[k] + this.close[k + 3]) / 2;
      }
    };
    if (!vp) {
      for (let t = start[p]; t < start[p + 1]; t++) for (let u = start[q]; u < start[q + 1]; u++) consider(this.world, 9 * t, this.world, 9 * u);
    } else {
      // the part of each panel outside the zones against the whole of the other
      for (const [a, outer, b] of [[p, vp.outerP!, q], [q, vp.outerQ!, p]] as const) {
        const placed = this.placeOuter(a, outer);
        if (this.outerBeyondPlane(b, placed, c + this.tol)) continue;
        for (let t = 0; t < placed.length; t += 9) for (let u = start[b]; u < start[b + 1]; u++) consider(placed, t, this.world, 9 * u);
      }
    }
    // closer than the clearance by more than rounding (the flat sheet is exactly c apart at a zone's edge)
    return best < c - this.tol ? { panels: [p, q], point, distance: best } : undefined;
  }

  /** Flat 2D triangles of panel a placed by its transform (into a reused buffer). */
  private placeOuter(a: number, outer: Float64Array): Float64Array {
    const n = outer.length / 6;
    if (this.outerBuf.length < 9 * n) this.outerBuf = new Float64Array(9 * n * 2);
    const T = this.transforms, o = 12 * a, W = this.outerBuf;
    for (let i = 0; i < 3 * n; i++) {
      const x = outer[2 * i], y = outer[2 * i + 1];
      W[3 * i] = T[o] * x + T[o + 1] * y + T[o + 3];
      W[3 * i + 1] = T[o + 4] * x + T[o + 5] * y + T[o + 7];
      W[3 * i + 2] = T[o + 8] * x + T[o + 9] * y + T[o + 11];
    }
    return W.subarray(0, 9 * n);
  }

  private outerBeyondPlane(b: number, placed: Float64Array, margin: number): boolean {
    if (placed.length === 0) return true;
    let above = 0, below = 0;
    for (let i = 0; i < placed.length; i += 3) {
      const d = this.side(b, placed[i], placed[i + 1], placed[i + 2]);
      if (d > margin) above++;
      else if (d < -margin) below++;
      else return false;
      if (above && below) return false;
    }
    return true;
  }
}

/** The pairs of a report as [p, q] lists (what `solve` solutions carry). */
export function contactPairs(report: ContactReport): [number, number][] {
  return report.contacts.map((c) => [c.panels[0], c.panels[1]]);
}

/** A ready checker for one-off use (a solve's solutions); a path keeps one ContactChecker for all samples. */
export function checkContacts(pattern: Pattern, shape: Shape, options: ContactOptions = {}): ContactReport & { messages: Message[] } {
  const checker = new ContactChecker(pattern, options);
  return { ...checker.check(shape), messages: checker.messages };
}
