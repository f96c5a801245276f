// Speed figures for the README (a benchmark, not a timed test): for Miura-ori sheets of 10 × 10, 20 × 20 and
// 40 × 40 cells and a triangulated sheet of about 1,000 creases, the time for one solve, the time for a full
// path from 1° to 179° at 1° samples (every sample exact, with residual, every hinge rate and the condition
// number at the default spacing), and the peak memory. Each case runs in a child process of its own, so the
// peak resident memory reported is that case's.
//
//   npm run bench                 every case
//   npm run bench -- miura10 tri  some cases
//   npm run bench -- --all-conditions   also a path with the condition number at every sample
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { miura } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { sweep } from '../solver/paths/sweep';
import { buildClosureSystem } from '../solver/closure/blocks';
import { planPropagation, propagate, propagationWork } from '../solver/paths/propagate';
import { ClosureProblem } from '../solver/closure/newton';
import { solveDrives } from '../solver/search/solve';
import type { Assignment, Pattern, PatternSource } from '../solver/types';

const D = Math.PI / 180;

interface Case { name: string; title: string; make: () => { pattern: Pattern; drive: number; sign: number } }

function miuraCase(n: number): Case {
  return {
    name: `miura${n}`,
    title: `Miura-ori ${n} × ${n} cells`,
    make: () => {
      const g = miura({ rows: n, cols: n, a: 40, b: 30, alphaDeg: 70 });
      const pattern = buildPattern(g.project!.source).pattern!;
      return { pattern, drive: pattern.labelIndex.get(g.project!.drives[0].crease)!, sign: Math.sign(g.project!.drives[0].angleDeg) };
    },
  };
}

/** A Miura sheet with every parallelogram split along one diagonal (a free hinge, unassigned): degree-6 vertices. */
function triangulatedCase(): Case {
  return {
    name: 'tri',
    title: 'triangulated Miura 9 × 9 (diagonals free)',
    make: () => {
      const rows = 9, cols = 9;
      const g = miura({ rows, cols, a: 40, b: 30, alphaDeg: 70 });
      const src = g.project!.source as PatternSource;
      const ni = 2 * cols;
      const vid = (i: number, j: number) => j * (ni + 1) + i;
      const edges = [...src.edges];
      const labels = [...src.labels];
      const assignments: Assignment[] = [...src.assignments];
      for (let j = 0; j < 2 * rows; j++) for (let i = 0; i < ni; i++) {
        // the diagonal inside parallelogram (i, j): from (i, j) to (i + 1, j + 1) on even rows, (i + 1, j) to (i, j + 1) on odd
        edges.push(j % 2 === 0 ? [vid(i, j), vid(i + 1, j + 1)] : [vid(i + 1, j), vid(i, j + 1)]);
        labels.push(`d${i}_${j}`);
        assignments.push('U');
      }
      const { pattern, messages } = buildPattern({ ...src, name: 'triangulated Miura', edges, labels, assignments, limits: edges.map(() => undefined), faces: undefined });
      if (!pattern) throw new Error(messages.map((m) => m.text).join('; '));
      return { pattern, drive: pattern.labelIndex.get(g.project!.drives[0].crease)!, sign: Math.sign(g.project!.drives[0].angleDeg) };
    },
  };
}

const cases: Case[] = [miuraCase(10), miuraCase(20), miuraCase(40), triangulatedCase()];

function time<T>(f: () => T): { ms: number; value: T } {
  const t0 = performance.now();
  const value = f();
  return { ms: performance.now() - t0, value };
}

/** One solve from nothing: the state at 60° of the drive, found from the flat state's first-order guess. */
function oneSolve(pattern: Pattern, drive: number, sign: number): { ms: number; residual: number; how: string } {
  const sys = buildClosureSystem(pattern);
  const { plan } = planPropagation(pattern, sys, drive);
  const target = sign * 60 * D;
  if (plan) {
    const signs = new Float64Array(pattern.creases.length).map((_, c) => (pattern.creases[c].assignment === 'V' ? 1 : pattern.creases[c].assignment === 'M' ? -1 : 0));
    const work = propagationWork(sys, pattern.creases.length);
    // one propagation at 60°, each vertex taking the root whose signs follow the assignment
    const x = new Float64Array(pattern.creases.length);
    x[drive] = target;
    const r = time(() => propagate(sys, plan, x, { kind: 'assignment', signs, reference: new Float64Array(pattern.creases.length) }, work).maxResidual);
    return { ms: r.ms, residual: r.value, how: 'vertex-by-vertex propagation' };
  }
  const problem = new ClosureProblem(pattern, (c) => c === drive, sys);
  const guess = new Float64Array(pattern.creases.length);
  for (const c of pattern.creases) guess[c.index] = c.assignment === 'V' ? 60 * D : c.assignment === 'M' ? -60 * D : 0;
  guess[drive] = target;
  // warm the factor's ordering (built once per pattern), then time the solve itself
  problem.normalMatrix();
  const r = time(() => problem.solve(guess, { maxStep: 0.3, maxIterations: 80 }));
  return { ms: r.ms, residual: r.value.maxResidual, how: `sparse Newton/LM, ${r.value.iterations} iterations` };
}

