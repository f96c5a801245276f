// Built-in generators and the sample files: counts and geometry of the generated sheets, the flat-foldability
// facts of the trade on their vertices, and rigid closure of their suggested states checked with three.js
// quaternions (an independent library from the npm registry), never with our own solver.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Quaternion, Vector3 } from 'three';
import { degree4Assignment, degree5, isKawasaki, miura, singleVertex, waterbomb } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { loadPatternText } from '../solver/formats/project';
import { CAUTIONS } from '../solver/formats/cautions';
import { sampleFiles, SAMPLES_DIR } from '../scripts/make-samples';
import type { InteriorVertex, Pattern } from '../solver/types';

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;

function built(r: ReturnType<typeof miura>): Pattern {
  expect(r.messages).toEqual([]);
  const b = buildPattern(r.project!.source);
  expect(b.messages).toEqual([]);
  return b.pattern!;
}

/**
 * Rotation angle (radians) of R(u_1, ρ_1) ⋯ R(u_n, ρ_n) for the vertex's flat crease directions: zero exactly
 * when the panels around the vertex close up (the rotation-product condition for a rigid vertex, common
 * practice: e.g. Belcastro & Hull, "Modelling the folding of paper into three dimensions using affine
 * transformations", Linear Algebra Appl. 348, 2002). The sign convention of ρ and the product's direction
 * do not matter here: reversing either maps closed states to closed states.
 */
function closureError(iv: InteriorVertex, rho: (crease: number) => number): number {
  const q = new Quaternion();
  iv.creases.forEach((c, k) => {
    const t = iv.directions[k];
    q.multiply(new Quaternion().setFromAxisAngle(new Vector3(Math.cos(t), Math.sin(t), 0), rho(c)));
  });
  return 2 * Math.acos(Math.min(1, Math.abs(q.w)));
}

/** Maekawa: |#M − #V| = 2 at a flat-foldable vertex (a fact of the trade; T. Hull, "Origametry", CUP 2020, from memory). */
function maekawa(p: Pattern, iv: InteriorVertex): number {
  let m = 0;
  let v = 0;
  for (const c of iv.creases) {
    if (p.creases[c].assignment === 'M') m++;
    if (p.creases[c].assignment === 'V') v++;
  }
  return Math.abs(m - v);
}

/** Kawasaki: alternate sector sums are 180° each (a fact of the trade; Hull 2020, from memory). */
function alternateSums(sectors: number[]): [number, number] {
  let even = 0;
  let odd = 0;
  sectors.forEach((s, k) => (k % 2 === 0 ? (even += s) : (odd += s)));
  return [even * DEG, odd * DEG];
}

/**
 * Big-little-big: at a flat-foldable vertex the two creases bounding a strictly smallest sector have
 * opposite assignments (a fact of the trade; Hull 2020, from memory). Runs of equal smallest sectors are
 * left to the Maekawa check.
 */
function bigLittleBig(p: Pattern, iv: InteriorVertex): boolean {
  const n = iv.sectors.length;
  for (let k = 0; k < n; k++) {
    const s = iv.sectors[k];
    if (s < iv.sectors[(k + n - 1) % n] - 1e-9 && s < iv.sectors[(k + 1) % n] - 1e-9) {
      const a = p.creases[iv.creases[k]].assignment;
      const b = p.creases[iv.creases[(k + 1) % n]].assignment;
      if (a === b) return false;
    }
  }
  return true;
}

