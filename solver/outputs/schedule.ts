// Deployment schedules: a drive profile in time (constant rate, trapezoidal velocity, or a jerk-limited
// S-curve), every hinge angle at each time row solved exactly on the path, hinge velocity = rate × drive
// velocity and hinge acceleration = rate × drive acceleration + curvature × drive velocity², and flags on
// every hinge that exceeds a rate or acceleration limit. Also: following a schedule the actuator team
// supplies (time and drive angles per row), with a clear flag on rows that have no consistent state.

import type { Drive, Message, Pattern } from '../types';
import type { ChecksSummary, StateChecks } from './path-physics';
import { runSteps, sweepSteps, type SweepEvent, type SweepHooks, type SweepOptions, type SweepResult, type SweepSample } from '../paths/sweep';
import { solveDrives } from '../search/solve';
import { ClosureProblem, RESIDUAL_TOLERANCE } from '../closure/newton';
import { wrapAngle } from '../math/rotation';

const DEG = 180 / Math.PI;

export type ProfileKind = 'constant' | 'trapezoid' | 's-curve';

export interface ProfileSpec {
  kind: ProfileKind;
  /** drive values, radians */
  from: number;
  to: number;
  /** total time, seconds */
  duration: number;
  /** trapezoid / S-curve: time to reach cruise speed (the same for stopping), seconds */
  accelTime?: number;
  /** trapezoid: drive acceleration (rad/s²) instead of accelTime */
  acceleration?: number;
  /** S-curve: duration of each jerk ramp within the acceleration phase, seconds (default accelTime / 4) */
  jerkTime?: number;
}

export interface ProfileState {
  t: number;
  position: number;
  velocity: number;
  acceleration: number;
}

export interface DriveProfile {
  spec: ProfileSpec;
  /** acceleration phase length and jerk ramp length actually used, seconds */
  accelTime: number;
  jerkTime: number;
  peakVelocity: number;
  peakAcceleration: number;
  at(t: number): ProfileState;
}

/**
 * The drive profile, or a message saying what is wrong with its parameters. Closed forms, symmetric start
 * and stop: with acceleration phase t_a and jerk ramps t_j (0 for a trapezoid), v_max = Δ / (T − t_a) and the
 * peak acceleration a_max = v_max / (t_a − t_j) (the velocity gained in a symmetric phase; common practice
 * for point-to-point motion profiles).
 */
export function driveProfile(spec: ProfileSpec): { profile?: DriveProfile; message?: Message } {
  const bad = (text: string, field: string): { message: Message } => ({ message: { severity: 'error', code: 'bad-profile', text, where: { field } } });
  const T = spec.duration;
  if (!(Number.isFinite(T) && T > 0)) return bad(`The duration must be a positive number of seconds, not ${spec.duration}.`, 'duration');
  if (![spec.from, spec.to].every(Number.isFinite)) return bad('The drive start and end must be numbers.', 'from');
  const delta = spec.to - spec.from;
  const dist = Math.abs(delta);
  const sign = delta < 0 ? -1 : 1;
  let ta = 0, tj = 0;
  if (spec.kind === 'trapezoid') {
    if (spec.acceleration !== undefined) {
      const A = spec.acceleration;
      if (!(A > 0)) return bad(`The acceleration must be positive, not ${A}.`, 'acceleration');
      // Δ = a t_a (T − t_a) → t_a = (T − √(T² − 4Δ/a)) / 2, real only when a ≥ 4Δ/T²
      const disc = T * T - (4 * dist) / A;
      if (disc < 0) return bad(`An acceleration of ${(A * DEG).toPrecision(6)}°/s² cannot move ${(dist * DEG).toPrecision(6)}° in ${T} s; it needs at least ${((4 * dist) / (T * T) * DEG).toPrecision(6)}°/s².`, 'acceleration');
      ta = (T - Math.sqrt(disc)) / 2;
    } else {
      ta = spec.accelTime ?? T / 4;
    }
  } else if (spec.kind === 's-curve') {
    ta = spec.accelTime ?? T / 4;
    tj = spec.jerkTime ?? ta / 4;
    if (!(tj >= 0 && tj <= ta / 2)) return bad(`The jerk time must be between 0 and half the acceleration time (${ta / 2} s), not ${tj}.`, 'jerkTime');
  } else if (spec.kind !== 'constant') {
    return bad(`Unknown profile "${String(spec.kind)}"; use constant, trapezoid or s-curve.`, 'kind');
  }
  if (!(ta >= 0 && ta <= T / 2)) return bad(`The acceleration time must be between 0 and half the duration (${T / 2} s), not ${ta}.`, 'accelTime');
  const vmax = dist / (T - ta);
  const amax = ta > 0 ? vmax / (ta - tj) : 0;
  const jerk = tj > 0 ? amax / tj : 0;
  // the acceleration phase as a function of τ ∈ [0, t_a]: position, velocity, acceleration (unsigned)
  const accelPhase = (tau: number): [number, number, number] => {
    if (ta === 0) return [0, vmax, 0];
    if (tj > 0 && tau <= tj) return [(jerk * tau ** 3) / 6, (jerk * tau * tau) / 2, jerk * tau];
    if (tau <= ta - tj) {
      const u = tau - tj;
      return [(jerk * tj ** 3) / 6 + ((jerk * tj * tj) / 2) * u + (amax * u * u) / 2, (jerk * tj * tj) / 2 + amax * u, amax];
    }
    // mirror of the ramp-up: v(τ) = v_max − j (t_a − τ)²/2, and the phase covers v_max·t_a/2
    const r = ta - tau;
    return [(vmax * ta) / 2 - (vmax * r - (jerk * r ** 3) / 6), vmax - (jerk * r * r) / 2, jerk * r];
  };
  const at = (t: number): ProfileState => {
    const tc = Math.min(Math.max(t, 0), T);
    let x: number, v: number, a: number;
    if (tc <= ta) [x, v, a] = accelPhase(tc);
    else if (tc <= T - ta) { x = (vmax * ta) / 2 + vmax * (tc - ta); v = vmax; a = 0; }
    else { const [xr, vr, ar] = accelPhase(T - tc); x = dist - xr; v = vr; a = -ar; }
    if (ta === 0) { x = vmax * tc; v = vmax; a = 0; }
    return { t, position: spec.from + sign * x, velocity: sign * v, acceleration: sign * a };
  };
  return { profile: { spec, accelTime: ta, jerkTime: tj, peakVelocity: vmax, peakAcceleration: amax, at } };
}

