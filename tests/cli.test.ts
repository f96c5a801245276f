// The command line's contract: JSON shapes and exit statuses that scripts rely on.
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { main } from '../cli/main';
import { nodeIo, type Io } from '../cli/io';
import { VERSION } from '../cli/version';

function run(args: string[]) {
  let out = '';
  let err = '';
  const io: Io = { ...nodeIo(), stdout: (t) => { out += t; }, stderr: (t) => { err += t; }, stderrIsTTY: false };
  return main(args, io).then((code) => ({ code, out, err }));
}

const dir = mkdtempSync(join(tmpdir(), 'hingeplan-cli-'));
const coupon = join(dir, 'coupon.hingeplan.json');
const five = join(dir, 'five.hingeplan.json');

describe('hingeplan command line', () => {
  it('new writes project files that check accepts', async () => {
    expect((await run(['new', 'vertex', '--sectors', '60,100,120,80', '--out', coupon])).code).toBe(0);
    expect((await run(['new', 'degree5', '--out', five])).code).toBe(0);
    const r = await run(['check', coupon, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.valid).toBe(true);
    expect(j.interiorVertices).toBe(1);
    // --units goes into the file (FOLD's frame_unit too)
    const inches = join(dir, 'inches.hingeplan.json');
    expect((await run(['new', 'waterbomb', '--size', '4', '--units', 'in', '--out', inches])).code).toBe(0);
    expect(JSON.parse(readFileSync(inches, 'utf8')).units).toBe('in');
    const fold = join(dir, 'inches.fold');
    expect((await run(['new', 'waterbomb', '--units', 'in', '--out', fold])).code).toBe(0);
    expect(JSON.parse(readFileSync(fold, 'utf8')).frame_unit).toBe('in');
    expect((await run(['new', 'waterbomb', '--units', ''])).code).toBe(2);
  });

  it('solve and branches --json compact are the same JSON value as --pretty (their members per crease written as text in one piece)', async () => {
    const samples = join(__dirname, '..', 'samples');
    const cases = [
      ['solve', join(samples, 'two-motor-rig.hingeplan.json'), '--json'],
      ['solve', join(samples, 'two-motor-rig.hingeplan.json'), '--set', 'c0=35', '--json'],
      ['solve', join(samples, 'gripper-cell.hingeplan.json'), '--json', '--conditions', 'all'],
      ['solve', coupon, '--set', 'c0=45', '--set', 'c1=10', '--json'],
      ['solve', five, '--json'],
      ['branches', coupon, '--json'],
      ['branches', coupon, '--at', 'c0=40', '--json'],
      ['branches', join(samples, 'sunshade-panel.hingeplan.json'), '--json'],
    ];
    for (const args of cases) {
      const compact = await run(args);
      const pretty = await run([...args, '--pretty']);
      expect(compact.code).toBe(pretty.code);
      expect(compact.out.split('\n').filter(Boolean)).toHaveLength(1);
      expect(JSON.parse(compact.out), args.join(' ')).toEqual(JSON.parse(pretty.out));
    }
  });

  it('solve evaluates condition numbers where asked and says where it did not', async () => {
    const r = await run(['solve', coupon, '--set', 'c0=45', '--json']);
    const j = JSON.parse(r.out);
    const matching = j.solutions.filter((s: { matchesAssignment: boolean }) => s.matchesAssignment);
    expect(matching.length).toBeGreaterThan(0);
    for (const s of j.solutions) {
      if (s.matchesAssignment) expect(typeof s.condition).toBe('number');
      else {
        expect(s).toMatchObject({ conditionEvaluated: false });
        expect(s.condition).toBeUndefined();
      }
    }
    if (matching.length < j.solutions.length) expect(j.messages.map((m: { code: string }) => m.code)).toContain('condition-not-evaluated');
    const one = JSON.parse((await run(['solve', coupon, '--set', 'c0=45', '--json', '--conditions', '1'])).out);
    expect(one.solutions.filter((s: { condition?: number }) => typeof s.condition === 'number')).toHaveLength(1);
    expect((await run(['solve', coupon, '--conditions', 'some'])).code).toBe(2);
  });

  it('solve --json has the documented shape and exits 0 when solved', async () => {
    const r = await run(['solve', coupon, '--set', 'c0=45', '--json', '--conditions', 'all']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.status).toBe('several-solutions');
    expect(j.dof).toBe(0);
    expect(j.solutions).toHaveLength(2);
    const labels = JSON.parse(readFileSync(coupon, 'utf8')).creases.map((c: { label?: string }, i: number) => c.label ?? String(i));
    for (const s of j.solutions) {
      expect(Object.keys(s.angles).sort()).toEqual([...labels].sort());
      expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
      expect(typeof s.matchesAssignment).toBe('boolean');
      expect(typeof s.condition).toBe('number');
      expect(Object.keys(s.sensitivity).sort()).toEqual(['c1', 'c2', 'c3']);
      expect(Object.keys(s.sensitivity.c1)).toEqual(['c0']);
      expect(s.angles.c0).toBeCloseTo(45, 12);
    }
    for (const m of j.messages) {
      expect(['error', 'warning', 'info']).toContain(m.severity);
      expect(typeof m.code).toBe('string');
      expect(typeof m.text).toBe('string');
    }
  });

  it('sensitivities agree with finite differences of the solutions (degrees per degree)', async () => {
    const at = async (v: number) => JSON.parse((await run(['solve', coupon, '--set', `c0=${v}`, '--json'])).out).solutions[0];
    const [s0, sp, sm] = [await at(45), await at(45 + 1e-4), await at(45 - 1e-4)];
    for (const c of ['c1', 'c2', 'c3']) {
      const fd = (sp.angles[c] - sm.angles[c]) / 2e-4;
      expect(Math.abs(fd - s0.sensitivity[c].c0)).toBeLessThan(1e-6);
    }
  });

  it('exit 4 when underspecified, 3 when inconsistent or unreachable', async () => {
    const u = await run(['solve', five, '--set', 'c0=30', '--json']);
    expect(u.code).toBe(4);
    expect(JSON.parse(u.out).status).toBe('underspecified');
    const i = await run(['solve', coupon, '--set', 'c0=50', '--set', 'c1=20', '--json']);
    expect(i.code).toBe(3);
    expect(JSON.parse(i.out).status).toBe('inconsistent');
  });

  it('exit 2 with a message naming the problem for bad input and usage, never a stack trace', async () => {
    const bad = join(dir, 'bad.hingeplan.json');
    writeFileSync(bad, '{"format": "hingeplan-project", "version": 1, "vertices": [[0,0],[1,0]], ');
    const cases: [string[], RegExp][] = [
      [['solve', join(dir, 'missing.json')], /no such file/],
      [['solve', bad], /not-json|JSON/i],
      [['solve', coupon, '--set', 'c0'], /bad-set-option/],
      [['solve', coupon, '--set', 'nope=10'], /unknown-crease/],
      [['solve', coupon, '--set', 'c0=200'], /drive-out-of-range/],
      [['solve', coupon, '--bogus'], /Unknown option|bogus/],
      [['shape', coupon, '--format', 'dxf'], /--format/],
      [['frobnicate'], /unknown command/],
    ];
    for (const [args, pattern] of cases) {
      const r = await run(args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err, args.join(' ')).toMatch(pattern);
      expect(r.err).not.toMatch(/\n\s+at /);
    }
  });

  it('shape --format json gives every vertex in file order and the mismatch; obj and stl are CAD text', async () => {
    const r = await run(['shape', coupon, '--set', 'c0=45']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    const file = JSON.parse(readFileSync(coupon, 'utf8'));
    expect(j.vertices).toHaveLength(file.vertices.length);
    expect(j.maxMismatch).toBeLessThan(1e-9);
    const obj = await run(['shape', coupon, '--set', 'c0=45', '--format', 'obj']);
    expect(obj.out).toMatch(/^v /m);
    expect(obj.out).toMatch(/^f /m);
    const stl = await run(['shape', coupon, '--set', 'c0=45', '--format', 'stl']);
    expect(stl.out).toMatch(/^solid /);
    expect(stl.out).toMatch(/endsolid/);
  });

  it('convert goes to FOLD and back without losing the pattern', async () => {
    const fold = join(dir, 'coupon.fold');
    const back = join(dir, 'back.hingeplan.json');
    expect((await run(['convert', coupon, fold])).code).toBe(0);
    expect((await run(['convert', fold, back])).code).toBe(0);
    const a = JSON.parse(readFileSync(coupon, 'utf8'));
    const b = JSON.parse(readFileSync(back, 'utf8'));
    expect(b.vertices).toEqual(a.vertices);
    expect(b.creases.map((c: { assignment: string }) => c.assignment)).toEqual(a.creases.map((c: { assignment: string }) => c.assignment));
  });

  it('the version matches package.json', () => {
    expect(VERSION).toBe(JSON.parse(readFileSync('package.json', 'utf8')).version);
  });

  it('the built program (npx hingeplan) exits with the contract status', () => {
    if (!existsSync('dist/cli.js')) spawnSync(process.execPath, ['scripts/build-cli.mjs'], { stdio: 'inherit' });
    const ok = spawnSync(process.execPath, ['bin/hingeplan.js', 'solve', coupon, '--set', 'c0=45', '--json'], { encoding: 'utf8' });
    expect(ok.status).toBe(0);
    expect(JSON.parse(ok.stdout).solutions.length).toBe(2);
    const bad = spawnSync(process.execPath, ['bin/hingeplan.js', 'check', join(dir, 'missing.json')], { encoding: 'utf8' });
    expect(bad.status).toBe(2);
  });
});

describe('the command list', () => {
  it('names each command as its module does, so the help lists what runs', async () => {
    const { commands } = await import('../cli/commands/index');
    for (const entry of commands) {
      const c = await entry.load();
      expect(c.name).toBe(entry.name);
      expect(c.summary).toBe(entry.summary);
    }
  });
});
