import type { Command } from '../command';
import type { Io } from '../io';
import { parseCommandArgs, UsageError, type OptionValues } from '../args';
import type { OptionSpec } from '../args';
import { loadFile, type Loaded } from '../load';
import { EXIT } from '../exit-codes';
import { textTable } from '../table-text';
import { sweepSteps, type SweepOptions, type SweepResult } from '../../solver/paths/sweep';
import { angleTable } from '../../solver/outputs/table';
import { CAUTIONS } from '../../solver/formats/cautions';
import type { Drive } from '../../solver/types';
import {
  creaseOption, EXIT_INTERRUPTED, holdsOption, intOrUndefined, methodOption, PATH_OPTIONS_HELP, pathOptions,
  printSolverMessages, rangeOptions, runResponsive, startOption, tableHeader, writeOutput, joinNegativeNumbers,
  checksOption, checksOptions, checksHook, CHECKS_HELP,
} from './path-common';
import { finishChecks, type PathChecks } from '../../solver/outputs/path-physics';

const DEG = 180 / Math.PI;

/** Everything a path command needs from its options, or undefined when the input was refused (printed). */
export function sweepSetup(io: Io, command: string, values: OptionValues, positionals: string[]): { loaded: Loaded; file: string; options: SweepOptions; holds: Drive[]; checks: PathChecks } | undefined {
  const file = positionals[0];
  const loaded = loadFile(io, file, command);
  if (!loaded) return undefined;
  const { pattern } = loaded;
  const drive = creaseOption(pattern, values.drive as string | undefined, 'drive');
  const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
  if (!holds) return undefined;
  if (holds.some((h) => h.crease === drive)) throw new UsageError(`--hold: the drive ${pattern.creases[drive].label} cannot also be held`);
  const range = rangeOptions(values);
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
    ...(start ? { start } : {}),
    method: methodOption(values.method),
    conditionEvery: intOrUndefined(values['condition-every'], 'condition-every', 0),
  };
  const checks = checksOption(io, loaded, values, file!, drive, holds);
  if (!checks) return undefined;
  return { loaded, file: file!, options, holds, checks };
}

export function exitForSweep(r: SweepResult, interrupted: boolean): number {
  if (interrupted || r.status === 'stopped') return EXIT_INTERRUPTED;
  if (r.status === 'failed') return r.messages.some((m) => m.code === 'invalid-sweep') ? EXIT.usage : EXIT.noSolution;
  return r.status === 'complete' ? EXIT.ok : EXIT.noSolution;
}

function humanText(r: SweepResult, loaded: Loaded): string {
  const { pattern } = loaded;
  const out: string[] = [];
  const label = pattern.creases[r.drive].label;
  out.push(`${pattern.name}: ${label} swept, ${r.samples.length} of ${r.requested} samples (${r.status}, ${r.method})${r.branch ? `; branch ${r.branch.id ?? ''} ${r.branch.name}`.replace('  ', ' ') : ''}`);
  const shown = pattern.creases.filter((c) => c.assignment !== 'B' && c.index !== r.drive).slice(0, 8);
  const rows = r.samples.map((s) => [
    (s.drive * DEG).toFixed(4),
    ...shown.map((c) => (s.angles[c.index] * DEG).toFixed(4)),
    s.maxResidual.toExponential(1),
    Number.isNaN(s.condition) ? '' : Number.isFinite(s.condition) ? s.condition.toPrecision(4) : 'inf',
  ]);
  out.push('');
  out.push(textTable([label, ...shown.map((c) => c.label), 'residual', 'condition'], rows).trimEnd());
  const more = pattern.creases.filter((c) => c.assignment !== 'B').length - 1 - shown.length;
  if (more > 0) out.push(`(${more} more creases: use --csv or --json for every crease and rate)`);
  for (const e of r.events) out.push(`event ${e.type} at ${(e.drive * DEG).toFixed(6)}°: ${e.text}`);
  const c = r.checks;
  if (c) {
    out.push(c.contact.checked ? `contact: checked at every sample (clearance ${c.contact.clearance}${loaded.project.units ? ` ${loaded.project.units}` : ''})${c.event ? '' : '; none'}` : 'contact: not checked');
    for (const [crease, p] of c.peakTorque ?? []) out.push(`peak holding torque of ${pattern.creases[crease].label}: ${+p.value.toPrecision(6)} N·m at ${label} = ${(p.at * DEG).toFixed(4)}°`);
  }
  out.push(CAUTIONS);
  return out.join('\n') + '\n';
}

