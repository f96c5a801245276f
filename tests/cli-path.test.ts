// The path commands on the command line: JSON and CSV contracts, the table header, bad input, and Ctrl-C
// leaving complete, parseable partial output (in-process with a fake interrupt, and the bundled program
// interrupted by a real SIGINT).
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { build } from 'esbuild';
import { runIn } from './support/cli';
import { CAUTIONS } from '../solver/formats/cautions';

const dir = mkdtempSync(join(tmpdir(), 'hingeplan-path-cli-'));

const run = runIn;

const coupon = join(dir, 'coupon.hingeplan.json');
const sheet = join(dir, 'sheet.hingeplan.json');
const big = join(dir, 'big.hingeplan.json');
const rig = join(dir, 'rig.hingeplan.json');
const reach = join(dir, 'reach.hingeplan.json');

async function setup() {
  if (existsSync(big)) return;
  expect((await run(['new', 'vertex', '--sectors', '60,100,120,80', '--out', coupon])).code).toBe(0);
  expect((await run(['new', 'miura', '--rows', '2', '--cols', '3', '--a', '40', '--b', '30', '--alpha', '70', '--out', sheet])).code).toBe(0);
  expect((await run(['new', 'miura', '--rows', '20', '--cols', '20', '--a', '40', '--b', '30', '--alpha', '70', '--out', big])).code).toBe(0);
  expect((await run(['new', 'degree5', '--out', rig])).code).toBe(0);
  // a generic vertex whose c0 turns back near 155.28° on branch 1 (see tests/path-events.test.ts)
  expect((await run(['new', 'vertex', '--sectors', '100,95,70,95', '--assign', 'U,U,U,U', '--out', reach])).code).toBe(0);
}

