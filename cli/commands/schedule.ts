import type { Command } from '../command';
import { numberOption, parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { loadFile } from '../load';
import { EXIT } from '../exit-codes';
import { openOutput } from '../output';
import { scheduleSteps, type HingeLimits, type ProfileKind, type ScheduleOptions, type ScheduleResult, type ScheduleRow } from '../../solver/outputs/schedule';
import { checksField, ScheduleTableWriter } from '../../solver/outputs/table';
import { finishChecks } from '../../solver/outputs/path-physics';
import type { SweepResult } from '../../solver/paths/sweep';
import { findCrease } from '../../solver/model/pattern';
import {
  creaseOption, digitsOption, EXIT_INTERRUPTED, formatOption, holdsOption, intOrUndefined, OUT_HELP, OUTPUT_OPTIONS_HELP, outputOptions, printSolverMessages,
  REQUEST_CODES, requestError, runResponsive, startOption, tableHeader, joinNegativeNumbers,
  checksOption, checksOptions, checksHook, CHECKS_HELP,
} from './path-common';

const RAD = Math.PI / 180;

/** --limit <crease>=<rate>[:<accel>] (deg/s, deg/s²; either may be left empty). */
function parseLimit(text: string): { ref: string; limits: HingeLimits } {
  const eq = text.lastIndexOf('=');
  if (eq <= 0) throw new UsageError(`--limit "${text}": write it as CREASE=RATE[:ACCELERATION] in deg/s and deg/s², e.g. --limit s2_1=30:120`);
  const ref = text.slice(0, eq).trim();
  const [rate, accel, ...more] = text.slice(eq + 1).split(':').map((s) => s.trim());
  if (more.length) throw new UsageError(`--limit "${text}": write it as CREASE=RATE[:ACCELERATION], with one colon at most`);
  const limits: HingeLimits = {};
  if (rate) { const v = Number(rate); if (!(v > 0 && Number.isFinite(v))) throw new UsageError(`--limit "${text}": the rate limit must be a positive number of deg/s`); limits.maxRate = v * RAD; }
  if (accel) { const v = Number(accel); if (!(v > 0 && Number.isFinite(v))) throw new UsageError(`--limit "${text}": the acceleration limit must be a positive number of deg/s²`); limits.maxAcceleration = v * RAD; }
  if (limits.maxRate === undefined && limits.maxAcceleration === undefined) throw new UsageError(`--limit "${text}": give a rate, an acceleration, or both`);
  return { ref, limits };
}

function positive(values: Record<string, unknown>, name: string, unit: string): number | undefined {
  if (values[name] === undefined) return undefined;
  const v = numberOption(values[name] as string, name);
  if (!(v > 0)) throw new UsageError(`--${name} must be a positive number of ${unit}, got ${values[name]}`);
  return v;
}

export const scheduleCommand: Command = {
  name: 'schedule',
  summary: 'a time-stamped deployment schedule: every hinge angle, velocity and acceleration; limit flags',
  help: `Usage: hingeplan schedule <file> --drive <crease> --from <deg> --to <deg> --time <s>
                          [--profile constant|trapezoid|s-curve] [--accel-time <s> | --accel <deg/s²>]
                          [--jerk-time <s>] [--dt <s> | --rows <n>] [--max-rate <deg/s>] [--max-accel <deg/s²>]
                          [--limit <crease>=<deg/s>[:<deg/s²>] …] [--hold <crease>=<deg> …]
                          [--branch <id> | --solution <k> | --start <file>] [--format csv|json] [--pretty]
                          [--digits <n>] [--out <file>]
                          [--contact on|off] [--clearance <length>] [--stop-at contact]
                          [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

Moves the drive from --from to --to in --time seconds with the chosen profile, and solves every hinge at each
time row exactly on the path (as \`hingeplan sweep\`). Hinge velocity = rate × drive velocity; hinge
acceleration = rate × drive acceleration + curvature × drive velocity² (rate = dρ/dθ, curvature = d²ρ/dθ²,
both exact from the closure equations). Every hinge over a rate or acceleration limit is flagged per row and
summarised. Rows are written as they are solved.

Profiles (symmetric start and stop; Δ = |to − from|, T = --time):
  constant     constant drive velocity Δ/T (the steps in velocity at start and stop are not modelled);
               takes no --accel-time, --accel or --jerk-time.
  trapezoid    accelerate for t_a, cruise, decelerate for t_a: v_max = Δ/(T − t_a), a = v_max/t_a.
               t_a from --accel-time (default T/4), or from --accel a: t_a = (T − √(T² − 4Δ/a))/2;
               takes no --jerk-time.
  s-curve      jerk-limited: within each acceleration phase t_a (--accel-time, default T/4) the acceleration
               ramps up for t_j (--jerk-time, default t_a/4), holds, and ramps down: v_max = Δ/(T − t_a),
               a_max = v_max/(t_a − t_j); takes no --accel.
An option the chosen profile does not use is refused, never recorded as if it applied.

  --dt <s> | --rows <n>  time step between rows, or the number of rows (at least 2; default 101 rows); the last
                         row is at exactly T.
  --max-rate, --max-accel   limits for every hinge (deg/s, deg/s²).
  --limit <crease>=<rate>[:<accel>]   a limit for one hinge (overrides the global ones); repeat.
  --hold, --branch, --solution, --start, --progress   as for \`hingeplan sweep\`.
${CHECKS_HELP}
                         A contact column (1 at and past the first contact) and, with loads, a torque column
                         per drive ("torque:<crease>", N·m) follow the flags; the tail gives the peaks.
  --format csv|json      csv (default): metadata header ("# key: value", as \`hingeplan table\`, plus the
                         profile), then columns t, drive, drive_velocity, drive_acceleration, every hinge angle,
                         velocity:<crease> …, acceleration:<crease> …, max_residual, flags ("rate:<crease>",
                         "accel:<crease>", or "unreachable"); after the rows the status and counts, "# over
                         limit:" and "# unreachable" lines. json (format 2): header members, "columns", then
                         "rows": [{"t", "drive", "driveVelocity", "driveAcceleration", "angles": [..],
                         "velocities": [..], "accelerations": [..] (per column), "maxResidual", "overRate":
                         [creases], "overAcceleration": [creases]} or {…, "unreachable": <why>}], "branch",
                         "status", "rowCount", "unreachableRows", "largestResidual", "hinges": [{"crease",
                         "peakVelocity", "peakAcceleration", "rowsOverRate", "rowsOverAcceleration"}], "events",
                         "messages".
${OUTPUT_OPTIONS_HELP}
${OUT_HELP}
A schedule may hold at most 20 million hinge values (rows × (creases + 32)): a finer --dt or more --rows is
refused before any work, with the step that fits.
Exit status: 0 every row solved and within limits; 3 some rows unreachable; 4 every row solved but some hinge
over a limit; 2 invalid input; 130 stopped by Ctrl-C (the rows computed are written).`,
  async run(argv, io) {
    const spec: OptionSpec = {
      drive: { type: 'string' }, from: { type: 'string' }, to: { type: 'string' }, time: { type: 'string' },
      profile: { type: 'string' }, 'accel-time': { type: 'string' }, accel: { type: 'string' }, 'jerk-time': { type: 'string' },
      dt: { type: 'string' }, rows: { type: 'string' }, 'max-rate': { type: 'string' }, 'max-accel': { type: 'string' },
      limit: { type: 'string', multiple: true }, hold: { type: 'string', multiple: true }, branch: { type: 'string' },
      solution: { type: 'string' }, start: { type: 'string' }, format: { type: 'string' }, out: { type: 'string' }, progress: { type: 'boolean' },
      ...outputOptions, ...checksOptions,
    };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const format = formatOption(values.format, ['csv', 'json'], 'csv') as 'csv' | 'json';
    if (values.pretty && format !== 'json') throw new UsageError('--pretty is for --format json');
    const digits = digitsOption(values.digits);
    const kind = ((values.profile as string | undefined) ?? 'trapezoid') as ProfileKind;
    if (!['constant', 'trapezoid', 's-curve'].includes(kind)) throw new UsageError(`--profile must be constant, trapezoid or s-curve, got "${kind}"`);
    if (values['accel-time'] !== undefined && values.accel !== undefined) throw new UsageError('give one of --accel-time and --accel');
    if (values.dt !== undefined && values.rows !== undefined) throw new UsageError('give one of --dt and --rows');
    const from = numberOption(values.from as string | undefined, 'from');
    const to = numberOption(values.to as string | undefined, 'to');
    for (const [v, n] of [[from, 'from'], [to, 'to']] as const) if (Math.abs(v) > 180) throw new UsageError(`--${n} must be within −180 … 180 degrees, got ${v}`);
    const duration = numberOption(values.time as string | undefined, 'time');
    if (!(duration > 0)) throw new UsageError(`--time must be a positive number of seconds, got ${values.time}`);
    const accelTime = values['accel-time'] === undefined ? undefined : numberOption(values['accel-time'] as string, 'accel-time');
    if (accelTime !== undefined && !(accelTime >= 0)) throw new UsageError(`--accel-time must be a number of seconds from 0 to half of --time, got ${values['accel-time']}`);
    const accel = positive(values, 'accel', 'deg/s²');
    const jerkTime = values['jerk-time'] === undefined ? undefined : numberOption(values['jerk-time'] as string, 'jerk-time');
    if (jerkTime !== undefined && !(jerkTime >= 0)) throw new UsageError(`--jerk-time must be a number of seconds from 0 to half the acceleration time, got ${values['jerk-time']}`);
    const dt = positive(values, 'dt', 'seconds');
    const rows = intOrUndefined(values.rows, 'rows', 2);
    const global: HingeLimits = {};
    const maxRate = positive(values, 'max-rate', 'deg/s');
    const maxAccel = positive(values, 'max-accel', 'deg/s²');
    if (maxRate !== undefined) global.maxRate = maxRate * RAD;
    if (maxAccel !== undefined) global.maxAcceleration = maxAccel * RAD;
    const file = positionals[0];
    const loaded = await loadFile(io, file, 'schedule');
    if (!loaded) return EXIT.usage;
    const { pattern } = loaded;
    const drive = creaseOption(pattern, values.drive as string | undefined, 'drive');
    const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
    if (!holds) return EXIT.usage;
    if (holds.some((h) => h.crease === drive)) throw new UsageError(`--hold: the drive ${pattern.creases[drive].label} cannot also be held`);
    const start = startOption(io, pattern, values.start as string | undefined);
    if (start === null) return EXIT.usage;
    const hingeLimits = new Map<number, HingeLimits>();
    for (const l of (values.limit as string[] | undefined) ?? []) {
      const { ref, limits } = parseLimit(l);
      const c = findCrease(pattern, ref);
      if (c === undefined) throw new UsageError(`--limit: there is no crease "${ref}"`);
      hingeLimits.set(c, limits);
    }
    const options: ScheduleOptions & { keepRows: boolean } = {
      drive,
      profile: {
        kind,
        from: from * RAD,
        to: to * RAD,
        duration,
        ...(accelTime !== undefined ? { accelTime } : {}),
        ...(accel !== undefined ? { acceleration: accel * RAD } : {}),
        ...(jerkTime !== undefined ? { jerkTime } : {}),
      },
      ...(dt !== undefined ? { dt } : {}),
      ...(rows !== undefined ? { rows } : {}),
      holds,
      branch: intOrUndefined(values.branch, 'branch'),
      solution: intOrUndefined(values.solution, 'solution'),
      ...(start ? { start: start.angles } : {}),
      limits: global,
      hingeLimits: new Map([...hingeLimits].map(([c, l]) => [c, { ...global, ...l }])),
      keepRows: false,
    };
    const checks = checksOption(io, loaded, values, file!, drive, holds);
    if (!checks) return EXIT.usage;
    const out = openOutput(io, 'schedule', values.out as string | undefined, [file, start?.input.file], 'escaped');
    if (!out) return EXIT.usage;
    const units = loaded.project.units;
    let path: SweepResult | undefined;
    const torqueDrives = checks.options.loads ? [drive, ...holds.map((h) => h.crease)] : [];
    const field = checksField<ScheduleRow>(pattern, { contact: checks.summary().contact, torqueDrives, ...(units ? { units } : {}), summary: () => path?.checks });
    const writer = new ScheduleTableWriter(pattern, tableHeader(loaded, file!, 'schedule', argv, start ? [start.input] : []), drive, holds, options.profile, {
      format, digits, pretty: !!values.pretty, fromDegrees: from, toDegrees: to, fields: [field], ...(units ? { units } : {}),
    }, out);
    let begun = false, unreachable = 0, over = 0;
    const onRow = (r: ScheduleRow) => {
      if (!begun) { begun = true; writer.begin(); }
      if (r.unreachable) unreachable++;
      if (r.overRate.length || r.overAcceleration.length) over++;
      writer.row(r);
    };
    let result: ScheduleResult, interrupted: boolean;
    try {
      ({ result, interrupted } = await runResponsive(io, 'schedule', (hooks) => scheduleSteps(pattern, options, {
        ...hooks,
        onSample: checksHook(checks),
        onRow,
        // the first contact (an event) is known once the path has ended, before the rows it did not reach
        onPathEnd: (p) => { finishChecks(p, checks, Math.sign(to - from) || 1); path = p; },
      }), !!values.progress));
    } catch (e) {
      out.abort();
      throw e;
    }
    if (result.status === 'failed' && !begun) {
      out.abort();
      const refusal = result.messages.find((m) => REQUEST_CODES.has(m.code));
      if (refusal) throw requestError(refusal);
      for (const m of result.messages) io.stderr(`${file}: ${m.severity}[${m.code}]: ${m.text}\n`);
      return EXIT.noSolution;
    }
    printSolverMessages(io, result.messages, 'schedule');
    if (!begun) writer.begin();
    writer.end(result);
    if (!out.finish(out.toFile ? `${result.rowCount} rows` : undefined)) return EXIT.usage;
    if (interrupted || result.status === 'stopped') { io.stderr('hingeplan schedule: stopped by Ctrl-C; the rows computed so far are written, the rest are flagged.\n'); return EXIT_INTERRUPTED; }
    if (unreachable || result.status === 'failed') return EXIT.noSolution;
    // over a limit at a row, or between rows (at a profile breakpoint or a peak found between two rows)
    if (over || result.hinges.some((h) => h.overBetweenRows)) return EXIT.notDetermined;
    return EXIT.ok;
  },
};
