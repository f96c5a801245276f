// The geometry cleaning of drawn lines (solver/model/clean.ts), checked against plane geometry: the
// intersection of two lines (common practice), Euler's formula V − E + F = 2 for a connected plane graph
// (a fact of the trade), and what each step must count.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { cleanSegments, DEFAULT_SNAP_FRACTION, type DrawnSegment, type Origin } from '../solver/model/clean';
import { buildPattern } from '../solver/model/pattern';
import type { Assignment } from '../solver/types';

type Seg = [number, number, number, number, Assignment?];
function clean(segs: Seg[], snap?: number) {
  const origins: Origin[] = segs.map((_, i) => ({ text: `line ${i}`, where: { line: i + 1 } }));
  const segments: DrawnSegment[] = segs.map(([x1, y1, x2, y2, a], i) => ({ a: [x1, y1], b: [x2, y2], assignment: a ?? 'U', origin: i }));
  return cleanSegments(segments, origins, snap);
}
const square = (s = 100): Seg[] => [[0, 0, s, 0, 'B'], [s, 0, s, s, 'B'], [s, s, 0, s, 'B'], [0, s, 0, 0, 'B']];
const build = (r: ReturnType<typeof clean>) =>
  buildPattern({ name: 't', vertices: r.vertices, edges: r.edges, assignments: r.assignments, labels: r.edges.map(() => undefined), limits: r.edges.map(() => undefined) });

