// Cleaning a drafter's drawing into a crease graph: straight segments as drawn (ends that nearly meet,
// lines that cross or end on other lines, pieces drawn twice) become vertices and edges that
// buildPattern accepts. Every step is counted, and every change a person should see is a message.
//
// Steps, in order (snap = the largest distance two points may be apart and still be one point):
//  1. ends within the snap of each other become one vertex (their mean);
//  2. lines whose ends met there are dropped (zero length);
//  3. an end within the snap of another line's interior splits that line (a T-junction); when it lies on
//     exactly one line it is moved onto it, so long lines such as the outline stay straight;
//  4. two lines that cross away from their ends get a new vertex at the crossing (a warning each);
//  5. every line is split at the vertices found on it; pieces drawn more than once (duplicates and
//     collinear overlaps) are kept once, and pieces of different assignments that coincide are resolved
//     (B over a crease, a crease over U) or refused (M over V, say);
//  6. collinear pieces of one assignment meeting at a vertex of nothing else are joined into one edge.
// A line that overshoots another by less than the snap is trimmed onto it in step 3, and one that stops
// short of it is extended, so no dangling stub shorter than the snap survives; longer dangling lines are
// left for the pattern checks, which refuse them with their place in the file.
import type { Assignment, Message, Where } from '../types';
import { DUPLICATE_TOLERANCE } from './pattern';

/** One straight segment as drawn, with where it came from (an index into the caller's list of origins). */
export interface DrawnSegment {
  a: [number, number];
  b: [number, number];
  assignment: Assignment;
  origin: number;
}

/** Where a drawn segment came from, for messages: a short description and the location in the file. */
export interface Origin {
  /** e.g. `LINE at line 120 on layer "mountain"`, `<path id="c3">` */
  text: string;
  where: Where;
}

export interface CleanCounts {
  /** drawn segments read */
  segments: number;
  /** line ends moved to meet another end or a line (by at most the snap) */
  endsSnapped: number;
  /** lines dropped because their two ends are one point */
  zeroLength: number;
  /** lines split where another line ends on them */
  tJunctions: number;
  /** new vertices where lines cross away from their ends */
  crossings: number;
  /** lines drawn twice with the same two ends (one kept) */
  duplicates: number;
  /** collinear overlapping pieces of different lines merged into one */
  overlapsMerged: number;
  /** line ends trimmed or extended (along their line) onto a line they overshoot or stop short of */
  endsTrimmed: number;
  /** vertices of two collinear pieces (and nothing else) removed, joining the pieces */
  collinearJoined: number;
  /** edges of the cleaned graph */
  edges: number;
  vertices: number;
}

export interface CleanResult {
  vertices: [number, number][];
  edges: [number, number][];
  assignments: Assignment[];
  /** per edge: the drawn segments it came from (indices into the segment list), first-drawn first */
  sources: number[][];
  counts: CleanCounts;
  snap: number;
  messages: Message[];
}

/** Default snap as a fraction of the drawing's bounding-box diagonal. */
export const DEFAULT_SNAP_FRACTION = 1e-4;
/** Messages of one kind listed one by one before the rest are counted in a line. */
const LISTED = 10;

const fmt = (x: number) => String(+x.toPrecision(6));

class UnionFind {
  parent: Int32Array;
  constructor(n: number) {
    this.parent = new Int32Array(n);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }
  find(i: number): number {
    const p = this.parent;
    while (p[i] !== i) {
      p[i] = p[p[i]];
      i = p[i];
    }
    return i;
  }
  union(i: number, j: number): void {
    const a = this.find(i);
    const b = this.find(j);
    if (a !== b) this.parent[Math.max(a, b)] = Math.min(a, b);
  }
}

/** Cells of a grid as one number: columns and rows counted from the drawing's corner, so they stay small. */
const KEY_ROWS = 1 << 24;
const cellKey = (gx: number, gy: number) => (gx + 2) * KEY_ROWS + (gy + 2);

