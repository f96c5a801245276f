import type { Command } from '../command';
import { numberOption, parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { loadFile } from '../load';
import { EXIT } from '../exit-codes';
import { scheduleSteps, type HingeLimits, type ProfileKind, type ScheduleOptions } from '../../solver/outputs/schedule';
import { scheduleTable } from '../../solver/outputs/table';
import { findCrease } from '../../solver/model/pattern';
import {
  creaseOption, EXIT_INTERRUPTED, holdsOption, intOrUndefined, printSolverMessages, runResponsive, startOption, tableHeader, writeOutput, joinNegativeNumbers,
  checksOption, checksOptions, checksHook, CHECKS_HELP,
} from './path-common';
import { finishChecks } from '../../solver/outputs/path-physics';

const RAD = Math.PI / 180;

/** --limit <crease>=<rate>[:<accel>] (deg/s, deg/s²; either may be left empty). */
function parseLimit(text: string): { ref: string; limits: HingeLimits } {
  const eq = text.lastIndexOf('=');
  if (eq <= 0) throw new UsageError(`--limit "${text}": write it as CREASE=RATE[:ACCELERATION] in deg/s and deg/s², e.g. --limit s2_1=30:120`);
  const ref = text.slice(0, eq).trim();
  const [rate, accel] = text.slice(eq + 1).split(':').map((s) => s.trim());
  const limits: HingeLimits = {};
  if (rate) { const v = Number(rate); if (!(v > 0)) throw new UsageError(`--limit "${text}": the rate limit must be a positive number of deg/s`); limits.maxRate = v * RAD; }
  if (accel) { const v = Number(accel); if (!(v > 0)) throw new UsageError(`--limit "${text}": the acceleration limit must be a positive number of deg/s²`); limits.maxAcceleration = v * RAD; }
  if (limits.maxRate === undefined && limits.maxAcceleration === undefined) throw new UsageError(`--limit "${text}": give a rate, an acceleration, or both`);
  return { ref, limits };
}

export const scheduleCommand: Command = {
  name: 'schedule',
  summary: 'a time-stamped deployment schedule: every hinge angle, velocity and acceleration; limit flags',
  help: `Usage: hingeplan schedule <file> --drive <crease> --from <deg> --to <deg> --time <s>
                          [--profile constant|trapezoid|s-curve] [--accel-time <s> | --accel <deg/s²>]
                          [--jerk-time <s>] [--dt <s> | --rows <n>] [--max-rate <deg/s>] [--max-accel <deg/s²>]
                          [--limit <crease>=<deg/s>[:<deg/s²>] …] [--hold <crease>=<deg> …]
                          [--branch <id> | --solution <k> | --start <file>] [--format csv|json] [--out <file>]
                          [--contact on|off] [--clearance <length>] [--stop-at contact]
                          [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

Moves the drive from --from to --to in --time seconds with the chosen profile, and solves every hinge at each
time row exactly on the path (as \`hingeplan sweep\`). Hinge velocity = rate × drive velocity; hinge
acceleration = rate × drive acceleration + curvature × drive velocity² (rate = dρ/dθ, curvature = d²ρ/dθ²,
both exact from the closure equations). Every hinge over a rate or acceleration limit is flagged per row and
summarised.

Profiles (symmetric start and stop; Δ = |to − from|, T = --time):
  constant     constant drive velocity Δ/T (the steps in velocity at start and stop are not modelled).
  trapezoid    accelerate for t_a, cruise, decelerate for t_a: v_max = Δ/(T − t_a), a = v_max/t_a.
               t_a from --accel-time (default T/4), or from --accel a: t_a = (T − √(T² − 4Δ/a))/2.
  s-curve      jerk-limited: within each acceleration phase t_a (default T/4) the acceleration ramps up for
               t_j (--jerk-time, default t_a/4), holds, and ramps down: v_max = Δ/(T − t_a),
               a_max = v_max/(t_a − t_j).

  --dt <s> | --rows <n>  time step between rows (default: 101 rows); the last row is at exactly T.
  --max-rate, --max-accel   limits for every hinge (deg/s, deg/s²).
  --limit <crease>=<rate>[:<accel>]   a limit for one hinge (overrides the global ones); repeat.
  --hold, --branch, --solution, --start, --progress, --out   as for \`hingeplan sweep\`.
${CHECKS_HELP}
                         A contact column (1 at and past the first contact) and, with loads, a torque column
                         per drive ("torque:<crease>", N·m) follow the flags; the header gives the peaks.
  --format csv|json      csv (default): metadata header ("# key: value", as \`hingeplan table\`, plus the
                         profile), then columns t, drive, drive_velocity, drive_acceleration, every hinge angle,
                         velocity:<crease> …, acceleration:<crease> …, max_residual, flags ("rate:<crease>",
                         "accel:<crease>", or "unreachable"); "# over limit:" and "# unreachable" lines after.
                         json: the same as fields, rows with angles/velocities/accelerations by crease.
Exit status: 0 every row solved and within limits; 3 some rows unreachable; 4 every row solved but some hinge
over a limit; 2 invalid input; 130 stopped by Ctrl-C (the rows computed are written).`,
  async run(argv, io) {
    const spec: OptionSpec = {
      drive: { type: 'string' }, from: { type: 'string' }, to: { type: 'string' }, time: { type: 'string' },
      profile: { type: 'string' }, 'accel-time': { type: 'string' }, accel: { type: 'string' }, 'jerk-time': { type: 'string' },
      dt: { type: 'string' }, rows: { type: 'string' }, 'max-rate': { type: 'string' }, 'max-accel': { type: 'string' },
      limit: { type: 'string', multiple: true }, hold: { type: 'string', multiple: true }, branch: { type: 'string' },
      solution: { type: 'string' }, start: { type: 'string' }, format: { type: 'string' }, out: { type: 'string' }, progress: { type: 'boolean' },
      ...checksOptions,
    };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const format = (values.format as string | undefined) ?? 'csv';
    if (format !== 'csv' && format !== 'json') throw new UsageError(`--format must be csv or json, got "${format}"`);
    const kind = ((values.profile as string | undefined) ?? 'trapezoid') as ProfileKind;
    if (!['constant', 'trapezoid', 's-curve'].includes(kind)) throw new UsageError(`--profile must be constant, trapezoid or s-curve, got "${kind}"`);
    if (values['accel-time'] !== undefined && values.accel !== undefined) throw new UsageError('give one of --accel-time and --accel');
    if (values.dt !== undefined && values.rows !== undefined) throw new UsageError('give one of --dt and --rows');
    const file = positionals[0];
    const loaded = loadFile(io, file, 'schedule');
    if (!loaded) return EXIT.usage;
    const { pattern } = loaded;
    const drive = creaseOption(pattern, values.drive as string | undefined, 'drive');
    const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
    if (!holds) return EXIT.usage;
    const from = numberOption(values.from as string | undefined, 'from');
    const to = numberOption(values.to as string | undefined, 'to');
    for (const [v, n] of [[from, 'from'], [to, 'to']] as const) if (Math.abs(v) > 180) throw new UsageError(`--${n} must be within −180 … 180 degrees, got ${v}`);
    const start = startOption(io, pattern, values.start as string | undefined);
    if (start === null) return EXIT.usage;
    const duration = numberOption(values.time as string | undefined, 'time');
    if (!(duration > 0)) throw new UsageError(`--time must be a positive number of seconds, got ${duration}`);
    const hingeLimits = new Map<number, HingeLimits>();
    for (const l of (values.limit as string[] | undefined) ?? []) {
      const { ref, limits } = parseLimit(l);
      const c = findCrease(pattern, ref);
      if (c === undefined) throw new UsageError(`--limit: there is no crease "${ref}"`);
      hingeLimits.set(c, limits);
    }
    const global: HingeLimits = {};
    if (values['max-rate'] !== undefined) { const v = numberOption(values['max-rate'] as string, 'max-rate'); if (!(v > 0)) throw new UsageError('--max-rate must be positive'); global.maxRate = v * RAD; }
    if (values['max-accel'] !== undefined) { const v = numberOption(values['max-accel'] as string, 'max-accel'); if (!(v > 0)) throw new UsageError('--max-accel must be positive'); global.maxAcceleration = v * RAD; }
    const options: ScheduleOptions = {
      drive,
      profile: {
        kind,
        from: from * RAD,
        to: to * RAD,
        duration,
        ...(values['accel-time'] !== undefined ? { accelTime: numberOption(values['accel-time'] as string, 'accel-time') } : {}),
        ...(values.accel !== undefined ? { acceleration: numberOption(values.accel as string, 'accel') * RAD } : {}),
        ...(values['jerk-time'] !== undefined ? { jerkTime: numberOption(values['jerk-time'] as string, 'jerk-time') } : {}),
      },
      ...(values.dt !== undefined ? { dt: numberOption(values.dt as string, 'dt') } : {}),
      ...(values.rows !== undefined ? { rows: intOrUndefined(values.rows, 'rows') } : {}),
      holds,
      branch: intOrUndefined(values.branch, 'branch'),
      solution: intOrUndefined(values.solution, 'solution'),
      ...(start ? { start } : {}),
      limits: global,
      hingeLimits: new Map([...hingeLimits].map(([c, l]) => [c, { ...global, ...l }])),
    };
    const checks = checksOption(io, loaded, values, file!, drive, holds);
    if (!checks) return EXIT.usage;
    const { result, interrupted } = await runResponsive(io, 'schedule', (hooks) => scheduleSteps(pattern, options, { ...hooks, onSample: checksHook(checks) }), !!values.progress);
    if (result.sweep) {
      finishChecks(result.sweep, checks);
      const e = result.sweep.checks?.event;
      if (e && values['stop-at'] === 'contact') for (const r of result.rows) if (r.unreachable) r.unreachable = `past the first contact (--stop-at contact): ${e.text}`;
    }
    if (result.status === 'failed' && !result.rows.length) {
      for (const m of result.messages) io.stderr(`${file}: ${m.severity}[${m.code}]: ${m.text}\n`);
      return result.messages.some((m) => m.code === 'bad-profile' || m.code === 'bad-step' || m.code === 'too-many-rows') ? EXIT.usage : EXIT.noSolution;
    }
    printSolverMessages(io, result.messages, 'schedule');
    const text = scheduleTable(pattern, result, tableHeader(loaded, file!, 'schedule', argv), drive, holds, format, undefined, loaded.project.units);
    if (!writeOutput(io, 'schedule', text, values.out as string | undefined)) return EXIT.usage;
    if (interrupted || result.status === 'stopped') { io.stderr('hingeplan schedule: stopped by Ctrl-C; the rows computed so far are written, the rest are flagged.\n'); return EXIT_INTERRUPTED; }
    if (result.rows.some((r) => r.unreachable) || result.status === 'failed') return EXIT.noSolution;
    if (result.hinges.some((h) => h.rowsOverRate || h.rowsOverAcceleration || h.overBetweenRows)) return EXIT.notDetermined;
    return EXIT.ok;
  },
};
