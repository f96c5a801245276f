// Main side of the worker protocol: a lane is one worker thread running one job at a time, with a queue.
// A job given a supersede key replaces every older job of the same key: a queued one is dropped, a running
// one is asked to stop and its answer thrown away. That keeps a dragged slider from queueing stale solves.
// A stopped job that does not look at the stop flag soon (one long solve, a load) has its worker replaced
// at once; one that does gets a grace period to return. Workers run with memory limits, so a runaway
// allocation ends the worker, never the process around it: the job fails with a message, the next one
// gets a new worker.

import { Worker, type ResourceLimits } from 'node:worker_threads';
import { CANCEL_BYTES, POLL_CELL, STOP_CELL, type FromWorker, type JobError, type ToWorker } from './worker-protocol';

export type LaneOutcome<T> =
  | { status: 'done'; value: T }
  | { status: 'superseded' }
  | { status: 'cancelled' }
  | { status: 'failed'; error: JobError };

export interface RunOptions {
  /** the caller's id for this job, used to cancel it */
  requestId?: string;
  /** a newer job with the same key supersedes this one */
  supersedeKey?: string;
  onProgress?: (done: number, total: number, phase?: string) => void;
  /** pieces of the file the job writes, in order */
  onChunk?: (data: string) => void;
}

export interface WorkerLike {
  postMessage(message: ToWorker): void;
  on(event: 'message', listener: (message: FromWorker) => void): unknown;
  on(event: 'error', listener: (error: Error) => void): unknown;
  on(event: 'exit', listener: (code: number) => void): unknown;
  terminate(): Promise<number> | void;
}

interface Pending {
  seq: number;
  kind: string;
  payload: unknown;
  options: RunOptions;
  resolve: (outcome: LaneOutcome<unknown>) => void;
  /** superseded or cancelled while running: the answer is dropped */
  dropped?: 'superseded' | 'cancelled';
}

export interface LaneOptions {
  /** creates the worker; called again after a crash */
  spawn: () => WorkerLike;
  /** told when a worker died, so callers can forget state that lived in it */
  onRestart?: (reason: string) => void;
  /** a stopped job that has not looked at the stop flag after this long has its worker replaced (default 300 ms) */
  pollGraceMs?: number;
  /** a stopped job that looked at the flag but has not answered after this long has its worker replaced (default 4 s) */
  stopGraceMs?: number;
  /** the worker's heap limit, named in the message when a job runs out of it */
  memoryLimitMb?: number;
}

/**
 * Memory a solver worker may use. The heap limit covers the solver's JavaScript objects (a path's samples
 * as the window receives them, the report arrays); typed arrays live outside it, so requests are also
 * bounded by work limits checked before anything is allocated (see DEVELOPERS.md).
 */
export const SOLVER_RESOURCE_LIMITS: ResourceLimits = { maxOldGenerationSizeMb: 2048, maxYoungGenerationSizeMb: 64, stackSizeMb: 8 };

export function nodeWorkerSpawner(script: string, options: { execArgv?: string[]; resourceLimits?: ResourceLimits } = {}): () => WorkerLike {
  const resourceLimits = options.resourceLimits ?? SOLVER_RESOURCE_LIMITS;
  return () => new Worker(script, { execArgv: options.execArgv ?? [], resourceLimits }) as unknown as WorkerLike;
}

export class WorkerLane {
  private worker: WorkerLike | undefined;
  private cancelCell = new Int32Array(new SharedArrayBuffer(CANCEL_BYTES));
  private queue: Pending[] = [];
  private running: Pending | undefined;
  private nextSeq = 1;
  private disposed = false;

  constructor(private readonly options: LaneOptions) {}

  run<T>(kind: string, payload: unknown, options: RunOptions = {}): Promise<LaneOutcome<T>> {
    if (this.disposed) return Promise.resolve({ status: 'failed', error: { code: 'worker-closed', message: 'the solver has been shut down' } });
    return new Promise((resolve) => {
      const job: Pending = { seq: this.nextSeq++, kind, payload, options, resolve: resolve as Pending['resolve'] };
      if (options.supersedeKey) this.supersede(options.supersedeKey);
      this.queue.push(job);
      this.pump();
    });
  }

  /** Cancel a queued or running job by the caller's id. Returns whether such a job was found. */
  cancel(requestId: string): boolean {
    const queued = this.queue.findIndex((j) => j.options.requestId === requestId);
    if (queued >= 0) {
      const [job] = this.queue.splice(queued, 1);
      job.resolve({ status: 'cancelled' });
      return true;
    }
    if (this.running && this.running.options.requestId === requestId && !this.running.dropped) {
      this.stopRunning('cancelled');
      return true;
    }
    return false;
  }

