// Ctrl-C and kill -9 at every moment of a long run of the bundled program: the --out file is always the old
// one or a complete new one, Ctrl-C writes what was computed (complete, parseable, exit status 130, also
// when it comes during the writing or twice), and no temporary file outlives the next run.
import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { ChildProcess } from 'node:child_process';
import Papa from 'papaparse';
import { runChild, runIn, type Exited } from './support/cli';

const dir = mkdtempSync(join(tmpdir(), 'hingeplan-int-'));
const sheet = join(dir, 'm10.hingeplan.json');
const OLD = '# an older table\nold\n';
/** 595 samples (1°, 1.3°, … 178.9°, 179°) of a 10 × 10 Miura sheet (840 creases): about a second; progress lines show when work began. */
const RUN = (out: string[]) => ['table', sheet, '--drive', 'z10_10', '--from', '1', '--to', '179', '--step', '0.3', '--progress', ...out];
const SAMPLES = 595;

async function setup() {
  if (!existsSync(sheet)) expect((await runIn(['new', 'miura', '--rows', '10', '--cols', '10', '--a', '40', '--b', '30', '--alpha', '70', '--out', sheet])).code).toBe(0);
}

/** A complete angle table (CSV): header, every row full and numeric, the tail; returns its status and rows. */
function completeCsv(text: string): { status: string; rows: number } {
  const lines = text.split('\n');
  expect(lines[lines.length - 1]).toBe('');
  const meta = new Map(lines.filter((l) => l.startsWith('# ') && l.includes(': ')).map((l) => [l.slice(2, l.indexOf(': ')), l.slice(l.indexOf(': ') + 2)]));
  expect(meta.get('format')).toBe('hingeplan-angle-table');
  const body = Papa.parse<string[]>(lines.filter((l) => l && !l.startsWith('#')).join('\n'), { skipEmptyLines: true });
  expect(body.errors).toEqual([]);
  const [head, ...rows] = body.data;
  // the drive, every angle and the residual are numbers in every row (the condition may be left empty)
  const numeric = head.map((h, k) => (['condition', 'near_singular', 'contact'].includes(h) || h.startsWith('torque:') ? -1 : k)).filter((k) => k >= 0);
  for (const r of rows) {
    expect(r.length).toBe(head.length);
    expect(numeric.every((k) => r[k] !== '' && Number.isFinite(Number(r[k])))).toBe(true);
  }
  expect(Number(meta.get('sampleCount'))).toBe(rows.length);
  return { status: meta.get('status')!, rows: rows.length };
}

function temps(): string[] {
  return readdirSync(dir).filter((f) => f.endsWith('.hingeplan-tmp'));
}

/** Run, and signal the child `delays` ms after start (one signal per delay). */
function runSignalled(args: string[], signal: NodeJS.Signals, delays: number[]): Promise<Exited> {
  return runChild(args, (child: ChildProcess) => {
    for (const d of delays) setTimeout(() => { if (child.exitCode === null && child.signalCode === null) child.kill(signal); }, d);
  });
}

describe('interrupts at every moment of a long run', () => {
  it('Ctrl-C: the old file untouched (before any work) or a complete table of what was computed, exit 130', async () => {
    await setup();
    // how long the whole run takes here, and what a complete table looks like
    const full = join(dir, 'full.csv');
    const t0 = Date.now();
    const whole = await runChild(RUN(['--out', full]));
    const span = Date.now() - t0;
    expect(whole.code).toBe(0);
    expect(completeCsv(readFileSync(full, 'utf8'))).toEqual({ status: 'complete', rows: SAMPLES });
    // a sweep of delays over the whole run and a little past its end (the writing, the exit)
    const delays = [0.02, 0.1, 0.25, 0.45, 0.65, 0.85, 0.97, 1.05].map((f) => Math.round(f * span));
    const outcomes: string[] = [];
    for (let i = 0; i < delays.length; i += 4) {
      await Promise.all(delays.slice(i, i + 4).map(async (d, k) => {
        const out = join(dir, `int-${i + k}.csv`);
        writeFileSync(out, OLD);
        // a second Ctrl-C 15 ms after the first in every other run: not swallowed either
        const r = await runSignalled(RUN(['--out', out]), 'SIGINT', (i + k) % 2 ? [d, d + 15] : [d]);
        const text = readFileSync(out, 'utf8');
        if (r.signal === 'SIGINT' && /^wrote /m.test(r.err)) {
          // the second Ctrl-C came while Node was ending the process, after the table was written and
          // reported (Node gives the signal its default action then; a shell sees 130 either way): the
          // file is the complete table of what was computed
          const c = completeCsv(text);
          expect(['stopped', 'complete']).toContain(c.status);
          outcomes.push(`${c.status} after ${c.rows} rows, killed while exiting`);
        } else if (r.signal === 'SIGINT') {
          // before the program watched for Ctrl-C (while Node started): nothing computed, nothing written
          expect(r.err, 'killed by Ctrl-C after the work had begun').not.toMatch(/table: \d+\/\d+/);
          expect(text).toBe(OLD);
          outcomes.push('before start');
        } else if (r.code === 0) {
          // the run had ended before the signal came
          expect(completeCsv(text).status).toBe('complete');
          outcomes.push('after the end');
        } else {
          expect(r.code, r.err).toBe(130);
          const c = completeCsv(text);
          expect(['stopped', 'complete']).toContain(c.status);
          outcomes.push(`${c.status} after ${c.rows} rows`);
        }
        expect(r.err).not.toMatch(/\n\s+at |internal error/);
      }));
    }
    // the sweep did reach the middle of the work
    expect(outcomes.some((o) => /^stopped after [1-9]/.test(o)), outcomes.join('; ')).toBe(true);
    expect(temps()).toEqual([]);
  }, 180_000);

  it('Ctrl-C with the table on standard output: what was written parses, and holds every sample it counts', async () => {
    await setup();
    const args = ['sweep', sheet, '--drive', 'z10_10', '--from', '1', '--to', '179', '--step', '0.3', '--json', '--progress'];
    for (const d of [300, 700]) {
      const r = await runSignalled(args, 'SIGINT', [d]);
      if (r.signal === 'SIGINT') { expect(r.err).not.toMatch(/sweep: \d+\/\d+/); expect(r.out).toBe(''); continue; }
      const j = JSON.parse(r.out);
      expect(j.samples.length).toBe(j.sampleCount);
      expect(r.code === 130 ? ['stopped', 'complete'] : ['complete']).toContain(j.status);
    }
  }, 120_000);

  it('kill -9: the old file or the complete new one, never a part; the next run removes the temporary files left', async () => {
    await setup();
    const out = join(dir, 'killed.csv');
    for (const d of [150, 450, 800, 1600]) {
      writeFileSync(out, OLD);
      const r = await runSignalled(RUN(['--out', out]), 'SIGKILL', [d]);
      const text = readFileSync(out, 'utf8');
      if (r.signal === 'SIGKILL') expect(text === OLD || completeCsv(text).status === 'complete').toBe(true);
      else expect(completeCsv(text).status).toBe('complete');
    }
    // a run writing beside them removes the files of runs that are gone
    const again = await runChild(RUN(['--out', out]));
    expect(again.code).toBe(0);
    expect(temps()).toEqual([]);
  }, 120_000);
});
