// Built-in crease patterns: a single vertex, Miura-ori, the waterbomb base and a generic degree-5 vertex.
// Each returns a Project (the pattern plus suggested drives) or messages saying what is wrong with the
// parameters. Lengths are in whatever unit the caller means; angles are degrees.
import type { Assignment, Message } from '../types';
import type { Project } from '../formats/project';
import type { DriveSpec } from './drives';

export interface GeneratorResult {
  project?: Project;
  messages: Message[];
}

const RAD = Math.PI / 180;
const SUM_TOLERANCE_DEG = 1e-9;

function fail(code: string, text: string, field?: string): GeneratorResult {
  return { messages: [field ? { severity: 'error', code, text, where: { field } } : { severity: 'error', code, text }] };
}

/**
 * Coordinates keep full double precision: the published check values hold to 1e-9, and 12-digit rounding
 * moves sector angles by ~1e-10°. Only round-off dust around zero is cleared.
 */
const tidy = (x: number) => (Math.abs(x) < 1e-12 ? 0 : x);

const positive = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x) && x > 0;

/** Sign a suggested drive the way its crease's assignment folds (valley positive). */
function signed(a: Assignment, magnitudeDeg: number): number {
  return a === 'M' ? -Math.abs(magnitudeDeg) : Math.abs(magnitudeDeg);
}

/**
 * Mountain/valley assignment for a flat-foldable degree-4 vertex: three of one kind and one of the other
 * (Maekawa), the odd crease bordering the smallest sector (the big-little-big rule; a fact of the trade).
 * Of the two creases beside the smallest sector, the one whose other sector is also small is taken.
 */
export function degree4Assignment(sectorsDeg: number[]): Assignment[] {
  const n = sectorsDeg.length;
  let k = 0;
  for (let i = 1; i < n; i++) if (sectorsDeg[i] < sectorsDeg[k] - 1e-12) k = i;
  // sector k lies between crease k and crease k+1
  const before = sectorsDeg[(k + n - 1) % n];
  const after = sectorsDeg[(k + 1) % n];
  const odd = before <= after ? k : (k + 1) % n;
  return sectorsDeg.map((_, i) => (i === odd ? 'V' : 'M'));
}

/** True when alternate sector sums are each 180° (Kawasaki's condition, a fact of the trade). */
export function isKawasaki(sectorsDeg: number[], tolDeg = 1e-9): boolean {
  if (sectorsDeg.length % 2 !== 0) return false;
  let even = 0;
  let odd = 0;
  sectorsDeg.forEach((s, i) => (i % 2 === 0 ? (even += s) : (odd += s)));
  return Math.abs(even - 180) <= tolDeg && Math.abs(odd - 180) <= tolDeg;
}

export interface SingleVertexOptions {
  /** sector angles in ccw order starting from the +x axis; they must sum to 360° */
  sectorsDeg: number[];
  /** per crease c0 … c{n−1}; default: a Maekawa assignment for a flat-foldable degree-4 vertex, else U */
  assignments?: Assignment[];
  /** distance from the vertex to the rim, default 50 */
  radius?: number;
  /** magnitude of the suggested drive on c0, degrees, default 45 */
  driveDeg?: number;
  name?: string;
}

/**
 * One interior vertex at the origin with creases c0 … c{n−1} (ccw, c0 along +x) reaching a polygonal rim
 * at `radius`. The rim gets extra corners so no rim edge spans more than 90° (a 180° sector would otherwise
 * put its rim edge through the vertex). Suggested drive: c0.
 */
