// The command line's contact with the outside world, passed in so that tests can run commands in-process.
//
// Output files (--out) are written so that no interrupt or failure leaves a damaged file:
//  - a regular file (new or replaced) goes to a temporary file in the same folder (".<name>.<pid>.<random>
//    .hingeplan-tmp"), which is flushed to disk (fsync), renamed over the target (atomic on one file system)
//    and the folder flushed too, so the rename itself survives a power cut; the target's permission bits
//    (and, for root, its owner) are kept. A failure or Ctrl-C before the rename removes the temporary file;
//    one left by a killed process is removed by the next run that writes beside it.
//  - a symbolic link is followed: the file it points to is replaced as above, the link stays.
//  - a FIFO or a character device (/dev/null, /dev/stdout, a named pipe) is written to directly: there is no
//    file to replace, so nothing is created beside it.
//  - refused: the program's own input files (the pattern, a start state, a schedule), a read-only file,
//    a folder, a block device, a socket, a dangling link, a path in a folder that does not exist.
// Standard output is written synchronously with fs.writeSync: a closed pipe (`| head`) is seen at once as
// EPIPE and ends the program quietly (exit status 141, as a SIGPIPE would).
import {
  closeSync, constants, fchmodSync, fchownSync, fstatSync, fsyncSync, lstatSync, openSync, readdirSync, readFileSync, realpathSync,
  renameSync, statSync, unlinkSync, writeSync, accessSync, type Stats,
} from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { isatty } from 'node:tty';
import type { DrawingOptions } from '../solver/formats/drawing';

/** A place output goes to, a piece at a time; commit() makes it final, abort() leaves the old state. */
export interface OutputTarget {
  /** the path as given */
  readonly path: string;
  write(text: string): void;
  /** flush, fsync, rename into place, fsync the folder; the error text when that failed (the temp file is then removed) */
  commit(): string | undefined;
  /** nothing is kept: the temporary file is removed, an existing target is untouched */
  abort(): void;
}

export interface Io {
  /** machine output and text for people, exactly as given (throws BrokenPipe when the reader has gone) */
  stdout(text: string): void;
  /** messages for people */
  stderr(text: string): void;
  /** a progress line, drawn as given (carriage return and erase-line codes included); default: stderr */
  progress?(text: string): void;
  /** a file's bytes, or an error message naming the file */
  readFile(path: string): { bytes?: Uint8Array; error?: string };
  /** open an --out target (see the rules above); `inputs` are the files this run reads, which it must not write */
  openOutput(path: string, inputs: string[]): { target?: OutputTarget; error?: string };
  /** register a handler for Ctrl-C; returns a function that removes it. Ctrl-C is watched from then until the program exits. */
  onInterrupt(handler: () => void): () => void;
  /** how many times Ctrl-C was pressed since the program started watching for it */
  interrupts?(): number;
  /** true when stderr is a terminal (progress lines are drawn only then, or when forced) */
  stderrIsTTY: boolean;
  /** how to read DXF and SVG drawings (--layer, --stroke, --snap), when the command line gave any */
  drawing?: DrawingOptions;
}

/** The reader has closed standard output (EPIPE): stop at once, quietly. */
export class BrokenPipe extends Error {}

/** Largest input file the command line reads (the readers' own limits apply too). */
export const MAX_INPUT_BYTES = 32 * 1024 * 1024;

const TEMP_SUFFIX = '.hingeplan-tmp';
/** Bytes gathered before a write to the file or pipe. */
const CHUNK = 1 << 16;

const errCode = (e: unknown) => (e as NodeJS.ErrnoException)?.code ?? 'error';

