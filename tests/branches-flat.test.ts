// Branch analysis at the flat state and at folded states, against published first-order relations.
import { describe, expect, it } from 'vitest';
import { branchesAt, flatBranches } from '../solver/paths/branches';
import { flatCone } from '../solver/paths/cone';
import { miura, degree4Assignment, waterbomb } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { sweep, secondOrderRows } from '../solver/paths/sweep';
import { ClosureProblem } from '../solver/closure/newton';
import { buildClosureSystem, evaluateClosure } from '../solver/closure/blocks';
import { directionsFromSectors, vertexPattern } from './support/vertex';
import { degree4Chain } from './support/references';

const D = Math.PI / 180;

/**
 * Flat-foldable degree-4 vertex, sectors α, β, 180°−α, 180°−β. Published fold-angle multipliers (T. Tachi,
 * J. IASS 50(3) 2009; T. Evans, R. Lang, S. Magleby, L. Howell, R. Soc. Open Sci. 2:150067, 2015; R. Lang,
 * L. Howell, J. Mech. Robot. 10(2):021004, 2018): |tan(ρ1/2)| = k·|tan(ρ0/2)|, so at flat the first-order
 * ratio |t1/t0| is k itself:
 *   mode A (c0 = −c2, c1 = c3): k = |sin((α+β)/2) / sin((α−β)/2)|
 *   mode B (c0 = c2, c1 = −c3): k = |cos((α+β)/2) / cos((α−β)/2)|
 */
describe('flat-foldable degree-4 vertex: four rays at flat, each one of the published modes', () => {
  const cases: [number, number][] = [[60, 100], [45, 80], [30, 70], [75, 95], [50, 140], [85, 20]];
  for (const [a, b] of cases) {
    it(`sectors ${a}/${b}/${180 - a}/${180 - b}`, () => {
      const sectors = [a, b, 180 - a, 180 - b];
      const p = vertexPattern(directionsFromSectors(sectors), degree4Assignment(sectors));
      const r = flatBranches(p, { drive: 0 });
      expect(r.state).toBe('flat');
      expect(r.branches.length).toBe(4);
      expect(r.groups.length).toBe(2);
      const kA = Math.abs(Math.sin(((a + b) / 2) * D) / Math.sin(((a - b) / 2) * D));
      const kB = Math.abs(Math.cos(((a + b) / 2) * D) / Math.cos(((a - b) / 2) * D));
      const modeOf = (t: Float64Array) => {
        const r1 = t[1] / t[0], r2 = t[2] / t[0], r3 = t[3] / t[0];
        if (Math.abs(r2 + 1) < 1e-9 && Math.abs(r3 - r1) < 1e-9 && Math.abs(Math.abs(r1) - kA) < 1e-9) return 'A';
        if (Math.abs(r2 - 1) < 1e-9 && Math.abs(r3 + r1) < 1e-9 && Math.abs(Math.abs(r1) - kB) < 1e-9) return 'B';
        return '?';
      };
      const modes = r.branches.map((x) => modeOf(x.tangent));
      expect(modes.filter((m) => m === 'A').length).toBe(2);
      expect(modes.filter((m) => m === 'B').length).toBe(2);
      // the two rays of a group are one curve, both senses; ratios are relative to the drive c0
      for (const g of r.groups) {
        const [p1, p2] = g.branches.map((id) => r.branches.find((x) => x.id === id)!);
        expect(modeOf(p1.tangent)).toBe(modeOf(p2.tangent));
        expect(p1.tangent[0] * p2.tangent[0]).toBeLessThan(0);
        expect(p1.name.endsWith('+') && p2.name.endsWith('-')).toBe(true);
        expect(p1.ratios.get(0)).toBe(1);
      }
      // exactly one ray has the signs of a Maekawa assignment (3 + 1, odd crease at the smallest sector)
      expect(r.branches.filter((x) => x.matchesAssignment).length).toBe(1);
      // its curve is listed first (group A)
      expect(r.branches.find((x) => x.matchesAssignment)!.group).toBe('A');
      for (const x of r.branches) expect(x.verified).toBe(true);
    });
  }
});