export interface HingeLimits {
  /** rad/s */
  maxRate?: number;
  /** rad/s² */
  maxAcceleration?: number;
}

export interface ScheduleOptions {
  drive: number;
  profile: ProfileSpec;
  /** time step between rows, seconds (or give rows) */
  dt?: number;
  rows?: number;
  holds?: Drive[];
  branch?: number;
  solution?: number;
  /** a closed state to start from (full crease vector, radians), as the sweep's start */
  start?: Float64Array;
  /** limits for every hinge */
  limits?: HingeLimits;
  /** limits per crease index (override the global ones) */
  hingeLimits?: Map<number, HingeLimits>;
  /** how the path is followed (see SweepOptions.method) */
  method?: SweepOptions['method'];
}

export interface ScheduleRow {
  t: number;
  drive: number;
  driveVelocity: number;
  driveAcceleration: number;
  /** undefined when the row has no state on the path */
  angles?: Float64Array;
  velocities?: Float64Array;
  accelerations?: Float64Array;
  maxResidual?: number;
  /** creases over their rate limit, and over their acceleration limit */
  overRate: number[];
  overAcceleration: number[];
  /** why the row has no state */
  unreachable?: string;
  /** contact and torque at the row's state, when the path checks them */
  checks?: StateChecks;
}

export interface HingeSummary {
  crease: number;
  /** largest |velocity| (rad/s) over the rows and the profile's checks between them, and when */
  peakRate: number;
  peakRateAt: number;
  /** largest |acceleration| (rad/s²), and when */
  peakAcceleration: number;
  peakAccelerationAt: number;
  rowsOverRate: number;
  rowsOverAcceleration: number;
  /** over a limit between rows (at a profile breakpoint or a peak found between two rows) */
  overBetweenRows: boolean;
}

/** A state solved between rows, where some hinge's velocity or acceleration may peak. */
export interface ProfileCheck {
  t: number;
  drive: number;
  /** why this instant: a phase boundary of the profile, or a peak between two rows */
  reason: 'breakpoint' | 'peak';
  velocities: Float64Array;
  accelerations: Float64Array;
  maxResidual: number;
  overRate: number[];
  overAcceleration: number[];
}

export interface ScheduleResult {
  rows: ScheduleRow[];
  /** states between rows where peaks were looked for (the limits hold between rows too) */
  checks: ProfileCheck[];
  hinges: HingeSummary[];
  events: SweepEvent[];
  messages: Message[];
  profile?: DriveProfile;
  sweep?: SweepResult;
  status: 'complete' | 'partial' | 'stopped' | 'failed';
}

