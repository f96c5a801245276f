// Cost of the contact check along a path (a benchmark, not a timed test): the full path of a Miura-ori
// sheet from 1° to 179° at 1° samples, with contact checking off and on (every sample checked, the path
// goes on), and with the holding torque added; CPU time (user + system) per run, each mode in a child
// process of its own so that one does not warm the other. Goal: the path with contact on costs at most 2×
// the path with it off.
//
//   npx tsx bench/contact.ts            40 × 40 cells (6,400 panels)
//   npx tsx bench/contact.ts 20         another size
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { miura } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { sweep, type SweepHooks } from '../solver/paths/sweep';
import { PathChecks, finishChecks } from '../solver/outputs/path-physics';
import { LoadModel } from '../solver/outputs/torque';

const D = Math.PI / 180;
type Mode = 'off' | 'contact' | 'contact+torque';

function cpuMs(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

function runOne(n: number, mode: Mode): void {
  const g = miura({ rows: n, cols: n, a: 40, b: 30, alphaDeg: 70 });
  const pattern = buildPattern(g.project!.source).pattern!;
  const drive = pattern.labelIndex.get(g.project!.drives[0].crease)!;
  const sign = Math.sign(g.project!.drives[0].angleDeg);
  const samples = Array.from({ length: 179 }, (_, k) => sign * (k + 1) * D);
  const times: number[] = [];
  let contacts = 0;
  // three runs: the first pays for compiling the code; the figure is the best of the other two
  for (let rep = 0; rep < 3; rep++) {
    const t0 = cpuMs();
    let hooks: SweepHooks = {};
    let checks: PathChecks | undefined;
    if (mode !== 'off') {
      const loads = mode === 'contact+torque' ? LoadModel.create(pattern, { arealDensity: 2.7 }, 'mm').model : undefined;
      checks = new PathChecks(pattern, drive, [], { contact: { clearance: 0 }, ...(loads ? { loads } : {}) });
      hooks = { onSample: (s) => { s.checks = checks!.observe({ drive: s.drive, angles: s.angles, rates: s.rates }); } };
    }
    const r = sweep(pattern, { drive, from: samples[0], to: samples[178], samples }, hooks);
    if (checks) finishChecks(r, checks);
    times.push(cpuMs() - t0);
    contacts = r.events.filter((e) => e.type === 'contact').length;
    if (r.samples.length !== 179) throw new Error(`path incomplete: ${r.samples.length} samples`);
  }
  const best = Math.min(times[1], times[2]);
  const rss = process.resourceUsage().maxRSS / 1024;
  process.stdout.write(JSON.stringify({ mode, panels: pattern.panels.length, cpuMs: best, firstMs: times[0], contactEvents: contacts, peakMiB: rss }) + '\n');
}

const self = fileURLToPath(import.meta.url);
if (process.argv[2] === '--child') {
  runOne(Number(process.argv[3]), process.argv[4] as Mode);
} else {
  const n = Number(process.argv[2] ?? 40);
  const rows: Record<string, { cpuMs: number; firstMs: number; panels: number; contactEvents: number; peakMiB: number }> = {};
  for (const mode of ['off', 'contact', 'contact+torque'] as Mode[]) {
    const out = execFileSync(process.execPath, ['--import', 'tsx', self, '--child', String(n), mode], { encoding: 'utf8', maxBuffer: 1 << 24 });
    rows[mode] = JSON.parse(out.trim().split('\n').pop()!);
  }
  const off = rows.off.cpuMs;
  console.log(`Miura-ori ${n} × ${n} cells (${rows.off.panels} panels), path 1°→179° at 1°, CPU time (user + system), best of 2 after a warm-up run:`);
  for (const [mode, r] of Object.entries(rows)) {
    console.log(`  ${mode.padEnd(15)} ${(r.cpuMs / 1000).toFixed(2)} s  (first run ${(r.firstMs / 1000).toFixed(2)} s)  ×${(r.cpuMs / off).toFixed(2)}  contact events ${r.contactEvents}  peak ${r.peakMiB.toFixed(0)} MiB`);
  }
  console.log(`goal: contact on ≤ 2 × off: ${rows.contact.cpuMs <= 2 * off ? 'met' : 'NOT met'}`);
}