describe('singleVertex', () => {
  it('lays creases c0 … c{n−1} ccw from +x with the given sectors', () => {
    const sectors = [60, 100, 120, 80];
    const p = built(singleVertex({ sectorsDeg: sectors, radius: 50 }));
    expect(p.interiorVertices.length).toBe(1);
    const iv = p.interiorVertices[0];
    expect(iv.creases.map((c) => p.creases[c].label)).toEqual(['c0', 'c1', 'c2', 'c3']);
    iv.sectors.forEach((s, k) => expect(s * DEG).toBeCloseTo(sectors[k], 9));
    expect(Math.atan2(p.vertices[p.creases[iv.creases[0]].vertices[1]][1], 1)).toBe(0);
    expect(p.panels.length).toBe(4);
  });

  it('gives rim edges of at most 90° so a 180° sector keeps its panel', () => {
    const p = built(singleVertex({ sectorsDeg: [180, 90, 90] }));
    expect(p.panels.length).toBe(3);
    for (const c of p.creases) if (c.assignment === 'B') expect(c.length).toBeLessThanOrEqual(50 * Math.SQRT2 + 1e-9);
  });

  it('refuses sectors that do not make a flat sheet', () => {
    expect(singleVertex({ sectorsDeg: [90, 90, 90] }).messages[0]).toMatchObject({ code: 'sectors-not-360', where: { field: 'sectorsDeg' } });
    expect(singleVertex({ sectorsDeg: [90, -90, 360] }).messages[0]).toMatchObject({ code: 'bad-sectors', where: { field: 'sectorsDeg[1]' } });
    expect(singleVertex({ sectorsDeg: [180, 180], radius: 0 }).messages[0].code).toBe('bad-size');
    expect(singleVertex({ sectorsDeg: [180, 180], assignments: ['M', 'B' as never] }).messages[0].code).toBe('bad-assignment');
    expect(singleVertex({ sectorsDeg: [180, 180], assignments: ['M'] }).messages[0].code).toBe('bad-assignment');
  });

  it('assigns a flat-foldable degree-4 vertex by Maekawa (3 + 1) with the odd crease beside the smallest sector', () => {
    for (const sectors of [
      [60, 100, 120, 80],
      [70, 110, 110, 70],
      [100, 45, 80, 135],
      [30, 95, 150, 85],
    ]) {
      expect(isKawasaki(sectors)).toBe(true);
      const p = built(singleVertex({ sectorsDeg: sectors }));
      const iv = p.interiorVertices[0];
      expect(maekawa(p, iv)).toBe(2);
      expect(bigLittleBig(p, iv)).toBe(true);
      const [e, o] = alternateSums(iv.sectors);
      expect(e).toBeCloseTo(180, 9);
      expect(o).toBeCloseTo(180, 9);
    }
    expect(degree4Assignment([60, 100, 120, 80])).toEqual(['V', 'M', 'M', 'M']);
    // not flat-foldable: left unassigned
    expect(isKawasaki([80, 100, 90, 90])).toBe(false);
    expect(singleVertex({ sectorsDeg: [80, 100, 90, 90] }).project!.source.assignments.slice(0, 4)).toEqual(['U', 'U', 'U', 'U']);
  });

  it('the assignment and the suggested drive pick a rigidly closing mode: the published fold-angle multiplier (Evans et al., R. Soc. Open Sci. 2:150067, 2015; Lang & Howell, J. Mech. Robot. 10:021004, 2018)', () => {
    // sectors α, β, 180° − α, 180° − β; in the mode where c1 and c3 fold equally and c0, c2 opposite,
    // |tan(ρ_1/2)| = |sin((α+β)/2) / sin((α−β)/2)| · |tan(ρ_0/2)|
    const [alpha, beta] = [60, 100];
    const r = singleVertex({ sectorsDeg: [alpha, beta, 180 - alpha, 180 - beta] });
    const p = built(r);
    const iv = p.interiorVertices[0];
    const drive = r.project!.drives[0];
    expect(drive).toEqual({ crease: 'c0', angleDeg: 45 });
    const r0 = drive.angleDeg * RAD;
    const mult = Math.abs(Math.sin(((alpha + beta) / 2) * RAD) / Math.sin(((alpha - beta) / 2) * RAD));
    const r1 = 2 * Math.atan(mult * Math.tan(r0 / 2));
    const sign = (c: number) => (p.creases[c].assignment === 'M' ? -1 : 1);
    // magnitudes from the multiplier, signs from the generated assignment
    const rho = (c: number) => sign(c) * (c === 0 || c === 2 ? r0 : r1);
    expect(closureError(iv, rho)).toBeLessThan(1e-12);
    // the other signs for c1 and c3 do not close: the assignment is what selects the branch
    expect(closureError(iv, (c) => (c === 1 || c === 3 ? -rho(c) : rho(c)))).toBeGreaterThan(0.1);
  });
});

