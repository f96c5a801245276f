// What the path commands (sweep, table, schedule, follow, grid, branches) share: reading drives, holds and
// start states, the sample list in degrees, running resumable solver steps while staying responsive to
// Ctrl-C (with a progress line), the table header, the solver's refusals as option errors.
import type { Drive, Message, Pattern } from '../../solver/types';
import { findCrease } from '../../solver/model/pattern';
import { parseSetOption, resolveDrives } from '../../solver/model/drives';
import { sampleDegrees as coreSampleDegrees } from '../../solver/paths/sweep';
import type { TableHeader, TableInput } from '../../solver/outputs/table';
import { readJsonText } from '../../solver/formats/limits';
import { decodeUtf8 } from '../../solver/formats/text';
import { numberOption, UsageError, type OptionSpec } from '../args';
import { hashBytes, loadFile, printMessages, type Loaded } from '../load';
import type { Io } from '../io';
import { VERSION } from '../version';
import { EXIT } from '../exit-codes';
import { LoadModel, resolveLoads, type LoadOverrides, type Spring } from '../../solver/outputs/torque';
import { PathChecks } from '../../solver/outputs/path-physics';
import type { SweepSample } from '../../solver/paths/sweep';

const RAD = Math.PI / 180;

/** Exit status when Ctrl-C stopped the work (128 + SIGINT, common practice for shells); the partial output is written. */
export const EXIT_INTERRUPTED = EXIT.interrupted;

/** Options every table command takes: --pretty (indented JSON) and --digits (fewer significant digits). */
export const outputOptions: OptionSpec = {
  pretty: { type: 'boolean' },
  digits: { type: 'string' },
};

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
  ...outputOptions,
};

export const OUTPUT_OPTIONS_HELP = `  --pretty               indent JSON for people (default: compact, one row per line).
  --digits <n>           write every number with n significant digits (1 … 17; default: full precision, the
                         shortest text that reads back to the same double).`;

export const OUT_HELP = `  --out <file>           write to a file instead of stdout: a temporary file beside it, flushed and renamed
                         into place, so an interrupt or failure leaves the old file or the complete new one
                         (the file's permissions are kept; a symbolic link is followed; a FIFO or device such
                         as /dev/null is written to directly; the input files and read-only files are refused).
                         "wrote <file>" goes to stderr when it is complete.`;

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
                         a solution of \`solve --json\`, or a state written as such); the table header records
                         the file and the SHA-256 of its bytes.
  --method auto|propagate|continue
                         auto (default): exact vertex-by-vertex propagation for meshes of degree-4
                         vertices with nothing held, else pseudo-arclength continuation.
  --condition-every <k>  evaluate the condition number every k samples and at the last (default: every sample
                         up to 400 free creases, every ⌈n/100⌉ up to 4000, the last sample only above; 0: none);
                         other samples show it as empty (CSV) or null. Branch points are detected where it is
                         evaluated; near-singular flags come from every vertex's own pivots at every sample.
  --progress             show a progress line on stderr even when it is not a terminal.
${OUTPUT_OPTIONS_HELP}
${OUT_HELP}
Ctrl-C stops the computation and writes what was computed, complete and parseable (exit status 130).
A table may hold at most 20 million hinge values (rows × (creases + 32)); larger requests are refused
before any work (exit status 2, with the largest step that fits).`;

/** The option a field of a solver message comes from. */
const OPTION_OF: Record<string, string> = {
  duration: '--time', accelTime: '--accel-time', acceleration: '--accel', jerkTime: '--jerk-time', dt: '--dt', rows: '--rows',
  step: '--step', samples: '--step', from: '--from', to: '--to', range: '--range', schedule: '--schedule',
};

/** Codes of solver messages that refuse the request itself (exit status 2, not a result). */
export const REQUEST_CODES = new Set(['invalid-sweep', 'too-many-samples', 'too-many-rows', 'too-many-nodes', 'bad-profile', 'bad-step', 'drive-out-of-range', 'empty-range']);

