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
//  6. dangling stubs no longer than twice the snap are removed: a line that overshoots another by less than
//     the snap is already trimmed in step 3, but one that overshoots a corner can leave a stub of up to
//     about √2 times the snap between the corner and its free end; longer dangling lines are left for the
//     pattern checks, which refuse them with their place in the file;
//  7. collinear pieces of one assignment meeting at a vertex of nothing else are joined into one edge.
import type { Assignment, Message, Where } from '../types';
import { DUPLICATE_TOLERANCE } from './pattern';
import { PointGrid, project, segmentGrid, type SegmentGrid, UnionFind } from './grids';

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
  /** dangling stubs (a free end) no longer than twice the snap removed */
  stubsRemoved: number;
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

/** What the steps share: the drawing, the snap, the vertices found so far and each line's ends and splits. */
interface Work {
  segments: DrawnSegment[];
  counts: CleanCounts;
  messages: Message[];
  textOf(s: number): string;
  whereOf(s: number): Where;
  snap: number;
  /** moves smaller than this are rounding, not drafting: not counted, and ends on a line are left as they are */
  noise: number;
  cell: number;
  x0: number;
  y0: number;
  size: number;
  vx: number[];
  vy: number[];
  /** the drawn ends (2·segment + 0 or 1) that make each vertex */
  members: number[][];
  /** vertex of each drawn end */
  vertexOf: Int32Array;
  /** segments that are not zero-length */
  alive: number[];
  /** segment → vertex → position along it, for the vertices it is split at */
  splits: Map<number, Map<number, number>>;
  /** the largest distance an end moved to its cluster, and to the line it met */
  spread: number;
  trimmed: number;
  firstZero: number;
}

interface Piece {
  u: number;
  v: number;
  /** the drawn segments this piece is part of, first-drawn first */
  from: number[];
  assignment: Assignment;
}

const su = (w: Work, s: number) => w.vertexOf[2 * s];
const sv = (w: Work, s: number) => w.vertexOf[2 * s + 1];

function addSplit(w: Work, s: number, v: number): void {
  let m = w.splits.get(s);
  if (!m) w.splits.set(s, (m = new Map()));
  if (!m.has(v)) m.set(v, project(w.vx[v], w.vy[v], w.vx[su(w, s)], w.vy[su(w, s)], w.vx[sv(w, s)], w.vy[sv(w, s)]).t);
}

/**
 * Clean drawn segments into a crease graph. `snap` is a length in the drawing's units (default
 * DEFAULT_SNAP_FRACTION of the bounding-box diagonal); it is never below the pattern's own duplicate
 * tolerance, so what comes out passes buildPattern's vertex checks. Never throws.
 */
export function cleanSegments(segments: DrawnSegment[], origins: Origin[], snapOption?: number): CleanResult {
  const messages: Message[] = [];
  const counts: CleanCounts = {
    segments: segments.length, endsSnapped: 0, zeroLength: 0, tJunctions: 0, crossings: 0, duplicates: 0, overlapsMerged: 0, endsTrimmed: 0, stubsRemoved: 0, collinearJoined: 0, edges: 0, vertices: 0,
  };
  const empty = (snap: number): CleanResult => ({ vertices: [], edges: [], assignments: [], sources: [], counts, snap, messages });
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
  const snap = Math.max(snapOption ?? DEFAULT_SNAP_FRACTION * size, DUPLICATE_TOLERANCE * size * 4);
  const originOf = (s: number) => origins[segments[s].origin];
  const w: Work = {
    segments, counts, messages, snap, size, x0, y0,
    textOf: (s) => originOf(s)?.text ?? `line ${s}`,
    whereOf: (s) => originOf(s)?.where ?? {},
    noise: 1e-12 * size,
    cell: Math.max(snap, size / 4096),
    vx: [], vy: [], members: [], vertexOf: new Int32Array(2 * segments.length), alive: [], splits: new Map(),
    spread: 0, trimmed: 0, firstZero: -1,
  };
  clusterEnds(w);
  dropZeroLength(w);
  if (w.alive.length === 0) {
    messages.push({ severity: 'error', code: 'drawing-empty', text: `Every line of the drawing is shorter than the snap (${fmt(snap)}): there is no sheet to read.` });
    return empty(snap);
  }
  const lines = segmentGrid(w.alive, (s) => [w.vx[su(w, s)], w.vy[su(w, s)], w.vx[sv(w, s)], w.vy[sv(w, s)]], snap, size, x0, y0);
  splitAtEnds(w, lines);
  splitAtCrossings(w, lines);
  const pieces = keepPiecesOnce(w);
  if (!pieces) return empty(snap);
  const kept = joinCollinear(w, removeStubs(w, pieces));
  const result = compact(w, kept);
  report(w, snapOption === undefined);
  return { ...result, counts, snap, messages };
}

