// Speed figures for the README (a benchmark that prints figures, not a timed test): every command timed as a
// person runs it — a whole, cold `node dist/cli.js …` process on a file, its output written to a file — with
// the CPU time it used (user + sys), the wall time, its peak resident memory and the bytes it wrote, for
// Miura-ori sheets of 6, 10, 20, 40 and 80 cells square and a triangulated sheet (degree-6 vertices, solved by
// continuation). Start-up is measured against `node -e 0`, and what npx adds against the direct call.
//
//   npm run bench                       every case (the 80 × 80 sheet takes minutes)
//   npm run bench -- miura6 miura20     some sheets
//   npm run bench -- --no-80            every sheet but the largest
//   npm run bench -- --repeat 20        repetitions of the start-up rows (default 10; min and median shown)
//
// CPU time and peak memory come from GNU time (/usr/bin/time, Debian package "time"); without it only the
// wall time is shown. Each row is one process, so its peak memory is that command's own.
import { execFileSync, spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdtempSync, openSync, readFileSync, readSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { miura } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { writeProject } from '../solver/formats/project';
import type { Assignment, PatternSource } from '../solver/types';

const CLI = 'dist/cli.js';
const TIME = '/usr/bin/time';
const LIMIT_S = 600;

interface Measured { cpu?: number; wall: number; rssMiB?: number; bytes: number; code: number | null; out: string; err: string }

/** One whole process: GNU time's user+sys and maximum resident set size, the wall time, what it wrote. */
function measure(argv: string[], outFile?: string, stdoutFile?: string): Measured {
  const useTime = existsSync(TIME);
  const report = join(work, 'time.txt');
  // stdout into a file when asked: a JSON of hundreds of MB is longer than the longest string this script could hold
  const fd = stdoutFile ? openSync(stdoutFile, 'w') : undefined;
  const t0 = process.hrtime.bigint();
  const r = spawnSync(useTime ? TIME : argv[0], useTime ? ['-f', '%U %S %M', '-o', report, ...argv] : argv.slice(1), {
    encoding: 'utf8', maxBuffer: 1 << 30, timeout: LIMIT_S * 1000, ...(fd !== undefined ? { stdio: ['ignore', fd, 'pipe'] } : {}),
  });
  if (fd !== undefined) closeSync(fd);
  const wall = Number(process.hrtime.bigint() - t0) / 1e9;
  let cpu: number | undefined, rssMiB: number | undefined;
  if (useTime && existsSync(report)) {
    const last = readFileSync(report, 'utf8').trim().split('\n').pop()!.split(' ').map(Number);
    if (last.length === 3 && last.every(Number.isFinite)) { cpu = last[0] + last[1]; rssMiB = last[2] / 1024; }
  }
  const written = outFile ?? stdoutFile;
  const bytes = written && existsSync(written) ? statSync(written).size : Buffer.byteLength(r.stdout ?? '');
  return { cpu, wall, rssMiB, bytes, code: r.status, out: r.stdout ?? '', err: r.stderr ?? '' };
}

const work = mkdtempSync(join(tmpdir(), 'hingeplan-bench-'));
const args = process.argv.slice(2);
const repeat = args.includes('--repeat') ? Number(args[args.indexOf('--repeat') + 1]) : 10;
const wanted = args.filter((a, i) => !a.startsWith('--') && args[i - 1] !== '--repeat');

if (!existsSync(CLI)) execFileSync(process.execPath, ['scripts/build-cli.mjs'], { stdio: 'inherit' });

function fmt(x: number | undefined, digits = 2): string {
  return x === undefined ? '–' : x.toFixed(digits);
}
function mib(x: number | undefined): string {
  return x === undefined ? '–' : String(Math.round(x));
}
function size(bytes: number): string {
  return bytes < 1024 ? `${bytes} B` : bytes < 1048576 ? `${(bytes / 1024).toFixed(1)} KiB` : `${(bytes / 1048576).toFixed(1)} MiB`;
}
const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s[Math.floor(s.length / 2)]; };

// ---------------------------------------------------------------------------------------------------------
// start-up

const coupon = 'samples/hinge-coupon.hingeplan.json';
const startRows: [string, string[]][] = [
  ['node -e 0', [process.execPath, '-e', '0']],
  ['node dist/cli.js --help', [process.execPath, CLI, '--help']],
  ['node bin/hingeplan.js --help', [process.execPath, 'bin/hingeplan.js', '--help']],
  ['npx hingeplan --help', ['npx', '--no-install', 'hingeplan', '--help']],
  ['node dist/cli.js check (coupon, 10 creases)', [process.execPath, CLI, 'check', coupon]],
  ['node dist/cli.js check --json (coupon)', [process.execPath, CLI, 'check', coupon, '--json']],
];
if (!wanted.length || wanted.includes('start')) {
  console.log(`\nStart-up (${repeat} runs each; CPU = user + sys; min / median)\n`);
  console.log('| command | CPU min | CPU median | wall median | peak memory |');
  console.log('| --- | --- | --- | --- | --- |');
  for (const [title, argv] of startRows) {
    const runs = Array.from({ length: repeat }, () => measure(argv));
    const cpus = runs.map((r) => r.cpu ?? r.wall);
    console.log(`| ${title} | ${fmt(Math.min(...cpus), 3)} s | ${fmt(median(cpus), 3)} s | ${fmt(median(runs.map((r) => r.wall)), 3)} s | ${mib(Math.max(...runs.map((r) => r.rssMiB ?? 0)))} MiB |`);
  }
}

// ---------------------------------------------------------------------------------------------------------
// the commands on sheets of growing size

interface Sheet { name: string; title: string; file: string; drive: string; sign: number; creases: number }