describe('miura', () => {
  const opts = { rows: 3, cols: 4, a: 40, b: 30, alphaDeg: 70 };
  const r = miura(opts);
  const p = built(r);
  const al = opts.alphaDeg * RAD;

  it('has (2·cols + 1)(2·rows + 1) vertices, 4·rows·cols panels and (2·cols − 1)(2·rows − 1) interior vertices', () => {
    expect(p.vertices.length).toBe((2 * opts.cols + 1) * (2 * opts.rows + 1));
    expect(p.panels.length).toBe(4 * opts.rows * opts.cols);
    expect(p.interiorVertices.length).toBe((2 * opts.cols - 1) * (2 * opts.rows - 1));
    expect(p.creases.length).toBe(2 * opts.cols * (2 * opts.rows + 1) + (2 * opts.cols + 1) * 2 * opts.rows);
  });

  it('matches the Miura-ori parametrisation of Schenk & Guest (PNAS 110:3276, 2013): segments a and b at angle α, flat cell 2a × 2b sin α', () => {
    for (const c of p.creases) {
      const [u, v] = c.vertices.map((k) => p.vertices[k]);
      if (c.label.startsWith('s')) {
        expect(c.length).toBeCloseTo(opts.a, 12);
        expect(v[1] - u[1]).toBeCloseTo(0, 12); // parallel to x
      } else {
        expect(c.length).toBeCloseTo(opts.b, 12);
        const angle = Math.acos(Math.abs(v[0] - u[0]) / c.length);
        expect(angle).toBeCloseTo(al, 12);
      }
    }
    const xs = p.vertices.map((v) => v[0]);
    const ys = p.vertices.map((v) => v[1]);
    expect(Math.max(...ys) - Math.min(...ys)).toBeCloseTo(opts.rows * 2 * opts.b * Math.sin(al), 10);
    expect(Math.max(...xs) - Math.min(...xs)).toBeCloseTo(opts.cols * 2 * opts.a + opts.b * Math.cos(al), 10);
    const area = p.panels.reduce((s, q) => s + q.area, 0);
    expect(area).toBeCloseTo(4 * opts.rows * opts.cols * opts.a * opts.b * Math.sin(al), 8); // parallelograms a × b sin α
  });

  it('every interior vertex is flat-foldable: Kawasaki, Maekawa 3 + 1, big-little-big; zigzag lines one sign each, alternating', () => {
    for (const iv of p.interiorVertices) {
      const [e, o] = alternateSums(iv.sectors);
      expect(e).toBeCloseTo(180, 9);
      expect(o).toBeCloseTo(180, 9);
      expect(maekawa(p, iv)).toBe(2);
    }
    const zig = new Map<number, Set<string>>();
    for (const c of p.creases) {
      const m = /^z(\d+)_\d+$/.exec(c.label);
      if (!m || c.assignment === 'B') continue;
      const i = Number(m[1]);
      if (!zig.has(i)) zig.set(i, new Set());
      zig.get(i)!.add(c.assignment);
    }
    expect(zig.size).toBe(2 * opts.cols - 1);
    for (const [i, set] of zig) {
      expect(set.size).toBe(1);
      if (zig.has(i + 1)) expect([...zig.get(i + 1)!][0]).not.toBe([...set][0]);
    }
  });

  it('closes rigidly at every interior vertex with tan(ρ_s/2) = cos α · tan(ρ_z/2) (Schenk & Guest 2013) and the generated signs', () => {
    const rz = 60 * RAD;
    const rs = 2 * Math.atan(Math.cos(al) * Math.tan(rz / 2));
    const rho = (c: number) => {
      const cr = p.creases[c];
      const mag = cr.label.startsWith('z') ? rz : rs;
      return cr.assignment === 'M' ? -mag : mag;
    };
    for (const iv of p.interiorVertices) expect(closureError(iv, rho)).toBeLessThan(1e-12);
    // with every straight crease's sign flipped the vertices do not close
    const flipped = (c: number) => (p.creases[c].label.startsWith('s') ? -rho(c) : rho(c));
    for (const iv of p.interiorVertices) expect(closureError(iv, flipped)).toBeGreaterThan(0.01);
  });

  it('suggests a zigzag drive near the centre, signed by its assignment', () => {
    const d = r.project!.drives;
    expect(d.length).toBe(1);
    expect(d[0].crease).toBe(`z${opts.cols}_${opts.rows}`);
    const c = p.creases[p.labelIndex.get(d[0].crease)!];
    expect(c.leftPanel >= 0 && c.rightPanel >= 0).toBe(true);
    expect(Math.sign(d[0].angleDeg)).toBe(c.assignment === 'V' ? 1 : -1);
    expect(Math.abs(d[0].angleDeg)).toBe(60);
  });

  it('refuses bad parameters with messages', () => {
    expect(miura({ ...opts, rows: 0 }).messages[0]).toMatchObject({ code: 'bad-count', where: { field: 'rows' } });
    expect(miura({ ...opts, cols: 1.5 }).messages[0].code).toBe('bad-count');
    expect(miura({ ...opts, a: -1 }).messages[0].code).toBe('bad-size');
    expect(miura({ ...opts, alphaDeg: 90 }).messages[0].code).toBe('bad-angle');
    expect(miura({ ...opts, rows: 300, cols: 300 }).messages[0].code).toBe('too-large');
  });
});