/** Time rows 0, dt, 2dt, … T (T always included). */
export function timeRows(duration: number, dt?: number, rows?: number): number[] {
  const step = dt ?? duration / Math.max(1, (rows ?? 101) - 1);
  const n = Math.floor(duration / step + 1e-9);
  const out: number[] = [];
  for (let k = 0; k <= n; k++) out.push(k * step);
  if (Math.abs(out[out.length - 1] - duration) > 1e-12) out.push(duration);
  else out[out.length - 1] = duration;
  return out;
}

export function deploymentSchedule(pattern: Pattern, opts: ScheduleOptions, hooks: SweepHooks = {}): ScheduleResult {
  return runSteps(scheduleSteps(pattern, opts, hooks));
}

/** The schedule as resumable steps (see sweepSteps). */
export function* scheduleSteps(pattern: Pattern, opts: ScheduleOptions, hooks: SweepHooks = {}): Generator<void, ScheduleResult> {
  const messages: Message[] = [];
  const { profile, message } = driveProfile(opts.profile);
  if (!profile) return { rows: [], checks: [], hinges: [], events: [], messages: [message!], status: 'failed' };
  if (opts.dt !== undefined && !(opts.dt > 0)) {
    return { rows: [], checks: [], hinges: [], events: [], messages: [{ severity: 'error', code: 'bad-step', text: `The time step must be positive, not ${opts.dt}.` }], status: 'failed' };
  }
  const times = timeRows(opts.profile.duration, opts.dt, opts.rows);
  if (times.length > 100_000) {
    return { rows: [], checks: [], hinges: [], events: [], messages: [{ severity: 'error', code: 'too-many-rows', text: `${times.length} rows is more than the 100000 a schedule takes; use a larger time step.` }], status: 'failed' };
  }
  const states = times.map((t) => profile.at(t));
  // the path is solved at distinct drive values in order (rest phases repeat a value)
  const values: number[] = [];
  for (const s of states) if (!values.length || s.position !== values[values.length - 1]) values.push(s.position);
  const sweepOpts: SweepOptions = {
    drive: opts.drive,
    from: values[0],
    to: values[values.length - 1],
    samples: values,
    holds: opts.holds,
    branch: opts.branch,
    solution: opts.solution,
    ...(opts.start ? { start: opts.start } : {}),
    curvature: true,
    method: opts.method,
  };
  const path = yield* sweepSteps(pattern, sweepOpts, hooks);
  messages.push(...path.messages);
  const byValue = new Map<number, SweepSample>();
  for (const s of path.samples) byValue.set(s.drive, s);
  const endText = path.events.find((e) => e.type !== 'branch-point')?.text ?? (path.status === 'stopped' ? 'the computation was stopped' : 'the path ends before this drive value');
  const limitOf = (c: number): HingeLimits => opts.hingeLimits?.get(c) ?? opts.limits ?? {};
  const n = pattern.creases.length;
  const rows: ScheduleRow[] = states.map((st) => {
    const s = byValue.get(st.position);
    if (!s) return { t: st.t, drive: st.position, driveVelocity: st.velocity, driveAcceleration: st.acceleration, overRate: [], overAcceleration: [], unreachable: endText };
    return { t: st.t, drive: st.position, driveVelocity: st.velocity, driveAcceleration: st.acceleration, angles: s.angles, maxResidual: s.maxResidual, ...hingeMotion(s, st, n, limitOf), ...(s.checks ? { checks: s.checks } : {}) };
  });
  const checks = yield* peaksBetweenRows(pattern, opts, profile, rows, limitOf, hooks);
  const hinges = summarize(pattern, rows, checks);
  const unreachable = rows.filter((r) => r.unreachable).length;
  if (unreachable) {
    messages.push({ severity: 'error', code: 'unreachable-rows', text: `${unreachable} of ${rows.length} rows have no state on the path (${endText}); they are flagged and the others are solved.` });
  }
  const over = hinges.filter((h) => h.rowsOverRate || h.rowsOverAcceleration || h.overBetweenRows);
  if (over.length) {
    messages.push({
      severity: 'warning',
      code: 'over-limit',
      text: `${over.length} hinge(s) exceed a rate or acceleration limit: ${over.slice(0, 6).map((h) => pattern.creases[h.crease].label).join(', ')}${over.length > 6 ? ` and ${over.length - 6} more` : ''}.`,
    });
  }
  const between = hinges.filter((h) => h.overBetweenRows && !h.rowsOverRate && !h.rowsOverAcceleration);
  if (between.length) {
    messages.push({
      severity: 'warning',
      code: 'over-limit-between-rows',
      text: `${between.map((h) => `${pattern.creases[h.crease].label} (peak ${(h.peakRate * DEG).toFixed(2)} deg/s at t = ${h.peakRateAt.toFixed(4)} s)`).slice(0, 6).join(', ')} exceed a limit between rows only: no row shows it; a finer time step puts a row there.`,
    });
  }
  return {
    rows,
    checks,
    hinges,
    events: path.events,
    messages,
    profile,
    sweep: path,
    status: path.status === 'stopped' ? 'stopped' : path.status === 'failed' ? 'failed' : unreachable ? 'partial' : 'complete',
  };
}

