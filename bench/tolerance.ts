// Speed of the tolerance analysis (a benchmark, not a timed test): `hingeplan tolerance` on a Miura-ori sheet of
// 10 × 10 cells (840 creases), 1,000 sheets at 19 drive values (5° … 95° every 5°), positional tolerance 0.1 mm,
// on every core, run as the bundled program under /usr/bin/time -v: wall time, CPU time (user + sys) and peak
// resident memory of the whole process (its worker threads included). Goal: under 30 s on the 2-core machine.
//
//   npx tsx bench/tolerance.ts                 the goal case
//   npx tsx bench/tolerance.ts 10 200 2        cells, sheets, workers
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { miura } from '../solver/model/generators';
import { writeProject } from '../solver/formats/project';

const [cells = '10', sheets = '1000', workers] = process.argv.slice(2);
const n = Number(cells);
const dir = mkdtempSync(join(tmpdir(), 'hingeplan-bench-tolerance-'));
const file = join(dir, `miura${n}.hingeplan.json`);
const g = miura({ rows: n, cols: n, a: 40, b: 30, alphaDeg: 70 });
writeFileSync(file, writeProject({ ...g.project!, units: 'mm' }));
const drive = g.project!.drives[0].crease;
const sign = Math.sign(g.project!.drives[0].angleDeg);
if (!existsSync('dist/cli.js')) execFileSync(process.execPath, ['scripts/build-cli.mjs'], { stdio: 'inherit' });

const args = ['dist/cli.js', 'tolerance', file, '--drive', drive, '--from', String(5 * sign), '--to', String(95 * sign), '--step', '5',
  '--position-tol', '0.1', '--samples', sheets, '--json', '--out', join(dir, 'out.json'), ...(workers ? ['--workers', workers] : [])];
const r = spawnSync('/usr/bin/time', ['-v', process.execPath, ...args], { encoding: 'utf8' });
if (r.status !== 0) {
  process.stderr.write(r.stderr);
  process.exit(1);
}
const field = (name: string) => r.stderr.split('\n').find((l) => l.trim().startsWith(name))?.split(': ').pop()?.trim() ?? '';
const user = Number(field('User time (seconds)'));
const sys = Number(field('System time (seconds)'));
const wall = field('Elapsed (wall clock) time (h:mm:ss or m:ss)');
const rss = Number(field('Maximum resident set size (kbytes)')) / 1024;
const [m, s] = wall.split(':').map(Number);
console.log(`Miura-ori ${n} × ${n} cells, ${sheets} sheets × 19 drive values, ${workers ?? 'all'} workers`);
console.log(`  command: node ${args.join(' ')}`);
console.log(`  wall ${(m * 60 + s).toFixed(1)} s, CPU ${(user + sys).toFixed(1)} s (user ${user} + sys ${sys}), peak memory ${rss.toFixed(0)} MiB`);
console.log(`  load average at the end: ${execFileSync('cat', ['/proc/loadavg'], { encoding: 'utf8' }).trim()}`);
