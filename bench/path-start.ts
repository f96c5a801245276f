// What starting the app's path from the solution on screen costs, against the old start from flat (a
// benchmark that prints figures, not a timed test): the worker's sweep job on the sunshade sample and on a
// 20 × 20 Miura-ori sheet, 0° to ±180° at 1°, CPU time of this process per job (process.cpuUsage).
//
//   npx tsx bench/path-start.ts
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { createJobState, loadJob, setPatternJob, solveJob, toProjectDto } from '../electron/jobs';
import { sweepJob } from '../electron/path-jobs';
import { miura } from '../solver/model/generators';
import type { ProjectDto } from '../electron/contract';

const ctx = { progress() {}, shouldStop: () => false };
const cpuMs = (f: () => unknown) => {
  const t = process.cpuUsage();
  f();
  const u = process.cpuUsage(t);
  return (u.user + u.system) / 1000;
};

function run(title: string, project: ProjectDto) {
  const st = createJobState();
  setPatternJob(st, { key: 'k', source: project.source });
  const r = solveJob(st, { key: 'k', drives: project.drives });
  const drive = project.drives[0];
  const o = { drive: drive.crease, fromDeg: 0, toDeg: drive.angleDeg < 0 ? -180 : 180, stepDeg: 1, held: [] };
  const start = r.solutions.find((s) => s.matchesAssignment) ?? r.solutions[0];
  sweepJob(st, { key: 'k', pathId: 'warm', options: o }, ctx);
  const flat = cpuMs(() => sweepJob(st, { key: 'k', pathId: 'a', options: o }, ctx));
  let via = '';
  const viaMs = cpuMs(() => { via = sweepJob(st, { key: 'k', pathId: 'b', options: { ...o, startAnglesDeg: start.anglesDeg, viaFlatBranch: true } }, ctx).branchName ?? ''; });
  const own = cpuMs(() => sweepJob(st, { key: 'k', pathId: 'c', options: { ...o, startAnglesDeg: start.anglesDeg } }, ctx));
  console.log(`${title}: from flat ${flat.toFixed(0)} ms; from the solution along its flat branch (${via}) ${viaMs.toFixed(0)} ms; along the solution's own family ${own.toFixed(0)} ms (CPU)`);
}

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const st = createJobState();
const sun = loadJob(st, { text: readFileSync(path.join(root, 'samples/sunshade-panel.hingeplan.json'), 'utf8'), fileName: 'sunshade-panel.hingeplan.json' }) as { project: ProjectDto };
run('sunshade panel (172 creases)', sun.project);
run('Miura-ori 20 × 20 (3,280 creases)', toProjectDto(miura({ rows: 20, cols: 20, a: 40, b: 30, alphaDeg: 70 }).project!));
