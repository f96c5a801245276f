// A flat-foldable degree-4 vertex drawn the way drafters leave it (creases ending on the outline, a crease
// in two pieces, a line drawn twice, a zero-length line), in three files: a hand-written R12 DXF, a
// hand-written SVG, and a DXF written by a general-purpose DXF writer from the npm registry (dxf-writer).
// Each must import as 4 creases and 4 panels, and solve to the published fold-angle multipliers.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import Drawing from 'dxf-writer';
import { loadPatternText, type LoadResult } from '../solver/formats/project';
import { solveDrives } from '../solver/search/solve';
import type { Pattern } from '../solver/types';

const D = Math.PI / 180;
const FIXTURES = join(__dirname, 'fixtures', 'drawings');
const SECTORS = [60, 100, 120, 80];
const DIRECTIONS = [0, 60, 160, 280];

/** The coupon as dxf-writer draws it: outline as a closed LWPOLYLINE, the same drafting defects as the fixtures. */
function writtenByLibrary(): string {
  const d = new Drawing();
  d.setUnits('Millimeters');
  d.addLayer('sheet border', Drawing.ACI.WHITE, 'CONTINUOUS');
  d.addLayer('MOUNTAIN', Drawing.ACI.RED, 'CONTINUOUS');
  d.addLayer('valley-folds', Drawing.ACI.BLUE, 'CONTINUOUS');
  d.setActiveLayer('sheet border');
  d.drawPolyline([[-50, -50], [50, -50], [50, 50], [-50, 50]], true);
  const end = (deg: number): [number, number] => {
    const c = Math.cos(deg * D), s = Math.sin(deg * D);
    const r = 50 / Math.max(Math.abs(c), Math.abs(s));
    return [r * c, r * s];
  };
  d.setActiveLayer('valley-folds');
  d.drawLine(0, 0, ...end(0));
  d.drawLine(...end(0), 0, 0); // drawn twice
  d.drawLine(-20, 30, -20, 30); // zero length
  d.setActiveLayer('MOUNTAIN');
  const [x1, y1] = end(60);
  d.drawLine(0, 0, x1 / 2, y1 / 2); // in two pieces
  d.drawLine(x1 / 2, y1 / 2, x1, y1);
  d.drawLine(0, 0, ...end(160));
  d.drawLine(0, 0, ...end(280));
  return d.toDxfString();
}

const files: [string, () => LoadResult][] = [
  ['hand-written R12 DXF', () => loadPatternText(readFileSync(join(FIXTURES, 'coupon-r12.dxf'), 'utf8'), 'coupon-r12.dxf')],
  ['hand-written SVG', () => loadPatternText(readFileSync(join(FIXTURES, 'coupon.svg'), 'utf8'), 'coupon.svg')],
  ['DXF written by dxf-writer (LWPOLYLINE outline, R2007 text)', () => loadPatternText(writtenByLibrary(), 'library.dxf')],
];

/** The interior vertex's creases by direction from it, in degrees ccw (as drawn). */
function creasesByDirection(p: Pattern): Map<number, number> {
  expect(p.interiorVertices).toHaveLength(1);
  const iv = p.interiorVertices[0];
  const out = new Map<number, number>();
  iv.creases.forEach((c, k) => out.set(Math.round(((iv.directions[k] / D) % 360) * 1e6) / 1e6, c));
  return out;
}

