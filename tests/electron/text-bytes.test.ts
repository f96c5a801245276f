// Decoding a file's bytes: UTF-8 only, the first bad byte named. The reference is the WHATWG Encoding
// Standard's UTF-8 decoder as Node ships it (TextDecoder, fatal mode), which refuses what RFC 3629 refuses:
// overlong forms, surrogates, code points above U+10FFFF, stray continuation bytes, truncated sequences.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { decodeUtf8, firstInvalidUtf8 } from '../../electron/text-bytes';

const whatwg = (b: Uint8Array, stream = false) => {
  try {
    new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(b, { stream });
    return true;
  } catch {
    return false;
  }
};

describe('UTF-8 of a file', () => {
  it('finds the byte where decoding fails, as the WHATWG decoder does, for any bytes', () => {
    // bytes drawn mostly from the interesting ranges: ASCII, continuation bytes, lead bytes, invalid C0/C1/F5+
    const byte = fc.oneof(fc.integer({ min: 0x20, max: 0x7e }), fc.integer({ min: 0x80, max: 0xbf }), fc.integer({ min: 0xc0, max: 0xff }));
    fc.assert(
      fc.property(fc.array(byte, { maxLength: 40 }), (arr) => {
        const b = Uint8Array.from(arr);
        const at = firstInvalidUtf8(b);
        expect(at === -1).toBe(whatwg(b));
        if (at >= 0 && at < b.length) {
          // everything before it decodes (a character may still be open), the byte itself makes it fail
          expect(whatwg(b.subarray(0, at), true)).toBe(true);
          expect(whatwg(b.subarray(0, at + 1), true)).toBe(false);
        }
        if (at === b.length) expect(whatwg(b, true)).toBe(true);
      }),
      { numRuns: 3000, seed: 7 },
    );
  });

  it('finds it past the first block of a long file', () => {
    const b = new Uint8Array(200_000).fill(0x61);
    b[150_001] = 0xff;
    expect(firstInvalidUtf8(b)).toBe(150_001);
    // a lead byte at the end of one block whose continuation is bad in the next
    const c = new Uint8Array(1 << 17).fill(0x61);
    c[(1 << 16) - 1] = 0xe2;
    c[1 << 16] = 0x41;
    expect(firstInvalidUtf8(c)).toBe(1 << 16);
  });

  it('names the line, the byte and its value; drops a byte-order mark; keeps valid text whole', () => {
    // examples from RFC 3629 §7 (valid) and its §10 (overlong "/" as C0 AF, from memory)
    expect(decodeUtf8(Uint8Array.from([0x41, 0xe2, 0x89, 0xa2, 0xce, 0x91, 0x2e]), 'x')).toEqual({ ok: true, text: 'A\u2262\u0391.' });
    expect(decodeUtf8(Uint8Array.from([0xef, 0xbb, 0xbf, 0xe6, 0x97, 0xa5]), 'x')).toEqual({ ok: true, text: '\u65e5' });
    const bad = decodeUtf8(Uint8Array.from([0x7b, 0x0a, 0x0a, 0xc0, 0xaf]), 'p.json');
    expect(bad).toMatchObject({ ok: false, code: 'not-text', line: 3 });
    expect(bad.ok || bad.message).toMatch(/^p\.json is not UTF-8 text: byte 3 \(line 3, value 0xc0\) is not valid UTF-8/);
    // a surrogate half (U+D800 as ED A0 80) and a code point above U+10FFFF (F4 90 80 80)
    expect(decodeUtf8(Uint8Array.from([0xed, 0xa0, 0x80]), 'x').ok).toBe(false);
    expect(decodeUtf8(Uint8Array.from([0xf4, 0x90, 0x80, 0x80]), 'x').ok).toBe(false);
    const cut = decodeUtf8(Uint8Array.from([0x61, 0xe2, 0x82]), 'x');
    expect(cut.ok || cut.message).toMatch(/ends in the middle of a character/);
  });
});