/**
 * Every hinge's velocity ρ̇ = r·θ̇ and acceleration ρ̈ = r·θ̈ + r′·θ̇² at a solved sample and a profile state
 * (r the rate, r′ the curvature), and the hinges over their limits.
 */
function hingeMotion(s: SweepSample, st: ProfileState, n: number, limitOf: (c: number) => HingeLimits) {
  const velocities = new Float64Array(n), accelerations = new Float64Array(n);
  const overRate: number[] = [], overAcceleration: number[] = [];
  for (let c = 0; c < n; c++) {
    velocities[c] = s.rates[c] * st.velocity;
    accelerations[c] = s.rates[c] * st.acceleration + (s.curvature?.[c] ?? 0) * st.velocity * st.velocity;
    const lim = limitOf(c);
    if (lim.maxRate !== undefined && Math.abs(velocities[c]) > lim.maxRate) overRate.push(c);
    if (lim.maxAcceleration !== undefined && Math.abs(accelerations[c]) > lim.maxAcceleration) overAcceleration.push(c);
  }
  return { velocities, accelerations, overRate, overAcceleration };
}

function summarize(pattern: Pattern, rows: ScheduleRow[], checks: ProfileCheck[]): HingeSummary[] {
  const out: HingeSummary[] = [];
  for (const c of pattern.creases) {
    if (c.assignment === 'B' || c.assignment === 'F') continue;
    const h: HingeSummary = { crease: c.index, peakRate: 0, peakRateAt: 0, peakAcceleration: 0, peakAccelerationAt: 0, rowsOverRate: 0, rowsOverAcceleration: 0, overBetweenRows: false };
    const take = (t: number, v: Float64Array | undefined, a: Float64Array | undefined) => {
      if (v && Math.abs(v[c.index]) > h.peakRate) { h.peakRate = Math.abs(v[c.index]); h.peakRateAt = t; }
      if (a && Math.abs(a[c.index]) > h.peakAcceleration) { h.peakAcceleration = Math.abs(a[c.index]); h.peakAccelerationAt = t; }
    };
    for (const r of rows) {
      take(r.t, r.velocities, r.accelerations);
      if (r.overRate.includes(c.index)) h.rowsOverRate++;
      if (r.overAcceleration.includes(c.index)) h.rowsOverAcceleration++;
    }
    for (const k of checks) {
      take(k.t, k.velocities, k.accelerations);
      if (k.overRate.includes(c.index) || k.overAcceleration.includes(c.index)) h.overBetweenRows = true;
    }
    out.push(h);
  }
  return out;
}

/**
 * The limits must hold between rows, not only at them. Hinge velocity ρ̇ = r(θ)·θ̇ and acceleration
 * ρ̈ = r·θ̈ + r′·θ̇² peak where the profile switches phase (θ̈ jumps or turns: each side of the breakpoint is
 * solved) and where they have a local maximum between two rows; for every limited hinge whose rows show a
 * local maximum above 80 % of its limit, golden-section search on exactly solved states between the rows
 * around it finds the peak.
 */
