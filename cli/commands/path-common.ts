// What the path commands (sweep, table, schedule, follow, grid, branches) share: reading drives, holds and
// start states, the sample list in degrees, running resumable solver steps while staying responsive to
// Ctrl-C (with a progress line), the table header, and writing the output atomically.
import type { Drive, Message, Pattern } from '../../solver/types';
import { findCrease } from '../../solver/model/pattern';
import { parseSetOption, resolveDrives } from '../../solver/model/drives';
import { sha256 } from '../../solver/outputs/sha256';
import type { TableHeader } from '../../solver/outputs/table';
import { numberOption, UsageError, type OptionSpec } from '../args';
import { printMessages, type Loaded } from '../load';
import type { Io } from '../io';
import { VERSION } from '../version';
import { EXIT } from '../exit-codes';

const RAD = Math.PI / 180;

/** Exit status when Ctrl-C stopped the work (128 + SIGINT, common practice for shells); the partial output is written. */
export const EXIT_INTERRUPTED = EXIT.interrupted;

export const pathOptions: OptionSpec = {
  drive: { type: 'string' },
  from: { type: 'string' },
  to: { type: 'string' },
  step: { type: 'string' },
  hold: { type: 'string', multiple: true },
  branch: { type: 'string' },
  solution: { type: 'string' },
  start: { type: 'string' },
  method: { type: 'string' },
  'condition-every': { type: 'string' },
  out: { type: 'string' },
  progress: { type: 'boolean' },
};

export const PATH_OPTIONS_HELP = `  --hold <crease>=<deg>  hold another crease at a value; repeat for more (a pattern with more than one
                         degree of freedom needs holds to make the path unique).
  --branch <id>          which branch to follow from the start state (ids as \`hingeplan branches\` lists them,
                         with the same --hold creases). Default: the branch whose signs match the
                         mountain/valley assignment; when several do, the first is taken and the others
                         are listed on stderr.
  --solution <k>         with holds that are not zero (no flat start): which solution of \`hingeplan solve\`
                         at the first drive value to start from (1-based); default: the first that matches
                         the assignment.
  --start <file>         start from a solved state: a JSON file with "angles": {"<crease>": <deg>, …} (e.g.
                         a solution of \`solve --json\`, a sample of \`sweep --json\`, or an event's state).
  --method auto|propagate|continue
                         auto (default): exact vertex-by-vertex propagation for meshes of degree-4
                         vertices with nothing held, else pseudo-arclength continuation.
  --condition-every <k>  evaluate the condition number every k samples and at the last (default: every sample
                         up to 400 free creases, every ⌈n/100⌉ up to 4000, the last sample only above; 0: none);
                         other samples show it as empty (CSV) or null. Branch points are detected where it is
                         evaluated; near-singular flags come from every vertex's own pivots at every sample.
  --progress             show a progress line on stderr even when it is not a terminal.
  --out <file>           write to a file (atomically) instead of stdout. Ctrl-C stops the computation and
                         writes what was computed so far, complete and parseable (exit status 130).`;

/** A crease reference given for an option, as an index, with a message naming the option. */
export function creaseOption(pattern: Pattern, ref: string | undefined, option: string): number {
  if (ref === undefined || ref.trim() === '') throw new UsageError(`--${option} <crease> is required`);
  const c = findCrease(pattern, ref.trim());
  if (c === undefined) throw new UsageError(`--${option}: there is no crease "${ref}"`);
  const a = pattern.creases[c].assignment;
  if (a === 'B' || a === 'F') throw new UsageError(`--${option}: crease "${ref}" is ${a === 'B' ? 'a boundary edge' : 'held flat (F)'} and cannot be driven`);
  return c;
}