/** A solver refusal of the request, named by the option it comes from. */
export function requestError(m: Message, option?: string): UsageError {
  const name = option ?? (m.where?.field ? OPTION_OF[m.where.field] : undefined);
  return new UsageError(`${name ? `${name}: ` : ''}${m.text}`);
}

/** A crease reference given for an option, as an index, with a message naming the option. */
export function creaseOption(pattern: Pattern, ref: string | undefined, option: string): number {
  if (ref === undefined || ref.trim() === '') throw new UsageError(`--${option} <crease> is required`);
  const c = findCrease(pattern, ref.trim());
  if (c === undefined) throw new UsageError(`--${option}: there is no crease "${ref}"`);
  const a = pattern.creases[c].assignment;
  if (a === 'B' || a === 'F') throw new UsageError(`--${option}: crease "${ref}" is ${a === 'B' ? 'a boundary edge' : 'held flat (F)'} and cannot be driven`);
  return c;
}

/** --hold options as drives (radians, with the degrees as given). Prints the messages and returns undefined when one is refused. */
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

/**
 * The pattern file, its drive and its held creases, as every path command reads them; undefined when the
 * file or a hold was refused (printed).
 */
export async function driveSetup(io: Io, command: string, values: Record<string, unknown>, positionals: string[]): Promise<{ loaded: Loaded; file: string; drive: number; holds: Drive[] } | undefined> {
  const file = positionals[0];
  const loaded = await loadFile(io, file, command);
  if (!loaded) return undefined;
  const { pattern } = loaded;
  const drive = creaseOption(pattern, values.drive as string | undefined, 'drive');
  const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
  if (!holds) return undefined;
  if (holds.some((h) => h.crease === drive)) throw new UsageError(`--hold: the drive ${pattern.creases[drive].label} cannot also be held`);
  return { loaded, file: file!, drive, holds };
}

/** A JSON input (a start state): its bytes checked as UTF-8 and JSON by the core readers. */
function readJsonInput(io: Io, file: string, what: string): { value?: unknown; input?: TableInput; ok: boolean } {
  const read = io.readFile(file);
  if (read.bytes === undefined) { io.stderr(`--start: ${read.error}\n`); return { ok: false }; }
  const decoded = decodeUtf8(read.bytes, what);
  const parsed = decoded.text === undefined ? { messages: decoded.messages } : readJsonText(decoded.text, what);
  if (parsed.value === undefined) { printMessages(io, parsed.messages, `${file}: `); return { ok: false }; }
  return { value: parsed.value, input: { role: 'start', file, sha256: hashBytes(read.bytes) }, ok: true };
}

/**
 * A start state from a JSON file with an "angles" map (degrees), or a solve report (its first solution);
 * with the file and the hash of its bytes for the table header. undefined when none is given, null when it
 * was refused (printed).
 */
export function startOption(io: Io, pattern: Pattern, file: string | undefined): { angles: Float64Array; input: TableInput } | undefined | null {
  if (file === undefined) return undefined;
  const r = readJsonInput(io, file, 'start state file');
  if (!r.ok) return null;
  const pick = (v: unknown): Record<string, unknown> | undefined => {
    if (!v || typeof v !== 'object') return undefined;
    const o = v as Record<string, unknown>;
    if (o.angles && typeof o.angles === 'object' && !Array.isArray(o.angles)) return o.angles as Record<string, unknown>;
    if (Array.isArray(o.solutions) && o.solutions.length) return pick(o.solutions[0]);
    return undefined;
  };
  const angles = pick(r.value);
  if (!angles) { io.stderr(`${file}: error[start-no-angles]: expected an object with "angles": {"<crease>": <degrees>, …}\n`); return null; }
  const x = new Float64Array(pattern.creases.length);
  for (const [label, deg] of Object.entries(angles)) {
    const c = findCrease(pattern, label);
    if (c === undefined) { io.stderr(`${file}: error[unknown-crease]: "angles" names crease "${label}", which the pattern does not have\n`); return null; }
    if (typeof deg !== 'number' || !Number.isFinite(deg) || Math.abs(deg) > 180) { io.stderr(`${file}: error[bad-angle]: angle of "${label}" must be a number of degrees in −180 … 180\n`); return null; }
    x[c] = deg * RAD;
  }
  return { angles: x, input: r.input! };
}

