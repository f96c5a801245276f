// Main side of the worker protocol: a lane is one worker thread running one job at a time, with a queue.
// A job given a supersede key replaces every older job of the same key: a queued one is dropped, a running
// one is asked to stop and its answer thrown away. That keeps a dragged slider from queueing stale solves.

import { Worker } from 'node:worker_threads';
import type { FromWorker, JobError, ToWorker } from './worker-protocol';

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
  /** a stopped job that has not answered after this long has its worker replaced (default 4 s) */
  stopGraceMs?: number;
}

export function nodeWorkerSpawner(script: string, execArgv: string[] = []): () => WorkerLike {
  return () => new Worker(script, { execArgv }) as unknown as WorkerLike;
}

export class WorkerLane {
  private worker: WorkerLike | undefined;
  private cancelCell = new Int32Array(new SharedArrayBuffer(4));
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
    Atomics.store(this.cancelCell, 0, job.seq);
    // answer now: the caller need not wait for the worker to notice
    job.resolve({ status: why });
    // a job that never polls shouldStop() (one long factorisation, say) must not hold the lane forever
    const worker = this.worker;
    const timer = setTimeout(() => {
      if (this.running === job && this.worker === worker) void worker?.terminate();
    }, this.options.stopGraceMs ?? 4000);
    (timer as { unref?: () => void }).unref?.();
  }

  private ensureWorker(): WorkerLike {
    if (this.worker) return this.worker;
    const worker = this.options.spawn();
    this.cancelCell = new Int32Array(new SharedArrayBuffer(4));
    worker.postMessage({ type: 'init', cancel: this.cancelCell.buffer as SharedArrayBuffer });
    worker.on('message', (m) => this.onMessage(worker, m));
    worker.on('error', (e) => this.onDeath(worker, `the solver stopped: ${e.message}`));
    worker.on('exit', (code) => this.onDeath(worker, `the solver exited (code ${code})`));
    this.worker = worker;
    return worker;
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
    this.running = undefined;
    if (!job.dropped) {
      job.resolve(message.ok ? { status: 'done', value: message.value } : { status: 'failed', error: message.error });
    }
    this.pump();
  }

  private onDeath(worker: WorkerLike, reason: string): void {
    if (worker !== this.worker) return;
    this.worker = undefined;
    const job = this.running;
    this.running = undefined;
    if (job && !job.dropped) job.resolve({ status: 'failed', error: { code: 'worker-failed', message: reason } });
    if (this.disposed) return;
    this.options.onRestart?.(reason);
    this.pump();
  }
}
