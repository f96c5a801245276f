// Writes the sample patterns in samples/, each as a Hingeplan project and as FOLD; the sunshade panel's flat
// pattern also as DXF and SVG (for a laser cutter or CAD).
// Run: npx tsx scripts/make-samples.ts   (commit the outputs; tests check the files match this script)
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { degree5, miura, singleVertex, waterbomb, type GeneratorResult } from '../solver/model/generators';
import { writeProject, type Project } from '../solver/formats/project';
import { writeFold } from '../solver/formats/fold';
import { writeDxf } from '../solver/formats/dxf-write';
import { writeSvg } from '../solver/formats/svg-write';
import { CAUTIONS } from '../solver/formats/cautions';

export const SAMPLES_DIR = join(dirname(fileURLToPath(import.meta.url)), '..', 'samples');
const RAD = Math.PI / 180;

function take(name: string, r: GeneratorResult): Project {
  if (!r.project) throw new Error(`${name}: ${r.messages.map((m) => m.text).join('; ')}`);
  return r.project;
}

function hingeCoupon(): Project {
  // 60/100/120/80: Kawasaki holds (60 + 120 = 100 + 80 = 180), no mirror symmetry, so the two modes differ
  const p = take('hinge-coupon', singleVertex({ sectorsDeg: [60, 100, 120, 80], radius: 50, driveDeg: 45, name: 'hinge test coupon' }));
  p.units = 'mm';
  p.source.limits[0] = { min: 0, max: 170 * RAD }; // the driven valley hinge has stops at 0° and 170°
  p.notes =
    'Hinge test coupon: one flat-foldable degree-4 vertex, sectors 60/100/120/80 degrees (c0 along +x, ccw). ' +
    'One degree of freedom: the drive on the valley c0 fixes the state; the mountain/valley assignment (c0 V; c1, c2, c3 M) ' +
    'picks the branch in which c1 and c3 fold equally. c0 has hinge stops at 0 and 170 degrees. ' +
    CAUTIONS;
  return p;
}

function sunshadePanel(): Project {
  const p = take('sunshade-panel', miura({ rows: 4, cols: 6, a: 40, b: 30, alphaDeg: 70, driveDeg: 60, name: 'sunshade panel' }));
  p.units = 'mm';
  p.notes =
    'Sunshade panel: Miura-ori, 4 x 6 unit cells of 2 x 2 panels, straight segments a = 40 mm, zigzag segments b = 30 mm, ' +
    'alpha = 70 degrees. Labels: s{i}_{j} straight segment from vertex (i, j) to (i+1, j); z{i}_{j} zigzag segment from (i, j) to (i, j+1). ' +
    'One degree of freedom once folded: one zigzag drive (z6_4, valley, 60 degrees) fixes it; at the flat state itself the sheet can also leave ' +
    'along single straight crease lines, so the solver may list several solutions: pick the one that matches the assignment. ' +
    'Loads for the holding torque: 1 mm aluminium sheet, 2.7 kg/m2, under standard gravity with the base panel flat. ' +
    CAUTIONS;
  p.loads = { arealDensity: 2.7 };
  return p;
}

function twoMotorRig(): Project {
  const p = take('two-motor-rig', degree5({ radius: 60, name: 'two-motor rig' }));
  p.units = 'mm';
  p.notes =
    'Two-motor rig: a generic degree-5 vertex, sectors 70/80/65/75/70 degrees, all creases unassigned. Two degrees of freedom (5 - 3): ' +
    'two motors drive c0 (40 degrees) and c2 (-30 degrees); the vertex then has two assembly branches for these values and the solver lists both. ' +
    CAUTIONS;
  return p;
}

function gripperCell(): Project {
  const p = take('gripper-cell', waterbomb({ size: 80, name: 'gripper cell' }));
  p.units = 'mm';
  p.notes =
    'Gripper cell: the waterbomb base on an 80 mm square. Diagonals d0-d3 are valleys, the x midline (x0, x1) mountains, the y midline ' +
    '(y0, y1) is flat (F) as in the flat-folded base (4 V + 2 M). Three degrees of freedom (six hinges - 3): three drives are needed to fix ' +
    'the state; this file drives d0, d1 and d2 to 60 degrees (the symmetric closing). With fewer drives the solver reports the state as ' +
    'underspecified and suggests creases to drive. ' +
    CAUTIONS;
  return p;
}

/** The samples as [file stem, project]. */
export function sampleProjects(): [string, Project][] {
  return [
    ['hinge-coupon', hingeCoupon()],
    ['sunshade-panel', sunshadePanel()],
    ['two-motor-rig', twoMotorRig()],
    ['gripper-cell', gripperCell()],
  ];
}

/** Samples whose flat pattern is also written as drawings. */
export const DRAWN_SAMPLES = ['sunshade-panel'];

/** Every file of every sample: [file name, text]. */
export function sampleFiles(): [string, string][] {
  return sampleProjects().flatMap(([name, project]): [string, string][] => [
    [`${name}.hingeplan.json`, writeProject(project)],
    [`${name}.fold`, writeFold(project)],
    ...(DRAWN_SAMPLES.includes(name) ? ([[`${name}.dxf`, writeDxf(project)], [`${name}.svg`, writeSvg(project)]] as [string, string][]) : []),
  ]);
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  mkdirSync(SAMPLES_DIR, { recursive: true });
  for (const [file, text] of sampleFiles()) {
    writeFileSync(join(SAMPLES_DIR, file), text);
    console.log(`wrote samples/${file}`);
  }
}
