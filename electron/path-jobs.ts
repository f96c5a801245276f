// The fold-path jobs of the worker: sweeps (with progress and cancel through the job context) and the
// branches at the flat state, turned into contract values; the computed path stays in the worker for the
// table exports.

import { z } from 'zod';
import type { Drive, Pattern } from '../solver/types';
import { sweep, type SweepEvent, type SweepOptions, type SweepResult, type SweepSample } from '../solver/paths/sweep';
import { flatBranches, type Branch, type BranchAnalysis } from '../solver/paths/branches';
import { DriveSpecSchema, SweepOptionsSchema, finiteOrNull, type BranchDto, type BranchesResultDto, type PathResultDto } from './contract';
import { JobFailure, type JobContext } from './worker-protocol';
import { patternFor, resolveOrFail, type JobState, type StoredPath } from './jobs';
import { checkPathSize } from './work-limits';
import { finishChecks } from '../solver/outputs/path-physics';
import { pathChecks } from './path-checks';
import { matchesAssignment } from '../solver/search/solve';

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

/** The sweep hook that runs a path's checks on every sample. */
function checksHook(checks: NonNullable<ReturnType<typeof pathChecks>['checks']>) {
  return (s: SweepSample) => {
    const c = checks.observe({ drive: s.drive, angles: s.angles, rates: s.rates });
    s.checks = { contact: c.contact, contacts: c.contacts, ...(c.torque ? { torque: c.torque } : {}) };
  };
}

function eventDto(e: SweepEvent) {
  return {
    type: e.type,
    driveDeg: e.drive * DEG,
    text: e.text,
    ...(e.crease !== undefined ? { crease: e.crease } : {}),
    ...(e.branches?.length ? { branches: e.branches.map(branchDto), anglesDeg: Array.from(e.angles, (a) => a * DEG) } : {}),
    ...(e.panels ? { panels: e.panels, point: e.point!, distance: e.distance! } : {}),
    ...(e.type === 'contact' ? { anglesDeg: Array.from(e.angles, (a) => a * DEG) } : {}),
  };
}

export function pathDto(pattern: Pattern, pathId: string, result: SweepResult, named?: { name: string; matchesAssignment: boolean }): PathResultDto {
  const branch = named ?? result.branch;
  return {
    pathId,
    driveCrease: result.drive,
    driveLabel: pattern.creases[result.drive]?.label ?? String(result.drive),
    ...(result.branch?.id !== undefined && !named ? { branchId: String(result.branch.id) } : {}),
    ...(branch ? { branchName: branch.name, branchMatchesAssignment: branch.matchesAssignment } : {}),
    samples: result.samples.map((s) => ({
      driveDeg: s.drive * DEG,
      anglesDeg: Array.from(s.angles, (a) => a * DEG),
      maxResidual: s.maxResidual,
      rates: Array.from(s.rates, finiteOrNull),
      condition: finiteOrNull(s.condition),
      nearSingular: s.nearSingular,
      ...(s.checks?.contact ? { contact: true } : {}),
      ...(s.checks?.contacts.length ? { contacts: s.checks.contacts } : {}),
      ...(s.checks?.torque ? { torque: [...s.checks.torque] } : {}),
    })),
    events: result.events.map(eventDto),
    messages: result.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text, ...(m.where ? { where: m.where } : {}) })),
    complete: result.status === 'complete',
    ...(result.checks ? { contact: result.checks.contact } : {}),
    ...(result.checks?.peakTorque ? { peakTorque: [...result.checks.peakTorque].map(([c, p]) => [c, p.value, p.at * DEG] as [number, number, number]) } : {}),
    status: result.status,
  };
}

/** A state with every fold angle within this of zero is the flat sheet (radians). */
const FLAT = 1e-7;

/**
 * The flat-state ray a path leaves flat along, when it passes through the flat sheet: the branch whose
 * first-order direction is nearest the chord from flat to the next sample (cosine above 0.99), as
 * `hingeplan branches` names it. A path started from a solved state is named this way, so the summary
 * says which branch the chosen solution lies on.
 */
