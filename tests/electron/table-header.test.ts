// The header of an app export: the file it names and hashes (the file's own text only when it holds the
// pattern solved), the command line that reproduces the table, and the drive values the app sweeps at.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import path from 'node:path';
import { loadPatternText, writeProject, type Project } from '../../solver';
import { fileFields, scheduleCommand, shellWord, tableCommand } from '../../electron/table-header';
import { degreeSamples } from '../../electron/path-jobs';
import { sampleDegrees } from '../../cli/commands/path-common';
import { ExportOptionsSchema, ProjectSchema, SweepOptionsSchema } from '../../electron/contract';
import { SAMPLES } from './support';

const file = path.join(SAMPLES, 'hinge-coupon.hingeplan.json');
const text = readFileSync(file, 'utf8');
const loaded = loadPatternText(text, 'hinge-coupon.hingeplan.json');
const project = ProjectSchema.parse(loaded.project);
const pattern = loaded.pattern!;
const bytes = readFileSync(file);
// Node's SHA-256 (OpenSSL, FIPS 180-4) as the reference: of the file's bytes, or of a text's UTF-8 bytes
const hash = (t: string | Uint8Array) => (typeof t === 'string' ? createHash('sha256').update(t, 'utf8') : createHash('sha256').update(t)).digest('hex');

describe('table header of an app export', () => {
  it('names and hashes the file when its text is the pattern solved', () => {
    expect(fileFields(project, { name: 'hinge-coupon.hingeplan.json', bytes })).toEqual({ file: 'hinge-coupon.hingeplan.json', fileSha256: hash(bytes) });
  });

  it('hashes the bytes as they are on disk: a byte-order mark is part of the file', () => {
    const withBom = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), bytes]);
    const f = fileFields(project, { name: 'hinge-coupon.hingeplan.json', bytes: withBom });
    expect(f).toEqual({ file: 'hinge-coupon.hingeplan.json', fileSha256: hash(withBom) });
    expect(f.fileSha256).not.toBe(hash(text));
  });

  it('does not name a file that is no longer UTF-8 as the one solved', () => {
    const broken = Buffer.concat([bytes, Buffer.from([0x0a, 0xc3, 0x28])]);
    expect(fileFields(project, { name: 'hinge-coupon.hingeplan.json', bytes: broken }).file).toMatch(/not saved as solved/);
  });

  it('says so when the pattern has unsaved edits, and hashes the project as Save would write it', () => {
    const edited = structuredClone(project);
    edited.source.vertices[1] = [edited.source.vertices[1][0] + 1, edited.source.vertices[1][1]];
    const f = fileFields(edited, { name: 'hinge-coupon.hingeplan.json', bytes });
    expect(f.file).toMatch(/^hinge-coupon\.hingeplan\.json \(not saved as solved/);
    expect(f.fileSha256).toBe(hash(writeProject(edited as Project)));
    expect(fileFields(project, { name: 'new.hingeplan.json' }).file).toMatch(/not saved as solved/);
  });

  it('writes negative values, holds, branch and rates as the command line reads them', () => {
    const sweep = SweepOptionsSchema.parse({ drive: 'c0', fromDeg: -30, toDeg: 45.25, stepDeg: 0.5, held: [{ crease: 'c2', angleDeg: -12.5 }], branchId: '2' });
    expect(tableCommand(pattern, 'my coupon.json', sweep, ExportOptionsSchema.parse({ rates: true, format: 'json' })))
      .toBe("hingeplan table 'my coupon.json' --drive c0 --from -30 --to 45.25 --step 0.5 --hold c2=-12.5 --branch 2 --format json --rates");
    expect(scheduleCommand(pattern, 'c.json', sweep, ExportOptionsSchema.parse({ profile: 's-curve', timeS: 8, accelTimeS: 2, jerkTimeS: 0.5, dtS: 0.05 })))
      .toBe('hingeplan schedule c.json --drive c0 --from -30 --to 45.25 --time 8 --profile s-curve --accel-time 2 --jerk-time 0.5 --dt 0.05 --hold c2=-12.5 --branch 2 --format csv');
    // per-hinge limits as --limit CREASE=RATE[:ACCEL], a rate alone or an acceleration alone
    const limited = ExportOptionsSchema.parse({ hingeLimits: [{ crease: 'c1', maxRateDegPerS: 30, maxAccelDegPerS2: 120 }, { crease: 'c3', maxAccelDegPerS2: 50 }] });
    expect(scheduleCommand(pattern, 'c.json', sweep, limited)).toContain('--limit c1=30:120 --limit c3=:50 --hold');
  });

  it('gives a path started from a state its start on standard input, every angle exact', () => {
    const start = pattern.creases.map((c) => (c.index === 0 ? 20 + 1 / 7 : c.index * 0.1));
    const sweep = SweepOptionsSchema.parse({ drive: 'c0', fromDeg: start[0], toDeg: 90, stepDeg: 1, branchId: 'ray:A+', startAnglesDeg: start });
    const cmd = tableCommand(pattern, 'c.json', sweep, ExportOptionsSchema.parse({}));
    const m = /^printf '%s\\n' '(.*)' \| hingeplan table c\.json --drive c0 --from (\S+) --to 90 --step 1 --start \/dev\/stdin --format csv$/.exec(cmd);
    expect(m).not.toBeNull();
    expect(Number(m![2])).toBe(start[0]);
    const angles = JSON.parse(m![1]).angles as Record<string, number>;
    for (const c of pattern.creases) expect(angles[c.label]).toBe(start[c.index]);
  });

  it('quotes words a shell would split or expand', () => {
    expect(shellWord('a b')).toBe("'a b'");
    expect(shellWord("it's")).toBe(`'it'\\''s'`);
    expect(shellWord('$HOME')).toBe("'$HOME'");
    expect(shellWord('c2=-12.5')).toBe('c2=-12.5');
  });

  it('sweeps at the drive values the command line samples, to the last bit', () => {
    for (const [f, t, s] of [[0, 180, 1], [-30, 45.25, 0.1], [170, 10, 7], [0, 1, 0.3]]) {
      expect(degreeSamples(f, t, s)).toEqual(sampleDegrees(f, t, s));
    }
    expect(degreeSamples(0, 180, 1e-6)).toBeUndefined();
  });
});