describe('cleaning drawn lines', () => {
  it('two lines crossing away from their ends meet at the intersection point, with a warning', () => {
    // intersection of P1P2 and P3P4 by Cramer's rule (common practice)
    const [x1, y1, x2, y2, x3, y3, x4, y4] = [10, 20, 90, 70, 15, 85, 80, 5];
    const den = (x1 - x2) * (y3 - y4) - (y1 - y2) * (x3 - x4);
    const px = ((x1 * y2 - y1 * x2) * (x3 - x4) - (x1 - x2) * (x3 * y4 - y3 * x4)) / den;
    const py = ((x1 * y2 - y1 * x2) * (y3 - y4) - (y1 - y2) * (x3 * y4 - y3 * x4)) / den;
    const r = clean([[x1, y1, x2, y2, 'M'], [x3, y3, x4, y4, 'V']]);
    expect(r.counts.crossings).toBe(1);
    expect(r.edges).toHaveLength(4);
    const centre = r.vertices.find((v) => r.edges.filter((e) => e.includes(r.vertices.indexOf(v))).length === 4)!;
    expect(Math.hypot(centre[0] - px, centre[1] - py)).toBeLessThan(1e-12);
    const w = r.messages.find((m) => m.code === 'crossing-becomes-vertex')!;
    expect(w.severity).toBe('warning');
    expect(w.text).toMatch(/Line 0 and line 1 cross at/);
    expect(w.where?.line).toBe(1);
    // each half keeps its line's assignment
    expect(r.assignments.filter((a) => a === 'M')).toHaveLength(2);
  });

  it('lines drawn across the whole sheet through one point give one vertex there (V − E + F = 2)', () => {
    // the waterbomb's creases drawn as two diagonals and two midlines, each from rim to rim
    const r = clean([...square(), [0, 0, 100, 100], [100, 0, 0, 100], [50, 0, 50, 100], [0, 50, 100, 50]]);
    expect(r.counts.crossings).toBe(1);
    expect(r.vertices).toHaveLength(9);
    expect(r.edges).toHaveLength(16);
    const p = build(r).pattern!;
    expect(p.panels).toHaveLength(8);
    expect(p.vertices.length - p.creases.length + (p.panels.length + 1)).toBe(2);
    expect(p.interiorVertices).toHaveLength(1);
    expect(p.interiorVertices[0].creases).toHaveLength(8);
  });

  it('collinear overlapping pieces become one line; the overlap is counted', () => {
    const r = clean([...square(), [0, 50, 60, 50, 'V'], [40, 50, 100, 50, 'V']]);
    expect(r.counts.overlapsMerged).toBe(1);
    // 0–40, 40–60, 60–100 are joined back into one crease: the two inner vertices end only those pieces
    expect(r.counts.collinearJoined).toBe(2);
    expect(r.assignments.filter((a) => a === 'V')).toHaveLength(1);
    expect(build(r).pattern!.panels).toHaveLength(2);
  });

  it('a boundary line over a crease stays the outline (with a warning); a crease over an unassigned line keeps its assignment', () => {
    const r = clean([...square(), [0, 0, 100, 0, 'M'], [0, 50, 100, 50, 'V'], [0, 50, 100, 50, 'U']]);
    expect(r.messages.filter((m) => m.code === 'overlap-assignment')).toHaveLength(2);
    expect(r.assignments.filter((a) => a === 'M')).toHaveLength(0);
    expect(r.assignments.filter((a) => a === 'V')).toHaveLength(1);
    expect(r.assignments.filter((a) => a === 'U')).toHaveLength(0);
  });

  it('ends within the snap meet; ends farther apart do not', () => {
    const snap = 0.01;
    const near = clean([...square(), [0, 50, 50.004, 50, 'V'], [50, 50.003, 100, 50, 'V']], snap);
    expect(near.counts.endsSnapped).toBe(2);
    expect(build(near).pattern).toBeDefined();
    const far = clean([...square(), [0, 50, 50.02, 50, 'V'], [50, 50.03, 100, 50, 'V']], snap);
    expect(build(far).pattern).toBeUndefined();
  });

  it('trims a line that overshoots the rim and extends one that stops short, within the snap; a longer overshoot is refused', () => {
    const r = clean([...square(), [0, 50, 100.004, 50, 'V'], [50, 0, 50, 49.996, 'M']], 0.01);
    expect(r.counts.endsTrimmed).toBe(2);
    expect(r.messages.find((m) => m.code === 'ends-trimmed')!.text).toMatch(/by at most 0\.004/);
    // trimmed along its own line: the valley stays horizontal, the mountain vertical
    const p = build(r).pattern!;
    for (const c of p.creases.filter((k) => k.assignment !== 'B')) {
      const [a, b] = c.vertices.map((v) => p.vertices[v]);
      expect(Math.min(Math.abs(a[0] - b[0]), Math.abs(a[1] - b[1]))).toBeLessThan(1e-12);
    }
    const long = clean([...square(), [0, 50, 103, 50, 'V']], 0.01);
    expect(build(long).messages.some((m) => m.code === 'dangling-crease')).toBe(true);
  });

  it('removes the stub a crease leaves when it overshoots a corner; keeps the rest of the crease', () => {
    // a diagonal from (50, 50) passing 0.004 from the corner (100, 100) and ending 0.012 beyond it: not within
    // the 0.01 snap of the corner, its free end lies past both rim lines, so only the corner splits it
    const d = [Math.SQRT1_2, Math.SQRT1_2];
    const n = [-Math.SQRT1_2, Math.SQRT1_2];
    const end = [100 + 0.012 * d[0] + 0.004 * n[0], 100 + 0.012 * d[1] + 0.004 * n[1]];
    const r = clean([...square(), [50 + 0.004 * n[0], 50 + 0.004 * n[1], end[0], end[1], 'V'], [0, 100, 50 + 0.004 * n[0], 50 + 0.004 * n[1], 'M'], [100, 0, 50 + 0.004 * n[0], 50 + 0.004 * n[1], 'M'], [0, 0, 50 + 0.004 * n[0], 50 + 0.004 * n[1], 'M']], 0.01);
    expect(r.counts.stubsRemoved).toBe(1);
    expect(r.messages.find((m) => m.code === 'stub-removed')!.where?.line).toBe(5);
    const p = build(r).pattern!;
    expect(p.panels).toHaveLength(4);
    expect(p.interiorVertices).toHaveLength(1);
  });

  it('the default snap is a fixed fraction of the drawing\'s diagonal', () => {
    const r = clean(square(300));
    expect(r.snap).toBeCloseTo(DEFAULT_SNAP_FRACTION * Math.hypot(300, 300), 12);
  });

  it('random grids drawn as long lines with jittered ends planarize to the grid (Euler: V − E + F = 2)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 1000 }), (nx, ny, seed) => {
        let s = seed;
        const jitter = () => ((s = (s * 16807) % 2147483647) / 2147483647 - 0.5) * 2e-3; // within the 0.01 snap
        const segs: Seg[] = [...square()];
        for (let i = 1; i <= nx; i++) segs.push([(100 * i) / (nx + 1) + jitter(), jitter(), (100 * i) / (nx + 1) + jitter(), 100 + jitter(), 'M']);
        for (let j = 1; j <= ny; j++) segs.push([jitter(), (100 * j) / (ny + 1) + jitter(), 100 + jitter(), (100 * j) / (ny + 1) + jitter(), 'V']);
        const r = clean(segs, 0.01);
        expect(r.counts.crossings).toBe(nx * ny);
        expect(r.vertices).toHaveLength((nx + 2) * (ny + 2));
        const p = build(r).pattern!;
        expect(p.panels).toHaveLength((nx + 1) * (ny + 1));
        expect(p.vertices.length - p.creases.length + p.panels.length + 1).toBe(2);
      }),
      { numRuns: 40, seed: 12 },
    );
  });
});
