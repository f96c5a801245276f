// Folded shapes for other programs: OBJ and ASCII STL meshes and a JSON document. Each panel is placed by
// its own rigid transform, so every panel stays exactly flat and undistorted even where the closure is
// imperfect; a vertex shared by panels is then written once per panel, and the largest gap between two
// placements is reported as maxMismatch.
import type { Pattern, Shape } from '../types';
import { CAUTIONS } from './cautions';

/** Folded position of flat point (x, y) under a 3×4 row-major transform. */
function place(T: ArrayLike<number>, x: number, y: number): [number, number, number] {
  return [T[0] * x + T[1] * y + T[3], T[4] * x + T[5] * y + T[7], T[8] * x + T[9] * y + T[11]];
}

function usableTransform(T: ArrayLike<number> | undefined): T is ArrayLike<number> {
  if (!T || T.length !== 12) return false;
  for (let i = 0; i < 12; i++) if (!Number.isFinite(T[i])) return false;
  return true;
}

/**
 * Triangles of a simple polygon (counter-clockwise), as index triples into `vs`, by ear clipping on the
 * flat sheet; for a convex panel this is the fan from its first vertex.
 */
export function triangulatePanel(pattern: Pattern, vs: number[]): [number, number, number][] {
  const P = pattern.vertices;
  const n = vs.length;
  const out: [number, number, number][] = [];
  if (n < 3) return out;
  const idx = Array.from({ length: n }, (_, k) => k);
  const cross = (a: number, b: number, c: number) => {
    const [ax, ay] = P[vs[a]];
    const [bx, by] = P[vs[b]];
    const [cx, cy] = P[vs[c]];
    return (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
  };
  const inside = (p: number, a: number, b: number, c: number) => cross(a, b, p) >= 0 && cross(b, c, p) >= 0 && cross(c, a, p) >= 0;
  let guard = 0;
  while (idx.length > 3 && guard++ < n * n) {
    let clipped = false;
    for (let k = 0; k < idx.length; k++) {
      const a = idx[(k + idx.length - 1) % idx.length];
      const b = idx[k];
      const c = idx[(k + 1) % idx.length];
      if (cross(a, b, c) <= 0) continue; // reflex or straight: not an ear
      let blocked = false;
      for (const p of idx) {
        if (p === a || p === b || p === c) continue;
        if (inside(p, a, b, c)) {
          blocked = true;
          break;
        }
      }
      if (blocked) continue;
      out.push([a, b, c]);
      idx.splice(k, 1);
      clipped = true;
      break;
    }
    if (!clipped) break;
  }
  if (idx.length === 3) out.push([idx[0], idx[1], idx[2]]);
  else if (idx.length > 3) for (let k = 1; k + 1 < idx.length; k++) out.push([idx[0], idx[k], idx[k + 1]]); // degenerate rest: fan
  return out;
}

function num(x: number): string {
  // 9 significant digits: well below a micrometre on a metre-sized sheet, and short files
  if (Object.is(x, -0) || Math.abs(x) < 1e-300) return '0';
  return String(+x.toPrecision(9));
}

interface PlacedPanel {
  panel: number;
  points: [number, number, number][];
  triangles: [number, number, number][];
}

function placePanels(pattern: Pattern, shape: Shape): { placed: PlacedPanel[]; skipped: number[] } {
  const placed: PlacedPanel[] = [];
  const skipped: number[] = [];
  for (const panel of pattern.panels) {
    const T = shape.panelTransforms[panel.index];
    if (!usableTransform(T)) {
      skipped.push(panel.index);
      continue;
    }
    placed.push({
      panel: panel.index,
      points: panel.vertices.map((v) => place(T, pattern.vertices[v][0], pattern.vertices[v][1])),
      triangles: triangulatePanel(pattern, panel.vertices),
    });
  }
  return { placed, skipped };
}

function headerLines(pattern: Pattern, shape: Shape, skipped: number[]): string[] {
  const lines = [
    `Hingeplan folded shape: ${oneLine(pattern.name)}`,
    CAUTIONS,
    `Largest gap between two placements of one vertex (maxMismatch): ${num(shape.maxMismatch)} (sheet units); base panel ${shape.basePanel}.`,
  ];
  if (skipped.length) lines.push(`Panels without a placement, left out: ${skipped.join(', ')}.`);
  return lines;
}

const oneLine = (s: string) => s.replace(/[\r\n]+/g, ' ');

/** Wavefront OBJ: one object per panel, vertices placed by the panel's own transform. */
export function shapeToOBJ(pattern: Pattern, shape: Shape): string {
  const { placed, skipped } = placePanels(pattern, shape);
  const out: string[] = headerLines(pattern, shape, skipped).map((l) => `# ${l}`);
  let base = 1;
  for (const p of placed) {
    out.push(`o panel_${p.panel}`);
    for (const [x, y, z] of p.points) out.push(`v ${num(x)} ${num(y)} ${num(z)}`);
    out.push('f ' + p.points.map((_, k) => String(base + k)).join(' '));
    base += p.points.length;
  }
  return out.join('\n') + '\n';
}

function stlName(name: string): string {
  const s = name.replace(/[^A-Za-z0-9_.-]+/g, '_').replace(/^_+|_+$/g, '');
  return s || 'hingeplan';
}

/** ASCII STL. The format has no comments, so the cautions travel in the OBJ/JSON exports and the shells. */
export function shapeToSTL(pattern: Pattern, shape: Shape): string {
  const { placed } = placePanels(pattern, shape);
  const name = stlName(pattern.name);
  const out: string[] = [`solid ${name}`];
  for (const p of placed) {
    for (const [a, b, c] of p.triangles) {
      const A = p.points[a];
      const B = p.points[b];
      const C = p.points[c];
      const ux = B[0] - A[0], uy = B[1] - A[1], uz = B[2] - A[2];
      const vx = C[0] - A[0], vy = C[1] - A[1], vz = C[2] - A[2];
      let nx = uy * vz - uz * vy;
      let ny = uz * vx - ux * vz;
      let nz = ux * vy - uy * vx;
      const len = Math.hypot(nx, ny, nz);
      if (len > 0) {
        nx /= len;
        ny /= len;
        nz /= len;
      } else nx = ny = nz = 0;
      out.push(`  facet normal ${num(nx)} ${num(ny)} ${num(nz)}`, '    outer loop');
      for (const P of [A, B, C]) out.push(`      vertex ${num(P[0])} ${num(P[1])} ${num(P[2])}`);
      out.push('    endloop', '  endfacet');
    }
  }
  out.push(`endsolid ${name}`);
  return out.join('\n') + '\n';
}

export interface ShapeDocument {
  format: 'hingeplan-shape';
  version: 1;
  name: string;
  cautions: string;
  maxMismatch: number;
  basePanel: number;
  /** folded position of every vertex, in the pattern's vertex order */
  vertices: [number, number, number][];
  panels: { index: number; vertices: number[]; transform: number[]; folded: [number, number, number][] }[];
  creases: { index: number; label: string; vertices: [number, number]; assignment: string }[];
  [extra: string]: unknown;
}

/** A JSON-ready document of the folded shape; `extra` keys (solution number, status, …) are added at the top level. */
export function shapeToJSON(pattern: Pattern, shape: Shape, extra: Record<string, unknown> = {}): ShapeDocument {
  const { placed } = placePanels(pattern, shape);
  const byPanel = new Map(placed.map((p) => [p.panel, p]));
  const doc: ShapeDocument = {
    format: 'hingeplan-shape',
    version: 1,
    name: pattern.name,
    cautions: CAUTIONS,
    maxMismatch: shape.maxMismatch,
    basePanel: shape.basePanel,
    vertices: shape.vertices.map(([x, y, z]) => [x, y, z]),
    panels: pattern.panels.map((p) => ({
      index: p.index,
      vertices: p.vertices.slice(),
      transform: shape.panelTransforms[p.index] ? Array.from(shape.panelTransforms[p.index]) : [],
      folded: byPanel.get(p.index)?.points ?? [],
    })),
    creases: pattern.creases.map((c) => ({ index: c.index, label: c.label, vertices: [c.vertices[0], c.vertices[1]], assignment: c.assignment })),
  };
  for (const [k, v] of Object.entries(extra)) if (!(k in doc)) doc[k] = v;
  return doc;
}
