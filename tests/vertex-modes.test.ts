// Single-vertex checks of the solver against published relations.
import { describe, expect, it } from 'vitest';
import { solveDrives, patternDegreesOfFreedom, followRay } from '../solver/search/solve';
import { ClosureProblem } from '../solver/closure/newton';
import { flatCone } from '../solver/paths/cone';
import { directionsFromSectors, vertexPattern } from './support/vertex';
import { fourBarResidual } from './support/references';

const D = Math.PI / 180;

/**
 * Flat-foldable degree-4 vertex, sectors α, β, 180°−α, 180°−β (creases c0…c3 ccw, c0 between the 180°−β and α
 * sectors). Published fold-angle multipliers: T. Tachi, J. IASS 50(3) 2009; T. Evans, R. Lang, S. Magleby,
 * L. Howell, R. Soc. Open Sci. 2:150067 (2015); R. Lang, L. Howell, J. Mech. Robot. 10(2):021004 (2018):
 *   mode A (c0 = −c2, c1 = c3):  |tan(ρ1/2)| = |sin((α+β)/2) / sin((α−β)/2)| · |tan(ρ0/2)|
 *   mode B (c0 = c2, c1 = −c3):  |tan(ρ1/2)| = |cos((α+β)/2) / cos((α−β)/2)| · |tan(ρ0/2)|
 * (Which crease pair is which follows from our conventions; the signs below were derived, then checked.)
 */
function modes(alpha: number, beta: number, rho0: number) {
  const kA = Math.abs(Math.sin((alpha + beta) / 2) / Math.sin((alpha - beta) / 2));
  const kB = Math.abs(Math.cos((alpha + beta) / 2) / Math.cos((alpha - beta) / 2));
  const mag = (k: number) => 2 * Math.atan(k * Math.abs(Math.tan(rho0 / 2)));
  return { A: { k: mag(kA), pair: -1 }, B: { k: mag(kB), pair: 1 } };
}

/** A solution is in a mode when |ρ1| is the published magnitude, ρ2 = pair·ρ0 and ρ3 = −pair·ρ1. */
function inMode(angles: Float64Array, rho0: number, mode: { k: number; pair: number }): number {
  return Math.max(
    Math.abs(angles[0] - rho0),
    Math.abs(Math.abs(angles[1]) - mode.k),
    Math.abs(angles[2] - mode.pair * rho0),
    Math.abs(angles[3] + mode.pair * angles[1]),
  );
}

describe('flat-foldable degree-4 vertex (published fold-angle multipliers)', () => {
  const cases: [number, number][] = [[60, 100], [45, 80], [30, 70], [75, 95], [50, 140], [85, 20], [40, 60]];
  const drives = [-170, -120, -60, -15, 5, 30, 89, 135, 178];
  for (const [a, b] of cases) {
    it(`both modes for sectors ${a}/${b}/${180 - a}/${180 - b} over drive values`, () => {
      const p = vertexPattern(directionsFromSectors([a, b, 180 - a, 180 - b]));
      for (const d of drives) {
        const report = solveDrives(p, [{ crease: 0, value: d * D }]);
        const { A, B } = modes(a * D, b * D, d * D);
        for (const mode of [A, B]) {
          const errors = report.solutions.map((s) => inMode(s.angles, d * D, mode));
          const best = Math.min(...errors);
          expect(best / D, `mode with |ρ1| = ${(mode.k / D).toFixed(4)}° at drive ${d}°`).toBeLessThan(1e-9);
          expect(report.solutions[errors.indexOf(best)].maxResidual).toBeLessThanOrEqual(1e-10);
        }
        expect(report.status).toBe('several-solutions');
        expect(report.solutions.length).toBe(2);
      }
    });
  }
});


describe('generic degree-4 vertex (spherical four-bar input–output equation)', () => {
  const sets = [[70, 95, 100, 95], [80, 90, 110, 80], [60, 85, 120, 95], [100, 70, 95, 95]];
  for (const s of sets) {
    it(`sectors ${s.join('/')}`, () => {
      const p = vertexPattern(directionsFromSectors(s));
      let checked = 0;
      for (const d of [-100, -40, -10, 10, 40, 100]) {
        const report = solveDrives(p, [{ crease: 0, value: d * D }]);
        for (const sol of report.solutions) {
          expect(Math.abs(fourBarResidual(s.map((x) => x * D), sol.angles[0], sol.angles[3]))).toBeLessThan(1e-12);
          checked++;
        }
      }
      expect(checked).toBeGreaterThan(6);
    });
  }
});

describe('degrees of freedom of a single vertex (common practice: a degree-n vertex has n − 3)', () => {
  const sets = [[120, 110, 130], [90, 90, 90, 90], [60, 70, 80, 70, 80], [50, 60, 70, 50, 60, 70], [40, 50, 60, 45, 55, 50, 60], [45, 45, 45, 45, 45, 45, 45, 45]];
  for (const s of sets) {
    it(`degree ${s.length}`, () => {
      expect(patternDegreesOfFreedom(vertexPattern(directionsFromSectors(s)))).toBe(s.length - 3);
    });
  }
});

describe('flat-folded states (Kawasaki and Maekawa theorems, facts of the trade)', () => {
  // At exactly ±180° the side a panel went to is lost (R(u, π) = R(u, −π)), so the states are taken at a
  // drive of 179.99°, where every folding crease is within a small margin of ±180° and its side is plain.
  it('flat-folded states reached from flat obey Maekawa (|M − V| = 2) and Kawasaki (alternate sectors sum to 180°)', () => {
    const sets = [[60, 100, 120, 80], [45, 80, 135, 100], [70, 50, 110, 130], [30, 70, 150, 110]];
    for (const s of sets) {
      const p = vertexPattern(directionsFromSectors(s));
      const problem = new ClosureProblem(p, (c) => c === 0);
      const target = [{ crease: 0, value: 179.99 * D }];
      let flatFolded = 0;
      for (const ray of flatCone(p, { ratio: target }).rays) {
        const { result } = followRay(problem, target, ray.tangent, new Float64Array(s.length));
        if (!result?.converged) continue;
        const angles = Array.from(result.angles);
        if (!angles.every((a) => Math.abs(Math.abs(a) - Math.PI) < 0.5 * D)) continue;
        flatFolded++;
        const m = angles.filter((a) => a < 0).length;
        const v = angles.filter((a) => a > 0).length;
        expect(Math.abs(m - v)).toBe(2);
        const alt = s.reduce((acc, x, i) => acc + (i % 2 === 0 ? x : -x), 0);
        expect(Math.abs(alt)).toBeLessThan(1e-9);
      }
      expect(flatFolded).toBe(2);
    }
  });

  it('a vertex that breaks Kawasaki has no flat-folded state with every crease folded', () => {
    const p = vertexPattern(directionsFromSectors([70, 95, 100, 95]));
    const report = solveDrives(p, [{ crease: 0, value: Math.PI }]);
    for (const s of report.solutions) {
      const allFlat = Array.from(s.angles).every((a) => Math.abs(Math.abs(a) - Math.PI) < 1e-6);
      expect(allFlat).toBe(false);
    }
  });
});
