// A file crosses from the main process to the solver worker as its bytes. The worker decodes them (UTF-8,
// as the readers take it, a leading byte-order mark dropped; a DXF in its own code page) and a table header hashes the bytes
// themselves, so the SHA-256 it records is the one `sha256sum` prints for the file. Pure: no Node imports.

import { decodeDxf } from '../solver/formats/dxf-text';

export type DecodeOutcome = { ok: true; text: string } | { ok: false; code: string; message: string; line: number };

const BOM = [0xef, 0xbb, 0xbf];

/** Whether a value is a Uint8Array of any realm (a worker's, a test window's): `instanceof` sees only its own. */
export function isBytes(value: unknown): value is Uint8Array {
  return ArrayBuffer.isView(value) && Object.prototype.toString.call(value) === '[object Uint8Array]';
}

function hasBom(bytes: Uint8Array): boolean {
  return bytes.length >= 3 && bytes[0] === BOM[0] && bytes[1] === BOM[1] && bytes[2] === BOM[2];
}

/**
 * Offset of the byte at which UTF-8 decoding fails (WHATWG Encoding's decoder, which refuses overlong forms,
 * surrogates and code points above U+10FFFF as RFC 3629 does), the length of the bytes when they end inside
 * a character, or -1 when they are valid. Decodes in blocks, then byte by byte only inside the bad block.
 */
export function firstInvalidUtf8(bytes: Uint8Array): number {
  const strict = () => new TextDecoder('utf-8', { fatal: true, ignoreBOM: true });
  try {
    strict().decode(bytes);
    return -1;
  } catch {
    // find it below
  }
  const BLOCK = 1 << 16;
  let decoder = strict();
  let block = 0;
  for (; block < bytes.length; block += BLOCK) {
    try {
      decoder.decode(bytes.subarray(block, block + BLOCK), { stream: true });
    } catch {
      break;
    }
  }
  if (block >= bytes.length) return bytes.length; // every block decoded: the text ends inside a character
  // the same decoder state at the bad block's start, then one byte at a time
  decoder = strict();
  if (block > 0) decoder.decode(bytes.subarray(0, block), { stream: true });
  for (let i = block; i < Math.min(bytes.length, block + BLOCK); i++) {
    try {
      decoder.decode(bytes.subarray(i, i + 1), { stream: true });
    } catch {
      return i;
    }
  }
  return block;
}

/** 1-based line of a byte offset (lines end at LF). */
function lineOf(bytes: Uint8Array, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset && i < bytes.length; i++) if (bytes[i] === 0x0a) line++;
  return line;
}

/**
 * The text of a pattern file's bytes as the readers take it: a DXF file in its own encoding (UTF-8 from
 * AutoCAD 2007 on, else the code page its header names: solver/formats/dxf-text.ts), anything else UTF-8.
 */
export function fileText(bytes: Uint8Array, name: string): DecodeOutcome {
  return /\.dxf$/i.test(name) ? { ok: true, text: decodeDxf(bytes).text } : decodeUtf8(bytes, name);
}

/** The text of a file's bytes, or a message naming the first byte that is not UTF-8 and its line. */
export function decodeUtf8(bytes: Uint8Array, name: string): DecodeOutcome {
  const body = hasBom(bytes) ? bytes.subarray(3) : bytes;
  try {
    return { ok: true, text: new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(body) };
  } catch {
    const bad = firstInvalidUtf8(body) + (body === bytes ? 0 : 3);
    const line = lineOf(bytes, bad);
    const where = bad >= bytes.length ? 'it ends in the middle of a character' : `byte ${bad} (line ${line}, value 0x${bytes[bad].toString(16).padStart(2, '0')}) is not valid UTF-8`;
    return { ok: false, code: 'not-text', message: `${name} is not UTF-8 text: ${where}. Save it as UTF-8 and open it again.`, line };
  }
}
