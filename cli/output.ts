// Where a command's output goes: standard output, or an --out file written atomically (see ./io.ts), with
// "wrote <file>" on stderr once it is complete. Every piece passes the escapes of its kind on the way, so no
// name or label from a file can reach a terminal as a control sequence: JSON gets the C1 and bidirectional
// controls as \u escapes (the value read back is the same), text (CSV, OBJ, STL, tables for people) shows
// every control character as \xHH.
import type { TextSink } from '../solver/outputs/table';
import { escapeControlsInFile, escapeControlsKeepLines, jsonSafe } from '../solver/formats/escape';
import type { Io, OutputTarget } from './io';
import { writeJson } from '../solver/formats/json-text';

/**
 * json: JSON from elsewhere (C1 controls escaped on the way); text: text for people (every control escaped
 * but line feeds and tabs); file: a text file format (the same, carriage returns kept for CRLF formats such
 * as DXF); escaped: written by our own writers, which escape what they take from files (nothing to do).
 */
export type OutputKind = 'json' | 'text' | 'file' | 'escaped';

/** Pieces gathered into chunks of this many characters before they are written. */
const CHUNK = 1 << 16;

export class Output implements TextSink {
  private parts: string[] = [];
  private size = 0;
  private done = false;
  private readonly clean: (t: string) => string;

  constructor(private readonly io: Io, private readonly command: string, private readonly target: OutputTarget | undefined, kind: OutputKind) {
    this.clean = kind === 'json' ? jsonSafe : kind === 'text' ? escapeControlsKeepLines : kind === 'file' ? escapeControlsInFile : (t) => t;
  }

  get toFile(): boolean {
    return !!this.target;
  }

  write(text: string): void {
    this.parts.push(text);
    this.size += text.length;
    if (this.size >= CHUNK) this.flush();
  }

  private flush(): void {
    if (!this.parts.length) return;
    const text = this.clean(this.parts.length === 1 ? this.parts[0] : this.parts.join(''));
    this.parts = [];
    this.size = 0;
    if (this.target) this.target.write(text);
    else this.io.stdout(text);
  }

  /** Make the output final: "wrote <file>" (and `note`) on stderr for a file. False when it could not be written (said on stderr). */
  finish(note?: string): boolean {
    if (this.done) return true;
    this.done = true;
    try {
      this.flush();
    } catch (e) {
      this.target?.abort();
      throw e;
    }
    if (!this.target) return true;
    const error = this.target.commit();
    if (error) {
      this.io.stderr(`hingeplan ${this.command}: ${error}\n`);
      return false;
    }
    this.io.stderr(`wrote ${this.target.path}${note ? `: ${note}` : ''}\n`);
    return true;
  }

  /** Nothing is kept: an --out file stays as it was. */
  abort(): void {
    if (this.done) return;
    this.done = true;
    this.parts = [];
    this.target?.abort();
  }
}

/** Open the output of a command; undefined (the reason on stderr) when --out is refused. */
export function openOutput(io: Io, command: string, out: string | undefined, inputs: (string | undefined)[], kind: OutputKind): Output | undefined {
  // from here on a Ctrl-C cannot cut the output short: it is counted, and the output is finished first
  io.onInterrupt(() => {});
  if (out === undefined) return new Output(io, command, undefined, kind);
  if (out.trim() === '') {
    io.stderr(`hingeplan ${command}: --out needs a file name\n`);
    return undefined;
  }
  const r = io.openOutput(out, inputs.filter((x): x is string => !!x));
  if (!r.target) {
    io.stderr(`hingeplan ${command}: ${r.error}\n`);
    return undefined;
  }
  return new Output(io, command, r.target, kind);
}

/** Write one whole text (a command whose output is small) and make it final. */
export function writeWhole(io: Io, command: string, text: string, out: string | undefined, inputs: (string | undefined)[], kind: OutputKind, note?: string): boolean {
  const o = openOutput(io, command, out, inputs, kind);
  if (!o) return false;
  o.write(text);
  return o.finish(note);
}

/** Write a value as JSON (compact, or indented), a piece at a time: no size of value needs one string. */
export function writeWholeJson(io: Io, command: string, value: unknown, pretty: boolean, out: string | undefined = undefined, inputs: (string | undefined)[] = [], note?: string): boolean {
  const o = openOutput(io, command, out, inputs, 'escaped');
  if (!o) return false;
  writeJson((t) => o.write(t), value, pretty);
  o.write('\n');
  return o.finish(note);
}
