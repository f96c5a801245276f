// buildPattern: check a crease pattern as read from a file, then derive panels, crease sides and interior
// vertices. Every problem is a Message with a stable code and the vertex/crease it concerns; nothing throws.
import type {
  Assignment,
  Crease,
  HingeLimit,
  InteriorVertex,
  Message,
  Panel,
  Pattern,
  PatternSource,
  Severity,
  Where,
} from '../types';
import { MAX_CREASES, MAX_VERTICES } from '../formats/limits';

/** Two vertices closer than this × sheet size are one vertex entered twice. */
export const DUPLICATE_TOLERANCE = 1e-9;
/** At most this many messages of one code; the rest are counted in one summary line. */
export const MESSAGES_PER_CODE = 20;

const ASSIGNMENTS: ReadonlySet<string> = new Set(['M', 'V', 'U', 'F', 'B']);
const TWO_PI = 2 * Math.PI;

export interface BuildResult {
  pattern?: Pattern;
  messages: Message[];
}

/** Collects messages, keeping the first few of each code so a broken 100,000-crease file stays readable. */
class Messages {
  readonly list: Message[] = [];
  private counts = new Map<string, number>();
  errors = 0;

  add(severity: Severity, code: string, text: string, where?: Where): void {
    if (severity === 'error') this.errors++;
    const n = (this.counts.get(code) ?? 0) + 1;
    this.counts.set(code, n);
    if (n <= MESSAGES_PER_CODE) this.list.push(where ? { severity, code, text, where } : { severity, code, text });
  }

  finish(): Message[] {
    for (const [code, n] of this.counts) {
      if (n > MESSAGES_PER_CODE) {
        const first = this.list.find((m) => m.code === code)!;
        this.list.push({
          severity: first.severity,
          code,
          text: `… and ${n - MESSAGES_PER_CODE} more problems of the same kind (${code}).`,
        });
      }
    }
    return this.list;
  }
}

export function buildPattern(src: PatternSource): BuildResult {
  const out = new Messages();
  try {
    const pattern = build(src, out);
    return pattern ? { pattern, messages: out.finish() } : { messages: out.finish() };
  } catch (e) {
    // A safety net only: every input problem is meant to be caught above as a message.
    out.add('error', 'internal-error', `The pattern could not be checked because of a fault in this program (${String(e)}).`);
    return { messages: out.finish() };
  }
}

/** Crease index for a reference: its label first, else a decimal crease index. */
export function findCrease(pattern: Pattern, ref: string): number | undefined {
  if (typeof ref !== 'string') return undefined;
  const byLabel = pattern.labelIndex.get(ref);
  if (byLabel !== undefined) return byLabel;
  const t = ref.trim();
  if (/^\d+$/.test(t)) {
    const k = Number(t);
    if (k < pattern.creases.length) return k;
  }
  return undefined;
}

const fmt = (x: number) => (Number.isFinite(x) ? String(+x.toPrecision(6)) : String(x));

