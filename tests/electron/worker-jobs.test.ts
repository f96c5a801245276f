// The solver workers behind the real handlers (electron/service.ts): requests too large to compute are
// refused in seconds with bounded memory, as error values the window shows; every job carries a request id
// and can be cancelled; an export runs beside sweeps, not before them; a superseded solve that never looks
// at the stop flag does not hold the interactive lane.
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { existsSync, mkdtempSync, promises as fs, readdirSync, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createService, type DialogHost } from '../../electron/service';
import { SolverClient } from '../../electron/solver-client';
import { nodeWorkerSpawner } from '../../electron/worker-client';
import { RecentFiles, RecoveryStore } from '../../electron/files';
import { MAX_PATH_VALUES, MAX_SCHEDULE_ROWS, MAX_TABLE_CELLS, checkAngleTableSize, checkPathSize, checkScheduleSize } from '../../electron/work-limits';
import { loadPatternText, miura, writeProject } from '../../solver';
import { buildWorker, SAMPLES } from './support';

class Host implements DialogHost {
  save: (string | null)[] = [];
  open: (string | null)[] = [];
  progress: { requestId: string; done: number; total: number }[] = [];
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
  emit(event: string, payload: unknown) {
    if (event === 'job:progress') this.progress.push(payload as Host['progress'][number]);
  }
  closeReady() {}
  recentChanged() {}
}

let tmp: string;
let solver: SolverClient;
let host: Host;
let call: (channel: string, payload: unknown) => Promise<{ ok: boolean; value?: never; error?: { code: string; message: string } }>;
const coupon = path.join(SAMPLES, 'hinge-coupon.hingeplan.json');
const couponProject = loadPatternText(readFileSync(coupon, 'utf8'), 'c.hingeplan.json').project!;
// a 40 × 40 Miura-ori sheet: 12,960 creases (one full solve takes seconds)
const big = miura({ rows: 40, cols: 40, a: 20, b: 15, alphaDeg: 70 }).project!;

/** Peak resident memory of this process (workers included) while `run` runs. */
async function peakMemory<T>(run: () => Promise<T>): Promise<{ value: T; growth: number; ms: number }> {
  const start = process.memoryUsage().rss;
  let peak = start;
  const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 10);
  const t0 = Date.now();
  try {
    const value = await run();
    return { value, growth: peak - start, ms: Date.now() - t0 };
  } finally {
    clearInterval(timer);
  }
}

const MiB = 1024 * 1024;

beforeAll(async () => {
  const worker = await buildWorker('electron/solver-worker.ts');
  solver = new SolverClient({ spawn: nodeWorkerSpawner(worker) });
  tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-jobs-'));
  host = new Host();
  const service = createService({
    solver,
    host,
    recovery: new RecoveryStore(path.join(tmp, 'recovery')),
    recent: new RecentFiles(path.join(tmp, 'recent.json')),
    startup: { version: 't', platform: 'linux', samplePath: coupon },
  });
  call = (channel, payload) => service.dispatch(channel, payload) as never;
  expect(await call('pattern:set', { key: 'coupon', source: couponProject.source })).toMatchObject({ ok: true });
});

afterEach(() => vi.restoreAllMocks());

afterAll(async () => {
  solver.dispose();
  await fs.rm(tmp, { recursive: true, force: true });
});

async function couponPath(requestId: string): Promise<string> {
  const swept = await call('sweep', { requestId, key: 'coupon', options: { drive: 'c0', fromDeg: 0, toDeg: 90, stepDeg: 10, held: [] } });
  expect(swept).toMatchObject({ ok: true, value: { status: 'done' } });
  return requestId;
}

