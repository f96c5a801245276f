import type { Command } from '../command';
import type { Io } from '../io';
import { parseCommandArgs, UsageError, type OptionValues } from '../args';
import type { OptionSpec } from '../args';
import type { Loaded } from '../load';
import { EXIT } from '../exit-codes';
import { openOutput, type Output } from '../output';
import { sweepSteps, type SweepOptions, type SweepResult, type SweepSample } from '../../solver/paths/sweep';
import { AngleTableWriter, checksField, type TableInput, type TableFormat } from '../../solver/outputs/table';
import { CAUTIONS } from '../../solver/formats/cautions';
import { decimalsText, degreesText } from '../../solver/formats/numbers';
import type { Drive, Pattern } from '../../solver/types';
import {
  driveSetup, digitsOption, EXIT_INTERRUPTED, intOrUndefined, methodOption, PATH_OPTIONS_HELP, pathOptions,
  printSolverMessages, rangeOptions, REQUEST_CODES, requestError, runResponsive, startOption, tableHeader, joinNegativeNumbers,
  checksOption, checksOptions, checksHook, CHECKS_HELP,
} from './path-common';
import { finishChecks, type PathChecks } from '../../solver/outputs/path-physics';

const DEG = 180 / Math.PI;

export interface SweepSetup {
  loaded: Loaded;
  file: string;
  options: SweepOptions;
  holds: Drive[];
  /** the sample drive values as asked for, degrees (echoed exactly) */
  driveDegrees: Map<number, number>;
  /** the files the numbers depend on besides the pattern (a start state) */
  inputs: TableInput[];
  inputFiles: string[];
  /** contact and torque, checked at every sample */
  checks: PathChecks;
}

/** Everything a path command needs from its options, or undefined when the input was refused (printed). */
export async function sweepSetup(io: Io, command: string, values: OptionValues, positionals: string[]): Promise<SweepSetup | undefined> {
  const base = await driveSetup(io, command, values, positionals);
  if (!base) return undefined;
  const { loaded, file, drive, holds } = base;
  const { pattern } = loaded;
  const range = rangeOptions(values, pattern.creases.length);
  const start = startOption(io, pattern, values.start as string | undefined);
  if (start === null) return undefined;
  const options: SweepOptions = {
    drive,
    from: range.from,
    to: range.to,
    samples: range.samples,
    holds,
    branch: intOrUndefined(values.branch, 'branch'),
    solution: intOrUndefined(values.solution, 'solution'),
    ...(start ? { start: start.angles } : {}),
    method: methodOption(values.method),
    conditionEvery: intOrUndefined(values['condition-every'], 'condition-every', 0),
    keepSamples: false,
  };
  const checks = checksOption(io, loaded, values, file, drive, holds);
  if (!checks) return undefined;
  return {
    loaded,
    file: file,
    options,
    holds,
    checks,
    driveDegrees: new Map(range.samples.map((r, i) => [r, range.degrees[i]])),
    inputs: start ? [start.input] : [],
    inputFiles: [file, ...(start ? [start.input.file] : [])],
  };
}

export function exitForSweep(r: SweepResult, interrupted: boolean): number {
  if (interrupted || r.status === 'stopped') return EXIT_INTERRUPTED;
  if (r.status === 'failed') return r.messages.some((m) => REQUEST_CODES.has(m.code)) ? EXIT.usage : EXIT.noSolution;
  return r.status === 'complete' ? EXIT.ok : EXIT.noSolution;
}

/** A refusal of the request by the solver (too many samples, a bad value): raised as a usage error naming the option. */
export function throwIfRequestRefused(r: { status: string; messages: { code: string; text: string; severity: string; where?: { field?: string } }[] }): void {
  if (r.status !== 'failed') return;
  const m = r.messages.find((x) => x.severity === 'error' && REQUEST_CODES.has(x.code));
  if (m) throw requestError(m as Parameters<typeof requestError>[0]);
}

/** The sweep for people: the drive and the first eight creases per sample, then the events. */
class HumanSweep {
  private readonly rows: string[][] = [];
  private readonly shown: number[];

  constructor(private readonly pattern: Pattern, drive: number, private readonly driveDegrees: Map<number, number>, private readonly units?: string) {
    this.shown = pattern.creases.filter((c) => c.assignment !== 'B' && c.index !== drive).slice(0, 8).map((c) => c.index);
  }