/** 1. Ends within the snap of each other are one vertex, at their mean. */
function clusterEnds(w: Work): void {
  const n = w.segments.length;
  const px = new Float64Array(2 * n);
  const py = new Float64Array(2 * n);
  w.segments.forEach((s, i) => {
    px[2 * i] = s.a[0];
    py[2 * i] = s.a[1];
    px[2 * i + 1] = s.b[0];
    py[2 * i + 1] = s.b[1];
  });
  const uf = new UnionFind(2 * n);
  const grid = new PointGrid(w.cell, w.x0, w.y0);
  const scratch: number[] = [];
  for (let p = 0; p < 2 * n; p++) {
    for (const q of grid.near(px[p], py[p], scratch)) {
      if (Math.hypot(px[p] - px[q], py[p] - py[q]) <= w.snap) uf.union(p, q);
    }
    grid.add(p, px[p], py[p]);
  }
  const vertexOfRoot = new Map<number, number>();
  for (let p = 0; p < 2 * n; p++) {
    const r = uf.find(p);
    let v = vertexOfRoot.get(r);
    if (v === undefined) {
      v = w.vx.length;
      vertexOfRoot.set(r, v);
      w.vx.push(0);
      w.vy.push(0);
      w.members.push([]);
    }
    w.members[v].push(p);
    w.vertexOf[p] = v;
  }
  for (let v = 0; v < w.members.length; v++) {
    const m = w.members[v];
    let sx = 0, sy = 0;
    for (const p of m) {
      sx += px[p];
      sy += py[p];
    }
    w.vx[v] = sx / m.length;
    w.vy[v] = sy / m.length;
    for (const p of m) {
      const d = Math.hypot(px[p] - w.vx[v], py[p] - w.vy[v]);
      if (d > w.noise) w.counts.endsSnapped++;
      w.spread = Math.max(w.spread, d);
    }
  }
}

/** 2. Lines whose two ends became one vertex are dropped. */
function dropZeroLength(w: Work): void {
  for (let s = 0; s < w.segments.length; s++) {
    if (su(w, s) === sv(w, s)) {
      w.counts.zeroLength++;
      if (w.firstZero < 0) w.firstZero = s;
    } else w.alive.push(s);
  }
}

/**
 * 3. A vertex within the snap of another line's interior splits it (a T-junction). On exactly one line it
 * is moved onto it, so the line stays straight (on several it stays where it is); the end of a single line
 * moves along that line (trimmed or extended to meet the other), keeping its direction.
 */
