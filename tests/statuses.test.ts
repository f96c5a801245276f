// Each status of a partial specification, produced by a case built for it.
import { describe, expect, it } from 'vitest';
import { solveDrives } from '../solver/search/solve';
import { directionsFromSectors, vertexPattern } from './support/vertex';
import { fourBarInputLimit } from './support/references';
import type { Pattern } from '../solver/types';

const D = Math.PI / 180;

function withLimits(p: Pattern, minDeg: number, maxDeg: number): Pattern {
  for (const c of p.creases) c.limit = { min: minDeg * D, max: maxDeg * D };
  return p;
}


describe('specification statuses', () => {
  it('solved: a hinge coupon with ±170° hinge stops and one zigzag drive has one state', () => {
    const p = withLimits(vertexPattern(directionsFromSectors([70, 110, 110, 70])), -170, 170);
    const r = solveDrives(p, [{ crease: 1, value: 60 * D }]);
    expect(r.status).toBe('solved');
    expect(r.solutions).toHaveLength(1);
    expect(r.dof).toBe(0);
    expect(r.excluded?.length).toBe(1); // the state folded flat along the straight crease line
    expect(r.messages.some((m) => m.code === 'outside-hinge-limits')).toBe(true);
  });

  it('several solutions: a flat-foldable degree-4 vertex driven on one crease has two modes', () => {
    const r = solveDrives(vertexPattern(directionsFromSectors([60, 100, 120, 80])), [{ crease: 0, value: 60 * D }]);
    expect(r.status).toBe('several-solutions');
    expect(r.solutions).toHaveLength(2);
  });

  it('underspecified: a degree-5 vertex with one drive leaves one DOF and names a crease to drive', () => {
    const r = solveDrives(vertexPattern(directionsFromSectors([60, 70, 80, 70, 80])), [{ crease: 0, value: 50 * D }]);
    expect(r.status).toBe('underspecified');
    expect(r.dof).toBe(1);
    expect(r.patternDof).toBe(2);
    expect(r.suggestedDrives?.length).toBe(1);
    // a continuum: one family with one free direction, not a list of its members
    expect(r.solutions).toHaveLength(0);
    expect(r.families.length).toBeGreaterThanOrEqual(1);
    expect(r.families[0].dof).toBe(1);
    expect(r.families[0].directions).toHaveLength(1);
    // the suggestion really completes the specification
    const sol = r.families[0].representative;
    const c = r.suggestedDrives![0];
    const again = solveDrives(vertexPattern(directionsFromSectors([60, 70, 80, 70, 80])), [
      { crease: 0, value: 50 * D },
      { crease: c, value: sol.angles[c] },
    ]);
    expect(['solved', 'several-solutions']).toContain(again.status);
  });

  it('overspecified but consistent: both crease angles of one mode given', () => {
    const p = vertexPattern(directionsFromSectors([60, 100, 120, 80]));
    const one = solveDrives(p, [{ crease: 0, value: 60 * D }]);
    const rho1 = one.solutions[0].angles[1];
    const r = solveDrives(p, [{ crease: 0, value: 60 * D }, { crease: 1, value: rho1 }]);
    expect(r.status).toBe('overspecified');
    expect(r.solutions).toHaveLength(1);
    expect(r.solutions[0].maxResidual).toBeLessThanOrEqual(1e-10);
  });

  it('inconsistent: two drives that no mode allows together, with the compromise and the conflict', () => {
    const r = solveDrives(vertexPattern(directionsFromSectors([60, 100, 120, 80])), [{ crease: 0, value: 50 * D }, { crease: 1, value: 20 * D }]);
    expect(r.status).toBe('inconsistent');
    expect(r.solutions).toHaveLength(0);
    expect(r.compromise).toBeDefined();
    expect(r.compromise!.maxResidual).toBeGreaterThan(1e-3);
    expect(r.compromise!.vertexResiduals).toHaveLength(1);
    expect(new Set(r.conflictingDrives)).toEqual(new Set([0, 1]));
  });

  it('unreachable: a drive past the four-bar limit of a generic vertex, with the reachable range', () => {
    const sectors = [50, 150, 60, 100];
    const p = vertexPattern(directionsFromSectors(sectors));
    const limit = fourBarInputLimit(sectors.map((s) => s * D));
    const r = solveDrives(p, [{ crease: 0, value: 100 * D }]);
    expect(r.status).toBe('unreachable');
    expect(r.reachableRange).toHaveLength(1);
    const [lo, hi] = r.reachableRange![0];
    expect(Math.abs(hi - limit) / D).toBeLessThan(1e-3);
    expect(Math.abs(lo + limit) / D).toBeLessThan(1e-3);
    // just inside the limit it solves
    expect(solveDrives(p, [{ crease: 0, value: limit - 0.01 * D }]).solutions.length).toBeGreaterThan(0);
  });

  it('not isolated: a zigzag drive held at 0 lets the straight crease line fold freely', () => {
    const r = solveDrives(vertexPattern(directionsFromSectors([70, 110, 110, 70])), [{ crease: 1, value: 0 }]);
    expect(r.status).toBe('not-isolated');
    expect(r.dof).toBe(1);
  });
});

