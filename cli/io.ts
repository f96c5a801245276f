// The command line's contact with the outside world, passed in so that tests can run commands in-process.
import { readFileSync, renameSync, writeFileSync, statSync, unlinkSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import type { DrawingOptions } from '../solver/formats/drawing';
import { decodeDxf } from '../solver/formats/dxf-text';

export interface Io {
  stdout(text: string): void;
  stderr(text: string): void;
  /** file text, or an error message naming the file */
  readFile(path: string): { text?: string; error?: string };
  /** writes a temporary file beside the target and renames it, so a crash never leaves a half-written file */
  writeFile(path: string, text: string): { error?: string };
  /** register a handler for Ctrl-C; returns a function that removes it */
  onInterrupt(handler: () => void): () => void;
  /** true when stderr is a terminal (progress lines are drawn only then, or when forced) */
  stderrIsTTY: boolean;
  /** how to read DXF and SVG drawings (--layer, --stroke, --snap), when the command line gave any */
  drawing?: DrawingOptions;
}

/** Largest input file the command line reads (the readers' own limits apply too). */
export const MAX_INPUT_BYTES = 32 * 1024 * 1024;

export function nodeIo(): Io {
  return {
    stdout: (t) => process.stdout.write(t),
    stderr: (t) => process.stderr.write(t),
    readFile(path) {
      try {
        const st = statSync(path);
        if (st.isDirectory()) return { error: `${path} is a folder, not a file` };
        if (st.size > MAX_INPUT_BYTES) return { error: `${path} is ${(st.size / 1048576).toFixed(1)} MiB; the limit is ${MAX_INPUT_BYTES / 1048576} MiB` };
        // a DXF from before AutoCAD 2007 is in a Windows code page, not UTF-8
        if (/\.dxf$/i.test(path)) return { text: decodeDxf(readFileSync(path)).text };
        return { text: readFileSync(path, 'utf8') };
      } catch (e) {
        const code = (e as NodeJS.ErrnoException).code;
        return { error: code === 'ENOENT' ? `${path}: no such file` : `${path}: cannot be read (${code ?? 'error'})` };
      }
    },
    writeFile(path, text) {
      const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
      try {
        writeFileSync(tmp, text);
        renameSync(tmp, path);
        return {};
      } catch (e) {
        try { unlinkSync(tmp); } catch { /* nothing to remove */ }
        return { error: `${path}: cannot be written (${(e as NodeJS.ErrnoException).code ?? 'error'})` };
      }
    },
    onInterrupt(handler) {
      process.on('SIGINT', handler);
      return () => process.off('SIGINT', handler);
    },
    stderrIsTTY: !!process.stderr.isTTY,
  };
}