function* peaksBetweenRows(
  pattern: Pattern,
  opts: ScheduleOptions,
  profile: DriveProfile,
  rows: ScheduleRow[],
  limitOf: (c: number) => HingeLimits,
  hooks: SweepHooks,
): Generator<void, ProfileCheck[]> {
  const limited = pattern.creases.filter((c) => c.assignment !== 'B' && c.assignment !== 'F').map((c) => c.index)
    .filter((c) => limitOf(c).maxRate !== undefined || limitOf(c).maxAcceleration !== undefined);
  if (!limited.length) return [];
  const T = profile.spec.duration, ta = profile.accelTime, tj = profile.jerkTime;
  const solved = rows.map((r, k) => ({ r, k })).filter(({ r }) => r.angles);
  if (!solved.length) return [];
  const checks: ProfileCheck[] = [];
  /** The exact state at time t, followed from the nearest solved row before it. */
  const stateAt = function* (t: number): Generator<void, ProfileCheck | undefined> {
    const st = profile.at(t);
    let from = solved[0].r;
    for (const { r } of solved) if (r.t <= t) from = r;
    const res = yield* sweepSteps(pattern, {
      drive: opts.drive, from: st.position, to: st.position, samples: [st.position],
      holds: opts.holds, start: from.angles, curvature: true, conditionEvery: 0, analyzeBranches: false,
    }, { shouldStop: hooks.shouldStop });
    const s = res.samples[0];
    if (!s) return undefined;
    return { t, drive: st.position, reason: 'peak', maxResidual: s.maxResidual, ...hingeMotion(s, st, pattern.creases.length, limitOf) };
  };
  // 1. both sides of every phase boundary of the profile
  const eps = 1e-9 * T;
  const breaks = [tj, ta - tj, ta, T - ta, T - ta + tj, T - tj].filter((b) => b > eps && b < T - eps);
  for (const b of [...new Set(breaks)]) {
    for (const t of [b - eps, b + eps]) {
      if (hooks.shouldStop?.()) return checks;
      const c = yield* stateAt(t);
      if (c) checks.push({ ...c, reason: 'breakpoint' });
    }
  }
  // 2. local maxima between rows, refined
  const gr = (Math.sqrt(5) - 1) / 2;
  for (const c of limited) {
    const lim = limitOf(c);
    for (const kind of ['rate', 'acceleration'] as const) {
      const limit = kind === 'rate' ? lim.maxRate : lim.maxAcceleration;
      if (limit === undefined) continue;
      const value = (r: { velocities?: Float64Array; accelerations?: Float64Array }) => Math.abs((kind === 'rate' ? r.velocities : r.accelerations)?.[c] ?? 0);
      for (let q = 0; q < solved.length; q++) {
        const v = value(solved[q].r);
        const before = q > 0 ? value(solved[q - 1].r) : -1, after = q + 1 < solved.length ? value(solved[q + 1].r) : -1;
        if (!(v >= before && v >= after) || v < 0.8 * limit) continue;
        let a = q > 0 ? solved[q - 1].r.t : solved[q].r.t, b = q + 1 < solved.length ? solved[q + 1].r.t : solved[q].r.t;
        if (b - a <= eps) continue;
        let x1 = b - gr * (b - a), x2 = a + gr * (b - a);
        let f1 = yield* stateAt(x1), f2 = yield* stateAt(x2);
        for (let it = 0; it < 30 && b - a > 1e-6 * T; it++) {
          if (hooks.shouldStop?.()) return checks;
          if ((f1 ? value(f1) : -1) >= (f2 ? value(f2) : -1)) { b = x2; x2 = x1; f2 = f1; x1 = b - gr * (b - a); f1 = yield* stateAt(x1); }
          else { a = x1; x1 = x2; f1 = f2; x2 = a + gr * (b - a); f2 = yield* stateAt(x2); }
        }
        const best = (f1 ? value(f1) : -1) >= (f2 ? value(f2) : -1) ? f1 : f2;
        if (best) checks.push(best);
      }
    }
  }
  return checks.sort((p, q) => p.t - q.t);
}

// ---------------------------------------------------------------------------------------------------------
// following a supplied schedule

export interface ScheduleInputRow {
  /** seconds */
  time: number;
  /** drive crease → value (radians) */
  values: Map<number, number>;
  /** line in the file (1-based), for messages */
  line: number;
}

export interface ParsedSchedule {
  drives: number[];
  rows: ScheduleInputRow[];
  messages: Message[];
}

/**
 * Read a schedule CSV: a header `time,<crease>,<crease>…` (time in seconds, drive angles in degrees, valley
 * positive), one row per time. Lines starting with # and blank lines are skipped. Every problem is reported
 * with its line.
 */
