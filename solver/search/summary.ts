// A large set of solutions in a few lines: how the solutions not shown differ from the first one shown,
// grouped by the straight crease lines they fold flat and by how many vertices close in another mode.

import type { Pattern, Solution } from '../types';
import { straightCreaseLines } from '../paths/cone';
import { wrapAngle } from '../math/rotation';

export interface SolutionGroup {
  /** how many solutions the group holds */
  count: number;
  /** 1-based numbers of the solutions in it (as the report orders them) */
  solutions: number[];
  /** straight crease lines (crease indices) these solutions fold flat and the reference does not */
  stackedLines: number[][];
  /** interior vertices whose creases take other signs than in the reference (besides the stacked lines) */
  vertices: number;
  text: string;
}

const FLAT = Math.PI - 1e-6;

function lineName(pattern: Pattern, line: number[]): string {
  const labels = line.map((c) => pattern.creases[c].label);
  return labels.length <= 3 ? labels.join('–') : `${labels[0]}–…–${labels[labels.length - 1]}`;
}

/** Group `others` (indices into solutions) by how they differ from solutions[reference]. */
export function groupSolutions(pattern: Pattern, solutions: Solution[], reference: number, others: number[]): SolutionGroup[] {
  const lines = straightCreaseLines(pattern);
  const ref = solutions[reference].angles;
  const groups = new Map<string, SolutionGroup>();
  for (const k of others) {
    const a = solutions[k].angles;
    const stacked = lines.filter((line) => line.every((c) => Math.abs(a[c]) >= FLAT) && !line.every((c) => Math.abs(ref[c]) >= FLAT));
    const onLines = new Set(stacked.flat());
    let vertices = 0;
    for (const iv of pattern.interiorVertices) {
      const differs = iv.creases.some((c) => !onLines.has(c) && Math.abs(wrapAngle(a[c] - ref[c])) > 1e-6 && Math.sign(a[c]) !== Math.sign(ref[c]));
      if (differs) vertices++;
    }
    const key = `${stacked.map((l) => l[0]).join(',')}|${vertices}`;
    let g = groups.get(key);
    if (!g) {
      const parts: string[] = [];
      if (stacked.length) parts.push(`fold ${stacked.length === 1 ? 'the crease line' : `${stacked.length} crease lines`} ${stacked.slice(0, 4).map((l) => lineName(pattern, l)).join(', ')}${stacked.length > 4 ? ', …' : ''} flat (±180°)`);
      if (vertices) parts.push(`close ${vertices} ${vertices === 1 ? 'vertex' : 'vertices'} with other signs`);
      if (!parts.length) parts.push('differ only in the size of some angles');
      g = { count: 0, solutions: [], stackedLines: stacked, vertices, text: parts.join(' and ') };
      groups.set(key, g);
    }
    g.count++;
    g.solutions.push(k + 1);
  }
  return [...groups.values()].sort((p, q) => q.count - p.count || p.solutions[0] - q.solutions[0]);
}
