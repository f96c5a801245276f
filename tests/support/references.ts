// Reference relations shared by several test files; each names its source.
import { miura } from '../../solver/model/generators';
import { buildPattern } from '../../solver/model/pattern';
import type { Assignment, Pattern, PatternSource } from '../../solver/types';

/**
 * Spherical four-bar input–output equation of a degree-4 vertex whose links are the sector arcs
 * (J. M. McCarthy, G. S. Soh, "Geometric Design of Linkages", 2nd ed., Springer 2011, ch. 5; the form here is
 * derived by spherical trigonometry, from memory of that chapter's approach). Hold the panel between c3 and
 * c0; crease c1 turns about c0 by ρ0, crease c2 turns about c3 by −ρ3, and the coupler arc between them stays
 * a2 (a1..a4: the sectors c0→c1, c1→c2, c2→c3, c3→c0): A cos ρ3 + B sin ρ3 = C. A real ρ3 exists only while
 * A² + B² ≥ C² (the input turns back where they are equal).
 */
export function fourBar(a: number[], rho0: number): { A: number; B: number; C: number } {
  const [a1, a2, a3, a4] = a;
  const w1 = [Math.cos(a1), Math.sin(a1) * Math.cos(rho0), Math.sin(a1) * Math.sin(rho0)];
  // c3 at −a4, c2 at −(a4 + a3); w2 = cos ρ3·c2 + sin a3 sin ρ3·ẑ + cos a3 (1 − cos ρ3)·c3
  const c2 = [Math.cos(a4 + a3), -Math.sin(a4 + a3)];
  const c3 = [Math.cos(a4), -Math.sin(a4)];
  const A = w1[0] * (c2[0] - Math.cos(a3) * c3[0]) + w1[1] * (c2[1] - Math.cos(a3) * c3[1]);
  const B = w1[2] * Math.sin(a3);
  const C = Math.cos(a2) - Math.cos(a3) * (w1[0] * c3[0] + w1[1] * c3[1]);
  return { A, B, C };
}

export function fourBarResidual(a: number[], rho0: number, rho3: number): number {
  const { A, B, C } = fourBar(a, rho0);
  return A * Math.cos(rho3) + B * Math.sin(rho3) - C;
}

/** The largest input ρ0 in [0, π] for which the four-bar closes (bisection on A² + B² − C²). */
export function fourBarInputLimit(a: number[]): number {
  const g = (rho0: number) => {
    const { A, B, C } = fourBar(a, rho0);
    return A * A + B * B - C * C;
  };
  let lo = 0, hi = Math.PI;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (g(mid) >= 0) lo = mid; else hi = mid;
  }
  return lo;
}

/** A Miura-ori sheet from the generator, with its suggested zigzag drive and a vertex index function. */
export function miuraSheet(rows: number, cols: number, a: number, b: number, alphaDeg: number) {
  const g = miura({ rows, cols, a, b, alphaDeg });
  const { pattern } = buildPattern(g.project!.source);
  const drive = pattern!.labelIndex.get(g.project!.drives[0].crease)!;
  const sign = Math.sign(g.project!.drives[0].angleDeg);
  return { pattern: pattern!, drive, sign, vid: (i: number, j: number) => j * (2 * cols + 1) + i };
}

/** Generic degree-4 vertices in a row joined by creases `j0…`, each with a crease up (`u…`) and one down (`d…`) to the rim, `in` and `out` at the ends. */
export function degree4Chain(count: number): Pattern {
  const vertices: [number, number][] = [];
  const edges: [number, number][] = [];
  const labels: string[] = [];
  const assignments: Assignment[] = [];
  const ups = [0.35, -0.3, 0.5, -0.15], downs = [-0.45, 0.25, -0.1, 0.4], ys = [0, 0.12, -0.08, 0.05];
  const ids: number[] = [];
  for (let i = 0; i < count; i++) ids.push(vertices.push([1.5 * i, ys[i]]) - 1);
  const left = vertices.push([-1.2, 0.2]) - 1, right = vertices.push([1.5 * (count - 1) + 1.2, -0.15]) - 1;
  const top: number[] = [], bottom: number[] = [];
  for (let i = 0; i < count; i++) { top.push(vertices.push([1.5 * i + ups[i], 1]) - 1); bottom.push(vertices.push([1.5 * i + downs[i], -1]) - 1); }
  const crease = (a: number, b: number, l: string, as: Assignment) => { edges.push([a, b]); labels.push(l); assignments.push(as); };
  crease(left, ids[0], 'in', 'U');
  for (let i = 0; i + 1 < count; i++) crease(ids[i], ids[i + 1], `j${i}`, 'U');
  crease(ids[count - 1], right, 'out', 'U');
  for (let i = 0; i < count; i++) { crease(ids[i], top[i], `u${i}`, 'U'); crease(ids[i], bottom[i], `d${i}`, 'U'); }
  const c0 = vertices.push([-1.2, -1]) - 1, c1 = vertices.push([1.5 * (count - 1) + 1.2, -1]) - 1;
  const c2 = vertices.push([1.5 * (count - 1) + 1.2, 1]) - 1, c3 = vertices.push([-1.2, 1]) - 1;
  const rim = [c0, ...bottom, c1, right, c2, ...[...top].reverse(), c3, left];
  rim.forEach((v, k) => crease(v, rim[(k + 1) % rim.length], `b${k}`, 'B'));
  const src: PatternSource = { name: 'chain', vertices, edges, assignments, labels, limits: edges.map(() => undefined) };
  const { pattern, messages } = buildPattern(src);
  if (!pattern) throw new Error(`degree4Chain: ${messages.map((m) => m.text).join('; ')}`);
  return pattern;
}
