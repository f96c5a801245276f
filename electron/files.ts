// File work of the main process, in plain Node so tests can run it: atomic save, recovery copies, the
// recent-files list and reading a file a person chose with a clear message when it cannot be read.

import { constants as fsConstants, promises as fs } from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { z } from 'zod';
import { RecentFileSchema, RecoveryEntrySchema, ProjectSchema, type ProjectDto, type RecoveryEntry } from './contract';
import { MAX_TEXT_BYTES } from '../solver/formats/limits';
import { decodeUtf8 } from './text-bytes';

/** The most a pattern file may hold: the readers' own limit (a byte-order mark aside). Refused before reading. */
export const MAX_OPEN_BYTES = MAX_TEXT_BYTES + 3;

const MiB = 1024 * 1024;

export type BytesOutcome = { ok: true; bytes: Uint8Array } | { ok: false; code: string; message: string };
export type ReadOutcome = { ok: true; text: string } | { ok: false; code: string; message: string };

function describeReadError(filePath: string, err: unknown): { ok: false; code: string; message: string } {
  const name = path.basename(filePath);
  const code = (err as NodeJS.ErrnoException).code;
  if (code === 'ENOENT') return { ok: false, code: 'file-missing', message: `${name} no longer exists at ${path.dirname(filePath)}` };
  if (code === 'EACCES' || code === 'EPERM') return { ok: false, code: 'file-denied', message: `${name} cannot be read: permission denied` };
  if (code === 'EISDIR') return { ok: false, code: 'not-a-file', message: `${name} is not a file` };
  return { ok: false, code: 'read-failed', message: `${name} cannot be read: ${(err as Error).message}` };
}

/**
 * The bytes of a regular file of at most `limit` bytes. The size is checked before anything is read (a
 * 200 MB file costs a stat, not 200 MB), the read itself stops one byte past the limit (a file that grows
 * meanwhile is refused, not read whole), and FIFOs, devices and folders are refused without opening them.
 */
export async function readFileBytes(filePath: string, limit = MAX_OPEN_BYTES): Promise<BytesOutcome> {
  const name = path.basename(filePath);
  const tooLarge = (size: number): BytesOutcome => ({
    ok: false,
    code: 'file-too-large',
    message: `${name} is ${(size / MiB).toFixed(1)} MiB; the most a pattern file may hold is ${(limit / MiB).toFixed(0)} MiB`,
  });
  try {
    const before = await fs.stat(filePath);
    if (!before.isFile()) return { ok: false, code: 'not-a-file', message: `${name} is not a file` };
    if (before.size > limit) return tooLarge(before.size);
    // O_NONBLOCK: should the path have become a FIFO since the stat, opening it does not wait for a writer
    const flags = process.platform === 'win32' ? 'r' : fsConstants.O_RDONLY | fsConstants.O_NONBLOCK;
    const handle = await fs.open(filePath, flags);
    try {
      const st = await handle.stat();
      if (!st.isFile()) return { ok: false, code: 'not-a-file', message: `${name} is not a file` };
      if (st.size > limit) return tooLarge(st.size);
      // its own buffer (not Node's shared pool), so what is posted to the worker is this file and nothing else
      const buffer = new Uint8Array(Math.min(st.size, limit) + 1);
      let filled = 0;
      for (;;) {
        const { bytesRead } = await handle.read(buffer, filled, buffer.length - filled, filled);
        if (bytesRead === 0) break;
        filled += bytesRead;
        if (filled > limit) return tooLarge(filled);
        if (filled === buffer.length) break;
      }
      if (filled > limit) return tooLarge(filled);
      return { ok: true, bytes: buffer.subarray(0, filled) };
    } finally {
      await handle.close();
    }
  } catch (err) {
    return describeReadError(filePath, err);
  }
}

/** A file's text: bounded as readFileBytes, UTF-8 only (the first bad byte is named), a byte-order mark dropped. */
export async function readTextFile(filePath: string, limit = MAX_OPEN_BYTES): Promise<ReadOutcome> {
  const read = await readFileBytes(filePath, limit);
  if (!read.ok) return read;
  const decoded = decodeUtf8(read.bytes, path.basename(filePath));
  return decoded.ok ? decoded : { ok: false, code: decoded.code, message: decoded.message };
}

// ---------- saving ----------

/** Temporary files of a save are named `.<target>.hingeplan-save-<pid>-<random>.tmp`, so stale ones can be found. */
const TEMP_MARK = '.hingeplan-save-';
const TEMP_RE = /^\.(.+)\.hingeplan-save-(\d+)-[0-9a-f]+\.tmp$/;
/** A temporary file older than this is stale whoever made it: no save takes an hour. */
export const STALE_TEMP_AGE_MS = 60 * 60 * 1000;
/** Temporary files this process is writing right now (never removed as stale). */
const inFlight = new Set<string>();

