// Drawings out and back: DXF → project → DXF keeps geometry and assignments (and labels), as does SVG;
// our DXF is read by a general-purpose DXF reader from the npm registry (dxf-parser) with the same layers,
// lines and texts; a Miura-ori sheet drawn in mm in SVG solves as the generator's sheet does.
import { describe, expect, it } from 'vitest';
import DxfParserModule from 'dxf-parser';
import { DOMParser } from '@xmldom/xmldom';
import { loadPatternText, type Project } from '../solver/formats/project';
import { writeDxf } from '../solver/formats/dxf-write';
import { writeSvg } from '../solver/formats/svg-write';
import { CAUTIONS } from '../solver/formats/cautions';
import { miura, singleVertex, waterbomb } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { solveDrives } from '../solver/search/solve';
import type { Pattern } from '../solver/types';

const D = Math.PI / 180;
// dxf-parser ships a CommonJS bundle and an ES module; under either the class is the default export
const DxfParser = ((DxfParserModule as unknown as { default?: unknown }).default ?? DxfParserModule) as typeof DxfParserModule;
const q6 = (x: number) => (Math.round(x * 1e6) / 1e6 + 0).toFixed(6);

/** Edges as position-keyed strings (rounded to 1e-9 of the sheet), with assignment and label: order-free. */
function edgeSet(p: Pattern, withLabels = true): string[] {
  const q = (x: number) => q6(Math.round(x / (p.size * 1e-9)) * p.size * 1e-9);
  return p.creases
    .map((c) => {
      const [a, b] = c.vertices.map((v) => `${q(p.vertices[v][0])},${q(p.vertices[v][1])}`).sort();
      return `${a}|${b}|${c.assignment}${withLabels ? `|${c.label}` : ''}`;
    })
    .sort();
}

const build = (project: Project) => buildPattern(project.source).pattern!;

const cases: [string, Project][] = [
  ['hinge coupon (single vertex, labels c0…c3, rim pieces)', singleVertex({ sectorsDeg: [60, 100, 120, 80] }).project!],
  ['Miura-ori 3 × 4 cells', { ...miura({ rows: 3, cols: 4, a: 40, b: 30, alphaDeg: 70 }).project!, units: 'mm' }],
  ['waterbomb base', { ...waterbomb({ size: 80 }).project!, units: 'in' }],
];

describe('round trips through the drawing writers keep geometry, assignments and labels', () => {
  for (const [name, project] of cases) {
    it(`${name}: project → DXF → project → DXF`, () => {
      const original = build(project);
      const dxf = writeDxf(project);
      const back = loadPatternText(dxf, 'out.dxf');
      expect(back.messages.filter((m) => m.severity !== 'info'), JSON.stringify(back.messages)).toEqual([]);
      expect(edgeSet(back.pattern!)).toEqual(edgeSet(original));
      expect(back.project!.units).toBe(project.units);
      // and once more: the DXF of what was read is the same drawing
      const again = loadPatternText(writeDxf(back.project!), 'again.dxf');
      expect(edgeSet(again.pattern!)).toEqual(edgeSet(original));
    });
    it(`${name}: project → SVG → project → SVG`, () => {
      const original = build(project);
      const svg = writeSvg(project);
      const back = loadPatternText(svg, 'out.svg');
      expect(back.messages.filter((m) => m.severity === 'error' || m.severity === 'warning'), JSON.stringify(back.messages)).toEqual([]);
      expect(edgeSet(back.pattern!)).toEqual(edgeSet(original));
      expect(back.project!.units).toBe(project.units === 'in' ? 'in' : project.units ? 'mm' : undefined);
      const again = loadPatternText(writeSvg(back.project!), 'again.svg');
      expect(edgeSet(again.pattern!)).toEqual(edgeSet(original));
    });
  }

  it('a drafted DXF read, written and read again gives the same pattern (DXF → project → DXF)', async () => {
    const { readFileSync } = await import('node:fs');
    const { join } = await import('node:path');
    const first = loadPatternText(readFileSync(join(__dirname, 'fixtures', 'drawings', 'coupon-r12.dxf'), 'utf8'), 'coupon.dxf');
    const second = loadPatternText(writeDxf(first.project!), 'coupon-again.dxf');
    expect(edgeSet(second.pattern!, false)).toEqual(edgeSet(first.pattern!, false));
    expect(second.cleaning!.duplicates + second.cleaning!.zeroLength + second.cleaning!.crossings).toBe(0);
  });
});

