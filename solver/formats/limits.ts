// Limits on what a file reader accepts, and the guarded first step of reading any JSON text.
// The limits keep a shell responsive and its memory bounded on a hostile or mistaken file:
//  - MAX_TEXT_BYTES: 32 MiB of UTF-8. A 250,000-crease project is about 20 MiB written by us.
//  - MAX_VERTICES, MAX_CREASES: 250,000 each. Validation and face tracing are O(n log n); the solver
//    itself may set tighter limits of its own.
//  - MAX_NESTING: 512 levels of arrays/objects. Our formats need 4; deep nesting only serves to
//    exhaust the stack of a recursive consumer (JSON.stringify when a kept FOLD field is written back).
import type { Message } from '../types';

export const MAX_TEXT_BYTES = 32 * 1024 * 1024;
export const MAX_VERTICES = 250_000;
export const MAX_CREASES = 250_000;
export const MAX_NESTING = 512;

/** UTF-8 length of a string, counting only until it passes `stopAbove` (so a huge text costs little). */
export function utf8Length(text: string, stopAbove = Infinity): number {
  let n = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) n += 1;
    else if (c < 0x800) n += 2;
    else if (c >= 0xd800 && c <= 0xdbff && i + 1 < text.length) {
      const d = text.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        n += 4;
        i++;
      } else n += 3;
    } else n += 3;
    if (n > stopAbove) return n;
  }
  return n;
}

/** Line and column (both 1-based) of a character offset. */
export function lineColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  const end = Math.min(Math.max(offset, 0), text.length);
  for (let i = 0; i < end; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: end - lineStart + 1 };
}

/**
 * Offset of the first JSON syntax error, or -1 when the text is valid JSON (RFC 8259).
 * JSON.parse's own messages differ between engines (Node, Electron, browsers) and some carry no
 * position, so the location is found by this small iterative scanner instead.
 */
export function firstJsonError(text: string): { offset: number; expected: string } | undefined {
  let i = 0;
  const n = text.length;
  const ws = () => {
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 32 || c === 9 || c === 10 || c === 13) i++;
      else break;
    }
  };
  // stack of containers: '[' or '{'; state says what may come next
  const stack: string[] = [];
  type State = 'value' | 'after-value' | 'key-or-end' | 'key' | 'colon' | 'value-or-end';
  let state: State = 'value';
  const fail = (expected: string) => ({ offset: i, expected });
  const scanString = (): boolean => {
    i++; // opening quote
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 34) {
        i++;
        return true;
      }
      if (c < 32) return false;
      if (c === 92) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) {
            i++;
            return false;
          }
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else {
          i++;
          return false;
        }
      } else i++;
    }
    return false;
  };
  const numberRe = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
  for (;;) {
    ws();
    if (state === 'value' || state === 'value-or-end') {
      if (i >= n) return fail('a value');
      const ch = text[i];
      if (state === 'value-or-end' && ch === ']') {
        stack.pop();
        i++;
        state = 'after-value';
        continue;
      }
      if (ch === '{') {
        stack.push('{');
        i++;
        state = 'key-or-end';
        continue;
      }
      if (ch === '[') {
        stack.push('[');
        i++;
        state = 'value-or-end';
        continue;
      }
      if (ch === '"') {
        if (!scanString()) return fail('a complete string');
      } else if (text.startsWith('true', i)) i += 4;
      else if (text.startsWith('false', i)) i += 5;
      else if (text.startsWith('null', i)) i += 4;
      else {
        numberRe.lastIndex = i;
        const m = numberRe.exec(text);
        if (!m || m[0].length === 0) return fail('a value');
        i += m[0].length;
      }
      state = 'after-value';
      continue;
    }
    if (state === 'after-value') {
      if (stack.length === 0) {
        if (i < n) return fail('the end of the text');
        return undefined;
      }
      const top = stack[stack.length - 1];
      const ch = text[i];
      if (ch === ',') {
        i++;
        state = top === '[' ? 'value' : 'key';
      } else if ((ch === ']' && top === '[') || (ch === '}' && top === '{')) {
        stack.pop();
        i++;
      } else return fail(top === '[' ? "',' or ']'" : "',' or '}'");
      continue;
    }
    if (state === 'key-or-end' || state === 'key') {
      if (state === 'key-or-end' && text[i] === '}') {
        stack.pop();
        i++;
        state = 'after-value';
        continue;
      }
      if (text[i] !== '"') return fail('a quoted key');
      if (!scanString()) return fail('a complete string');
      state = 'colon';
      continue;
    }
    // colon
    if (text[i] !== ':') return fail("':'");
    i++;
    state = 'value';
  }
}

/** Deepest nesting of arrays and objects, outside strings; stops counting past `stopAbove`. */
export function nestingDepth(text: string, stopAbove = Infinity): number {
  let depth = 0;
  let max = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 92) i++;
      else if (c === 34) inString = false;
    } else if (c === 34) inString = true;
    else if (c === 91 || c === 123) {
      depth++;
      if (depth > max) {
        max = depth;
        if (max > stopAbove) return max;
      }
    } else if (c === 93 || c === 125) depth--;
  }
  return max;
}

