// Property tests (fast-check): the solver never throws on valid patterns, and whatever it returns as a
// solution closes every vertex to the tolerance.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { buildPattern } from '../solver/model/pattern';
import { solveDrives } from '../solver/search/solve';
import { RESIDUAL_TOLERANCE } from '../solver/closure/newton';
import { blockResiduals, buildClosureSystem } from '../solver/closure/blocks';
import type { Assignment, PatternSource } from '../solver/types';

/** A square sheet cut into an n × n grid whose interior vertices are moved at random (no crossings). */
function jitteredGrid(n: number, jitter: number[], assign: number[]): PatternSource {
  const vertices: [number, number][] = [];
  let k = 0;
  for (let j = 0; j <= n; j++)
    for (let i = 0; i <= n; i++) {
      const interior = i > 0 && j > 0 && i < n && j < n;
      const dx = interior ? 0.3 * jitter[k++ % jitter.length] : 0;
      const dy = interior ? 0.3 * jitter[k++ % jitter.length] : 0;
      vertices.push([i + dx, j + dy]);
    }
  const id = (i: number, j: number) => j * (n + 1) + i;
  const edges: [number, number][] = [];
  const assignments: Assignment[] = [];
  let q = 0;
  const kinds: Assignment[] = ['M', 'V', 'U'];
  for (let j = 0; j <= n; j++)
    for (let i = 0; i < n; i++) {
      edges.push([id(i, j), id(i + 1, j)]);
      assignments.push(j === 0 || j === n ? 'B' : kinds[assign[q++ % assign.length]]);
    }
  for (let i = 0; i <= n; i++)
    for (let j = 0; j < n; j++) {
      edges.push([id(i, j), id(i, j + 1)]);
      assignments.push(i === 0 || i === n ? 'B' : kinds[assign[q++ % assign.length]]);
    }
  return { name: 'jittered grid', vertices, edges, assignments, labels: edges.map(() => undefined), limits: edges.map(() => undefined) };
}

/** One vertex with random sectors, as a fan inside a polygonal rim. */
function randomVertex(cuts: number[], assign: number[]): PatternSource {
  const total = cuts.reduce((a, b) => a + b, 0);
  const dirs: number[] = [];
  let t = 0;
  for (const c of cuts) { dirs.push(t); t += (2 * Math.PI * c) / total; }
  const vertices: [number, number][] = [[0, 0], ...dirs.map((d) => [Math.cos(d), Math.sin(d)] as [number, number])];
  const edges: [number, number][] = dirs.map((_, i) => [0, i + 1]);
  const kinds: Assignment[] = ['M', 'V', 'U'];
  const assignments: Assignment[] = dirs.map((_, i) => kinds[assign[i % assign.length]]);
  dirs.forEach((_, i) => { edges.push([i + 1, ((i + 1) % dirs.length) + 1]); assignments.push('B'); });
  return { name: 'random vertex', vertices, edges, assignments, labels: edges.map(() => undefined), limits: edges.map(() => undefined) };
}

function checkReport(src: PatternSource, driveIndex: number, driveDeg: number) {
  const { pattern } = buildPattern(src);
  if (!pattern) return; // refused patterns are the readers' business (tests/malformed.property.test.ts)
  const movable = pattern.creases.filter((c) => c.assignment !== 'B' && c.assignment !== 'F');
  if (!movable.length) return;
  const crease = movable[driveIndex % movable.length].index;
  const report = solveDrives(pattern, [{ crease, value: (driveDeg * Math.PI) / 180 }], { starts: 4 });
  expect(report.status).toBeTypeOf('string');
  const sys = buildClosureSystem(pattern);
  const states = [...report.solutions, ...report.families.map((f) => f.representative)];
  for (const s of states) {
    expect(s.maxResidual).toBeLessThanOrEqual(RESIDUAL_TOLERANCE);
    // the residual it reports is the residual of the angles it returns
    expect(Math.max(0, ...blockResiduals(sys, s.angles))).toBeLessThanOrEqual(RESIDUAL_TOLERANCE);
    for (const a of s.angles) expect(Math.abs(a)).toBeLessThanOrEqual(Math.PI);
  }
  // solutions are isolated states; continua are families, each with its free directions
  for (const s of report.solutions) expect(s.localDof).toBe(0);
  for (const f of report.families) {
    expect(f.dof).toBeGreaterThan(0);
    expect(f.directions.length).toBe(f.dof);
  }
  if (!states.length) expect(['inconsistent', 'unreachable']).toContain(report.status);
  else if (!report.solutions.length) expect(['underspecified', 'not-isolated', 'overspecified', 'dependent-drives']).toContain(report.status);
  else expect(['solved', 'several-solutions', 'overspecified', 'dependent-drives']).toContain(report.status);
  if (report.search.complete) expect(report.search.limit).toBeUndefined();
}

describe('solver properties', () => {
  it('random single vertices: no throw, every solution closes', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0.2, max: 1, noNaN: true }), { minLength: 3, maxLength: 7 }),
        fc.array(fc.integer({ min: 0, max: 2 }), { minLength: 1, maxLength: 7 }),
        fc.nat(),
        fc.double({ min: -180, max: 180, noNaN: true }),
        (cuts, assign, d, deg) => checkReport(randomVertex(cuts, assign), d, deg),
      ),
      { numRuns: 60, seed: 20261201 },
    );
  });

  it('random jittered grids: no throw, every solution closes', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 3 }),
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 2, maxLength: 20 }),
        fc.array(fc.integer({ min: 0, max: 2 }), { minLength: 1, maxLength: 9 }),
        fc.nat(),
        fc.double({ min: -180, max: 180, noNaN: true }),
        (n, jitter, assign, d, deg) => checkReport(jitteredGrid(n, jitter, assign), d, deg),
      ),
      { numRuns: 25, seed: 7 },
    );
  });
});