function runCase(name: string, allConditions: boolean): void {
  const c = cases.find((x) => x.name === name)!;
  const { pattern, drive, sign } = c.make();
  const free = pattern.creases.filter((x) => x.assignment !== 'B' && x.assignment !== 'F').length;
  const solve = oneSolve(pattern, drive, sign);
  // first run in a fresh process (compilation included), then the same path again
  const path = time(() => sweep(pattern, { drive, from: sign * 1 * D, to: sign * 179 * D, step: 1 * D }));
  const warm = time(() => sweep(pattern, { drive, from: sign * 1 * D, to: sign * 179 * D, step: 1 * D }));
  const r = path.value;
  const worst = r.samples.reduce((m, s) => Math.max(m, s.maxResidual), 0);
  const conds = r.samples.filter((s) => !Number.isNaN(s.condition)).length;
  const out: Record<string, unknown> = {
    name: c.title,
    creases: pattern.creases.length,
    free,
    oneSolveMs: +solve.ms.toFixed(1),
    oneSolveHow: solve.how,
    oneSolveResidual: solve.residual,
    pathMs: +path.ms.toFixed(0),
    pathWarmMs: +warm.ms.toFixed(0),
    samples: r.samples.length,
    status: r.status,
    method: r.method,
    largestResidual: worst,
    conditionEvery: r.conditionEvery,
    conditionSamples: conds,
  };
  if (allConditions) {
    const all = time(() => sweep(pattern, { drive, from: sign * 1 * D, to: sign * 179 * D, step: 1 * D, conditionEvery: 1 }));
    out.pathAllConditionsMs = +all.ms.toFixed(0);
  }
  if (c.name === 'miura10' || c.name === 'tri') {
    // the full report of `hingeplan solve` (every solution, classification, sensitivities) for comparison
    const full = time(() => solveDrives(pattern, [{ crease: drive, value: sign * 60 * D }]));
    out.solveReportMs = +full.ms.toFixed(0);
    out.solveReportStatus = full.value.status;
  }
  out.peakRssMiB = +(process.resourceUsage().maxRSS / 1024).toFixed(0);
  process.stdout.write(JSON.stringify(out) + '\n');
}

const args = process.argv.slice(2);
const caseIndex = args.indexOf('--case');
if (caseIndex >= 0) {
  runCase(args[caseIndex + 1], args.includes('--all-conditions'));
} else {
  const wanted = args.filter((a) => !a.startsWith('--'));
  const chosen = wanted.length ? cases.filter((c) => wanted.includes(c.name)) : cases;
  const self = fileURLToPath(import.meta.url);
  const cpu = (await import('node:os')).cpus();
  process.stdout.write(`hingeplan bench: Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? 'cpu'}\n`);
  process.stdout.write('Times in ms; a path is 1° … 179° at 1° samples, each exact (residual ≤ 1e-10 rad) with every hinge rate.\n\n');
  const rows: Record<string, unknown>[] = [];
  for (const c of chosen) {
    const text = execFileSync(process.execPath, [...process.execArgv, self, '--case', c.name, ...(args.includes('--all-conditions') ? ['--all-conditions'] : [])], { encoding: 'utf8', maxBuffer: 1 << 24 });
    const row = JSON.parse(text.trim().split('\n').pop()!);
    rows.push(row);
    const extra = [
      row.pathAllConditionsMs !== undefined ? `path with condition at every sample ${row.pathAllConditionsMs} ms` : '',
      row.solveReportMs !== undefined ? `full solve report ${row.solveReportMs} ms (${row.solveReportStatus})` : '',
    ].filter(Boolean).join('; ');
    process.stdout.write(
      `${row.name}: ${row.creases} creases (${row.free} free)\n` +
      `  one solve        ${row.oneSolveMs} ms  (${row.oneSolveHow}; residual ${Number(row.oneSolveResidual).toExponential(1)} rad)\n` +
      `  full path        ${row.pathMs} ms first run, ${row.pathWarmMs} ms again  (${row.samples} samples, ${row.status}, ${row.method}; largest residual ${Number(row.largestResidual).toExponential(1)} rad; ${row.conditionEvery ? `condition every ${row.conditionEvery} → ${row.conditionSamples} samples` : 'condition not evaluated by default'})\n` +
      `  peak memory      ${row.peakRssMiB} MiB resident\n` +
      (extra ? `  also             ${extra}\n` : '') + '\n',
    );
  }
}