/**
 * Parse JSON text within the limits above. Never throws: a refused text gives messages
 * `file-too-large`, `too-deeply-nested` or `not-json` (with line and column).
 */
export function readJsonText(text: unknown, what = 'file'): { value?: unknown; messages: Message[] } {
  if (typeof text !== 'string') {
    return { messages: [{ severity: 'error', code: 'not-text', text: `The ${what} is not text.` }] };
  }
  const bytes = utf8Length(text, MAX_TEXT_BYTES);
  if (bytes > MAX_TEXT_BYTES) {
    return {
      messages: [
        {
          severity: 'error',
          code: 'file-too-large',
          text: `The ${what} is larger than ${MAX_TEXT_BYTES / (1024 * 1024)} MiB, the most this program reads.`,
        },
      ],
    };
  }
  const depth = nestingDepth(text, MAX_NESTING);
  if (depth > MAX_NESTING) {
    return {
      messages: [
        {
          severity: 'error',
          code: 'too-deeply-nested',
          text: `The ${what} nests arrays or objects more than ${MAX_NESTING} levels deep; no pattern file needs that.`,
        },
      ],
    };
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    value = undefined;
  }
  if (value !== undefined) {
    // JSON.parse keeps the last of two equal keys silently; other readers keep the first, so refuse both
    const dup = firstDuplicateKey(text);
    if (!dup) return { value, messages: [] };
    const { line, column } = lineColumn(text, dup.offset);
    return {
      messages: [
        {
          severity: 'error',
          code: 'duplicate-key',
          text: `The ${what} has the key ${JSON.stringify(dup.key)} twice in ${dup.path || 'its top-level object'} (the second at line ${line}, column ${column}); readers disagree on which one counts, so remove one.`,
          where: { line, field: dup.path ? `${dup.path}.${dup.key}` : dup.key },
        },
      ],
    };
  }
  const err = firstJsonError(text);
  const offset = err ? err.offset : 0;
  const { line, column } = lineColumn(text, offset);
  const near = JSON.stringify(text.slice(offset, offset + 12));
  return {
    messages: [
      {
        severity: 'error',
        code: 'not-json',
        text:
          `The ${what} is not valid JSON: at line ${line}, column ${column}` +
          (err ? ` expected ${err.expected}` : '') +
          (offset < text.length ? ` near ${near}` : ' (the text ends too early)') +
          '.',
        where: { line },
      },
    ],
  };
}

/**
 * The first key that appears twice in one object of a valid JSON text (RFC 8259 says names "SHOULD be
 * unique" and leaves duplicates to the reader), with its offset and the path of the object holding it
 * (e.g. `creases[3]`). Keys are compared after their escapes are decoded, so "a" and "\\u0061" are equal.
 */
export function firstDuplicateKey(text: string): { offset: number; key: string; path: string } | undefined {
  // per open container: an object's keys so far (a short list; most objects have a few) or an array's index
  type Frame = { object: true; keys: string[]; set?: Set<string>; key?: string } | { object: false; index: number };
  const stack: Frame[] = [];
  const path = () => {
    let out = '';
    for (let k = 0; k < stack.length - 1; k++) {
      const f = stack[k];
      out += f.object ? (out === '' ? f.key : `.${f.key}`) : `[${f.index}]`;
    }
    return out;
  };
  let expectKey = false;
  const n = text.length;
  for (let i = 0; i < n; i++) {
    const c = text.charCodeAt(i);
    if (c === 34) {
      // a string: find its end, skipping escaped quotes
      const start = i;
      let escaped = false;
      let j = i + 1;
      for (;;) {
        const q = text.indexOf('"', j);
        if (q < 0) return undefined;
        let b = q - 1;
        while (b > start && text.charCodeAt(b) === 92) b--;
        if ((q - 1 - b) % 2 === 0) { j = q; break; }
        escaped = true;
        j = q + 1;
      }
      if (expectKey) {
        const raw = text.slice(start + 1, j);
        const key = escaped || raw.includes('\\') ? (JSON.parse(text.slice(start, j + 1)) as string) : raw;
        const top = stack[stack.length - 1] as { object: true; keys: string[]; set?: Set<string>; key?: string };
        const seen = top.set ? top.set.has(key) : top.keys.includes(key);
        top.key = key;
        if (seen) return { offset: start, key, path: path() };
        if (top.set) top.set.add(key);
        else if (top.keys.push(key) > 16) top.set = new Set(top.keys);
        expectKey = false;
      }
      i = j;
    } else if (c === 123) {
      stack.push({ object: true, keys: [] });
      expectKey = true;
    } else if (c === 91) {
      stack.push({ object: false, index: 0 });
    } else if (c === 125 || c === 93) {
      stack.pop();
      expectKey = false;
    } else if (c === 44) {
      const top = stack[stack.length - 1];
      if (top?.object) expectKey = true;
      else if (top) top.index++;
    }
  }
  return undefined;
}
