// A grid over two drives: the first column is a path in the second drive with the first held, then every
// row is a path in the first drive with the second held, started from that column. Every node is an exact
// solve; nodes the paths cannot reach are flagged with the reason.

import type { Drive, Message, Pattern } from '../types';
import { runSteps, sweepSteps, type SweepHooks } from '../paths/sweep';
import { assignmentSigns } from '../search/states';

export interface GridAxis {
  drive: number;
  /** radians, monotonic */
  values: number[];
}

export interface GridOptions {
  x: GridAxis;
  y: GridAxis;
  holds?: Drive[];
  /** branch from flat for the first column (when it starts flat), or the start solution */
  branch?: number;
  solution?: number;
}

export interface GridNode {
  x: number;
  y: number;
  angles?: Float64Array;
  maxResidual?: number;
  /** d crease / d x and d crease / d y (deg/deg), when both paths through the node are known */
  ratesX?: Float64Array;
  ratesY?: Float64Array;
  unreachable?: string;
}

export interface GridResult {
  /** nodes[j][i] at (x.values[i], y.values[j]) */
  nodes: GridNode[][];
  messages: Message[];
  status: 'complete' | 'partial' | 'stopped' | 'failed';
}

export function gridSweep(pattern: Pattern, opts: GridOptions, hooks: SweepHooks = {}): GridResult {
  return runSteps(gridSteps(pattern, opts, hooks));
}

/** The grid as resumable steps (see sweepSteps). */
export function* gridSteps(pattern: Pattern, opts: GridOptions, hooks: SweepHooks = {}): Generator<void, GridResult> {
  const { x, y } = opts;
  const holds = opts.holds ?? [];
  const messages: Message[] = [];
  if (x.drive === y.drive) return { nodes: [], messages: [{ severity: 'error', code: 'same-drive', text: 'The two grid drives must be different creases.' }], status: 'failed' };
  const nodes: GridNode[][] = y.values.map((yv) => x.values.map((xv) => ({ x: xv, y: yv })));
  const total = x.values.length * y.values.length;
  let done = 0;
  let stopped = false;
  // first column: a path in y with x held at its first value
  const column = yield* sweepSteps(pattern, {
    drive: y.drive,
    from: y.values[0],
    to: y.values[y.values.length - 1],
    samples: y.values,
    holds: [...holds, { crease: x.drive, value: x.values[0] }],
    branch: opts.branch,
    solution: opts.solution,
  }, { shouldStop: hooks.shouldStop });
  messages.push(...column.messages.filter((m) => m.code !== 'flat-sample'));
  if (column.status === 'failed') {
    const why = column.messages.find((m) => m.severity === 'error')?.text ?? 'no start';
    for (const r of nodes) for (const n of r) n.unreachable = why;
    return { nodes, messages, status: 'failed' };
  }
  const colByValue = new Map(column.samples.map((s) => [s.drive, s] as const));
  const colWhy = column.events.find((e) => e.type !== 'branch-point')?.text ?? 'the first column does not reach it';
  for (let j = 0; j < y.values.length; j++) {
    if (hooks.shouldStop?.() || column.status === 'stopped') { stopped = true; break; }
    const start = colByValue.get(y.values[j]);
    if (!start) {
      for (const n of nodes[j]) n.unreachable = `row start not reached: ${colWhy}`;
      done += x.values.length;
      hooks.onProgress?.(done, total);
      continue;
    }
    const row = yield* sweepSteps(pattern, {
      drive: x.drive,
      from: x.values[0],
      to: x.values[x.values.length - 1],
      samples: x.values,
      holds: [...holds, { crease: y.drive, value: y.values[j] }],
      start: start.angles,
      // a row that starts at flat takes the ray that continues the row before it, the first row the ray
      // nearest the assignment's signs (the flat node itself is always reached)
      prefer: j > 0 && nodes[j - 1][Math.min(1, x.values.length - 1)].angles
        ? direction(nodes[j - 1][Math.min(1, x.values.length - 1)].angles!, nodes[j - 1][0].angles)
        : assignmentSigns(pattern),
    }, { shouldStop: hooks.shouldStop });
    const byValue = new Map(row.samples.map((s) => [s.drive, s] as const));
    const why = row.events.find((e) => e.type !== 'branch-point')?.text ?? row.messages.find((m) => m.severity === 'error')?.text ?? 'not reached';
    for (let i = 0; i < x.values.length; i++) {
      const s = byValue.get(x.values[i]);
      const n = nodes[j][i];
      if (s) { n.angles = s.angles; n.maxResidual = s.maxResidual; n.ratesX = s.rates; }
      else n.unreachable = row.status === 'stopped' ? 'not computed (stopped)' : why;
    }
    // the column path's rates at the row start are that node's y-rates
    nodes[j][0].ratesY = start.rates;
    done += x.values.length;
    hooks.onProgress?.(done, total);
    if (row.status === 'stopped') { stopped = true; break; }
  }
  for (const r of nodes) for (const n of r) if (!n.angles && !n.unreachable) n.unreachable = 'not computed (stopped)';
  const bad = nodes.flat().filter((n) => n.unreachable && n.unreachable !== 'not computed (stopped)').length;
  if (bad) messages.push({ severity: 'warning', code: 'unreachable-nodes', text: `${bad} of ${total} grid nodes were not reached; they are flagged with the reason.` });
  return { nodes, messages, status: stopped ? 'stopped' : bad ? 'partial' : 'complete' };
}


/** Unit direction from a to b (from the origin when a is missing). */
function direction(b: Float64Array, a?: Float64Array): Float64Array {
  const d = b.map((v, i) => v - (a ? a[i] : 0));
  const n = Math.hypot(...d) || 1;
  return d.map((v) => v / n);
}
