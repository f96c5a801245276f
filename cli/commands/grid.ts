import type { Command } from '../command';
import { parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { loadFile } from '../load';
import { EXIT } from '../exit-codes';
import { openOutput } from '../output';
import { gridSteps } from '../../solver/outputs/grid';
import { writeGridTable } from '../../solver/outputs/table';
import { tableWork, MAX_TABLE_VALUES } from '../../solver/paths/request-limits';
import type { Pattern } from '../../solver/types';
import {
  creaseOption, digitsOption, EXIT_INTERRUPTED, formatOption, holdsOption, intOrUndefined, OUT_HELP, OUTPUT_OPTIONS_HELP, outputOptions,
  printSolverMessages, REQUEST_CODES, requestError, runResponsive, sampleDegrees, tableHeader, joinNegativeNumbers,
} from './path-common';

const RAD = Math.PI / 180;

/** --range <crease>=<from>:<to>:<step> (degrees). */
function parseRange(pattern: Pattern, text: string): { drive: number; values: number[]; degrees: number[] } {
  const eq = text.lastIndexOf('=');
  const parts = eq > 0 ? text.slice(eq + 1).split(':').map((s) => s.trim()) : [];
  if (eq <= 0 || parts.length !== 3 || parts.some((p) => p === '' || !Number.isFinite(Number(p)))) {
    throw new UsageError(`--range "${text}": write it as CREASE=FROM:TO:STEP in degrees, e.g. --range c0=0:60:5`);
  }
  const drive = creaseOption(pattern, text.slice(0, eq), 'range');
  const [from, to, step] = parts.map(Number);
  for (const v of [from, to]) if (Math.abs(v) > 180) throw new UsageError(`--range "${text}": drive values must be within −180 … 180 degrees`);
  if (!(step > 0)) throw new UsageError(`--range "${text}": the step must be a positive number of degrees`);
  const degrees = sampleDegrees(from, to, step, pattern.creases.length, '--range');
  return { drive, values: degrees.map((d) => d * RAD), degrees };
}

export const gridCommand: Command = {
  name: 'grid',
  summary: 'every hinge angle over a grid of two drives',
  help: `Usage: hingeplan grid <file> --range <crease>=<from>:<to>:<step> --range <crease>=<from>:<to>:<step>
                      [--hold <crease>=<deg> …] [--branch <id> | --solution <k>] [--format csv|json] [--pretty]
                      [--digits <n>] [--out <file>]

For a pattern with two degrees of freedom (or more, with holds): every hinge angle at every node of a grid over
two drives (degrees). The first --range is x, the second y. The first column (x at its first value) is a path in
y; every row is then a path in x from that column, so neighbouring nodes lie on one continuous sheet of
solutions; a row that starts at the flat state takes the ray that continues the row before it. Every node is
an exact solve; nodes the paths do not reach are flagged with the reason.

  --range <crease>=<from>:<to>:<step>   a drive and its values (given twice: x, then y).
  --hold, --branch, --solution, --progress   as for \`hingeplan sweep\` (the branch or solution is the start of
                         the first column).
  --format csv|json      csv (default): metadata header (as \`hingeplan table\`; "# x:" and "# y:" name the two
                         drives), then one row per node: x, y, every hinge angle by label, max_residual, flag
                         (no column name repeats); json (format 2): header members, "columns", "nodes": [{"x",
                         "y", "angles": [..], "maxResidual"} or {"x", "y", "unreachable"}], "status",
                         "nodeCount", "unreachableNodes", "largestResidual", "messages".
${OUTPUT_OPTIONS_HELP}
${OUT_HELP}
A grid may hold at most 20 million hinge values (nodes × (creases + 32)); larger grids are refused first.
Exit status: 0 every node solved; 3 some nodes flagged; 2 invalid input; 130 stopped by Ctrl-C.`,
  async run(argv, io) {
    const spec: OptionSpec = {
      range: { type: 'string', multiple: true }, hold: { type: 'string', multiple: true }, branch: { type: 'string' },
      solution: { type: 'string' }, format: { type: 'string' }, out: { type: 'string' }, progress: { type: 'boolean' }, ...outputOptions,
    };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const format = formatOption(values.format, ['csv', 'json'], 'csv') as 'csv' | 'json';
    if (values.pretty && format !== 'json') throw new UsageError('--pretty is for --format json');
    const digits = digitsOption(values.digits);
    const ranges = (values.range as string[] | undefined) ?? [];
    if (ranges.length !== 2) throw new UsageError(`give --range exactly twice (x and y), got ${ranges.length}`);
    const file = positionals[0];
    const loaded = await loadFile(io, file, 'grid');
    if (!loaded) return EXIT.usage;
    const { pattern } = loaded;
    const x = parseRange(pattern, ranges[0]);
    const y = parseRange(pattern, ranges[1]);
    if (x.drive === y.drive) throw new UsageError('the two --range options must name different creases');
    const nodes = x.values.length * y.values.length;
    if (tableWork(nodes, pattern.creases.length) > MAX_TABLE_VALUES) {
      throw new UsageError(`--range: ${x.values.length} × ${y.values.length} = ${nodes} grid nodes × ${pattern.creases.length} creases is more than the ${MAX_TABLE_VALUES} hinge values a table takes (nodes × (creases + 32)); use coarser steps or shorter ranges`);
    }
    const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
    if (!holds) return EXIT.usage;
    if (holds.some((h) => h.crease === x.drive || h.crease === y.drive)) throw new UsageError('--hold: a grid drive cannot also be held');
    const out = openOutput(io, 'grid', values.out as string | undefined, [file], 'escaped');
    if (!out) return EXIT.usage;
    let r;
    try {
      r = await runResponsive(io, 'grid', (hooks) => gridSteps(pattern, {
        x, y, holds, branch: intOrUndefined(values.branch, 'branch'), solution: intOrUndefined(values.solution, 'solution'),
      }, hooks), !!values.progress);
    } catch (e) {
      out.abort();
      throw e;
    }
    const { result, interrupted } = r;
    const refusal = result.status === 'failed' ? result.messages.find((m) => REQUEST_CODES.has(m.code)) : undefined;
    if (refusal) { out.abort(); throw requestError(refusal); }
    printSolverMessages(io, result.messages, 'grid');
    writeGridTable(pattern, result, tableHeader(loaded, file!, 'grid', argv), { x: x.drive, y: y.drive, xDegrees: new Map(x.values.map((v, i) => [v, x.degrees[i]])), yDegrees: new Map(y.values.map((v, i) => [v, y.degrees[i]])) }, holds, { format, digits, pretty: !!values.pretty }, out);
    if (!out.finish(out.toFile ? `${nodes} nodes` : undefined)) return EXIT.usage;
    if (interrupted || result.status === 'stopped') { io.stderr('hingeplan grid: stopped by Ctrl-C; the nodes computed so far are written, the rest are flagged.\n'); return EXIT_INTERRUPTED; }
    return result.status === 'complete' ? EXIT.ok : EXIT.noSolution;
  },
};
