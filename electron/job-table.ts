// The worker's jobs by name: what electron/solver-worker.ts serves.
import { createJobState, exportJob, generateJob, loadJob, setPatternJob, shapeJob, solveJob, writeProjectJob, type JobState } from './jobs';
import { branchesJob, sweepJob } from './path-jobs';
import { toleranceJob } from './tolerance-job';
import type { Job, JobContext } from './worker-protocol';

export function createJobs(state: JobState = createJobState()): Record<string, Job> {
  const withState =
    <T>(f: (s: JobState, p: unknown, ctx: JobContext) => T): Job =>
    (payload, ctx) =>
      f(state, payload, ctx);
  return {
    load: withState(loadJob),
    'write-project': withState(writeProjectJob),
    generate: withState(generateJob),
    'set-pattern': withState(setPatternJob),
    solve: withState(solveJob),
    shape: withState(shapeJob),
    export: withState(exportJob),
    branches: withState(branchesJob),
    sweep: withState(sweepJob),
    tolerance: withState(toleranceJob),
  };
}