export function tempFileFor(filePath: string): string {
  return path.join(path.dirname(filePath), `.${path.basename(filePath)}${TEMP_MARK}${process.pid}-${randomBytes(6).toString('hex')}.tmp`);
}

/** Whether a process with this id runs on this machine (EPERM: it does, under another user). */
export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Remove the temporary files that interrupted saves of `filePath` left beside it: those of a process that
 * no longer runs, and any older than STALE_TEMP_AGE_MS. A save in progress in another live process is left
 * alone. Returns the files removed; never throws (cleaning up is a courtesy, not part of the save).
 */
export async function removeStaleTemps(filePath: string, options: { alive?: (pid: number) => boolean; now?: number } = {}): Promise<string[]> {
  const alive = options.alive ?? processAlive;
  const now = options.now ?? Date.now();
  const dir = path.dirname(filePath);
  const base = path.basename(filePath);
  const removed: string[] = [];
  const names = await fs.readdir(dir).catch(() => [] as string[]);
  for (const name of names) {
    const m = TEMP_RE.exec(name);
    if (!m || m[1] !== base) continue;
    const file = path.join(dir, name);
    if (inFlight.has(file)) continue;
    const pid = Number(m[2]);
    const st = await fs.lstat(file).catch(() => undefined);
    if (!st || !st.isFile()) continue;
    // this process's own, not in flight: a save that failed to clean up; another's: only once it is gone
    const stale = pid === process.pid || !alive(pid) || now - st.mtimeMs > STALE_TEMP_AGE_MS;
    if (!stale) continue;
    await fs.rm(file, { force: true }).then(() => removed.push(file), () => undefined);
  }
  return removed;
}

/** Flush a folder's entries (the rename) to disk; folders cannot be opened for that on Windows. */
async function syncFolder(dir: string): Promise<void> {
  if (process.platform === 'win32') return;
  const handle = await fs.open(dir, 'r');
  try {
    await handle.sync();
  } finally {
    await handle.close();
  }
}

/** The error a save of something that is not a regular file gets (a folder, a FIFO, a device). */
export class NotRegularFileError extends Error {
  readonly code = 'ENOTREG';
}

/** A file being written in pieces that takes its target's place only when it is complete. */
export interface AtomicFile {
  /** append to the temporary file */
  write(data: string | Uint8Array): Promise<void>;
  /** flush, rename over the target, flush the folder */
  commit(): Promise<void>;
  /** remove the temporary file; the target is untouched */
  abort(): Promise<void>;
}

/**
 * Start replacing `filePath` so that a crash at any moment leaves either the old file or the new one:
 * a temporary file beside it takes the pieces, is flushed to disk, renamed over the target (atomic on one
 * volume), then the folder is flushed so the rename itself survives a power cut. A symbolic link is
 * followed (the file it points to is replaced, the link stays); the target's permissions are kept;
 * folders, pipes, devices and read-only files are refused; stale temporary files of earlier interrupted
 * saves of the same target are removed first.
 */
export async function createAtomicFile(filePath: string): Promise<AtomicFile> {
  const target = await fs.realpath(filePath).catch(() => filePath);
  const old = await fs.stat(target).catch(() => undefined);
  if (old && !old.isFile()) throw new NotRegularFileError(`${path.basename(filePath)} is not a regular file`);
  // a file nobody may write is not replaced behind its owner's back (renaming over it would succeed)
  if (old && (old.mode & 0o222) === 0) throw Object.assign(new Error(`${path.basename(filePath)} is read-only`), { code: 'EREADONLY' });
  await removeStaleTemps(target);
  const temp = tempFileFor(target);
  inFlight.add(temp);
  let handle: Awaited<ReturnType<typeof fs.open>> | undefined;
  try {
    // a new file gets 0666 less the umask, as any program's; a replaced one keeps its permissions
    handle = await fs.open(temp, 'wx', 0o666);
    if (old) await handle.chmod(old.mode & 0o777);
  } catch (err) {
    await handle?.close().catch(() => undefined);
    await fs.rm(temp, { force: true });
    inFlight.delete(temp);
    throw err;
  }
  const open = handle;
  let done = false;
  const abort = async () => {
    if (done) return;
    done = true;
    await open.close().catch(() => undefined);
    await fs.rm(temp, { force: true });
    inFlight.delete(temp);
  };
  return {
    async write(data) {
      if (done) throw new Error('the file is already complete');
      await open.writeFile(data);
    },
    async commit() {
      if (done) throw new Error('the file is already complete');
      try {
        await open.sync();
        await open.close();
        done = true;
        await fs.rename(temp, target);
      } catch (err) {
        done = false;
        await abort();
        throw err;
      } finally {
        inFlight.delete(temp);
      }
      await syncFolder(path.dirname(target));
    },
    abort,
  };
}