describe('our DXF read by a general-purpose DXF reader (dxf-parser, npm)', () => {
  it('has a layer per assignment, the outline as one closed polyline, a LINE per crease and a TEXT per label', () => {
    const project = miura({ rows: 2, cols: 3, a: 40, b: 30, alphaDeg: 70 }).project!;
    const p = build(project);
    const dxf = new DxfParser().parseSync(writeDxf({ ...project, units: 'mm' }))!;
    expect(Object.keys(dxf.tables.layer.layers).sort()).toEqual(['0', 'boundary', 'labels', 'mountain', 'valley']);
    expect((dxf.header as Record<string, unknown>).$INSUNITS).toBe(4); // millimetres (DXF reference, $INSUNITS)
    const polylines = dxf.entities.filter((e) => e.type === 'POLYLINE');
    expect(polylines).toHaveLength(1);
    const outline = polylines[0] as unknown as { layer: string; shape: boolean; vertices: unknown[] };
    expect(outline.layer).toBe('boundary');
    expect(outline.shape).toBe(true); // closed
    expect(outline.vertices).toHaveLength(p.creases.filter((c) => c.assignment === 'B').length);
    const lines = dxf.entities.filter((e) => e.type === 'LINE');
    for (const a of ['M', 'V'] as const) {
      const layer = a === 'M' ? 'mountain' : 'valley';
      expect(lines.filter((l) => l.layer === layer)).toHaveLength(p.creases.filter((c) => c.assignment === a).length);
    }
    const texts = dxf.entities.filter((e) => e.type === 'TEXT') as unknown as { layer: string; text: string }[];
    expect(texts.map((t) => t.text).sort()).toEqual(p.creases.map((c) => c.label).sort());
    expect(texts.every((t) => t.layer === 'labels')).toBe(true);
  });

  it('says in the file what each layer means, and carries the cautions line', () => {
    const text = writeDxf(singleVertex({ sectorsDeg: [60, 100, 120, 80] }).project!);
    const comments = text.split('\r\n').filter((_, i, all) => i > 0 && all[i - 1].trim() === '999');
    expect(comments.some((c) => /^Layer mountain: mountain creases/.test(c))).toBe(true);
    expect(comments.some((c) => /^Layer boundary: the outline/.test(c))).toBe(true);
    expect(comments).toContain(CAUTIONS);
  });
});

describe('our SVG', () => {
  it('has one group per assignment, units in width/height/viewBox, a description of the groups and the cautions line', () => {
    const project = { ...miura({ rows: 2, cols: 2, a: 40, b: 30, alphaDeg: 70 }).project!, units: 'mm' };
    const doc = new DOMParser().parseFromString(writeSvg(project), 'image/svg+xml');
    const root = doc.documentElement!;
    expect(root.getAttribute('width')).toMatch(/mm$/);
    expect(root.getAttribute('height')).toMatch(/mm$/);
    const vb = root.getAttribute('viewBox')!.split(' ').map(Number);
    expect(`${vb[2]}mm`).toBe(root.getAttribute('width'));
    const ids = Array.from(doc.getElementsByTagName('g')).map((g) => g.getAttribute('id'));
    expect(ids).toEqual(['boundary', 'mountain', 'valley', 'labels']);
    const desc = doc.getElementsByTagName('desc')[0].textContent!;
    expect(desc).toContain(CAUTIONS);
    expect(desc).toMatch(/group "valley": valley creases/);
  });
});

/**
 * Miura-ori drawn by hand in SVG in millimetres, y down as a drawing program has it, inside a transformed
 * group: it must solve as the generator's sheet does, and its straight creases must fold as M. Schenk,
 * S. Guest, "Geometry of Miura-folded metamaterials", PNAS 110(9):3276, 2013 give: tan(ρs/2) = cos α tan(ρz/2).
 */
