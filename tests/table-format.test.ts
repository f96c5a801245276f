// The angle table writer and its file hash.
import { describe, expect, it } from 'vitest';
import { createHash, randomBytes } from 'node:crypto';
import { sha256, sha256Bytes } from '../solver/outputs/sha256';
import { angleTable, csvCell, num } from '../solver/outputs/table';
import { sweep } from '../solver/paths/sweep';
import { CAUTIONS } from '../solver/formats/cautions';
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

describe('angle table', () => {
  const p = vertexPattern(directionsFromSectors([60, 100, 120, 80]), ['V', 'M', 'M', 'M']);
  p.creases[2].label = 'hinge, "B"';
  p.labelIndex.set('hinge, "B"', 2);
  const r = sweep(p, { drive: 0, from: 0, to: 90 * D, step: 30 * D });
  const header = { patternName: 'coupon', file: 'c.json', fileSha256: 'ab', version: '9.9.9', date: '2030-01-01T00:00:00.000Z', command: 'hingeplan table c.json --drive c0' };

  it('CSV: header lines, a quoted label, one row per sample, events after', () => {
    const text = angleTable(p, r, header, [], { format: 'csv', rates: true });
    const lines = text.trimEnd().split('\n');
    expect(lines[0]).toBe('# format: hingeplan-angle-table');
    expect(lines).toContain(`# cautions: ${CAUTIONS}`);
    expect(lines).toContain('# command: hingeplan table c.json --drive c0');
    const head = lines.find((l) => !l.startsWith('#'))!;
    expect(head).toBe('drive,c0,c1,"hinge, ""B""",c3,rate:c0,rate:c1,"rate:hinge, ""B""",rate:c3,max_residual,condition,near_singular');
    const rows = lines.filter((l) => !l.startsWith('#')).slice(1);
    expect(rows.map((l) => l.split(',')[0])).toEqual(['0', '30', '60', '90']);
    expect(rows[0].endsWith(',inf,1')).toBe(true); // the flat state is singular
  });

  it('JSON: the same metadata, angles and rates by label, and it parses', () => {
    const j = JSON.parse(angleTable(p, r, header, [], { format: 'json', rates: true }));
    expect(j.cautions).toBe(CAUTIONS);
    expect(j.samples).toHaveLength(4);
    expect(j.samples[1].angles['hinge, "B"']).toBeCloseTo(r.samples[1].angles[2] / D, 12);
    expect(j.samples[0].condition).toBeNull();
    expect(j.largestResidual).toBeLessThanOrEqual(1e-10);
  });

  it('numbers: 15 significant digits, shortest form', () => {
    expect(num((30 * D) / D)).toBe('30');
    expect(num(-0)).toBe('0');
    expect(num(1 / 3)).toBe('0.333333333333333');
    expect(num(NaN)).toBe('');
    expect(num(Infinity)).toBe('inf');
    expect(csvCell('a,b')).toBe('"a,b"');
  });
});
