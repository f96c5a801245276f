// Statuses that need more than one vertex: a sheet with a degree-4 vertex and, beside it, a straight crease
// line across the sheet (two DOF: the vertex's mode and the line).
import { describe, expect, it } from 'vitest';
import { buildPattern } from '../solver/model/pattern';
import { solveDrives } from '../solver/search/solve';
import type { Assignment, PatternSource } from '../solver/types';

const D = Math.PI / 180;

function vertexAndLine(): PatternSource {
  // vertex at (1, 1), creases at 90°, 150°, 250°, 330° reaching the rim of the 4 × 2 sheet; line x = 3
  const s30 = Math.tan(30 * D);
  const vertices: [number, number][] = [
    [1, 1], // 0 vertex
    [1, 2], [0, 1 + s30], [1 - 1 / Math.tan(70 * D), 0], [1 + 1 / s30, 0], // 1-4 crease ends
    [0, 0], [3, 0], [4, 0], [4, 2], [3, 2], [0, 2], // 5-10 rim corners and line ends
  ];
  const edges: [number, number][] = [[0, 1], [0, 2], [0, 3], [0, 4], [6, 9]];
  const assignments: Assignment[] = ['U', 'U', 'U', 'U', 'V'];
  const labels: (string | undefined)[] = ['c0', 'c1', 'c2', 'c3', 'line'];
  const rim = [5, 3, 4, 6, 7, 8, 9, 1, 10, 2];
  rim.forEach((v, i) => { edges.push([v, rim[(i + 1) % rim.length]]); assignments.push('B'); labels.push(undefined); });
  return { name: 'vertex and line', vertices, edges, assignments, labels, limits: edges.map(() => undefined) };
}

describe('sheet statuses', () => {
  const { pattern, messages } = buildPattern(vertexAndLine());

  it('builds with two DOF', () => {
    expect(messages.filter((m) => m.severity === 'error')).toEqual([]);
    const r = solveDrives(pattern!, [{ crease: 0, value: 40 * D }]);
    expect(r.patternDof).toBe(2);
    expect(r.status).toBe('underspecified');
    expect(r.suggestedDrives).toEqual([4]); // the line is what is left to drive
  });

  it('dependent drives: two creases of the one vertex cannot be set independently', () => {
    const first = solveDrives(pattern!, [{ crease: 0, value: 40 * D }, { crease: 4, value: 10 * D }]);
    expect(['solved', 'several-solutions']).toContain(first.status);
    const rho1 = first.solutions[0].angles[1];
    const r = solveDrives(pattern!, [{ crease: 0, value: 40 * D }, { crease: 1, value: rho1 }]);
    expect(r.status).toBe('dependent-drives');
    expect(new Set(r.conflictingDrives)).toEqual(new Set([0, 1]));
    // the line still folds freely: the states are a family, not solutions
    expect(r.solutions).toHaveLength(0);
    expect(r.families[0].dof).toBe(1);
    expect(r.families[0].representative.maxResidual).toBeLessThanOrEqual(1e-10);
  });

  it('inconsistent when the dependent drives disagree', () => {
    const r = solveDrives(pattern!, [{ crease: 0, value: 40 * D }, { crease: 1, value: 5 * D }]);
    expect(r.status).toBe('inconsistent');
    expect(r.compromise!.maxResidual).toBeGreaterThan(1e-4);
  });
});
