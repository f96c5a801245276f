// Tolerance analysis of the manufactured sheet: the nominal path (a sweep, with its branch choice), then
// sheets drawn at random from the tolerance model and each followed along that path (sheet.ts), their
// statistics (stats.ts) and the first-order estimates (linear.ts). The pieces are exported so that a caller
// can spread the sheets over threads: every sheet depends only on the seed and its index, and statistics
// are taken over the first n sheets in index order, so the result does not depend on how the work was split.

import type { Drive, Message, Pattern } from '../../types';
import { createSweep, type SweepOptions, type SweepResult, type SweepHooks } from '../../paths/sweep';
import { SheetSolver, type SheetResult, type ToleranceSetup } from './sheet';
import { sheetStatistics, type ToleranceStatistics } from './stats';
import { linearSteps, type LinearEstimate } from './linear';
import { STREAM_PERIOD, type ToleranceSpec } from './perturbation';

const DEG = 180 / Math.PI;
/** More sheets than this are refused (the statistics keep every sheet's angles in memory). */
export const MAX_TOLERANCE_SAMPLES = 1_000_000;
/**
 * Kept values (sheets × drive values × (hinges + vertices): every sheet's angles and vertex shares) above this
 * many are refused: 8 bytes each, 2 GiB.
 */
export const MAX_KEPT_VALUES = 256 * 1024 * 1024;

export interface ToleranceOptions {
  /** the nominal path as for sweep: drive, the drive values (samples, from, to), holds, branch, solution, start, method */
  path: SweepOptions;
  tolerance: ToleranceSpec;
  /** number of sheets */
  samples: number;
  /** seed of the random stream (an unsigned 32-bit integer) */
  seed: number;
  /** the first-order estimates beside the Monte Carlo figures (default true) */
  linear?: boolean;
}

export type ToleranceStatus = 'complete' | 'stopped' | 'partial' | 'failed';

export interface ToleranceResult {
  /** complete; stopped (interrupted: the statistics hold the sheets done); partial (the nominal path ended early); failed */
  status: ToleranceStatus;
  requested: number;
  seed: number;
  tolerance: ToleranceSpec;
  /** the perturbation model in words */
  model: string;
  drive: number;
  holds: Drive[];
  /** drive values analysed (radians): those the nominal path reached */
  at: number[];
  /** the free creases reported, crease indices */
  hinges: number[];
  /** pattern vertex of each closure block (the vertex order of shares) */
  blockVertex: number[];
  /** each block's reach (file units): a residual of r radians there counts as a gap of r × reach */
  reach: number[];
  nominalPath?: SweepResult;
  statistics?: ToleranceStatistics;
  linear?: LinearEstimate;
  /** drive values where the nominal state is singular (the first-order estimate is not defined there) */
  singular: boolean[];
  effort: { iterations: number; factorizations: number; fallbacks: number };
  messages: Message[];
}

/** A refusal of the options, or undefined. */
export function checkToleranceOptions(options: ToleranceOptions): string | undefined {
  const { samples, seed, tolerance } = options;
  if (!Number.isInteger(samples) || samples < 1 || samples > MAX_TOLERANCE_SAMPLES) return `The number of samples must be a whole number from 1 to ${MAX_TOLERANCE_SAMPLES}, not ${samples}.`;
  if (!Number.isInteger(seed) || seed < 0 || seed >= 2 ** 32) return `The seed must be a whole number from 0 to ${2 ** 32 - 1}, not ${seed}.`;
  const pos = tolerance.position ?? 0;
  const sec = tolerance.sector ?? 0;
  if (!Number.isFinite(pos) || pos < 0) return `The position tolerance must be a length ≥ 0, not ${pos}.`;
  if (!Number.isFinite(sec) || sec < 0) return `The sector tolerance must be an angle ≥ 0, not ${sec * DEG}°.`;
  if (sec >= Math.PI / 4) return `A sector tolerance of ±${sec * DEG}° is not a manufacturing tolerance (the limit is ±45°).`;
  return undefined;
}

