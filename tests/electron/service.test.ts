// The main process's handlers, run in Node with the real solver worker and a fake desktop: opening (good
// and bad files), saving atomically, exports, recovery copies, solving and the checks at the boundary.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, promises as fs, readdirSync, readFileSync } from 'node:fs';
import os from 'node:os';
import { spawn } from 'node:child_process';
import path from 'node:path';
import { createService, type DialogHost } from '../../electron/service';
import { SolverClient } from '../../electron/solver-client';
import { nodeWorkerSpawner } from '../../electron/worker-client';
import { RecentFiles, RecoveryStore } from '../../electron/files';
import { loadPatternText, solveDrives, CAUTIONS } from '../../solver';
import { buildWorker, SAMPLES } from './support';
import Papa from 'papaparse';
import { createHash } from 'node:crypto';
import { main } from '../../cli/main';
import { nodeIo, type Io } from '../../cli/io';
import { miura } from '../../solver';
import { metadata } from '../support/table-header';

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


/** A table without the lines that name where and when it was written (the command line ran on the full path). */
const withoutDate = (text: string) => text.replace(/^# (date|file|program|command): .*$/gm, '');

/** A recorded command (POSIX words, single quotes) run by the command line in a folder. */
function runRecorded(command: string, dir: string): Promise<{ code: number; out: string }> {
  const words = [...command.matchAll(/'((?:[^']|'\\'')*)'|(\S+)/g)].map((m) => (m[1] !== undefined ? m[1].replace(/'\\''/g, "'") : m[2]));
  expect(words.slice(0, 1)).toEqual(['hingeplan']);
  const argv = words.slice(1).map((w, i) => (i === 1 ? path.join(dir, w) : w));
  let out = '';
  const io: Io = { ...nodeIo(), stdout: (t) => { out += t; }, stderr: () => {}, stderrIsTTY: false };
  return main(argv, io).then((code) => ({ code, out }));
}

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

  it('refuses a file over the readers’ limit before reading it, and names the line of a byte that is not UTF-8', async () => {
    const big = path.join(tmp, 'huge.hingeplan.json');
    await fs.writeFile(big, '');
    await fs.truncate(big, 40 * 1024 * 1024);
    host.open.push(big);
    const r = (await call('doc:open', { format: 'any' })) as { status: string; messages: { code: string; text: string }[] };
    expect(r).toMatchObject({ status: 'failed', messages: [{ code: 'file-too-large' }] });
    expect(r.messages[0].text).toContain('32 MiB');
    const latin1 = path.join(tmp, 'latin1.hingeplan.json');
    await fs.writeFile(latin1, Buffer.concat([Buffer.from('{\n  "name": "Gr'), Buffer.from([0xf6]), Buffer.from('\u00dfe"\n}\n')]));
    host.open.push(latin1);
    const bad = (await call('doc:open', { format: 'any' })) as { status: string; messages: { code: string; text: string; where?: { line?: number } }[] };
    expect(bad).toMatchObject({ status: 'failed', messages: [{ code: 'not-text', where: { line: 2 } }] });
    expect(bad.messages[0].text).toMatch(/latin1\.hingeplan\.json: The file is not UTF-8 text: at line 2, byte \d+ of the line/);
  });

  it('clears what an interrupted save left beside a file when it is opened', async () => {
    const dir = path.join(tmp, 'leftovers');
    await fs.mkdir(dir);
    const file = path.join(dir, 'coupon.hingeplan.json');
    await fs.copyFile(coupon, file);
    const child = spawn('true');
    await new Promise((r) => child.once('exit', r));
    const left = path.join(dir, `.coupon.hingeplan.json.hingeplan-save-${child.pid}-0a1b.tmp`);
    await fs.writeFile(left, '{"format": "hingeplan-pro');
    host.open.push(file);
    expect(await call('doc:open', {})).toMatchObject({ status: 'opened' });
    expect(readdirSync(dir)).toEqual(['coupon.hingeplan.json']);
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

  it('imports a DXF or SVG drawing through the same readers, and exports the flat pattern as DXF and SVG', async () => {
    const drawn = path.join(tmp, 'coupon.svg');
    await fs.copyFile(path.join(__dirname, '..', 'fixtures', 'drawings', 'coupon.svg'), drawn);
    host.open.push(drawn);
    const r = (await call('doc:open', { format: 'drawing' })) as { status: string; document: { format: string; project: { source: { assignments: string[] } }; messages: { code: string }[] } };
    expect(r.status).toBe('opened');
    expect(r.document.format).toBe('svg');
    expect(r.document.project.source.assignments.filter((a) => a !== 'B').sort()).toEqual(['M', 'M', 'M', 'V']);
    expect(r.document.messages.map((m) => m.code)).toEqual(expect.arrayContaining(['drawing-read', 'duplicates-dropped', 't-junctions-split']));
    // saving a drawing asks for a project file; it never writes over the drawing
    const n = host.saveRequests.length;
    host.save.push(null);
    await call('doc:save', { project: r.document.project, filePath: drawn, saveAs: false, suggestedName: 'coupon.svg' });
    expect(host.saveRequests.length).toBe(n + 1);
    expect(host.saveRequests.at(-1)!.defaultName).toBe('coupon.hingeplan.json');
    // a drawing that cannot be read says where
    const curved = path.join(tmp, 'curved.dxf');
    await fs.writeFile(curved, '  0\nSECTION\n  2\nENTITIES\n  0\nCIRCLE\n  8\ncut\n 10\n0\n 20\n0\n 40\n5\n  0\nENDSEC\n  0\nEOF\n');
    host.open.push(curved);
    const bad = (await call('doc:open', { format: 'any' })) as { status: string; messages: { code: string; where?: { line?: number } }[] };
    expect(bad.status).toBe('failed');
    expect(bad.messages.find((m) => m.code === 'dxf-curve')?.where?.line).toBe(5);
    // exports of the flat pattern
    await call('pattern:set', { key: 'drawn', source: r.document.project.source });
    for (const kind of ['dxf', 'svg'] as const) {
      const target = path.join(tmp, `flat.${kind}`);
      host.save.push(target);
      const w = await call('doc:export', { kind, project: r.document.project, key: 'drawn', options: {}, suggestedName: 'coupon.svg' });
      expect(w).toMatchObject({ status: 'saved', filePath: target });
      expect(host.saveRequests.at(-1)!.defaultName).toBe(`coupon.${kind}`);
      const back = loadPatternText(readFileSync(target, 'utf8'), target);
      expect(back.pattern!.creases.filter((c) => c.assignment !== 'B')).toHaveLength(4);
      expect(readFileSync(target, 'utf8')).toContain(CAUTIONS);
    }
  });

  it('reads an imported drawing again with its layers assigned as the person says, and only a drawing it opened', async () => {
    // the coupon drawing with its mountain group under a name that says nothing
    const drawn = path.join(tmp, 'coupon-unnamed.svg');
    const text = readFileSync(path.join(__dirname, '..', 'fixtures', 'drawings', 'coupon.svg'), 'utf8').replace('id="mountains"', 'id="folds-a"');
    await fs.writeFile(drawn, text);
    host.open.push(drawn);
    type Opened = { status: string; document: { filePath: string; project: { source: { assignments: string[] } }; drawingLayers: { name: string; assignment: string; how: string; lines: number }[]; drawingColours: { colour: string; text: string; lines: number; assignment?: string }[]; drawingOptions: { layers: unknown[]; snap?: number } } };
    const r = (await call('doc:open', { format: 'drawing' })) as Opened;
    expect(r.status).toBe('opened');
    expect(r.document.drawingLayers).toEqual(expect.arrayContaining([
      // c1 is a polyline of two pieces: four lines
      { name: 'folds-a', assignment: 'U', how: 'none', lines: 4 },
      expect.objectContaining({ assignment: 'V', how: 'name' }),
      { name: 'sheet-outline', assignment: 'B', how: 'name', lines: 4 },
    ]));
    expect(r.document.project.source.assignments.filter((a) => a !== 'B').sort()).toEqual(['U', 'U', 'U', 'V']);
    const again = (await call('doc:reread-drawing', { path: r.document.filePath, options: { layers: [{ name: 'folds-a', assignment: 'M' }], snap: 0.01 } })) as Opened;
    expect(again.status).toBe('opened');
    expect(again.document.project.source.assignments.filter((a) => a !== 'B').sort()).toEqual(['M', 'M', 'M', 'V']);
    expect(again.document.drawingLayers).toEqual(expect.arrayContaining([{ name: 'folds-a', assignment: 'M', how: 'layer', lines: 4 }]));
    expect(again.document.drawingOptions).toEqual({ layers: [{ name: 'folds-a', assignment: 'M' }], strokes: [], snap: 0.01 });
    // the colours the lines are drawn in (the drawing's CSS classes), and a colour mapped: it wins over the
    // words of a group's name ("Valley folds"), as --stroke does
    expect(r.document.drawingColours).toEqual(expect.arrayContaining([
      { colour: '#222222', text: '#222222', lines: 7 },
      { colour: '#000000', text: '#000000', lines: 4 },
    ]));
    const coloured = (await call('doc:reread-drawing', { path: r.document.filePath, options: { layers: [], strokes: [{ colour: '#222222', assignment: 'M' }] } })) as Opened;
    expect(coloured.document.project.source.assignments.filter((a) => a !== 'B').sort()).toEqual(['M', 'M', 'M', 'M']);
    expect(coloured.document.drawingColours).toEqual(expect.arrayContaining([{ colour: '#222222', text: '#222222', lines: 7, assignment: 'M' }]));
    // a file the window never opened, or one that is not a drawing, is not read
    const other = path.join(tmp, 'never-opened.svg');
    await fs.writeFile(other, text);
    expect(await call('doc:reread-drawing', { path: other, options: { layers: [] } })).toMatchObject({ status: 'failed', messages: [{ code: 'not-approved' }] });
    expect(await call('doc:reread-drawing', { path: coupon, options: { layers: [] } })).toMatchObject({ status: 'failed', messages: [{ code: 'not-approved' }] });
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
    const m = miura({ rows: 6, cols: 6, a: 20, b: 15, alphaDeg: 70 }).project!;
    await call('pattern:set', { key: 'm6', source: m.source });
    host.events = [];
    const options = { drive: m.drives[0].crease, fromDeg: 0, toDeg: 180, stepDeg: 0.02, held: [] };
    const running = service.dispatch('sweep', { requestId: 'long-1', key: 'm6', options });
    for (let i = 0; i < 1000 && !host.events.length; i++) await new Promise((r) => setTimeout(r, 20));
    expect(host.events.length).toBeGreaterThan(0);
    expect(host.events[0]).toMatchObject(['job:progress', { requestId: 'long-1', total: 9001 }]);
    expect(await call('job:cancel', { requestId: 'long-1' })).toEqual({ cancelled: true });
    expect(await running).toEqual({ ok: true, value: { status: 'cancelled' } });
    // the lane is free again at once: the sweep saw the stop flag (a quick job on the same lane answers)
    const t0 = Date.now();
    expect(await solver.run('long', 'set-pattern', { key: 'probe', source: loadPatternText(readFileSync(coupon, 'utf8'), 'c.json').project!.source })).toMatchObject({ status: 'done' });
    expect(Date.now() - t0).toBeLessThan(3000);
    const short = (await call('sweep', { requestId: 'short-1', key: 'probe', options: { drive: 'c0', fromDeg: 0, toDeg: 150, stepDeg: 30, held: [] } })) as { status: string; value: { samples: unknown[]; complete: boolean } };
    expect(short.status).toBe('done');
    expect(short.value.samples.length).toBe(6);
  });

  it('writes the angle table with the command-line header, and the recorded command writes the same table', async () => {
    const file = path.join(tmp, 'coupon-table.hingeplan.json');
    await fs.copyFile(coupon, file);
    host.open.push(file);
    const opened = (await call('doc:open', {})) as { document: { project: { source: unknown } } };
    const project = opened.document.project;
    await call('pattern:set', { key: 'tab', source: project.source });
    const swept = (await call('sweep', { requestId: 'tab-1', key: 'tab', options: { drive: 'c0', fromDeg: 0, toDeg: 120, stepDeg: 2.5, held: [] } })) as { value: { pathId: string; samples: { driveDeg: number; anglesDeg: number[] }[] } };
    const target = path.join(tmp, 'table.csv');
    host.save.push(target);
    await call('doc:export', { kind: 'angle-table', project, key: 'tab', pathId: swept.value.pathId, options: { format: 'csv', rates: true }, suggestedName: 'x', filePath: file });
    const text = readFileSync(target, 'utf8');
    const meta = metadata(text);
    expect(meta.get('format')).toBe('hingeplan-angle-table');
    expect(meta.get('cautions')).toBe(CAUTIONS);
    expect(meta.get('file')).toBe('coupon-table.hingeplan.json');
    // the hash against Node's own SHA-256 of the file's bytes (FIPS 180-4 through OpenSSL)
    expect(meta.get('fileSha256')).toBe(createHash('sha256').update(readFileSync(file)).digest('hex'));
    expect(meta.get('program')).toBe('hingeplan t');
    expect(meta.get('command')).toBe('hingeplan table coupon-table.hingeplan.json --drive c0 --from 0 --to 120 --step 2.5 --format csv --rates');
    const rows = Papa.parse<Record<string, string>>(text.split('\n').filter((l) => !l.startsWith('#')).join('\n'), { header: true, skipEmptyLines: true });
    expect(rows.errors).toEqual([]);
    expect(rows.data.length).toBe(49);
    expect(rows.meta.fields).toContain('rate:c1');
    const c1 = loadPatternText(readFileSync(coupon, 'utf8'), 'c.json').pattern!.labelIndex.get('c1')!;
    rows.data.forEach((r, k) => {
      expect(Number(r.drive)).toBe(2.5 * k);
      expect(Number(r.c1)).toBeCloseTo(swept.value.samples[k].anglesDeg[c1], 10);
    });
    // the recorded command, run by the command line in the file's folder, writes the same rows and header
    const cli = await runRecorded(meta.get('command')!, tmp);
    expect(cli.code).toBe(0);
    expect(withoutDate(cli.out)).toBe(withoutDate(text));
  });

  it('solves the schedule anew at its time rows: the drive velocity follows the trapezoid, the command line agrees', async () => {
    const file = path.join(tmp, 'coupon-schedule.hingeplan.json');
    await fs.copyFile(coupon, file);
    host.open.push(file);
    const project = ((await call('doc:open', {})) as { document: { project: { source: unknown } } }).document.project;
    await call('pattern:set', { key: 'sch', source: project.source });
    const swept = (await call('sweep', { requestId: 'sch-1', key: 'sch', options: { drive: 'c0', fromDeg: 0, toDeg: 90, stepDeg: 10, held: [] } })) as { value: { pathId: string } };
    const target = path.join(tmp, 'schedule.csv');
    host.save.push(target);
    const options = { format: 'csv', timeS: 6, profile: 'trapezoid', accelTimeS: 1.5, rows: 25, maxRateDegPerS: 25 };
    expect(await call('doc:export', { kind: 'schedule', project, key: 'sch', pathId: swept.value.pathId, options, suggestedName: 'x', filePath: file })).toMatchObject({ status: 'saved' });
    const text = readFileSync(target, 'utf8');
    const meta = metadata(text);
    expect(meta.get('format')).toBe('hingeplan-deployment-schedule');
    expect(meta.get('cautions')).toBe(CAUTIONS);
    expect(meta.get('command')).toBe('hingeplan schedule coupon-schedule.hingeplan.json --drive c0 --from 0 --to 90 --time 6 --profile trapezoid --accel-time 1.5 --rows 25 --max-rate 25 --format csv');
    const rows = Papa.parse<Record<string, string>>(text.split('\n').filter((l) => !l.startsWith('#')).join('\n'), { header: true, skipEmptyLines: true });
    expect(rows.errors).toEqual([]);
    expect(rows.data.length).toBe(25);
    // trapezoidal velocity profile (common practice for point-to-point moves): v rises at a = v_max/t_a for
    // t_a, cruises at v_max = Δ/(T − t_a), and falls symmetrically; Δ = 90°, T = 6 s, t_a = 1.5 s → v_max = 20°/s
    const T = 6, ta = 1.5, vmax = 90 / (T - ta);
    const expected = (t: number) => (t < ta ? (vmax * t) / ta : t > T - ta ? (vmax * (T - t)) / ta : vmax);
    const pattern = loadPatternText(readFileSync(coupon, 'utf8'), 'c.json').pattern!;
    const c1 = pattern.labelIndex.get('c1')!;
    rows.data.forEach((r, k) => {
      expect(Number(r.t)).toBeCloseTo(k * 0.25, 12);
      expect(Number(r.drive_velocity)).toBeCloseTo(expected(Number(r.t)), 9);
      // each row is a closed state at its own drive value (no row is taken from the 10° samples)
      const ref = solveDrives(pattern, [{ crease: pattern.labelIndex.get('c0')!, value: (Number(r.drive) * Math.PI) / 180 }]);
      expect(ref.solutions.some((s) => Math.abs((s.angles[c1] * 180) / Math.PI - Number(r.c1)) < 1e-7)).toBe(true);
    });
    expect(rows.data.some((r) => r.flags.includes('rate:'))).toBe(true);
    const cli = await runRecorded(meta.get('command')!, tmp);
    expect(cli.code).toBe(4);
    expect(withoutDate(cli.out)).toBe(withoutDate(text));
  });

  it('refuses a schedule it cannot solve, naming the problem', async () => {
    const loaded = loadPatternText(readFileSync(coupon, 'utf8'), 'c.hingeplan.json');
    await call('pattern:set', { key: 'bad', source: loaded.project!.source });
    const swept = (await call('sweep', { requestId: 'bad-1', key: 'bad', options: { drive: 'c0', fromDeg: 0, toDeg: 60, stepDeg: 10, held: [] } })) as { value: { pathId: string } };
    host.save.push(path.join(tmp, 'bad.csv'));
    const bad = (await call('doc:export', { kind: 'schedule', project: loaded.project, key: 'bad', pathId: swept.value.pathId, options: { timeS: 4, profile: 's-curve', accelTimeS: 1, jerkTimeS: 0.8 }, suggestedName: 'c' })) as { status: string; message: string };
    expect(bad.status).toBe('failed');
    expect(bad.message).toContain('jerk time');
    expect(readdirSync(tmp)).not.toContain('bad.csv');
  });
});