describe('a Miura-ori sheet drawn in mm in SVG', () => {
  const [rows, cols, a, b, alphaDeg] = [2, 3, 40, 30, 70];
  const gen = miura({ rows, cols, a, b, alphaDeg }).project!;
  const genPattern = build(gen);
  const H = 2 * rows * b * Math.sin(alphaDeg * D);
  // the drawing: page coordinates in cm inside a group that scales cm to the mm viewBox and shifts by a margin
  const margin = 10;
  const toPage = ([x, y]: [number, number]) => [(x / 10).toFixed(12), ((H - y) / 10).toFixed(12)];
  const groups: Record<string, string[]> = { M: [], V: [], B: [] };
  genPattern.creases.forEach((c) => {
    const [p, q] = c.vertices.map((v) => toPage(genPattern.vertices[v]));
    if (c.assignment !== 'B') groups[c.assignment].push(`<line x1="${p[0]}" y1="${p[1]}" x2="${q[0]}" y2="${q[1]}"/>`);
  });
  const W = 2 * cols * a + b * Math.cos(alphaDeg * D);
  const svg = `<?xml version="1.0"?>
<svg xmlns="http://www.w3.org/2000/svg" width="${W + 2 * margin}mm" height="${H + 2 * margin}mm" viewBox="0 0 ${W + 2 * margin} ${H + 2 * margin}">
  <g transform="translate(${margin},${margin}) scale(10)" stroke="black" stroke-width="0.02" fill="none">
    <g id="Cut outline"><polygon points="${[[0, 0], [2 * cols * a, 0], ...Array.from({ length: 2 * rows + 1 }, (_, j) => [2 * cols * a + (j % 2 ? b * Math.cos(alphaDeg * D) : 0), j * b * Math.sin(alphaDeg * D)]).slice(1), ...Array.from({ length: 2 * rows + 1 }, (_, j) => [(j % 2 ? b * Math.cos(alphaDeg * D) : 0), j * b * Math.sin(alphaDeg * D)]).reverse().slice(0, -1)].map((p) => toPage(p as [number, number]).join(',')).join(' ')}"/></g>
    <g id="mountain-folds">${groups.M.join('')}</g>
    <g id="valley-folds">${groups.V.join('')}</g>
  </g>
</svg>`;

  it('imports with the generator\'s creases, assignments and panels, in mm', () => {
    const r = loadPatternText(svg, 'miura.svg');
    expect(r.messages.filter((m) => m.severity === 'error'), JSON.stringify(r.messages)).toEqual([]);
    expect(r.project!.units).toBe('mm');
    const p = r.pattern!;
    expect(p.panels).toHaveLength(genPattern.panels.length);
    expect(p.interiorVertices).toHaveLength(genPattern.interiorVertices.length);
    // the same edges and assignments, shifted by the margin
    const shifted = (q: Pattern, dx: number) => edgeSet({ ...q, vertices: q.vertices.map(([x, y]) => [x - dx, y - dx] as [number, number]) }, false);
    expect(shifted(p, margin)).toEqual(edgeSet(genPattern, false));
  });

  it('solves as the generator\'s sheet does, and obeys tan(ρs/2) = cos α tan(ρz/2) (Schenk & Guest 2013)', () => {
    const p = loadPatternText(svg, 'miura.svg').pattern!;
    const mid = (q: Pattern, c: number, dx: number) => {
      const [u, v] = q.creases[c].vertices;
      return `${q6((q.vertices[u][0] + q.vertices[v][0]) / 2 - dx)},${q6((q.vertices[u][1] + q.vertices[v][1]) / 2 - dx)}`;
    };
    const genByMid = new Map(genPattern.creases.map((c) => [mid(genPattern, c.index, 0), c.index]));
    const driveGen = genPattern.labelIndex.get(gen.drives[0].crease)!;
    const drive = p.creases.find((c) => mid(p, c.index, margin) === mid(genPattern, driveGen, 0))!.index;
    const rz = 70 * D * Math.sign(gen.drives[0].angleDeg);
    const mine = solveDrives(p, [{ crease: drive, value: rz }], { starts: 0 }).solutions.find((s) => s.matchesAssignment)!;
    const theirs = solveDrives(genPattern, [{ crease: driveGen, value: rz }], { starts: 0 }).solutions.find((s) => s.matchesAssignment)!;
    expect(mine.maxResidual).toBeLessThanOrEqual(1e-10);
    for (const c of p.creases) {
      const g = genByMid.get(mid(p, c.index, margin))!;
      expect(Math.abs(mine.angles[c.index] - theirs.angles[g]) / D, `crease at ${mid(p, c.index, margin)}`).toBeLessThan(1e-7);
      if (c.assignment === 'B') continue;
      const label = genPattern.creases[g].label;
      const expected = label.startsWith('z') ? Math.abs(rz) : 2 * Math.atan(Math.cos(alphaDeg * D) * Math.tan(Math.abs(rz) / 2));
      expect(Math.abs(Math.abs(mine.angles[c.index]) - expected) / D, label).toBeLessThan(1e-7);
    }
  });
});
