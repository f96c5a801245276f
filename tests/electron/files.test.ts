// Atomic save, recovery copies and the recent-files list: a failed write never damages the file it was
// replacing, recovery ids cannot name a path, the list keeps the newest first.
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, promises as fs, readdirSync, readFileSync, statSync, writeFileSync, mkdirSync, chmodSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { RecentFiles, RecoveryStore, readTextFile, writeFileAtomic } from '../../electron/files';
import type { ProjectDto } from '../../electron/contract';

const tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-files-'));
afterAll(() => fs.rm(tmp, { recursive: true, force: true }));

const project: ProjectDto = {
  source: { name: 'p', vertices: [[0, 0], [1, 0], [0, 1]], edges: [[0, 1], [1, 2], [2, 0]], assignments: ['B', 'B', 'B'], labels: [undefined, undefined, undefined], limits: [undefined, undefined, undefined] },
  drives: [],
};

describe('atomic save', () => {
  it('replaces the file whole and leaves no temporary file behind', async () => {
    const f = path.join(tmp, 'a.json');
    writeFileSync(f, 'old');
    chmodSync(f, 0o640);
    await writeFileAtomic(f, 'new contents');
    expect(readFileSync(f, 'utf8')).toBe('new contents');
    expect(statSync(f).mode & 0o777).toBe(0o640);
    expect(readdirSync(tmp).filter((n) => n.includes('.tmp'))).toEqual([]);
  });

  it('keeps the old file when the new one cannot take its place', async () => {
    const dir = path.join(tmp, 'target-is-a-folder');
    mkdirSync(dir);
    writeFileSync(path.join(dir, 'inside'), 'x');
    await expect(writeFileAtomic(dir, 'data')).rejects.toThrow();
    expect(readFileSync(path.join(dir, 'inside'), 'utf8')).toBe('x');
    expect(readdirSync(tmp).filter((n) => n.includes('.tmp'))).toEqual([]);
  });
});

describe('reading a chosen file', () => {
  it('drops a byte-order mark and names the problem when the file cannot be read', async () => {
    const f = path.join(tmp, 'bom.json');
    writeFileSync(f, '\ufeff{"a":1}');
    expect(await readTextFile(f)).toEqual({ ok: true, text: '{"a":1}' });
    expect(await readTextFile(path.join(tmp, 'none.json'))).toMatchObject({ ok: false, code: 'file-missing' });
    expect(await readTextFile(tmp)).toMatchObject({ ok: false, code: 'not-a-file' });
  });
});

describe('recovery copies', () => {
  it('round-trips a project and lists the newest first', async () => {
    const store = new RecoveryStore(path.join(tmp, 'rec'));
    await store.write('doc-a', project, 'a.hingeplan.json', null, new Date('2026-01-01T00:00:00Z'));
    await store.write('doc-b', { ...project, drives: [{ crease: '0', angleDeg: 5 }] }, 'b.hingeplan.json', '/x/b.hingeplan.json', new Date('2026-01-02T00:00:00Z'));
    expect((await store.list()).map((e) => e.id)).toEqual(['doc-b', 'doc-a']);
    expect((await store.read('doc-b'))!.project.drives).toEqual([{ crease: '0', angleDeg: 5 }]);
    await store.clear('doc-b');
    expect((await store.list()).map((e) => e.id)).toEqual(['doc-a']);
  });

  it('refuses ids that could point outside its folder and skips damaged copies', async () => {
    const store = new RecoveryStore(path.join(tmp, 'rec2'));
    await expect(store.write('../escape', project, 'x', null)).rejects.toThrow();
    mkdirSync(path.join(tmp, 'rec2'), { recursive: true });
    writeFileSync(path.join(tmp, 'rec2', 'junk.recovery.json'), '{not json');
    expect(await store.list()).toEqual([]);
  });
});

describe('recent files', () => {
  it('keeps the newest first, without repeats, up to its limit, across restarts', async () => {
    const file = path.join(tmp, 'recent.json');
    const r = new RecentFiles(file, 3);
    for (const p of ['/a/1.json', '/a/2.json', '/a/1.json', '/a/3.json', '/a/4.json']) await r.add(p);
    expect((await r.list()).map((i) => i.path)).toEqual(['/a/4.json', '/a/3.json', '/a/1.json']);
    const again = new RecentFiles(file, 3);
    expect(await again.has('/a/3.json')).toBe(true);
    expect(await again.has('/a/2.json')).toBe(false);
    await again.remove('/a/3.json');
    expect((await again.list()).map((i) => i.name)).toEqual(['4.json', '1.json']);
  });
});