describe('a continuum is one family, not its members', () => {
  it('the two-motor rig (a degree-5 vertex) with one drive: no solutions, one one-DOF family with its free direction', async () => {
    const { loadPatternText } = await import('../solver/formats/project');
    const { readFileSync } = await import('node:fs');
    const loaded = loadPatternText(readFileSync('samples/two-motor-rig.hingeplan.json', 'utf8'), 'two-motor-rig.hingeplan.json');
    const p = loaded.pattern!;
    const r = solveDrives(p, [{ crease: p.labelIndex.get('c0')!, value: 40 * D }]);
    expect(r.status).toBe('underspecified');
    expect(r.solutions).toHaveLength(0);
    // the degree-5 vertex with one crease fixed is a spherical 4R loop, whose states form at most two closed
    // curves (its assembly circuits; J. M. McCarthy, G. S. Soh, "Geometric Design of Linkages", 2nd ed., 2011,
    // ch. 5, from memory): every state found lies on one of at most two families, not dozens
    expect(r.families.length).toBeGreaterThanOrEqual(1);
    expect(r.families.length).toBeLessThanOrEqual(2);
    for (const f of r.families) expect(f.dof).toBe(1);
    const dir = r.families[0].directions[0];
    expect(Math.hypot(...dir.values())).toBeCloseTo(1, 12);
    expect(r.families[0].representative.maxResidual).toBeLessThanOrEqual(1e-10);
  });
});

describe('the sparse null space (used above the dense size) agrees with the dense one', () => {
  it('at a state of the two-motor rig family: the same one-dimensional null space as pivoted QR', async () => {
    const { loadPatternText } = await import('../solver/formats/project');
    const { ClosureProblem } = await import('../solver/closure/newton');
    const { analyzeState } = await import('../solver/closure/analysis');
    const { familyDirections } = await import('../solver/search/classify');
    const { readFileSync } = await import('node:fs');
    const loaded = loadPatternText(readFileSync('samples/two-motor-rig.hingeplan.json', 'utf8'), 'two-motor-rig.hingeplan.json');
    const p = loaded.pattern!;
    const drive = { crease: p.labelIndex.get('c0')!, value: 40 * D };
    const state = solveDrives(p, [drive]).families[0].representative.angles;
    const problem = new ClosureProblem(p, (c) => c === drive.crease);
    const free = Array.from(problem.unknownCreases);
    problem.evaluate(state);
    const dense = familyDirections(problem, free, analyzeState(problem, free), state);
    const sparse = familyDirections(problem, free, undefined, state);
    expect(dense).toHaveLength(1);
    expect(sparse).toHaveLength(1);
    let dot = 0;
    for (const [c, v] of dense[0]) dot += v * (sparse[0].get(c) ?? 0);
    expect(Math.abs(Math.abs(dot) - 1)).toBeLessThan(1e-9);
  });
});
