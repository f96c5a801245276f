// Bytes of a file to text: every reader of the shells starts here, so the command line and the app refuse
// the same files with the same message. Invalid UTF-8 is refused with its place (never replaced by U+FFFD,
// which would change the text and its hash); a leading byte-order mark is dropped.

import type { Message } from '../types';
import { MAX_TEXT_BYTES } from './limits';

/**
 * Offset of the first byte that is not part of a well-formed UTF-8 sequence (Unicode Standard, ch. 3,
 * Table 3-7 "Well-Formed UTF-8 Byte Sequences": no overlong forms, no surrogates, nothing above U+10FFFF),
 * or -1 when every byte is.
 */
export function firstInvalidUtf8(bytes: Uint8Array): number {
  const n = bytes.length;
  let i = 0;
  while (i < n) {
    const b = bytes[i];
    if (b < 0x80) { i++; continue; }
    let need: number, lo = 0x80, hi = 0xbf;
    if (b >= 0xc2 && b <= 0xdf) need = 1;
    else if (b === 0xe0) { need = 2; lo = 0xa0; }
    else if (b >= 0xe1 && b <= 0xec) need = 2;
    else if (b === 0xed) { need = 2; hi = 0x9f; }
    else if (b >= 0xee && b <= 0xef) need = 2;
    else if (b === 0xf0) { need = 3; lo = 0x90; }
    else if (b >= 0xf1 && b <= 0xf3) need = 3;
    else if (b === 0xf4) { need = 3; hi = 0x8f; }
    else return i;
    for (let k = 1; k <= need; k++) {
      const c = bytes[i + k];
      if (c === undefined) return i;
      if (k === 1 ? c < lo || c > hi : c < 0x80 || c > 0xbf) return i;
    }
    i += need + 1;
  }
  return -1;
}

/** Line (1-based) and byte column (1-based) of a byte offset. */
function byteLineColumn(bytes: Uint8Array, offset: number): { line: number; column: number } {
  let line = 1, start = 0;
  for (let i = 0; i < offset; i++) if (bytes[i] === 10) { line++; start = i + 1; }
  return { line, column: offset - start + 1 };
}

/**
 * A file's bytes as text, or a message: `file-too-large` above the readers' 32 MiB, `not-utf8` with the
 * line and the byte where the text stops being UTF-8. Never throws.
 */
export function decodeUtf8(bytes: Uint8Array, what = 'file'): { text?: string; messages: Message[] } {
  if (bytes.length > MAX_TEXT_BYTES) {
    return { messages: [{ severity: 'error', code: 'file-too-large', text: `The ${what} is ${(bytes.length / 1048576).toFixed(1)} MiB, larger than the ${MAX_TEXT_BYTES / 1048576} MiB this program reads.` }] };
  }
  try {
    // fatal: refuse, never substitute; the decoder drops a leading byte-order mark
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(bytes), messages: [] };
  } catch {
    const at = Math.max(0, firstInvalidUtf8(bytes));
    const { line, column } = byteLineColumn(bytes, at);
    const shown = Array.from(bytes.subarray(at, at + 4), (b) => b.toString(16).padStart(2, '0')).join(' ');
    return {
      messages: [{
        severity: 'error',
        code: 'not-utf8',
        text: `The ${what} is not UTF-8 text: at line ${line}, byte ${column} of the line (byte ${at} of the file) the bytes ${shown} are not a UTF-8 character. Save it as UTF-8.`,
        where: { line },
      }],
    };
  }
}