export function parseScheduleCsv(pattern: Pattern, text: string): ParsedSchedule {
  const messages: Message[] = [];
  const err = (code: string, t: string, line: number, field?: string) => messages.push({ severity: 'error', code, text: t, where: { line, ...(field ? { field } : {}) } });
  const lines = text.split(/\r?\n/);
  let header: string[] | undefined;
  let headerLine = 0;
  const drives: number[] = [];
  const rows: ScheduleInputRow[] = [];
  for (let i = 0; i < lines.length; i++) {
    const raw = lines[i].trim();
    if (!raw || raw.startsWith('#')) continue;
    const cells = splitCsvLine(raw);
    if (!header) {
      header = cells;
      headerLine = i + 1;
      if (cells[0].toLowerCase() !== 'time') err('schedule-header', `The first column must be "time" (seconds), not "${cells[0]}".`, i + 1, cells[0]);
      if (cells.length < 2) err('schedule-header', 'The header names no drive crease after "time".', i + 1);
      for (const name of cells.slice(1)) {
        const c = findLabel(pattern, name);
        if (c === undefined) { err('unknown-crease', `Column "${name}" is not a crease of the pattern.`, i + 1, name); continue; }
        const a = pattern.creases[c].assignment;
        if (a === 'B' || a === 'F') { err('not-drivable', `Column "${name}" is ${a === 'B' ? 'a boundary edge' : 'held flat'} and cannot be driven.`, i + 1, name); continue; }
        if (drives.includes(c)) { err('duplicate-column', `Crease "${name}" appears twice in the header.`, i + 1, name); continue; }
        drives.push(c);
      }
      continue;
    }
    if (cells.length !== header.length) { err('schedule-row', `Line ${i + 1} has ${cells.length} values; the header has ${header.length}.`, i + 1); continue; }
    const time = Number(cells[0]);
    if (cells[0] === '' || !Number.isFinite(time)) { err('schedule-row', `Line ${i + 1}: time "${cells[0]}" is not a number.`, i + 1, 'time'); continue; }
    if (rows.length && time < rows[rows.length - 1].time) { err('schedule-order', `Line ${i + 1}: time ${time} s is earlier than the row before (${rows[rows.length - 1].time} s).`, i + 1, 'time'); continue; }
    const values = new Map<number, number>();
    let ok = true;
    for (let k = 1; k < cells.length; k++) {
      const v = Number(cells[k]);
      if (cells[k] === '' || !Number.isFinite(v)) { err('schedule-row', `Line ${i + 1}: "${cells[k]}" for ${header[k]} is not a number.`, i + 1, header[k]); ok = false; continue; }
      if (Math.abs(v) > 180) { err('schedule-row', `Line ${i + 1}: ${v}° for ${header[k]} is outside −180° … 180°.`, i + 1, header[k]); ok = false; continue; }
      const c = drives[k - 1];
      if (c !== undefined) values.set(c, v / DEG);
    }
    if (ok) rows.push({ time, values, line: i + 1 });
  }
  if (!header) err('schedule-empty', 'The schedule has no header line (time,<crease>,…).', 1);
  else if (!rows.length && !messages.length) err('schedule-empty', 'The schedule has a header but no rows.', headerLine);
  return { drives, rows, messages };
}

function findLabel(pattern: Pattern, name: string): number | undefined {
  const c = pattern.labelIndex.get(name);
  if (c !== undefined) return c;
  if (/^\d+$/.test(name)) { const k = Number(name); if (k < pattern.creases.length) return k; }
  return undefined;
}

/** One CSV line into cells (RFC 4180 quoting). */
export function splitCsvLine(line: string): string[] {
  const out: string[] = [];
  let cur = '', quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (quoted) {
      if (ch === '"' && line[i + 1] === '"') { cur += '"'; i++; }
      else if (ch === '"') quoted = false;
      else cur += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') { out.push(cur.trim()); cur = ''; }
    else cur += ch;
  }
  out.push(cur.trim());
  return out;
}

export interface FollowOptions {
  /** creases held at fixed values besides the schedule's columns */
  holds?: Drive[];
  branch?: number;
  solution?: number;
  /** rates of every hinge with respect to each drive (single-drive schedules) */
  rates?: boolean;
}

export interface FollowRow {
  time: number;
  line: number;
  values: Map<number, number>;
  angles?: Float64Array;
  rates?: Float64Array;
  maxResidual?: number;
  /** why the row has no consistent state */
  unreachable?: string;
  /** contact and torque at the row's state, when checked */
  checks?: StateChecks;
}

export interface FollowResult {
  drives: number[];
  /** the branch followed (from flat), or the start solution, as the first run chose it */
  branch?: SweepResult['branch'];
  rows: FollowRow[];
  events: SweepEvent[];
  messages: Message[];
  status: 'complete' | 'partial' | 'stopped' | 'failed';
  /** what the checks found over the rows (contact, peak torque), when checked */
  checks?: ChecksSummary;
}

