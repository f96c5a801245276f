// What the command line writes and where: --out never damages a file (the inputs, read-only files, links,
// FIFOs and devices), "wrote <file>" after every --out, a closed pipe ends quietly, no control character
// from a file reaches the terminal, oversized or misleading options are refused naming the option, drives
// are echoed as given, start and schedule files are hashed into the header, and the text for people.
import { describe, expect, it } from 'vitest';
import { chmodSync, existsSync, mkdtempSync, readFileSync, readdirSync, statSync, symlinkSync, writeFileSync, lstatSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createHash } from 'node:crypto';
import { execFileSync, spawn } from 'node:child_process';
import Papa from 'papaparse';
import { CAUTIONS } from '../solver/formats/cautions';
import { bundledCli, runChild, runIn } from './support/cli';

const dir = mkdtempSync(join(tmpdir(), 'hingeplan-out-'));
const coupon = join(dir, 'coupon.hingeplan.json');
const rig = join(dir, 'rig.hingeplan.json');
const sheet = join(dir, 'sheet.hingeplan.json');
const A = ['--drive', 'c0', '--from', '0', '--to', '60', '--step', '20'];
const sha = (p: string) => createHash('sha256').update(readFileSync(p)).digest('hex');

async function setup() {
  if (existsSync(sheet)) return;
  expect((await runIn(['new', 'vertex', '--sectors', '60,100,120,80', '--out', coupon])).code).toBe(0);
  expect((await runIn(['new', 'degree5', '--out', rig])).code).toBe(0);
  expect((await runIn(['new', 'miura', '--rows', '2', '--cols', '2', '--a', '40', '--b', '30', '--alpha', '70', '--out', sheet])).code).toBe(0);
}

describe('--out', () => {
  it('refuses the input file (also through a link), a read-only file and a folder, leaving each untouched (exit 2)', async () => {
    await setup();
    const before = readFileSync(coupon, 'utf8');
    const same = await runIn(['table', coupon, ...A, '--out', coupon]);
    expect(same.code).toBe(2);
    expect(same.err).toMatch(/is the input file/);
    const link = join(dir, 'coupon-link.json');
    symlinkSync(coupon, link);
    expect((await runIn(['table', link, ...A, '--out', coupon])).code).toBe(2);
    expect((await runIn(['convert', coupon, link])).code).toBe(2);
    expect(readFileSync(coupon, 'utf8')).toBe(before);
    const ro = join(dir, 'ro.csv');
    writeFileSync(ro, 'old\n');
    chmodSync(ro, 0o444);
    const r = await runIn(['table', coupon, ...A, '--out', ro]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/read-only/);
    expect(readFileSync(ro, 'utf8')).toBe('old\n');
    expect((await runIn(['table', coupon, ...A, '--out', dir])).err).toMatch(/is a folder/);
    expect((await runIn(['table', coupon, ...A, '--out', join(dir, 'no', 'such', 'x.csv')])).err).toMatch(/does not exist/);
  });

  it('keeps the mode of the file it replaces, follows a link (the link stays), and says "wrote <file>"', async () => {
    await setup();
    const private600 = join(dir, 'private.csv');
    writeFileSync(private600, 'old\n');
    chmodSync(private600, 0o600);
    const r = await runIn(['table', coupon, ...A, '--out', private600]);
    expect(r.code).toBe(0);
    expect(r.err).toMatch(new RegExp(`^wrote ${private600.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')}`, 'm'));
    expect(statSync(private600).mode & 0o777).toBe(0o600);
    expect(readFileSync(private600, 'utf8')).toContain('# format: hingeplan-angle-table');
    const link = join(dir, 'table-link.csv');
    symlinkSync(private600, link);
    expect((await runIn(['table', coupon, ...A, '--rates', '--out', link])).code).toBe(0);
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(readFileSync(private600, 'utf8')).toContain('rate:c1');
    // no temporary file is left beside it
    expect(readdirSync(dir).filter((f) => f.endsWith('.hingeplan-tmp'))).toEqual([]);
  });

  it('writes a character device and a FIFO in place without replacing them', async () => {
    await setup();
    const r = await runIn(['table', coupon, ...A, '--out', '/dev/null']);
    expect(r.code).toBe(0);
    expect(statSync('/dev/null').isCharacterDevice()).toBe(true);
    const fifo = join(dir, 'pipe');
    execFileSync('mkfifo', [fifo]);
    const reader = spawn('cat', [fifo]);
    let got = '';
    reader.stdout.on('data', (d) => { got += String(d); });
    const done = new Promise((resolve) => reader.on('close', resolve));
    const w = await runChild(['table', coupon, ...A, '--out', fifo]);
    await done;
    expect(w.code).toBe(0);
    expect(lstatSync(fifo).isFIFO()).toBe(true);
    expect(got).toContain('# cautions: ');
  });

  it('"wrote <file>" after every command that writes with --out; the cautions after STL', async () => {
    await setup();
    const cases: [string[], string][] = [
      [['sweep', coupon, ...A, '--csv'], 'a.csv'],
      [['schedule', coupon, '--drive', 'c0', '--from', '0', '--to', '60', '--time', '2', '--rows', '5'], 'b.csv'],
      [['grid', rig, '--range', 'c0=0:20:10', '--range', 'c2=-20:0:10'], 'c.csv'],
      [['shape', coupon, '--set', 'c0=45', '--format', 'obj'], 'd.obj'],
      [['new', 'waterbomb'], 'e.hingeplan.json'],
      [['convert', coupon], 'f.fold'],
    ];
    for (const [args, name] of cases) {
      const out = join(dir, name);
      const r = await runIn(args[0] === 'convert' ? [...args, out] : [...args, '--out', out]);
      expect(r.code, args.join(' ')).toBe(0);
      expect(r.err, args.join(' ')).toContain(`wrote ${out}`);
      expect(existsSync(out)).toBe(true);
    }
    const stl = await runIn(['shape', coupon, '--set', 'c0=45', '--format', 'stl', '--out', join(dir, 'g.stl')]);
    expect(stl.err).toContain(`wrote ${join(dir, 'g.stl')}`);
    expect(stl.err).toContain(CAUTIONS);
  });
});