function miuraSheet(rows: number, cols: number, alphaDeg: number) {
  const g = miura({ rows, cols, a: 40, b: 30, alphaDeg });
  const { pattern } = buildPattern(g.project!.source);
  return { pattern: pattern!, drive: pattern!.labelIndex.get(g.project!.drives[0].crease)! };
}

describe('Miura-ori sheet at flat', () => {
  it('has its Miura ray pair (straight/zigzag ratio cos α, Schenk & Guest 2013 to first order) and every straight line folding alone', () => {
    const alpha = 65;
    const { pattern, drive } = miuraSheet(2, 3, alpha);
    const r = flatBranches(pattern, { drive });
    expect(r.partial).toBe(false);
    const miuraRays = r.branches.filter((b) => b.kind === 'curve' && b.group === 'A');
    expect(miuraRays.length).toBe(2);
    expect(miuraRays.some((b) => b.matchesAssignment)).toBe(true);
    for (const b of miuraRays) {
      for (const c of pattern.creases) {
        if (c.assignment === 'B') continue;
        const want = c.label.startsWith('z') ? 1 : Math.cos(alpha * D);
        expect(Math.abs(Math.abs(b.ratios.get(c.index)!) - want), c.label).toBeLessThan(1e-9);
      }
    }
    // interior straight crease lines j = 1 … 2·rows − 1, each folding alone, both senses
    const lines = r.groups.filter((g) => g.kind === 'line');
    expect(lines.length).toBe(2 * 2 - 1);
    for (const g of lines) {
      expect(g.branches.length).toBe(2);
      const b = r.branches.find((x) => x.id === g.branches[0])!;
      const moving = [...b.ratios.keys()].map((c) => pattern.creases[c].label);
      const row = moving[0].split('_')[1];
      expect(moving.every((l) => l.startsWith('s') && l.endsWith(`_${row}`))).toBe(true);
      expect(moving.length).toBe(2 * 3);
      expect([...b.ratios.values()].every((v) => Math.abs(Math.abs(v) - 1) < 1e-12)).toBe(true);
    }
    expect(r.messages.some((m) => m.code === 'lines-together')).toBe(true);
    // ids are 1 … n, the assignment's curve first
    expect(r.branches.map((b) => b.id)).toEqual(r.branches.map((_, i) => i + 1));
  });

  it('a large sheet: every straight line, the assignment’s Miura curve first, and the cap on other curves said (partial)', () => {
    const alpha = 70;
    const { pattern, drive } = miuraSheet(12, 12, alpha);
    const r = flatBranches(pattern, { drive });
    expect(r.partial).toBe(true);
    expect(r.messages.some((m) => m.code === 'branches-partial')).toBe(true);
    const a = r.branches.filter((b) => b.group === 'A');
    expect(a.length).toBe(2);
    for (const c of pattern.creases) {
      if (c.assignment === 'B') continue;
      const want = c.label.startsWith('z') ? 1 : Math.cos(alpha * D);
      expect(Math.abs(Math.abs(a[0].ratios.get(c.index)!) - want)).toBeLessThan(1e-9);
    }
    expect(r.groups.filter((g) => g.kind === 'line').length).toBe(2 * 12 - 1);
  });

  it('the curves found vertex by vertex satisfy the whole-sheet tangent-cone equations, and hold every ray the dense analysis finds', () => {
    const { pattern, drive } = miuraSheet(2, 2, 55);
    const r = flatBranches(pattern, { drive });
    expect(r.partial).toBe(false);
    // the dense analysis (solver/paths/cone.ts: the linear null space of the whole sheet, then random starts
    // polished on the quadratic forms) is an independent route to the same cone
    const dense = flatCone(pattern, { starts: 200 });
    for (const ray of dense.rays) {
      const best = Math.max(...r.branches.map((b) => Math.abs(b.tangent.reduce((s, x, i) => s + x * ray.tangent[i], 0))));
      if (ray.straightLine || best > 1 - 1e-9) continue;
      // a dense ray not listed must be a mixture: lines or curves folding together (the cone's flat pieces)
      expect(r.messages.some((m) => m.code === 'curves-together' || m.code === 'lines-together')).toBe(true);
    }
    for (const b of r.branches) {
      for (const iv of pattern.interiorVertices) {
        let x = 0, y = 0, q = 0;
        iv.creases.forEach((c, i) => {
          x += b.tangent[c] * Math.cos(iv.directions[i]);
          y += b.tangent[c] * Math.sin(iv.directions[i]);
          iv.creases.forEach((c2, j) => { if (j > i) q += b.tangent[c] * b.tangent[c2] * Math.sin(iv.directions[j] - iv.directions[i]); });
        });
        expect(Math.hypot(x, y)).toBeLessThan(1e-12);
        expect(Math.abs(q)).toBeLessThan(1e-12);
      }
    }
    expect(r.branches.some((b) => b.matchesAssignment)).toBe(true);
  });
});

