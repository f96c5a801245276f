// The tolerance job of the worker: the analysis of `hingeplan tolerance` along the path on screen (the one the
// sweep job computed and keeps here, so the sheets follow exactly its branch), one thread (the worker's lane),
// with progress per sheet and cancel through the job context, turned into a contract value.

import { z } from 'zod';
import type { Pattern } from '../solver/types';
import { runSteps, type SweepResult } from '../solver/paths/sweep';
import { setupFromPath, sheetSteps, type ToleranceOptions, type ToleranceResult } from '../solver/outputs/tolerance/run';
import { linearMisfit, worstVertices } from '../solver/outputs/tolerance/table';
import { ToleranceOptionsSchema, type ToleranceResultDto } from './contract';
import { JobFailure, type JobContext } from './worker-protocol';
import { patternFor, resolveOrFail, type JobState } from './jobs';
import { degreeSamples } from './path-jobs';
import { ExportSweepSchema, storedPathFor } from './export-path';

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;

/** `sweep`: the request of the path (main keeps it), so a worker that lost the path solves it again */
const ToleranceRequest = z.object({ key: z.string(), options: ToleranceOptionsSchema, sweep: ExportSweepSchema.optional() });

const nullable = (x: number) => (Number.isFinite(x) ? x : null);
const deg = (x: number) => (Number.isFinite(x) ? x * DEG : null);

/** `requestedDeg`: the drive values as asked for, so the answer names them exactly (not as degrees → radians → degrees). */
export function toleranceDto(pattern: Pattern, r: ToleranceResult, requestedDeg: number[] = []): ToleranceResultDto {
  const st = r.statistics;
  const spreads = (list: { p05: number; p50: number; p95: number; max: number }[] | undefined) =>
    (list ?? []).map((s) => ({ p05: nullable(s.p05), p50: nullable(s.p50), p95: nullable(s.p95), max: nullable(s.max) }));
  return {
    driveCrease: r.drive,
    driveLabel: pattern.creases[r.drive]?.label ?? String(r.drive),
    ...(r.nominalPath?.branch ? { branchName: r.nominalPath.branch.id !== undefined ? `branch ${r.nominalPath.branch.name}` : r.nominalPath.branch.text || r.nominalPath.branch.name } : {}),
    atDeg: r.at.map((a) => requestedDeg.find((d) => Math.abs(d * RAD - a) <= 1e-12) ?? a * DEG),
    samples: st?.samples ?? 0,
    requested: r.requested,
    seed: r.seed,
    status: r.status,
    model: r.model,
    hinges: st
      ? r.hinges.map((c, h) => ({
          crease: c,
          label: pattern.creases[c].label,
          nominalDeg: r.at.map((_, j) => deg(st.hinges[j][h].nominal)),
          meanDeg: r.at.map((_, j) => deg(st.hinges[j][h].angle.mean)),
          stdDeg: r.at.map((_, j) => deg(st.hinges[j][h].angle.std)),
          p05Deg: r.at.map((_, j) => deg(st.hinges[j][h].angle.p05)),
          p50Deg: r.at.map((_, j) => deg(st.hinges[j][h].angle.p50)),
          p95Deg: r.at.map((_, j) => deg(st.hinges[j][h].angle.p95)),
          linearStdDeg: r.at.map((_, j) => { const v = r.linear?.hingeStd[j]?.[h]; return v === undefined ? null : deg(v); }),
        }))
      : [],
    misfit: spreads(st?.misfit),
    gap: spreads(st?.gap),
    linearMisfit: r.at.map((_, j) => linearMisfit(r, j)?.rms ?? null),
    rigidFraction: (st?.rigidFraction ?? []).map(nullable),
    lost: st?.lost ?? [],
    worstVertices: worstVertices(r).map((v) => ({ vertex: v.vertex, share: v.share })),
    messages: r.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text, ...(m.where ? { where: m.where } : {}) })),
  };
}

/**
 * Indices of the path's samples about `everyDeg` of drive apart: the first, then each sample at least
 * everyDeg (less a hair) past the last one taken, and the last sample always.
 */
export function everySamples(drivesDeg: number[], everyDeg: number): number[] {
  if (!drivesDeg.length) return [];
  const out = [0];
  for (let i = 1; i < drivesDeg.length; i++) {
    if (Math.abs(drivesDeg[i] - drivesDeg[out[out.length - 1]]) >= everyDeg - 1e-9) out.push(i);
  }
  if (out[out.length - 1] !== drivesDeg.length - 1) out.push(drivesDeg.length - 1);
  return out;
}

/** The tolerance analysis along the path on screen (kept in this worker by the sweep that computed it). */
export function toleranceJob(state: JobState, payload: unknown, ctx: JobContext): ToleranceResultDto {
  const r = ToleranceRequest.safeParse(payload);
  if (!r.success) throw new JobFailure('bad-request', 'tolerance: malformed request');
  const { key, options: o } = r.data;
  const pattern = patternFor(state, key);
  const kept = state.paths.get(o.pathId);
  const stored = kept && kept.key === key ? kept : r.data.sweep ? storedPathFor(state, pattern, key, r.data.sweep, true, ctx) : undefined;
  if (!stored || stored.key !== key) throw new JobFailure('path-unknown', 'The path the sheets should follow is no longer known to the solver; compute the path again.');
  const sweep = stored.raw as SweepResult;
  const held = resolveOrFail(pattern, stored.request.held);
  const drivesDeg = sweep.samples.map((s) => s.drive * DEG);
  const indices = everySamples(drivesDeg, o.everyDeg);
  const options: ToleranceOptions = {
    path: { drive: sweep.drive, from: sweep.samples[0]?.drive ?? 0, to: sweep.samples.at(-1)?.drive ?? 0, holds: held.drives },
    tolerance: { position: o.positionTol, sector: o.sectorTolDeg * RAD },
    samples: o.samples,
    seed: o.seed,
  };
  const setup = setupFromPath(sweep, options, indices);
  if (!setup) throw new JobFailure('path-empty', 'The path has no samples for the sheets to follow.');
  const result = runSteps(sheetSteps(pattern, options, sweep, setup, {
    onProgress: (done, total) => ctx.progress(done, total, 'sheets'),
    shouldStop: () => ctx.shouldStop(),
  }));
  // the drive values as the path's samples were asked for (degrees), not as degrees → radians → degrees
  const asked = degreeSamples(stored.request.fromDeg, stored.request.toDeg, stored.request.stepDeg) ?? [];
  return toleranceDto(pattern, result, asked);
}
