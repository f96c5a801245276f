// The main process's handle on the solver: three worker lanes, so a long sweep never holds up the solve of
// a dragged drive and an export never holds up a sweep, and a registry of the patterns each lane has been
// sent. A lane that lost its patterns (a restarted worker, an evicted cache entry) answers
// `pattern-unknown`; the client sends the pattern again and repeats the job once.

import { LruMap } from './lru';
import { SOLVER_RESOURCE_LIMITS, WorkerLane, type LaneOutcome, type RunOptions, type WorkerLike } from './worker-client';
import type { PatternSourceDto } from './contract';

/** interactive: load, generate, solve, shape, write; long: sweeps and branches; export: files to write */
export type LaneName = 'interactive' | 'long' | 'export';
export const LANE_NAMES: LaneName[] = ['interactive', 'long', 'export'];

export interface SolverClientOptions {
  spawn: () => WorkerLike;
  pollGraceMs?: number;
  stopGraceMs?: number;
  /** the workers' heap limit, for the message when a job runs out of it */
  memoryLimitMb?: number;
}

export class SolverClient {
  readonly lanes: Record<LaneName, WorkerLane>;
  private sources = new LruMap<string, PatternSourceDto>(8);

  constructor(options: SolverClientOptions) {
    const lane = () =>
      new WorkerLane({
        spawn: options.spawn,
        pollGraceMs: options.pollGraceMs,
        stopGraceMs: options.stopGraceMs,
        memoryLimitMb: options.memoryLimitMb ?? SOLVER_RESOURCE_LIMITS.maxOldGenerationSizeMb,
      });
    this.lanes = { interactive: lane(), long: lane(), export: lane() };
  }

  /** Remember a pattern and build it in the interactive lane (its messages come back from there). */
  async setPattern(key: string, source: PatternSourceDto, options: RunOptions = {}) {
    this.sources.set(key, source);
    return this.lanes.interactive.run<{ ok: boolean; summary: unknown; messages: unknown[] }>('set-pattern', { key, source }, options);
  }

  async run<T>(lane: LaneName, kind: string, payload: { key?: string } & Record<string, unknown>, options: RunOptions = {}): Promise<LaneOutcome<T>> {
    const first = await this.lanes[lane].run<T>(kind, payload, options);
    if (first.status !== 'failed' || first.error.code !== 'pattern-unknown' || !payload.key) return first;
    const source = this.sources.get(payload.key);
    if (!source) return { status: 'failed', error: { code: 'pattern-unknown', message: 'the pattern of this document is no longer known to the solver; reopen the document' } };
    // the resend carries the job's id, so cancelling the job also cancels the rebuild of its pattern
    const set = await this.lanes[lane].run<{ ok: boolean }>('set-pattern', { key: payload.key, source }, { requestId: options.requestId });
    if (set.status !== 'done') return set;
    if (!set.value.ok) return { status: 'failed', error: { code: 'pattern-invalid', message: 'the pattern has errors and cannot be solved' } };
    return this.lanes[lane].run<T>(kind, payload, options);
  }

  cancel(requestId: string): boolean {
    // every lane is asked: no short cut, a job id names one job but the pattern resend shares it
    return LANE_NAMES.map((name) => this.lanes[name].cancel(requestId)).some(Boolean);
  }

  dispose(): void {
    for (const name of LANE_NAMES) this.lanes[name].dispose();
  }
}