describe('branches at a folded state', () => {
  it('a regular state of a one-DOF path: the family in both senses, ratios equal to the path rates', () => {
    const { pattern, drive } = miuraSheet(2, 2, 60);
    const sign = pattern.creases[drive].assignment === 'M' ? -1 : 1;
    const s = sweep(pattern, { drive, from: sign * 50 * D, to: sign * 50 * D, step: D }).samples[0];
    const r = branchesAt(pattern, s.angles, { drive });
    expect(r.state).toBe('regular');
    expect(r.nullity).toBe(1);
    expect(r.branches.length).toBe(2);
    for (const c of pattern.creases) {
      if (c.assignment === 'B') continue;
      expect(Math.abs(r.branches[0].ratios.get(c.index)! - s.rates[c.index])).toBeLessThan(1e-8);
    }
  });

  it('a state that does not close has no branches and says so', () => {
    const p = vertexPattern(directionsFromSectors([90, 90, 90, 90]));
    const r = branchesAt(p, Float64Array.from([0.3, 0.1, 0, 0]));
    expect(r.branches.length).toBe(0);
    expect(r.messages[0].code).toBe('not-closed');
  });
});

describe('second order of the closure (the curvature right-hand side) against finite differences', () => {
  it('Q(v) = Σ_{a<b} v_a v_b (w_a × w_b) is d²r/dε² along v at a closed state', () => {
    const { pattern, drive } = miuraSheet(2, 2, 60);
    const sign = pattern.creases[drive].assignment === 'M' ? -1 : 1;
    const s = sweep(pattern, { drive, from: sign * 70 * D, to: sign * 70 * D, step: D }).samples[0];
    const sys = buildClosureSystem(pattern);
    const problem = new ClosureProblem(pattern, () => false, sys);
    problem.evaluate(s.angles, true);
    // any direction, not only the path's
    const v = new Float64Array(pattern.creases.length).map((_, i) => (pattern.creases[i].assignment === 'B' ? 0 : Math.sin(1 + 3 * i)));
    const Q = secondOrderRows(sys, problem.jacobian, v, new Float64Array(3 * sys.blockCount));
    const eps = 1e-4;
    const at = (e: number) => {
      const x = s.angles.map((a, i) => a + e * v[i]);
      const r = new Float64Array(3 * sys.blockCount);
      evaluateClosure(sys, x, r, null);
      return r;
    };
    const rp = at(eps), rm = at(-eps), r0 = at(0);
    let worst = 0, scale = 0;
    for (let i = 0; i < Q.length; i++) {
      const fd = (rp[i] + rm[i] - 2 * r0[i]) / (eps * eps);
      worst = Math.max(worst, Math.abs(fd - Q[i]));
      scale = Math.max(scale, Math.abs(Q[i]));
    }
    expect(scale).toBeGreaterThan(0.1);
    expect(worst / scale).toBeLessThan(1e-5);
  });
});

