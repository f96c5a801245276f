// Minimal hand-built patterns for tests of the numeric kernels, independent of the file readers.
import type { Crease, Pattern } from '../../solver/types';

/** One interior vertex at the origin with creases at the given ccw direction angles (radians). */
export function vertexPattern(directions: number[], assignments: Crease['assignment'][] = []): Pattern {
  const vertices: [number, number][] = [[0, 0], ...directions.map((t) => [Math.cos(t), Math.sin(t)] as [number, number])];
  const creases: Crease[] = directions.map((_, i) => ({
    index: i,
    label: `c${i}`,
    vertices: [0, i + 1],
    assignment: assignments[i] ?? 'U',
    leftPanel: i,
    rightPanel: (i + directions.length - 1) % directions.length,
    length: 1,
  }));
  const sectors = directions.map((t, i) => {
    const next = i + 1 < directions.length ? directions[i + 1] : directions[0] + 2 * Math.PI;
    return next - t;
  });
  return {
    name: 'test vertex',
    vertices,
    creases,
    panels: [],
    interiorVertices: [{ vertex: 0, creases: creases.map((c) => c.index), directions, sectors, defect: 0 }],
    holes: [],
    basePanel: 0,
    labelIndex: new Map(creases.map((c) => [c.label, c.index])),
    size: 2,
  };
}

/** Directions from sector angles (degrees), first crease along +x. */
export function directionsFromSectors(sectorsDeg: number[]): number[] {
  const out: number[] = [];
  let t = 0;
  for (let i = 0; i < sectorsDeg.length; i++) {
    out.push(t);
    t += (sectorsDeg[i] * Math.PI) / 180;
  }
  return out;
}