export function flatRayOf(pattern: Pattern, result: SweepResult, holds: Set<number>): Branch | undefined {
  const k = result.samples.findIndex((s) => s.angles.every((a) => Math.abs(a) < FLAT));
  if (k < 0) return undefined;
  // the neighbour on the side the range runs to (the last sample before flat when flat ends the path)
  const next = result.samples[k + 1] ?? result.samples[k - 1];
  if (!next) return undefined;
  const analysis = flatBranches(pattern, { drive: result.drive, held: [...holds] });
  if (analysis.partial) return undefined;
  const chord = next.angles;
  const norm = Math.hypot(...chord);
  if (!(norm > 0)) return undefined;
  let best: Branch | undefined;
  let bestCos = 0.99;
  for (const b of analysis.branches) {
    const tn = Math.hypot(...b.tangent);
    if (!(tn > 0)) continue;
    let dot = 0;
    for (let c = 0; c < chord.length; c++) dot += chord[c] * b.tangent[c];
    const cos = dot / (norm * tn);
    if (cos > bestCos) {
      bestCos = cos;
      best = b;
    }
  }
  return best;
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

/**
 * The flat branch a solved state lies on, found by following its family from the state towards flat (a
 * few exact samples down to 2% of its drive value) and matching the last chord to the rays at flat.
 */
export function branchOfState(pattern: Pattern, drive: number, start: Float64Array, holds: Set<number>): Branch | undefined {
  const v = start[drive];
  if (!(Math.abs(v) > 1e-6)) return undefined;
  const samples = [1, 0.75, 0.5, 0.25, 0.1, 0.04, 0.02].map((k) => v * k);
  const probe = sweep(pattern, { drive, from: samples[0], to: samples[samples.length - 1], samples, start, conditionEvery: 0, analyzeBranches: false });
  const last = probe.samples[probe.samples.length - 1];
  if (!last || Math.abs(last.drive - samples[samples.length - 1]) > 1e-12) return undefined;
  const flat = { ...probe, samples: [{ ...last, angles: new Float64Array(last.angles.length) }, last] };
  const b = flatRayOf(pattern, flat, holds);
  // the ray must leave flat towards the state's side
  return b && Math.sign(b.tangent[drive]) === Math.sign(v) ? b : undefined;
}

/**
 * The path passes through the state: a sample at the state's drive value holds the state's angles (every
 * sample is an exact solve, so the two agree to the solver's tolerance when they are one branch).
 */
export function passesThrough(path: SweepResult, state: Float64Array): boolean {
  const v = state[path.drive];
  const at = path.samples.find((s) => Math.abs(s.drive - v) < 1e-12);
  if (!at) {
    // the state's value is not a sample: the nearest two bracket it, and the state lies between them
    const k = path.samples.findIndex((s, i) => i > 0 && (s.drive - v) * (path.samples[i - 1].drive - v) < 0);
    if (k < 0) return false;
    const [a, b] = [path.samples[k - 1], path.samples[k]];
    const t = (v - a.drive) / (b.drive - a.drive);
    let worst = 0;
    for (let c = 0; c < state.length; c++) worst = Math.max(worst, Math.abs(a.angles[c] + t * (b.angles[c] - a.angles[c]) - state[c]));
    // a chord between neighbours is off the curve by about a tenth of their spread at most
    let spread = 0;
    for (let c = 0; c < state.length; c++) spread = Math.max(spread, Math.abs(b.angles[c] - a.angles[c]));
    return worst <= 0.1 * spread + 1e-6;
  }
  for (let c = 0; c < state.length; c++) if (Math.abs(at.angles[c] - state[c]) > 1e-6) return false;
  return true;
}

export function sweepJob(state: JobState, payload: unknown, ctx: JobContext): PathResultDto {
  const r = SweepRequest.safeParse(payload);
  if (!r.success) throw new JobFailure('bad-request', 'sweep: malformed request');
  const { key, pathId, options: o } = r.data;
  const pattern = patternFor(state, key);
  const computed = computePath(pattern, key, o, ctx);
  if ('messages' in computed) return { pathId, driveCrease: -1, driveLabel: o.drive, samples: [], events: [], messages: computed.messages, complete: false };
  const result = computed.raw as SweepResult;
  const { request, held } = computed;
  // kept here for the analyses that follow the path on screen (tolerance); exports solve it again in their lane
  if (result.status !== 'failed' && result.samples.length) state.paths.set(pathId, { key, driveCrease: result.drive, raw: result, request });
  const startKind = request.startAnglesDeg ? 'state' : held.some((h) => h.value !== 0) ? 'solution' : 'flat';
  // a path from a given state is named by the flat ray it runs along, when it passes through flat
  let named: { name: string; matchesAssignment: boolean } | undefined;
  if (startKind === 'state' && result.samples.length > 1 && !ctx.shouldStop()) {
    const ray = flatRayOf(pattern, result, new Set(held.map((h) => h.crease)));
    if (ray) named = { name: ray.name, matchesAssignment: ray.matchesAssignment };
  }
  return { ...pathDto(pattern, pathId, result, named), startKind };
}

/**
 * The path of a sweep request, solved here: what the window is sent, and what a table export writes from
 * (the export worker computes it again from the same request, to the same numbers). Its `request` is the
 * one the path was solved for (a start on a branch through flat becomes that branch from flat).
 */
export function computePath(pattern: Pattern, key: string, o: z.output<typeof SweepOptionsSchema>, ctx: JobContext): (StoredPath & { held: Drive[] }) | { messages: BranchesResultDto['messages'] } {
  const drive = resolveOrFail(pattern, [{ crease: o.drive, angleDeg: o.fromDeg }]);
  const held = resolveOrFail(pattern, o.held);
  if (drive.failed || held.failed) return { messages: [...drive.messages, ...held.messages] };
  checkPathSize(o.fromDeg, o.toDeg, o.stepDeg, pattern.creases.length);
  const samples = degreeSamples(o.fromDeg, o.toDeg, o.stepDeg);
  // a solution on a branch through flat, with the range on its side of flat: follow that branch from flat
  // (found by the rays at flat on sheets small enough for the full analysis, else the branch that follows
  // the assignment), and keep that path only if it passes through the solution
  const hooks = { onProgress: (done: number, total: number) => ctx.progress(done, total), shouldStop: () => ctx.shouldStop() };
  const base: SweepOptions = {
    drive: drive.drives[0].crease,
    from: o.fromDeg * RAD,
    to: o.toDeg * RAD,
    ...(samples ? { samples: samples.map((d) => d * RAD) } : { step: o.stepDeg * RAD }),
    holds: held.drives,
  };
  // every sweep run here gets checks of its own (contact, and torque with the document's loads)
  const run = (opts: SweepOptions): SweepResult => {
    const { checks, messages } = pathChecks(pattern, o, base.drive, held.drives);
    const r = sweep(pattern, opts, checks ? { ...hooks, onSample: checksHook(checks) } : hooks);
    if (checks) finishChecks(r, checks);
    r.messages.push(...messages);
    return r;
  };
  let request = o;
  let result: SweepResult | undefined;
  if (o.startAnglesDeg && o.viaFlatBranch && held.drives.every((h) => h.value === 0)) {
    const start = Float64Array.from(o.startAnglesDeg, (a) => a * RAD);
    const d = base.drive;
    const side = Math.sign(start[d]);
    // the whole range on the state's side of flat (the flat state itself included)
    if (side !== 0 && o.fromDeg * side >= 0 && o.toDeg * side >= 0) {
      const b = branchOfState(pattern, d, start, new Set(held.drives.map((h) => h.crease)));
      if (b || matchesAssignment(pattern, start)) {
        const flat = run({ ...base, ...(b ? { branch: b.id } : {}) });
        // a path stopped by the person stays stopped; one that misses the solution is not the solution's path
        if (flat.status === 'stopped' || passesThrough(flat, start)) {
          result = flat;
          request = { ...o, startAnglesDeg: undefined, viaFlatBranch: undefined, ...(b ? { branchId: String(b.id) } : {}) };
        }
      }
    }
  }
  const options: SweepOptions = {
    ...base,
    ...(request.branchId !== undefined && /^\d+$/.test(request.branchId) ? { branch: Number(request.branchId) } : {}),
    ...(request.startAnglesDeg ? { start: Float64Array.from(request.startAnglesDeg, (a) => a * RAD) } : {}),
  };
  result ??= run(options);
  return { key, driveCrease: result.drive, raw: result, request, held: held.drives };
}