/** Block the thread for a moment (a pipe whose reader is slow answers EAGAIN to a non-blocking write). */
function pause(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/** Write all of `data` to a descriptor, through partial writes and EAGAIN. */
function writeAll(fd: number, data: Uint8Array): void {
  let off = 0;
  while (off < data.length) {
    try {
      off += writeSync(fd, data, off, data.length - off);
    } catch (e) {
      if (errCode(e) === 'EAGAIN') { pause(2); continue; }
      throw e;
    }
  }
}

/** A descriptor written in chunks of CHUNK bytes. */
class FdWriter {
  private parts: string[] = [];
  private size = 0;

  constructor(private readonly fd: number) {}

  write(text: string): void {
    this.parts.push(text);
    this.size += text.length;
    if (this.size >= CHUNK) this.flush();
  }

  flush(): void {
    if (!this.parts.length) return;
    const data = Buffer.from(this.parts.length === 1 ? this.parts[0] : this.parts.join(''), 'utf8');
    this.parts = [];
    this.size = 0;
    writeAll(this.fd, data);
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return errCode(e) === 'EPERM';
  }
}

/** Remove temporary files beside `target` that a killed run left (their process is gone). */
function removeStaleTemps(dir: string, base: string): void {
  let names: string[];
  try { names = readdirSync(dir); } catch { return; }
  const prefix = `.${base}.`;
  for (const name of names) {
    if (!name.startsWith(prefix) || !name.endsWith(TEMP_SUFFIX)) continue;
    const pid = Number(name.slice(prefix.length).split('.')[0]);
    if (Number.isInteger(pid) && pid > 0 && pid !== process.pid && !alive(pid)) {
      try { unlinkSync(join(dir, name)); } catch { /* another run removed it */ }
    }
  }
}

function sameFile(a: Stats, b: Stats): boolean {
  return a.dev === b.dev && a.ino === b.ino;
}

/** Temporary files not yet committed: removed if the program ends another way. */
const pending = new Set<string>();
let exitHook = false;
function track(temp: string): void {
  pending.add(temp);
  if (!exitHook) {
    exitHook = true;
    process.on('exit', () => {
      for (const t of pending) try { unlinkSync(t); } catch { /* gone */ }
    });
  }
}

function openOutputFile(path: string, inputs: string[]): { target?: OutputTarget; error?: string } {
  let real = resolve(path);
  let st: Stats | undefined;
  try {
    const l = lstatSync(real);
    if (l.isSymbolicLink()) {
      try { real = realpathSync(real); } catch { return { error: `${path} is a symbolic link to a file that does not exist; not written` }; }
      st = statSync(real);
    } else st = l;
  } catch (e) {
    if (errCode(e) !== 'ENOENT') return { error: `${path}: cannot be examined (${errCode(e)})` };
  }
  if (st) {
    if (st.isDirectory()) return { error: `${path} is a folder; give a file name` };
    if (st.isBlockDevice() || st.isSocket()) return { error: `${path} is a ${st.isSocket() ? 'socket' : 'block device'}; not written` };
    for (const input of inputs) {
      try {
        if (sameFile(statSync(input), st)) return { error: `${path} is the input file ${input}; not overwritten (choose another --out)` };
      } catch { /* an input that cannot be examined was refused when it was read */ }
    }
    if (st.isFIFO() || st.isCharacterDevice()) return writeThrough(path, real);
    if ((st.mode & 0o222) === 0) return { error: `${path} is read-only; not replaced (make it writable or choose another file)` };
    try { accessSync(real, constants.W_OK); } catch { return { error: `${path} cannot be replaced: permission denied` }; }
  } else {
    try {
      if (!statSync(dirname(real)).isDirectory()) return { error: `${path}: ${dirname(path)} is not a folder` };
    } catch { return { error: `${path}: the folder ${dirname(path)} does not exist` }; }
  }
  const dir = dirname(real), base = basename(real);
  removeStaleTemps(dir, base);
  // unique with O_EXCL below; the pid lets a later run tell a dead run's file from a live one's
  const temp = join(dir, `.${base}.${process.pid}.${Math.floor(Math.random() * 0x100000000).toString(16).padStart(8, '0')}${TEMP_SUFFIX}`);
  let fd: number;
  try {
    fd = openSync(temp, constants.O_WRONLY | constants.O_CREAT | constants.O_EXCL, st ? st.mode & 0o7777 : 0o666);
  } catch (e) {
    return { error: `${path}: cannot be written in ${dir} (${errCode(e)})` };
  }
  track(temp);
  try {
    if (st) {
      // the replaced file's permissions (the umask applied to the open), and its owner when we may
      fchmodSync(fd, st.mode & 0o7777);
      if (process.getuid?.() === 0 && (fstatSync(fd).uid !== st.uid || fstatSync(fd).gid !== st.gid)) fchownSync(fd, st.uid, st.gid);
    }
  } catch { /* permissions are kept where the file system allows */ }
  const out = new FdWriter(fd);
  let open = true;
  const drop = () => {
    if (open) { try { closeSync(fd); } catch { /* closed */ } open = false; }
    try { unlinkSync(temp); } catch { /* gone */ }
    pending.delete(temp);
  };
  return {
    target: {
      path,
      write: (text) => out.write(text),
      commit() {
        try {
          out.flush();
          fsyncSync(fd);
          closeSync(fd);
          open = false;
          renameSync(temp, real);
          pending.delete(temp);
        } catch (e) {
          drop();
          return `${path}: cannot be written (${errCode(e)})`;
        }
        try {
          // the rename is an entry in the folder: flush it too
          const d = openSync(dir, constants.O_RDONLY);
          try { fsyncSync(d); } finally { closeSync(d); }
        } catch { /* some file systems cannot fsync a folder */ }
        return undefined;
      },
      abort: drop,
    },
  };
}

/** A FIFO or character device: written in place, nothing to replace. */
function writeThrough(path: string, real: string): { target?: OutputTarget; error?: string } {
  let fd: number;
  try {
    fd = openSync(real, constants.O_WRONLY);
  } catch (e) {
    return { error: `${path}: cannot be opened for writing (${errCode(e)})` };
  }
  const out = new FdWriter(fd);
  let open = true;
  const close = () => { if (open) { open = false; try { closeSync(fd); } catch { /* closed */ } } };
  return {
    target: {
      path,
      write: (text) => out.write(text),
      commit() {
        try { out.flush(); } catch (e) { close(); return `${path}: cannot be written (${errCode(e)})`; }
        close();
        return undefined;
      },
      abort: close,
    },
  };
}

export function nodeIo(): Io {
  const stdout = new FdWriter(1);
  let interrupts = 0;
  const handlers = new Set<() => void>();
  let watching = false;
  return {
    stdout(t) {
      try {
        stdout.write(t);
        stdout.flush();
      } catch (e) {
        if (errCode(e) === 'EPIPE') throw new BrokenPipe('standard output was closed');
        throw e;
      }
    },
    stderr(t) {
      try { writeAll(2, Buffer.from(t, 'utf8')); } catch { /* nowhere left to report it */ }
    },
    progress(t) {
      try { writeAll(2, Buffer.from(t, 'utf8')); } catch { /* as stderr */ }
    },
    readFile(path) {
      try {
        const st = statSync(path);
        if (st.isDirectory()) return { error: `${path} is a folder, not a file` };
        if (st.size > MAX_INPUT_BYTES) return { error: `${path} is ${(st.size / 1048576).toFixed(1)} MiB; the limit is ${MAX_INPUT_BYTES / 1048576} MiB` };
        const bytes = readFileSync(path);
        // a pipe or device reports no size ahead: check what came
        if (bytes.length > MAX_INPUT_BYTES) return { error: `${path} is more than ${MAX_INPUT_BYTES / 1048576} MiB; the limit is ${MAX_INPUT_BYTES / 1048576} MiB` };
        return { bytes };
      } catch (e) {
        const code = errCode(e);
        return { error: code === 'ENOENT' ? `${path}: no such file` : code === 'EACCES' ? `${path}: cannot be read (permission denied)` : `${path}: cannot be read (${code})` };
      }
    },
    openOutput: openOutputFile,
    onInterrupt(handler) {
      if (!watching) {
        watching = true;
        // from now on Ctrl-C never kills the program mid-write: it is counted, the handlers stop the work,
        // and the exit status says it happened (128 + SIGINT), also when it comes after the output is complete
        process.on('SIGINT', () => {
          interrupts++;
          process.exitCode = 130;
          for (const h of handlers) h();
        });
      }
      handlers.add(handler);
      return () => { handlers.delete(handler); };
    },
    interrupts: () => interrupts,
    stderrIsTTY: isatty(2),
  };
}
