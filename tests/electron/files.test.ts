// Atomic save, reading a chosen file, recovery copies and the recent-files list: a failed or interrupted
// write never damages the file it was replacing and leaves nothing behind for long, a read never takes more
// than the readers' limit, recovery ids cannot name a path, the list keeps the newest first.
import { afterAll, afterEach, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, promises as fs, readdirSync, readFileSync, statSync, writeFileSync, mkdirSync, chmodSync, symlinkSync, lstatSync, utimesSync } from 'node:fs';
import { execFileSync, spawn } from 'node:child_process';
import os from 'node:os';
import path from 'node:path';
import { MAX_OPEN_BYTES, RecentFiles, RecoveryStore, STALE_TEMP_AGE_MS, readFileBytes, readTextFile, removeStaleTemps, tempFileFor, writeFileAtomic } from '../../electron/files';
import { MAX_TEXT_BYTES } from '../../solver/formats/limits';
import type { ProjectDto } from '../../electron/contract';
import { buildWorker } from './support';

const tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-files-'));
afterAll(() => fs.rm(tmp, { recursive: true, force: true }));
afterEach(() => vi.restoreAllMocks());

const project: ProjectDto = {
  source: { name: 'p', vertices: [[0, 0], [1, 0], [0, 1]], edges: [[0, 1], [1, 2], [2, 0]], assignments: ['B', 'B', 'B'], labels: [undefined, undefined, undefined], limits: [undefined, undefined, undefined] },
  drives: [],
};

const temps = (dir: string) => readdirSync(dir).filter((n) => n.includes('.hingeplan-save-'));