/**
 * Every hinge angle at every row of a supplied schedule. A schedule that moves one drive is followed on the
 * path in monotonic runs (each run a sweep that starts where the last good state is); several drives that
 * move together are followed by homotopy from row to row. Rows with no consistent state are flagged and the
 * following rows go on from the last good state.
 */
export function followSchedule(pattern: Pattern, schedule: ParsedSchedule, opts: FollowOptions = {}, hooks: SweepHooks = {}): FollowResult {
  return runSteps(followSteps(pattern, schedule, opts, hooks));
}

/** Following a schedule as resumable steps (see sweepSteps). */
export function* followSteps(pattern: Pattern, schedule: ParsedSchedule, opts: FollowOptions = {}, hooks: SweepHooks = {}): Generator<void, FollowResult> {
  const messages: Message[] = [];
  const events: SweepEvent[] = [];
  const rows: FollowRow[] = schedule.rows.map((r) => ({ time: r.time, line: r.line, values: r.values }));
  if (!rows.length) return { drives: schedule.drives, rows, events, messages: [{ severity: 'error', code: 'schedule-empty', text: 'The schedule has no rows.' }], status: 'failed' };
  const moving = schedule.drives.filter((c) => rows.some((r) => r.values.get(c) !== rows[0].values.get(c)));
  const fixed = schedule.drives.filter((c) => !moving.includes(c));
  const holds: Drive[] = [...(opts.holds ?? []), ...fixed.map((c) => ({ crease: c, value: rows[0].values.get(c)! }))];
  let stopped = false;
  const total = rows.length;
  let done = 0;
  let branch: SweepResult['branch'];
  const progress = () => hooks.onProgress?.(done, total);
  if (moving.length <= 1) {
    const drive = moving[0] ?? schedule.drives[0];
    const v = (k: number) => rows[k].values.get(drive)!;
    // maximal monotonic runs; consecutive runs share their turning row
    let start: Float64Array | undefined;
    let i = 0;
    for (;;) {
      if (hooks.shouldStop?.()) { stopped = true; break; }
      let j = i, dir = 0;
      while (j + 1 < rows.length) {
        const d = Math.sign(v(j + 1) - v(j));
        if (d !== 0 && dir !== 0 && d !== dir) break;
        if (d !== 0) dir = d;
        j++;
      }
      const run = rows.slice(i, j + 1);
      // from a start state, values behind it (beyond what the last run reached) cannot be reached ahead
      const s0 = start?.[drive];
      const values: number[] = [];
      for (const r of run) {
        const x = r.values.get(drive)!;
        if (s0 !== undefined && dir !== 0 && (x - s0) * dir < -1e-12) continue;
        if (!values.length || x !== values[values.length - 1]) values.push(x);
      }
      if (values.length) {
        const res = yield* sweepSteps(pattern, {
          drive,
          from: values[0],
          to: values[values.length - 1],
          samples: values,
          holds: holds.filter((h) => h.crease !== drive),
          ...(start ? { start } : { branch: opts.branch, solution: opts.solution }),
        }, { shouldStop: hooks.shouldStop });
        messages.push(...res.messages.filter((m) => (i === 0 ? m.code !== 'flat-sample' : m.severity === 'error')));
        events.push(...res.events);
        if (!start) branch ??= res.branch;
        const byValue = new Map(res.samples.map((x) => [x.drive, x] as const));
        const why = res.events.find((e) => e.type !== 'branch-point')?.text ?? res.messages.find((m) => m.severity === 'error')?.text ?? 'no state on the path';
        for (const r of run) {
          if (r.angles) continue;
          const x = byValue.get(r.values.get(drive)!);
          if (x) { r.angles = x.angles; r.maxResidual = x.maxResidual; r.unreachable = undefined; if (opts.rates) r.rates = x.rates; }
          else r.unreachable ??= why;
        }
        if (res.status === 'stopped') { stopped = true; break; }
        if (res.status === 'failed' && !start) { for (const r of rows) r.unreachable ??= why; break; }
        // go on from the last row reached: an actuator that reverses at a turning point or a stop retraces
        // its way, so the next run starts there rather than at the event's state
        for (let k = j; k >= i; k--) if (rows[k].angles) { start = rows[k].angles; break; }
      }
      done = j + 1;
      progress();
      if (j >= rows.length - 1) break;
      i = j;
    }
  } else {
    branch = yield* homotopyFollow(pattern, rows, moving, holds, opts, messages, hooks, () => { done++; progress(); }, () => { stopped = true; });
  }
  for (const r of rows) if (!r.angles && !r.unreachable) r.unreachable = stopped ? 'not computed (stopped)' : 'no state';
  const bad = rows.filter((r) => r.unreachable && r.unreachable !== 'not computed (stopped)');
  if (bad.length) {
    // tell a row with no state at all from one that only the followed branch cannot reach (small patterns)
    for (const r of bad.slice(0, 20)) {
      const report = solveDrives(pattern, [...holds.filter((h) => !r.values.has(h.crease)), ...[...r.values].map(([crease, value]) => ({ crease, value }))], { cap: 8, starts: 8 });
      const n = report.solutions.length + report.families.length;
      r.unreachable += n
        ? ` (other states exist at these values, on another branch: ${n}${report.search.limit !== undefined ? ' or more' : ''})`
        : report.search.complete ? ' (no state at all has these values)' : ' (no other state was found at these values)';
    }
    messages.push({ severity: 'error', code: 'unreachable-rows', text: `${bad.length} of ${rows.length} rows have no consistent state on the followed branch (lines ${bad.slice(0, 8).map((r) => r.line).join(', ')}${bad.length > 8 ? ', …' : ''}); they are flagged and the other rows are solved.` });
  }
  return { drives: schedule.drives, ...(branch ? { branch } : {}), rows, events, messages, status: stopped ? 'stopped' : bad.length ? 'partial' : 'complete' };
}

