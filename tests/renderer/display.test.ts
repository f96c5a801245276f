// What the views show: the status in words, the hinge table and its CSV, the tint scale, coinciding
// curves drawn once, crease picking.
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import fc from 'fast-check';
import { CAUTIONS } from '../../solver/formats/cautions';
import { buildPattern } from '../../solver/model/pattern';
import { miura } from '../../solver/model/generators';
import type { PathResultDto, ProjectDto, SolveResultDto } from '../../electron/contract';
import { groupCurves, hingeRows, hingeTableCsv, sortRows, statusInWords, type ShownState } from '../../renderer/state/display';
import { CreasePicker, segmentDistance } from '../../renderer/geometry';

const base: SolveResultDto = { status: 'solved', dof: 0, patternDof: 1, solutions: [], families: [], search: { complete: true, method: 'test', found: 0, note: '' }, messages: [], iterations: 3 };

describe('status in words', () => {
  it('names every status and says what to do', () => {
    expect(statusInWords(base, 1)).toMatchObject({ headline: 'Solved', tone: 'good' });
    expect(statusInWords({ ...base, status: 'underspecified', dof: 1, suggestedDrives: ['z1', 'z2'] }, 1).detail).toBe('1 degree of freedom left: the drives leave a family of states, not one state. Add a drive at z1, z2.');
    // overspecified but consistent is a note, and names the drive that follows from the others, not every drive
    const over = statusInWords({ ...base, status: 'overspecified', patternDof: 1, conflictingDrives: ['c1'] }, 2, ['c0', 'c1']);
    expect(over).toMatchObject({ headline: 'Overspecified, consistent', tone: 'note' });
    expect(over.detail).toContain('c1 follows from c0');
    expect(statusInWords({ ...base, status: 'overspecified', patternDof: 1, conflictingDrives: ['c0', 'c1'] }, 2, ['c0', 'c1']).detail).toContain('One of c0, c1 follows from the other; remove one.');
    // a drive past its hinge stop says so and keeps the last state on screen
    const stop = statusInWords({ ...base, status: 'invalid', messages: [{ severity: 'error', code: 'drive-outside-limit', text: 'Drive 1: 175° for crease c0 (index 0) is outside its hinge limits 0° … 170°.' }] }, 1);
    expect(stop.headline).toBe('Past a hinge stop');
    expect(stop.detail).toContain('last solved state stays on screen');
    expect(statusInWords({ ...base, status: 'underspecified', patternDof: 3, suggestedDrives: ['d0'] }, 0).detail).toContain('No drive is set; the pattern has 3 degrees of freedom');
    const inc = statusInWords({ ...base, status: 'inconsistent', conflictingDrives: ['a', 'b'], worstVertices: [[7, Math.PI / 180]] }, 2);
    expect(inc.headline).toBe('Inconsistent');
    expect(inc.detail).toContain('Conflicting drives: a, b.');
    expect(inc.detail).toContain('vertex 7 (1.00°)');
    expect(statusInWords({ ...base, status: 'unreachable', reachableRangeDeg: [[-120, 120]] }, 1).detail).toContain('Reachable: -120.0° to 120.0°.');
    expect(statusInWords({ ...base, status: 'dependent-drives', conflictingDrives: ['c0', 'c2'] }, 2).detail).toContain('c0, c2 move together');
    expect(statusInWords({ ...base, status: 'several-solutions', solutions: [{} as never, {} as never] }, 1).detail).toContain('2 folded states');
    expect(statusInWords(undefined, 0).headline).toBe('Not solved yet');
  });
});

const project: ProjectDto = {
  source: {
    name: 't',
    vertices: [[0, 0], [1, 0], [0, 1], [-1, 0], [0, -1]],
    edges: [[0, 1], [0, 2], [0, 3], [0, 4], [1, 2]],
    assignments: ['V', 'M', 'U', 'M', 'B'],
    labels: ['c0', 'label, with "quotes"', undefined, 'c3', 'rim'],
    limits: [{ min: 0, max: Math.PI / 2 }, undefined, undefined, undefined, undefined],
  },
  drives: [{ crease: 'c0', angleDeg: 45 }],
};
const shown: ShownState = { anglesDeg: [100, 30, 0, -20, 0], rates: [1, 0.5, null, -0.25, null], source: 'solution', caption: 'solution 1 of 1' };