/**
 * Drive values from → to every step, computed in degrees (so 1°, 2°, … are exactly those decimal values) and
 * converted once each; the end is included also when the step does not divide the span. Refused (a usage
 * error naming the option) when the table over `creases` creases would pass the request limits.
 */
export function sampleDegrees(from: number, to: number, step: number, creases = 0, option = '--step'): number[] {
  const r = coreSampleDegrees(from, to, step, creases);
  if (!r.values) throw requestError(r.message!, r.message!.where?.field === 'step' ? option : undefined);
  return r.values;
}

export function rangeOptions(values: Record<string, unknown>, creases: number): { from: number; to: number; step: number; samples: number[]; degrees: number[] } {
  const from = numberOption(values.from as string | undefined, 'from');
  const to = numberOption(values.to as string | undefined, 'to');
  const step = numberOption(values.step as string | undefined, 'step', 1);
  for (const [v, n] of [[from, 'from'], [to, 'to']] as const) if (Math.abs(v) > 180) throw new UsageError(`--${n} must be within −180 … 180 degrees, got ${v}`);
  if (!(step > 0)) throw new UsageError(`--step must be a positive number of degrees, got ${step}`);
  const deg = sampleDegrees(from, to, step, creases);
  return { from: from * RAD, to: to * RAD, step: step * RAD, samples: deg.map((d) => d * RAD), degrees: deg };
}

export function intOrUndefined(v: unknown, name: string, min = 1): number | undefined {
  if (v === undefined) return undefined;
  const n = Number(v);
  if (String(v).trim() === '' || !Number.isInteger(n) || n < min) throw new UsageError(`--${name} must be a whole number ≥ ${min}, got "${String(v)}"`);
  return n;
}

/** --digits <n>: significant digits, 1 … 17 (17 always reads back to the same double). */
export function digitsOption(v: unknown): number | undefined {
  if (v === undefined) return undefined;
  const n = Number(v);
  if (String(v).trim() === '' || !Number.isInteger(n) || n < 1 || n > 17) throw new UsageError(`--digits must be a whole number from 1 to 17, got "${String(v)}"`);
  return n;
}

export function methodOption(v: unknown): 'auto' | 'propagate' | 'continue' {
  const m = (v as string | undefined) ?? 'auto';
  if (!['auto', 'propagate', 'continue'].includes(m)) throw new UsageError(`--method must be auto, propagate or continue, got "${m}"`);
  return m as 'auto' | 'propagate' | 'continue';
}

export function formatOption(v: unknown, allowed: string[], fallback: string): string {
  const f = (v as string | undefined) ?? fallback;
  if (!allowed.includes(f)) throw new UsageError(`--format must be ${allowed.slice(0, -1).join(', ')} or ${allowed[allowed.length - 1]}, got "${f}"`);
  return f;
}