describe('standard output', () => {
  it('a reader that closes the pipe early ends the program quietly (no EPIPE trace), exit status 141', async () => {
    const cli = await bundledCli();
    const child = spawn(process.execPath, [cli, 'new', 'miura', '--rows', '30', '--cols', '30', '--a', '40', '--b', '30', '--alpha', '70'], { stdio: ['ignore', 'pipe', 'pipe'] });
    let err = '';
    child.stderr.on('data', (d) => { err += String(d); });
    // read ten bytes and close, as `| head -c 10` does
    child.stdout.once('data', () => child.stdout.destroy());
    const code = await new Promise<number | null>((resolve) => child.on('close', (c) => resolve(c)));
    expect(err).toBe('');
    expect(code).toBe(141);
  });

  it('JSON is compact by default (one line), --pretty indents the same value', async () => {
    await setup();
    const compact = await runIn(['solve', coupon, '--set', 'c0=45', '--json']);
    const pretty = await runIn(['solve', coupon, '--set', 'c0=45', '--json', '--pretty']);
    expect(compact.out.trimEnd().split('\n')).toHaveLength(1);
    expect(pretty.out.split('\n').length).toBeGreaterThan(20);
    expect(JSON.parse(pretty.out)).toEqual(JSON.parse(compact.out));
  });
});

describe('names and labels from a file never reach the terminal as control sequences', () => {
  it('escaped in text and CSV and on stderr; exact in JSON', async () => {
    await setup();
    const evil = join(dir, 'evil.hingeplan.json');
    const o = JSON.parse(readFileSync(coupon, 'utf8'));
    o.name = 'coupon\u001b[2J\u001b]0;owned\u0007';
    o.creases[1].label = 'c\u009b1m';
    writeFileSync(evil, JSON.stringify(o));
    // eslint-disable-next-line no-control-regex
    const controls = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/;
    for (const args of [['check', evil], ['solve', evil, '--set', 'c0=45'], ['sweep', evil, ...A], ['table', evil, ...A], ['sweep', evil, '--drive', 'nope', '--from', '0', '--to', '1']]) {
      const r = await runIn(args);
      expect(controls.test(r.out), args.join(' ')).toBe(false);
      expect(controls.test(r.err), args.join(' ')).toBe(false);
    }
    const text = await runIn(['check', evil]);
    expect(text.out).toContain('coupon\\x1b[2J\\x1b]0;owned\\x07');
    const j = await runIn(['solve', evil, '--set', 'c0=45', '--json']);
    expect(controls.test(j.out)).toBe(false);
    expect(Object.keys(JSON.parse(j.out).solutions[0].angles)).toContain('c\u009b1m');
  });
});