/** A process id that certainly runs no more: a child that has exited and been waited for. */
async function deadPid(): Promise<number> {
  const child = spawn('true');
  await new Promise((r) => child.once('exit', r));
  return child.pid!;
}

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
    await expect(writeFileAtomic(dir, 'data')).rejects.toThrow(/not a regular file/);
    expect(readFileSync(path.join(dir, 'inside'), 'utf8')).toBe('x');
    expect(readdirSync(tmp).filter((n) => n.includes('.tmp'))).toEqual([]);
  });

  it('flushes the new file before the rename and the folder after it (so the rename survives a power cut)', async () => {
    // the order of a durable replace on POSIX file systems: fsync(temp), rename(temp, target), fsync(folder)
    // (common practice; see the rename(2) and fsync(2) manual pages: fsync of a file does not flush its directory entry)
    const dir = path.join(tmp, 'order');
    mkdirSync(dir);
    const target = path.join(dir, 'p.hingeplan.json');
    const log: string[] = [];
    const open = fs.open.bind(fs);
    vi.spyOn(fs, 'open').mockImplementation(async (...args: Parameters<typeof fs.open>) => {
      const handle = await open(...args);
      const sync = handle.sync.bind(handle);
      handle.sync = async () => {
        log.push(`sync ${path.basename(String(args[0]))}`);
        return sync();
      };
      return handle;
    });
    const rename = fs.rename.bind(fs);
    vi.spyOn(fs, 'rename').mockImplementation(async (a, b) => {
      log.push(`rename ${path.basename(String(b))}`);
      return rename(a, b);
    });
    await writeFileAtomic(target, 'x');
    expect(log.map((l) => l.replace(/hingeplan-save-.*\.tmp$/, 'TEMP'))).toEqual(['sync .p.hingeplan.json.TEMP', 'rename p.hingeplan.json', 'sync order']);
  });

  it('writes through a symbolic link (the link stays a link) and refuses pipes and read-only files', async () => {
    const dir = path.join(tmp, 'kinds');
    mkdirSync(dir);
    const real = path.join(dir, 'real.json');
    writeFileSync(real, 'old');
    const link = path.join(dir, 'link.json');
    symlinkSync(real, link);
    await writeFileAtomic(link, 'through the link');
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(readFileSync(real, 'utf8')).toBe('through the link');
    const fifo = path.join(dir, 'pipe');
    execFileSync('mkfifo', [fifo]);
    await expect(writeFileAtomic(fifo, 'x')).rejects.toMatchObject({ code: 'ENOTREG' });
    expect(lstatSync(fifo).isFIFO()).toBe(true);
    const locked = path.join(dir, 'locked.json');
    writeFileSync(locked, 'keep');
    chmodSync(locked, 0o444);
    await expect(writeFileAtomic(locked, 'x')).rejects.toMatchObject({ code: 'EREADONLY' });
    expect(readFileSync(locked, 'utf8')).toBe('keep');
    expect(temps(dir)).toEqual([]);
  });

  it('names its temporary files recognisably and removes stale ones of the same target on the next save', async () => {
    const dir = path.join(tmp, 'stale');
    mkdirSync(dir);
    const target = path.join(dir, 'panel.hingeplan.json');
    writeFileSync(target, 'v0');
    const name = path.basename(tempFileFor(target));
    expect(name).toMatch(/^\.panel\.hingeplan\.json\.hingeplan-save-\d+-[0-9a-f]+\.tmp$/);
    const dead = await deadPid();
    const ofDead = path.join(dir, `.panel.hingeplan.json.hingeplan-save-${dead}-aa.tmp`);
    const ofLive = path.join(dir, `.panel.hingeplan.json.hingeplan-save-${process.ppid}-bb.tmp`);
    const ofLiveOld = path.join(dir, `.panel.hingeplan.json.hingeplan-save-${process.ppid}-cc.tmp`);
    const otherTarget = path.join(dir, `.other.json.hingeplan-save-${dead}-dd.tmp`);
    const notOurs = path.join(dir, '.panel.hingeplan.json.swp');
    for (const f of [ofDead, ofLive, ofLiveOld, otherTarget, notOurs]) writeFileSync(f, 'partial');
    const old = (Date.now() - STALE_TEMP_AGE_MS - 60_000) / 1000;
    utimesSync(ofLiveOld, old, old);
    await writeFileAtomic(target, 'v1');
    const left = readdirSync(dir).sort();
    // the dead writer's and the hour-old one are gone; a live process's fresh one, another file's and a file not ours stay
    expect(left).toEqual([path.basename(notOurs), path.basename(otherTarget), path.basename(ofLive), 'panel.hingeplan.json'].sort());
    expect(await removeStaleTemps(target, { alive: () => false })).toEqual([ofLive]);
  });

  it('leaves the old file or a whole new one whenever the saving process is killed (kill -9 timing sweep)', async () => {
    const script = await buildWorker('tests/electron/fixtures/save-loop.ts');
    const dir = path.join(tmp, 'kill');
    mkdirSync(dir);
    const size = 500_000;
    // four files swept side by side (process start-up dominates the time), five kills each
    const sweepOne = async (lane: number) => {
      const target = path.join(dir, `sweep-${lane}.hingeplan.json`);
      const mine = () => temps(dir).filter((n) => n.startsWith(`.${path.basename(target)}.`));
      writeFileSync(target, JSON.stringify({ version: 0, pad: '0'.repeat(size) }));
      let lastVersion = 0;
      let interrupted = 0;
      for (let i = 0; i < 5; i++) {
        const child = spawn(process.execPath, [script, target, String(size), String(lastVersion + 1)], { stdio: ['ignore', 'pipe', 'inherit'] });
        await new Promise<void>((resolve) => child.stdout!.once('data', () => resolve()));
        // kill moments spread over a few save cycles: during the write, the flush, the rename or the folder flush
        await new Promise((r) => setTimeout(r, 2 + (((lane * 5 + i) * 29) % 160)));
        const exited = new Promise((r) => child.once('exit', r));
        child.kill('SIGKILL');
        await exited;
        const saved = JSON.parse(readFileSync(target, 'utf8')) as { version: number; pad: string };
        expect(saved.pad.length, `${target} after kill ${i}`).toBe(size);
        expect(saved.pad).toBe(String(saved.version % 10).repeat(size));
        expect(saved.version).toBeGreaterThanOrEqual(lastVersion);
        lastVersion = saved.version;
        // at most the killed save's own temporary file: each new save removed the ones before
        expect(mine().length, `${target} after kill ${i}: ${mine().join(', ')}`).toBeLessThanOrEqual(1);
        interrupted += mine().length;
      }
      // the next save (here, in this process) cleans up the last one
      await writeFileAtomic(target, JSON.stringify({ version: lastVersion + 1, pad: '' }));
      expect(mine()).toEqual([]);
      return { lastVersion, interrupted };
    };
    const lanes = await Promise.all([0, 1, 2, 3].map(sweepOne));
    // the kills landed while saves were running, and saves completed between them
    expect(lanes.reduce((n, l) => n + l.interrupted, 0)).toBeGreaterThan(0);
    expect(lanes.some((l) => l.lastVersion > 0)).toBe(true);
  }, 60_000);
});