describe('a drafted degree-4 vertex imports cleanly', () => {
  for (const [name, load] of files) {
    it(`${name}: 4 creases, 4 panels, the sectors as drawn, every cleaning step counted`, () => {
      const r = load();
      const errors = r.messages.filter((m) => m.severity === 'error');
      expect(errors, JSON.stringify(errors)).toEqual([]);
      const p = r.pattern!;
      expect(r.project!.units).toBe('mm');
      const creases = p.creases.filter((c) => c.assignment !== 'B');
      expect(creases).toHaveLength(4);
      expect(p.panels).toHaveLength(4);
      // the sectors as drawn (the sheet seen from its top side: an SVG's y is flipped)
      const iv = p.interiorVertices[0];
      expect(iv.sectors.map((s) => s / D).map((s) => +s.toFixed(6)).sort()).toEqual([...SECTORS].sort());
      expect([...creasesByDirection(p).keys()]).toEqual(DIRECTIONS);
      // assignments from the layer / group names: one valley (0°), three mountains
      const byDir = creasesByDirection(p);
      expect(p.creases[byDir.get(0)!].assignment).toBe('V');
      for (const dir of [60, 160, 280]) expect(p.creases[byDir.get(dir)!].assignment).toBe('M');
      // each cleaning step that had work to do says so, with its count
      const c = r.cleaning!;
      expect(c.duplicates).toBe(1);
      expect(c.zeroLength).toBe(1);
      expect(c.collinearJoined).toBeGreaterThanOrEqual(1);
      expect(c.tJunctions).toBeGreaterThanOrEqual(4);
      for (const code of ['duplicates-dropped', 'zero-length-dropped', 't-junctions-split', 'collinear-joined', 'drawing-read']) {
        expect(r.messages.some((m) => m.code === code), code).toBe(true);
      }
      // a rim edge of a cleaned drawing is a boundary edge from the file, never re-read as one
      expect(r.messages.some((m) => m.code === 'edge-on-rim-not-boundary')).toBe(false);
    });
  }

  it('the hand-written DXF trims the overshooting crease and extends the short one onto the outline', () => {
    const r = files[0][1]();
    expect(r.cleaning!.endsTrimmed).toBe(2);
    expect(r.messages.some((m) => m.code === 'ends-trimmed')).toBe(true);
    // every rim vertex lies on the square (the snapped ends were moved onto it)
    for (const c of r.pattern!.creases.filter((k) => k.assignment === 'B')) {
      for (const v of c.vertices) {
        const [x, y] = r.pattern!.vertices[v];
        expect(Math.abs(Math.max(Math.abs(x), Math.abs(y)) - 50)).toBeLessThan(1e-9);
      }
    }
  });
});

/**
 * Published fold-angle multipliers of a flat-foldable degree-4 vertex with sectors α, β, 180°−α, 180°−β:
 * T. Evans, R. Lang, S. Magleby, L. Howell, "Rigidly foldable origami gadgets and tessellations",
 * R. Soc. Open Sci. 2:150067 (2015) (also T. Tachi, J. IASS 50(3), 2009). With the creases c0…c3 ccw and
 * c0 between the 180°−β and α sectors, as in tests/vertex-modes.test.ts:
 *   mode A (c0 = −c2, c1 = c3):  |tan(ρ1/2)| = |sin((α+β)/2) / sin((α−β)/2)| · |tan(ρ0/2)|
 *   mode B (c0 = c2, c1 = −c3):  |tan(ρ1/2)| = |cos((α+β)/2) / cos((α−β)/2)| · |tan(ρ0/2)|
 */
describe('the imported vertex solves to the published fold-angle multipliers (Evans et al. 2015)', () => {
  const [alpha, beta] = [SECTORS[0] * D, SECTORS[1] * D];
  const kA = Math.abs(Math.sin((alpha + beta) / 2) / Math.sin((alpha - beta) / 2));
  const kB = Math.abs(Math.cos((alpha + beta) / 2) / Math.cos((alpha - beta) / 2));
  for (const [name, load] of files) {
    it(name, () => {
      const p = load().pattern!;
      const byDir = creasesByDirection(p);
      const c = DIRECTIONS.map((d) => byDir.get(d)!);
      for (const drive of [-150, -45, 20, 60, 120, 175]) {
        const r0 = drive * D;
        const report = solveDrives(p, [{ crease: c[0], value: r0 }]);
        expect(report.status).toBe('several-solutions');
        expect(report.solutions).toHaveLength(2);
        for (const [k, pair] of [[kA, -1], [kB, 1]] as const) {
          const mag = 2 * Math.atan(k * Math.abs(Math.tan(r0 / 2)));
          const err = Math.min(
            ...report.solutions.map((s) =>
              Math.max(Math.abs(Math.abs(s.angles[c[1]]) - mag), Math.abs(s.angles[c[2]] - pair * r0), Math.abs(s.angles[c[3]] + pair * s.angles[c[1]])),
            ),
          );
          expect(err / D, `mode with multiplier ${k.toFixed(6)} at drive ${drive}°`).toBeLessThan(1e-9);
        }
        for (const s of report.solutions) expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
      }
    });
  }
});