describe('options refused with the option named (exit 2)', () => {
  const sched = ['schedule', '', '--drive', 'c0', '--from', '0', '--to', '90'];
  const cases: [string[], RegExp][] = [
    [[...sched, '--time', '1e-300'], /--time/],
    [[...sched, '--time', '8', '--dt', '1e-12'], /--dt: .*time rows × \d+ creases.*at least/],
    [[...sched, '--time', '8', '--rows', '1e9'], /--rows: .*at most \d+ rows/],
    [[...sched, '--time', '8', '--rows', '1'], /--rows/],
    [[...sched, '--time', '8', '--profile', 's-curve', '--accel', '100'], /--accel: The s-curve profile has no acceleration/],
    [[...sched, '--time', '8', '--profile', 'constant', '--jerk-time', '0.5'], /--jerk-time: The constant profile has no jerk time/],
    [[...sched, '--time', '8', '--profile', 'constant', '--accel-time', '1'], /--accel-time/],
    [[...sched, '--time', '8', '--profile', 'trapezoid', '--jerk-time', '0.5'], /--jerk-time/],
    [[...sched, '--time', '8', '--accel', '-1'], /--accel must be a positive number of deg\/s², got -1/],
    [[...sched, '--time', '8', '--accel', '0.5'], /--accel: .*0\.5°\/s² cannot move 90° in 8 s/],
    [['sweep', '', '--drive', 'c0', '--from', '0', '--to', '170', '--step', '1e-9'], /--step: .*samples × \d+ creases/],
    [['grid', 'RIG', '--range', 'c0=0:40:0.0001', '--range', 'c2=-30:0:0.0001'], /--range/],
    [['table', '', ...A, '--digits', '0'], /--digits/],
    [['table', '', ...A, '--digits', '18'], /--digits/],
    [['table', '', ...A, '--pretty'], /--pretty is for --format json/],
  ];
  for (const [args, pattern] of cases) {
    it(args.slice(2).join(' '), async () => {
      await setup();
      const a = args.map((x, i) => (i === 1 && x === '' ? coupon : x === 'RIG' ? rig : x));
      const t0 = Date.now();
      const r = await runIn(a);
      expect(r.code).toBe(2);
      expect(r.err).toMatch(pattern);
      expect(r.err).not.toMatch(/NaN|internal error|\n\s+at /);
      expect(Date.now() - t0).toBeLessThan(10_000);
    });
  }

  it('a 40 × 40 Miura sweep at 0.01° is refused in a moment, naming --step and a step that fits', async () => {
    const big = join(dir, 'm40.hingeplan.json');
    await runIn(['new', 'miura', '--rows', '40', '--cols', '40', '--a', '40', '--b', '30', '--alpha', '70', '--out', big]);
    const r = await runIn(['sweep', big, '--drive', 'z40_40', '--from', '1', '--to', '179', '--step', '0.01', '--json']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--step: That gives 17801 samples × 12960 creases.*use a step of at least ([\d.]+)°/);
    expect(r.out).toBe('');
  });
});

describe('numbers as given, and the inputs in the header', () => {
  it('drives and holds are echoed exactly as given (60, not 59.99999999999999), in solve and in tables', async () => {
    await setup();
    const j = JSON.parse((await runIn(['solve', coupon, '--set', 'c0=60', '--json'])).out);
    expect(j.drives.c0).toBe(60);
    for (const s of j.solutions) expect(s.angles.c0).toBe(60);
    const t = JSON.parse((await runIn(['table', rig, '--drive', 'c0', '--from', '0', '--to', '40', '--step', '10', '--hold', 'c2=-30', '--format', 'json'])).out);
    expect(t.held).toBe('c2=-30');
    const c2 = t.columns.indexOf('c2'), c0 = t.columns.indexOf('c0');
    for (const [k, s] of t.samples.entries()) {
      expect(s.angles[c2]).toBe(-30);
      expect(s.angles[c0]).toBe(10 * k);
      expect(s.drive).toBe(10 * k);
    }
  });

  it('a table made from --start records the start file and the SHA-256 of its bytes (node:crypto as the reference)', async () => {
    await setup();
    const start = join(dir, 'start.json');
    writeFileSync(start, (await runIn(['solve', coupon, '--set', 'c0=30', '--json'])).out);
    const r = await runIn(['table', coupon, '--drive', 'c0', '--from', '30', '--to', '60', '--step', '10', '--start', start]);
    expect(r.code).toBe(0);
    const meta = new Map(r.out.split('\n').filter((l) => l.startsWith('# ')).map((l) => [l.slice(2, l.indexOf(': ')), l.slice(l.indexOf(': ') + 2)]));
    expect(meta.get('startFile')).toBe(start);
    expect(meta.get('startSha256')).toBe(sha(start));
    expect(meta.get('fileSha256')).toBe(sha(coupon));
  });

  it('--digits n rounds every number to n significant digits; the default keeps full precision', async () => {
    await setup();
    const full = await runIn(['table', coupon, ...A]);
    const short = await runIn(['table', coupon, ...A, '--digits', '5']);
    const rows = (t: string) => Papa.parse<Record<string, string>>(t.split('\n').filter((l) => !l.startsWith('#')).join('\n'), { header: true, skipEmptyLines: true }).data;
    const [f, s] = [rows(full.out), rows(short.out)];
    for (let k = 0; k < f.length; k++) expect(Number(s[k].c1)).toBe(+Number(f[k].c1).toPrecision(5));
    expect(f[1].c1.replace(/^-/, '').replace('.', '').length).toBeGreaterThan(12);
  });
});

