// `hingeplan tolerance`: how far each hinge lands from nominal on manufactured sheets, the misfit they must
// absorb along the path, and which vertices drive it. The nominal path is computed here; the sheets on worker
// threads (cli/tolerance-threads.ts).
import type { Command } from '../command';
import type { Io } from '../io';
import { numberOption, parseCommandArgs, UsageError, type OptionSpec, type OptionValues } from '../args';
import type { Loaded } from '../load';
import { EXIT } from '../exit-codes';
import { textTable } from '../table-text';
import {
  checkToleranceOptions, checkToleranceSize, nominalSteps, toleranceResult, type ToleranceOptions, type ToleranceResult,
} from '../../solver/outputs/tolerance/run';
import { SheetSolver } from '../../solver/outputs/tolerance/sheet';
import { linearMisfit, toleranceTable, worstVertices } from '../../solver/outputs/tolerance/table';
import { CAUTIONS } from '../../solver/formats/cautions';
import type { SweepOptions } from '../../solver/paths/sweep';
import {
  driveSetup, EXIT_INTERRUPTED, intOrUndefined, joinNegativeNumbers, methodOption, pathOptions, printSolverMessages,
  rangeOptions, runResponsive, startOption, tableHeader,
} from './path-common';
import { writeWhole } from '../output';
import { patternFileText } from '../../solver/formats/project';
import type { TableInput } from '../../solver/outputs/table';
import { defaultWorkers, runPool } from '../tolerance-threads';

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;
const DEFAULT_SAMPLES = 1000;
const DEFAULT_SEED = 1;

const spec: OptionSpec = {
  ...pathOptions,
  at: { type: 'string' },
  'position-tol': { type: 'string' },
  'sector-tol': { type: 'string' },
  samples: { type: 'string' },
  seed: { type: 'string' },
  workers: { type: 'string' },
  'no-linear': { type: 'boolean' },
  json: { type: 'boolean' },
  csv: { type: 'boolean' },
};

async function options(io: Io, values: OptionValues, positionals: string[]): Promise<{ loaded: Loaded; file: string; options: ToleranceOptions; inputs: TableInput[] } | undefined> {
  const base = await driveSetup(io, 'tolerance', values, positionals);
  if (!base) return undefined;
  const { loaded, file, drive, holds } = base;
  const { pattern } = loaded;
  let path: Pick<SweepOptions, 'from' | 'to' | 'samples'>;
  if (values.at !== undefined) {
    if (values.from !== undefined || values.to !== undefined || values.step !== undefined) throw new UsageError('give either --at or --from/--to/--step, not both');
    const at = numberOption(values.at as string, 'at');
    if (Math.abs(at) > 180) throw new UsageError(`--at must be within −180 … 180 degrees, got ${at}`);
    path = { from: at * RAD, to: at * RAD, samples: [at * RAD] };
  } else {
    if (values.from === undefined || values.to === undefined) throw new UsageError('give the drive value with --at <deg>, or a range with --from <deg> --to <deg> [--step <deg>]');
    path = rangeOptions(values, pattern.creases.length);
  }
  const position = values['position-tol'] === undefined ? undefined : numberOption(values['position-tol'] as string, 'position-tol');
  const sector = values['sector-tol'] === undefined ? undefined : numberOption(values['sector-tol'] as string, 'sector-tol');
  if (position === undefined && sector === undefined) throw new UsageError('give the tolerance: --position-tol <length> (diameter of the zone around each vertex, in the file\'s units) and/or --sector-tol <deg>');
  if (position !== undefined && !(position >= 0)) throw new UsageError(`--position-tol must be a length ≥ 0, got ${position}`);
  if (sector !== undefined && !(sector >= 0)) throw new UsageError(`--sector-tol must be an angle ≥ 0 degrees, got ${sector}`);
  const start = startOption(io, pattern, values.start as string | undefined);
  if (start === null) return undefined;
  const samples = intOrUndefined(values.samples, 'samples') ?? DEFAULT_SAMPLES;
  const seed = intOrUndefined(values.seed, 'seed', 0) ?? DEFAULT_SEED;
  const o: ToleranceOptions = {
    path: {
      drive, ...path, holds,
      branch: intOrUndefined(values.branch, 'branch'),
      solution: intOrUndefined(values.solution, 'solution'),
      ...(start ? { start: start.angles } : {}),
      method: methodOption(values.method),
      conditionEvery: 0,
    },
    tolerance: { ...(position !== undefined ? { position } : {}), ...(sector !== undefined ? { sector: sector * RAD } : {}) },
    samples,
    seed,
    linear: !values['no-linear'],
  };
  const refused = checkToleranceOptions(o);
  if (refused) throw new UsageError(refused.replace(/^The number of samples/, '--samples: the number').replace(/^The seed/, '--seed: the seed'));
  return { loaded, file, options: o, inputs: start ? [start.input] : [] };
}

