// The readers take a file's bytes: invalid UTF-8 is refused with its place (never replaced), a byte-order
// mark is dropped, and duplicate JSON keys are refused with their place.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { decodeUtf8, firstInvalidUtf8 } from '../solver/formats/text';
import { firstDuplicateKey, readJsonText } from '../solver/formats/limits';
import { loadPatternBytes } from '../solver/formats/load';
import { SAMPLES_DIR } from '../scripts/make-samples';

const coupon = readFileSync(join(SAMPLES_DIR, 'hinge-coupon.hingeplan.json'));

describe('UTF-8', () => {
  it('well-formed and ill-formed sequences of the Unicode Standard, ch. 3, Table 3-7 (from memory)', () => {
    const ok = [[0x41], [0xc2, 0x80], [0xdf, 0xbf], [0xe0, 0xa0, 0x80], [0xed, 0x9f, 0xbf], [0xee, 0x80, 0x80], [0xf0, 0x90, 0x80, 0x80], [0xf4, 0x8f, 0xbf, 0xbf]];
    for (const b of ok) expect(firstInvalidUtf8(Uint8Array.from(b)), b.join(' ')).toBe(-1);
    const bad = [
      [0x80], // a continuation byte alone
      [0xc0, 0x80], [0xc1, 0xbf], // overlong two-byte forms
      [0xe0, 0x80, 0x80], // overlong three-byte form
      [0xed, 0xa0, 0x80], // a surrogate (U+D800)
      [0xf4, 0x90, 0x80, 0x80], // above U+10FFFF
      [0xf5, 0x80, 0x80, 0x80], [0xff],
      [0xe2, 0x82], // cut short
    ];
    for (const b of bad) expect(firstInvalidUtf8(Uint8Array.from([0x61, ...b])), b.join(' ')).toBe(1);
  });

  it('agrees with the WHATWG decoder (TextDecoder with fatal: true, Node’s implementation) on random bytes', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 40 }), (bytes) => {
        let valid = true;
        try { new TextDecoder('utf-8', { fatal: true }).decode(bytes); } catch { valid = false; }
        expect(firstInvalidUtf8(bytes) === -1).toBe(valid);
      }),
      { numRuns: 2000 },
    );
  });

  it('a pattern file with an invalid byte is refused with its line and byte, not read with a replacement character', () => {
    const text = coupon.toString('utf8');
    const at = text.indexOf('"name"');
    const bytes = Buffer.concat([coupon.subarray(0, at + 8), Buffer.from([0xff]), coupon.subarray(at + 8)]);
    const r = loadPatternBytes(bytes, 'c.hingeplan.json');
    expect(r.pattern).toBeUndefined();
    const m = r.messages.find((x) => x.code === 'not-utf8')!;
    const line = text.slice(0, at).split('\n').length;
    expect(m.where!.line).toBe(line);
    expect(m.text).toContain(`line ${line}`);
    expect(m.text).toContain('ff');
  });

  it('a byte-order mark is dropped; the same file without it reads the same', () => {
    const withBom = loadPatternBytes(Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), coupon]), 'c.hingeplan.json');
    const plain = loadPatternBytes(coupon, 'c.hingeplan.json');
    expect(withBom.messages).toEqual([]);
    expect(withBom.pattern!.creases.map((c) => c.label)).toEqual(plain.pattern!.creases.map((c) => c.label));
    expect(decodeUtf8(Uint8Array.from([0xef, 0xbb, 0xbf, 0x61])).text).toBe('a');
  });
});

describe('duplicate JSON keys (RFC 8259 §4: names SHOULD be unique; readers then disagree)', () => {
  it('JSON written from a value has unique keys by construction: none is reported', () => {
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 4 }), (v) => {
      const t = JSON.stringify(v);
      expect(firstDuplicateKey(t)).toBeUndefined();
      expect(firstDuplicateKey(JSON.stringify(v, null, 2))).toBeUndefined();
    }), { numRuns: 500 });
  });

  it('a key repeated in any object is found at its second occurrence, also when written with escapes', () => {
    fc.assert(fc.property(fc.dictionary(fc.string({ maxLength: 4 }), fc.jsonValue({ maxDepth: 2 }), { minKeys: 1, maxKeys: 5 }), fc.nat(), fc.boolean(), (o, pick, escape) => {
      const keys = Object.keys(o);
      const key = keys[pick % keys.length];
      const written = escape && key.length ? `"${[...key].map((ch) => `\\u${ch.charCodeAt(0).toString(16).padStart(4, '0')}`).join('')}"` : JSON.stringify(key);
      const inner = JSON.stringify(o);
      const t = `{"outer":[1,${inner.slice(0, -1)}${inner.length > 2 ? ',' : ''}${written}:0}]}`;
      expect(() => JSON.parse(t)).not.toThrow();
      const d = firstDuplicateKey(t)!;
      expect(d.key).toBe(key);
      expect(d.path).toBe('outer[1]');
      expect(t.slice(d.offset, d.offset + written.length)).toBe(written);
    }), { numRuns: 500 });
  });

  it('the readers refuse a duplicate key with its line, column and field', () => {
    const text = coupon.toString('utf8').replace('"name":', '"name": "first",\n  "name":');
    const r = readJsonText(text, 'project file');
    expect(r.value).toBeUndefined();
    expect(r.messages[0].code).toBe('duplicate-key');
    expect(r.messages[0].where!.field).toBe('name');
    expect(r.messages[0].where!.line).toBe(text.slice(0, text.lastIndexOf('"name":')).split('\n').length);
    const inCrease = coupon.toString('utf8').replace('"assignment":', '"assignment": "M", "assignment":');
    const m = loadPatternBytes(Buffer.from(inCrease), 'c.hingeplan.json').messages[0];
    expect(m.code).toBe('duplicate-key');
    expect(m.where!.field).toBe('creases[0].assignment');
  });
});
