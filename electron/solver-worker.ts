// Entry of the solver worker thread: answers the main process's jobs (electron/jobs.ts) over the protocol
// in electron/worker-protocol.ts. Nothing else runs here, so the main thread never waits on a solve.
import { parentPort } from 'node:worker_threads';
import { createJobs } from './job-table';
import { serveJobs } from './worker-protocol';

if (!parentPort) throw new Error('solver-worker.ts runs as a worker thread');
serveJobs(parentPort, createJobs());