function fmt(x: number, digits = 4): string {
  return Number.isFinite(x) ? x.toPrecision(digits) : '-';
}

function humanText(r: ToleranceResult, loaded: Loaded, units: string): string {
  const { pattern } = loaded;
  const st = r.statistics;
  const label = (c: number) => pattern.creases[c].label;
  const out: string[] = [];
  const tol = [r.tolerance.position ? `position zone ⌀${r.tolerance.position} ${units}` : '', r.tolerance.sector ? `sector angles ±${+(r.tolerance.sector * DEG).toPrecision(12)}°` : ''].filter(Boolean).join(', ');
  out.push(`${pattern.name}: ${label(r.drive)} on ${r.nominalPath?.branch ? `branch ${r.nominalPath.branch.id ?? ''} ${r.nominalPath.branch.name}`.replace('  ', ' ') : 'the nominal path'}; ${st?.samples ?? 0} of ${r.requested} sheets (seed ${r.seed}), ${tol} (${r.status})`);
  if (!st) { out.push(CAUTIONS); return out.join('\n') + '\n'; }
  const rows = r.at.map((a, j) => {
    // the hinge that spreads most at this drive value
    let worst = -1, w = -1;
    st.hinges[j].forEach((h, k) => { const s = Math.max(Math.abs(h.deviation.p05), Math.abs(h.deviation.p95)); if (s > w) { w = s; worst = k; } });
    const lin = worst >= 0 ? r.linear?.hingeStd[j]?.[worst] : undefined;
    return [
      (a * DEG).toFixed(4),
      fmt(st.misfit[j].p50, 3), fmt(st.misfit[j].p95, 3), fmt(st.misfit[j].max, 3),
      fmt(st.gap[j].p95, 3),
      fmt(st.rigidFraction[j], 3),
      worst >= 0 ? label(r.hinges[worst]) : '-',
      worst >= 0 ? fmt(st.hinges[j][worst].deviation.std * DEG, 3) : '-',
      lin !== undefined ? fmt(lin * DEG, 3) : '-',
      worst >= 0 ? `${fmt(st.hinges[j][worst].deviation.p05 * DEG, 3)} … ${fmt(st.hinges[j][worst].deviation.p95 * DEG, 3)}` : '-',
      String(st.lost[j]),
    ];
  });
  out.push('');
  out.push(textTable(['drive', 'misfit p50', 'p95', 'max (rad)', `gap p95 (${units})`, 'rigid', 'widest hinge', 'std (deg)', 'linear std', 'p05 … p95 of deviation (deg)', 'lost'], rows).trimEnd());
  const worst = worstVertices(r, 5);
  if (worst.length) {
    out.push('');
    out.push(`vertices contributing most to the misfit: ${worst.map((v) => `${v.vertex} at (${pattern.vertices[v.vertex].map((x) => +x.toFixed(3)).join(', ')}) ${(100 * v.share).toFixed(1)}%`).join('; ')}`);
  }
  const lm = r.at.map((_, j) => linearMisfit(r, j)).filter((x) => x);
  if (lm.some((m) => m!.rms > 1e-12)) out.push(`first-order misfit (rms at the worst vertex): ${lm.map((m) => fmt(m!.rms, 3)).join(', ')} rad`);
  out.push('(every hinge, percentile and drive value: use --json or --csv)');
  out.push(CAUTIONS);
  return out.join('\n') + '\n';
}

