// `hingeplan tolerance` on the command line: the JSON and CSV contracts, the header (seed, command, cautions),
// reproducibility whatever the number of worker threads, bad input, and Ctrl-C keeping the sheets done (in
// process with a fake interrupt, and the bundled program interrupted by a real SIGINT).
import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { bundledCli, runIn } from './support/cli';
import { CAUTIONS } from '../solver/formats/cautions';

const dir = mkdtempSync(join(tmpdir(), 'hingeplan-tolerance-cli-'));

const run = runIn;

const coupon = join(dir, 'coupon.hingeplan.json');
const sheet = join(dir, 'sheet.hingeplan.json');
const big = join(dir, 'big.hingeplan.json');

async function setup() {
  if (existsSync(big)) return;
  expect((await run(['new', 'vertex', '--sectors', '60,100,120,80', '--out', coupon])).code).toBe(0);
  expect((await run(['new', 'miura', '--rows', '2', '--cols', '2', '--a', '40', '--b', '30', '--alpha', '70', '--out', sheet])).code).toBe(0);
  expect((await run(['new', 'miura', '--rows', '5', '--cols', '5', '--a', '40', '--b', '30', '--alpha', '70', '--out', big])).code).toBe(0);
}

const strip = (t: string) => t.split('\n').filter((l) => !/"date"|"command"|^# date:|^# command:/.test(l)).join('\n');

describe('hingeplan tolerance', () => {
  it('--json has the documented shape; a single vertex still folds on every sheet', async () => {
    await setup();
    const r = await run(['tolerance', coupon, '--drive', 'c0', '--at', '45', '--position-tol', '0.2', '--samples', '40', '--seed', '9', '--workers', '1', '--json']);
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.format).toBe('hingeplan-tolerance');
    expect(j.samples).toBe(40);
    expect(j.requested).toBe(40);
    expect(j.seed).toBe(9);
    expect(j.drive).toBe('c0');
    expect(j.at).toEqual([45]);
    expect(j.status).toBe('complete');
    expect(j.cautions).toBe(CAUTIONS);
    expect(j.command).toContain('--seed 9');
    expect(j.fileSha256).toBe(createHash('sha256').update(readFileSync(coupon)).digest('hex'));
    expect(Object.keys(j.hinges).sort()).toEqual(['c1', 'c2', 'c3']);
    for (const entries of Object.values(j.hinges) as Record<string, unknown>[][]) {
      expect(entries).toHaveLength(1);
      for (const k of ['nominal', 'mean', 'std', 'p05', 'p50', 'p95']) expect(typeof entries[0][k]).toBe('number');
      const dev = entries[0].deviation as Record<string, number>;
      for (const k of ['mean', 'std', 'p05', 'p50', 'p95', 'max']) expect(typeof dev[k]).toBe('number');
      expect(dev.p05).toBeLessThanOrEqual(dev.p50);
      expect(dev.p50).toBeLessThanOrEqual(dev.p95);
    }
    expect(j.rigidFraction).toEqual([1]);
    expect(j.misfit[0].max).toBeLessThanOrEqual(1e-10);
    expect(j.lost).toEqual([0]);
    expect(j.linear.hinges.c1[0].std).toBeGreaterThan(0);
    expect(j.worstVertices).toEqual([]); // nothing to absorb: every sheet closes
  });

  it('--csv: the metadata header and one row per quantity, hinge and drive value', async () => {
    await setup();
    const out = join(dir, 't.csv');
    const r = await run(['tolerance', sheet, '--drive', 'z2_2', '--from', '20', '--to', '80', '--step', '30', '--position-tol', '0.1', '--samples', '12', '--workers', '1', '--csv', '--out', out]);
    expect(r.code, r.err).toBe(0);
    const text = readFileSync(out, 'utf8');
    const meta = Object.fromEntries(text.split('\n').filter((l) => l.startsWith('# ') && l.includes(': ')).map((l) => { const i = l.indexOf(': '); return [l.slice(2, i), l.slice(i + 2)]; }));
    for (const k of ['format', 'pattern', 'fileSha256', 'drive', 'branch', 'positionTolerance', 'sectorTolerance', 'model', 'seed', 'samples', 'status', 'units', 'program', 'date', 'command', 'cautions']) expect(meta[k], k).toBeDefined();
    expect(meta.seed).toBe('1');
    expect(meta.samples).toBe('12 of 12');
    expect(meta.cautions).toBe(CAUTIONS);
    const rows = text.split('\n').filter((l) => l && !l.startsWith('#'));
    expect(rows[0]).toBe('drive,quantity,item,nominal,mean,std,p05,p50,p95,max,linear');
    const body = rows.slice(1).map((l) => l.split(','));
    for (const cells of body) expect(cells).toHaveLength(11);
    const drives = [...new Set(body.map((c) => c[0]))];
    expect(drives).toEqual(['20', '50', '80']);
    const hinges = new Set(body.filter((c) => c[1] === 'angle').map((c) => c[2]));
    for (const d of drives) {
      const at = body.filter((c) => c[0] === d);
      expect(at.filter((c) => c[1] === 'angle')).toHaveLength(hinges.size);
      expect(at.filter((c) => c[1] === 'deviation')).toHaveLength(hinges.size);
      for (const q of ['misfit', 'gap', 'rigid-fraction', 'lost']) expect(at.filter((c) => c[1] === q)).toHaveLength(1);
      // a perturbed Miura sheet never closes: the misfit is positive and nothing folds rigidly
      expect(Number(at.find((c) => c[1] === 'misfit')![7])).toBeGreaterThan(0);
      expect(at.find((c) => c[1] === 'rigid-fraction')![4]).toBe('0');
    }
  });

  it('the same numbers whatever the number of worker threads', async () => {
    await setup();
    const args = ['tolerance', sheet, '--drive', 'z2_2', '--from', '30', '--to', '60', '--step', '30', '--position-tol', '0.1', '--sector-tol', '0.02', '--samples', '10', '--seed', '4', '--json'];
    const one = await run([...args, '--workers', '1']);
    const two = await run([...args, '--workers', '2']);
    expect(one.code).toBe(0);
    expect(strip(two.out)).toBe(strip(one.out));
  });

  it('bad input gets a message naming the problem, exit status 2', async () => {
    await setup();
    const cases: [string[], RegExp][] = [
      [['--drive', 'c0', '--at', '45'], /--position-tol/],
      [['--drive', 'c0', '--at', '45', '--from', '0', '--to', '10', '--position-tol', '0.1'], /either --at or --from/],
      [['--drive', 'c0', '--position-tol', '0.1'], /--at <deg>/],
      [['--drive', 'c0', '--at', '45', '--position-tol', '-1'], /--position-tol must be a length/],
      [['--drive', 'c0', '--at', '45', '--position-tol', 'x'], /--position-tol must be a number/],
      [['--drive', 'c0', '--at', '45', '--sector-tol', '50'], /not a manufacturing tolerance/],
      [['--drive', 'c0', '--at', '45', '--position-tol', '0.1', '--samples', '0'], /--samples must be a whole number/],
      [['--drive', 'c0', '--at', '45', '--position-tol', '0.1', '--seed', '-3'], /--seed must be a whole number/],
      [['--drive', 'nope', '--at', '45', '--position-tol', '0.1'], /no crease "nope"/],
      [['--drive', 'c0', '--at', '245', '--position-tol', '0.1'], /--at must be within/],
    ];
    for (const [args, message] of cases) {
      const r = await run(['tolerance', coupon, ...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err).toMatch(message);
      expect(r.err).not.toMatch(/at .*\.ts:\d+/); // no stack trace
    }
  });

  it('the text output for people carries the cautions', async () => {
    await setup();
    const r = await run(['tolerance', coupon, '--drive', 'c0', '--from', '30', '--to', '90', '--step', '30', '--sector-tol', '0.05', '--samples', '8', '--workers', '1']);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toContain('8 of 8 sheets (seed 1)');
    expect(r.out).toContain(CAUTIONS);
  });

  it('in-process Ctrl-C keeps the sheets done: valid JSON with its sample count, exit status 130', async () => {
    await setup();
    const out = join(dir, 'partial.json');
    let handler: (() => void) | undefined;
    let err = '';
    const r = await run(['tolerance', big, '--drive', 'z5_5', '--from', '-10', '--to', '-90', '--step', '10', '--position-tol', '0.1', '--samples', '2000', '--workers', '1', '--json', '--out', out, '--progress'], {
      onInterrupt: (h) => { handler = h; return () => { handler = undefined; }; },
      stderr: (t) => { err += t; },
      // progress lines come through the progress channel (drawn raw, not escaped as messages are)
      progress: (t) => { const m = /tolerance: (\d+)\/2000 sheets/.exec(t); if (m && Number(m[1]) >= 8) handler?.(); },
    });
    expect(r.code).toBe(130);
    const j = JSON.parse(readFileSync(out, 'utf8'));
    expect(j.status).toBe('stopped');
    expect(j.samples).toBeGreaterThan(0);
    expect(j.samples).toBeLessThan(2000);
    expect(j.requested).toBe(2000);
    expect(j.messages.some((m: { code: string }) => m.code === 'stopped')).toBe(true);
    for (const entries of Object.values(j.hinges) as { std: number }[][]) expect(entries).toHaveLength(9);
    expect(err).toMatch(/stopped by Ctrl-C after \d+ of 2000 sheets/);
  }, 120_000);

  it('the bundled program interrupted by SIGINT writes its partial result and exits 130', async () => {
    await setup();
    // built as scripts/build-cli.mjs builds it (split into chunks: a worker thread loads the chunk of its code)
    const bundle = await bundledCli();
    const out = join(dir, 'partial.csv');
    const child = spawn(process.execPath, [bundle, 'tolerance', big, '--drive', 'z5_5', '--from', '-10', '--to', '-90', '--step', '10', '--position-tol', '0.1', '--samples', '5000', '--csv', '--out', out, '--progress'], { stdio: ['ignore', 'pipe', 'pipe'] });
    let err = '';
    let sent = false;
    const code = await new Promise<number | null>((resolve) => {
      child.stderr.on('data', (d) => {
        err += String(d);
        const m = /tolerance: (\d+)\/5000 sheets/.exec(err.split('\n').slice(-2).join('\n'));
        if (!sent && m && Number(m[1]) >= 4) { sent = true; child.kill('SIGINT'); }
      });
      child.on('exit', (c) => resolve(c));
    });
    expect(sent, err).toBe(true);
    expect(code).toBe(130);
    const text = readFileSync(out, 'utf8');
    expect(text).toContain('# status: stopped');
    expect(text).toContain(`# cautions: ${CAUTIONS}`);
    const samples = /# samples: (\d+) of 5000/.exec(text);
    expect(Number(samples![1])).toBeGreaterThan(0);
    const rows = text.split('\n').filter((l) => l && !l.startsWith('#'));
    for (const row of rows.slice(1)) expect(row.split(',')).toHaveLength(11);
  }, 120_000);
});
