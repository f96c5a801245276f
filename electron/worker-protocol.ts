// The protocol between the main process and a solver worker (worker_threads). Every job has a sequence
// number; the worker answers with progress messages and one result. Cancelling cannot wait for the worker
// to read a message (a sweep runs without yielding), so the main side writes the job's number into a
// shared cell that the job polls through shouldStop(). Each poll also counts in a second cell, so the main
// side can tell a job that looks at the flag (give it time to stop) from one that never will (replace its
// worker at once).

export interface RunMessage {
  type: 'run';
  seq: number;
  kind: string;
  payload: unknown;
}

export interface InitMessage {
  type: 'init';
  /** Int32Array over it: [STOP_CELL] = sequence number of the job asked to stop, [POLL_CELL] = polls so far */
  cancel: SharedArrayBuffer;
}

export const STOP_CELL = 0;
export const POLL_CELL = 1;
/** Bytes of the shared cells. */
export const CANCEL_BYTES = 8;

export type ToWorker = RunMessage | InitMessage;

export interface ProgressMessage {
  type: 'progress';
  seq: number;
  done: number;
  total: number;
  phase?: string;
}

/** A piece of the file a job writes (a table), in order; main appends it to the file as it comes. */
export interface ChunkMessage {
  type: 'chunk';
  seq: number;
  data: string;
}

export interface JobError {
  code: string;
  message: string;
  where?: string;
}

export type ResultMessage =
  | { type: 'result'; seq: number; ok: true; value: unknown; stopped?: boolean }
  | { type: 'result'; seq: number; ok: false; error: JobError };

export type FromWorker = ProgressMessage | ChunkMessage | ResultMessage;

export interface JobContext {
  progress(done: number, total: number, phase?: string): void;
  /** true once the main side asked this job to stop */
  shouldStop(): boolean;
  /** send a piece of the job's output file to main, which writes it as it comes (absent: return the whole text) */
  write?(data: string): void;
}

/** A job returns its value; it throws a JobFailure for an error that is the caller's to show. */
export type Job = (payload: unknown, ctx: JobContext) => unknown;

export class JobFailure extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly where?: string,
  ) {
    super(message);
  }
}

/** The part of worker_threads' MessagePort the protocol uses (so tests can pass a fake port). */
export interface PortLike {
  on(event: 'message', listener: (message: unknown) => void): unknown;
  postMessage(message: unknown): void;
}

/** Progress is posted at most this often; a sweep of thousands of samples would flood the port otherwise. */
export const PROGRESS_INTERVAL_MS = 40;

/** Worker side: answer run messages with the given jobs, one at a time, in arrival order. */
export function serveJobs(port: PortLike, jobs: Record<string, Job>, now: () => number = Date.now): void {
  let cancel = new Int32Array(new SharedArrayBuffer(CANCEL_BYTES));
  port.on('message', (raw) => {
    const message = raw as ToWorker;
    if (message.type === 'init') {
      cancel = new Int32Array(message.cancel);
      return;
    }
    if (message.type !== 'run') return;
    const { seq, kind, payload } = message;
    const job = Object.prototype.hasOwnProperty.call(jobs, kind) ? jobs[kind] : undefined;
    if (!job) {
      port.postMessage({ type: 'result', seq, ok: false, error: { code: 'unknown-job', message: `no job named ${kind}` } });
      return;
    }
    let last = -Infinity;
    const ctx: JobContext = {
      progress(done, total, phase) {
        const t = now();
        if (t - last < PROGRESS_INTERVAL_MS && done < total) return;
        last = t;
        port.postMessage({ type: 'progress', seq, done, total, phase } satisfies ProgressMessage);
      },
      shouldStop: () => {
        Atomics.add(cancel, POLL_CELL, 1);
        return Atomics.load(cancel, STOP_CELL) === seq;
      },
      write(data) {
        if (data) port.postMessage({ type: 'chunk', seq, data } satisfies ChunkMessage);
      },
    };
    try {
      const value = job(payload, ctx);
      port.postMessage({ type: 'result', seq, ok: true, value, stopped: Atomics.load(cancel, STOP_CELL) === seq } satisfies ResultMessage);
    } catch (err) {
      const error: JobError =
        err instanceof JobFailure
          ? { code: err.code, message: err.message, where: err.where }
          : { code: 'internal', message: `the ${kind} job failed: ${err instanceof Error ? err.message : String(err)}` };
      port.postMessage({ type: 'result', seq, ok: false, error } satisfies ResultMessage);
    }
  });
}