  sample(s: SweepSample): void {
    this.rows.push([
      decimalsText(this.driveDegrees.get(s.drive) ?? s.drive * DEG, 6),
      ...this.shown.map((c) => (s.angles[c] * DEG).toFixed(4)),
      s.maxResidual.toExponential(1),
      Number.isNaN(s.condition) ? '' : Number.isFinite(s.condition) ? s.condition.toPrecision(4) : 'inf',
    ]);
  }

  text(r: SweepResult): string {
    const { pattern } = this;
    const label = pattern.creases[r.drive].label;
    const out: string[] = [];
    out.push(`${pattern.name}: ${label} swept, ${r.recorded} of ${r.requested} samples (${r.status}, ${r.method})${r.branch ? `; branch ${r.branch.id !== undefined ? `${r.branch.id} ` : ''}${r.branch.name}` : ''}`);
    out.push('');
    out.push(textTableFixed([`${label} (deg)`, ...this.shown.map((c) => pattern.creases[c].label), 'residual (rad)', 'condition'], this.rows));
    const more = pattern.creases.filter((c) => c.assignment !== 'B').length - 1 - this.shown.length;
    if (more > 0) out.push(`(${more} more creases: use --csv or --json for every crease and rate)`);
    for (const e of r.events) out.push(`event ${e.type} at ${label} = ${degreesText(e.drive)}°: ${e.text}`);
    const c = r.checks;
    if (c) {
      out.push(c.contact.checked ? `contact: checked at every sample (clearance ${c.contact.clearance}${this.units ? ` ${this.units}` : ''})${c.event ? '' : '; none'}` : 'contact: not checked');
      for (const [crease, p] of c.peakTorque ?? []) out.push(`peak holding torque of ${pattern.creases[crease].label}: ${+p.value.toPrecision(6)} N·m at ${label} = ${degreesText(p.at)}°`);
    }
    out.push(CAUTIONS);
    return out.join('\n') + '\n';
  }
}

