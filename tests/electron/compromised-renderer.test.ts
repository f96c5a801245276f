// A compromised page drives the real handlers (electron/service.ts, real solver worker) with any request the
// contract lets through. Whatever it names, nothing is written without a dialog except files main itself
// approved: chosen in a dialog, named on the command line, or in main's own recent-files list. (Electron's
// security checklist, "Validate the sender of all IPC messages" and "do not trust the renderer": common
// practice for desktop shells.)
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, promises as fs, readFileSync, readdirSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createService, type DialogHost } from '../../electron/service';
import { SolverClient } from '../../electron/solver-client';
import { nodeWorkerSpawner } from '../../electron/worker-client';
import { RecentFiles, RecoveryStore } from '../../electron/files';
import { loadPatternText } from '../../solver';
import { buildWorker, SAMPLES } from './support';

class Host implements DialogHost {
  save: (string | null)[] = [];
  open: (string | null)[] = [];
  saveAsked = 0;
  states: { filePath: string | null }[] = [];
  async chooseOpenFile() {
    return this.open.shift() ?? null;
  }
  async chooseSaveFile() {
    this.saveAsked++;
    return this.save.shift() ?? null;
  }
  async confirmDiscard() {
    return 'cancel' as const;
  }
  writeClipboard() {}
  documentState(s: { filePath: string | null }) {
    this.states.push(s);
  }
  emit() {}
  closeReady() {}
  recentChanged() {}
}

let tmp: string;
let solver: SolverClient;
let worker: string;
const coupon = path.join(SAMPLES, 'hinge-coupon.hingeplan.json');
const project = loadPatternText(readFileSync(coupon, 'utf8'), 'c.hingeplan.json').project!;

beforeAll(async () => {
  worker = await buildWorker('electron/solver-worker.ts');
  solver = new SolverClient({ spawn: nodeWorkerSpawner(worker) });
  tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-compromised-'));
});
afterAll(async () => {
  solver.dispose();
  await fs.rm(tmp, { recursive: true, force: true });
});

function session(dir: string, openPath?: string) {
  const host = new Host();
  const recovery = new RecoveryStore(path.join(dir, 'recovery'));
  const recent = new RecentFiles(path.join(dir, 'recent.json'));
  const service = createService({ solver, host, recovery, recent, startup: { version: 't', platform: 'linux', samplePath: coupon, openPath } });
  const call = async (channel: string, payload: unknown) => service.dispatch(channel, payload);
  return { host, recovery, recent, service, call };
}

describe('a compromised page', () => {
  it('cannot turn a recovery copy into a write over a file it names', async () => {
    const dir = path.join(tmp, 'a');
    await fs.mkdir(dir);
    const victim = path.join(dir, 'victim.conf');
    await fs.writeFile(victim, 'precious settings\n');
    const { host, call } = session(dir);
    await call('app:startup', {});

    // 1. a recovery copy that claims the victim as its original: refused, nothing kept
    const write = await call('recovery:write', { id: 'evil', project, documentName: 'x', originalPath: victim });
    expect(write).toMatchObject({ ok: false, error: { code: 'not-approved' } });
    expect(existsSync(path.join(dir, 'recovery', 'evil.recovery.json'))).toBe(false);

    // 2. restoring it anyway (the copy does not exist) opens nothing
    expect(await call('recovery:restore', { id: 'evil' })).toMatchObject({ ok: true, value: { status: 'failed' } });

    // 3. saving "to the document's file" with the victim named: main asks where (the person cancels)
    const save = await call('doc:save', { project, filePath: victim, saveAs: false, suggestedName: 'x' });
    expect(save).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(host.saveAsked).toBe(1);
    expect(readFileSync(victim, 'utf8')).toBe('precious settings\n');

    // 4. a file that does not exist yet is not created either
    const fresh = path.join(dir, 'new-file.hingeplan.json');
    expect(await call('doc:save', { project, filePath: fresh, saveAs: false, suggestedName: 'x' })).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(existsSync(fresh)).toBe(false);
    expect(host.saveAsked).toBe(2);

    // 5. a relative path or a path that walks up is no more approved than any other
    for (const trick of ['victim.conf', `${dir}/../a/victim.conf`]) {
      expect(await call('doc:save', { project, filePath: trick, saveAs: false, suggestedName: 'x' })).toEqual({ ok: true, value: { status: 'canceled' } });
    }
    expect(readFileSync(victim, 'utf8')).toBe('precious settings\n');

    // 6. the window's represented file is not the page's to choose
    await call('doc:state', { dirty: true, title: 't', filePath: victim });
    expect(host.states.at(-1)!.filePath).toBeNull();

    // 7. nor can the page read a file through the recent list
    expect(await call('doc:open-recent', { path: victim })).toMatchObject({ ok: true, value: { status: 'failed', messages: [{ code: 'not-recent' }] } });
    // and no file appeared anywhere in the folder
    expect(readdirSync(dir).filter((n) => !['victim.conf', 'recent.json', 'recovery'].includes(n))).toEqual([]);
  });

  it('gets no file to save over from a recovery copy planted on disk', async () => {
    const dir = path.join(tmp, 'b');
    await fs.mkdir(dir);
    const victim = path.join(dir, 'victim.conf');
    await fs.writeFile(victim, 'precious\n');
    const { host, recovery, call } = session(dir);
    // as an older version (or another program) could have left it: main's store, an arbitrary original
    await recovery.write('planted', project, 'planted.hingeplan.json', victim);
    const restored = await call('recovery:restore', { id: 'planted' });
    expect(restored).toMatchObject({ ok: true, value: { status: 'opened', document: { filePath: null, recovered: true } } });
    const messages = (restored as { value: { document: { messages: { code: string }[] } } }).value.document.messages.map((m) => m.code);
    expect(messages).toContain('recovered-unapproved-path');
    // the page saves to the path the copy named: main asks where
    expect(await call('doc:save', { project, filePath: victim, saveAs: false, suggestedName: 'x' })).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(host.saveAsked).toBe(1);
    expect(readFileSync(victim, 'utf8')).toBe('precious\n');
  });
});

