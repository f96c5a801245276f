// The tolerance job of the worker: the same analysis as `hingeplan tolerance` (one thread here: the worker's
// lane), with progress per sheet and cancel through the job context, turned into a contract value.

import { z } from 'zod';
import type { Pattern } from '../solver/types';
import { runSteps } from '../solver/paths/sweep';
import { toleranceSteps, type ToleranceOptions, type ToleranceResult } from '../solver/outputs/tolerance/run';
import { linearMisfit, worstVertices } from '../solver/outputs/tolerance/table';
import { ToleranceOptionsSchema, type ToleranceResultDto } from './contract';
import { JobFailure, type JobContext } from './worker-protocol';
import { patternFor, resolveOrFail, type JobState } from './jobs';
import { degreeSamples } from './path-jobs';

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;

const ToleranceRequest = z.object({ key: z.string(), options: ToleranceOptionsSchema });

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
    ...(r.nominalPath?.branch ? { branchName: `${r.nominalPath.branch.id ?? ''} ${r.nominalPath.branch.name}`.trim() } : {}),
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

export function toleranceJob(state: JobState, payload: unknown, ctx: JobContext): ToleranceResultDto {
  const r = ToleranceRequest.safeParse(payload);
  if (!r.success) throw new JobFailure('bad-request', 'tolerance: malformed request');
  const { key, options: o } = r.data;
  const pattern = patternFor(state, key);
  const drive = resolveOrFail(pattern, [{ crease: o.drive, angleDeg: o.fromDeg }]);
  const held = resolveOrFail(pattern, o.held);
  const empty = (messages: ToleranceResultDto['messages']): ToleranceResultDto => ({
    driveCrease: -1, driveLabel: o.drive, atDeg: [], samples: 0, requested: o.samples, seed: o.seed, status: 'failed', model: '',
    hinges: [], misfit: [], gap: [], linearMisfit: [], rigidFraction: [], lost: [], worstVertices: [], messages,
  });
  if (drive.failed || held.failed) return empty([...drive.messages, ...held.messages]);
  const samples = degreeSamples(o.fromDeg, o.toDeg, o.stepDeg);
  if (!samples) return empty([{ severity: 'error', code: 'too-many-samples', text: 'The step gives more drive values than a path takes; use a larger step.' }]);
  const options: ToleranceOptions = {
    path: {
      drive: drive.drives[0].crease,
      from: o.fromDeg * RAD,
      to: o.toDeg * RAD,
      samples: samples.map((d) => d * RAD),
      holds: held.drives,
      ...(o.branchId !== undefined && /^\d+$/.test(o.branchId) ? { branch: Number(o.branchId) } : {}),
      ...(o.startAnglesDeg ? { start: Float64Array.from(o.startAnglesDeg, (a) => a * RAD) } : {}),
      conditionEvery: 0,
    },
    tolerance: { position: o.positionTol, sector: o.sectorTolDeg * RAD },
    samples: o.samples,
    seed: o.seed,
  };
  const result = runSteps(toleranceSteps(pattern, options, {
    onProgress: (done, total) => ctx.progress(done, total, 'sheets'),
    shouldStop: () => ctx.shouldStop(),
  }));
  return toleranceDto(pattern, result, samples);
}
