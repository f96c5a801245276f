// The main process's handlers, run in Node with the real solver worker and a fake desktop: opening (good
// and bad files), saving atomically, exports, recovery copies, solving and the checks at the boundary.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, promises as fs, readdirSync, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createService, type DialogHost } from '../../electron/service';
import { SolverClient } from '../../electron/solver-client';
import { nodeWorkerSpawner } from '../../electron/worker-client';
import { RecentFiles, RecoveryStore } from '../../electron/files';
import { loadPatternText, solveDrives, CAUTIONS } from '../../solver';
import { buildWorker, SAMPLES } from './support';
import Papa from 'papaparse';
import { miura } from '../../solver';

class FakeHost implements DialogHost {
  open: (string | null)[] = [];
  save: (string | null)[] = [];
  saveRequests: { defaultName: string }[] = [];
  clip = '';
  events: unknown[] = [];
  async chooseOpenFile() {
    return this.open.shift() ?? null;
  }
  async chooseSaveFile(r: { defaultName: string }) {
    this.saveRequests.push(r);
    return this.save.shift() ?? null;
  }
  async confirmDiscard() {
    return 'discard' as const;
  }
  writeClipboard(t: string) {
    this.clip = t;
  }
  documentState() {}
  emit(event: string, payload: unknown) {
    this.events.push([event, payload]);
  }
  closeReady() {}
  recentChanged() {}
}

let solver: SolverClient;
let tmp: string;
let host: FakeHost;
let service: ReturnType<typeof createService>;
const coupon = path.join(SAMPLES, 'hinge-coupon.hingeplan.json');

beforeAll(async () => {
  const worker = await buildWorker('electron/solver-worker.ts');
  solver = new SolverClient({ spawn: nodeWorkerSpawner(worker) });
  tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-service-'));
  host = new FakeHost();
  service = createService({
    solver,
    host,
    recovery: new RecoveryStore(path.join(tmp, 'recovery')),
    recent: new RecentFiles(path.join(tmp, 'recent.json')),
    startup: { version: 't', platform: 'linux', samplePath: coupon },
  });
});

afterAll(async () => {
  solver.dispose();
  await fs.rm(tmp, { recursive: true, force: true });
});

async function call(channel: string, payload: unknown) {
  const r = await service.dispatch(channel, payload);
  if (!r.ok) throw new Error(`${channel}: ${r.error.code} ${r.error.message}`);
  return r.value as never;
}