describe('the work limits', () => {
  it('count samples × creases, rows × cells before anything is listed, and name the option and the limit', () => {
    // 40 × 40 cells at 0.01°: 18,002 samples × 12,960 creases = 233 million values
    expect(() => checkPathSize(0, 180, 0.01, 12_960)).toThrow(/18,002 samples over 12,960 creases is 233 million values; the window takes at most 8 million\. Use a step of at least 0\.3°/);
    // the suggested step is enough: 180/0.3 + 2 = 602 samples × 12,960 = 7.8 million; a 20 × 20 sheet at 0.1° too
    expect(() => checkPathSize(0, 180, 0.3, 12_960)).not.toThrow();
    expect(() => checkPathSize(0, 180, 0.1, 3_280)).not.toThrow();
    expect(MAX_PATH_VALUES).toBe(8e6);
    expect(() => checkScheduleSize(10, 1e-12, undefined, 10)).toThrow(/time step of 1e-12 s over 10 s gives 10,000,000,000,002 rows; a schedule takes at most 100,000/);
    expect(() => checkScheduleSize(10, undefined, MAX_SCHEDULE_ROWS, 12_960)).toThrow(/3,888 million cells .*at most 10 million\. Use at most 257 rows/);
    expect(() => checkScheduleSize(10, undefined, 257, 12_960)).not.toThrow();
    expect(() => checkAngleTableSize(400, 12_960, true)).toThrow(/with their rates is 10.4 million cells/);
    expect(() => checkAngleTableSize(MAX_TABLE_CELLS / 4, 4, false)).not.toThrow();
  });
});

describe('oversized requests through the worker', () => {
  it('refuse a schedule with a time step of 1e-12 s in seconds, with bounded memory, naming the time step', async () => {
    const pathId = await couponPath('path-dt');
    host.save.push(path.join(tmp, 'tiny-dt.csv'));
    const { value, growth, ms } = await peakMemory(() =>
      call('doc:export', { kind: 'schedule', project: couponProject, key: 'coupon', pathId, options: { timeS: 10, dtS: 1e-12 }, suggestedName: 'c' }),
    );
    expect(value).toMatchObject({ ok: true, value: { status: 'failed' } });
    expect((value.value as unknown as { message: string }).message).toMatch(/time step of 1e-12 s over 10 s gives .* rows; a schedule takes at most 100,000/);
    expect(ms).toBeLessThan(5000);
    expect(growth).toBeLessThan(200 * MiB);
    expect(existsSync(path.join(tmp, 'tiny-dt.csv'))).toBe(false);
  });

  it('refuse a 40 × 40 sweep at 0.01° in seconds, with bounded memory, and the lane goes on', async () => {
    expect(await call('pattern:set', { key: 'big', source: big.source })).toMatchObject({ ok: true });
    const { value, growth, ms } = await peakMemory(() =>
      call('sweep', { requestId: 'huge-1', key: 'big', options: { drive: big.drives[0].crease, fromDeg: 0, toDeg: 180, stepDeg: 0.01, held: [] } }),
    );
    expect(value).toMatchObject({ ok: false, error: { code: 'path-too-large' } });
    expect(value.error!.message).toMatch(/use a step of at least 0\.3°/i);
    // the pattern is built once in the long lane (a second or two); nothing of the path is computed
    expect(ms).toBeLessThan(15_000);
    expect(growth).toBeLessThan(600 * MiB);
    await couponPath('after-huge');
  });
});