/** Several drives moving together: from row to row by homotopy in small steps, Newton at each. */
function* homotopyFollow(
  pattern: Pattern,
  rows: FollowRow[],
  moving: number[],
  holds: Drive[],
  opts: FollowOptions,
  messages: Message[],
  hooks: SweepHooks,
  onRow: () => void,
  onStop: () => void,
): Generator<void, SweepResult['branch']> {
  const heldSet = new Set([...moving, ...holds.map((h) => h.crease)]);
  const problem = new ClosureProblem(pattern, (c) => heldSet.has(c));
  const first = rows[0];
  const drives = [...holds.filter((h) => !first.values.has(h.crease)), ...[...first.values].map(([crease, value]) => ({ crease, value }))];
  const report = solveDrives(pattern, drives);
  let k = (opts.solution ?? 0) - 1;
  if (opts.solution === undefined) k = report.solutions.findIndex((s) => s.matchesAssignment);
  let state: Float64Array | undefined = report.solutions[k]?.angles;
  if (!state) {
    messages.push({ severity: 'error', code: 'start-unreachable', text: `No ${opts.solution ? `solution ${opts.solution}` : 'state matching the assignment'} at the first row (line ${first.line}).` });
  }
  const branch = state ? { id: k + 1, name: `solution ${k + 1}`, matchesAssignment: report.solutions[k].matchesAssignment, text: `solution ${k + 1} of the first row's values` } : undefined;
  for (let i = 0; i < rows.length; i++) {
    if (hooks.shouldStop?.()) { onStop(); return branch; }
    const r = rows[i];
    if (!state) { r.unreachable = 'no start state'; onRow(); continue; }
    if (i === 0) { r.angles = state; r.maxResidual = report.solutions[k].maxResidual; onRow(); continue; }
    // steps of at most 2° in the largest drive change
    let span = 0;
    for (const c of moving) span = Math.max(span, Math.abs((r.values.get(c) ?? 0) - state[c]));
    const steps = Math.max(1, Math.ceil(span / (2 / DEG)));
    let x: Float64Array = Float64Array.from(state);
    const from = new Map(moving.map((c) => [c, state![c]] as const));
    let ok = true;
    for (let s = 1; s <= steps && ok; s++) {
      for (const c of moving) x[c] = from.get(c)! + ((r.values.get(c)! - from.get(c)!) * s) / steps;
      const res = problem.solve(x, { maxStep: 0.1, maxIterations: 40, polishTolerance: 1e-13, wrap: false });
      if (!res.converged) ok = false;
      else x = res.angles;
    }
    if (ok) {
      for (const c of problem.unknownCreases) x[c] = wrapAngle(x[c]);
      r.angles = x;
      r.maxResidual = problem.evaluate(x, false);
      state = x;
    } else {
      r.unreachable = 'no closed state continues from the previous row to these drive values';
    }
    if (r.maxResidual !== undefined && r.maxResidual > RESIDUAL_TOLERANCE) { r.unreachable = 'the state found does not close'; r.angles = undefined; }
    onRow();
    yield;
  }
  return branch;
}

export type { SweepHooks };
