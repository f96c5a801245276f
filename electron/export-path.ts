// The path a table export writes from (and an analysis follows). Exports run in a worker of their own (so
// they never hold up a sweep), which has not computed the path the window shows, and a worker may have lost
// a path (restarted, evicted): main hands the job the sweep's request and the path is solved again here, to
// the same numbers (the sweep is deterministic), and kept for the next job.

import { z } from 'zod';
import type { Pattern } from '../solver/types';
import { SweepOptionsSchema } from './contract';
import { computePath } from './path-jobs';
import { resolveOrFail, type JobState, type StoredPath } from './jobs';
import { JobFailure, type JobContext } from './worker-protocol';

export const ExportSweepSchema = z.object({ pathId: z.string().max(120), key: z.string(), options: SweepOptionsSchema });
export type ExportSweep = z.output<typeof ExportSweepSchema>;

/**
 * The stored path of a sweep request for a table. A schedule solves its own rows and needs only the
 * request as solved (`samples: false`); an angle table needs the samples, computed here when this worker
 * lacks them.
 */
export function storedPathFor(state: JobState, pattern: Pattern, key: string, sweep: ExportSweep | undefined, samples: boolean, ctx?: JobContext): StoredPath {
  if (!sweep) throw new JobFailure('no-path', 'compute a path first: tables are written from the computed path');
  if (sweep.key !== key) throw new JobFailure('path-unknown', 'the computed path belongs to an earlier state of the pattern; compute it again');
  // a start on a branch through flat is solved as that branch from flat, and the request changes with it
  // (the table's command names the branch): only solving the path tells, so such a request is solved here
  const rewritten = !!(sweep.options.startAnglesDeg && sweep.options.viaFlatBranch);
  if (!samples && !rewritten) {
    const drive = resolveOrFail(pattern, [{ crease: sweep.options.drive, angleDeg: sweep.options.fromDeg }]);
    if (drive.failed) throw new JobFailure('bad-drive', drive.messages.map((m) => m.text).join(' '));
    return { key, driveCrease: drive.drives[0].crease, raw: undefined, request: sweep.options };
  }
  const kept = state.paths.get(sweep.pathId);
  if (kept && kept.key === key) return kept;
  const noContext: JobContext = { progress: () => undefined, shouldStop: () => false };
  const computed = computePath(pattern, key, sweep.options, ctx ?? noContext);
  if ('messages' in computed) throw new JobFailure('bad-path', computed.messages.map((m) => m.text).join(' '));
  const raw = computed.raw as { status: string; samples: unknown[] };
  if (raw.status === 'stopped') throw new JobFailure('cancelled', 'the export was cancelled');
  if (raw.status === 'failed' && !raw.samples.length) throw new JobFailure('path-failed', 'the path could not be computed again for the table');
  state.paths.set(sweep.pathId, computed);
  return computed;
}