/** A uniform hash grid over points, for "every point within r of this one" queries. */
class PointGrid {
  private cells = new Map<number, number[]>();
  constructor(private readonly cell: number, private readonly x0: number, private readonly y0: number) {}
  add(i: number, x: number, y: number): void {
    const k = cellKey(Math.floor((x - this.x0) / this.cell), Math.floor((y - this.y0) / this.cell));
    const list = this.cells.get(k);
    if (list) list.push(i);
    else this.cells.set(k, [i]);
  }
  /** indices of points in the cells that a disc of radius ≤ cell around (x, y) can touch */
  near(x: number, y: number, out: number[]): number[] {
    out.length = 0;
    const gx = Math.floor((x - this.x0) / this.cell);
    const gy = Math.floor((y - this.y0) / this.cell);
    for (let dx = -1; dx <= 1; dx++) {
      for (let dy = -1; dy <= 1; dy++) {
        const list = this.cells.get(cellKey(gx + dx, gy + dy));
        if (list) for (const i of list) out.push(i);
      }
    }
    return out;
  }
}

/** A uniform grid over segments' bounding boxes (grown by r), for candidate pairs and point-on-segment tests. */
class SegmentGrid {
  private cells = new Map<number, number[]>();
  constructor(private readonly cell: number, private readonly x0: number, private readonly y0: number) {}
  add(s: number, ax: number, ay: number, bx: number, by: number, r: number): void {
    const c = this.cell;
    const gx1 = Math.floor((Math.max(ax, bx) + r - this.x0) / c), gy1 = Math.floor((Math.max(ay, by) + r - this.y0) / c);
    for (let gx = Math.floor((Math.min(ax, bx) - r - this.x0) / c); gx <= gx1; gx++) {
      for (let gy = Math.floor((Math.min(ay, by) - r - this.y0) / c); gy <= gy1; gy++) {
        const k = cellKey(gx, gy);
        const list = this.cells.get(k);
        if (list) list.push(s);
        else this.cells.set(k, [s]);
      }
    }
  }
  at(x: number, y: number): number[] {
    return this.cells.get(cellKey(Math.floor((x - this.x0) / this.cell), Math.floor((y - this.y0) / this.cell))) ?? [];
  }
  lists(): IterableIterator<number[]> {
    return this.cells.values();
  }
}

/**
 * A segment grid whose cells are about the mean segment length, coarsened until it holds at most ~16
 * entries per segment (long diagonal lines cover many cells), so the pair tests stay near linear.
 */
function segmentGrid(list: number[], ends: (s: number) => number[], r: number, size: number, x0: number, y0: number): SegmentGrid {
  let total = 0;
  for (const s of list) {
    const [ax, ay, bx, by] = ends(s);
    total += Math.hypot(bx - ax, by - ay);
  }
  let cell = Math.max(total / list.length, size / 4096, r);
  for (;;) {
    let entries = 0;
    for (const s of list) {
      const [ax, ay, bx, by] = ends(s);
      entries += (Math.floor((Math.max(ax, bx) + r) / cell) - Math.floor((Math.min(ax, bx) - r) / cell) + 1) * (Math.floor((Math.max(ay, by) + r) / cell) - Math.floor((Math.min(ay, by) - r) / cell) + 1);
    }
    if (entries <= 16 * list.length + 64) break;
    cell *= 2;
  }
  const grid = new SegmentGrid(cell, x0 - 2 * r, y0 - 2 * r);
  for (const s of list) {
    const [ax, ay, bx, by] = ends(s);
    grid.add(s, ax, ay, bx, by, r);
  }
  return grid;
}

/** Position of p along a → b (0 at a, 1 at b) and its distance from the segment's line. */
function project(px: number, py: number, ax: number, ay: number, bx: number, by: number): { t: number; d: number } {
  const dx = bx - ax;
  const dy = by - ay;
  const len2 = dx * dx + dy * dy;
  const t = ((px - ax) * dx + (py - ay) * dy) / len2;
  const d = Math.abs(dx * (py - ay) - dy * (px - ax)) / Math.sqrt(len2);
  return { t, d };
}

/**
 * Clean drawn segments into a crease graph. `snap` is a length in the drawing's units (default
 * DEFAULT_SNAP_FRACTION of the bounding-box diagonal); it is never below the pattern's own duplicate
 * tolerance, so what comes out passes buildPattern's vertex checks. Never throws.
 */