describe('waterbomb', () => {
  const r = waterbomb({ size: 80 });
  const p = built(r);
  const iv = p.interiorVertices[0];

  it('is a square with a degree-8 centre vertex: diagonals d0 … d3, midlines x0, x1 and y0, y1', () => {
    expect(iv.creases.length).toBe(8);
    expect(iv.creases.map((c) => p.creases[c].label)).toEqual(['x0', 'd0', 'y0', 'd1', 'x1', 'd2', 'y1', 'd3']);
    for (const s of iv.sectors) expect(s * DEG).toBeCloseTo(45, 12);
    expect(p.panels.reduce((s, q) => s + q.area, 0)).toBeCloseTo(80 * 80, 9);
  });

  it('as it folds flat: 4 V + 2 M hinges (Maekawa) with Kawasaki on the six hinge sectors, the y midline flat', () => {
    const hinges = iv.creases.filter((c) => p.creases[c].assignment !== 'F');
    expect(hinges.length).toBe(6);
    expect(maekawa(p, iv)).toBe(2);
    const dirs = iv.creases.map((c, k) => [c, iv.directions[k]] as const).filter(([c]) => p.creases[c].assignment !== 'F');
    const sectors = dirs.map(([, t], k) => (k + 1 < dirs.length ? dirs[k + 1][1] : dirs[0][1] + 2 * Math.PI) - t);
    const [e, o] = alternateSums(sectors);
    expect(e).toBeCloseTo(180, 9);
    expect(o).toBeCloseTo(180, 9);
    expect(['y0', 'y1'].map((l) => p.creases[p.labelIndex.get(l)!].assignment)).toEqual(['F', 'F']);
    // the five-DOF variant with every midline a hinge is 4 M + 4 V: it cannot fold flat (Maekawa fails)
    const all = built(waterbomb({ allMidlines: true }));
    expect(maekawa(all, all.interiorVertices[0])).toBe(0);
  });

  it('three drives for three DOF (6 hinges − 3); the symmetric closing they name exists with the x midline a mountain', () => {
    expect(r.project!.drives).toEqual(['d0', 'd1', 'd2'].map((crease) => ({ crease, angleDeg: 60 })));
    // every diagonal at 60° (valley), both x-midline halves at μ: scan μ, then refine by golden section
    const err = (mu: number) =>
      closureError(iv, (c) => {
        const l = p.creases[c].label;
        return l.startsWith('d') ? 60 * RAD : l === 'x0' || l === 'x1' ? mu : 0;
      });
    let best = 0;
    for (let mu = -Math.PI; mu <= Math.PI; mu += RAD) if (err(mu) < err(best)) best = mu;
    let lo = best - RAD;
    let hi = best + RAD;
    const g = (Math.sqrt(5) - 1) / 2;
    for (let k = 0; k < 200; k++) {
      const a = hi - g * (hi - lo);
      const b = lo + g * (hi - lo);
      if (err(a) < err(b)) hi = b;
      else lo = a;
    }
    const mu = (lo + hi) / 2;
    expect(err(mu)).toBeLessThan(1e-7);
    expect(mu).toBeLessThan(0); // a mountain, as assigned
  });
});