  /** How many jobs are waiting or running (for tests and the status line). */
  get load(): number {
    return this.queue.length + (this.running ? 1 : 0);
  }

  dispose(): void {
    this.disposed = true;
    for (const job of this.queue) job.resolve({ status: 'cancelled' });
    this.queue = [];
    if (this.running) this.running.resolve({ status: 'cancelled' });
    this.running = undefined;
    void this.worker?.terminate();
    this.worker = undefined;
  }

  private supersede(key: string): void {
    this.queue = this.queue.filter((j) => {
      if (j.options.supersedeKey !== key) return true;
      j.resolve({ status: 'superseded' });
      return false;
    });
    if (this.running && this.running.options.supersedeKey === key && !this.running.dropped) this.stopRunning('superseded');
  }

  private stopRunning(why: 'superseded' | 'cancelled'): void {
    const job = this.running!;
    job.dropped = why;
    const cell = this.cancelCell;
    const polls = Atomics.load(cell, POLL_CELL);
    Atomics.store(cell, STOP_CELL, job.seq);
    // answer now: the caller need not wait for the worker to notice
    job.resolve({ status: why });
    const worker = this.worker;
    const stillRunning = () => this.running === job && this.worker === worker;
    // a job that never polls shouldStop() (one long solve or factorisation) must not hold the lane: replace
    // its worker once it has had a moment to look; one that looked gets the longer grace to return
    const first = setTimeout(() => {
      if (!stillRunning()) return;
      if (Atomics.load(cell, POLL_CELL) === polls) {
        this.replaceWorker();
        return;
      }
      const second = setTimeout(() => {
        if (stillRunning()) this.replaceWorker();
      }, Math.max(0, (this.options.stopGraceMs ?? 4000) - (this.options.pollGraceMs ?? 300)));
      (second as { unref?: () => void }).unref?.();
    }, this.options.pollGraceMs ?? 300);
    (first as { unref?: () => void }).unref?.();
  }

  /** End the worker of a stopped job and go on with the queue on a new one. */
  private replaceWorker(): void {
    const worker = this.worker;
    if (!worker) return;
    this.worker = undefined;
    this.running = undefined;
    void worker.terminate();
    this.options.onRestart?.('a stopped job did not return in time');
    this.pump();
  }

  private ensureWorker(): WorkerLike {
    if (this.worker) return this.worker;
    const worker = this.options.spawn();
    this.cancelCell = new Int32Array(new SharedArrayBuffer(CANCEL_BYTES));
    worker.postMessage({ type: 'init', cancel: this.cancelCell.buffer as SharedArrayBuffer });
    worker.on('message', (m) => this.onMessage(worker, m));
    worker.on('error', (e) => this.onDeath(worker, this.describeError(e)));
    worker.on('exit', (code) => this.onDeath(worker, { code: 'worker-failed', message: `the solver exited (code ${code})` }));
    this.worker = worker;
    return worker;
  }

  private describeError(e: Error): JobError {
    if ((e as NodeJS.ErrnoException).code === 'ERR_WORKER_OUT_OF_MEMORY') {
      const limit = this.options.memoryLimitMb ? ` (${this.options.memoryLimitMb} MiB)` : '';
      return {
        code: 'worker-out-of-memory',
        message: `The solver ran out of the memory it may use${limit} and was restarted; the request was not finished. Ask for less at once: a larger step, fewer rows or a smaller pattern.`,
      };
    }
    return { code: 'worker-failed', message: `the solver stopped: ${e.message}` };
  }

  private pump(): void {
    if (this.running || this.disposed) return;
    const job = this.queue.shift();
    if (!job) return;
    this.running = job;
    this.ensureWorker().postMessage({ type: 'run', seq: job.seq, kind: job.kind, payload: job.payload });
  }

  private onMessage(worker: WorkerLike, message: FromWorker): void {
    if (worker !== this.worker) return;
    const job = this.running;
    if (!job || message.seq !== job.seq) return;
    if (message.type === 'progress') {
      if (!job.dropped) job.options.onProgress?.(message.done, message.total, message.phase);
      return;
    }
    if (message.type === 'chunk') {
      if (!job.dropped) job.options.onChunk?.(message.data);
      return;
    }
    this.running = undefined;
    if (!job.dropped) {
      job.resolve(message.ok ? { status: 'done', value: message.value } : { status: 'failed', error: message.error });
    }
    this.pump();
  }

  private onDeath(worker: WorkerLike, error: JobError): void {
    if (worker !== this.worker) return;
    this.worker = undefined;
    const job = this.running;
    this.running = undefined;
    if (job && !job.dropped) job.resolve({ status: 'failed', error });
    if (this.disposed) return;
    this.options.onRestart?.(error.message);
    this.pump();
  }
}
