// Reading a pattern file for a command: every problem is printed as a message naming where it is.
import { createRequire } from 'node:module';
import type { Drive, Message, Pattern } from '../solver/types';
import { drawingFormat, loadStructuredText, patternFileText, type LoadResult, type Project } from '../solver/formats/project';
import type { DrawingOptions } from '../solver/formats/drawing';
import { parseSetOption, resolveDrives, type DriveSpec } from '../solver/model/drives';
import type { Io } from './io';

export interface Loaded {
  pattern: Pattern;
  project: Project;
  /** the file's bytes as read */
  bytes: Uint8Array;
  messages: Message[];
  /** SHA-256 of the file's bytes (hex) */
  sha256(): string;
}

/**
 * SHA-256 of bytes as hex, by node:crypto (loaded only when a table needs a hash: it costs start-up time;
 * the solver's own sha256 gives the same, tested in tests/table-format.test.ts).
 */
export function hashBytes(bytes: Uint8Array): string {
  const { createHash } = createRequire(import.meta.url)('node:crypto') as typeof import('node:crypto');
  return createHash('sha256').update(bytes).digest('hex');
}

export function formatMessage(m: Message): string {
  return `${m.severity}[${m.code}]: ${m.text}`;
}

export function printMessages(io: Io, messages: Message[], prefix = ''): void {
  for (const m of messages) io.stderr(`${prefix}${formatMessage(m)}\n`);
}

/**
 * A pattern file's bytes read as the core reads them (../solver/formats/load.ts), the drawing readers loaded
 * only for a drawing: a command on a project or FOLD file starts without them.
 */
export async function readPattern(bytes: Uint8Array, path: string, drawing: DrawingOptions | undefined): Promise<LoadResult> {
  const decoded = patternFileText(bytes, path);
  if (decoded.text === undefined) return { messages: decoded.messages };
  if (drawingFormat(decoded.text, path)) {
    const { loadPatternText } = await import('../solver/formats/load');
    return loadPatternText(decoded.text, path, drawing);
  }
  return loadStructuredText(decoded.text, path);
}

/** Load and validate a pattern file; prints the readers' messages and returns undefined when it is refused. */
export async function loadFile(io: Io, path: string | undefined, command: string): Promise<Loaded | undefined> {
  if (!path) {
    io.stderr(`hingeplan ${command}: a pattern file is required (see hingeplan ${command} --help)\n`);
    return undefined;
  }
  const read = io.readFile(path);
  if (read.error !== undefined || read.bytes === undefined) {
    io.stderr(`hingeplan ${command}: ${read.error}\n`);
    return undefined;
  }
  const bytes = read.bytes;
  const result = await readPattern(bytes, path, io.drawing);
  const errors = result.messages.filter((m) => m.severity === 'error');
  if (!result.pattern || !result.project || errors.length) {
    printMessages(io, result.messages, `${path}: `);
    if (!errors.length) io.stderr(`${path}: error[unreadable]: the file could not be read as a pattern\n`);
    return undefined;
  }
  let hash: string | undefined;
  return { pattern: result.pattern, project: result.project, bytes, messages: result.messages, sha256: () => (hash ??= hashBytes(bytes)) };
}

/**
 * The drives for a command: the `--set` options when any are given, else the drives stored in the file.
 * Returns undefined (messages printed) when a drive is refused.
 */
export function drivesFor(io: Io, loaded: Loaded, sets: string[] | undefined, path: string): Drive[] | undefined {
  const specs: DriveSpec[] = [];
  const messages: Message[] = [];
  if (sets && sets.length) {
    for (const s of sets) {
      const r = parseSetOption(s);
      messages.push(...r.messages);
      if (r.drive) specs.push(r.drive);
    }
  } else {
    loaded.project.drives.forEach((d, i) => specs.push({ crease: d.crease, angleDeg: d.angleDeg, field: `drives[${i}]` }));
  }
  const resolved = resolveDrives(loaded.pattern, specs);
  messages.push(...resolved.messages);
  if (messages.some((m) => m.severity === 'error')) {
    printMessages(io, messages, `${path}: `);
    return undefined;
  }
  return resolved.drives;
}