/** Replace `filePath` with `data` whole (see createAtomicFile). */
export async function writeFileAtomic(filePath: string, data: string | Uint8Array): Promise<void> {
  const file = await createAtomicFile(filePath);
  try {
    await file.write(data);
  } catch (err) {
    await file.abort();
    throw err;
  }
  await file.commit();
}

export function describeWriteError(filePath: string, err: unknown): string {
  const name = path.basename(filePath);
  const code = (err as NodeJS.ErrnoException).code;
  if (code === 'EACCES' || code === 'EPERM') return `${name} was not saved: permission denied in ${path.dirname(filePath)}`;
  if (code === 'ENOSPC') return `${name} was not saved: the disk is full`;
  if (code === 'ENOENT') return `${name} was not saved: the folder ${path.dirname(filePath)} does not exist`;
  if (code === 'ENOTREG' || code === 'EISDIR') return `${name} was not saved: it is not a regular file (a folder, device or pipe), so it is not replaced`;
  if (code === 'EREADONLY') return `${name} was not saved: the file is read-only, so it is not replaced (save under another name, or make it writable)`;
  if (code === 'EROFS') return `${name} was not saved: ${path.dirname(filePath)} is on a read-only disk`;
  return `${name} was not saved: ${(err as Error).message}`;
}

// ---------- recovery copies ----------

const RecoveryFileSchema = z.object({
  entry: RecoveryEntrySchema,
  project: ProjectSchema,
});

/** A recovery copy larger than this is not read (a project's own file may hold 32 MiB; its copy spells it out more). */
const RECOVERY_LIMIT = 4 * MAX_OPEN_BYTES;

/** Recovery copies live in one folder, a file per open document, written while there are unsaved edits. */
export class RecoveryStore {
  constructor(private readonly dir: string) {}

  private file(id: string): string {
    RecoveryEntrySchema.shape.id.parse(id); // ids are plain words: no path can be built from them
    return path.join(this.dir, `${id}.recovery.json`);
  }

  async write(id: string, project: ProjectDto, documentName: string, originalPath: string | null, now = new Date()): Promise<void> {
    await fs.mkdir(this.dir, { recursive: true });
    const entry: RecoveryEntry = { id, documentName, savedAt: now.toISOString(), originalPath };
    await writeFileAtomic(this.file(id), JSON.stringify({ entry, project }));
  }

  async clear(id: string): Promise<void> {
    await fs.rm(this.file(id), { force: true });
  }

  async list(): Promise<RecoveryEntry[]> {
    const names = await fs.readdir(this.dir).catch(() => [] as string[]);
    const out: RecoveryEntry[] = [];
    for (const name of names) {
      if (!name.endsWith('.recovery.json')) continue;
      const item = await this.read(name.slice(0, -'.recovery.json'.length));
      if (item) out.push(item.entry);
    }
    return out.sort((a, b) => b.savedAt.localeCompare(a.savedAt));
  }

  async read(id: string): Promise<{ entry: RecoveryEntry; project: ProjectDto } | undefined> {
    try {
      // a copy holds one project as the window had it: bounded like the files it came from
      const read = await readTextFile(this.file(id), RECOVERY_LIMIT);
      if (!read.ok) return undefined;
      const parsed = RecoveryFileSchema.safeParse(JSON.parse(read.text));
      return parsed.success ? parsed.data : undefined;
    } catch {
      return undefined;
    }
  }
}

// ---------- recent files ----------

const RecentListSchema = z.array(RecentFileSchema);

export class RecentFiles {
  private items: { path: string; name: string }[] = [];
  private loaded = false;

  constructor(
    private readonly file: string,
    private readonly limit = 10,
  ) {}

  async list(): Promise<{ path: string; name: string }[]> {
    if (!this.loaded) {
      this.loaded = true;
      try {
        const read = await readTextFile(this.file, 1024 * 1024);
        const parsed = read.ok ? RecentListSchema.safeParse(JSON.parse(read.text)) : undefined;
        if (parsed?.success) this.items = parsed.data.slice(0, this.limit);
      } catch {
        this.items = [];
      }
    }
    return [...this.items];
  }

  async add(filePath: string): Promise<void> {
    await this.list();
    this.items = [{ path: filePath, name: path.basename(filePath) }, ...this.items.filter((i) => i.path !== filePath)].slice(0, this.limit);
    await this.persist();
  }

  async remove(filePath: string): Promise<void> {
    await this.list();
    this.items = this.items.filter((i) => i.path !== filePath);
    await this.persist();
  }

  async has(filePath: string): Promise<boolean> {
    return (await this.list()).some((i) => i.path === filePath);
  }

  private async persist(): Promise<void> {
    await fs.mkdir(path.dirname(this.file), { recursive: true });
    await writeFileAtomic(this.file, JSON.stringify(this.items, null, 1));
  }
}
