// A file crosses from the main process to the solver worker as its bytes. The worker decodes them as the
// command line does (solver/formats/text.ts and project.ts: UTF-8, a leading byte-order mark dropped; a DXF
// in its own code page), so both refuse the same files with the same message, and a table header hashes the
// bytes themselves, so the SHA-256 it records is the one `sha256sum` prints for the file. Pure: no Node imports.

import { patternFileText } from '../solver/formats/project';
import { decodeUtf8 as decodeUtf8Messages } from '../solver/formats/text';
import type { Message } from '../solver/types';

export type DecodeOutcome = { ok: true; text: string } | { ok: false; code: string; message: string; line?: number };

/** Whether a value is a Uint8Array of any realm (a worker's, a test window's): `instanceof` sees only its own. */
export function isBytes(value: unknown): value is Uint8Array {
  return ArrayBuffer.isView(value) && Object.prototype.toString.call(value) === '[object Uint8Array]';
}

function outcome(decoded: { text?: string; messages: Message[] }, name: string): DecodeOutcome {
  if (decoded.text !== undefined) return { ok: true, text: decoded.text };
  const m = decoded.messages[0];
  return { ok: false, code: m.code === 'not-utf8' ? 'not-text' : m.code, message: `${name}: ${m.text}`, line: m.where?.line };
}

/** The text of a pattern file's bytes as the readers take it: a DXF file in its own encoding, anything else UTF-8. */
export function fileText(bytes: Uint8Array, name: string): DecodeOutcome {
  return outcome(patternFileText(bytes, name), name);
}

/** The text of a file's bytes, or a message naming the first byte that is not UTF-8 and its line. */
export function decodeUtf8(bytes: Uint8Array, name: string): DecodeOutcome {
  return outcome(decodeUtf8Messages(bytes, 'file'), name);
}