describe('sweep, table and branches on the command line', () => {
  it('sweep --json has the documented shape: drive, samples with every crease angle and rate, events', async () => {
    await setup();
    const r = await run(['sweep', coupon, '--drive', 'c0', '--from', '0', '--to', '170', '--step', '10', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.drive).toBe('c0');
    expect(j.version).toBe(2);
    expect(j.columns).toEqual(['c0', 'c1', 'c2', 'c3']);
    expect(j.samples).toHaveLength(18);
    for (const [k, s] of j.samples.entries()) {
      expect(s.drive).toBe(10 * k);
      expect(s.angles).toHaveLength(4);
      expect(s.rates).toHaveLength(4);
      for (const v of [...s.angles, ...s.rates]) expect(typeof v).toBe('number');
      expect(s.angles[0]).toBe(10 * k); // the drive's own column, as given
      expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
      expect(s.rates[0]).toBe(1);
    }
    // compact by default: one line per sample between the header line and the tail
    expect(r.out.trimEnd().split('\n')).toHaveLength(18 + 2);
    expect(Array.isArray(j.events)).toBe(true);
    expect(j.cautions).toBe(CAUTIONS);
  });

  it('sweep reports a turning point as an event with drive and text, exit status 3', async () => {
    await setup();
    const r = await run(['sweep', reach, '--drive', 'c0', '--from', '1', '--to', '179', '--branch', '1', '--json']);
    expect(r.code).toBe(3);
    const j = JSON.parse(r.out);
    const e = j.events.find((x: { type: string }) => x.type === 'turning-point');
    expect(e.drive).toBeCloseTo(155.282128, 5);
    expect(typeof e.text).toBe('string');
    expect(j.samples).toHaveLength(155);
    expect(j.status).toBe('partial');
  });

  it('table CSV: the metadata header (file hash by node:crypto as the reference), one row per sample, every crease by label', async () => {
    await setup();
    const out = join(dir, 'table.csv');
    const r = await run(['table', sheet, '--drive', 'z3_2', '--from', '-5', '--to', '-175', '--step', '5', '--rates', '--out', out]);
    expect(r.code).toBe(0);
    const text = readFileSync(out, 'utf8');
    const meta = Object.fromEntries(text.split('\n').filter((l) => l.startsWith('# ') && l.includes(': ')).map((l) => { const i = l.indexOf(': '); return [l.slice(2, i), l.slice(i + 2)]; }));
    for (const k of ['pattern', 'file', 'fileSha256', 'branch', 'drive', 'units', 'signConvention', 'tolerance', 'largestResidual', 'program', 'date', 'command', 'cautions']) expect(meta[k], k).toBeDefined();
    expect(meta.fileSha256).toBe(createHash('sha256').update(readFileSync(sheet)).digest('hex'));
    expect(meta.cautions).toBe(CAUTIONS);
    expect(meta.command).toContain('hingeplan table');
    expect(meta.command).toContain('--rates');
    expect(Number(meta.largestResidual)).toBeLessThanOrEqual(1e-10);
    const rows = text.split('\n').filter((l) => l && !l.startsWith('#'));
    const head = rows[0].split(',');
    expect(head[0]).toBe('drive');
    expect(head).toContain('rate:s0_1');
    expect(rows.length - 1).toBe(35);
    for (const row of rows.slice(1)) expect(row.split(',').length).toBe(head.length);
    expect(rows[1].split(',')[0]).toBe('-5');
    // the command recorded reproduces every number
    const again = join(dir, 'table2.csv');
    await run(['table', sheet, '--drive', 'z3_2', '--from', '-5', '--to', '-175', '--step', '5', '--rates', '--out', again]);
    const strip = (t: string) => t.split('\n').filter((l) => !l.startsWith('# date:') && !l.startsWith('# command:')).join('\n');
    expect(strip(readFileSync(again, 'utf8'))).toBe(strip(text));
  });

  it('branches --json lists four rays with ids, names, matchesAssignment and tangents for a degree-4 vertex', async () => {
    await setup();
    const r = await run(['branches', coupon, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.branches).toHaveLength(4);
    for (const b of j.branches) {
      expect(Number.isInteger(b.id)).toBe(true);
      expect(typeof b.name).toBe('string');
      expect(typeof b.matchesAssignment).toBe('boolean');
      expect(Object.keys(b.tangent).sort()).toEqual(['c0', 'c1', 'c2', 'c3']);
    }
    expect(j.branches.filter((b: { matchesAssignment: boolean }) => b.matchesAssignment)).toHaveLength(1);
    const at = await run(['branches', coupon, '--at', 'c0=40', '--json']);
    expect(JSON.parse(at.out).state).toBe('regular');
  });

  it('bad input gets a message naming the problem, exit status 2', async () => {
    await setup();
    const a = await run(['sweep', coupon, '--drive', 'nope', '--from', '0', '--to', '10']);
    expect(a.code).toBe(2);
    expect(a.err).toMatch(/no crease "nope"/);
    const b = await run(['sweep', coupon, '--drive', 'c0', '--from', '0', '--to', '200']);
    expect(b.code).toBe(2);
    expect(b.err).toMatch(/--to must be within/);
    const c = await run(['sweep', coupon, '--drive', 'c0', '--from', '0', '--to', '10', '--branch', '9']);
    expect(c.code).toBe(3);
    expect(c.err).toMatch(/no branch 9/);
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'time,c0\n0,0\n1,abc\n');
    const d = await run(['follow', coupon, '--schedule', bad]);
    expect(d.code).toBe(2);
    expect(d.err).toMatch(/line 3/);
  });
});

describe('schedule, follow and grid on the command line', () => {
  it('schedule: trapezoid rows, limit flags and exit status 4 when a hinge is over its limit', async () => {
    await setup();
    const r = await run(['schedule', coupon, '--drive', 'c0', '--from', '0', '--to', '120', '--time', '8', '--profile', 'trapezoid', '--accel-time', '2', '--dt', '0.5', '--max-rate', '20', '--format', 'json']);
    expect(r.code).toBe(4);
    const j = JSON.parse(r.out);
    expect(j.rows).toHaveLength(17);
    expect(j.rows[16].drive).toBe(120);
    expect(j.rows.some((x: { overRate: string[] }) => x.overRate.length > 0)).toBe(true);
    expect(j.cautions).toBe(CAUTIONS);
  });

  it('follow: an unreachable row is flagged, the others are solved (exit status 3)', async () => {
    await setup();
    const csv = join(dir, 'sched.csv');
    writeFileSync(csv, 'time,c0\n0,0\n1,50\n2,100\n3,150\n4,170\n5,120\n6,60\n');
    const r = await run(['follow', reach, '--schedule', csv, '--branch', '1', '--format', 'json']);
    expect(r.code).toBe(3);
    const j = JSON.parse(r.out);
    const rows = j.rows as { time: number; angles?: number[]; drives: Record<string, number>; unreachable?: string }[];
    const col = (l: string) => j.columns.indexOf(l);
    expect(rows.map((x) => !!x.angles)).toEqual([true, true, true, true, false, true, true]);
    expect(rows[4].unreachable).toMatch(/Turning point/);
    expect(rows[6].angles![col('c0')]).toBe(60); // the schedule's value, as the file gives it
    expect(rows[6].drives.c0).toBe(60);
    // going back down retraces the way up: at 100° on the way up and at 120° … 60° down, one curve
    expect(rows[2].angles![col('c1')]).toBeGreaterThan(0);
    expect(Math.sign(rows[6].angles![col('c1')])).toBe(Math.sign(rows[1].angles![col('c1')]));
    expect(j.scheduleFile).toBe(csv);
    expect(j.scheduleSha256).toBe(createHash('sha256').update(readFileSync(csv)).digest('hex'));
  });

  it('grid: every node of a two-drive grid solved, JSON nodes with angles', async () => {
    await setup();
    const r = await run(['grid', rig, '--range', 'c0=0:40:10', '--range', 'c2=-30:0:10', '--format', 'json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.nodes).toHaveLength(20);
    const col = (l: string) => j.columns.indexOf(l);
    for (const n of j.nodes) {
      expect(n.angles[col('c0')]).toBe(n.x);
      expect(n.angles[col('c2')]).toBe(n.y);
      expect(n.maxResidual).toBeLessThanOrEqual(1e-10);
    }
    // CSV: no column name appears twice (dictionary CSV readers keep one of them)
    const csv = await run(['grid', rig, '--range', 'c0=0:40:10', '--range', 'c2=-30:0:10']);
    const head = csv.out.split('\n').find((l) => l && !l.startsWith('#'))!.split(',');
    expect(new Set(head).size).toBe(head.length);
    expect(head.slice(0, 2)).toEqual(['x', 'y']);
  });
});

describe('Ctrl-C during a long sweep', () => {
  it('in-process: the interrupt handler stops the sweep and the JSON written is complete and parseable', async () => {
    await setup();
    const out = join(dir, 'partial.json');
    let handler: (() => void) | undefined;
    let progressLines = 0;
    const r = await run(['sweep', big, '--drive', 'z20_20', '--from', '0.5', '--to', '179.5', '--step', '0.05', '--json', '--out', out, '--progress'], {
      onInterrupt: (h) => { handler = h; return () => { handler = undefined; }; },
      // after a few progress lines, press Ctrl-C
      progress: (t) => { if (/sweep: \d+\/\d+/.test(t) && ++progressLines === 3) handler?.(); },
    });
    expect(r.code).toBe(130);
    const j = JSON.parse(readFileSync(out, 'utf8'));
    expect(j.status).toBe('stopped');
    expect(j.samples.length).toBeGreaterThan(0);
    expect(j.samples.length).toBeLessThan(3581);
    const creases = j.columns.length;
    for (const s of j.samples) {
      expect(s.angles.length).toBe(creases);
      expect(s.maxResidual).toBeLessThanOrEqual(1e-10);
    }
    expect(j.messages.some((m: { code: string }) => m.code === 'stopped')).toBe(true);
  }, 60_000);

  it('the bundled program interrupted by SIGINT writes its partial CSV table and exits 130', async () => {
    await setup();
    const bundle = join(dir, 'cli.js');
    await build({
      entryPoints: ['cli/main.ts'], outfile: bundle, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'silent',
      banner: { js: "import { createRequire as __hpRequire } from 'module'; const require = __hpRequire(import.meta.url);" },
    });
    const out = join(dir, 'partial.csv');
    const child = spawn(process.execPath, [bundle, 'table', big, '--drive', 'z20_20', '--from', '0.5', '--to', '179.5', '--step', '0.05', '--out', out, '--progress'], { stdio: ['ignore', 'pipe', 'pipe'] });
    let err = '';
    let sent = false;
    const code = await new Promise<number | null>((resolve) => {
      child.stderr.on('data', (d) => {
        err += String(d);
        if (!sent && /table: \d+\/\d+/.test(err)) { sent = true; child.kill('SIGINT'); }
      });
      child.on('exit', (c) => resolve(c));
    });
    expect(sent).toBe(true);
    expect(code).toBe(130);
    const text = readFileSync(out, 'utf8');
    expect(text).toContain('# status: stopped');
    expect(text).toContain(`# cautions: ${CAUTIONS}`);
    const rows = text.split('\n').filter((l) => l && !l.startsWith('#'));
    const width = rows[0].split(',').length;
    expect(rows.length).toBeGreaterThan(1);
    for (const row of rows.slice(1)) {
      const cells = row.split(',');
      expect(cells.length).toBe(width);
      expect(cells.slice(0, width - 3).every((c) => c !== '' && Number.isFinite(Number(c)))).toBe(true);
    }
  }, 60_000);
});