/** The nominal path as resumable steps; its result becomes the setup the sheets follow. */
export function* nominalSteps(pattern: Pattern, options: ToleranceOptions, hooks: SweepHooks = {}): Generator<void, { sweep: SweepResult; setup?: ToleranceSetup }> {
  const run = createSweep(pattern, options.path);
  while (!run.finished) {
    if (hooks.shouldStop?.()) { run.stop(); break; }
    run.advance();
    yield;
  }
  const sweep = run.result();
  if (sweep.samples.length === 0) return { sweep };
  const setup: ToleranceSetup = {
    drive: options.path.drive,
    holds: options.path.holds ?? [],
    at: sweep.samples.map((s) => s.drive),
    nominal: sweep.samples.map((s) => s.angles),
    tolerance: options.tolerance,
    seed: options.seed,
  };
  return { sweep, setup };
}

/** Refusals that depend on the sheet: the random stream's period and the memory the statistics keep. */
export function checkToleranceSize(solver: SheetSolver, options: ToleranceOptions): string | undefined {
  if (options.samples * solver.model.draws >= STREAM_PERIOD) {
    return `${options.samples} sheets of ${solver.model.draws} random numbers each exceed the random stream's period (2³²); ask for fewer samples.`;
  }
  const perDrive = solver.hinges.length + solver.nominalSys.blockCount;
  const kept = options.samples * solver.setup.at.length * Math.max(1, perDrive);
  if (kept > MAX_KEPT_VALUES) {
    return `${options.samples} sheets × ${solver.setup.at.length} drive values × (${solver.hinges.length} hinges + ${solver.nominalSys.blockCount} vertices) is more values than the statistics keep (${MAX_KEPT_VALUES}, 8 bytes each); ask for fewer samples or drive values.`;
  }
  return undefined;
}

/** Assemble the result from the pieces (pure; the caller decides where each piece was computed). */
export function toleranceResult(
  options: ToleranceOptions,
  parts: {
    sweep?: SweepResult;
    solver?: SheetSolver;
    sheets: SheetResult[];
    linear?: LinearEstimate;
    stopped: boolean;
    messages?: Message[];
  },
): ToleranceResult {
  const { sweep, solver, sheets, linear, stopped } = parts;
  const messages: Message[] = [...(sweep?.messages ?? []), ...(parts.messages ?? [])];
  const base: ToleranceResult = {
    status: 'failed',
    requested: options.samples,
    seed: options.seed,
    tolerance: options.tolerance,
    model: solver?.model.description ?? '',
    drive: options.path.drive,
    holds: options.path.holds ?? [],
    at: solver?.setup.at ?? [],
    hinges: solver ? Array.from(solver.hinges) : [],
    blockVertex: solver ? Array.from(solver.nominalSys.blockVertex) : [],
    reach: solver ? Array.from(solver.reach) : [],
    nominalPath: sweep,
    singular: linear?.singular.slice() ?? [],
    effort: { iterations: 0, factorizations: 0, fallbacks: 0 },
    messages,
  };
  if (!solver) {
    if (stopped) { base.status = 'stopped'; messages.push({ severity: 'info', code: 'stopped', text: 'Stopped before the nominal path was computed: no sheet was followed.' }); }
    return base;
  }
  const ordered = [...sheets].sort((a, b) => a.index - b.index);
  // the longest run of sheets 0, 1, 2, … done: the same statistics as a run asked for that many sheets
  let prefix = 0;
  while (prefix < ordered.length && ordered[prefix].index === prefix) prefix++;
  const used = ordered.slice(0, prefix);
  const reference = solver.reference;
  base.statistics = sheetStatistics(reference, used, solver.hinges.length, solver.nominalSys.blockCount, solver.setup.at.length);
  base.linear = linear;
  for (const s of used) { base.effort.iterations += s.iterations; base.effort.factorizations += s.factorizations; base.effort.fallbacks += s.fallbacks; }
  const pathEnded = sweep && sweep.status !== 'complete' && sweep.status !== 'stopped';
  base.status = stopped || used.length < options.samples ? 'stopped' : pathEnded ? 'partial' : 'complete';
  if (base.status === 'stopped') {
    messages.push({ severity: 'warning', code: 'stopped', text: `Stopped after ${used.length} of ${options.samples} sheets: the statistics are those of sheets 1 … ${used.length} (the same as a run asked for ${used.length} samples).` });
  }
  if (pathEnded) {
    messages.push({ severity: 'warning', code: 'path-ended', text: `The nominal path reached ${solver.setup.at.length} of ${sweep!.requested} drive values (${sweep!.status}); the sheets were followed there.` });
  }
  const singular = solver.setup.at.filter((_, j) => base.singular[j]);
  if (singular.length) {
    messages.push({
      severity: 'info', code: 'singular-nominal',
      text: `The nominal state is singular at ${singular.map((a) => `${+(a * DEG).toPrecision(12)}°`).join(', ')} (the Jacobian of the free creases loses rank, e.g. the flat state): the first-order estimate is not defined there, and a sheet that does not close keeps the least-squares state nearest its start.`,
    });
  }
  const lost = base.statistics.lost;
  if (lost.some((x) => x > 0)) {
    const worst = Math.max(...lost);
    messages.push({
      severity: 'warning', code: 'sheets-lost',
      text: `At ${lost.filter((x) => x > 0).length} drive values some sheets did not settle or left the nominal branch (at most ${worst} of ${used.length}); they are left out of the statistics there (see "lost").`,
    });
  }
  return base;
}