export function singleVertex(opts: SingleVertexOptions): GeneratorResult {
  const sectors = opts?.sectorsDeg;
  if (!Array.isArray(sectors) || sectors.length < 2) return fail('bad-sectors', 'A vertex needs a list of at least two sector angles.', 'sectorsDeg');
  for (let k = 0; k < sectors.length; k++) {
    const s = sectors[k];
    if (typeof s !== 'number' || !Number.isFinite(s) || s <= 0 || s >= 360) {
      return fail('bad-sectors', `Sector ${k} is ${String(s)}°; every sector must be a number between 0° and 360°.`, `sectorsDeg[${k}]`);
    }
  }
  const total = sectors.reduce((a, b) => a + b, 0);
  if (Math.abs(total - 360) > SUM_TOLERANCE_DEG) {
    return fail('sectors-not-360', `The sectors add up to ${+total.toPrecision(12)}°, not 360°: a flat sheet has exactly 360° around a vertex.`, 'sectorsDeg');
  }
  const n = sectors.length;
  const radius = opts.radius ?? 50;
  if (!positive(radius)) return fail('bad-size', `The radius ${String(radius)} is not a positive length.`, 'radius');
  let assignments: Assignment[];
  if (opts.assignments !== undefined) {
    if (!Array.isArray(opts.assignments) || opts.assignments.length !== n) {
      return fail('bad-assignment', `Give one assignment per crease (${n}).`, 'assignments');
    }
    for (let k = 0; k < n; k++) {
      if (!['M', 'V', 'U', 'F'].includes(opts.assignments[k])) {
        return fail('bad-assignment', `Crease c${k} has assignment ${JSON.stringify(opts.assignments[k])}; expected M, V, U or F.`, `assignments[${k}]`);
      }
    }
    assignments = opts.assignments.slice();
  } else assignments = n === 4 && isKawasaki(sectors) ? degree4Assignment(sectors) : sectors.map(() => 'U');

  const vertices: [number, number][] = [[0, 0]];
  const edges: [number, number][] = [];
  const labels: (string | undefined)[] = [];
  const asg: Assignment[] = [];
  const directions: number[] = [];
  let t = 0;
  for (let k = 0; k < n; k++) {
    directions.push(t);
    t += sectors[k];
  }
  const at = (deg: number): [number, number] => [tidy(radius * Math.cos(deg * RAD)), tidy(radius * Math.sin(deg * RAD))];
  for (let k = 0; k < n; k++) {
    vertices.push(at(directions[k]));
    edges.push([0, k + 1]);
    labels.push(`c${k}`);
    asg.push(assignments[k]);
  }
  let rim = 0;
  for (let k = 0; k < n; k++) {
    const pieces = Math.ceil(sectors[k] / 90 - 1e-9);
    let prev = k + 1;
    for (let p = 1; p < pieces; p++) {
      vertices.push(at(directions[k] + (sectors[k] * p) / pieces));
      const v = vertices.length - 1;
      edges.push([prev, v]);
      labels.push(`rim${rim++}`);
      asg.push('B');
      prev = v;
    }
    edges.push([prev, ((k + 1) % n) + 1]);
    labels.push(`rim${rim++}`);
    asg.push('B');
  }
  const drives: DriveSpec[] = [{ crease: 'c0', angleDeg: signed(assignments[0], opts.driveDeg ?? 45) }];
  if (assignments[0] === 'F') drives.length = 0;
  const name = opts.name ?? `vertex ${sectors.map((s) => +s.toPrecision(6)).join('/')}`;
  return {
    project: { source: { name, vertices, edges, assignments: asg, labels, limits: edges.map(() => undefined) }, drives },
    messages: [],
  };
}

export interface MiuraOptions {
  /** unit cells across the straight crease lines (each cell is 2 × 2 panels) */
  rows: number;
  /** unit cells along the straight crease lines */
  cols: number;
  /** straight-line segment length */
  a: number;
  /** zigzag segment length */
  b: number;
  /** acute angle between the zigzag segments and the straight lines, degrees, 0 < α < 90 */
  alphaDeg: number;
  /** magnitude of the suggested zigzag drive, degrees, default 60 */
  driveDeg?: number;
  name?: string;
}

/** Largest Miura sheet the generator makes: about 8 creases per cell, kept under the file limits. */
export const MIURA_MAX_CELLS = 30_000;

