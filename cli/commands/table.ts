import type { Command } from '../command';
import { parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { EXIT } from '../exit-codes';
import { sweepSteps } from '../../solver/paths/sweep';
import { angleTable } from '../../solver/outputs/table';
import { PATH_OPTIONS_HELP, pathOptions, printSolverMessages, runResponsive, tableHeader, writeOutput, joinNegativeNumbers, checksOptions, checksHook, CHECKS_HELP } from './path-common';
import { finishChecks } from '../../solver/outputs/path-physics';
import { exitForSweep, sweepSetup } from './sweep';

export const tableCommand: Command = {
  name: 'table',
  summary: 'write the actuator angle table (CSV or JSON) with its metadata header',
  help: `Usage: hingeplan table <file> --drive <crease> --from <deg> --to <deg> [--step <deg>]
                       [--hold <crease>=<deg> …] [--branch <id> | --solution <k> | --start <file>]
                       [--format csv|json] [--rates] [--out <file>]
                       [--contact on|off] [--clearance <length>] [--stop-at contact]
                       [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

The table an actuator team loads: the same path as \`hingeplan sweep\`, one row per sample with the drive
value and every hinge angle by label (degrees), optionally every hinge rate (degrees per degree of drive),
the largest vertex residual, the condition number and a near-singular flag; a contact column (1 at and past
the first contact of two panels) and, with loads, a torque column per drive ("torque:<crease>", N·m).

Header (CSV: "# key: value" lines before the column row; JSON: fields): format and version, pattern name,
file and the SHA-256 of its text, branch, drive, held creases, units, sign convention, residual tolerance,
the largest residual over the table, status and sample count, method, what was checked for contact (with
the clearance and the first contact), the torque's units and each drive's peak torque, program version, date, the command
that wrote the table (it reproduces every number), and the cautions line. Events are listed after the rows
(CSV: "# event:" lines).

  --drive, --from, --to, --step   as for \`hingeplan sweep\`.
${PATH_OPTIONS_HELP}
${CHECKS_HELP}
  --format csv|json      csv (default) or json.
  --rates                add a rate column per crease ("rate:<crease>"; JSON: "rates").
Exit status as for \`hingeplan sweep\`.`,
  async run(argv, io) {
    const spec: OptionSpec = { ...pathOptions, ...checksOptions, format: { type: 'string' }, rates: { type: 'boolean' } };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const format = (values.format as string | undefined) ?? 'csv';
    if (format !== 'csv' && format !== 'json') throw new UsageError(`--format must be csv or json, got "${format}"`);
    const setup = sweepSetup(io, 'table', values, positionals);
    if (!setup) return EXIT.usage;
    const { loaded, file, options, holds, checks } = setup;
    const { result, interrupted } = await runResponsive(io, 'table', (hooks) => sweepSteps(loaded.pattern, options, { ...hooks, onSample: checksHook(checks) }), !!values.progress);
    finishChecks(result, checks);
    printSolverMessages(io, result.messages, 'table');
    const text = angleTable(loaded.pattern, result, tableHeader(loaded, file, 'table', argv), holds, { format, rates: !!values.rates, units: loaded.project.units });
    if (!writeOutput(io, 'table', text, values.out as string | undefined)) return EXIT.usage;
    if (interrupted) io.stderr(`hingeplan table: stopped by Ctrl-C after ${result.samples.length} of ${result.requested} samples; the table holds those rows.\n`);
    return exitForSweep(result, interrupted);
  },
};
