import type { Command } from '../command';
import { parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { EXIT } from '../exit-codes';
import { formatOption, PATH_OPTIONS_HELP, pathOptions, joinNegativeNumbers, checksOptions, CHECKS_HELP } from './path-common';
import { runSweepTable, sweepSetup } from './sweep';

export const tableCommand: Command = {
  name: 'table',
  summary: 'write the actuator angle table (CSV or JSON) with its metadata header',
  help: `Usage: hingeplan table <file> --drive <crease> --from <deg> --to <deg> [--step <deg>]
                       [--hold <crease>=<deg> …] [--branch <id> | --solution <k> | --start <file>]
                       [--format csv|json] [--rates] [--pretty] [--digits <n>] [--out <file>]
                       [--contact on|off] [--clearance <length>] [--stop-at contact]
                       [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

The table an actuator team loads: the same path as \`hingeplan sweep\`, one row per sample with the drive
value and every hinge angle by label (degrees), optionally every hinge rate (degrees per degree of drive),
the largest vertex residual, the condition number and a near-singular flag; a contact column (1 at and past
the first contact of two panels) and, with loads, a torque column per drive ("torque:<crease>", N·m). Rows
are written as the samples
are solved, so the table's size does not limit the memory it needs. Drive and held values are written as
given (60, not 59.99999999999999); every other number at full precision unless --digits asks otherwise.

What was asked comes before the rows (CSV: "# key: value" lines, then the column row; JSON: members):
format and version (2), pattern name, file and the SHA-256 of its bytes, the start state's file and hash
(startFile, startSha256) with --start, drive, held creases, units, sign convention, residual tolerance,
program version, date, the command that wrote the table (with the hashed files it reproduces every number),
the cautions line, and what is checked: "contact" ({checked, clearance}) and, with loads, "torqueUnits". What the computation found comes after the rows: branch, method, status, sampleCount,
requested, largestResidual, firstContact, peakTorque (with loads), and the events (CSV: "# event:" lines;
JSON: "events", "messages").

  CSV columns: drive, <crease>…, rate:<crease>… (with --rates), max_residual, condition, near_singular,
               contact (when checked), torque:<drive>… (with loads).
  JSON: {"format": "hingeplan-angle-table", "version": 2, …header, "columns": ["<crease>", …],
         "samples": [{"drive": <deg>, "angles": [<deg> per column], "rates": [<deg/deg> per column],
         "maxResidual": <rad>, "condition": <num|null>, "nearSingular": <bool>, "contact"?: true,
         "contacts"?: [[p, q], …], "torque"?: {"<drive>": <N·m>}}, …],
         "branch", "method", "status", "sampleCount", "requested", "largestResidual",
         "events": [{"type", "drive", "text", "crease"?}], "messages": [{"severity", "code", "text"}]}

  --drive, --from, --to, --step   as for \`hingeplan sweep\`.
${PATH_OPTIONS_HELP}
${CHECKS_HELP}
  --format csv|json      csv (default) or json.
  --rates                add the rates ("rate:<crease>" columns; JSON: "rates").
Exit status as for \`hingeplan sweep\`.`,
  async run(argv, io) {
    const spec: OptionSpec = { ...pathOptions, ...checksOptions, format: { type: 'string' }, rates: { type: 'boolean' } };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const format = formatOption(values.format, ['csv', 'json'], 'csv') as 'csv' | 'json';
    if (values.pretty && format !== 'json') throw new UsageError('--pretty is for --format json');
    const setup = await sweepSetup(io, 'table', values, positionals);
    if (!setup) return EXIT.usage;
    return runSweepTable(io, 'table', argv, values, setup, format, !!values.rates);
  },
};