function splitAtEnds(w: Work, lines: SegmentGrid): void {
  const { vx, vy, snap } = w;
  const onLines: number[][] = vx.map(() => []);
  for (let v = 0; v < vx.length; v++) {
    const seen = new Set<number>();
    for (const s of lines.at(vx[v], vy[v])) {
      if (seen.has(s)) continue;
      seen.add(s);
      const a = su(w, s), b = sv(w, s);
      if (a === v || b === v) continue;
      const { t, d } = project(vx[v], vy[v], vx[a], vy[a], vx[b], vy[b]);
      if (d > snap || t <= 0 || t >= 1) continue;
      const len = Math.hypot(vx[b] - vx[a], vy[b] - vy[a]);
      if (t * len <= snap || (1 - t) * len <= snap) continue; // that end is the vertex's own cluster's business
      onLines[v].push(s);
    }
  }
  for (let v = 0; v < vx.length; v++) {
    if (onLines[v].length !== 1) continue;
    const s = onLines[v][0];
    const a = su(w, s), b = sv(w, s);
    const { t } = project(vx[v], vy[v], vx[a], vy[a], vx[b], vy[b]);
    let nx = vx[a] + t * (vx[b] - vx[a]);
    let ny = vy[a] + t * (vy[b] - vy[a]);
    if (w.members[v].length === 1) {
      const o = w.vertexOf[w.members[v][0] ^ 1]; // the line's other end
      const ex = vx[v] - vx[o], ey = vy[v] - vy[o];
      const rx = vx[b] - vx[a], ry = vy[b] - vy[a];
      const den = ex * ry - ey * rx;
      if (Math.abs(den) > 1e-6 * Math.hypot(ex, ey) * Math.hypot(rx, ry)) {
        // v + k·e on the line a + t·r
        const k = ((vx[a] - vx[v]) * ry - (vy[a] - vy[v]) * rx) / den;
        const ix = vx[v] + k * ex, iy = vy[v] + k * ey;
        if (Math.hypot(ix - vx[v], iy - vy[v]) <= snap) [nx, ny] = [ix, iy];
      }
    }
    const moved = Math.hypot(nx - vx[v], ny - vy[v]);
    if (moved <= w.noise) continue;
    w.counts.endsTrimmed += w.members[v].length;
    w.trimmed = Math.max(w.trimmed, moved);
    vx[v] = nx;
    vy[v] = ny;
  }
  for (let v = 0; v < vx.length; v++) {
    for (const s of onLines[v]) {
      addSplit(w, s, v);
      w.counts.tJunctions++;
    }
  }
}

/** 4. Lines that cross away from every end get a vertex there; crossings within the snap are one vertex. */
function splitAtCrossings(w: Work, lines: SegmentGrid): void {
  const { vx, vy, snap } = w;
  const n = w.segments.length;
  const ends = new PointGrid(w.cell, w.x0, w.y0);
  for (let v = 0; v < vx.length; v++) ends.add(v, vx[v], vy[v]);
  const scratch: number[] = [];
  const crossX: number[] = [];
  const crossY: number[] = [];
  const crossPair: [number, number][] = [];
  const tested = new Set<number>();
  for (const list of lines.lists()) {
    for (let i = 0; i < list.length; i++) {
      for (let j = i + 1; j < list.length; j++) {
        const e = Math.min(list[i], list[j]);
        const f = Math.max(list[i], list[j]);
        if (e === f || tested.has(e * n + f)) continue;
        tested.add(e * n + f);
        const a = su(w, e), b = sv(w, e), c = su(w, f), d = sv(w, f);
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
        // an end lies there: step 3 split both lines at it
        if (ends.near(ix, iy, scratch).some((v) => Math.hypot(vx[v] - ix, vy[v] - iy) <= snap)) continue;
        crossX.push(ix);
        crossY.push(iy);
        crossPair.push([e, f]);
      }
    }
  }
  if (!crossX.length) return;
  const cu = new UnionFind(crossX.length);
  const cg = new PointGrid(w.cell, w.x0, w.y0);
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
  for (const g of groups.values()) {
    let sx = 0, sy = 0;
    const through = new Set<number>();
    for (const k of g) {
      sx += crossX[k];
      sy += crossY[k];
      through.add(crossPair[k][0]);
      through.add(crossPair[k][1]);
    }
    const v = vx.length;
    vx.push(sx / g.length);
    vy.push(sy / g.length);
    w.members.push([]);
    w.counts.crossings++;
    const sorted = [...through].sort((p, q) => p - q);
    for (const s of sorted) addSplit(w, s, v);
    if (w.counts.crossings <= LISTED) {
      const names = sorted.slice(0, 4).map(w.textOf);
      w.messages.push({
        severity: 'warning',
        code: 'crossing-becomes-vertex',
        text: `${sorted.length === 2 ? `${cap(names[0])} and ${names[1]} cross` : `${sorted.length} lines (${names.join(', ')}${sorted.length > 4 ? ', …' : ''}) cross`} at (${fmt(vx[v])}, ${fmt(vy[v])}) where none of them ends; the crossing becomes a vertex joining them. Check that the creases really meet there.`,
        where: w.whereOf(sorted[0]),
      });
    }
  }
  if (w.counts.crossings > LISTED) {
    w.messages.push({ severity: 'warning', code: 'crossing-becomes-vertex', text: `… and ${w.counts.crossings - LISTED} more crossings became vertices.` });
  }
}