/** --hold options as drives (radians). Prints the messages and returns undefined when one is refused. */
export function holdsOption(io: Io, loaded: Loaded, holds: string[] | undefined, path: string): Drive[] | undefined {
  const specs = [];
  const messages: Message[] = [];
  for (const h of holds ?? []) {
    const r = parseSetOption(h);
    for (const m of r.messages) messages.push({ ...m, text: m.text.replace(/--set/g, '--hold'), where: { field: '--hold' } });
    if (r.drive) specs.push({ ...r.drive, field: '--hold' });
  }
  const resolved = resolveDrives(loaded.pattern, specs);
  messages.push(...resolved.messages.map((m) => ({ ...m, text: m.text.replace(/^Drive (\d+)/, 'Hold $1') })));
  if (messages.some((m) => m.severity === 'error')) {
    printMessages(io, messages, `${path}: `);
    return undefined;
  }
  return resolved.drives;
}

/** A start state from a JSON file with an "angles" map (degrees), or a solve report (its first solution). */
export function startOption(io: Io, pattern: Pattern, file: string | undefined): Float64Array | undefined | null {
  if (file === undefined) return undefined;
  const read = io.readFile(file);
  if (read.error !== undefined || read.text === undefined) { io.stderr(`--start: ${read.error}\n`); return null; }
  let value: unknown;
  try { value = JSON.parse(read.text); } catch { io.stderr(`${file}: error[start-not-json]: the start state file is not JSON\n`); return null; }
  const pick = (v: unknown): Record<string, unknown> | undefined => {
    if (!v || typeof v !== 'object') return undefined;
    const o = v as Record<string, unknown>;
    if (o.angles && typeof o.angles === 'object') return o.angles as Record<string, unknown>;
    if (Array.isArray(o.solutions) && o.solutions.length) return pick(o.solutions[0]);
    return undefined;
  };
  const angles = pick(value);
  if (!angles) { io.stderr(`${file}: error[start-no-angles]: expected an object with "angles": {"<crease>": <degrees>, …}\n`); return null; }
  const x = new Float64Array(pattern.creases.length);
  for (const [label, deg] of Object.entries(angles)) {
    const c = findCrease(pattern, label);
    if (c === undefined) { io.stderr(`${file}: error[unknown-crease]: "angles" names crease "${label}", which the pattern does not have\n`); return null; }
    if (typeof deg !== 'number' || !Number.isFinite(deg) || Math.abs(deg) > 180) { io.stderr(`${file}: error[bad-angle]: angle of "${label}" must be a number of degrees in −180 … 180\n`); return null; }
    x[c] = deg * RAD;
  }
  return x;
}

/**
 * Drive values from → to every step, computed in degrees (so 1°, 2°, … are exactly those decimal values) and
 * converted once each; the end is included also when the step does not divide the span.
 */
export function sampleDegrees(from: number, to: number, step: number): number[] {
  if (!(step > 0)) throw new UsageError(`--step must be a positive number of degrees, got ${step}`);
  for (const [v, n] of [[from, 'from'], [to, 'to']] as const) if (Math.abs(v) > 180) throw new UsageError(`--${n} must be within −180 … 180 degrees, got ${v}`);
  const dir = to >= from ? 1 : -1;
  const count = Math.floor(Math.abs(to - from) / step + 1e-9);
  if (count > 100_000) throw new UsageError(`--step ${step} gives ${count + 1} samples; the limit is 100000`);
  const out: number[] = [];
  for (let k = 0; k <= count; k++) out.push(+(from + dir * k * step).toPrecision(15));
  if (Math.abs(out[out.length - 1] - to) > 1e-9) out.push(to);
  else out[out.length - 1] = to;
  return out;
}

export function rangeOptions(values: Record<string, unknown>): { from: number; to: number; step: number; samples: number[] } {
  const from = numberOption(values.from as string | undefined, 'from');
  const to = numberOption(values.to as string | undefined, 'to');
  const step = numberOption(values.step as string | undefined, 'step', 1);
  const deg = sampleDegrees(from, to, step);
  return { from: from * RAD, to: to * RAD, step: step * RAD, samples: deg.map((d) => d * RAD) };
}

export function intOrUndefined(v: unknown, name: string, min = 1): number | undefined {
  if (v === undefined) return undefined;
  const n = Number(v);
  if (!Number.isInteger(n) || n < min) throw new UsageError(`--${name} must be a whole number ≥ ${min}, got "${String(v)}"`);
  return n;
}

