import type { Command } from '../command';
import { parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { loadFile, printMessages } from '../load';
import { EXIT } from '../exit-codes';
import { followSteps, parseScheduleCsv } from '../../solver/outputs/schedule';
import { followTable } from '../../solver/outputs/table';
import { sha256 } from '../../solver/outputs/sha256';
import { EXIT_INTERRUPTED, holdsOption, intOrUndefined, printSolverMessages, runResponsive, tableHeader, writeOutput, joinNegativeNumbers, checksOption, checksOptions, CHECKS_HELP } from './path-common';
import { checkFollowedRows } from '../../solver/outputs/path-physics';

export const followCommand: Command = {
  name: 'follow',
  summary: 'follow a drive schedule (CSV of time and drive angles): every hinge angle per row, or a flag',
  help: `Usage: hingeplan follow <file> --schedule <csv> [--hold <crease>=<deg> …] [--branch <id> | --solution <k>]
                        [--rates] [--format csv|json] [--out <file>]
                        [--contact on|off] [--clearance <length>] [--stop-at contact]
                        [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

Reads the schedule an actuator team supplies and solves every hinge angle at every row. The schedule CSV has a
header "time,<crease>,<crease>,…" (time in seconds, non-decreasing; drive angles in degrees, valley positive)
and one row per time; lines starting with # are skipped. A schedule that moves one drive is followed on the
path in monotonic runs: where the drive reverses, the next run starts from the last row reached (an actuator
that turns back retraces its way). Several drives moving together are followed row to row by homotopy in
steps of at most 2°. Columns that never change are held. A row with no consistent state on the followed
branch is flagged with the reason (for patterns up to 400 free creases it also says whether any state at all
has those values) and the other rows are still solved.

  --schedule <csv>       the schedule file.
  --hold <crease>=<deg>  hold creases that are not in the schedule.
  --branch <id>          branch from the flat state when the first row is flat (see \`hingeplan branches\`).
  --solution <k>         otherwise: which solution at the first row (1-based); default: the first matching the
                         mountain/valley assignment.
  --rates                one drive moving: add the rate of every hinge with respect to it (deg/deg).
  --format csv|json      csv (default): metadata header (as \`hingeplan table\`), then time, every hinge angle,
                         max_residual and flag ("unreachable: <reason>"); json: the same as fields.
  --progress, --out      as for \`hingeplan sweep\`.
${CHECKS_HELP}
                         Every solved row is checked for contact (with one drive moving, the first contact
                         is refined between rows to 0.01°); a contact column and, with loads, a torque column
                         per drive follow the flag.
Exit status: 0 every row solved; 3 some rows flagged; 2 invalid input (with the line of the schedule);
130 stopped by Ctrl-C (the rows computed are written).`,
  async run(argv, io) {
    const spec: OptionSpec = {
      schedule: { type: 'string' }, hold: { type: 'string', multiple: true }, branch: { type: 'string' }, solution: { type: 'string' },
      rates: { type: 'boolean' }, format: { type: 'string' }, out: { type: 'string' }, progress: { type: 'boolean' },
      ...checksOptions,
    };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const format = (values.format as string | undefined) ?? 'csv';
    if (format !== 'csv' && format !== 'json') throw new UsageError(`--format must be csv or json, got "${format}"`);
    const csvPath = values.schedule as string | undefined;
    if (!csvPath) throw new UsageError('--schedule <csv> is required');
    const file = positionals[0];
    const loaded = loadFile(io, file, 'follow');
    if (!loaded) return EXIT.usage;
    const { pattern } = loaded;
    const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
    if (!holds) return EXIT.usage;
    const read = io.readFile(csvPath);
    if (read.text === undefined) { io.stderr(`hingeplan follow: ${read.error}\n`); return EXIT.usage; }
    const schedule = parseScheduleCsv(pattern, read.text);
    if (schedule.messages.some((m) => m.severity === 'error')) {
      printMessages(io, schedule.messages.map((m) => ({ ...m, text: m.where?.line ? `line ${m.where.line}: ${m.text.replace(/^Line \d+: /, '')}` : m.text })), `${csvPath}: `);
      return EXIT.usage;
    }
    const clash = holds.find((h) => schedule.drives.includes(h.crease));
    if (clash) throw new UsageError(`--hold: ${pattern.creases[clash.crease].label} is a column of the schedule`);
    const rows = schedule.rows;
    const moving = schedule.drives.filter((c) => rows.some((r) => r.values.get(c) !== rows[0]?.values.get(c)));
    const drive = moving[0] ?? schedule.drives[0];
    const others = [...holds, ...schedule.drives.filter((c) => c !== drive).map((c) => ({ crease: c, value: rows[0]?.values.get(c) ?? 0 }))];
    const checks = checksOption(io, loaded, values, file!, drive, others, moving.length <= 1);
    if (!checks) return EXIT.usage;
    const wantRates = !!values.rates || (!!checks.options.loads && moving.length <= 1);
    const { result, interrupted } = await runResponsive(io, 'follow', (hooks) => followSteps(pattern, schedule, {
      holds, branch: intOrUndefined(values.branch, 'branch'), solution: intOrUndefined(values.solution, 'solution'), rates: wantRates,
    }, hooks), !!values.progress);
    checkFollowedRows(result, checks, drive);
    if (!values.rates) for (const r of result.rows) r.rates = undefined;
    printSolverMessages(io, result.messages, 'follow');
    const header = tableHeader(loaded, file!, 'follow', argv);
    const text = followTable(pattern, result, { ...header, command: `${header.command}  # schedule file sha256 ${sha256(read.text)}` }, holds, format, { rates: !!values.rates, units: loaded.project.units });
    if (!writeOutput(io, 'follow', text, values.out as string | undefined)) return EXIT.usage;
    if (interrupted || result.status === 'stopped') { io.stderr('hingeplan follow: stopped by Ctrl-C; the rows computed so far are written, the rest are flagged.\n'); return EXIT_INTERRUPTED; }
    return result.rows.some((r) => r.unreachable) ? EXIT.noSolution : EXIT.ok;
  },
};