/**
 * 5. Every line split at its vertices; each piece kept once (duplicates and collinear overlaps). Coincident
 * pieces of different assignments: the outline over a crease stays the outline, a crease over U keeps its
 * assignment (warnings); anything else (M over V, say) is refused, and undefined is returned.
 */
function keepPiecesOnce(w: Work): Piece[] | undefined {
  const { segments } = w;
  const pieces = new Map<number, Piece>();
  const order: Piece[] = [];
  const nv = w.vx.length;
  const pairKey = (u: number, v: number) => (u < v ? u * nv + v : v * nv + u);
  const drawnPairs = new Map<number, number>();
  for (const s of w.alive) {
    const a = su(w, s), b = sv(w, s);
    const k = pairKey(a, b);
    drawnPairs.set(k, (drawnPairs.get(k) ?? 0) + 1);
    const m = w.splits.get(s);
    const chain = [a, ...(m ? [...m.entries()].sort((p, q) => p[1] - q[1]).map(([v]) => v) : []), b];
    for (let i = 0; i + 1 < chain.length; i++) {
      const u = chain[i], v = chain[i + 1];
      if (u === v) continue;
      const piece = pieces.get(pairKey(u, v));
      if (!piece) {
        const p = { u, v, from: [s], assignment: segments[s].assignment };
        pieces.set(pairKey(u, v), p);
        order.push(p);
      } else if (!piece.from.includes(s)) piece.from.push(s);
    }
  }
  for (const c of drawnPairs.values()) w.counts.duplicates += c - 1;
  const seen = new Set<string>();
  let warnings = 0;
  let errors = 0;
  for (const piece of order) {
    if (piece.from.length < 2) continue;
    const first = piece.from[0];
    for (const o of piece.from.slice(1)) {
      if (seen.has(`${first},${o}`)) continue;
      seen.add(`${first},${o}`);
      if (pairKey(su(w, first), sv(w, first)) !== pairKey(su(w, o), sv(w, o))) w.counts.overlapsMerged++;
    }
    const kinds = new Set(piece.from.map((o) => segments[o].assignment));
    if (kinds.size === 1) continue;
    const folds = [...kinds].filter((k) => k !== 'U');
    const chosen: Assignment | undefined = kinds.has('B') ? 'B' : folds.length === 1 ? folds[0] : undefined;
    if (chosen) piece.assignment = chosen;
    const other = piece.from.find((o) => segments[o].assignment !== segments[first].assignment)!;
    if (seen.has(`conflict ${first},${other}`)) continue;
    seen.add(`conflict ${first},${other}`);
    const pair = `${cap(w.textOf(first))} (${segments[first].assignment}) and ${w.textOf(other)} (${segments[other].assignment})`;
    if (chosen) {
      if (warnings++ < LISTED) {
        w.messages.push({ severity: 'warning', code: 'overlap-assignment', text: `${pair} lie on top of each other; the shared piece is read as ${chosen === 'B' ? 'the outline (B)' : chosen}.`, where: w.whereOf(other) });
      }
    } else if (errors++ < LISTED) {
      w.messages.push({ severity: 'error', code: 'overlap-conflict', text: `${pair} lie on top of each other with different assignments; keep one of them (or move one to the layer it belongs to).`, where: w.whereOf(other) });
    }
  }
  if (warnings > LISTED) w.messages.push({ severity: 'warning', code: 'overlap-assignment', text: `… and ${warnings - LISTED} more overlapping lines of different assignments.` });
  if (errors > LISTED) w.messages.push({ severity: 'error', code: 'overlap-conflict', text: `… and ${errors - LISTED} more overlapping lines with different assignments.` });
  return errors ? undefined : order;
}