describe('reading a chosen file', () => {
  it('drops a byte-order mark and names the problem when the file cannot be read', async () => {
    const f = path.join(tmp, 'bom.json');
    writeFileSync(f, '\ufeff{"a":1}');
    expect(await readTextFile(f)).toEqual({ ok: true, text: '{"a":1}' });
    expect(await readTextFile(path.join(tmp, 'none.json'))).toMatchObject({ ok: false, code: 'file-missing' });
    expect(await readTextFile(tmp)).toMatchObject({ ok: false, code: 'not-a-file' });
  });

  it('refuses a file over the readers’ 32 MiB from its size alone, without reading it', async () => {
    expect(MAX_OPEN_BYTES).toBe(MAX_TEXT_BYTES + 3);
    const big = path.join(tmp, 'big.hingeplan.json');
    // a sparse file: its size says 200 MB, no block of it is written
    await fs.writeFile(big, '');
    await fs.truncate(big, 200_000_000);
    const reads = vi.spyOn(fs, 'open');
    const r = await readTextFile(big);
    expect(r).toMatchObject({ ok: false, code: 'file-too-large' });
    expect((r as { message: string }).message).toMatch(/190\.7 MiB; the most a pattern file may hold is 32 MiB/);
    expect(reads).not.toHaveBeenCalled();
    // one byte over the limit is too large, at the limit it is read
    await fs.truncate(big, MAX_OPEN_BYTES + 1);
    expect(await readFileBytes(big)).toMatchObject({ ok: false, code: 'file-too-large' });
    await fs.truncate(big, MAX_OPEN_BYTES);
    const at = await readFileBytes(big);
    expect(at.ok && at.bytes.length).toBe(MAX_OPEN_BYTES);
    await fs.rm(big);
  });

  it('refuses a pipe without waiting for a writer', async () => {
    const fifo = path.join(tmp, 'pattern.fifo');
    execFileSync('mkfifo', [fifo]);
    expect(await readFileBytes(fifo)).toMatchObject({ ok: false, code: 'not-a-file' });
  });

  it('refuses text that is not UTF-8, naming the byte and its line', async () => {
    const f = path.join(tmp, 'latin1.hingeplan.json');
    // "Größe" in ISO 8859-1 on line 3: 0xF6 starts no UTF-8 sequence that "e" could continue
    writeFileSync(f, Buffer.concat([Buffer.from('{\n "name":\n "Gr'), Buffer.from([0xf6]), Buffer.from('e"}')]));
    const r = await readTextFile(f);
    expect(r).toMatchObject({ ok: false, code: 'not-text' });
    expect((r as { message: string }).message).toMatch(/^latin1\.hingeplan\.json: The file is not UTF-8 text: at line 3, byte 5 of the line \(byte 15 of the file\) the bytes f6 65/);
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
