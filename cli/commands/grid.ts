import type { Command } from '../command';
import { parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { loadFile } from '../load';
import { EXIT } from '../exit-codes';
import { gridSteps } from '../../solver/outputs/grid';
import { gridTable } from '../../solver/outputs/table';
import type { Pattern } from '../../solver/types';
import {
  creaseOption, EXIT_INTERRUPTED, holdsOption, intOrUndefined, printSolverMessages, runResponsive, sampleDegrees, tableHeader, writeOutput, joinNegativeNumbers,
} from './path-common';

const RAD = Math.PI / 180;

/** --range <crease>=<from>:<to>:<step> (degrees). */
function parseRange(pattern: Pattern, text: string): { drive: number; values: number[] } {
  const eq = text.lastIndexOf('=');
  const parts = eq > 0 ? text.slice(eq + 1).split(':').map((s) => s.trim()) : [];
  if (eq <= 0 || parts.length !== 3 || parts.some((p) => p === '' || !Number.isFinite(Number(p)))) {
    throw new UsageError(`--range "${text}": write it as CREASE=FROM:TO:STEP in degrees, e.g. --range c0=0:60:5`);
  }
  const drive = creaseOption(pattern, text.slice(0, eq), 'range');
  const [from, to, step] = parts.map(Number);
  return { drive, values: sampleDegrees(from, to, step).map((d) => d * RAD) };
}

export const gridCommand: Command = {
  name: 'grid',
  summary: 'every hinge angle over a grid of two drives',
  help: `Usage: hingeplan grid <file> --range <crease>=<from>:<to>:<step> --range <crease>=<from>:<to>:<step>
                      [--hold <crease>=<deg> …] [--branch <id> | --solution <k>] [--format csv|json] [--out <file>]

For a pattern with two degrees of freedom (or more, with holds): every hinge angle at every node of a grid over
two drives (degrees). The first --range is x, the second y. The first column (x at its first value) is a path in
y; every row is then a path in x from that column, so neighbouring nodes lie on one continuous sheet of
solutions; a row that starts at the flat state takes the ray that continues the row before it. Every node is
an exact solve; nodes the paths do not reach are flagged with the reason.

  --range <crease>=<from>:<to>:<step>   a drive and its values (given twice: x, then y).
  --hold, --branch, --solution, --progress, --out   as for \`hingeplan sweep\` (the branch or solution is the
                         start of the first column).
  --format csv|json      csv (default): metadata header (as \`hingeplan table\`), then one row per node: x, y,
                         every hinge angle, max_residual, flag; json: {…metadata, "nodes": [{"x", "y",
                         "angles": {…}, "maxResidual"} or {"x", "y", "unreachable"}]}.
Exit status: 0 every node solved; 3 some nodes flagged; 2 invalid input; 130 stopped by Ctrl-C.`,
  async run(argv, io) {
    const spec: OptionSpec = {
      range: { type: 'string', multiple: true }, hold: { type: 'string', multiple: true }, branch: { type: 'string' },
      solution: { type: 'string' }, format: { type: 'string' }, out: { type: 'string' }, progress: { type: 'boolean' },
    };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const format = (values.format as string | undefined) ?? 'csv';
    if (format !== 'csv' && format !== 'json') throw new UsageError(`--format must be csv or json, got "${format}"`);
    const ranges = (values.range as string[] | undefined) ?? [];
    if (ranges.length !== 2) throw new UsageError(`give --range exactly twice (x and y), got ${ranges.length}`);
    const file = positionals[0];
    const loaded = loadFile(io, file, 'grid');
    if (!loaded) return EXIT.usage;
    const { pattern } = loaded;
    const x = parseRange(pattern, ranges[0]);
    const y = parseRange(pattern, ranges[1]);
    if (x.drive === y.drive) throw new UsageError('the two --range options must name different creases');
    if (x.values.length * y.values.length > 1_000_000) throw new UsageError(`${x.values.length} × ${y.values.length} nodes is more than the 1000000 a grid takes`);
    const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
    if (!holds) return EXIT.usage;
    if (holds.some((h) => h.crease === x.drive || h.crease === y.drive)) throw new UsageError('--hold: a grid drive cannot also be held');
    const { result, interrupted } = await runResponsive(io, 'grid', (hooks) => gridSteps(pattern, {
      x, y, holds, branch: intOrUndefined(values.branch, 'branch'), solution: intOrUndefined(values.solution, 'solution'),
    }, hooks), !!values.progress);
    printSolverMessages(io, result.messages, 'grid');
    const text = gridTable(pattern, result, tableHeader(loaded, file!, 'grid', argv), { x: x.drive, y: y.drive }, holds, format);
    if (!writeOutput(io, 'grid', text, values.out as string | undefined)) return EXIT.usage;
    if (interrupted || result.status === 'stopped') { io.stderr('hingeplan grid: stopped by Ctrl-C; the nodes computed so far are written, the rest are flagged.\n'); return EXIT_INTERRUPTED; }
    return result.status === 'complete' ? EXIT.ok : EXIT.noSolution;
  },
};