describe('degree5', () => {
  it('is a generic degree-5 vertex, unassigned, with two drives for its two DOF (5 − 3)', () => {
    const r = degree5();
    const p = built(r);
    const iv = p.interiorVertices[0];
    expect(iv.creases.length).toBe(5);
    expect(iv.sectors.reduce((s, x) => s + x, 0)).toBeCloseTo(2 * Math.PI, 12);
    expect(p.creases.filter((c) => c.assignment === 'U').length).toBe(5);
    expect(r.project!.drives.length).toBe(5 - 3);
    expect(degree5({ sectorsDeg: [90, 90, 180] }).messages[0].code).toBe('bad-sectors');
    expect(degree5({ sectorsDeg: [70, 70, 70, 70, 70] }).messages[0].code).toBe('sectors-not-360');
  });
});

describe('sample files', () => {
  const files = sampleFiles();

  it('are the files scripts/make-samples.ts writes (run it after changing a generator)', () => {
    expect(files.length).toBe(10); // a project and a FOLD file each, and the sunshade's DXF and SVG
    for (const [name, text] of files) expect(readFileSync(join(SAMPLES_DIR, name), 'utf8'), name).toBe(text);
  });

  it('load without errors or warnings in both formats, to the same pattern and drives, with the cautions in the notes', () => {
    const stems = new Set(files.map(([n]) => n.replace(/\.(hingeplan\.json|fold|dxf|svg)$/, '')));
    expect([...stems].sort()).toEqual(['gripper-cell', 'hinge-coupon', 'sunshade-panel', 'two-motor-rig']);
    for (const stem of stems) {
      const a = loadPatternText(readFileSync(join(SAMPLES_DIR, `${stem}.hingeplan.json`), 'utf8'), `${stem}.hingeplan.json`);
      const b = loadPatternText(readFileSync(join(SAMPLES_DIR, `${stem}.fold`), 'utf8'), `${stem}.fold`);
      expect(a.messages, stem).toEqual([]);
      expect(b.messages, stem).toEqual([]);
      expect(a.format).toBe('project');
      expect(b.format).toBe('fold');
      expect(b.pattern!.vertices).toEqual(a.pattern!.vertices);
      expect(b.pattern!.creases).toEqual(a.pattern!.creases);
      expect(b.drives).toEqual(a.drives);
      expect(a.drives!.length).toBeGreaterThan(0);
      expect(a.project!.units).toBe('mm');
      expect(a.project!.notes).toContain(CAUTIONS);
    }
  });

  it('drive what each pattern needs: 1 for the coupon and the sunshade, 2 for the rig, 3 for the gripper', () => {
    const drives = (stem: string) => loadPatternText(readFileSync(join(SAMPLES_DIR, `${stem}.hingeplan.json`), 'utf8')).drives!.length;
    expect([drives('hinge-coupon'), drives('sunshade-panel'), drives('two-motor-rig'), drives('gripper-cell')]).toEqual([1, 1, 2, 3]);
    const sun = loadPatternText(readFileSync(join(SAMPLES_DIR, 'sunshade-panel.hingeplan.json'), 'utf8')).pattern!;
    expect(sun.panels.length).toBe(4 * 4 * 6);
    expect(sun.creases[sun.labelIndex.get('s0_1')!].length).toBeCloseTo(40, 12);
    expect(sun.creases[sun.labelIndex.get('z1_0')!].length).toBeCloseTo(30, 12);
  });
});