/**
 * Miura-ori: vertex (i, j) at (i·a + (j odd ? b cos α : 0), j·b sin α) for i = 0 … 2·cols, j = 0 … 2·rows
 * (vertex index j·(2·cols + 1) + i). Labels:
 *   s{i}_{j}  straight segment from vertex (i, j) to (i + 1, j), parallel to x, length a;
 *   z{i}_{j}  zigzag segment from vertex (i, j) to (i, j + 1), length b.
 * The outer lines (j = 0, j = 2·rows, i = 0, i = 2·cols) are the rim (B).
 * Assignment: zigzag line i is all valleys for even i and all mountains for odd i; along a straight line
 * the segments alternate, the one between the vertex's two small (α) sectors taking the sign opposite to
 * its zigzag line, so every vertex is 3 + 1 (Maekawa) and flat-foldable. Suggested drive: z{cols}_{rows}.
 */
export function miura(opts: MiuraOptions): GeneratorResult {
  const { rows, cols, a, b, alphaDeg } = opts ?? ({} as MiuraOptions);
  if (!Number.isInteger(rows) || rows < 1) return fail('bad-count', `rows must be a whole number ≥ 1, not ${String(rows)}.`, 'rows');
  if (!Number.isInteger(cols) || cols < 1) return fail('bad-count', `cols must be a whole number ≥ 1, not ${String(cols)}.`, 'cols');
  if (rows * cols > MIURA_MAX_CELLS) return fail('too-large', `${rows} × ${cols} cells is more than the ${MIURA_MAX_CELLS} cells this generator makes.`, 'rows');
  if (!positive(a)) return fail('bad-size', `a (straight segment length) must be a positive length, not ${String(a)}.`, 'a');
  if (!positive(b)) return fail('bad-size', `b (zigzag segment length) must be a positive length, not ${String(b)}.`, 'b');
  if (typeof alphaDeg !== 'number' || !(alphaDeg > 0 && alphaDeg < 90)) {
    return fail('bad-angle', `alpha must be an angle between 0° and 90° (exclusive), not ${String(alphaDeg)}.`, 'alphaDeg');
  }
  const ni = 2 * cols;
  const nj = 2 * rows;
  const al = alphaDeg * RAD;
  const vid = (i: number, j: number) => j * (ni + 1) + i;
  const vertices: [number, number][] = [];
  for (let j = 0; j <= nj; j++) {
    for (let i = 0; i <= ni; i++) vertices.push([tidy(i * a + (j % 2 === 1 ? b * Math.cos(al) : 0)), tidy(j * b * Math.sin(al))]);
  }
  const zig = (i: number): Assignment => (i % 2 === 0 ? 'V' : 'M');
  const edges: [number, number][] = [];
  const labels: string[] = [];
  const assignments: Assignment[] = [];
  for (let j = 0; j <= nj; j++) {
    for (let i = 0; i < ni; i++) {
      edges.push([vid(i, j), vid(i + 1, j)]);
      labels.push(`s${i}_${j}`);
      // even rows: the small sectors flank the +x segment of vertex (i, j); odd rows: the −x one
      assignments.push(j === 0 || j === nj ? 'B' : j % 2 === 0 ? zig(i + 1) : zig(i));
    }
  }
  for (let i = 0; i <= ni; i++) {
    for (let j = 0; j < nj; j++) {
      edges.push([vid(i, j), vid(i, j + 1)]);
      labels.push(`z${i}_${j}`);
      assignments.push(i === 0 || i === ni ? 'B' : zig(i));
    }
  }
  const drive = `z${cols}_${rows}`;
  const name = opts.name ?? `Miura-ori ${rows} × ${cols}`;
  return {
    project: {
      source: { name, vertices, edges, assignments, labels, limits: edges.map(() => undefined) },
      drives: [{ crease: drive, angleDeg: signed(zig(cols), opts.driveDeg ?? 60) }],
    },
    messages: [],
  };
}