describe('every curve through flat, with ids that do not depend on the drive', () => {
  // two generic degree-4 vertices joined by a crease: each has two modes at flat (two lines of first-order
  // rates), and the shared crease ties one mode of each together: 2 × 2 curves; three in a row: 2 × 2 × 2
  // (common practice: a degree-4 vertex has two curves through the flat state, kinematics notes and Tachi 2009)
  for (const [count, curves] of [[2, 4], [3, 8]] as const) {
    it(`${count} vertices in a row: ${curves} curves, each a ray pair, each followed by a sweep from flat`, () => {
      const pattern = degree4Chain(count);
      const r = flatBranches(pattern);
      expect(r.partial).toBe(false);
      expect(r.groups.filter((g) => g.kind === 'curve').length).toBe(curves);
      expect(r.branches.length).toBe(2 * curves);
      for (const b of r.branches) expect(b.verified).toBe(true);
      // each is followed by a sweep (its branch id selects it)
      const drive = pattern.labelIndex.get('in')!;
      for (const b of r.branches) {
        const sense = Math.sign(b.tangent[drive]);
        const res = sweep(pattern, { drive, from: 0, to: sense * 10 * D, step: 2 * D, branch: b.id, method: 'continue' });
        expect(res.status, `${b.name}: ${res.messages.map((m) => m.text).join(' ')}`).toBe('complete');
        // the path leaves flat along the ray
        const first = res.samples[1];
        const t = first.angles.map((a) => a / first.angles[drive] * b.tangent[drive]);
        const cos = t.reduce((s, x, i) => s + x * b.tangent[i], 0) / Math.hypot(...t);
        expect(cos).toBeGreaterThan(0.99);
      }
    });
  }

  it('ids, names and tangents are the same whatever the drive; each ray prints its own signed ratios', () => {
    const pattern = degree4Chain(3);
    const a = flatBranches(pattern, { drive: pattern.labelIndex.get('in')! });
    const b = flatBranches(pattern, { drive: pattern.labelIndex.get('u2')! });
    const c = flatBranches(pattern);
    for (const other of [b, c]) {
      expect(other.branches.map((x) => [x.id, x.name])).toEqual(a.branches.map((x) => [x.id, x.name]));
      other.branches.forEach((x, i) => expect(Array.from(x.tangent)).toEqual(Array.from(a.branches[i].tangent)));
    }
    for (const g of a.groups) {
      const [plus, minus] = g.branches.map((id) => a.branches.find((x) => x.id === id)!);
      for (const [k, v] of plus.ratios) expect(minus.ratios.get(k)).toBeCloseTo(-v, 12);
    }
  });
});

describe('what the dense analysis can promise', () => {
  it('a degree-5 vertex and the waterbomb base (three or more dimensions of first-order motion at flat) are searched, and say the list is not proven complete', () => {
    // a generic degree-5 vertex: five creases, two first-order conditions, three dimensions (common practice:
    // the flat state's linear motions are the null space of the two rows Σρ cos θ = Σρ sin θ = 0)
    const five = vertexPattern(directionsFromSectors([60, 75, 70, 80, 75]));
    const r5 = flatBranches(five);
    expect(r5.partial).toBe(true);
    expect(r5.messages.find((m) => m.code === 'branches-searched')?.text).toMatch(/3-dimensional .* not proven/);
    expect(r5.branches.length).toBeGreaterThan(0);
    const wb = waterbomb({});
    const rw = flatBranches(buildPattern(wb.project!.source).pattern!);
    expect(rw.partial).toBe(true);
    expect(rw.messages.some((m) => m.code === 'branches-searched')).toBe(true);
    // a degree-4 vertex: two dimensions, the rays in closed form, complete
    const four = flatBranches(vertexPattern(directionsFromSectors([60, 100, 120, 80])));
    expect(four.partial).toBe(false);
    expect(four.messages.some((m) => m.code === 'branches-searched')).toBe(false);
  });
});
