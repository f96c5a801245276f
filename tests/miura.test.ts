// Miura-ori against M. Schenk, S. D. Guest, "Geometry of Miura-folded metamaterials", PNAS 110(9):3276, 2013.
import { describe, expect, it } from 'vitest';
import { solveDrives } from '../solver/search/solve';
import { foldedShape } from '../solver/outputs/shape';
import { miuraSheet as sheet } from './support/references';
import type { Pattern } from '../solver/types';

const D = Math.PI / 180;


const dist = (u: number[], v: number[]) => Math.hypot(u[0] - v[0], u[1] - v[1], u[2] - v[2]);

describe('Miura-ori folded unit cell (Schenk & Guest 2013)', () => {
  // θ is half the zigzag creases' fold angle; L = a√(1 − sin²θ sin²α), S = b cosθ tanα / √(1 + cos²θ tan²α);
  // the straight creases fold by tan(ρ_s/2) = cos α · tan(ρ_z/2).
  for (const [a, b, alpha] of [[40, 30, 70], [10, 10, 45], [25, 12, 55]] as const) {
    it(`a = ${a}, b = ${b}, α = ${alpha}°: cell dimensions from vertex positions over the fold range`, () => {
      const { pattern, drive, sign, vid } = sheet(2, 2, a, b, alpha);
      const al = alpha * D;
      for (const rz of [2, 15, 40, 75, 110, 145, 170, 179]) {
        const report = solveDrives(pattern, [{ crease: drive, value: sign * rz * D }], { starts: 0 });
        const sol = report.solutions.find((s) => s.matchesAssignment);
        expect(sol, `solution matching the assignment at ${rz}°`).toBeDefined();
        expect(sol!.maxResidual).toBeLessThanOrEqual(1e-10);
        const shape = foldedShape(pattern, sol!.angles);
        expect(shape.maxMismatch).toBeLessThan(1e-9 * a);
        const th = (rz / 2) * D;
        const L = a * Math.sqrt(1 - Math.sin(th) ** 2 * Math.sin(al) ** 2);
        const S = (b * Math.cos(th) * Math.tan(al)) / Math.sqrt(1 + Math.cos(th) ** 2 * Math.tan(al) ** 2);
        // one unit cell: vertices two apart along a straight crease line (2L) and across the lines (2S)
        const twoL = dist(shape.vertices[vid(1, 2)], shape.vertices[vid(3, 2)]);
        const twoS = dist(shape.vertices[vid(2, 1)], shape.vertices[vid(2, 3)]);
        expect(Math.abs(twoL / 2 - L) / L, `L at ${rz}°`).toBeLessThan(1e-9);
        expect(Math.abs(twoS / 2 - S) / S, `S at ${rz}°`).toBeLessThan(1e-9);
        for (const c of pattern.creases) {
          if (c.assignment === 'B') continue;
          const rho = Math.abs(sol!.angles[c.index]);
          // angles compared in degrees, to 1e-9°
          const expected = c.label.startsWith('z') ? rz * D : 2 * Math.atan(Math.cos(al) * Math.tan((rz * D) / 2));
          expect(Math.abs(rho - expected) / D, `${c.label} at ${rz}°`).toBeLessThan(1e-9);
        }
      }
    });
  }

  it('has one degree of freedom away from flat (Schenk & Guest 2013: a single-DOF mechanism)', () => {
    const { pattern, drive, sign } = sheet(2, 3, 40, 30, 70);
    const report = solveDrives(pattern, [{ crease: drive, value: sign * 50 * D }], { starts: 0 });
    expect(report.patternDof).toBe(1);
    expect(report.solutions[0].localDof).toBe(0);
    expect(report.solutions[0].matchesAssignment).toBe(true);
  });

  it('the sunshade-size sheet (4 × 6 cells) solves with its drive and every solution closes', () => {
    const { pattern, drive, sign } = sheet(4, 6, 40, 30, 70);
    const report = solveDrives(pattern, [{ crease: drive, value: sign * 60 * D }]);
    expect(['solved', 'several-solutions']).toContain(report.status);
    for (const s of report.solutions) expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
    expect(report.solutions[0].matchesAssignment).toBe(true);
    assertNoNaN(pattern, report.solutions[0].angles);
  });
});

function assertNoNaN(pattern: Pattern, angles: Float64Array) {
  for (const c of pattern.creases) expect(Number.isFinite(angles[c.index])).toBe(true);
}