/** The pieces at each vertex (indices into `pieces`). */
function incidence(vertices: number, pieces: Piece[]): number[][] {
  const incident: number[][] = Array.from({ length: vertices }, () => []);
  pieces.forEach((p, k) => {
    incident[p.u].push(k);
    incident[p.v].push(k);
  });
  return incident;
}

/** 6. Pieces with a free end, no longer than twice the snap, are removed (again at the end they leave free). */
function removeStubs(w: Work, pieces: Piece[]): Piece[] {
  const { vx, vy } = w;
  const removed = new Uint8Array(pieces.length);
  const incident = incidence(vx.length, pieces);
  const live = (v: number) => incident[v].filter((k) => !removed[k]);
  const queue: number[] = [];
  for (let v = 0; v < vx.length; v++) if (incident[v].length === 1) queue.push(v);
  while (queue.length) {
    const v = queue.pop()!;
    const here = live(v);
    if (here.length !== 1) continue;
    const p = pieces[here[0]];
    if (Math.hypot(vx[p.u] - vx[p.v], vy[p.u] - vy[p.v]) > 2 * w.snap) continue;
    removed[here[0]] = 1;
    w.counts.stubsRemoved++;
    if (w.counts.stubsRemoved <= LISTED) {
      w.messages.push({ severity: 'info', code: 'stub-removed', text: `Removed a dangling stub of ${fmt(Math.hypot(vx[p.u] - vx[p.v], vy[p.u] - vy[p.v]))} at the end of ${w.textOf(p.from[0])}, no longer than twice the snap.`, where: w.whereOf(p.from[0]) });
    }
    const other = p.u === v ? p.v : p.u;
    if (live(other).length === 1) queue.push(other);
  }
  return pieces.filter((_, k) => !removed[k]);
}

/** 7. Collinear pieces of one assignment meeting at a vertex of nothing else become one piece. */
function joinCollinear(w: Work, pieces: Piece[]): Piece[] {
  const { vx, vy } = w;
  const removed = new Uint8Array(pieces.length);
  const incident = incidence(vx.length, pieces);
  for (let v = 0; v < vx.length; v++) {
    const live = incident[v].filter((k) => !removed[k]);
    if (live.length !== 2) continue;
    const [k1, k2] = live;
    const p1 = pieces[k1], p2 = pieces[k2];
    if (p1.assignment !== p2.assignment) continue;
    const a = p1.u === v ? p1.v : p1.u;
    const b = p2.u === v ? p2.v : p2.u;
    if (a === b) continue;
    const { t, d } = project(vx[v], vy[v], vx[a], vy[a], vx[b], vy[b]);
    if (d > w.snap || t <= 0 || t >= 1) continue;
    if (incident[a].some((k) => !removed[k] && (pieces[k].u === b || pieces[k].v === b))) continue;
    // p1 becomes a → b; p2 is removed
    p1.u = a;
    p1.v = b;
    for (const o of p2.from) if (!p1.from.includes(o)) p1.from.push(o);
    removed[k2] = 1;
    incident[a] = incident[a].filter((k) => k !== k1 && k !== k2).concat(k1);
    incident[b] = incident[b].filter((k) => k !== k1 && k !== k2).concat(k1);
    incident[v] = [];
    w.counts.collinearJoined++;
  }
  return pieces.filter((_, k) => !removed[k]);
}