describe('every job can be cancelled by its request id', () => {
  it('runs an export beside sweeps, reports its progress, and cancels it without writing a file', async () => {
    const pathId = await couponPath('path-long-export');
    const target = path.join(tmp, 'long.schedule.csv');
    host.save.push(target);
    host.progress = [];
    let answered = false;
    // 100,000 rows, each solved: many seconds of work
    const exporting = call('doc:export', { kind: 'schedule', requestId: 'exp-long', project: couponProject, key: 'coupon', pathId, options: { timeS: 100, rows: 100_000 }, suggestedName: 'c' }).then((r) => {
      answered = true;
      return r;
    });
    for (let i = 0; i < 500 && !host.progress.some((p) => p.requestId === 'exp-long'); i++) await new Promise((r) => setTimeout(r, 20));
    expect(host.progress.some((p) => p.requestId === 'exp-long' && p.total > 0)).toBe(true);
    // a sweep is not queued behind the export
    await couponPath('while-exporting');
    expect(answered).toBe(false);
    const t0 = Date.now();
    expect(await call('job:cancel', { requestId: 'exp-long' })).toEqual({ ok: true, value: { cancelled: true } });
    expect(await exporting).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(Date.now() - t0).toBeLessThan(2000);
    expect(existsSync(target)).toBe(false);
  });

  it('cancels the loading of a large file the person chose', async () => {
    const file = path.join(tmp, 'sheet-40x40.hingeplan.json');
    await fs.writeFile(file, writeProject(big));
    host.open.push(file);
    const opening = call('doc:open', { requestId: 'open-big' });
    await new Promise((r) => setTimeout(r, 150));
    const t0 = Date.now();
    expect(await call('job:cancel', { requestId: 'open-big' })).toEqual({ ok: true, value: { cancelled: true } });
    expect(await opening).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(Date.now() - t0).toBeLessThan(1000);
    // the interactive lane answers again (on a new worker if the load had to be stopped)
    expect(await call('solve', { requestId: 'after-open', key: 'coupon', drives: [{ crease: 'c0', angleDeg: 40 }] })).toMatchObject({ ok: true, value: { status: 'done' } });
  });

  it('cancels a shape, a save and a new document by id, before or while they run', async () => {
    // cancelled while they are queued or running in the interactive lane
    const shape = call('shape', { requestId: 'shape-1', key: 'coupon', anglesDeg: couponProject.source.edges.map(() => 0) });
    const made = call('doc:new', { requestId: 'new-1', kind: 'miura', rows: 30, cols: 30, a: 20, b: 15, alphaDeg: 60 });
    expect(await call('job:cancel', { requestId: 'shape-1' })).toEqual({ ok: true, value: { cancelled: true } });
    expect(await call('job:cancel', { requestId: 'new-1' })).toEqual({ ok: true, value: { cancelled: true } });
    expect(await shape).toEqual({ ok: true, value: { status: 'cancelled' } });
    expect(await made).toEqual({ ok: true, value: { status: 'canceled' } });
    const target = path.join(tmp, 'never.hingeplan.json');
    host.save.push(target);
    const saving = call('doc:save', { requestId: 'save-1', project: big, filePath: null, saveAs: true, suggestedName: 'x' });
    await call('job:cancel', { requestId: 'save-1' });
    expect(await saving).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(existsSync(target)).toBe(false);
    // an id nobody uses cancels nothing
    expect(await call('job:cancel', { requestId: 'no-such-request' })).toEqual({ ok: true, value: { cancelled: false } });
  });

  it('does not let a superseded 40 × 40 solve hold the interactive lane for the grace period', async () => {
    expect(await call('pattern:set', { key: 'big-solve', source: big.source })).toMatchObject({ ok: true });
    const old = call('solve', { requestId: 'solve-big', key: 'big-solve', drives: [{ crease: big.drives[0].crease, angleDeg: 50 }] });
    await new Promise((r) => setTimeout(r, 300));
    const t0 = Date.now();
    const latest = await call('solve', { requestId: 'solve-latest', key: 'coupon', drives: [{ crease: 'c0', angleDeg: 45 }] });
    const waited = Date.now() - t0;
    expect(await old).toEqual({ ok: true, value: { status: 'superseded' } });
    expect(latest).toMatchObject({ ok: true, value: { status: 'done' } });
    // the grace period of a job that looks at its stop flag is 4 s; a solve never looks, and the full
    // 40 × 40 solve takes seconds more than that
    expect(waited).toBeLessThan(3500);
  });

  it('follows the path on screen in a tolerance run even after the long lane lost it (the worker was replaced)', async () => {
    const pathId = await couponPath('path-tolerance');
    // a stopped job that does not poll (a full 40 × 40 solve, seconds long) has its worker replaced: the
    // paths that worker kept are gone
    const restarts: string[] = [];
    expect(await call('pattern:set', { key: 'big-long', source: big.source })).toMatchObject({ ok: true });
    // the long lane builds the pattern first (a quick job on it), so the solve itself is what runs when cancelled
    expect(await solver.run('long', 'shape', { key: 'big-long', anglesDeg: big.source.edges.map(() => 0) })).toMatchObject({ status: 'done' });
    const solving = solver.run('long', 'solve', { key: 'big-long', drives: [{ crease: big.drives[0].crease, angleDeg: 30 }] }, { requestId: 'long-solve' });
    const lane = solver.lanes.long as unknown as { options: { onRestart?: (r: string) => void } };
    lane.options.onRestart = (why) => restarts.push(why);
    await new Promise((r) => setTimeout(r, 300));
    solver.cancel('long-solve');
    expect(await solving).toEqual({ status: 'cancelled' });
    for (let i = 0; i < 200 && !restarts.length; i++) await new Promise((r) => setTimeout(r, 20));
    expect(restarts).toEqual(['a stopped job did not return in time']);
    const r = await call('tolerance', { requestId: 'tol-after', key: 'coupon', options: { pathId, everyDeg: 30, positionTol: 0.05, samples: 8, seed: 3 } });
    expect(r).toMatchObject({ ok: true, value: { status: 'done', value: { driveLabel: 'c0', samples: 8 } } });
  });

  it('writes a table into its file in pieces as they come; a full disk stops the job and keeps the old file', async () => {
    const pathId = await couponPath('path-pieces');
    const dir = path.join(tmp, 'pieces');
    await fs.mkdir(dir);
    const target = path.join(dir, 'coupon.schedule.csv');
    await fs.writeFile(target, 'the schedule from last week\n');
    // every write of a file handle is counted; the third one finds the disk full
    let writes = 0;
    const open = fs.open.bind(fs);
    vi.spyOn(fs, 'open').mockImplementation(async (...args: Parameters<typeof fs.open>) => {
      const handle = await open(...args);
      if (String(args[0]).includes('.hingeplan-save-')) {
        const write = handle.writeFile.bind(handle);
        handle.writeFile = (async (data: string) => {
          if (++writes === 3) throw Object.assign(new Error('no space left on device'), { code: 'ENOSPC' });
          return write(data);
        }) as typeof handle.writeFile;
      }
      return handle;
    });
    host.save.push(target);
    const options = { timeS: 100, rows: 12_000, format: 'csv' };
    const full = await call('doc:export', { kind: 'schedule', project: couponProject, key: 'coupon', pathId, options, suggestedName: 'c' });
    expect(full).toEqual({ ok: true, value: { status: 'failed', message: 'coupon.schedule.csv was not saved: the disk is full' } });
    expect(readFileSync(target, 'utf8')).toBe('the schedule from last week\n');
    expect(readdirSync(dir)).toEqual(['coupon.schedule.csv']);
    // with room on the disk the same export arrives in several pieces, whole
    vi.restoreAllMocks();
    writes = 0;
    const counted = fs.open.bind(fs);
    vi.spyOn(fs, 'open').mockImplementation(async (...args: Parameters<typeof fs.open>) => {
      const handle = await counted(...args);
      const write = handle.writeFile.bind(handle);
      handle.writeFile = (async (data: string) => {
        writes++;
        return write(data);
      }) as typeof handle.writeFile;
      return handle;
    });
    host.save.push(target);
    expect(await call('doc:export', { kind: 'schedule', project: couponProject, key: 'coupon', pathId, options, suggestedName: 'c' })).toMatchObject({ ok: true, value: { status: 'saved' } });
    expect(writes).toBeGreaterThanOrEqual(3);
    const rows = readFileSync(target, 'utf8').split('\n').filter((l) => l && !l.startsWith('#'));
    expect(rows.length).toBe(12_001);
    expect(readdirSync(dir)).toEqual(['coupon.schedule.csv']);
  });
});