describe('hinge table', () => {
  const rows = hingeRows(project, shown);

  it('lists folding creases with their state in words', () => {
    expect(rows.map((r) => r.label)).toEqual(['c0', 'label, with "quotes"', '2', 'c3']);
    expect(rows[0].status).toBe('drive, past stop');
    expect(rows[0].violates).toBe(true);
    expect(rows[1].status).toBe('opposes M/V');
    expect(rows[3].status).toBe('ok');
  });

  it('sorts by any column, numbers as numbers', () => {
    expect(sortRows(rows, 'angle', false).map((r) => r.index)).toEqual([3, 2, 1, 0]);
    expect(sortRows(rows, 'angle', true).map((r) => r.index)).toEqual([0, 1, 2, 3]);
    expect(sortRows(rows, 'rate', true)[0].index).toBe(0);
  });

  it('copies as CSV that a reference parser (papaparse) reads back, with the cautions line', () => {
    const csv = hingeTableCsv(rows, 'solution 1 of 1');
    const lines = csv.split('\n');
    expect(lines[0]).toBe(`# ${CAUTIONS}`);
    const parsed = Papa.parse<string[]>(lines.slice(2).join('\n'), { skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data[0]).toEqual(['index', 'label', 'assignment', 'min_deg', 'max_deg', 'angle_deg', 'rate_deg_per_deg', 'status']);
    expect(parsed.data[2][1]).toBe('label, with "quotes"');
    expect(Number(parsed.data[1][5])).toBe(100);
    expect(parsed.data[1][4]).toBe('90.0000');
    expect(parsed.data[3][6]).toBe('');
  });
});

describe('path curves', () => {
  it('draws coinciding curves once: a Miura sheet folds along a handful of distinct curves', () => {
    // Miura-ori: every zigzag crease folds alike and every straight one alike, up to sign
    // (Schenk & Guest, PNAS 110(9):3276, 2013); an exactly solved path would show that. Here we feed such a
    // path and check the grouping, not the solver.
    const m = miura({ rows: 3, cols: 3, a: 20, b: 15, alphaDeg: 60 });
    const p = buildPattern(m.project!.source).pattern!;
    const creases = p.creases.filter((c) => c.assignment !== 'B').map((c) => c.index);
    const samples = [0, 30, 60].map((d) => ({
      driveDeg: d,
      anglesDeg: p.creases.map((c) => (c.assignment === 'B' ? 0 : (c.assignment === 'V' ? 1 : -1) * (c.label.startsWith('z') ? d : d / 2))),
      maxResidual: 0,
      rates: p.creases.map(() => 1),
      condition: 1,
      nearSingular: false,
    }));
    const path: PathResultDto = { pathId: 'x', driveCrease: 0, driveLabel: 'z0', samples, events: [], messages: [], complete: true };
    const groups = groupCurves(path, creases, 'angle');
    expect(groups.length).toBe(4);
    expect(groups.reduce((n, g) => n + g.creases.length, 0)).toBe(creases.length);
    expect(groupCurves(path, creases, 'rate').length).toBe(1);
  });
});

describe('crease picking', () => {
  const m = miura({ rows: 4, cols: 5, a: 20, b: 15, alphaDeg: 65 });
  const p = buildPattern(m.project!.source).pattern!;
  const picker = new CreasePicker(p);
  it('finds the same crease as checking every crease, within the tolerance', () => {
    fc.assert(
      fc.property(fc.double({ min: -5, max: 215, noNaN: true }), fc.double({ min: -5, max: 120, noNaN: true }), (x, y) => {
        const tol = 2;
        let best: number | null = null;
        let bestD = tol;
        for (const c of p.creases) {
          const [a, b] = c.vertices;
          const d = segmentDistance(x, y, p.vertices[a][0], p.vertices[a][1], p.vertices[b][0], p.vertices[b][1]);
          if (d < bestD) {
            bestD = d;
            best = c.index;
          }
        }
        const got = picker.pick(x, y, tol);
        if (best === null) return got === null;
        // ties between creases meeting at a vertex may resolve either way: compare distances
        const [a, b] = p.creases[got!].vertices;
        return Math.abs(segmentDistance(x, y, p.vertices[a][0], p.vertices[a][1], p.vertices[b][0], p.vertices[b][1]) - bestD) < 1e-12;
      }),
      { numRuns: 400 },
    );
  });
});