/**
 * The graph: creases before the outline, each in drawing order (first source, then along it), so crease 0
 * is the first crease drawn; vertices by first use.
 */
function compact(w: Work, kept: Piece[]): Pick<CleanResult, 'vertices' | 'edges' | 'assignments' | 'sources'> {
  const { vx, vy } = w;
  const rimLast = (p: Piece) => (p.assignment === 'B' ? 1 : 0);
  const along = (p: Piece) => {
    const s = p.from[0];
    const a = su(w, s), b = sv(w, s);
    return project((vx[p.u] + vx[p.v]) / 2, (vy[p.u] + vy[p.v]) / 2, vx[a], vy[a], vx[b], vy[b]).t;
  };
  const sorted = kept.slice().sort((x, y) => rimLast(x) - rimLast(y) || Math.min(...x.from) - Math.min(...y.from) || along(x) - along(y));
  const newIndex = new Int32Array(vx.length).fill(-1);
  const vertices: [number, number][] = [];
  const use = (v: number) => {
    if (newIndex[v] < 0) {
      newIndex[v] = vertices.length;
      vertices.push([vx[v], vy[v]]);
    }
    return newIndex[v];
  };
  const edges = sorted.map((p): [number, number] => [use(p.u), use(p.v)]);
  w.counts.edges = edges.length;
  w.counts.vertices = vertices.length;
  return { vertices, edges, assignments: sorted.map((p) => p.assignment), sources: sorted.map((p) => p.from.slice().sort((x, y) => x - y)) };
}

/** The report: one line per step that did something. */
function report(w: Work, defaultSnap: boolean): void {
  const { counts: c, snap } = w;
  const info = (code: string, n: number, text: string, where?: Where) => {
    if (n > 0) w.messages.push(where ? { severity: 'info', code, text, where } : { severity: 'info', code, text });
  };
  const s = (n: number, one: string, many = `${one}s`) => (n === 1 ? one : many);
  const snapText = defaultSnap ? `${fmt(snap)} (${DEFAULT_SNAP_FRACTION} of the drawing's diagonal; set it with --snap)` : fmt(snap);
  info('ends-snapped', c.endsSnapped, `Moved ${c.endsSnapped} line ends by at most ${fmt(w.spread > 0 ? Math.min(w.spread, snap) : snap)} to meet other ends (snap ${snapText}).`);
  info('zero-length-dropped', c.zeroLength, `Dropped ${c.zeroLength} zero-length ${s(c.zeroLength, 'line')} (both ends within the snap of each other), the first ${w.firstZero >= 0 ? w.textOf(w.firstZero) : ''}.`, w.firstZero >= 0 ? w.whereOf(w.firstZero) : undefined);
  info('ends-trimmed', c.endsTrimmed, `Trimmed or extended ${c.endsTrimmed} line ${s(c.endsTrimmed, 'end')} by at most ${fmt(w.trimmed)} onto the line ${s(c.endsTrimmed, 'it overshoots or stops short of', 'they overshoot or stop short of')}.`);
  info('t-junctions-split', c.tJunctions, `Split lines at ${c.tJunctions} ${s(c.tJunctions, 'place')} where another line ends on them (T-junctions).`);
  info('duplicates-dropped', c.duplicates, `Dropped ${c.duplicates} ${s(c.duplicates, 'line')} drawn twice.`);
  info('overlaps-merged', c.overlapsMerged, `Merged ${c.overlapsMerged} collinear overlapping ${s(c.overlapsMerged, 'piece')} of different lines into one.`);
  if (c.stubsRemoved > LISTED) info('stub-removed', c.stubsRemoved - LISTED, `… and ${c.stubsRemoved - LISTED} more dangling stubs removed.`);
  info('collinear-joined', c.collinearJoined, `Joined ${c.collinearJoined} ${s(c.collinearJoined, 'pair')} of collinear pieces of one crease or outline line into one edge.`);
}

function cap(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
