// The angle table writer and its file hash.
import { describe, expect, it } from 'vitest';
import { createHash, randomBytes } from 'node:crypto';
import { sha256, sha256Bytes } from '../solver/outputs/sha256';
import { angleTable, AngleTableWriter, csvCell, num, type RowField } from '../solver/outputs/table';
import { runSteps, sweep, sweepSteps, type SweepSample } from '../solver/paths/sweep';
import { CAUTIONS } from '../solver/formats/cautions';
import { jsonText, LazyArray, writeJson } from '../solver/formats/json-text';
import fc from 'fast-check';
import { directionsFromSectors, vertexPattern } from './support/vertex';

const D = Math.PI / 180;

describe('SHA-256', () => {
  it('matches the FIPS 180-4 example messages (NIST)', () => {
    expect(sha256('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(sha256('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
    expect(sha256('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')).toBe('248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1');
  });

  it('agrees with node:crypto (a general-purpose reference) on texts of every length around the block size and on random bytes', () => {
    for (let n = 0; n < 140; n++) {
      const t = 'hinge°'.repeat(n).slice(0, n);
      expect(sha256(t)).toBe(createHash('sha256').update(t, 'utf8').digest('hex'));
    }
    for (const n of [1, 55, 56, 63, 64, 65, 1000, 100_000]) {
      const b = new Uint8Array(randomBytes(n));
      expect(sha256Bytes(b)).toBe(createHash('sha256').update(b).digest('hex'));
    }
  });
});

describe('angle table (format version 2)', () => {
  const p = vertexPattern(directionsFromSectors([60, 100, 120, 80]), ['V', 'M', 'M', 'M']);
  p.creases[2].label = 'hinge, "B"';
  p.labelIndex.set('hinge, "B"', 2);
  const given = [0, 30, 60, 90];
  const r = sweep(p, { drive: 0, from: 0, to: 90 * D, samples: given.map((d) => d * D) });
  const driveDegrees = new Map(given.map((d) => [d * D, d]));
  const header = { patternName: 'coupon', file: 'c.json', fileSha256: 'ab', version: '9.9.9', date: '2030-01-01T00:00:00.000Z', command: 'hingeplan table c.json --drive c0' };

  it('CSV: what was asked before the rows, a quoted label (RFC 4180), one row per sample, what was found after', () => {
    const text = angleTable(p, r, header, [], { format: 'csv', rates: true, driveDegrees });
    const lines = text.trimEnd().split('\n');
    expect(lines[0]).toBe('# format: hingeplan-angle-table');
    expect(lines[1]).toBe('# version: 2');
    expect(lines).toContain(`# cautions: ${CAUTIONS}`);
    expect(lines).toContain('# command: hingeplan table c.json --drive c0');
    const headAt = lines.findIndex((l) => !l.startsWith('#'));
    expect(lines[headAt]).toBe('drive,c0,c1,"hinge, ""B""",c3,rate:c0,rate:c1,"rate:hinge, ""B""",rate:c3,max_residual,condition,near_singular');
    const rows = lines.slice(headAt + 1).filter((l) => !l.startsWith('#'));
    // the drive column echoes the values as given: 30, not the 29.999999999999996 of 30° → rad → °
    expect(rows.map((l) => l.split(',')[0])).toEqual(['0', '30', '60', '90']);
    expect(rows[0].endsWith(',inf,1')).toBe(true); // the flat state is singular
    const after = lines.slice(headAt + 1 + rows.length);
    expect(after).toContain('# status: complete');
    expect(after).toContain('# sampleCount: 4');
    expect(after.some((l) => l.startsWith('# largestResidual: '))).toBe(true);
  });

  it('CSV cells keep every digit by default: each reads back to the solver\'s double (full precision)', () => {
    const text = angleTable(p, r, header, [], { format: 'csv', driveDegrees });
    const rows = text.split('\n').filter((l) => l && !l.startsWith('#')).slice(1);
    const cells = rows[2].split(',');
    // column 2 is c1; Number(text) must give back exactly the degrees the solver holds
    expect(Number(cells[2])).toBe(r.samples[2].angles[1] * (180 / Math.PI));
  });

  it('JSON: columnar rows (the columns once, an array of angles and of rates per sample) that parse', () => {
    const j = JSON.parse(angleTable(p, r, header, [], { format: 'json', rates: true, driveDegrees }));
    expect(j.version).toBe(2);
    expect(j.cautions).toBe(CAUTIONS);
    expect(j.columns).toEqual(['c0', 'c1', 'hinge, "B"', 'c3']);
    expect(j.samples).toHaveLength(4);
    expect(j.samples.map((s: { drive: number }) => s.drive)).toEqual(given);
    expect(j.samples[1].angles[2]).toBe(r.samples[1].angles[2] * (180 / Math.PI));
    expect(j.samples[1].rates[1]).toBe(r.samples[1].rates[1]);
    expect(j.samples[1].angles[0]).toBe(30); // the drive's own column echoes the value as given
    expect(j.samples[0].condition).toBeNull();
    expect(j.largestResidual).toBeLessThanOrEqual(1e-10);
    expect(j.status).toBe('complete');
    expect(j.sampleCount).toBe(4);
  });

  it('JSON is compact by default and --pretty only adds white space (same value)', () => {
    const compact = angleTable(p, r, header, [], { format: 'json', rates: true, driveDegrees });
    const pretty = angleTable(p, r, header, [], { format: 'json', rates: true, driveDegrees, pretty: true });
    expect(compact.split('\n').length).toBe(r.samples.length + 3); // header line, one line per sample, the tail
    expect(pretty.length).toBeGreaterThan(compact.length);
    expect(JSON.parse(pretty)).toEqual(JSON.parse(compact));
  });

  it('digits: every number rounded to n significant digits (as Number.prototype.toPrecision, ECMA-262)', () => {
    const j = JSON.parse(angleTable(p, r, header, [], { format: 'json', rates: true, driveDegrees, digits: 4 }));
    const full = JSON.parse(angleTable(p, r, header, [], { format: 'json', rates: true, driveDegrees }));
    for (let k = 0; k < 4; k++) {
      for (let i = 0; i < 4; i++) expect(j.samples[k].angles[i]).toBe(+full.samples[k].angles[i].toPrecision(4));
    }
  });

  it('a per-sample field declared once appears in the header, as CSV columns, as JSON members and in the tail', () => {
    const field: RowField<SweepSample> = {
      header: { bent: { checked: true, threshold: 45 } },
      columns: ['bent'],
      csv: (s) => [Math.abs(s.angles[1]) > 45 * D ? '1' : '0'],
      json: (s) => ({ bent: Math.abs(s.angles[1]) > 45 * D }),
      tail: () => ({ bentSamples: r.samples.filter((s) => Math.abs(s.angles[1]) > 45 * D).length }),
    };
    const csv = angleTable(p, r, header, [], { format: 'csv', driveDegrees, fields: [field] });
    expect(csv).toContain('# bent: {"checked":true,"threshold":45}');
    const rows = csv.split('\n').filter((l) => l && !l.startsWith('#'));
    expect(rows[0].endsWith(',near_singular,bent')).toBe(true);
    const j = JSON.parse(angleTable(p, r, header, [], { format: 'json', driveDegrees, fields: [field] }));
    expect(j.bent).toEqual({ checked: true, threshold: 45 });
    expect(j.samples.map((s: { bent: boolean }) => s.bent)).toEqual(r.samples.map((s) => Math.abs(s.angles[1]) > 45 * D));
    const bentCount = r.samples.filter((s) => Math.abs(s.angles[1]) > 45 * D).length;
    expect(j.bentSamples).toBe(bentCount);
    expect(csv).toContain(`# bentSamples: ${bentCount}`);
  });

  it('written piece by piece while the sweep runs, the table is the same as written at the end', () => {
    const parts: string[] = [];
    const w = new AngleTableWriter(p, header, 0, [], { format: 'json', rates: true, driveDegrees }, { write: (t) => parts.push(t) });
    w.begin();
    const streamed = runSteps(sweepSteps(p, { drive: 0, from: 0, to: 90 * D, samples: given.map((d) => d * D), keepSamples: false }, { onSample: (s) => w.sample(s) }));
    expect(streamed.samples).toHaveLength(0); // not kept: memory does not grow with the samples
    w.end(streamed);
    expect(parts.length).toBeGreaterThan(4);
    expect(JSON.parse(parts.join(''))).toEqual(JSON.parse(angleTable(p, r, header, [], { format: 'json', rates: true, driveDegrees })));
  });

  it('control characters in a label are escaped in CSV and kept exactly (as \\u escapes) in JSON', () => {
    const q = vertexPattern(directionsFromSectors([60, 100, 120, 80]), ['V', 'M', 'M', 'M']);
    q.creases[1].label = 'a\u001b]0;pwned\u0007\u009bb';
    q.labelIndex.set(q.creases[1].label, 1);
    const rr = sweep(q, { drive: 0, from: 0, to: 30 * D, samples: [0, 30 * D] });
    const csv = angleTable(q, rr, header, [], { format: 'csv' });
    // eslint-disable-next-line no-control-regex
    expect(/[\u0000-\u0009\u000b-\u001f\u007f-\u009f]/.test(csv)).toBe(false);
    expect(csv).toContain('a\\x1b]0;pwned\\x07\\x9bb');
    const json = angleTable(q, rr, header, [], { format: 'json' });
    // eslint-disable-next-line no-control-regex
    expect(/[\u0000-\u0009\u000b-\u001f\u007f-\u009f]/.test(json)).toBe(false);
    expect(JSON.parse(json).columns[1]).toBe(q.creases[1].label);
  });

  it('numbers for display: 15 significant digits, shortest form; CSV cells quoted per RFC 4180', () => {
    expect(num((30 * D) / D)).toBe('30');
    expect(num(-0)).toBe('0');
    expect(num(1 / 3)).toBe('0.333333333333333');
    expect(num(NaN)).toBe('');
    expect(num(Infinity)).toBe('inf');
    expect(csvCell('a,b')).toBe('"a,b"');
  });
});

describe('JSON text', () => {
  it('compact JSON text is JSON.stringify’s (ECMA-262) for JSON values of printable text (C1 controls are escaped on top); indented text parses to the same value', () => {
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 4 }), (v) => {
      expect(jsonText(v)).toBe(JSON.stringify(v));
      expect(JSON.parse(jsonText(v, true))).toEqual(JSON.parse(JSON.stringify(v)));
    }), { numRuns: 500 });
  });

  it('written a piece at a time, it is the same text as written whole', () => {
    fc.assert(fc.property(fc.jsonValue({ maxDepth: 4 }), fc.boolean(), (v, pretty) => {
      const parts: string[] = [];
      writeJson((t) => parts.push(t), v, pretty);
      expect(parts.join('')).toBe(jsonText(v, pretty));
    }), { numRuns: 500 });
  });

  it('an array made item by item as it is written is the same text as the array written whole', () => {
    fc.assert(fc.property(fc.array(fc.jsonValue({ maxDepth: 3 }), { maxLength: 6 }), fc.boolean(), (items, pretty) => {
      let made = 0;
      const lazy = new LazyArray(items.length, (i) => { made++; return items[i]; });
      const parts: string[] = [];
      writeJson((t) => parts.push(t), { list: lazy, after: 1 }, pretty);
      expect(made).toBe(items.length);
      // the reference: JSON.parse of the text equals the array (JSON, RFC 8259), and the text equals the
      // array's own text when no item is a plain value on a pretty one-line array
      expect(JSON.parse(parts.join(''))).toEqual(JSON.parse(JSON.stringify({ list: items, after: 1 })));
      if (!pretty || items.some((x) => x !== null && typeof x === 'object')) expect(parts.join('')).toBe(jsonText({ list: items, after: 1 }, pretty));
    }), { numRuns: 300 });
  });
});