export const sweepCommand: Command = {
  name: 'sweep',
  summary: 'follow the folding as one drive moves: every hinge angle and rate at each sample, and events',
  help: `Usage: hingeplan sweep <file> --drive <crease> --from <deg> --to <deg> [--step <deg>]
                       [--hold <crease>=<deg> …] [--branch <id> | --solution <k> | --start <file>]
                       [--json | --csv [--rates]] [--out <file>]
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
holding torque of every drive, and the summary the peak of each. A path that starts at the flat state
follows one of its branches (see \`hingeplan branches\`).

  --drive <crease>       the crease that moves (label or index).
  --from, --to <deg>     the drive range; --step <deg> the sample spacing (default 1).
${PATH_OPTIONS_HELP}
${CHECKS_HELP}
  --json                 JSON on stdout: {"drive": <crease>, "samples": [{"drive": <deg>, "angles": {"<crease>":
                         <deg>, …}, "rates": {"<crease>": <deg/deg>, …}, "maxResidual": <rad>, "condition":
                         <num|null>, "nearSingular": <bool>, "contact"?: true, "contacts"?: [[p, q], …],
                         "torque"?: {"<drive>": <N·m>}}], "events": [{"type", "drive": <deg>, "text",
                         "crease"?, "panels"?, "point"?, "distance"?}], "contact": {"checked", "clearance"},
                         "peakTorque"?: {"<drive>": {"torque": <N·m>, "drive": <deg>}}, "status", "messages",
                         and the table metadata (see \`hingeplan table\`)}.
  --csv                  the angle table as CSV with its metadata header (as \`hingeplan table\`); --rates adds
                         a rate column per crease.
Progress goes to stderr. Exit status: 0 every sample solved; 3 the path ended early (an event says why) or
could not start; 2 invalid input; 130 stopped by Ctrl-C (what was computed is written).`,
  async run(argv, io) {
    const spec: OptionSpec = { ...pathOptions, ...checksOptions, json: { type: 'boolean' }, csv: { type: 'boolean' }, rates: { type: 'boolean' } };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    if (values.json && values.csv) throw new UsageError('choose one of --json and --csv');
    const setup = sweepSetup(io, 'sweep', values, positionals);
    if (!setup) return EXIT.usage;
    const { loaded, file, options, holds, checks } = setup;
    const { result, interrupted } = await runResponsive(io, 'sweep', (hooks) => sweepSteps(loaded.pattern, options, { ...hooks, onSample: checksHook(checks) }), !!values.progress);
    finishChecks(result, checks);
    printSolverMessages(io, result.messages, 'sweep');
    const header = tableHeader(loaded, file, 'sweep', argv);
    const units = loaded.project.units;
    const text = values.json
      ? angleTable(loaded.pattern, result, header, holds, { format: 'json', rates: true, units })
      : values.csv
        ? angleTable(loaded.pattern, result, header, holds, { format: 'csv', rates: !!values.rates, units })
        : humanText(result, loaded);
    if (!writeOutput(io, 'sweep', text, values.out as string | undefined)) return EXIT.usage;
    if (interrupted) io.stderr(`hingeplan sweep: stopped by Ctrl-C after ${result.samples.length} of ${result.requested} samples; the output holds those samples.\n`);
    return exitForSweep(result, interrupted);
  },
};
