// Figures for oversized requests through the app's real handlers (electron/service.ts) and solver workers
// (a benchmark that prints figures, not a timed test): how long a refusal takes and the peak resident
// memory of the whole process, workers included. Each case runs in a child process of its own, so the
// peak is that case's alone.
//
//   npx tsx bench/app-requests.ts              every case
//   npx tsx bench/app-requests.ts open-200mb   some cases
//
// Build the worker first (npm run build:app, or any `npm run test:e2e`): dist/electron/solver-worker.cjs.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, promises as fs, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createService, type DialogHost } from '../electron/service';
import { SolverClient } from '../electron/solver-client';
import { nodeWorkerSpawner } from '../electron/worker-client';
import { RecentFiles, RecoveryStore } from '../electron/files';
import { loadPatternText, miura, writeProject } from '../solver';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const WORKER = path.join(ROOT, 'dist', 'electron', 'solver-worker.cjs');
const COUPON = path.join(ROOT, 'samples', 'hinge-coupon.hingeplan.json');

interface Case {
  name: string;
  title: string;
  run(call: (channel: string, payload: unknown) => Promise<unknown>, host: BenchHost, tmp: string): Promise<unknown>;
}

class BenchHost implements DialogHost {
  open: string[] = [];
  save: string[] = [];
  async chooseOpenFile() {
    return this.open.shift() ?? null;
  }
  async chooseSaveFile() {
    return this.save.shift() ?? null;
  }
  async confirmDiscard() {
    return 'cancel' as const;
  }
  writeClipboard() {}
  documentState() {}
  emit() {}
  closeReady() {}
  recentChanged() {}
}

const coupon = () => loadPatternText(readFileSync(COUPON, 'utf8'), 'c.hingeplan.json').project!;

async function couponPath(call: (c: string, p: unknown) => Promise<unknown>): Promise<string> {
  await call('pattern:set', { key: 'coupon', source: coupon().source });
  await call('sweep', { requestId: 'path-1', key: 'coupon', options: { drive: 'c0', fromDeg: 0, toDeg: 90, stepDeg: 10, held: [] } });
  return 'path-1';
}

const cases: Case[] = [
  {
    name: 'open-200mb',
    title: 'open a 200 MB file (a sparse file: its size alone says so)',
    async run(call, host, tmp) {
      const file = path.join(tmp, 'big.hingeplan.json');
      await fs.writeFile(file, '');
      await fs.truncate(file, 200_000_000);
      host.open.push(file);
      return call('doc:open', {});
    },
  },
  {
    name: 'open-32mib',
    title: 'open a file of 32 MiB of spaces around a small project (read, decoded, parsed, refused by nothing)',
    async run(call, host, tmp) {
      const file = path.join(tmp, 'padded.hingeplan.json');
      const text = readFileSync(COUPON, 'utf8');
      await fs.writeFile(file, text.replace('{', '{' + ' '.repeat(32 * 1024 * 1024 - text.length - 10)));
      host.open.push(file);
      return call('doc:open', {});
    },
  },
  {
    name: 'schedule-dt',
    title: 'export a schedule of 10 s at a time step of 1e-12 s',
    async run(call, host, tmp) {
      const pathId = await couponPath(call);
      host.save.push(path.join(tmp, 'schedule.csv'));
      return call('doc:export', { kind: 'schedule', project: coupon(), key: 'coupon', pathId, options: { timeS: 10, dtS: 1e-12 }, suggestedName: 'c' });
    },
  },
  {
    name: 'sweep-40x40',
    title: 'a 40 × 40 Miura sheet (12,960 creases) swept 0° → 180° at 0.01°',
    async run(call) {
      const big = miura({ rows: 40, cols: 40, a: 20, b: 15, alphaDeg: 70 }).project!;
      await call('pattern:set', { key: 'big', source: big.source });
      return call('sweep', { requestId: 'huge', key: 'big', options: { drive: big.drives[0].crease, fromDeg: 0, toDeg: 180, stepDeg: 0.01, held: [] } });
    },
  },
  {
    name: 'open-40x40',
    title: 'open the 40 × 40 Miura sheet as a file (0.6 MB) and cancel the load after 200 ms',
    async run(call, host, tmp) {
      const file = path.join(tmp, 'sheet.hingeplan.json');
      await fs.writeFile(file, writeProject(miura({ rows: 40, cols: 40, a: 20, b: 15, alphaDeg: 70 }).project!));
      host.open.push(file);
      const opening = call('doc:open', { requestId: 'open-1' });
      await new Promise((r) => setTimeout(r, 200));
      await call('job:cancel', { requestId: 'open-1' });
      return opening;
    },
  },
];

async function runCase(name: string): Promise<void> {
  const c = cases.find((x) => x.name === name)!;
  const tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-bench-'));
  const solver = new SolverClient({ spawn: nodeWorkerSpawner(WORKER) });
  const host = new BenchHost();
  const service = createService({
    solver,
    host,
    recovery: new RecoveryStore(path.join(tmp, 'recovery')),
    recent: new RecentFiles(path.join(tmp, 'recent.json')),
    startup: { version: 'bench', platform: process.platform, samplePath: COUPON },
  });
  const call = (channel: string, payload: unknown) => service.dispatch(channel, payload);
  // the workers started and warm before the clock starts
  await call('solve', { requestId: 'warm', key: 'none', drives: [] });
  const rssBefore = process.memoryUsage().rss;
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const answer = await c.run(call, host, tmp);
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  solver.dispose();
  await fs.rm(tmp, { recursive: true, force: true });
  const text = JSON.stringify(answer);
  process.stdout.write(
    JSON.stringify({
      name: c.name,
      title: c.title,
      ms: Math.round(ms),
      cpuMs: Math.round((cpu.user + cpu.system) / 1000),
      rssBeforeMiB: Math.round(rssBefore / 1048576),
      peakRssMiB: Math.round(process.resourceUsage().maxRSS / 1024),
      answer: text.length > 300 ? `${text.slice(0, 300)}…` : text,
    }) + '\n',
  );
}

const args = process.argv.slice(2);
if (args[0] === '--case') await runCase(args[1]);
else {
  const chosen = args.length ? cases.filter((c) => args.includes(c.name)) : cases;
  const self = fileURLToPath(import.meta.url);
  process.stdout.write(`hingeplan app requests: Node ${process.version}, ${os.cpus().length} cores; each case in its own process\n\n`);
  for (const c of chosen) {
    const row = JSON.parse(execFileSync(process.execPath, [...process.execArgv, self, '--case', c.name], { encoding: 'utf8', maxBuffer: 1 << 24 }).trim().split('\n').pop()!);
    process.stdout.write(`${row.title}\n  ${row.ms} ms wall, ${row.cpuMs} ms CPU (main and workers), peak ${row.peakRssMiB} MiB resident (${row.rssBeforeMiB} MiB before)\n  answer: ${row.answer}\n\n`);
  }
}
