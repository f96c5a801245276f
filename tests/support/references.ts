// Reference relations shared by several test files; each names its source.
import { miura } from '../../solver/model/generators';
import { buildPattern } from '../../solver/model/pattern';

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