function textTableFixed(header: string[], rows: string[][]): string {
  const widths = header.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (r: string[]) => r.map((c, j) => c.padStart(widths[j])).join('  ').trimEnd();
  return [line(header), widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}

/**
 * Run a sweep and write its table while the samples come: the angle table (CSV or JSON) or the text for
 * people. Shared by `sweep` and `table`. The exit status.
 */
export async function runSweepTable(io: Io, command: string, argv: string[], values: OptionValues, setup: SweepSetup, format: TableFormat | 'text', rates: boolean): Promise<number> {
  const { loaded, file, options, holds, checks } = setup;
  const { pattern } = loaded;
  const units = loaded.project.units;
  const digits = digitsOption(values.digits);
  /** what the checks found, once the path has ended */
  const found: { checks?: SweepResult['checks'] } = {};
  const out: Output | undefined = openOutput(io, command, values.out as string | undefined, setup.inputFiles, format === 'text' ? 'text' : 'escaped');
  if (!out) return EXIT.usage;
  let begun = false;
  let write: (s: SweepSample) => void;
  let finish: (r: SweepResult) => void;
  if (format === 'text') {
    const human = new HumanSweep(pattern, options.drive, setup.driveDegrees, units);
    write = (s) => human.sample(s);
    finish = (r) => out.write(human.text(r));
  } else {
    // contact and torque columns: known before the path (what is checked), their summary after it
    const torqueDrives = checks.options.loads ? [options.drive, ...holds.map((h) => h.crease)] : [];
    const field = checksField<SweepSample>(pattern, { contact: checks.summary().contact, torqueDrives, ...(units ? { units } : {}), summary: () => found.checks });
    const writer = new AngleTableWriter(pattern, tableHeader(loaded, file, command, argv, setup.inputs), options.drive, holds, {
      format, rates, digits, pretty: !!values.pretty, driveDegrees: setup.driveDegrees, fields: [field], ...(units ? { units } : {}),
    }, out);
    // the header goes out with the first sample (a sweep that cannot start writes nothing)
    write = (s) => { if (!begun) { begun = true; writer.begin(); } writer.sample(s); };
    finish = (r) => { if (!begun) writer.begin(); writer.end(r); };
  }
  const check = checksHook(checks);
  // each sample is checked (contact, torque) before it is written
  const onSample = (s: SweepSample) => { const verdict = check(s); write(s); return verdict; };
  let result: SweepResult, interrupted: boolean;
  try {
    ({ result, interrupted } = await runResponsive(io, command, (hooks) => sweepSteps(pattern, options, { ...hooks, onSample }), !!values.progress));
  } catch (e) {
    out.abort();
    throw e;
  }
  if (result.status === 'failed' && result.recorded === 0) {
    out.abort();
    throwIfRequestRefused(result);
    printSolverMessages(io, result.messages, command);
    return exitForSweep(result, interrupted);
  }
  finishChecks(result, checks, Math.sign(options.to - options.from) || 1);
  found.checks = result.checks;
  printSolverMessages(io, result.messages, command);
  finish(result);
  if (!out.finish(out.toFile ? `${result.recorded} of ${result.requested} samples` : undefined)) return EXIT.usage;
  if (interrupted) io.stderr(`hingeplan ${command}: stopped by Ctrl-C after ${result.recorded} of ${result.requested} samples; the output holds those samples, complete.\n`);
  return exitForSweep(result, interrupted);
}

export const sweepCommand: Command = {
  name: 'sweep',
  summary: 'follow the folding as one drive moves: every hinge angle and rate at each sample, and events',
  help: `Usage: hingeplan sweep <file> --drive <crease> --from <deg> --to <deg> [--step <deg>]
                       [--hold <crease>=<deg> …] [--branch <id> | --solution <k> | --start <file>]
                       [--json | --csv [--rates]] [--pretty] [--digits <n>] [--out <file>]
                       [--contact on|off] [--clearance <length>] [--stop-at contact]
                       [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

Follows the family of folded states as the drive moves from --from to --to. Every sample (every --step
degrees, default 1, the end value included) is solved exactly at its drive value: nothing is interpolated.
Reports, per sample, every fold angle, the largest vertex residual, the rate of every hinge with respect to
the drive (degrees per degree: the transmission ratio of each passive hinge), the condition number and a
near-singular flag; and the events on the way: turning-point (the drive reverses), branch-point (the
Jacobian loses rank; the rays that leave it are listed), hinge-limit, folded-flat (a crease reaches ±180°),
corrector-failed (the last good state is kept), contact (two panels meet, or come closer than the
clearance: the first such state, refined to 0.01°; later samples carry "contact": true). With loads (an
areal density, panel masses or springs, on the command line or in the file) every sample carries the static
holding torque of every drive, and the tail the peak of each. A path that starts at the flat state follows
one of its branches (see \`hingeplan branches\`). Samples are written as they are solved.

  --drive <crease>       the crease that moves (label or index).
  --from, --to <deg>     the drive range; --step <deg> the sample spacing (default 1).
${PATH_OPTIONS_HELP}
${CHECKS_HELP}
  --json                 the angle table as JSON (format 2, see \`hingeplan table --help\`), with rates.
  --csv                  the angle table as CSV with its metadata header (as \`hingeplan table\`); --rates adds
                         a rate column per crease.
Progress goes to stderr. Exit status: 0 every sample solved; 3 the path ended early (an event says why) or
could not start; 2 invalid input; 130 stopped by Ctrl-C (what was computed is written).`,
  async run(argv, io) {
    const spec: OptionSpec = { ...pathOptions, ...checksOptions, json: { type: 'boolean' }, csv: { type: 'boolean' }, rates: { type: 'boolean' } };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    if (values.json && values.csv) throw new UsageError('choose one of --json and --csv');
    if (values.rates && !values.csv) throw new UsageError(values.json ? '--rates is for --csv (the JSON table always has the rates)' : '--rates is for --csv');
    if (values.pretty && !values.json) throw new UsageError('--pretty is for --json');
    if (values.digits !== undefined && !values.json && !values.csv) throw new UsageError('--digits is for --json and --csv (the text for people rounds to 4 decimals)');
    const setup = await sweepSetup(io, 'sweep', values, positionals);
    if (!setup) return EXIT.usage;
    return runSweepTable(io, 'sweep', argv, values, setup, values.json ? 'json' : values.csv ? 'csv' : 'text', values.json ? true : !!values.rates);
  },
};