function isFiniteNumber(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

// ---------------------------------------------------------------------------------------------------
// Stage 1: shape of the input, values of single entries

interface Checked {
  name: string;
  xy: Float64Array; // 2 per vertex
  nv: number;
  ev: Int32Array; // 2 per edge
  ne: number;
  assignment: Assignment[];
  label: string[];
  fileLabel: (string | undefined)[];
  limits: (HingeLimit | undefined)[];
}

function checkEntries(src: PatternSource, out: Messages): Checked | undefined {
  if (typeof src !== 'object' || src === null) {
    out.add('error', 'not-a-pattern', 'There is no crease pattern to read.');
    return undefined;
  }
  const vertices: unknown = src.vertices;
  const edges: unknown = src.edges;
  if (!Array.isArray(vertices)) {
    out.add('error', 'missing-vertices', 'The pattern has no vertex list.', { field: 'vertices' });
  }
  if (!Array.isArray(edges)) {
    out.add('error', 'missing-creases', 'The pattern has no crease list.', { field: 'creases' });
  }
  if (!Array.isArray(vertices) || !Array.isArray(edges)) return undefined;
  if (vertices.length > MAX_VERTICES) {
    out.add('error', 'too-many-vertices', `The pattern has ${vertices.length} vertices; at most ${MAX_VERTICES} are accepted.`);
  }
  if (edges.length > MAX_CREASES) {
    out.add('error', 'too-many-creases', `The pattern has ${edges.length} creases; at most ${MAX_CREASES} are accepted.`);
  }
  if (out.errors) return undefined;
  if (vertices.length === 0 || edges.length === 0) {
    out.add('error', 'empty-pattern', `The pattern has ${vertices.length} vertices and ${edges.length} creases; a sheet needs at least three of each.`);
    return undefined;
  }

  const nv = vertices.length;
  const xy = new Float64Array(2 * nv);
  for (let v = 0; v < nv; v++) {
    const p: unknown = vertices[v];
    if (!Array.isArray(p) || p.length < 2 || typeof p[0] !== 'number' || typeof p[1] !== 'number') {
      out.add('error', 'vertex-malformed', `Vertex ${v} is not a pair of numbers [x, y].`, { vertex: v });
      continue;
    }
    if (!Number.isFinite(p[0]) || !Number.isFinite(p[1])) {
      out.add('error', 'vertex-not-finite', `Vertex ${v} has a coordinate that is not a finite number (${fmt(p[0])}, ${fmt(p[1])}).`, { vertex: v });
      continue;
    }
    xy[2 * v] = p[0];
    xy[2 * v + 1] = p[1];
  }

  const ne = edges.length;
  const rawLabels: unknown[] = Array.isArray(src.labels) ? src.labels : [];
  const fileLabel: (string | undefined)[] = new Array(ne);
  const label: string[] = new Array(ne);
  for (let e = 0; e < ne; e++) {
    const l = rawLabels[e];
    if (l === undefined || l === null) {
      label[e] = String(e);
    } else if (typeof l !== 'string' || l.trim() === '') {
      out.add('error', 'bad-label', `Crease ${e} has a label that is not a non-empty string.`, { crease: e });
      label[e] = String(e);
    } else {
      fileLabel[e] = l;
      label[e] = l;
    }
  }
  const name = (e: number) => creaseName(e, fileLabel[e]);

  const ev = new Int32Array(2 * ne);
  for (let e = 0; e < ne; e++) {
    const pair: unknown = edges[e];
    if (!Array.isArray(pair) || pair.length !== 2) {
      out.add('error', 'crease-malformed', `${cap(name(e))} is not a pair of vertex indices.`, where(e, fileLabel[e]));
      continue;
    }
    for (let k = 0; k < 2; k++) {
      const v: unknown = pair[k];
      if (typeof v !== 'number' || !Number.isInteger(v) || v < 0 || v >= nv) {
        out.add(
          'error',
          'crease-missing-vertex',
          `${cap(name(e))} refers to vertex ${typeof v === 'number' ? fmt(v) : JSON.stringify(v) ?? String(v)}, which does not exist (there are ${nv} vertices, numbered from 0).`,
          where(e, fileLabel[e]),
        );
        ev[2 * e + k] = -1;
      } else ev[2 * e + k] = v;
    }
  }

  const rawAssign: unknown[] = Array.isArray(src.assignments) ? src.assignments : [];
  const assignment: Assignment[] = new Array(ne);
  for (let e = 0; e < ne; e++) {
    const a = rawAssign[e];
    if (typeof a !== 'string' || !ASSIGNMENTS.has(a)) {
      out.add(
        'error',
        'bad-assignment',
        `${cap(name(e))} has assignment ${a === undefined ? '(none)' : JSON.stringify(a)}; expected one of M (mountain), V (valley), U (unassigned), F (flat) or B (boundary).`,
        where(e, fileLabel[e]),
      );
      assignment[e] = 'U';
    } else assignment[e] = a as Assignment;
  }

  const rawLimits: unknown[] = Array.isArray(src.limits) ? src.limits : [];
  const limits: (HingeLimit | undefined)[] = new Array(ne);
  for (let e = 0; e < ne; e++) {
    const lim = rawLimits[e];
    if (lim === undefined || lim === null) continue;
    if (typeof lim !== 'object') {
      out.add('error', 'bad-limit', `${cap(name(e))} has hinge limits that are not {min, max}.`, where(e, fileLabel[e]));
      continue;
    }
    const { min, max } = lim as HingeLimit;
    let ok = true;
    for (const [side, val] of [
      ['min', min],
      ['max', max],
    ] as const) {
      if (val === undefined || val === null) continue;
      if (!isFiniteNumber(val)) {
        out.add('error', 'limit-not-finite', `${cap(name(e))}: the ${side} hinge limit is not a finite number.`, where(e, fileLabel[e]));
        ok = false;
      } else if (Math.abs(val) > Math.PI * (1 + 1e-12)) {
        out.add(
          'error',
          'limit-out-of-range',
          `${cap(name(e))}: the ${side} hinge limit ${fmt((val * 180) / Math.PI)}° is outside −180° … 180°.`,
          where(e, fileLabel[e]),
        );
        ok = false;
      }
    }
    if (ok && isFiniteNumber(min) && isFiniteNumber(max) && min > max) {
      out.add(
        'error',
        'limit-order',
        `${cap(name(e))}: the hinge limit min ${fmt((min * 180) / Math.PI)}° is greater than max ${fmt((max * 180) / Math.PI)}°.`,
        where(e, fileLabel[e]),
      );
      ok = false;
    }
    if (ok) {
      const l: HingeLimit = {};
      if (isFiniteNumber(min)) l.min = min;
      if (isFiniteNumber(max)) l.max = max;
      limits[e] = l;
      if (assignment[e] === 'B' || assignment[e] === 'F') {
        out.add('warning', 'limit-ignored', `${cap(name(e))} is ${assignment[e] === 'B' ? 'a boundary edge' : 'a flat crease'}, so its hinge limits have no effect.`, where(e, fileLabel[e]));
      }
    }
  }

  // a label must name one crease; an unlabelled crease is named by its index, so "7" can collide too
  const seen = new Map<string, number>();
  for (let e = 0; e < ne; e++) {
    const prev = seen.get(label[e]);
    if (prev !== undefined) {
      out.add(
        'error',
        'duplicate-label',
        `${cap(name(e))} has the label "${label[e]}", which already names ${name(prev)}${fileLabel[prev] === undefined ? ' (by its index)' : ''}; labels must be unique.`,
        where(e, fileLabel[e]),
      );
    } else seen.set(label[e], e);
  }

  if (out.errors) return undefined;
  const nameStr = typeof src.name === 'string' && src.name.trim() !== '' ? src.name : 'untitled';
  return { name: nameStr, xy, nv, ev, ne, assignment, label, fileLabel, limits };
}

function creaseName(e: number, label: string | undefined): string {
  return label === undefined ? `crease ${e}` : `crease ${e} "${label}"`;
}
function cap(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
function where(e: number, label: string | undefined): Where {
  return label === undefined ? { crease: e } : { crease: e, creaseLabel: label };
}

// ---------------------------------------------------------------------------------------------------
// Stage 2: geometry of vertices and creases

/** [xmin, ymin, xmax, ymax] of the first nv vertices. */
function boundingBox(xy: Float64Array, nv: number): [number, number, number, number] {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let v = 0; v < nv; v++) {
    x0 = Math.min(x0, xy[2 * v]);
    x1 = Math.max(x1, xy[2 * v]);
    y0 = Math.min(y0, xy[2 * v + 1]);
    y1 = Math.max(y1, xy[2 * v + 1]);
  }
  return [x0, y0, x1, y1];
}

function checkGeometry(c: Checked, out: Messages): { size: number; tol: number } | undefined {
  const { xy, nv, ev, ne } = c;
  const [x0, y0, x1, y1] = boundingBox(xy, nv);
  const size = Math.hypot(x1 - x0, y1 - y0);
  if (!(size > 0) || !Number.isFinite(size)) {
    out.add('error', 'degenerate-sheet', `All vertices are at one point (or the sheet is too large to measure): the sheet has no area.`);
    return undefined;
  }
  const tol = DUPLICATE_TOLERANCE * size;

  // duplicate vertices: a hash grid with about one vertex per cell (cells never smaller than the
  // tolerance), so only the 3 × 3 neighbourhood of a vertex is compared with it
  const cellSize = Math.max(tol, size / Math.sqrt(nv));
  const gridW = Math.floor((x1 - x0) / cellSize) + 3;
  const grid = new Map<number, number[]>();
  for (let v = 0; v < nv; v++) {
    const gx = Math.floor((xy[2 * v] - x0) / cellSize) + 1;
    const gy = Math.floor((xy[2 * v + 1] - y0) / cellSize) + 1;
    let dup = -1;
    for (let dx = -1; dx <= 1 && dup < 0; dx++) {
      for (let dy = -1; dy <= 1 && dup < 0; dy++) {
        const cell = grid.get((gy + dy) * gridW + gx + dx);
        if (!cell) continue;
        for (const w of cell) {
          if (Math.hypot(xy[2 * v] - xy[2 * w], xy[2 * v + 1] - xy[2 * w + 1]) <= tol) {
            dup = w;
            break;
          }
        }
      }
    }
    if (dup >= 0) {
      out.add(
        'error',
        'duplicate-vertex',
        `Vertex ${v} at (${fmt(xy[2 * v])}, ${fmt(xy[2 * v + 1])}) is at the same place as vertex ${dup}; merge them and join their creases to one vertex.`,
        { vertex: v },
      );
    }
    const key = gy * gridW + gx;
    const cell = grid.get(key);
    if (cell) cell.push(v);
    else grid.set(key, [v]);
  }

  const pairs = new Map<number, number>();
  for (let e = 0; e < ne; e++) {
    const a = ev[2 * e];
    const b = ev[2 * e + 1];
    const len = Math.hypot(xy[2 * a] - xy[2 * b], xy[2 * a + 1] - xy[2 * b + 1]);
    if (a === b || len <= tol) {
      out.add(
        'error',
        'zero-length-crease',
        `${cap(creaseName(e, c.fileLabel[e]))} has zero length (from vertex ${a} to vertex ${b}).`,
        where(e, c.fileLabel[e]),
      );
      continue;
    }
    const key = a < b ? a * nv + b : b * nv + a;
    const prev = pairs.get(key);
    if (prev !== undefined) {
      out.add(
        'error',
        'duplicate-crease',
        `${cap(creaseName(e, c.fileLabel[e]))} joins vertices ${a} and ${b}, as ${creaseName(prev, c.fileLabel[prev])} already does.`,
        where(e, c.fileLabel[e]),
      );
    } else pairs.set(key, e);
  }
  if (out.errors) return undefined;
  checkCrossings(c, x0, y0, x1, y1, tol, out);
  if (out.errors) return undefined;
  return { size, tol };
}

/**
 * Creases that cross, overlap or touch without a shared vertex. A uniform grid over the sheet; each pair
 * of creases is tested once, in the lowest cell both cover, so the cost stays near linear for real sheets.
 */
function checkCrossings(c: Checked, x0: number, y0: number, x1: number, y1: number, tol: number, out: Messages): void {
  const { xy, ev, ne } = c;
  let total = 0;
  for (let e = 0; e < ne; e++) {
    const a = ev[2 * e];
    const b = ev[2 * e + 1];
    total += Math.hypot(xy[2 * a] - xy[2 * b], xy[2 * a + 1] - xy[2 * b + 1]);
  }
  const w = Math.max(x1 - x0, tol);
  const h = Math.max(y1 - y0, tol);
  let cell = Math.max(total / ne, Math.max(w, h) / 4096);
  const cx0 = new Int32Array(ne);
  const cy0 = new Int32Array(ne);
  const cx1 = new Int32Array(ne);
  const cy1 = new Int32Array(ne);
  // coarsen until the grid holds at most ~16 entries per crease (long diagonal creases cover many cells)
  for (;;) {
    let entries = 0;
    for (let e = 0; e < ne; e++) {
      const a = ev[2 * e];
      const b = ev[2 * e + 1];
      cx0[e] = Math.floor((Math.min(xy[2 * a], xy[2 * b]) - tol - x0) / cell);
      cx1[e] = Math.floor((Math.max(xy[2 * a], xy[2 * b]) + tol - x0) / cell);
      cy0[e] = Math.floor((Math.min(xy[2 * a + 1], xy[2 * b + 1]) - tol - y0) / cell);
      cy1[e] = Math.floor((Math.max(xy[2 * a + 1], xy[2 * b + 1]) + tol - y0) / cell);
      entries += (cx1[e] - cx0[e] + 1) * (cy1[e] - cy0[e] + 1);
    }
    if (entries <= 16 * ne + 64) break;
    cell *= 2;
  }
  // cell entries as sorted numbers key·ne + crease: a flat sort instead of a map of lists
  const nx = Math.floor((w + 2 * tol) / cell) + 3;
  let count = 0;
  for (let e = 0; e < ne; e++) count += (cx1[e] - cx0[e] + 1) * (cy1[e] - cy0[e] + 1);
  const entries = new Float64Array(count);
  let k = 0;
  for (let e = 0; e < ne; e++) {
    for (let gx = cx0[e]; gx <= cx1[e]; gx++) {
      for (let gy = cy0[e]; gy <= cy1[e]; gy++) entries[k++] = ((gy + 1) * nx + (gx + 1)) * ne + e;
    }
  }
  entries.sort();
  const keyOf = (x: number) => {
    const q = Math.floor(x / ne);
    return q * ne > x ? q - 1 : q; // guard against the quotient rounding up
  };
  for (let start = 0; start < count; ) {
    const key = keyOf(entries[start]);
    let end = start + 1;
    while (end < count && keyOf(entries[end]) === key) end++;
    if (end - start > 1) {
      const gx = (key % nx) - 1;
      const gy = Math.floor(key / nx) - 1;
      for (let i = start; i < end; i++) {
        const e = entries[i] - key * ne;
        for (let j = i + 1; j < end; j++) {
          const f = entries[j] - key * ne;
          // test each pair in one cell only: the lowest cell that both cover (e < f: entries are sorted)
          if (gx !== Math.max(cx0[e], cx0[f]) || gy !== Math.max(cy0[e], cy0[f])) continue;
          testPair(c, e, f, tol, out);
        }
      }
    }
    start = end;
  }
}

/** Signed distance of vertex v from the line through s → t (positive on the left). */
function lineDistance(xy: Float64Array, v: number, s: number, t: number): number {
  const dx = xy[2 * t] - xy[2 * s];
  const dy = xy[2 * t + 1] - xy[2 * s + 1];
  return (dx * (xy[2 * v + 1] - xy[2 * s + 1]) - dy * (xy[2 * v] - xy[2 * s])) / Math.hypot(dx, dy);
}

/** Position of vertex v along s → t: 0 at s, 1 at t. */
function alongLine(xy: Float64Array, v: number, s: number, t: number): number {
  const dx = xy[2 * t] - xy[2 * s];
  const dy = xy[2 * t + 1] - xy[2 * s + 1];
  return ((xy[2 * v] - xy[2 * s]) * dx + (xy[2 * v + 1] - xy[2 * s + 1]) * dy) / (dx * dx + dy * dy);
}

function testPair(c: Checked, e: number, f: number, tol: number, out: Messages): void {
  const { xy, ev } = c;
  const a = ev[2 * e];
  const b = ev[2 * e + 1];
  const p = ev[2 * f];
  const q = ev[2 * f + 1];
  // quick rejection on bounding boxes (the grid cells are coarser than the creases)
  if (
    Math.min(xy[2 * a], xy[2 * b]) > Math.max(xy[2 * p], xy[2 * q]) + tol ||
    Math.min(xy[2 * p], xy[2 * q]) > Math.max(xy[2 * a], xy[2 * b]) + tol ||
    Math.min(xy[2 * a + 1], xy[2 * b + 1]) > Math.max(xy[2 * p + 1], xy[2 * q + 1]) + tol ||
    Math.min(xy[2 * p + 1], xy[2 * q + 1]) > Math.max(xy[2 * a + 1], xy[2 * b + 1]) + tol
  ) {
    return;
  }

  const shared = a === p || a === q ? a : b === p || b === q ? b : -1;
  if (shared >= 0) {
    const oe = shared === a ? b : a;
    const of = shared === p ? q : p;
    if (Math.abs(lineDistance(xy, of, shared, oe)) <= tol && alongLine(xy, of, shared, oe) > 0) {
      out.add(
        'error',
        'creases-overlap',
        `${cap(creaseName(e, c.fileLabel[e]))} and ${creaseName(f, c.fileLabel[f])} leave vertex ${shared} in the same direction and overlap; split the longer one at vertex ${alongLine(xy, of, shared, oe) < 1 ? of : oe}.`,
        { ...where(e, c.fileLabel[e]), vertex: shared },
      );
    }
    return;
  }
  const dp = lineDistance(xy, p, a, b);
  const dq = lineDistance(xy, q, a, b);
  const da = lineDistance(xy, a, p, q);
  const db = lineDistance(xy, b, p, q);
  if (Math.abs(dp) <= tol && Math.abs(dq) <= tol) {
    // collinear: overlap when the intervals along the line share more than a point
    const tp = alongLine(xy, p, a, b);
    const tq = alongLine(xy, q, a, b);
    const lo = Math.max(0, Math.min(tp, tq));
    const hi = Math.min(1, Math.max(tp, tq));
    const len = Math.hypot(xy[2 * b] - xy[2 * a], xy[2 * b + 1] - xy[2 * a + 1]);
    if ((hi - lo) * len > tol) {
      out.add('error', 'creases-overlap', `${cap(creaseName(e, c.fileLabel[e]))} and ${creaseName(f, c.fileLabel[f])} lie on top of each other; keep one and split it at the other's vertices.`, where(e, c.fileLabel[e]));
      return;
    }
  }
  // an end of one crease lying on the other crease: a T-junction that was never split
  let onto = -1;
  let on = -1;
  if (Math.abs(dp) <= tol && strictlyBetween(alongLine(xy, p, a, b))) [onto, on] = [p, e];
  else if (Math.abs(dq) <= tol && strictlyBetween(alongLine(xy, q, a, b))) [onto, on] = [q, e];
  else if (Math.abs(da) <= tol && strictlyBetween(alongLine(xy, a, p, q))) [onto, on] = [a, f];
  else if (Math.abs(db) <= tol && strictlyBetween(alongLine(xy, b, p, q))) [onto, on] = [b, f];
  if (onto >= 0) {
    const onName = on === e ? creaseName(e, c.fileLabel[e]) : creaseName(f, c.fileLabel[f]);
    out.add('error', 'creases-cross', `Vertex ${onto} lies on ${onName} but is not one of its ends; split ${onName} at vertex ${onto}.`, {
      ...where(on, c.fileLabel[on]),
      vertex: onto,
    });
    return;
  }
  if (((dp > tol && dq < -tol) || (dp < -tol && dq > tol)) && ((da > tol && db < -tol) || (da < -tol && db > tol))) {
    const t = dp / (dp - dq);
    const ix = xy[2 * p] + t * (xy[2 * q] - xy[2 * p]);
    const iy = xy[2 * p + 1] + t * (xy[2 * q + 1] - xy[2 * p + 1]);
    out.add(
      'error',
      'creases-cross',
      `${cap(creaseName(e, c.fileLabel[e]))} and ${creaseName(f, c.fileLabel[f])} cross at (${fmt(ix)}, ${fmt(iy)}) without a shared vertex; add a vertex there and split both.`,
      where(e, c.fileLabel[e]),
    );
  }
}

const strictlyBetween = (t: number) => t > 0 && t < 1;

// ---------------------------------------------------------------------------------------------------
// Stage 3: topology: connectivity, faces, rim, holes, cuts

interface Faces {
  /** face of each half-edge (2e: a → b, 2e + 1: b → a), the face lying on its left */
  faceOf: Int32Array;
  /** half-edges of each face in order */
  cycles: number[][];
  area: number[];
  outer: number;
  /** outgoing half-edges of each vertex, ccw by angle from +x */
  around: number[][];
  angle: Float64Array;
}

function traceFaces(c: Checked): Faces {
  const { xy, nv, ev, ne } = c;
  const nh = 2 * ne;
  const org = new Int32Array(nh);
  for (let e = 0; e < ne; e++) {
    org[2 * e] = ev[2 * e];
    org[2 * e + 1] = ev[2 * e + 1];
  }
  const dst = (h: number) => org[h ^ 1];
  const angle = new Float64Array(nh);
  const around: number[][] = Array.from({ length: nv }, () => []);
  for (let h = 0; h < nh; h++) {
    const a = org[h];
    const b = dst(h);
    // in [0, 2π): a vertex's creases are then listed ccw starting from the +x direction
    const t = Math.atan2(xy[2 * b + 1] - xy[2 * a + 1], xy[2 * b] - xy[2 * a]);
    angle[h] = t < 0 ? t + TWO_PI : t;
    around[a].push(h);
  }
  const pos = new Int32Array(nh);
  for (let v = 0; v < nv; v++) {
    const list = around[v];
    list.sort((g, h) => angle[g] - angle[h]);
    for (let k = 0; k < list.length; k++) pos[list[k]] = k;
  }
  // the next half-edge of the face on the left: at the far end, the edge just clockwise of the way back
  const next = (h: number) => {
    const t = h ^ 1;
    const list = around[org[t]];
    return list[(pos[t] - 1 + list.length) % list.length];
  };
  const faceOf = new Int32Array(nh).fill(-1);
  const cycles: number[][] = [];
  const area: number[] = [];
  for (let h0 = 0; h0 < nh; h0++) {
    if (faceOf[h0] >= 0) continue;
    const f = cycles.length;
    const cyc: number[] = [];
    let h = h0;
    let twice = 0;
    do {
      faceOf[h] = f;
      cyc.push(h);
      const a = org[h];
      const b = dst(h);
      twice += xy[2 * a] * xy[2 * b + 1] - xy[2 * b] * xy[2 * a + 1];
      h = next(h);
    } while (h !== h0 && cyc.length <= nh);
    cycles.push(cyc);
    area.push(twice / 2);
  }
  let outer = 0;
  for (let f = 1; f < area.length; f++) if (area[f] < area[outer]) outer = f;
  return { faceOf, cycles, area, outer, around, angle };
}

function checkConnected(c: Checked, out: Messages): boolean {
  const { nv, ev, ne } = c;
  const parent = new Int32Array(nv);
  for (let v = 0; v < nv; v++) parent[v] = v;
  const find = (v: number) => {
    while (parent[v] !== v) {
      parent[v] = parent[parent[v]];
      v = parent[v];
    }
    return v;
  };
  const degree = new Int32Array(nv);
  for (let e = 0; e < ne; e++) {
    const a = ev[2 * e];
    const b = ev[2 * e + 1];
    degree[a]++;
    degree[b]++;
    const ra = find(a);
    const rb = find(b);
    if (ra !== rb) parent[ra] = rb;
  }
  const members = new Map<number, number[]>();
  for (let v = 0; v < nv; v++) {
    if (degree[v] === 0) {
      out.add('warning', 'unused-vertex', `Vertex ${v} is not the end of any crease; it is ignored.`, { vertex: v });
      continue;
    }
    const r = find(v);
    const list = members.get(r);
    if (list) list.push(v);
    else members.set(r, [v]);
  }
  if (members.size <= 1) return true;
  const parts = [...members.values()].sort((p, q) => q.length - p.length || p[0] - q[0]);
  const edgeIsB = new Map<number, boolean>();
  for (let e = 0; e < ne; e++) {
    const r = find(ev[2 * e]);
    edgeIsB.set(r, (edgeIsB.get(r) ?? true) && c.assignment[e] === 'B');
  }
  for (let k = 1; k < parts.length; k++) {
    const part = parts[k];
    const shown = part.slice(0, 8).join(', ') + (part.length > 8 ? ', …' : '');
    const allB = edgeIsB.get(find(part[0]));
    out.add(
      'error',
      'disconnected-sheet',
      `The sheet is in ${parts.length} separate pieces: vertices ${shown} are not joined by creases to the largest piece.` +
        (allB ? ' If this is the rim of a hole, note that closure around holes is not supported yet.' : ''),
      { vertex: part[0] },
    );
  }
  return false;
}

// ---------------------------------------------------------------------------------------------------

function build(src: PatternSource, out: Messages): Pattern | undefined {
  const c = checkEntries(src, out);
  if (!c) return undefined;
  const geo = checkGeometry(c, out);
  if (!geo) return undefined;
  if (!checkConnected(c, out)) return undefined;

  const { xy, nv, ev, ne, fileLabel } = c;
  const assignment = c.assignment.slice();
  const F = traceFaces(c);
  const { faceOf, cycles, outer } = F;
  const name = (e: number) => creaseName(e, fileLabel[e]);

  const degree = new Int32Array(nv);
  for (let e = 0; e < ne; e++) {
    degree[ev[2 * e]]++;
    degree[ev[2 * e + 1]]++;
  }
  for (let e = 0; e < ne; e++) {
    if (faceOf[2 * e] !== faceOf[2 * e + 1]) continue;
    const loose = degree[ev[2 * e]] === 1 ? ev[2 * e] : degree[ev[2 * e + 1]] === 1 ? ev[2 * e + 1] : -1;
    const inside = faceOf[2 * e] !== outer;
    out.add(
      'error',
      'dangling-crease',
      `${cap(name(e))} does not separate two panels: ` +
        (inside ? 'it ends inside a panel' : 'it sticks out of the sheet') +
        (loose >= 0 ? ` (vertex ${loose} is the end of no other crease)` : '') +
        '. Extend it to another crease or to the rim, or remove it.',
      { ...where(e, fileLabel[e]), ...(loose >= 0 ? { vertex: loose } : {}) },
    );
  }
  const tiny = geo.tol * geo.size;
  for (let f = 0; f < cycles.length; f++) {
    if (f === outer) continue;
    if (!(F.area[f] > tiny)) {
      const vs = cycles[f].map((h) => ev[h]);
      out.add('error', 'degenerate-panel', `The panel with vertices ${listVertices(vs)} has no area.`, { vertex: vs[0] });
    }
  }
  if (out.errors) return undefined;

  // the sheet's rim: an edge with the outside on one side is a boundary edge whatever the file says
  for (let e = 0; e < ne; e++) {
    const onRim = faceOf[2 * e] === outer || faceOf[2 * e + 1] === outer;
    if (onRim && assignment[e] !== 'B') {
      out.add(
        'warning',
        'edge-on-rim-not-boundary',
        `${cap(name(e))} is on the sheet's rim but marked ${assignment[e]}; it is read as a boundary edge (B).`,
        where(e, fileLabel[e]),
      );
      assignment[e] = 'B';
    }
  }

  // holes: bounded faces rimmed only by boundary edges with a bounded face beyond each of them
  const isHole = new Uint8Array(cycles.length);
  if (cycles.length > 2) {
    for (let f = 0; f < cycles.length; f++) {
      if (f === outer) continue;
      const cyc = cycles[f];
      if (cyc.every((h) => assignment[h >> 1] === 'B' && faceOf[h ^ 1] !== outer)) isHole[f] = 1;
    }
  }
  let holeCount = 0;
  for (let f = 0; f < cycles.length; f++) {
    if (!isHole[f]) continue;
    const vs = cycles[f].map((h) => ev[h]);
    out.add(
      'error',
      'hole-unsupported',
      `The region bounded by vertices ${listVertices(vs)} is a hole in the sheet (or a panel cut free all round); closure around holes is not supported yet.`,
      { hole: holeCount++, vertex: vs[0] },
    );
  }
  if (out.errors) return undefined;

  // panels in traced order (bounded faces are counter-clockwise: positive area)
  const facePanel = new Int32Array(cycles.length).fill(-1);
  let tracedPanels: number[] = [];
  for (let f = 0; f < cycles.length; f++) if (f !== outer) tracedPanels.push(f);
  for (let e = 0; e < ne; e++) {
    if (assignment[e] === 'B' && faceOf[2 * e] !== outer && faceOf[2 * e + 1] !== outer) {
      out.add(
        'error',
        'cut-unsupported',
        `${cap(name(e))} is a boundary edge (B) with panels on both sides, an interior cut; cuts are not supported yet. Mark it as a crease (M, V, U or F) or remove it.`,
        where(e, fileLabel[e]),
      );
    }
  }
  if (out.errors) return undefined;

  // file faces: must be exactly the panels of the graph; then their order is the panel order
  const startAt: number[] = [];
  if (src.faces !== undefined && src.faces !== null) {
    const order = matchFileFaces(src.faces, c, F, tracedPanels, out);
    if (!order) return undefined;
    tracedPanels = order.faces;
    startAt.push(...order.startAt);
  }
  tracedPanels.forEach((f, p) => (facePanel[f] = p));

  const panels: Panel[] = tracedPanels.map((f, p) => {
    let cyc = cycles[f];
    if (startAt.length) {
      const k = cyc.findIndex((h) => ev[h] === startAt[p]);
      if (k > 0) cyc = cyc.slice(k).concat(cyc.slice(0, k));
    }
    const vertices = cyc.map((h) => ev[h]);
    return { index: p, vertices, creases: cyc.map((h) => h >> 1), area: F.area[f], centroid: centroid(xy, vertices, F.area[f]) };
  });

  const creases: Crease[] = [];
  for (let e = 0; e < ne; e++) {
    const a = ev[2 * e];
    const b = ev[2 * e + 1];
    const cr: Crease = {
      index: e,
      label: c.label[e],
      vertices: [a, b],
      assignment: assignment[e],
      leftPanel: facePanel[faceOf[2 * e]],
      rightPanel: facePanel[faceOf[2 * e + 1]],
      length: Math.hypot(xy[2 * a] - xy[2 * b], xy[2 * a + 1] - xy[2 * b + 1]),
    };
    if (c.limits[e] && assignment[e] !== 'B') cr.limit = c.limits[e];
    creases.push(cr);
  }

  const interiorVertices: InteriorVertex[] = [];
  for (let v = 0; v < nv; v++) {
    const hs = F.around[v];
    if (hs.length === 0 || hs.some((h) => assignment[h >> 1] === 'B')) continue;
    const directions = hs.map((h) => F.angle[h]);
    const sectors = directions.map((t, k) => (k + 1 < directions.length ? directions[k + 1] : directions[0] + TWO_PI) - t);
    let sum = 0;
    for (const s of sectors) sum += s;
    interiorVertices.push({ vertex: v, creases: hs.map((h) => h >> 1), directions, sectors, defect: TWO_PI - sum });
  }

  const basePanel = chooseBasePanel(src.basePanel, panels, xy, nv, out);
  namePanels(src.panelNames, panels, out);
  const labelIndex = new Map<string, number>();
  for (let e = 0; e < ne; e++) labelIndex.set(c.label[e], e);
  const vertices: [number, number][] = [];
  for (let v = 0; v < nv; v++) vertices.push([xy[2 * v], xy[2 * v + 1]]);

  return { name: c.name, vertices, creases, panels, interiorVertices, holes: [], basePanel, labelIndex, size: geo.size };
}

function listVertices(vs: number[]): string {
  return vs.length > 12 ? vs.slice(0, 12).join(', ') + ', …' : vs.join(', ');
}

function centroid(xy: Float64Array, vs: number[], area: number): [number, number] {
  let cx = 0;
  let cy = 0;
  // relative to the first vertex, so large coordinates keep their precision
  const ox = xy[2 * vs[0]];
  const oy = xy[2 * vs[0] + 1];
  for (let k = 0; k < vs.length; k++) {
    const a = vs[k];
    const b = vs[(k + 1) % vs.length];
    const ax = xy[2 * a] - ox;
    const ay = xy[2 * a + 1] - oy;
    const bx = xy[2 * b] - ox;
    const by = xy[2 * b + 1] - oy;
    const cr = ax * by - bx * ay;
    cx += (ax + bx) * cr;
    cy += (ay + by) * cr;
  }
  return [ox + cx / (6 * area), oy + cy / (6 * area)];
}

/** Panel names from the file: each must name an existing panel, and no two panels share one. */
function namePanels(names: unknown, panels: Panel[], out: Messages): void {
  if (names === undefined || names === null) return;
  if (!Array.isArray(names)) {
    out.add('warning', 'bad-panel-names', 'The panel names are not a list by panel; they are ignored.', { field: 'panelNames' });
    return;
  }
  const seen = new Map<string, number>();
  names.forEach((n: unknown, k) => {
    if (n === undefined || n === null) return;
    if (typeof n !== 'string' || !n.trim()) {
      out.add('warning', 'bad-panel-name', `The name of panel ${k} is not text; the panel is known by its index.`, { field: `panelNames.${k}`, panel: k });
      return;
    }
    if (k >= panels.length) {
      out.add('warning', 'panel-name-unknown', `Panel ${k} is named "${n}", but the pattern has ${panels.length} panels (numbered from 0); the name is ignored.`, { field: `panelNames.${k}` });
      return;
    }
    const twin = seen.get(n);
    if (twin !== undefined) {
      out.add('warning', 'duplicate-panel-name', `Panels ${twin} and ${k} are both named "${n}"; panel ${k} is known by its index.`, { field: `panelNames.${k}`, panel: k });
      return;
    }
    seen.set(n, k);
    panels[k].name = n;
  });
}

function chooseBasePanel(requested: unknown, panels: Panel[], xy: Float64Array, nv: number, out: Messages): number {
  if (requested !== undefined && requested !== null) {
    if (typeof requested === 'number' && Number.isInteger(requested) && requested >= 0 && requested < panels.length) return requested;
    out.add(
      'warning',
      'bad-base-panel',
      `The base panel ${JSON.stringify(requested)} does not exist (there are ${panels.length} panels, numbered from 0); the panel nearest the centre is used.`,
      { field: 'basePanel' },
    );
  }
  const [x0, y0, x1, y1] = boundingBox(xy, nv);
  const mx = (x0 + x1) / 2;
  const my = (y0 + y1) / 2;
  let best = 0;
  let bestD = Infinity;
  for (const p of panels) {
    const d = Math.hypot(p.centroid[0] - mx, p.centroid[1] - my);
    // ties within rounding go to the lowest index
    if (bestD === Infinity || d < bestD - 1e-12 * (Math.abs(mx) + Math.abs(my) + bestD)) {
      best = p.index;
      bestD = d;
    }
  }
  return best;
}

/** Check the file's faces against the traced panels; on success the panel order and first vertices. */
function matchFileFaces(
  raw: unknown,
  c: Checked,
  F: Faces,
  traced: number[],
  out: Messages,
): { faces: number[]; startAt: number[] } | undefined {
  if (!Array.isArray(raw)) {
    out.add('error', 'faces-malformed', 'The face list is not a list of vertex cycles.', { field: 'faces' });
    return undefined;
  }
  const edgeOf = new Map<string, number>();
  for (let e = 0; e < c.ne; e++) {
    const a = c.ev[2 * e];
    const b = c.ev[2 * e + 1];
    edgeOf.set(a < b ? `${a},${b}` : `${b},${a}`, e);
  }
  const keyOfTraced = new Map<string, number>();
  for (const f of traced) keyOfTraced.set(cycleKey(F.cycles[f].map((h) => c.ev[h])), f);
  const used = new Map<number, number>();
  const faces: number[] = [];
  const startAt: number[] = [];
  for (let k = 0; k < raw.length; k++) {
    const face: unknown = raw[k];
    if (!Array.isArray(face) || face.length < 3) {
      out.add('error', 'faces-malformed', `Face ${k} is not a cycle of at least three vertex indices.`, { panel: k });
      continue;
    }
    let ok = true;
    for (const v of face) {
      if (typeof v !== 'number' || !Number.isInteger(v) || v < 0 || v >= c.nv) {
        out.add('error', 'face-missing-vertex', `Face ${k} refers to vertex ${JSON.stringify(v) ?? String(v)}, which does not exist.`, { panel: k });
        ok = false;
        break;
      }
    }
    if (!ok) continue;
    const vs = face as number[];
    for (let i = 0; i < vs.length; i++) {
      const a = vs[i];
      const b = vs[(i + 1) % vs.length];
      if (!edgeOf.has(a < b ? `${a},${b}` : `${b},${a}`)) {
        out.add('error', 'face-not-a-cycle', `Face ${k} goes from vertex ${a} to vertex ${b}, but no crease joins them.`, { panel: k, vertex: a });
        ok = false;
        break;
      }
    }
    if (!ok) continue;
    const f = keyOfTraced.get(cycleKey(vs));
    if (f === undefined) {
      out.add(
        'error',
        'face-mismatch',
        `Face ${k} (vertices ${listVertices(vs)}) is not a panel of the crease pattern: the creases divide the sheet differently.`,
        { panel: k, vertex: vs[0] },
      );
      continue;
    }
    const prev = used.get(f);
    if (prev !== undefined) {
      out.add('error', 'duplicate-face', `Face ${k} is the same panel as face ${prev}.`, { panel: k });
      continue;
    }
    used.set(f, k);
    faces.push(f);
    startAt.push(vs[0]);
  }
  if (out.errors) return undefined;
  for (const f of traced) {
    if (!used.has(f)) {
      const vs = F.cycles[f].map((h) => c.ev[h]);
      out.add('error', 'face-missing', `The panel with vertices ${listVertices(vs)} is missing from the face list.`, { field: 'faces', vertex: vs[0] });
    }
  }
  if (out.errors) return undefined;
  return { faces, startAt };
}

/** The same key for a vertex cycle whatever its start and direction. */
function cycleKey(vs: number[]): string {
  const n = vs.length;
  let best: string | undefined;
  let min = Infinity;
  for (const v of vs) min = Math.min(min, v);
  for (let s = 0; s < n; s++) {
    if (vs[s] !== min) continue;
    for (const dir of [1, -1]) {
      const seq: number[] = [];
      for (let k = 0; k < n; k++) seq.push(vs[(s + dir * k + n * n) % n]);
      const key = seq.join(',');
      if (best === undefined || key < best) best = key;
    }
  }
  return best ?? '';
}
