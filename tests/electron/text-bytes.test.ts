// Decoding a file's bytes in the app: the command line's decoder (solver/formats/text.ts, tested against the
// Unicode Standard's table of well-formed sequences in tests/readers-bytes.test.ts), its message carried
// with the file's name and line. Examples from RFC 3629 §7 (valid) and §10 (overlong "/" as C0 AF, from memory).
import { describe, expect, it } from 'vitest';
import { decodeUtf8, fileText, isBytes } from '../../electron/text-bytes';

describe('UTF-8 of a file in the app', () => {
  it('keeps valid text whole and drops a byte-order mark', () => {
    expect(decodeUtf8(Uint8Array.from([0x41, 0xe2, 0x89, 0xa2, 0xce, 0x91, 0x2e]), 'x')).toEqual({ ok: true, text: 'A\u2262\u0391.' });
    expect(decodeUtf8(Uint8Array.from([0xef, 0xbb, 0xbf, 0xe6, 0x97, 0xa5]), 'x')).toEqual({ ok: true, text: '\u65e5' });
  });

  it('names the file, the line and the byte where the text stops being UTF-8', () => {
    const bad = decodeUtf8(Uint8Array.from([0x7b, 0x0a, 0x0a, 0xc0, 0xaf]), 'p.json');
    expect(bad).toMatchObject({ ok: false, code: 'not-text', line: 3 });
    expect(bad.ok || bad.message).toMatch(/^p\.json: The file is not UTF-8 text: at line 3, byte 1 of the line \(byte 3 of the file\) the bytes c0 af/);
    // a surrogate half (U+D800 as ED A0 80), a code point above U+10FFFF (F4 90 80 80), a cut character
    expect(decodeUtf8(Uint8Array.from([0xed, 0xa0, 0x80]), 'x').ok).toBe(false);
    expect(decodeUtf8(Uint8Array.from([0xf4, 0x90, 0x80, 0x80]), 'x').ok).toBe(false);
    expect(decodeUtf8(Uint8Array.from([0x61, 0xe2, 0x82]), 'x').ok).toBe(false);
  });

  it('reads a DXF in its code page and anything else as UTF-8', () => {
    // 0xB0 is "°" in Windows-1252, the code page of an R12 file without $DWGCODEPAGE (common practice)
    const dxf = Uint8Array.from([...new TextEncoder().encode('0\nSECTION\n999\n'), 0xb0, 0x0a]);
    expect(fileText(dxf, 'a.dxf')).toMatchObject({ ok: true });
    expect((fileText(dxf, 'a.dxf') as { text: string }).text).toContain('\u00b0');
    expect(fileText(dxf, 'a.json').ok).toBe(false);
  });

  it('tells bytes of any realm from other values', () => {
    expect(isBytes(new Uint8Array(2))).toBe(true);
    expect(isBytes(new Uint16Array(2))).toBe(false);
    expect(isBytes([1, 2])).toBe(false);
  });
});
