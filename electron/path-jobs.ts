// The fold-path jobs of the worker: sweeps (with progress and cancel through the job context) and the
// branches at the flat state, turned into contract values; the computed path stays in the worker for the
// table exports.

import { z } from 'zod';
import type { Pattern } from '../solver/types';
import { sweep, type SweepEvent, type SweepOptions, type SweepResult } from '../solver/paths/sweep';
import { flatBranches, type Branch, type BranchAnalysis } from '../solver/paths/branches';
import { DriveSpecSchema, SweepOptionsSchema, finiteOrNull, type BranchDto, type BranchesResultDto, type PathResultDto } from './contract';
import { JobFailure, type JobContext } from './worker-protocol';
import { patternFor, resolveOrFail, type JobState, type StoredPath } from './jobs';
import { checkPathSize } from './work-limits';

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;

export function branchDto(b: Branch): BranchDto {
  return { id: String(b.id), name: b.name, group: b.group, matchesAssignment: b.matchesAssignment, tangent: Array.from(b.tangent) };
}

export function branchesDto(a: BranchAnalysis): BranchesResultDto {
  return {
    branches: a.branches.map(branchDto),
    messages: a.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text, ...(m.where ? { where: m.where } : {}) })),
  };
}

const BranchesRequest = z.object({ key: z.string(), drives: z.array(DriveSpecSchema) });

/** Branches at the flat state with the drives other than the first held, named by the first drive's sense. */
export function branchesJob(state: JobState, payload: unknown): BranchesResultDto {
  const r = BranchesRequest.safeParse(payload);
  if (!r.success) throw new JobFailure('bad-request', 'branches: malformed request');
  const pattern = patternFor(state, r.data.key);
  const resolved = resolveOrFail(pattern, r.data.drives);
  if (resolved.failed) return { branches: [], messages: resolved.messages };
  const [first, ...rest] = resolved.drives;
  return branchesDto(flatBranches(pattern, { drive: first?.crease, held: rest.map((d) => d.crease) }));
}

function eventDto(e: SweepEvent) {
  return {
    type: e.type,
    driveDeg: e.drive * DEG,
    text: e.text,
    ...(e.crease !== undefined ? { crease: e.crease } : {}),
    ...(e.branches?.length ? { branches: e.branches.map(branchDto), anglesDeg: Array.from(e.angles, (a) => a * DEG) } : {}),
  };
}

export function pathDto(pattern: Pattern, pathId: string, result: SweepResult): PathResultDto {
  return {
    pathId,
    driveCrease: result.drive,
    driveLabel: pattern.creases[result.drive]?.label ?? String(result.drive),
    ...(result.branch?.id !== undefined ? { branchId: String(result.branch.id) } : {}),
    ...(result.branch ? { branchName: result.branch.name } : {}),
    samples: result.samples.map((s) => ({
      driveDeg: s.drive * DEG,
      anglesDeg: Array.from(s.angles, (a) => a * DEG),
      maxResidual: s.maxResidual,
      rates: Array.from(s.rates, finiteOrNull),
      condition: finiteOrNull(s.condition),
      nearSingular: s.nearSingular,
    })),
    events: result.events.map(eventDto),
    messages: result.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text, ...(m.where ? { where: m.where } : {}) })),
    complete: result.status === 'complete',
  };
}

const SweepRequest = z.object({ key: z.string(), pathId: z.string(), options: SweepOptionsSchema });

/** Longest sample list computed here; above it the solver's own step check answers (it names the limit). */
const MAX_DEGREE_SAMPLES = 100_000;

/**
 * Drive values from → to every step, computed in degrees and converted once each, the end included: the
 * values `hingeplan sweep/table --from --to --step` solves at (cli/commands/path-common.ts sampleDegrees),
 * so the command in an exported table's header reproduces its drive column to the last digit.
 */
export function degreeSamples(fromDeg: number, toDeg: number, stepDeg: number): number[] | undefined {
  const dir = toDeg >= fromDeg ? 1 : -1;
  const count = Math.floor(Math.abs(toDeg - fromDeg) / stepDeg + 1e-9);
  if (!(count <= MAX_DEGREE_SAMPLES)) return undefined;
  const out: number[] = [];
  for (let k = 0; k <= count; k++) out.push(+(fromDeg + dir * k * stepDeg).toPrecision(15));
  if (Math.abs(out[out.length - 1] - toDeg) > 1e-9) out.push(toDeg);
  else out[out.length - 1] = toDeg;
  return out;
}

export function sweepJob(state: JobState, payload: unknown, ctx: JobContext): PathResultDto {
  const r = SweepRequest.safeParse(payload);
  if (!r.success) throw new JobFailure('bad-request', 'sweep: malformed request');
  const { key, pathId, options: o } = r.data;
  const pattern = patternFor(state, key);
  const computed = computePath(pattern, key, o, ctx);
  if ('messages' in computed) return { pathId, driveCrease: -1, driveLabel: o.drive, samples: [], events: [], messages: computed.messages, complete: false };
  return pathDto(pattern, pathId, computed.raw as SweepResult);
}

/**
 * The path of a sweep request, solved here: what the window is sent, and what a table export writes from
 * (the export worker computes it again from the same request, to the same numbers).
 */
export function computePath(pattern: Pattern, key: string, o: z.output<typeof SweepOptionsSchema>, ctx: JobContext): StoredPath | { messages: BranchesResultDto['messages'] } {
  const drive = resolveOrFail(pattern, [{ crease: o.drive, angleDeg: o.fromDeg }]);
  const held = resolveOrFail(pattern, o.held);
  if (drive.failed || held.failed) return { messages: [...drive.messages, ...held.messages] };
  checkPathSize(o.fromDeg, o.toDeg, o.stepDeg, pattern.creases.length);
  const samples = degreeSamples(o.fromDeg, o.toDeg, o.stepDeg);
  const options: SweepOptions = {
    drive: drive.drives[0].crease,
    from: o.fromDeg * RAD,
    to: o.toDeg * RAD,
    ...(samples ? { samples: samples.map((d) => d * RAD) } : { step: o.stepDeg * RAD }),
    holds: held.drives,
    ...(o.branchId !== undefined && /^\d+$/.test(o.branchId) ? { branch: Number(o.branchId) } : {}),
    ...(o.startAnglesDeg ? { start: Float64Array.from(o.startAnglesDeg, (a) => a * RAD) } : {}),
  };
  const result = sweep(pattern, options, { onProgress: (done, total) => ctx.progress(done, total), shouldStop: () => ctx.shouldStop() });
  return { key, driveCrease: result.drive, raw: result, request: o };
}
