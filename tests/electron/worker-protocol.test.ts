// The worker protocol between the main process and a solver thread: progress, cancel, supersede, failures
// and crashes, on real worker threads.
import { afterEach, describe, expect, it } from 'vitest';
import { WorkerLane, nodeWorkerSpawner } from '../../electron/worker-client';
import { buildWorker } from './support';
import type { ResourceLimits } from 'node:worker_threads';

const lanes: WorkerLane[] = [];
async function lane(options: { stopGraceMs?: number; onRestart?: (r: string) => void; resourceLimits?: ResourceLimits; memoryLimitMb?: number } = {}) {
  const script = await buildWorker('tests/electron/fixtures/count-worker.ts');
  const { resourceLimits, ...rest } = options;
  const l = new WorkerLane({ spawn: nodeWorkerSpawner(script, resourceLimits ? { resourceLimits } : {}), ...rest });
  lanes.push(l);
  return l;
}

afterEach(() => {
  while (lanes.length) lanes.pop()!.dispose();
});

describe('worker lane', () => {
  it('reports progress and then the result', async () => {
    const l = await lane();
    const seen: [number, number][] = [];
    const r = await l.run<{ steps: number }>('count', { n: 10, ms: 50 }, { onProgress: (d, t) => seen.push([d, t]) });
    expect(r).toEqual({ status: 'done', value: { steps: 10 } });
    expect(seen.length).toBeGreaterThan(2);
    expect(seen.every(([, t]) => t === 10)).toBe(true);
    // progress only grows, and the last report is the end
    for (let i = 1; i < seen.length; i++) expect(seen[i][0]).toBeGreaterThan(seen[i - 1][0]);
    expect(seen[seen.length - 1][0]).toBe(10);
  });

  it('cancels a running job: it answers cancelled at once and the worker stops it early', async () => {
    const reasons: string[] = [];
    const l = await lane({ onRestart: (r) => reasons.push(r) });
    let progressed = 0;
    const running = l.run('count', { n: 200, ms: 10 }, { requestId: 'sweep-1', onProgress: () => progressed++ });
    await new Promise((r) => setTimeout(r, 150));
    expect(l.cancel('sweep-1')).toBe(true);
    expect(await running).toEqual({ status: 'cancelled' });
    const before = progressed;
    // the next job runs on the same worker once the cancelled one has stopped (well before its 2 s)
    const t0 = Date.now();
    expect(await l.run('echo', { ok: 1 })).toEqual({ status: 'done', value: { ok: 1 } });
    expect(Date.now() - t0).toBeLessThan(1500);
    expect(progressed).toBe(before);
    // a job that looks at the flag keeps its worker (and whatever the worker holds)
    expect(reasons).toEqual([]);
  });

  it('cancels a queued job without running it', async () => {
    const l = await lane();
    const first = l.run('count', { n: 5, ms: 20 });
    const queued = l.run('echo', 'never', { requestId: 'q' });
    expect(l.cancel('q')).toBe(true);
    expect(await queued).toEqual({ status: 'cancelled' });
    expect((await first).status).toBe('done');
    expect(l.cancel('no-such-job')).toBe(false);
  });

  it('supersedes older jobs of the same key while a drive is dragged', async () => {
    const l = await lane();
    const a = l.run('count', { n: 100, ms: 10 }, { supersedeKey: 'solve' });
    await new Promise((r) => setTimeout(r, 50));
    const b = l.run('count', { n: 3, ms: 10 }, { supersedeKey: 'solve' });
    const other = l.run('echo', 'kept', { supersedeKey: 'shape' });
    const c = l.run<{ steps: number }>('count', { n: 3, ms: 10 }, { supersedeKey: 'solve' });
    expect(await a).toEqual({ status: 'superseded' });
    expect(await b).toEqual({ status: 'superseded' });
    expect(await other).toEqual({ status: 'done', value: 'kept' });
    expect(await c).toEqual({ status: 'done', value: { steps: 3 } });
  });

  it('passes a job failure through as a value with its code', async () => {
    const l = await lane();
    expect(await l.run('fail', {})).toEqual({ status: 'failed', error: { code: 'bad-thing', message: 'the job could not do it', where: 'here' } });
    expect(await l.run('nope', {})).toMatchObject({ status: 'failed', error: { code: 'unknown-job' } });
  });

  it('survives a worker that dies: the job fails, the next one runs on a new worker', async () => {
    const reasons: string[] = [];
    const l = await lane({ onRestart: (r) => reasons.push(r) });
    const r = await l.run('crash', {});
    expect(r).toMatchObject({ status: 'failed', error: { code: 'worker-failed' } });
    expect(reasons.length).toBe(1);
    expect(await l.run('echo', 2)).toEqual({ status: 'done', value: 2 });
  });

  it('replaces the worker of a stopped job that never looks at the stop flag', async () => {
    const reasons: string[] = [];
    const l = await lane({ stopGraceMs: 200, onRestart: (r) => reasons.push(r) });
    const stuck = l.run('count', { n: 500, ms: 10, ignoreStop: true }, { requestId: 'stuck' });
    await new Promise((r) => setTimeout(r, 100));
    l.cancel('stuck');
    expect(await stuck).toEqual({ status: 'cancelled' });
    const t0 = Date.now();
    expect(await l.run('echo', 'after')).toEqual({ status: 'done', value: 'after' });
    expect(Date.now() - t0).toBeLessThan(2500);
    expect(reasons.length).toBe(1);
  });

  it('replaces the worker of a superseded job that never looks at the flag at once, not after the grace period', async () => {
    const reasons: string[] = [];
    // the default 4 s grace for jobs that do look; this one never does (one long solve, say)
    const l = await lane({ onRestart: (r) => reasons.push(r) });
    const old = l.run('busy', { ms: 6000 }, { supersedeKey: 'solve' });
    await new Promise((r) => setTimeout(r, 100));
    const t0 = Date.now();
    const latest = l.run('echo', 'latest', { supersedeKey: 'solve' });
    expect(await old).toEqual({ status: 'superseded' });
    expect(await latest).toEqual({ status: 'done', value: 'latest' });
    expect(Date.now() - t0).toBeLessThan(2500);
    expect(reasons).toEqual(['a stopped job did not return in time']);
  });

  it('gives a stopped job that looks at the flag its grace period before replacing its worker', async () => {
    const reasons: string[] = [];
    const l = await lane({ stopGraceMs: 1200, onRestart: (r) => reasons.push(r) });
    const slow = l.run('linger', { ms: 8000 }, { requestId: 'slow' });
    await new Promise((r) => setTimeout(r, 100));
    const t0 = Date.now();
    l.cancel('slow');
    expect(await slow).toEqual({ status: 'cancelled' });
    expect(await l.run('echo', 'next')).toEqual({ status: 'done', value: 'next' });
    const waited = Date.now() - t0;
    expect(waited).toBeGreaterThanOrEqual(1100);
    expect(waited).toBeLessThan(4000);
    expect(reasons.length).toBe(1);
  });

  it('ends only the worker when a job allocates without bound: the job fails with a message, the next one runs', async () => {
    const reasons: string[] = [];
    const l = await lane({ resourceLimits: { maxOldGenerationSizeMb: 64, maxYoungGenerationSizeMb: 16 }, memoryLimitMb: 64, onRestart: (r) => reasons.push(r) });
    let peak = process.memoryUsage().rss;
    const start = peak;
    const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 10);
    const t0 = Date.now();
    const r = await l.run('hog', {});
    clearInterval(sampler);
    expect(r).toMatchObject({ status: 'failed', error: { code: 'worker-out-of-memory' } });
    expect((r as { error: { message: string } }).error.message).toMatch(/ran out of the memory it may use \(64 MiB\) and was restarted/);
    expect(Date.now() - t0).toBeLessThan(15_000);
    // the process around it grew by about the worker's limit, not without bound
    expect(peak - start).toBeLessThan(400 * 1024 * 1024);
    expect(reasons.length).toBe(1);
    expect(await l.run('echo', 'alive')).toEqual({ status: 'done', value: 'alive' });
  });
});
