// Every built-in sample, in both formats, loads and solves with the drives it carries.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { loadPatternText } from '../solver/formats/project';
import { solveDrives } from '../solver/search/solve';
import { foldedShape } from '../solver/outputs/shape';
import { DRAWN_SAMPLES } from '../scripts/make-samples';

const samples: [string, number, number][] = [
  // name, pattern DOF (common practice: a degree-n vertex has n − 3; Miura-ori one; waterbomb base three), drives
  ['hinge-coupon', 1, 1],
  ['sunshade-panel', 1, 1],
  ['two-motor-rig', 2, 2],
  ['gripper-cell', 3, 3],
];

describe('samples', () => {
  for (const [name, dof, nDrives] of samples) {
    it(`${name}: both formats load, solve with the file's drives, and agree`, () => {
      const results = ['hingeplan.json', 'fold'].map((ext) => {
        const file = `samples/${name}.${ext}`;
        const r = loadPatternText(readFileSync(file, 'utf8'), file);
        expect(r.messages.filter((m) => m.severity === 'error'), file).toEqual([]);
        return r;
      });
      const [project, fold] = results;
      expect(fold.pattern!.creases.map((c) => c.label)).toEqual(project.pattern!.creases.map((c) => c.label));
      const drives = project.drives!;
      expect(drives).toHaveLength(nDrives);
      const report = solveDrives(project.pattern!, drives);
      expect(['solved', 'several-solutions']).toContain(report.status);
      expect(report.patternDof).toBe(dof);
      const first = report.solutions[0];
      expect(first.matchesAssignment).toBe(true);
      for (const s of report.solutions) expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
      const shape = foldedShape(project.pattern!, first.angles);
      expect(shape.maxMismatch).toBeLessThan(1e-9 * project.pattern!.size);
      // the FOLD copy gives the same first solution
      const again = solveDrives(fold.pattern!, fold.drives!.length ? fold.drives! : drives);
      for (let i = 0; i < first.angles.length; i++) expect(again.solutions[0].angles[i]).toBeCloseTo(first.angles[i], 9);
    });
  }
});

describe('samples drawn for a laser cutter or CAD', () => {
  for (const name of DRAWN_SAMPLES) {
    it(`${name}: the DXF and SVG read back to the project's creases, assignments and labels`, () => {
      const project = loadPatternText(readFileSync(`samples/${name}.hingeplan.json`, 'utf8'), `${name}.hingeplan.json`).pattern!;
      const key = (p: typeof project) => p.creases.map((c) => `${c.label}:${c.assignment}:${c.length.toFixed(9)}`).sort();
      for (const ext of ['dxf', 'svg']) {
        const r = loadPatternText(readFileSync(`samples/${name}.${ext}`, 'utf8'), `${name}.${ext}`);
        expect(r.messages.filter((m) => m.severity !== 'info'), ext).toEqual([]);
        expect(key(r.pattern!), ext).toEqual(key(project));
        expect(r.project!.units).toBe('mm');
      }
    });
  }
});