/** The command as typed, quoted for a POSIX shell where needed, for the header. */
export function commandLine(command: string, argv: string[]): string {
  const q = (a: string) => (/^[A-Za-z0-9_@%+=:,./-]+$/.test(a) ? a : `'${a.replace(/'/g, `'\\''`)}'`);
  return ['hingeplan', command, ...argv].map(q).join(' ');
}

export function tableHeader(loaded: Loaded, file: string, command: string, argv: string[], inputs: TableInput[] = []): TableHeader {
  return {
    patternName: loaded.pattern.name,
    file,
    fileSha256: loaded.sha256(),
    version: VERSION,
    date: new Date().toISOString(),
    command: commandLine(command, argv),
    ...(inputs.length ? { inputs } : {}),
  };
}

/**
 * Run resumable solver steps to the end, returning to the event loop every few tens of milliseconds so that
 * Ctrl-C (io.onInterrupt) is seen; a progress line on stderr when it is a terminal or `progress` is set.
 * `stopped()` tells the steps to stop (they ask hooks.shouldStop). Ctrl-C stays watched after this returns,
 * so one pressed while the output is finished still ends in exit status 130 with the output complete.
 */
export async function runResponsive<T>(
  io: Io,
  command: string,
  make: (hooks: { shouldStop: () => boolean; onProgress: (done: number, total: number) => void }) => Generator<void, T>,
  showProgress: boolean,
): Promise<{ result: T; interrupted: boolean }> {
  let interrupted = false;
  io.onInterrupt(() => { interrupted = true; });
  let lastDraw = 0;
  let drawn = false;
  const start = Date.now();
  const draw = showProgress || io.stderrIsTTY;
  const progress = (t: string) => (io.progress ? io.progress(t) : io.stderr(t));
  const onProgress = (done: number, total: number) => {
    if (!draw) return;
    const now = Date.now();
    if (now - lastDraw < 100 && done < total) return;
    lastDraw = now;
    drawn = true;
    const pct = total ? Math.floor((100 * done) / total) : 100;
    const line = `hingeplan ${command}: ${done}/${total} (${pct}%) ${((now - start) / 1000).toFixed(1)} s`;
    progress(io.stderrIsTTY ? `\r${line}\x1b[K` : `${line}\n`);
  };
  // a Ctrl-C counted before these steps began (while the files were read) stops them too
  const steps = make({ shouldStop: () => interrupted || !!io.interrupts?.(), onProgress });
  let slice = Date.now();
  for (;;) {
    const r = steps.next();
    if (r.done) {
      if (drawn && io.stderrIsTTY) progress('\n');
      return { result: r.value, interrupted: interrupted || !!io.interrupts?.() };
    }
    if (Date.now() - slice > 30) {
      await new Promise<void>((resolve) => setTimeout(resolve, 0));
      slice = Date.now();
    }
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

// ---------------------------------------------------------------------------------------------------------
// contact and torque along a path

export const checksOptions: OptionSpec = {
  contact: { type: 'string' },
  clearance: { type: 'string' },
  'stop-at': { type: 'string' },
  'areal-density': { type: 'string' },
  gravity: { type: 'string' },
  spring: { type: 'string', multiple: true },
};

export const CHECKS_HELP = `  --contact on|off       check every pair of panels for contact at every state (default on); the first
                         contact is refined to 0.01° and reported as an event, states past it are flagged.
  --clearance <length>   report panels closer than this (file units; default 0: only panels passing
                         through each other); with panel thickness t, give t.
  --stop-at contact      end the path at the first contact (exit status 3).
  --areal-density <kg/m²>  panel mass per area, for the static holding torque of every drive.
  --gravity gx,gy,gz     m/s² in the base panel's frame (default 0,0,-9.80665: the base panel flat, top up).
  --spring <crease>=<N·m/rad>[:<rest deg>]  a torsion spring on a hinge (rest angle default 0); repeat.
                         Loads in the file ("loads") apply too; these options replace them. Torque needs
                         the file's units to be mm, cm, m or in.`;

/** --spring c=k[:rest] as a spring (rest in radians). */
function springOption(pattern: Pattern, text: string): Spring {
  const m = /^([^=]+)=([^:]+)(?::(.+))?$/.exec(text.trim());
  if (!m) throw new UsageError(`--spring must be <crease>=<N·m/rad>[:<rest deg>], got "${text}"`);
  const c = findCrease(pattern, m[1].trim());
  if (c === undefined) throw new UsageError(`--spring: there is no crease "${m[1]}"`);
  const k = Number(m[2]);
  if (!Number.isFinite(k) || k < 0 || m[2].trim() === '') throw new UsageError(`--spring ${m[1]}: the stiffness must be a number ≥ 0 in N·m/rad, got "${m[2]}"`);
  const rest = m[3] === undefined ? 0 : Number(m[3]);
  if (!Number.isFinite(rest) || Math.abs(rest) > 180 || m[3]?.trim() === '') throw new UsageError(`--spring ${m[1]}: the rest angle must be degrees in −180 … 180, got "${m[3]}"`);
  return { crease: c, stiffness: k, rest: rest * RAD };
}

/** The loads of the file and the options, as a load model (undefined: no torque asked for; null: refused, printed). */
export function loadsOption(io: Io, loaded: Loaded, values: Record<string, unknown>, path: string): LoadModel | undefined | null {
  const { pattern } = loaded;
  const over: LoadOverrides = {};
  if (values['areal-density'] !== undefined) {
    const v = numberOption(values['areal-density'] as string, 'areal-density');
    if (v < 0) throw new UsageError(`--areal-density must be ≥ 0 (kg/m²), got ${v}`);
    over.arealDensity = v;
  }
  if (values.gravity !== undefined) {
    const parts = String(values.gravity).split(',').map((x) => Number(x.trim()));
    if (parts.length !== 3 || !parts.every(Number.isFinite)) throw new UsageError(`--gravity must be three numbers gx,gy,gz in m/s², got "${String(values.gravity)}"`);
    over.gravity = [parts[0], parts[1], parts[2]];
  }
  const springs = ((values.spring as string[] | undefined) ?? []).map((s) => springOption(pattern, s));
  if (springs.length) over.springs = springs;
  const r = resolveLoads(pattern, loaded.project.loads, over);
  if (r.messages.length) { printMessages(io, r.messages, `${path}: `); return null; }
  if (!r.asked) return undefined;
  const m = LoadModel.create(pattern, r.spec, loaded.project.units);
  if (!m.model) { printMessages(io, m.messages, `${path}: `); return null; }
  return m.model;
}

/** Contact and torque checks for a path from the options (null: refused, printed). */
export function checksOption(io: Io, loaded: Loaded, values: Record<string, unknown>, path: string, drive: number, holds: Drive[], refine = true): PathChecks | null {
  const contact = (values.contact as string | undefined) ?? 'on';
  if (contact !== 'on' && contact !== 'off') throw new UsageError(`--contact must be on or off, got "${contact}"`);
  const stop = values['stop-at'] as string | undefined;
  if (stop !== undefined && stop !== 'contact') throw new UsageError(`--stop-at takes "contact", got "${stop}"`);
  if (stop && contact === 'off') throw new UsageError('--stop-at contact needs the contact check (--contact on)');
  let clearance = 0;
  if (values.clearance !== undefined) {
    clearance = numberOption(values.clearance as string, 'clearance');
    if (clearance < 0) throw new UsageError(`--clearance must be a length ≥ 0 in the file's units, got ${clearance}`);
    if (contact === 'off') throw new UsageError('--clearance needs the contact check (--contact on)');
  }
  const loads = loadsOption(io, loaded, values, path);
  if (loads === null) return null;
  return new PathChecks(loaded.pattern, drive, holds, {
    contact: contact === 'off' ? false : { clearance },
    stopAtContact: stop === 'contact',
    ...(loads ? { loads } : {}),
    ...(loaded.project.units ? { units: loaded.project.units } : {}),
    refine,
  });
}

/** The sweep hook that runs the checks on every sample. */
export function checksHook(checks: PathChecks): (s: SweepSample) => 'stop' | void {
  return (s) => {
    const r = checks.observe({ drive: s.drive, angles: s.angles, rates: s.rates });
    s.checks = { contact: r.contact, contacts: r.contacts, ...(r.torque ? { torque: r.torque } : {}) };
    return r.stop ? 'stop' : undefined;
  };
}