export function methodOption(v: unknown): 'auto' | 'propagate' | 'continue' {
  const m = (v as string | undefined) ?? 'auto';
  if (!['auto', 'propagate', 'continue'].includes(m)) throw new UsageError(`--method must be auto, propagate or continue, got "${m}"`);
  return m as 'auto' | 'propagate' | 'continue';
}

/** The command as typed, quoted for a POSIX shell where needed, for the header. */
export function commandLine(command: string, argv: string[]): string {
  const q = (a: string) => (/^[A-Za-z0-9_@%+=:,./-]+$/.test(a) ? a : `'${a.replace(/'/g, `'\\''`)}'`);
  return ['hingeplan', command, ...argv].map(q).join(' ');
}

export function tableHeader(loaded: Loaded, file: string, command: string, argv: string[]): TableHeader {
  return {
    patternName: loaded.pattern.name,
    file,
    fileSha256: sha256(loaded.text),
    version: VERSION,
    date: new Date().toISOString(),
    command: commandLine(command, argv),
  };
}

export function writeOutput(io: Io, command: string, text: string, out: string | undefined): boolean {
  if (out === undefined) { io.stdout(text); return true; }
  const w = io.writeFile(out, text);
  if (w.error) { io.stderr(`hingeplan ${command}: ${w.error}\n`); return false; }
  return true;
}

/**
 * Run resumable solver steps to the end, returning to the event loop every few tens of milliseconds so that
 * Ctrl-C (io.onInterrupt) is seen; a progress line on stderr when it is a terminal or `progress` is set.
 * `stopped()` tells the steps to stop (they ask hooks.shouldStop).
 */
export async function runResponsive<T>(
  io: Io,
  command: string,
  make: (hooks: { shouldStop: () => boolean; onProgress: (done: number, total: number) => void }) => Generator<void, T>,
  showProgress: boolean,
): Promise<{ result: T; interrupted: boolean }> {
  let interrupted = false;
  const remove = io.onInterrupt(() => { interrupted = true; });
  let lastDraw = 0;
  let drawn = false;
  const start = Date.now();
  const draw = showProgress || io.stderrIsTTY;
  const onProgress = (done: number, total: number) => {
    if (!draw) return;
    const now = Date.now();
    if (now - lastDraw < 100 && done < total) return;
    lastDraw = now;
    drawn = true;
    const pct = total ? Math.floor((100 * done) / total) : 100;
    const line = `hingeplan ${command}: ${done}/${total} (${pct}%) ${((now - start) / 1000).toFixed(1)} s`;
    io.stderr(io.stderrIsTTY ? `\r${line}\x1b[K` : `${line}\n`);
  };
  const steps = make({ shouldStop: () => interrupted, onProgress });
  try {
    let slice = Date.now();
    for (;;) {
      const r = steps.next();
      if (r.done) {
        if (drawn && io.stderrIsTTY) io.stderr('\n');
        return { result: r.value, interrupted };
      }
      if (Date.now() - slice > 30) {
        await new Promise<void>((resolve) => setTimeout(resolve, 0));
        slice = Date.now();
      }
    }
  } finally {
    remove();
  }
}

export function printSolverMessages(io: Io, messages: Message[], command: string): void {
  for (const m of messages) if (m.severity !== 'info' || m.code === 'branch-by-assignment' || m.code === 'propagation-not-applicable') io.stderr(`hingeplan ${command}: ${m.severity}[${m.code}]: ${m.text}\n`);
}

/**
 * `--from -30` reads as an option followed by the flag -30; join a negative number to its option
 * (`--from=-30`) before parsing, so negative degrees need no special spelling.
 */
export function joinNegativeNumbers(argv: string[], options: OptionSpec): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const name = a.startsWith('--') && !a.includes('=') ? a.slice(2) : undefined;
    const next = argv[i + 1];
    if (name && options[name]?.type === 'string' && next !== undefined && /^-(\d|\.\d)/.test(next)) {
      out.push(`${a}=${next}`);
      i++;
    } else out.push(a);
  }
  return out;
}