describe('main-process handlers', () => {
  it('opens the built-in sample at startup without taking it as the file to save to', async () => {
    const r = (await call('app:startup', {})) as { document: { filePath: string | null; fileName: string; computePath: boolean; project: { drives: unknown[] } } };
    expect(r.document.fileName).toBe('hinge-coupon.hingeplan.json');
    expect(r.document.filePath).toBeNull();
    expect(r.document.computePath).toBe(true);
    expect(r.document.project.drives).toEqual([{ crease: 'c0', angleDeg: 45 }]);
  });

  it('solves in the worker exactly as the solver does in-process', async () => {
    const text = readFileSync(coupon, 'utf8');
    const loaded = loadPatternText(text, 'hinge-coupon.hingeplan.json');
    const reference = solveDrives(loaded.pattern!, loaded.drives!);
    await call('pattern:set', { key: 'coupon', source: loaded.project!.source });
    const r = (await call('solve', { requestId: 's1', key: 'coupon', drives: [{ crease: 'c0', angleDeg: 45 }] })) as { status: string; value: { status: string; solutions: { anglesDeg: number[] }[] } };
    expect(r.status).toBe('done');
    expect(r.value.status).toBe(reference.status);
    expect(r.value.solutions.length).toBe(reference.solutions.length);
    reference.solutions.forEach((s, i) => {
      s.angles.forEach((a, c) => expect(r.value.solutions[i].anglesDeg[c]).toBeCloseTo((a * 180) / Math.PI, 9));
    });
  });

  it('resends a pattern the worker lost and repeats the job', async () => {
    const text = readFileSync(coupon, 'utf8');
    const { project } = loadPatternText(text, 'x.hingeplan.json');
    await call('pattern:set', { key: 'lost', source: project!.source });
    // the long lane has never seen this key: it answers pattern-unknown, the client sends it and repeats
    const r = await solver.run<{ status: string }>('long', 'solve', { key: 'lost', drives: [{ crease: 'c0', angleDeg: 30 }] });
    expect(r.status).toBe('done');
    // a key nobody ever sent stays an error value naming the problem
    const never = await solver.run('long', 'solve', { key: 'never-sent', drives: [] });
    expect(never).toMatchObject({ status: 'failed', error: { code: 'pattern-unknown' } });
  });

  it('answers a malformed file with the readers’ messages, saying where', async () => {
    const bad = path.join(tmp, 'broken.hingeplan.json');
    await fs.writeFile(bad, '{\n  "format": "hingeplan-project",\n  "vertices": [[0, 0], [1, 0]\n');
    host.open.push(bad);
    const r = (await call('doc:open', { format: 'any' })) as { status: string; fileName: string; messages: { severity: string; text: string; where?: { line?: number } }[] };
    expect(r.status).toBe('failed');
    expect(r.fileName).toBe('broken.hingeplan.json');
    expect(r.messages.some((m) => m.severity === 'error' && m.where?.line !== undefined)).toBe(true);
  });

  it('says so when the chosen file is missing or is not text', async () => {
    host.open.push(path.join(tmp, 'nothing-here.json'));
    const missing = (await call('doc:open', { format: 'any' })) as { status: string; messages: { code: string }[] };
    expect(missing).toMatchObject({ status: 'failed', messages: [{ code: 'file-missing' }] });
    const binary = path.join(tmp, 'binary.fold');
    await fs.writeFile(binary, Buffer.from([0xff, 0xfe, 0x00, 0x80]));
    host.open.push(binary);
    expect(await call('doc:open', { format: 'fold' })).toMatchObject({ status: 'failed', messages: [{ code: 'not-text' }] });
  });

  it('opens only recent files by path: the page cannot name any file to read', async () => {
    const r = (await call('doc:open-recent', { path: '/etc/passwd' })) as { status: string; messages: { code: string }[] };
    expect(r).toMatchObject({ status: 'failed', messages: [{ code: 'not-recent' }] });
  });

  it('saves atomically: a new file appears whole, no temporary file is left, and it reads back the same', async () => {
    const text = readFileSync(coupon, 'utf8');
    const { project } = loadPatternText(text, 'c.hingeplan.json');
    const target = path.join(tmp, 'saved.hingeplan.json');
    host.save.push(target);
    const r = (await call('doc:save', { project, filePath: null, saveAs: false, suggestedName: 'coupon' })) as { status: string; filePath: string };
    expect(r).toEqual({ status: 'saved', filePath: target, fileName: 'saved.hingeplan.json' });
    expect(host.saveRequests.at(-1)!.defaultName).toBe('coupon.hingeplan.json');
    expect(readdirSync(tmp).filter((n) => n.endsWith('.tmp'))).toEqual([]);
    const again = loadPatternText(readFileSync(target, 'utf8'), 'saved.hingeplan.json');
    expect(again.project!.drives).toEqual(project!.drives.map((d) => ({ ...d })));
    expect(again.project!.source.vertices).toEqual(project!.source.vertices);
    // saving again to the same file needs no dialog: it was chosen by the person
    const n = host.saveRequests.length;
    expect(await call('doc:save', { project, filePath: target, saveAs: false, suggestedName: 'coupon' })).toMatchObject({ status: 'saved' });
    expect(host.saveRequests.length).toBe(n);
  });

  it('asks where to save when the page names a file the person never chose', async () => {
    const text = readFileSync(coupon, 'utf8');
    const { project } = loadPatternText(text, 'c.hingeplan.json');
    const n = host.saveRequests.length;
    host.save.push(null);
    expect(await call('doc:save', { project, filePath: '/tmp/elsewhere.json', saveAs: false, suggestedName: 'x' })).toEqual({ status: 'canceled' });
    expect(host.saveRequests.length).toBe(n + 1);
  });

  it('reports a save that cannot be written without losing anything', async () => {
    const text = readFileSync(coupon, 'utf8');
    const { project } = loadPatternText(text, 'c.hingeplan.json');
    host.save.push(path.join(tmp, 'no-such-folder', 'x.hingeplan.json'));
    const r = (await call('doc:save', { project, filePath: null, saveAs: true, suggestedName: 'x' })) as { status: string; message: string };
    expect(r.status).toBe('failed');
    expect(r.message).toContain('does not exist');
  });

  it('exports the folded shape as OBJ with the cautions line', async () => {
    const text = readFileSync(coupon, 'utf8');
    const loaded = loadPatternText(text, 'c.hingeplan.json');
    const sol = solveDrives(loaded.pattern!, loaded.drives!).solutions[0];
    await call('pattern:set', { key: 'exp', source: loaded.project!.source });
    const target = path.join(tmp, 'shape.obj');
    host.save.push(target);
    const anglesDeg = Array.from(sol.angles, (a) => (a * 180) / Math.PI);
    const r = await call('doc:export', { kind: 'obj', project: loaded.project, key: 'exp', options: { anglesDeg }, suggestedName: 'hinge-coupon.hingeplan.json' });
    expect(r).toMatchObject({ status: 'saved', filePath: target });
    expect(host.saveRequests.at(-1)!.defaultName).toBe('hinge-coupon.obj');
    const obj = readFileSync(target, 'utf8');
    expect(obj).toContain(CAUTIONS);
    // one `v` line per panel corner (each panel is written with its own vertices)
    const corners = loaded.pattern!.panels.reduce((n, p) => n + p.vertices.length, 0);
    expect(obj.split('\n').filter((l) => l.startsWith('v ')).length).toBe(corners);
  });

  it('keeps, lists and restores a recovery copy', async () => {
    const text = readFileSync(coupon, 'utf8');
    const { project } = loadPatternText(text, 'c.hingeplan.json');
    await call('recovery:write', { id: 'doc-1', project, documentName: 'coupon.hingeplan.json', originalPath: null });
    const startup = (await call('app:startup', {})) as { recovery: { id: string }[] };
    expect(startup.recovery.map((e) => e.id)).toContain('doc-1');
    const r = (await call('recovery:restore', { id: 'doc-1' })) as { status: string; document: { recovered: boolean; project: { drives: unknown } } };
    expect(r.status).toBe('opened');
    expect(r.document.recovered).toBe(true);
    expect(r.document.project.drives).toEqual(project!.drives.map(({ crease, angleDeg }) => ({ crease, angleDeg })));
    await call('recovery:clear', { id: 'doc-1' });
    expect(((await call('app:startup', {})) as { recovery: unknown[] }).recovery).toEqual([]);
  });

  it('rejects a malformed request at the boundary with a code, and runs nothing', async () => {
    const r = await service.dispatch('doc:save', { project: { nonsense: true } });
    expect(r).toMatchObject({ ok: false, error: { code: 'bad-request' } });
    const unknown = await service.dispatch('fs:read', { path: '/etc/passwd' });
    expect(unknown).toMatchObject({ ok: false, error: { code: 'unknown-channel' } });
  });

  it('makes a new document from a generator and reports bad parameters as messages', async () => {
    const ok = (await call('doc:new', { kind: 'miura', rows: 2, cols: 3, a: 20, b: 15, alphaDeg: 60 })) as { status: string; document: { project: { source: { edges: unknown[] } } } };
    expect(ok.status).toBe('opened');
    const bad = (await call('doc:new', { kind: 'single-vertex', sectorsDeg: [100, 100, 100] })) as { status: string; messages: { severity: string }[] };
    expect(bad.status).toBe('failed');
    expect(bad.messages.some((m) => m.severity === 'error')).toBe(true);
  });

  it('copies text to the clipboard through the host', async () => {
    await call('clipboard:write', { text: 'a,b\n1,2\n' });
    expect(host.clip).toBe('a,b\n1,2\n');
  });

  it('runs a sweep in the worker with progress to the page, and stops it on cancel', async () => {
    const m = miura({ rows: 12, cols: 12, a: 20, b: 15, alphaDeg: 70 }).project!;
    await call('pattern:set', { key: 'm12', source: m.source });
    host.events = [];
    const options = { drive: m.drives[0].crease, fromDeg: 0, toDeg: 180, stepDeg: 0.05, held: [] };
    const running = service.dispatch('sweep', { requestId: 'long-1', key: 'm12', options });
    for (let i = 0; i < 200 && !host.events.length; i++) await new Promise((r) => setTimeout(r, 20));
    expect(host.events.length).toBeGreaterThan(0);
    expect(host.events[0]).toMatchObject(['job:progress', { requestId: 'long-1', total: 3601 }]);
    expect(await call('job:cancel', { requestId: 'long-1' })).toEqual({ cancelled: true });
    expect(await running).toEqual({ ok: true, value: { status: 'cancelled' } });
    // the lane is free again soon: the sweep saw the stop flag
    const t0 = Date.now();
    const short = (await call('sweep', { requestId: 'short-1', key: 'm12', options: { ...options, stepDeg: 30 } })) as { status: string; value: { samples: unknown[]; complete: boolean } };
    expect(Date.now() - t0).toBeLessThan(3000);
    expect(short.status).toBe('done');
    expect(short.value.samples.length).toBe(7);
  });

  it('writes the angle table and the schedule of a computed path, each with the cautions line', async () => {
    const loaded = loadPatternText(readFileSync(coupon, 'utf8'), 'c.hingeplan.json');
    await call('pattern:set', { key: 'tab', source: loaded.project!.source });
    const path1 = (await call('sweep', { requestId: 'tab-1', key: 'tab', options: { drive: 'c0', fromDeg: 0, toDeg: 120, stepDeg: 2, held: [] } })) as { value: { pathId: string; samples: { driveDeg: number; anglesDeg: number[] }[] } };
    const target = path.join(tmp, 'table.csv');
    host.save.push(target);
    await call('doc:export', { kind: 'angle-table', project: loaded.project, key: 'tab', pathId: path1.value.pathId, options: { format: 'csv', every: 3 }, suggestedName: 'c' });
    const text = readFileSync(target, 'utf8');
    expect(text.split('\n')[0]).toBe(`# ${CAUTIONS}`);
    const rows = Papa.parse<Record<string, string>>(text.split('\n').filter((l) => !l.startsWith('#')).join('\n'), { header: true, skipEmptyLines: true });
    expect(rows.errors).toEqual([]);
    expect(rows.data.length).toBe(Math.ceil(path1.value.samples.length / 3));
    const c1 = loaded.pattern!.labelIndex.get('c1')!;
    rows.data.forEach((r, k) => {
      const s = path1.value.samples[Math.min(3 * k, path1.value.samples.length - 1)];
      expect(Number(r.drive_deg)).toBeCloseTo(s.driveDeg, 5);
      expect(Number(r.c1_deg)).toBeCloseTo(s.anglesDeg[c1], 5);
    });
    // a schedule needs samples at its step: 2° samples give a 10° schedule, not a 3° one
    const sched = path.join(tmp, 'schedule.csv');
    host.save.push(sched);
    expect(await call('doc:export', { kind: 'schedule', project: loaded.project, key: 'tab', pathId: path1.value.pathId, options: { stepDeg: 10, rateDegPerSec: 5 }, suggestedName: 'c' })).toMatchObject({ status: 'saved' });
    const lines = readFileSync(sched, 'utf8').split('\n').filter((l) => l && !l.startsWith('#'));
    expect(lines[0].split(',').slice(0, 3)).toEqual(['step', 'time_s', 'drive_deg']);
    expect(lines[2].split(',').slice(0, 3)).toEqual(['1', '2.000', '10.000000']);
    host.save.push(path.join(tmp, 'bad.csv'));
    const bad = (await call('doc:export', { kind: 'schedule', project: loaded.project, key: 'tab', pathId: path1.value.pathId, options: { stepDeg: 3 }, suggestedName: 'c' })) as { status: string; message: string };
    expect(bad.status).toBe('failed');
    expect(bad.message).toContain('no sample at 3.000°');
  });
});