/**
 * The whole analysis in one thread, as resumable steps (one per sheet): for callers that do not split the
 * work (tests, the app's solver worker). `hooks.shouldStop` keeps the sheets done so far.
 */
export function* toleranceSteps(pattern: Pattern, options: ToleranceOptions, hooks: SweepHooks = {}): Generator<void, ToleranceResult> {
  const refused = checkToleranceOptions(options);
  if (refused) return failed(options, 'invalid-tolerance', refused);
  const nominal = yield* nominalSteps(pattern, options, hooks);
  if (!nominal.setup) {
    const r = toleranceResult(options, { sweep: nominal.sweep, sheets: [], stopped: !!hooks.shouldStop?.() });
    if (r.status !== 'stopped') r.messages.push({ severity: 'error', code: 'no-nominal-path', text: 'The nominal path could not start, so no sheet can follow it.' });
    return r;
  }
  return yield* sheetSteps(pattern, options, nominal.sweep, nominal.setup, hooks);
}

/**
 * The setup for sheets along a path already computed (the path on screen in the app): its samples at the
 * given indices (default all), in path order. `options.path` then only names the drive and the holds.
 */
export function setupFromPath(sweep: SweepResult, options: ToleranceOptions, indices?: number[]): ToleranceSetup | undefined {
  const chosen = (indices ?? sweep.samples.map((_, i) => i)).filter((i) => i >= 0 && i < sweep.samples.length);
  if (!chosen.length) return undefined;
  return {
    drive: sweep.drive,
    holds: options.path.holds ?? [],
    at: chosen.map((i) => sweep.samples[i].drive),
    nominal: chosen.map((i) => sweep.samples[i].angles),
    tolerance: options.tolerance,
    seed: options.seed,
  };
}

/** The sheets of a run along a given nominal path (see toleranceSteps), one resumable step per sheet. */
export function* sheetSteps(pattern: Pattern, options: ToleranceOptions, sweep: SweepResult, setup: ToleranceSetup, hooks: SweepHooks = {}): Generator<void, ToleranceResult> {
  const refused = checkToleranceOptions(options);
  if (refused) return failed(options, 'invalid-tolerance', refused, sweep);
  const solver = new SheetSolver(pattern, setup);
  const big = checkToleranceSize(solver, options);
  if (big) return failed(options, 'too-large', big, sweep);
  const sheets: SheetResult[] = [];
  let stopped = false;
  for (let i = 0; i < options.samples; i++) {
    if (hooks.shouldStop?.()) { stopped = true; break; }
    sheets.push(solver.sheet(i));
    hooks.onProgress?.(i + 1, options.samples);
    yield;
  }
  let linear: LinearEstimate | undefined;
  if (!stopped && options.linear !== false) linear = yield* linearSteps(solver);
  return toleranceResult(options, { sweep, solver, sheets, linear, stopped });
}

function failed(options: ToleranceOptions, code: string, text: string, sweep?: SweepResult): ToleranceResult {
  return {
    status: 'failed', requested: options.samples, seed: options.seed, tolerance: options.tolerance, model: '', drive: options.path.drive,
    holds: options.path.holds ?? [], at: [], hinges: [], blockVertex: [], reach: [], nominalPath: sweep, singular: [], effort: { iterations: 0, factorizations: 0, fallbacks: 0 },
    messages: [...(sweep?.messages ?? []), { severity: 'error', code, text }],
  };
}