function miuraSheet(n: number): Sheet {
  const file = join(work, `miura${n}.hingeplan.json`);
  const g = miura({ rows: n, cols: n, a: 40, b: 30, alphaDeg: 70 });
  writeFileSync(file, writeProject(g.project!));
  return { name: `miura${n}`, title: `Miura ${n} × ${n}`, file, drive: g.project!.drives[0].crease, sign: Math.sign(g.project!.drives[0].angleDeg), creases: g.project!.source.edges.length };
}

/** A Miura 9 × 9 sheet with every parallelogram split along one diagonal (a free hinge, unassigned): degree-6 vertices. */
function triangulatedSheet(): Sheet {
  const rows = 9, cols = 9;
  const g = miura({ rows, cols, a: 40, b: 30, alphaDeg: 70 });
  const src = g.project!.source as PatternSource;
  const ni = 2 * cols;
  const vid = (i: number, j: number) => j * (ni + 1) + i;
  const edges = [...src.edges], labels = [...src.labels];
  const assignments: Assignment[] = [...src.assignments];
  for (let j = 0; j < 2 * rows; j++) for (let i = 0; i < ni; i++) {
    edges.push(j % 2 === 0 ? [vid(i, j), vid(i + 1, j + 1)] : [vid(i + 1, j), vid(i, j + 1)]);
    labels.push(`d${i}_${j}`);
    assignments.push('U');
  }
  const source = { ...src, name: 'triangulated Miura 9 × 9', edges, labels, assignments, limits: edges.map(() => undefined), faces: undefined };
  if (!buildPattern(source).pattern) throw new Error('the triangulated sheet does not build');
  const file = join(work, 'tri.hingeplan.json');
  writeFileSync(file, writeProject({ ...g.project!, source }));
  return { name: 'tri', title: 'triangulated 9 × 9', file, drive: g.project!.drives[0].crease, sign: Math.sign(g.project!.drives[0].angleDeg), creases: edges.length };
}

const sizes = [6, 10, 20, 40, ...(args.includes('--no-80') ? [] : [80])];
const sheetNames = [...sizes.map((n) => `miura${n}`), 'tri'];
const chosen = sheetNames.filter((n) => !wanted.length || wanted.includes(n));

/** The commands timed on each sheet (deg is the drive's sign times degrees). */
function commands(s: Sheet): { what: string; argv: (out: string) => string[]; ext: string }[] {
  const d = (x: number) => String(s.sign * x);
  const path = ['--drive', s.drive, '--from', d(1), '--to', d(179)];
  return [
    { what: 'check (text on stdout)', argv: () => ['check', s.file], ext: 'txt' },
    { what: 'solve, the file’s drive (JSON on stdout)', argv: () => ['solve', s.file, '--json'], ext: 'json' },
    { what: 'branches at flat (JSON on stdout)', argv: () => ['branches', s.file, '--json'], ext: 'json' },
    { what: 'sweep 5° steps (JSON)', argv: (o) => ['sweep', s.file, '--drive', s.drive, '--from', d(5), '--to', d(175), '--step', '5', '--json', '--out', o], ext: 'json' },
    { what: 'full path 1°→179° (JSON, rates)', argv: (o) => ['table', s.file, ...path, '--format', 'json', '--rates', '--out', o], ext: 'json' },
    { what: 'full path 1°→179° (CSV, rates)', argv: (o) => ['table', s.file, ...path, '--rates', '--out', o], ext: 'csv' },
    { what: 'schedule, 101 rows (CSV)', argv: (o) => ['schedule', s.file, '--drive', s.drive, '--from', d(1), '--to', d(179), '--time', '10', '--out', o], ext: 'csv' },
  ];
}

/** The end of a file (a table's tail), however large the file. */
function lastBytes(file: string, n: number): string {
  const fd = openSync(file, 'r');
  try {
    const size = statSync(file).size;
    const buf = Buffer.alloc(Math.min(n, size));
    readSync(fd, buf, 0, buf.length, size - buf.length);
    return buf.toString('utf8');
  } finally {
    closeSync(fd);
  }
}

/** What a table says about itself (status, samples, largest residual), from its tail. */
function tail(text: string): string {
  const get = (k: string) => new RegExp(`(?:^# ${k}: |"${k}":)"?([^"\\n,]*)`, 'm').exec(text)?.[1];
  const status = get('status');
  if (!status) return '';
  const res = get('largestResidual');
  return `${status}${res ? `, largest residual ${Number(res).toExponential(1)} rad` : ''}`;
}

if (chosen.length) {
  console.log('\nCommands on files, each a whole cold process, output written to a file (CPU = user + sys)\n');
  console.log('| sheet | creases | command | CPU | wall | peak memory | output | result |');
  console.log('| --- | --- | --- | --- | --- | --- | --- | --- |');
  for (const name of chosen) {
    const s = name === 'tri' ? triangulatedSheet() : miuraSheet(Number(name.slice(5)));
    for (const c of commands(s)) {
      const out = join(work, `out.${c.ext}`);
      rmSync(out, { force: true });
      const argv = c.argv(out);
      const toFile = argv.includes('--out');
      const m = measure([process.execPath, CLI, ...argv], toFile ? out : undefined, toFile ? undefined : out);
      const text = existsSync(out) ? lastBytes(out, 20000) : m.out.slice(-20000);
      const result = m.code === null ? `stopped after ${LIMIT_S} s` : `exit ${m.code}${tail(text) ? `; ${tail(text)}` : ''}`;
      console.log(`| ${s.title} | ${s.creases} | ${c.what} | ${fmt(m.cpu)} s | ${fmt(m.wall)} s | ${mib(m.rssMiB)} MiB | ${size(m.bytes)} | ${result} |`);
      rmSync(out, { force: true });
    }
  }
}
rmSync(work, { recursive: true, force: true });