export function cleanSegments(segments: DrawnSegment[], origins: Origin[], snapOption?: number): CleanResult {
  const messages: Message[] = [];
  const counts: CleanCounts = {
    segments: segments.length, endsSnapped: 0, zeroLength: 0, tJunctions: 0, crossings: 0, duplicates: 0, overlapsMerged: 0, endsTrimmed: 0, collinearJoined: 0, edges: 0, vertices: 0,
  };
  const empty = (snap: number): CleanResult => ({ vertices: [], edges: [], assignments: [], sources: [], counts, snap, messages });
  const originOf = (s: number) => origins[segments[s].origin];
  const whereOf = (s: number): Where => originOf(s)?.where ?? {};
  const textOf = (s: number) => originOf(s)?.text ?? `line ${s}`;

  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const s of segments) {
    for (const p of [s.a, s.b]) {
      x0 = Math.min(x0, p[0]);
      y0 = Math.min(y0, p[1]);
      x1 = Math.max(x1, p[0]);
      y1 = Math.max(y1, p[1]);
    }
  }
  const size = Math.hypot(x1 - x0, y1 - y0);
  if (!(size > 0) || !Number.isFinite(size)) {
    messages.push({ severity: 'error', code: 'drawing-empty', text: segments.length ? 'Every line of the drawing is at one point: there is no sheet to read.' : 'The drawing has no straight lines to read as creases or outline.' });
    return empty(0);
  }
  const floor = DUPLICATE_TOLERANCE * size * 4;
  const snap = Math.max(snapOption ?? DEFAULT_SNAP_FRACTION * size, floor);
  const cell = Math.max(snap, size / 4096);
  /** moves smaller than this are rounding, not drafting: not counted, and ends on a line are left as they are */
  const noise = 1e-12 * size;

  // 1. cluster the ends
  const n = segments.length;
  const px = new Float64Array(2 * n);
  const py = new Float64Array(2 * n);
  segments.forEach((s, i) => {
    px[2 * i] = s.a[0];
    py[2 * i] = s.a[1];
    px[2 * i + 1] = s.b[0];
    py[2 * i + 1] = s.b[1];
  });
  const uf = new UnionFind(2 * n);
  const grid = new PointGrid(cell, x0, y0);
  const scratch: number[] = [];
  for (let p = 0; p < 2 * n; p++) {
    for (const q of grid.near(px[p], py[p], scratch)) {
      if (Math.hypot(px[p] - px[q], py[p] - py[q]) <= snap) uf.union(p, q);
    }
    grid.add(p, px[p], py[p]);
  }
  const vertexOfRoot = new Map<number, number>();
  const vx: number[] = [];
  const vy: number[] = [];
  const members: number[][] = [];
  const vertexOf = new Int32Array(2 * n);
  for (let p = 0; p < 2 * n; p++) {
    const r = uf.find(p);
    let v = vertexOfRoot.get(r);
    if (v === undefined) {
      v = vx.length;
      vertexOfRoot.set(r, v);
      vx.push(0);
      vy.push(0);
      members.push([]);
    }
    members[v].push(p);
    vertexOf[p] = v;
  }
  let spread = 0;
  for (let v = 0; v < members.length; v++) {
    const m = members[v];
    let sx = 0, sy = 0;
    for (const p of m) {
      sx += px[p];
      sy += py[p];
    }
    vx[v] = sx / m.length;
    vy[v] = sy / m.length;
    for (const p of m) {
      const d = Math.hypot(px[p] - vx[v], py[p] - vy[v]);
      if (d > noise) counts.endsSnapped++;
      spread = Math.max(spread, d);
    }
  }

  // 2. zero-length lines
  const alive: number[] = [];
  let firstZero = -1;
  for (let s = 0; s < n; s++) {
    if (vertexOf[2 * s] === vertexOf[2 * s + 1]) {
      counts.zeroLength++;
      if (firstZero < 0) firstZero = s;
    } else alive.push(s);
  }
  if (alive.length === 0) {
    messages.push({ severity: 'error', code: 'drawing-empty', text: `Every line of the drawing is shorter than the snap (${fmt(snap)}): there is no sheet to read.` });
    return empty(snap);
  }
  const su = (s: number) => vertexOf[2 * s];
  const sv = (s: number) => vertexOf[2 * s + 1];

  // 3. ends on other lines (T-junctions)
  const segGrid = segmentGrid(alive, (s) => [vx[su(s)], vy[su(s)], vx[sv(s)], vy[sv(s)]], snap, size, x0, y0);
  const splits = new Map<number, Map<number, number>>(); // segment → vertex → t
  const addSplit = (s: number, v: number, t: number) => {
    let m = splits.get(s);
    if (!m) splits.set(s, (m = new Map()));
    if (!m.has(v)) m.set(v, t);
  };
  const onLines: number[][] = vx.map(() => []);
  for (let v = 0; v < vx.length; v++) {
    const seen = new Set<number>();
    for (const s of segGrid.at(vx[v], vy[v])) {
      if (seen.has(s)) continue;
      seen.add(s);
      const a = su(s), b = sv(s);
      if (a === v || b === v) continue;
      const { t, d } = project(vx[v], vy[v], vx[a], vy[a], vx[b], vy[b]);
      if (d > snap || t <= 0 || t >= 1) continue;
      const len = Math.hypot(vx[b] - vx[a], vy[b] - vy[a]);
      if (t * len <= snap || (1 - t) * len <= snap) continue; // that end is the vertex's own cluster's business
      onLines[v].push(s);
    }
  }
  let trimmed = 0;
  for (let v = 0; v < vx.length; v++) {
    // on exactly one line: move onto it, so the line stays straight (on several: stay where it is). The end
    // of a single line moves along that line (trimmed or extended to meet the other), keeping its direction.
    if (onLines[v].length === 1) {
      const s = onLines[v][0];
      const a = su(s), b = sv(s);
      const { t } = project(vx[v], vy[v], vx[a], vy[a], vx[b], vy[b]);
      let nx = vx[a] + t * (vx[b] - vx[a]);
      let ny = vy[a] + t * (vy[b] - vy[a]);
      if (members[v].length === 1) {
        const w = vertexOf[members[v][0] ^ 1]; // the line's other end
        const ex = vx[v] - vx[w], ey = vy[v] - vy[w];
        const rx = vx[b] - vx[a], ry = vy[b] - vy[a];
        const den = ex * ry - ey * rx;
        if (Math.abs(den) > 1e-6 * Math.hypot(ex, ey) * Math.hypot(rx, ry)) {
          // v + k·e on the line a + t·r
          const k = ((vx[a] - vx[v]) * ry - (vy[a] - vy[v]) * rx) / den;
          const ix = vx[v] + k * ex, iy = vy[v] + k * ey;
          if (Math.hypot(ix - vx[v], iy - vy[v]) <= snap) [nx, ny] = [ix, iy];
        }
      }
      if (Math.hypot(nx - vx[v], ny - vy[v]) <= noise) continue;
      counts.endsTrimmed += members[v].length;
      trimmed = Math.max(trimmed, Math.hypot(nx - vx[v], ny - vy[v]));
      vx[v] = nx;
      vy[v] = ny;
    }
  }
  for (let v = 0; v < vx.length; v++) {
    for (const s of onLines[v]) {
      const a = su(s), b = sv(s);
      addSplit(s, v, project(vx[v], vy[v], vx[a], vy[a], vx[b], vy[b]).t);
      counts.tJunctions++;
    }
  }

  // 4. crossings away from every end
  const endGrid = new PointGrid(cell, x0, y0);
  for (let v = 0; v < vx.length; v++) endGrid.add(v, vx[v], vy[v]);
  const crossX: number[] = [];
  const crossY: number[] = [];
  const crossPair: [number, number][] = [];
  const tested = new Set<number>();
  for (const list of segGrid.lists()) {
    for (let i = 0; i < list.length; i++) {
      for (let j = i + 1; j < list.length; j++) {
        const e = Math.min(list[i], list[j]);
        const f = Math.max(list[i], list[j]);
        if (e === f) continue;
        const key = e * n + f;
        if (tested.has(key)) continue;
        tested.add(key);
        const a = su(e), b = sv(e), c = su(f), d = sv(f);
        if (a === c || a === d || b === c || b === d) continue;
        const rx = vx[b] - vx[a], ry = vy[b] - vy[a];
        const qx = vx[d] - vx[c], qy = vy[d] - vy[c];
        const den = rx * qy - ry * qx;
        if (den === 0) continue;
        const t = ((vx[c] - vx[a]) * qy - (vy[c] - vy[a]) * qx) / den;
        const u = ((vx[c] - vx[a]) * ry - (vy[c] - vy[a]) * rx) / den;
        if (t <= 0 || t >= 1 || u <= 0 || u >= 1) continue;
        const ix = vx[a] + t * rx;
        const iy = vy[a] + t * ry;
        let nearEnd = false;
        for (const w of endGrid.near(ix, iy, scratch)) {
          if (Math.hypot(vx[w] - ix, vy[w] - iy) <= snap) {
            nearEnd = true;
            break;
          }
        }
        if (nearEnd) continue; // an end lies there: step 3 split both lines at it
        crossX.push(ix);
        crossY.push(iy);
        crossPair.push([e, f]);
      }
    }
  }
  if (crossX.length) {
    // crossings within the snap of each other are one vertex (several lines through one point)
    const cu = new UnionFind(crossX.length);
    const cg = new PointGrid(cell, x0, y0);
    for (let k = 0; k < crossX.length; k++) {
      for (const q of cg.near(crossX[k], crossY[k], scratch)) if (Math.hypot(crossX[k] - crossX[q], crossY[k] - crossY[q]) <= snap) cu.union(k, q);
      cg.add(k, crossX[k], crossY[k]);
    }
    const groups = new Map<number, number[]>();
    for (let k = 0; k < crossX.length; k++) {
      const r = cu.find(k);
      const g = groups.get(r);
      if (g) g.push(k);
      else groups.set(r, [k]);
    }
    let listed = 0;
    for (const g of groups.values()) {
      let sx = 0, sy = 0;
      const lines = new Set<number>();
      for (const k of g) {
        sx += crossX[k];
        sy += crossY[k];
        lines.add(crossPair[k][0]);
        lines.add(crossPair[k][1]);
      }
      const v = vx.length;
      vx.push(sx / g.length);
      vy.push(sy / g.length);
      members.push([]);
      counts.crossings++;
      const sorted = [...lines].sort((p, q) => p - q);
      for (const s of sorted) addSplit(s, v, project(vx[v], vy[v], vx[su(s)], vy[su(s)], vx[sv(s)], vy[sv(s)]).t);
      if (listed++ < LISTED) {
        const names = sorted.slice(0, 4).map(textOf);
        messages.push({
          severity: 'warning',
          code: 'crossing-becomes-vertex',
          text: `${sorted.length === 2 ? `${cap(names[0])} and ${names[1]} cross` : `${sorted.length} lines (${names.join(', ')}${sorted.length > 4 ? ', …' : ''}) cross`} at (${fmt(vx[v])}, ${fmt(vy[v])}) where none of them ends; the crossing becomes a vertex joining them. Check that the creases really meet there.`,
          where: whereOf(sorted[0]),
        });
      }
    }
    if (counts.crossings > LISTED) {
      messages.push({ severity: 'warning', code: 'crossing-becomes-vertex', text: `… and ${counts.crossings - LISTED} more crossings became vertices.` });
    }
  }

  // 5. split every line at its vertices; keep each piece once
  interface Piece { u: number; v: number; from: number[]; assignment: Assignment }
  const pieces = new Map<number, Piece>();
  const pieceOrder: Piece[] = [];
  const nvx = vx.length;
  const pairKey = (u: number, v: number) => (u < v ? u * nvx + v : v * nvx + u);
  const drawnPairs = new Map<number, number>();
  for (const s of alive) {
    const a = su(s), b = sv(s);
    const k = pairKey(a, b);
    drawnPairs.set(k, (drawnPairs.get(k) ?? 0) + 1);
    const m = splits.get(s);
    const chain = [a, ...(m ? [...m.entries()].sort((p, q) => p[1] - q[1]).map(([v]) => v) : []), b];
    for (let i = 0; i + 1 < chain.length; i++) {
      const u = chain[i], v = chain[i + 1];
      if (u === v) continue;
      const key = pairKey(u, v);
      const piece = pieces.get(key);
      if (!piece) {
        const p = { u, v, from: [s], assignment: segments[s].assignment };
        pieces.set(key, p);
        pieceOrder.push(p);
      } else if (!piece.from.includes(s)) piece.from.push(s);
    }
  }
  for (const c of drawnPairs.values()) counts.duplicates += c - 1;
  const sharing = new Set<string>();
  let overlapWarnings = 0;
  let conflictErrors = 0;
  for (const piece of pieceOrder) {
    if (piece.from.length < 2) continue;
    const first = piece.from[0];
    for (const o of piece.from.slice(1)) {
      const id = `${first},${o}`;
      if (sharing.has(id)) continue;
      sharing.add(id);
      if (pairKey(su(first), sv(first)) !== pairKey(su(o), sv(o))) counts.overlapsMerged++;
    }
    const kinds = new Set(piece.from.map((o) => segments[o].assignment));
    if (kinds.size === 1) continue;
    let chosen: Assignment | undefined;
    if (kinds.has('B')) chosen = 'B';
    else {
      const folds = [...kinds].filter((k) => k !== 'U');
      if (folds.length === 1) chosen = folds[0];
    }
    const other = piece.from.find((o) => segments[o].assignment !== segments[first].assignment)!;
    const id = `conflict ${first},${other}`;
    if (chosen) piece.assignment = chosen;
    if (sharing.has(id)) continue;
    sharing.add(id);
    const pairText = `${cap(textOf(first))} (${segments[first].assignment}) and ${textOf(other)} (${segments[other].assignment})`;
    if (chosen) {
      if (overlapWarnings++ < LISTED) {
        messages.push({
          severity: 'warning',
          code: 'overlap-assignment',
          text: `${pairText} lie on top of each other; the shared piece is read as ${chosen === 'B' ? 'the outline (B)' : chosen}.`,
          where: whereOf(other),
        });
      }
    } else if (conflictErrors++ < LISTED) {
      messages.push({
        severity: 'error',
        code: 'overlap-conflict',
        text: `${pairText} lie on top of each other with different assignments; keep one of them (or move one to the layer it belongs to).`,
        where: whereOf(other),
      });
    }
  }
  if (overlapWarnings > LISTED) messages.push({ severity: 'warning', code: 'overlap-assignment', text: `… and ${overlapWarnings - LISTED} more overlapping lines of different assignments.` });
  if (conflictErrors > LISTED) messages.push({ severity: 'error', code: 'overlap-conflict', text: `… and ${conflictErrors - LISTED} more overlapping lines with different assignments.` });
  if (conflictErrors) return empty(snap);

  const pieceList = pieceOrder;
  const removed = new Uint8Array(pieceList.length);
  const incident: number[][] = vx.map(() => []);
  pieceList.forEach((p, k) => {
    incident[p.u].push(k);
    incident[p.v].push(k);
  });

  // 6. join collinear pieces of one assignment at vertices of nothing else
  for (let v = 0; v < vx.length; v++) {
    const live = incident[v].filter((k) => !removed[k]);
    if (live.length !== 2) continue;
    const [k1, k2] = live;
    const p1 = pieceList[k1], p2 = pieceList[k2];
    if (p1.assignment !== p2.assignment) continue;
    const a = p1.u === v ? p1.v : p1.u;
    const b = p2.u === v ? p2.v : p2.u;
    if (a === b) continue;
    const { t, d } = project(vx[v], vy[v], vx[a], vy[a], vx[b], vy[b]);
    if (d > snap || t <= 0 || t >= 1) continue;
    if (incident[a].some((k) => !removed[k] && (pieceList[k].u === b || pieceList[k].v === b))) continue;
    // p1 becomes a → b; p2 is removed
    p1.u = a;
    p1.v = b;
    for (const o of p2.from) if (!p1.from.includes(o)) p1.from.push(o);
    removed[k2] = 1;
    incident[a] = incident[a].filter((k) => k !== k1 && k !== k2).concat(k1);
    incident[b] = incident[b].filter((k) => k !== k1 && k !== k2).concat(k1);
    incident[v] = [];
    counts.collinearJoined++;
  }

  // compact: creases before the outline, each in drawing order (first source, then along it), so crease 0 is
  // the first crease drawn; vertices by first use
  const kept = pieceList.map((p, k) => ({ p, k })).filter(({ k }) => !removed[k]);
  const rimLast = (p: Piece) => (p.assignment === 'B' ? 1 : 0);
  const along = (p: Piece) => {
    const s = p.from[0];
    const a = su(s), b = sv(s);
    const mid = [(vx[p.u] + vx[p.v]) / 2, (vy[p.u] + vy[p.v]) / 2];
    return project(mid[0], mid[1], vx[a], vy[a], vx[b], vy[b]).t;
  };
  kept.sort((x, y) => rimLast(x.p) - rimLast(y.p) || Math.min(...x.p.from) - Math.min(...y.p.from) || along(x.p) - along(y.p));
  const newIndex = new Int32Array(vx.length).fill(-1);
  const vertices: [number, number][] = [];
  const edges: [number, number][] = [];
  const assignments: Assignment[] = [];
  const sources: number[][] = [];
  const use = (v: number) => {
    if (newIndex[v] < 0) {
      newIndex[v] = vertices.length;
      vertices.push([vx[v], vy[v]]);
    }
    return newIndex[v];
  };
  for (const { p } of kept) {
    edges.push([use(p.u), use(p.v)]);
    assignments.push(p.assignment);
    sources.push(p.from.slice().sort((x, y) => x - y));
  }
  counts.edges = edges.length;
  counts.vertices = vertices.length;

  // the report, one line per step that did something
  const info = (code: string, n: number, text: string, where?: Where) => {
    if (n > 0) messages.push(where ? { severity: 'info', code, text, where } : { severity: 'info', code, text });
  };
  const snapText = snapOption === undefined ? `${fmt(snap)} (${DEFAULT_SNAP_FRACTION} of the drawing's diagonal; set it with --snap)` : fmt(snap);
  info('ends-snapped', counts.endsSnapped, `Moved ${counts.endsSnapped} line ends by at most ${fmt(spread > 0 ? Math.min(spread, snap) : snap)} to meet other ends or lines (snap ${snapText}).`);
  info('zero-length-dropped', counts.zeroLength, `Dropped ${counts.zeroLength} zero-length line${counts.zeroLength === 1 ? '' : 's'} (both ends within the snap of each other), the first ${firstZero >= 0 ? textOf(firstZero) : ''}.`, firstZero >= 0 ? whereOf(firstZero) : undefined);
  info('t-junctions-split', counts.tJunctions, `Split lines at ${counts.tJunctions} place${counts.tJunctions === 1 ? '' : 's'} where another line ends on them (T-junctions).`);
  info('duplicates-dropped', counts.duplicates, `Dropped ${counts.duplicates} line${counts.duplicates === 1 ? '' : 's'} drawn twice.`);
  info('overlaps-merged', counts.overlapsMerged, `Merged ${counts.overlapsMerged} collinear overlapping piece${counts.overlapsMerged === 1 ? '' : 's'} of different lines into one.`);
  info('ends-trimmed', counts.endsTrimmed, `Trimmed or extended ${counts.endsTrimmed} line end${counts.endsTrimmed === 1 ? '' : 's'} by at most ${fmt(trimmed)} onto the line ${counts.endsTrimmed === 1 ? 'it overshoots or stops short of' : 'they overshoot or stop short of'}.`);
  info('collinear-joined', counts.collinearJoined, `Joined ${counts.collinearJoined} pair${counts.collinearJoined === 1 ? '' : 's'} of collinear pieces of one crease or outline line into one edge.`);
  return { vertices, edges, assignments, sources, counts, snap, messages };
}

function cap(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
