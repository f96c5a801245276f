// The main process's handle on the solver: two worker lanes, so a long sweep never holds up the solve of a
// dragged drive, and a registry of the patterns each lane has been sent. A lane that lost its patterns (a
// restarted worker, an evicted cache entry) answers `pattern-unknown`; the client sends the pattern again
// and repeats the job once.

import { LruMap } from './lru';
import { WorkerLane, type LaneOutcome, type RunOptions, type WorkerLike } from './worker-client';
import type { PatternSourceDto } from './contract';

export type LaneName = 'interactive' | 'long';

export interface SolverClientOptions {
  spawn: () => WorkerLike;
  stopGraceMs?: number;
}

export class SolverClient {
  readonly lanes: Record<LaneName, WorkerLane>;
  private sources = new LruMap<string, PatternSourceDto>(8);

  constructor(options: SolverClientOptions) {
    const lane = () => new WorkerLane({ spawn: options.spawn, stopGraceMs: options.stopGraceMs });
    this.lanes = { interactive: lane(), long: lane() };
  }

  /** Remember a pattern and build it in the interactive lane (its messages come back from there). */
  async setPattern(key: string, source: PatternSourceDto) {
    this.sources.set(key, source);
    return this.lanes.interactive.run<{ ok: boolean; summary: unknown; messages: unknown[] }>('set-pattern', { key, source });
  }

  async run<T>(lane: LaneName, kind: string, payload: { key?: string } & Record<string, unknown>, options: RunOptions = {}): Promise<LaneOutcome<T>> {
    const first = await this.lanes[lane].run<T>(kind, payload, options);
    if (first.status !== 'failed' || first.error.code !== 'pattern-unknown' || !payload.key) return first;
    const source = this.sources.get(payload.key);
    if (!source) return { status: 'failed', error: { code: 'pattern-unknown', message: 'the pattern of this document is no longer known to the solver; reopen the document' } };
    const set = await this.lanes[lane].run<{ ok: boolean }>('set-pattern', { key: payload.key, source });
    if (set.status !== 'done') return set;
    if (!set.value.ok) return { status: 'failed', error: { code: 'pattern-invalid', message: 'the pattern has errors and cannot be solved' } };
    return this.lanes[lane].run<T>(kind, payload, options);
  }

  cancel(requestId: string): boolean {
    const a = this.lanes.interactive.cancel(requestId);
    const b = this.lanes.long.cancel(requestId);
    return a || b;
  }

  dispose(): void {
    this.lanes.interactive.dispose();
    this.lanes.long.dispose();
  }
}
