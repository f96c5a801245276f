// Reading a pattern file for a command: every problem is printed as a message naming where it is.
import type { Drive, Message, Pattern } from '../solver/types';
import { loadPatternText, type Project } from '../solver/formats/project';
import { parseSetOption, resolveDrives, type DriveSpec } from '../solver/model/drives';
import type { Io } from './io';

export interface Loaded {
  pattern: Pattern;
  project: Project;
  text: string;
  messages: Message[];
}

export function formatMessage(m: Message): string {
  return `${m.severity}[${m.code}]: ${m.text}`;
}

export function printMessages(io: Io, messages: Message[], prefix = ''): void {
  for (const m of messages) io.stderr(`${prefix}${formatMessage(m)}\n`);
}

/** Load and validate a pattern file; prints the readers' messages and returns undefined when it is refused. */
export function loadFile(io: Io, path: string | undefined, command: string): Loaded | undefined {
  if (!path) {
    io.stderr(`hingeplan ${command}: a pattern file is required (see hingeplan ${command} --help)\n`);
    return undefined;
  }
  const read = io.readFile(path);
  if (read.error !== undefined || read.text === undefined) {
    io.stderr(`hingeplan ${command}: ${read.error}\n`);
    return undefined;
  }
  const result = loadPatternText(read.text, path, io.drawing);
  const errors = result.messages.filter((m) => m.severity === 'error');
  if (!result.pattern || !result.project || errors.length) {
    printMessages(io, result.messages, `${path}: `);
    if (!errors.length) io.stderr(`${path}: error[unreadable]: the file could not be read as a pattern\n`);
    return undefined;
  }
  return { pattern: result.pattern, project: result.project, text: read.text, messages: result.messages };
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
