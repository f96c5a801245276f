// File work of the main process, in plain Node so tests can run it: atomic save, recovery copies, the
// recent-files list and reading a file a person chose with a clear message when it cannot be read.

import { promises as fs } from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { z } from 'zod';
import { decodeUtf8 } from '../solver/formats/text';
import { RecentFileSchema, RecoveryEntrySchema, ProjectSchema, type ProjectDto, type RecoveryEntry } from './contract';
import { decodeDxf } from '../solver/formats/dxf-text';

/** Files larger than this are refused before reading: a pattern file of this size is almost surely not one. */
export const MAX_OPEN_BYTES = 256 * 1024 * 1024;

export type ReadOutcome = { ok: true; text: string } | { ok: false; code: string; message: string };

export async function readTextFile(filePath: string): Promise<ReadOutcome> {
  const name = path.basename(filePath);
  try {
    const stat = await fs.stat(filePath);
    if (!stat.isFile()) return { ok: false, code: 'not-a-file', message: `${name} is not a file` };
    if (stat.size > MAX_OPEN_BYTES) {
      return { ok: false, code: 'file-too-large', message: `${name} is ${(stat.size / 1e6).toFixed(0)} MB; the limit is ${MAX_OPEN_BYTES / 1e6} MB` };
    }
    const bytes = await fs.readFile(filePath);
    // a DXF from before AutoCAD 2007 is in a Windows code page, not UTF-8
    if (/\.dxf$/i.test(filePath)) return { ok: true, text: decodeDxf(bytes).text };
    // the command line's reader: invalid UTF-8 refused with its line and byte, a byte-order mark dropped
    const decoded = decodeUtf8(bytes, 'file');
    if (decoded.text === undefined) {
      const m = decoded.messages[0];
      return { ok: false, code: m.code === 'not-utf8' ? 'not-text' : m.code, message: `${name}: ${m.text}` };
    }
    return { ok: true, text: decoded.text };
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') return { ok: false, code: 'file-missing', message: `${name} no longer exists at ${path.dirname(filePath)}` };
    if (code === 'EACCES' || code === 'EPERM') return { ok: false, code: 'file-denied', message: `${name} cannot be read: permission denied` };
    return { ok: false, code: 'read-failed', message: `${name} cannot be read: ${(err as Error).message}` };
  }
}

/**
 * Write `data` to `filePath` so that a crash at any moment leaves either the old file or the new one:
 * write a temporary file beside it, flush it to disk, then rename it over the target (atomic on one volume).
 */
export async function writeFileAtomic(filePath: string, data: string | Uint8Array): Promise<void> {
  const dir = path.dirname(filePath);
  const temp = path.join(dir, `.${path.basename(filePath)}.${randomBytes(6).toString('hex')}.tmp`);
  const handle = await fs.open(temp, 'wx', 0o644);
  try {
    await handle.writeFile(data);
    await handle.sync();
  } finally {
    await handle.close();
  }
  try {
    // keep the permissions of the file being replaced
    const old = await fs.stat(filePath).catch(() => undefined);
    if (old) await fs.chmod(temp, old.mode & 0o777);
    await fs.rename(temp, filePath);
  } catch (err) {
    await fs.rm(temp, { force: true });
    throw err;
  }
}

export function describeWriteError(filePath: string, err: unknown): string {
  const name = path.basename(filePath);
  const code = (err as NodeJS.ErrnoException).code;
  if (code === 'EACCES' || code === 'EPERM') return `${name} was not saved: permission denied in ${path.dirname(filePath)}`;
  if (code === 'ENOSPC') return `${name} was not saved: the disk is full`;
  if (code === 'ENOENT') return `${name} was not saved: the folder ${path.dirname(filePath)} does not exist`;
  return `${name} was not saved: ${(err as Error).message}`;
}

// ---------- recovery copies ----------

const RecoveryFileSchema = z.object({
  entry: RecoveryEntrySchema,
  project: ProjectSchema,
});

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
      const text = await fs.readFile(this.file(id), 'utf8');
      const parsed = RecoveryFileSchema.safeParse(JSON.parse(text));
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
        const parsed = RecentListSchema.safeParse(JSON.parse(await fs.readFile(this.file, 'utf8')));
        if (parsed.success) this.items = parsed.data.slice(0, this.limit);
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