describe('files main approved', () => {
  it('saves without a dialog to a file the person opened, and to a recovered copy of it after a restart', async () => {
    const dir = path.join(tmp, 'c');
    await fs.mkdir(dir);
    const file = path.join(dir, 'panel.hingeplan.json');
    await fs.copyFile(coupon, file);
    const first = session(dir);
    first.host.open.push(file);
    const opened = await first.call('doc:open', {});
    expect(opened).toMatchObject({ ok: true, value: { status: 'opened', document: { filePath: file } } });
    expect(await first.call('recovery:write', { id: 'doc-1', project, documentName: 'panel.hingeplan.json', originalPath: file })).toEqual({ ok: true, value: { ok: true } });
    expect(await first.call('doc:save', { project, filePath: file, saveAs: false, suggestedName: 'panel' })).toMatchObject({ ok: true, value: { status: 'saved', filePath: file } });
    expect(first.host.saveAsked).toBe(0);

    // the next session: the file is in main's recent list, so the recovered copy keeps its file
    const second = session(dir);
    const restored = await second.call('recovery:restore', { id: 'doc-1' });
    expect(restored).toMatchObject({ ok: true, value: { status: 'opened', document: { filePath: file } } });
    const edited = { ...project, drives: [{ crease: 'c0', angleDeg: 30 }] };
    expect(await second.call('doc:save', { project: edited, filePath: file, saveAs: false, suggestedName: 'panel' })).toMatchObject({ ok: true, value: { status: 'saved' } });
    expect(second.host.saveAsked).toBe(0);
    expect(loadPatternText(readFileSync(file, 'utf8'), file).project!.drives.map(({ crease, angleDeg }) => ({ crease, angleDeg }))).toEqual([{ crease: 'c0', angleDeg: 30 }]);
  });

  it('takes the file named on the command line as approved, and the built-in sample never', async () => {
    const dir = path.join(tmp, 'd');
    await fs.mkdir(dir);
    const file = path.join(dir, 'cli.hingeplan.json');
    await fs.copyFile(coupon, file);
    const s = session(dir, file);
    await s.call('app:startup', {});
    expect(await s.call('doc:save', { project, filePath: file, saveAs: false, suggestedName: 'x' })).toMatchObject({ ok: true, value: { status: 'saved' } });
    expect(s.host.saveAsked).toBe(0);
    const sample = session(path.join(dir, 'sample'));
    await sample.call('app:startup', {});
    expect(await sample.call('doc:save', { project, filePath: coupon, saveAs: false, suggestedName: 'x' })).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(sample.host.saveAsked).toBe(1);
  });

  it('does not take an export target as a file to save the project over', async () => {
    const dir = path.join(tmp, 'e');
    await fs.mkdir(dir);
    const s = session(dir);
    await s.call('pattern:set', { key: 'k', source: project.source });
    // the person exports to a file of their choice (named like a table: the page asks Save to reuse it)
    const csvLike = path.join(dir, 'table.csv');
    s.host.save.push(csvLike);
    expect(await s.call('doc:export', { kind: 'fold', project, key: 'k', options: {}, suggestedName: 'x' })).toMatchObject({ ok: true, value: { status: 'saved' } });
    const before = readFileSync(csvLike, 'utf8');
    const asked = s.host.saveAsked;
    expect(await s.call('doc:save', { project, filePath: csvLike, saveAs: false, suggestedName: 'x' })).toEqual({ ok: true, value: { status: 'canceled' } });
    expect(s.host.saveAsked).toBe(asked + 1);
    expect(readFileSync(csvLike, 'utf8')).toBe(before);
  });
});
