// The tolerance analysis spread over worker threads. Every sheet depends only on the seed and its index, so
// workers take small batches of indices as they become free and send each sheet back as it is done; the main
// thread keeps them in index order. The first worker also computes the first-order estimate. Stopping (Ctrl-C)
// terminates the workers; the sheets received so far are kept.
//
// The worker runs this same module (the bundled program, or this file through tsx when run from source): at
// load, a worker thread started with our workerData becomes a worker instead of a command line.
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads';
import { availableParallelism } from 'node:os';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { loadPatternText } from '../solver/formats/project';
import { SheetSolver, type SheetResult, type ToleranceSetup } from '../solver/outputs/tolerance/sheet';
import { linearSteps, type LinearEstimate } from '../solver/outputs/tolerance/linear';
import { runSteps } from '../solver/paths/sweep';

const KIND = 'hingeplan-tolerance-worker';
/** Sheets handed to a worker at a time: small, so that a stop loses little and every worker stays busy. */
const BATCH = 4;

interface WorkerInput {
  kind: typeof KIND;
  text: string;
  name: string;
  setup: ToleranceSetup;
}

type ToWorker = { type: 'sheets'; from: number; to: number } | { type: 'linear' };
type FromWorker =
  | { type: 'ready' }
  | { type: 'sheet'; sheet: SheetResult }
  | { type: 'idle' }
  | { type: 'linear'; linear: LinearEstimate }
  | { type: 'error'; message: string };

export function defaultWorkers(): number {
  return Math.max(1, availableParallelism());
}

export interface PoolRun {
  sheets: SheetResult[];
  linear?: LinearEstimate;
  stopped: boolean;
  error?: string;
}

/**
 * Follow sheets 0 … samples−1 on `workers` threads (and the first-order estimate when asked). `onSheet` is
 * told of every sheet received; `stop()` (e.g. from Ctrl-C) ends the run with what has arrived.
 */
export function runPool(
  input: { text: string; name: string; setup: ToleranceSetup },
  samples: number,
  workers: number,
  linear: boolean,
  onSheet: (done: number) => void,
): { done: Promise<PoolRun>; stop: () => void } {
  const sheets: SheetResult[] = [];
  let estimate: LinearEstimate | undefined;
  let next = 0;
  let stopped = false;
  let linearPending = linear;
  const threads: Worker[] = [];
  let finish: (r: PoolRun) => void = () => {};
  const done = new Promise<PoolRun>((resolve) => { finish = resolve; });
  let settled = false;
  const end = (error?: string) => {
    if (settled) return;
    settled = true;
    for (const t of threads) void t.terminate();
    finish({ sheets, linear: estimate, stopped, error });
  };
  const busy = new Set<Worker>();
  const maybeEnd = () => {
    if (next >= samples && !linearPending && busy.size === 0) end();
  };
  const give = (w: Worker) => {
    if (settled) return;
    if (linearPending && w === threads[0]) {
      busy.add(w);
      w.postMessage({ type: 'linear' } satisfies ToWorker);
      return;
    }
    if (next < samples) {
      const from = next;
      next = Math.min(samples, next + BATCH);
      busy.add(w);
      w.postMessage({ type: 'sheets', from, to: next } satisfies ToWorker);
      return;
    }
    busy.delete(w);
    maybeEnd();
  };
  const count = Math.max(1, Math.min(workers, samples));
  for (let i = 0; i < count; i++) {
    const w = startWorker({ kind: KIND, ...input });
    threads.push(w);
    w.on('message', (m: FromWorker) => {
      if (settled) return;
      if (m.type === 'ready') give(w);
      else if (m.type === 'sheet') { sheets.push(m.sheet); onSheet(sheets.length); }
      else if (m.type === 'linear') { estimate = m.linear; linearPending = false; busy.delete(w); give(w); }
      else if (m.type === 'idle') { busy.delete(w); give(w); }
      else if (m.type === 'error') end(m.message);
    });
    w.on('error', (e) => end(e.message));
    w.on('exit', (code) => { if (!settled && code !== 0) end(`a worker thread stopped (exit code ${code})`); });
  }
  return {
    done,
    stop: () => { stopped = true; end(); },
  };
}

/**
 * A worker running this module: the bundle it is part of, or (run from source, as the tests do) this file
 * through tsx's loader, registered in the worker before the import.
 */
function startWorker(data: WorkerInput): Worker {
  const url = new URL(import.meta.url);
  if (!url.pathname.endsWith('.ts')) return new Worker(url, { workerData: data });
  // the ES module build of tsx's API (require.resolve gives its CommonJS twin)
  const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api').replace(/\.cjs$/, '.mjs')).href;
  const code = `import(${JSON.stringify(tsx)}).then((m) => { m.register(); return import(${JSON.stringify(url.href)}); });`;
  return new Worker(code, { eval: true, workerData: data });
}

function serveWorker(input: WorkerInput): void {
  const port = parentPort!;
  const loaded = loadPatternText(input.text, input.name);
  if (!loaded.pattern) {
    port.postMessage({ type: 'error', message: `${input.name}: the pattern could not be read in a worker thread` } satisfies FromWorker);
    return;
  }
  const solver = new SheetSolver(loaded.pattern, input.setup);
  port.on('message', (m: ToWorker) => {
    try {
      if (m.type === 'linear') {
        const linear = runSteps(linearSteps(solver));
        port.postMessage({ type: 'linear', linear } satisfies FromWorker);
        return;
      }
      for (let i = m.from; i < m.to; i++) {
        const sheet = solver.sheet(i);
        const buffers = [sheet.angles, sheet.misfit, sheet.gap, sheet.status, sheet.shares].map((a) => a.buffer as ArrayBuffer);
        port.postMessage({ type: 'sheet', sheet } satisfies FromWorker, buffers);
      }
      port.postMessage({ type: 'idle' } satisfies FromWorker);
    } catch (e) {
      port.postMessage({ type: 'error', message: (e as Error).message ?? String(e) } satisfies FromWorker);
    }
  });
  port.postMessage({ type: 'ready' } satisfies FromWorker);
}

if (!isMainThread && (workerData as WorkerInput | undefined)?.kind === KIND) serveWorker(workerData as WorkerInput);