export interface WaterbombOptions {
  /** side of the square sheet, default 100 */
  size?: number;
  /**
   * false (default): the waterbomb base as it folds flat: diagonals valleys, the x midline mountains, the
   * y midline flat (F), so 4 V + 2 M (Maekawa) and three degrees of freedom. true: every midline half a
   * mountain hinge (4 V + 4 M, five degrees of freedom; this cannot fold flat).
   */
  allMidlines?: boolean;
  name?: string;
}

/**
 * The waterbomb base: a square with its two diagonals and two midlines meeting at a degree-8 centre
 * vertex. Creases ccw from +x: x0 (0°), d0 (45°), y0 (90°), d1 (135°), x1 (180°), d2 (225°), y1 (270°),
 * d3 (315°): the x midline's halves x0, x1, the y midline's y0, y1 (plain names: an "m" would read as
 * mountain on a crease held flat); rim edges rim0 … rim7. Suggested drives: d0, d1 and d2 (three DOF need
 * three), each 60°.
 */
export function waterbomb(opts: WaterbombOptions = {}): GeneratorResult {
  const size = opts.size ?? 100;
  if (!positive(size)) return fail('bad-size', `size must be a positive length, not ${String(size)}.`, 'size');
  const h = size / 2;
  const vertices: [number, number][] = [[0, 0]];
  const edges: [number, number][] = [];
  const labels: string[] = [];
  const assignments: Assignment[] = [];
  for (let k = 0; k < 8; k++) {
    const t = k * 45 * RAD;
    // midline ends on the edge middles, diagonal ends on the corners
    const r = k % 2 === 0 ? h : h * Math.SQRT2;
    vertices.push([tidy(r * Math.cos(t)), tidy(r * Math.sin(t))]);
    edges.push([0, k + 1]);
    const m = k / 2;
    if (k % 2 === 0) {
      // m = 0, 2 lie on the x axis, m = 1, 3 on the y axis
      labels.push(`${m % 2 === 0 ? 'x' : 'y'}${m < 2 ? 0 : 1}`);
      assignments.push(opts.allMidlines || m % 2 === 0 ? 'M' : 'F');
    } else {
      labels.push(`d${(k - 1) / 2}`);
      assignments.push('V');
    }
  }
  for (let k = 0; k < 8; k++) {
    edges.push([k + 1, ((k + 1) % 8) + 1]);
    labels.push(`rim${k}`);
    assignments.push('B');
  }
  return {
    project: {
      source: { name: opts.name ?? 'waterbomb base', vertices, edges, assignments, labels, limits: edges.map(() => undefined) },
      drives: ['d0', 'd1', 'd2'].map((c) => ({ crease: c, angleDeg: 60 })),
    },
    messages: [],
  };
}

export interface Degree5Options {
  /** five sector angles summing to 360°, default 70/80/65/75/70 (no symmetry, not flat-foldable) */
  sectorsDeg?: number[];
  radius?: number;
  name?: string;
}

/**
 * A generic degree-5 vertex: two degrees of freedom (5 − 3), all creases unassigned (an odd-degree vertex
 * cannot fold flat, so no mountain/valley set is implied). Suggested drives: c0 at 40°, c2 at −30°.
 */
export function degree5(opts: Degree5Options = {}): GeneratorResult {
  const sectorsDeg = opts.sectorsDeg ?? [70, 80, 65, 75, 70];
  if (!Array.isArray(sectorsDeg) || sectorsDeg.length !== 5) return fail('bad-sectors', 'A degree-5 vertex needs exactly five sector angles.', 'sectorsDeg');
  const r = singleVertex({ sectorsDeg, assignments: ['U', 'U', 'U', 'U', 'U'], radius: opts.radius, name: opts.name ?? 'degree-5 vertex' });
  if (!r.project) return r;
  r.project.drives = [
    { crease: 'c0', angleDeg: 40 },
    { crease: 'c2', angleDeg: -30 },
  ];
  return r;
}