describe('text for people', () => {
  it('check: creases by assignment in one fixed order, the sheet size, units and limits, no always-zero term', async () => {
    await setup();
    for (const f of [coupon, sheet]) {
      const r = await runIn(['check', f]);
      expect(r.out).toMatch(/creases {11}\d+: \d+ M, \d+ V, \d+ U, \d+ F, \d+ B\n/);
      expect(r.out).toMatch(/sheet {13}[\d.]+ × [\d.]+/);
      expect(r.out).toMatch(/units {13}/);
      expect(r.out).toMatch(/hinge limits {6}/);
      expect(r.out).not.toMatch(/defect/);
    }
    const j = JSON.parse((await runIn(['check', coupon, '--json'])).out);
    expect(Object.keys(j.assignments)).toEqual(['M', 'V', 'U', 'F', 'B']);
    expect(j.sheet.width).toBeGreaterThan(0);
  });

  it('an unknown command suggests the near one', async () => {
    for (const [typed, near] of [['chek', 'check'], ['sweeep', 'sweep'], ['shedule', 'schedule'], ['tabel', 'table']]) {
      const r = await runIn([typed]);
      expect(r.code).toBe(2);
      expect(r.err).toContain(`did you mean "${near}"?`);
    }
    expect((await runIn(['frobnicate'])).err).not.toMatch(/did you mean/);
  });

  it('grid CSV repeats no column name; follow says "line" for one line; branches names the state once', async () => {
    await setup();
    const g = await runIn(['grid', rig, '--range', 'c0=0:20:10', '--range', 'c2=-20:0:10']);
    const head = g.out.split('\n').find((l) => l && !l.startsWith('#'))!.split(',');
    expect(new Set(head).size).toBe(head.length);
    const csv = join(dir, 'one-bad.csv');
    const reach = join(dir, 'reach.hingeplan.json');
    await runIn(['new', 'vertex', '--sectors', '100,95,70,95', '--assign', 'U,U,U,U', '--out', reach]);
    writeFileSync(csv, 'time,c0\n0,0\n1,50\n2,100\n3,150\n4,170\n5,150\n');
    const f = await runIn(['follow', reach, '--schedule', csv, '--branch', '1']);
    expect(f.code).toBe(3);
    expect(f.err).toMatch(/\(line 6\)/);
    const b = await runIn(['branches', coupon]);
    expect(b.out).not.toMatch(/flat state: flat/);
    expect(b.out.split('\n')[0]).toMatch(/4 rays leave the flat state/);
  });

  it('sweep for people: the drive as given, residuals in radians said so, events in one form', async () => {
    const reach = join(dir, 'reach.hingeplan.json');
    const r = await runIn(['sweep', reach, '--drive', 'c0', '--from', '150', '--to', '160', '--step', '5', '--branch', '1']);
    expect(r.out).toMatch(/residual \(rad\)/);
    expect(r.out).toMatch(/^\s+150\s/m);
    const ev = r.out.split('\n').find((l) => l.startsWith('event turning-point'))!;
    // the drive value at the event and inside its text: the same digits
    const [a, b] = [...ev.matchAll(/c0 = ([\d.]+)°/g)].map((m) => m[1]);
    expect(a).toBe(b);
  });

  it('schedule: peaks over a limit rounded for people, rows at full precision', async () => {
    await setup();
    const r = await runIn(['schedule', coupon, '--drive', 'c0', '--from', '0', '--to', '120', '--time', '8', '--profile', 'trapezoid', '--accel-time', '2', '--dt', '0.5', '--max-rate', '20']);
    expect(r.code).toBe(4);
    const line = r.out.split('\n').find((l) => l.startsWith('# over limit: c1'))!;
    expect(line).toMatch(/peak velocity -?\d+(\.\d{1,4})? deg\/s/);
  });
});

describe('schedules echo their ends', () => {
  it('the first and last rows are at --from and --to exactly as given (5 and 61, not a rounding of them)', async () => {
    await setup();
    const j = JSON.parse((await runIn(['schedule', coupon, '--drive', 'c0', '--from', '5', '--to', '61', '--time', '3', '--rows', '4', '--format', 'json'])).out);
    expect(j.rows[0].drive).toBe(5);
    expect(j.rows[3].drive).toBe(61);
    expect(j.rows[3].angles[j.columns.indexOf('c0')]).toBe(61);
    expect(j.profile).toMatch(/^trapezoid from 5 to 61 deg in 3 s/);
  });
});