export const toleranceCommand: Command = {
  name: 'tolerance',
  summary: 'will the manufactured sheet still fold? hinge spread, misfit and worst vertices over random sheets',
  help: `Usage: hingeplan tolerance <file> --drive <crease> (--at <deg> | --from <deg> --to <deg> [--step <deg>])
                           (--position-tol <length> | --sector-tol <deg> | both) [--samples <n>] [--seed <s>]
                           [--hold <crease>=<deg> …] [--branch <id> | --solution <k> | --start <file>]
                           [--workers <n>] [--no-linear] [--json | --csv] [--out <file>]

Draws manufactured sheets at random and follows each along the nominal path (the path \`hingeplan sweep\`
follows with the same options, on the same branch): at every drive value each sheet starts from the nominal
state plus its own deviation so far (never a jump to another branch), and is solved exactly where the perturbed
sheet still closes, else takes the least-squares compromise (the state of least Σ|r|² over the vertices'
closure residuals r). Reports, per hinge and drive value, the mean, standard deviation and 5th/50th/95th
percentiles of the angle and of its deviation from nominal; the misfit (the largest vertex closure residual,
radians) and the equivalent gap at panel edges (residual × the distance from the vertex to the farthest corner
of its panels, in the file's units) as percentiles; the fraction of sheets that still fold rigidly (largest
residual ≤ 1e-10 rad); the vertices contributing most to the misfit (their share of Σ|r|², averaged); and
first-order estimates from the sensitivities beside the Monte Carlo figures.

  --at <deg>                   one drive value; or --from, --to, --step (default 1) for a path.
  --position-tol <length>      every vertex lies uniformly in a circle of this diameter around its drawn
                               point (file units), every vertex independent (the positional tolerance zone).
  --sector-tol <deg>           every sector angle (a panel corner at a vertex) lies uniformly within ±deg of
                               drawn, every corner independent; a vertex whose corners no longer add up to
                               360° cannot lie flat. With both options, positions and then sectors move.
  --samples <n>                sheets (default ${DEFAULT_SAMPLES}); --seed <s> (default ${DEFAULT_SEED}, 0 … 4294967295).
                               Sheet k is the same whatever the number of workers: the result is reproducible
                               from the seed, and a run of n sheets is the first n of any longer run.
  --workers <n>                worker threads (default: one per core).
  --no-linear                  leave out the first-order estimates.
  --hold, --branch, --solution, --start, --method, --progress   as for \`hingeplan sweep\`.
  --json                       JSON: {"samples", "requested", "seed", "drive", "at": [<deg>…], "hinges":
                               {"<crease>": [{"nominal", "mean", "std", "p05", "p50", "p95", "deviation":
                               {"mean", "std", "p05", "p50", "p95", "max"}}…]}, "misfit": [{"mean", "p05",
                               "p50", "p95", "max"}…], "gap": […], "rigidFraction": […], "rigidAlongPath",
                               "lost": […], "worstVertices": [{"vertex", "at", "share", "shareByDrive"}],
                               "linear": {"hinges": {"<crease>": [{"std", "p05", "p95"}|null…]}, "misfit":
                               [{"rms"}|null…], "gap": […], "worstVertices": […]}, "singular": [<deg>…],
                               "cautions", and the header fields}; arrays run over the drive values.
  --csv                        the same as rows "drive,quantity,item,nominal,mean,std,p05,p50,p95,max,linear"
                               (quantity: angle, deviation, misfit, gap, rigid-fraction, lost, share) after a
                               "# key: value" header (as \`hingeplan table\`, plus the tolerance, model and seed).
  --out <file>                 write to a file (atomically). Ctrl-C stops and writes the sheets done so far (the
                               result of that many samples, with its sample count; exit status 130).
Progress goes to stderr. Exit status: 0 done; 3 the nominal path ended early or could not start; 2 invalid
input; 130 stopped by Ctrl-C.`,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    if (values.json && values.csv) throw new UsageError('choose one of --json and --csv');
    const workers = intOrUndefined(values.workers, 'workers') ?? defaultWorkers();
    const setup = await options(io, values, positionals);
    if (!setup) return EXIT.usage;
    const { loaded, file, options: o, inputs } = setup;
    const { pattern } = loaded;
    const units = loaded.project.units || 'file units';
    const header = tableHeader(loaded, file, 'tolerance', argv, inputs);
    const write = (r: ToleranceResult) => {
      const text = values.json ? toleranceTable(pattern, r, header, { format: 'json', units })
        : values.csv ? toleranceTable(pattern, r, header, { format: 'csv', units })
          : humanText(r, loaded, units);
      return writeWhole(io, 'tolerance', text, values.out as string | undefined, [file, ...inputs.map((i) => i.file)], values.json ? 'json' : values.csv ? 'file' : 'text');
    };

    const nominal = await runResponsive(io, 'tolerance', (hooks) => nominalSteps(pattern, o, hooks), !!values.progress);
    printSolverMessages(io, nominal.result.sweep.messages, 'tolerance');
    if (!nominal.result.setup) {
      const r = toleranceResult(o, { sweep: nominal.result.sweep, sheets: [], stopped: nominal.interrupted });
      if (!write(r)) return EXIT.usage;
      if (nominal.interrupted) return EXIT_INTERRUPTED;
      io.stderr(`hingeplan tolerance: the nominal path could not start, so no sheet can follow it\n`);
      return nominal.result.sweep.messages.some((m) => m.code === 'invalid-sweep') ? EXIT.usage : EXIT.noSolution;
    }
    const solver = new SheetSolver(pattern, nominal.result.setup);
    const big = checkToleranceSize(solver, o);
    if (big) throw new UsageError(big);
    void solver.reference;

    // the sheets on worker threads, with progress and Ctrl-C
    let interrupted = nominal.interrupted;
    const draw = !!values.progress || io.stderrIsTTY;
    const started = Date.now();
    let lastDraw = 0;
    const progress = (done: number) => {
      if (!draw) return;
      const now = Date.now();
      if (now - lastDraw < 200 && done < o.samples) return;
      lastDraw = now;
      const line = `hingeplan tolerance: ${done}/${o.samples} sheets (${Math.floor((100 * done) / o.samples)}%) ${((now - started) / 1000).toFixed(1)} s`;
      (io.progress ?? io.stderr)(io.stderrIsTTY ? `\r${line}\x1b[K` : `${line}\n`);
    };
    let run: Awaited<ReturnType<typeof runPool>['done']> = { sheets: [], stopped: true };
    if (!interrupted) {
      const pool = runPool({ text: patternFileText(loaded.bytes, file).text ?? '', name: file, setup: nominal.result.setup }, o.samples, workers, o.linear !== false, progress);
      const remove = io.onInterrupt(() => { interrupted = true; pool.stop(); });
      try { run = await pool.done; } finally { remove(); }
      if (draw && io.stderrIsTTY) io.stderr('\n');
      if (run.error) {
        io.stderr(`hingeplan tolerance: internal error in a worker thread: ${run.error}\n`);
        return EXIT.internal;
      }
    }
    const result = toleranceResult(o, { sweep: nominal.result.sweep, solver, sheets: run.sheets, linear: run.linear, stopped: interrupted });
    for (const m of result.messages.slice(nominal.result.sweep.messages.length)) {
      if (m.severity !== 'info') io.stderr(`hingeplan tolerance: ${m.severity}[${m.code}]: ${m.text}\n`);
    }
    if (!write(result)) return EXIT.usage;
    if (interrupted) {
      io.stderr(`hingeplan tolerance: stopped by Ctrl-C after ${result.statistics?.samples ?? 0} of ${o.samples} sheets; the output holds those sheets.\n`);
      return EXIT_INTERRUPTED;
    }
    return result.status === 'partial' ? EXIT.noSolution : EXIT.ok;
  },
};
