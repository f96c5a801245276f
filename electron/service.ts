// The main process's handlers as plain functions: one per contract channel, no Electron import. main.ts
// hands them Electron's dialogs and clipboard through DialogHost; the e2e harness hands them functions of
// its own. Every request is checked against the contract on the way in and every answer on the way out.

import path from 'node:path';
import {
  parseRequest,
  parseResponse,
  type Channel,
  type Envelope,
  type EventName,
  type EventOf,
  type ExportKind,
  type MessageDto,
  type OpenResult,
  type OpenedDocument,
  type DrawingColourDto,
  type DrawingLayerDto,
  type DrawingOptionsDto,
  type ParsedRequestOf,
  type ProjectDto,
  type ResponseOf,
  type WriteResult,
} from './contract';
import { createAtomicFile, describeWriteError, readFileBytes, removeStaleTemps, writeFileAtomic, type AtomicFile, type RecentFiles, type RecoveryStore } from './files';
import type { LaneName, SolverClient } from './solver-client';
import { RequestRegistry, type Request } from './requests';
import { LruMap } from './lru';
import { ApprovedFiles } from './approved-files';
import type { LaneOutcome, RunOptions } from './worker-client';

export interface FileFilter {
  name: string;
  extensions: string[];
}

/** What the handlers need from the desktop around them. */
export interface DialogHost {
  chooseOpenFile(request: { title: string; filters: FileFilter[] }): Promise<string | null>;
  chooseSaveFile(request: { title: string; defaultName: string; filters: FileFilter[] }): Promise<string | null>;
  confirmDiscard(request: { documentName: string; action: string }): Promise<'save' | 'discard' | 'cancel'>;
  writeClipboard(text: string): void;
  documentState(state: { dirty: boolean; title: string; filePath: string | null }): void;
  emit<E extends EventName>(event: E, payload: EventOf<E>): void;
  closeReady(): void;
  recentChanged(): void;
}

export interface StartupConfig {
  version: string;
  platform: string;
  /** a file named on the command line */
  openPath?: string;
  /** the built-in sample opened when nothing else is */
  samplePath: string;
}

export interface ServiceDeps {
  solver: SolverClient;
  host: DialogHost;
  recovery: RecoveryStore;
  recent: RecentFiles;
  startup: StartupConfig;
}

/** An error for the caller to show: it becomes `{ ok: false, error }` at the boundary. */
export class ServiceError extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

export type Handlers = { [C in Channel]: (request: ParsedRequestOf<C>) => Promise<ResponseOf<C>> };

const PROJECT_FILTER: FileFilter = { name: 'Hingeplan project', extensions: ['json'] };
const FOLD_FILTER: FileFilter = { name: 'FOLD crease pattern', extensions: ['fold'] };
const DRAWING_FILTER: FileFilter = { name: 'Drawing (DXF or SVG)', extensions: ['dxf', 'svg'] };

export const EXPORT_FILES: Record<ExportKind, { title: string; filter: FileFilter; suffix: string }> = {
  fold: { title: 'Export FOLD', filter: FOLD_FILTER, suffix: '.fold' },
  dxf: { title: 'Export flat pattern as DXF', filter: { name: 'DXF drawing', extensions: ['dxf'] }, suffix: '.dxf' },
  svg: { title: 'Export flat pattern as SVG', filter: { name: 'SVG drawing', extensions: ['svg'] }, suffix: '.svg' },
  obj: { title: 'Export folded shape (OBJ)', filter: { name: 'Wavefront OBJ', extensions: ['obj'] }, suffix: '.obj' },
  stl: { title: 'Export folded shape (STL)', filter: { name: 'STL mesh', extensions: ['stl'] }, suffix: '.stl' },
  'shape-json': { title: 'Export folded shape (JSON)', filter: { name: 'JSON', extensions: ['json'] }, suffix: '.shape.json' },
  'angle-table': { title: 'Export angle table', filter: { name: 'Table', extensions: ['csv', 'json'] }, suffix: '.angles' },
  schedule: { title: 'Export deployment schedule', filter: { name: 'Table', extensions: ['csv', 'json'] }, suffix: '.schedule' },
};

function baseName(name: string): string {
  return name.replace(/\.hingeplan\.json$/i, '').replace(/\.(json|fold|dxf|svg)$/i, '') || 'pattern';
}

export function exportFileName(kind: ExportKind, suggestedName: string, format: 'csv' | 'json'): string {
  const spec = EXPORT_FILES[kind];
  const ext = kind === 'angle-table' || kind === 'schedule' ? `${spec.suffix}.${format}` : spec.suffix;
  return `${baseName(suggestedName)}${ext}`;
}

function unwrap<T>(outcome: LaneOutcome<T>): T {
  if (outcome.status === 'done') return outcome.value;
  if (outcome.status === 'failed') throw new ServiceError(outcome.error.code, outcome.error.message);
  throw new ServiceError(outcome.status, `the job was ${outcome.status}`);
}

function jobAnswer<T>(outcome: LaneOutcome<T>): { status: 'done'; value: T } | { status: 'superseded' } | { status: 'cancelled' } {
  if (outcome.status === 'failed') throw new ServiceError(outcome.error.code, outcome.error.message);
  return outcome;
}

/** A request the page cancelled (or a newer one replaced) while main was working on it. */
class Stopped extends Error {}

/** The value of a job, or Stopped when it was cancelled or superseded; a failure is the caller's to show. */
function valueOf<T>(outcome: LaneOutcome<T>): T {
  if (outcome.status === 'done') return outcome.value;
  if (outcome.status === 'failed') throw new ServiceError(outcome.error.code, outcome.error.message);
  throw new Stopped();
}

interface LoadAnswer {
  ok: boolean;
  format: OpenedDocument['format'];
  project?: ProjectDto;
  messages: MessageDto[];
  drawingLayers?: DrawingLayerDto[];
  drawingColours?: DrawingColourDto[];
}

export function createService(deps: ServiceDeps) {
  const { solver, host, recovery, recent, startup } = deps;
  /** Files this window may write without asking: ones main itself got from a dialog, the command line or its recent list. */
  const approved = new ApprovedFiles(recent);
  const requests = new RequestRegistry();
  /** The requests of the paths the page was sent, by path id: table exports solve them again in their own lane. */
  const sweeps = new LruMap<string, { key: string; options: ParsedRequestOf<'sweep'>['options'] }>(8);

  /** Run `fn` as one request under the page's id (or a new one); Stopped becomes the channel's "cancelled" answer. */
  async function asRequest<T>(id: string | undefined, whenStopped: T, fn: (r: Request) => Promise<T>): Promise<T> {
    const request = requests.begin(id);
    if (!request) throw new ServiceError('bad-request', `the request id ${id} is already in use`);
    try {
      return await fn(request);
    } catch (err) {
      if (err instanceof Stopped) return whenStopped;
      throw err;
    } finally {
      requests.end(request);
    }
  }

  /** A worker job of a request; never started once the request is cancelled. */
  function job<T>(request: Request, lane: LaneName, kind: string, payload: { key?: string } & Record<string, unknown>, options: Omit<RunOptions, 'requestId'> = {}): Promise<LaneOutcome<T>> {
    if (request.cancelled) return Promise.resolve({ status: 'cancelled' });
    return solver.run<T>(lane, kind, payload, { ...options, requestId: request.id });
  }

  async function openFile(request: Request, filePath: string, extra: { computePath?: boolean; asSample?: boolean; drawing?: DrawingOptionsDto } = {}): Promise<OpenResult> {
    const fileName = path.basename(filePath);
    const read = await readFileBytes(filePath);
    if (!read.ok) {
      return { status: 'failed', fileName, messages: [{ severity: 'error', code: read.code, text: read.message }] };
    }
    // what an interrupted save of this file left beside it (the app's own temporary files only)
    if (!extra.asSample) await removeStaleTemps(filePath);
    const loaded = valueOf(await job<LoadAnswer>(request, 'interactive', 'load', { bytes: read.bytes, fileName, ...(extra.drawing ? { drawing: extra.drawing } : {}) }));
    if (!loaded.ok || !loaded.project) return { status: 'failed', fileName, messages: loaded.messages };
    if (!extra.asSample) {
      approved.add(filePath);
      await recent.add(filePath).catch(() => undefined);
      host.recentChanged();
    }
    return {
      status: 'opened',
      document: {
        project: loaded.project,
        // the built-in sample is not overwritten: saving it asks where
        filePath: extra.asSample ? null : filePath,
        fileName,
        format: loaded.format,
        messages: loaded.messages,
        computePath: extra.computePath,
        ...(loaded.drawingLayers ? { drawingLayers: loaded.drawingLayers, drawingColours: loaded.drawingColours ?? [], drawingOptions: extra.drawing ?? { layers: [], strokes: [] } } : {}),
      },
    };
  }

  async function writeTo(filePath: string, data: string | Buffer): Promise<WriteResult> {
    try {
      await writeFileAtomic(filePath, data);
    } catch (err) {
      return { status: 'failed', message: describeWriteError(filePath, err) };
    }
    return { status: 'saved', filePath, fileName: path.basename(filePath) };
  }

  /**
   * A table written into its file while the worker computes it: pieces are appended to a temporary file in
   * order, which replaces the target only when the job finished; a failure, a cancel or a full disk leave
   * the target as it was (and a write error stops the job).
   */
  async function streamTo(request: Request, target: string, payload: Record<string, unknown>, onProgress?: (done: number, total: number, phase?: string) => void): Promise<WriteResult> {
    let file: AtomicFile;
    try {
      file = await createAtomicFile(target);
    } catch (err) {
      return { status: 'failed', message: describeWriteError(target, err) };
    }
    let writing = Promise.resolve();
    let writeError: unknown;
    const onChunk = (data: string) => {
      writing = writing.then(() => (writeError ? undefined : file.write(data))).catch((err: unknown) => {
        writeError ??= err;
        solver.cancel(request.id);
      });
    };
    const outcome = await job<{ streamed?: boolean; data: string }>(request, 'export', 'export', payload, { onProgress, onChunk });
    await writing;
    if (outcome.status !== 'done' || request.cancelled || writeError) {
      await file.abort();
      if (writeError) return { status: 'failed', message: describeWriteError(target, writeError) };
      if (outcome.status === 'failed') return { status: 'failed', message: outcome.error.message };
      return { status: 'canceled' };
    }
    try {
      if (!outcome.value.streamed) await file.write(outcome.value.data);
      await file.commit();
    } catch (err) {
      await file.abort();
      return { status: 'failed', message: describeWriteError(target, err) };
    }
    return { status: 'saved', filePath: target, fileName: path.basename(target) };
  }

  const progressTo = (requestId: string | undefined) =>
    requestId ? (done: number, total: number, phase?: string) => host.emit('job:progress', { requestId, done, total, ...(phase ? { phase } : {}) }) : undefined;

  const handlers: Handlers = {
    async 'app:startup'() {
      const startupMessages: MessageDto[] = [];
      let document = null;
      const target = startup.openPath ?? startup.samplePath;
      const opened = await asRequest<OpenResult>(undefined, { status: 'canceled' }, (r) => openFile(r, target, { computePath: true, asSample: !startup.openPath }));
      if (opened.status === 'opened') document = opened.document;
      else if (opened.status === 'failed') {
        startupMessages.push({ severity: 'error', code: 'startup-open-failed', text: `${opened.fileName} could not be opened.` }, ...opened.messages);
      }
      return {
        version: startup.version,
        platform: startup.platform,
        document,
        recovery: await recovery.list(),
        recent: await recent.list(),
        startupMessages,
      };
    },

    async 'doc:new'({ requestId, ...spec }) {
      return asRequest<OpenResult>(requestId, { status: 'canceled' }, async (r) => {
        const made = valueOf(await job<LoadAnswer>(r, 'interactive', 'generate', spec as Record<string, unknown>));
        const fileName = `${spec.name ?? spec.kind}.hingeplan.json`;
        if (!made.ok || !made.project) return { status: 'failed', fileName, messages: made.messages };
        return {
          status: 'opened',
          document: { project: made.project, filePath: null, fileName, format: 'project', messages: made.messages, computePath: made.project.drives.length === 1 },
        };
      });
    },

    async 'doc:open'({ format, requestId }) {
      return asRequest<OpenResult>(requestId, { status: 'canceled' }, async (r) => {
        const filters =
          format === 'fold' ? [FOLD_FILTER]
          : format === 'drawing' ? [DRAWING_FILTER]
          : [{ name: 'Patterns', extensions: ['json', 'fold', 'dxf', 'svg'] }, PROJECT_FILTER, FOLD_FILTER, DRAWING_FILTER];
        const title = format === 'fold' ? 'Import FOLD' : format === 'drawing' ? 'Import drawing (DXF or SVG)' : 'Open pattern';
        const chosen = await host.chooseOpenFile({ title, filters });
        if (!chosen) return { status: 'canceled' };
        return openFile(r, chosen, { computePath: true });
      });
    },

    async 'doc:open-recent'({ path: filePath, requestId }) {
      // only files the person opened before: the page cannot name an arbitrary file to read
      if (!(await recent.has(filePath))) {
        return { status: 'failed', fileName: path.basename(filePath), messages: [{ severity: 'error', code: 'not-recent', text: `${path.basename(filePath)} is not in the recent files list.` }] };
      }
      return asRequest<OpenResult>(requestId, { status: 'canceled' }, async (req) => {
        const r = await openFile(req, filePath, { computePath: true });
        if (r.status === 'failed' && r.messages.some((m) => m.code === 'file-missing')) {
          await recent.remove(filePath).catch(() => undefined);
          host.recentChanged();
        }
        return r;
      });
    },

    async 'doc:reread-drawing'({ path: filePath, options, requestId }) {
      // only a drawing main opened for this window (a dialog, the command line, the recent list): the page
      // cannot name a file to read
      if (!/\.(dxf|svg)$/i.test(filePath) || !(await approved.has(filePath))) {
        return { status: 'failed', fileName: path.basename(filePath), messages: [{ severity: 'error', code: 'not-approved', text: `${path.basename(filePath)} is not a drawing this window opened; open it with Import drawing.` }] };
      }
      return asRequest<OpenResult>(requestId, { status: 'canceled' }, (r) => openFile(r, filePath, { drawing: options }));
    },

    async 'doc:save'({ project, filePath, saveAs, suggestedName, requestId }) {
      return asRequest<WriteResult>(requestId, { status: 'canceled' }, async (r) => {
        // the page's filePath is only a hint: a path main never approved makes Save ask, as Save As does;
        // a FOLD file or a drawing is not written over with a project either
        let target = !saveAs && filePath && !/\.(fold|dxf|svg)$/i.test(filePath) && (await approved.has(filePath)) ? filePath : null;
        if (!target) {
          target = await host.chooseSaveFile({ title: 'Save project', defaultName: `${baseName(suggestedName)}.hingeplan.json`, filters: [PROJECT_FILTER] });
          if (!target) return { status: 'canceled' };
        }
        const text = valueOf(await job<string>(r, 'interactive', 'write-project', { project }));
        if (r.cancelled) return { status: 'canceled' };
        const result = await writeTo(target, text);
        if (result.status === 'saved') {
          // a project file main wrote where the person said: the next Save goes there without asking
          approved.add(target);
          await recent.add(target).catch(() => undefined);
          host.recentChanged();
        }
        return result;
      });
    },

    async 'doc:export'({ kind, project, key, pathId, options, suggestedName, filePath, requestId }) {
      return asRequest<WriteResult>(requestId, { status: 'canceled' }, async (r) => {
        const spec = EXPORT_FILES[kind];
        const table = kind === 'angle-table' || kind === 'schedule';
        const sweep = table && pathId ? sweeps.get(pathId) : undefined;
        if (table && pathId && !sweep) return { status: 'failed', message: 'The computed path is no longer available; compute it again and export.' };
        const target = await host.chooseSaveFile({
          title: spec.title,
          defaultName: exportFileName(kind, suggestedName, options.format),
          filters: [spec.filter],
        });
        if (!target) return { status: 'canceled' };
        // a table's header names the document's file and hashes its bytes: read only a file main approved
        let file: { name: string; bytes?: Uint8Array } | undefined;
        if (table) {
          file = { name: filePath ? path.basename(filePath) : suggestedName };
          if (filePath && (await approved.has(filePath))) {
            const read = await readFileBytes(filePath);
            if (read.ok) file.bytes = read.bytes;
          }
        }
        const payload = { kind, project, key, ...(sweep ? { sweep: { pathId, ...sweep } } : {}), options, file, version: startup.version, stream: table };
        if (!table) {
          const outcome = await job<{ data: string }>(r, 'export', 'export', payload, { onProgress: progressTo(requestId) });
          if (outcome.status === 'failed') return { status: 'failed', message: outcome.error.message };
          if (outcome.status !== 'done' || r.cancelled) return { status: 'canceled' };
          return writeTo(target, outcome.value.data);
        }
        return streamTo(r, target, payload, progressTo(requestId));
      });
    },

    async 'doc:export-chart'({ format, data, suggestedName }) {
      // the picture comes from the window; only the person's choice of file decides where it goes
      const target = await host.chooseSaveFile({
        title: `Export chart (${format.toUpperCase()})`,
        defaultName: `${baseName(suggestedName)}.${format}`,
        filters: [format === 'svg' ? { name: 'SVG image', extensions: ['svg'] } : { name: 'PNG image', extensions: ['png'] }],
      });
      if (!target) return { status: 'canceled' };
      return writeTo(target, format === 'png' ? Buffer.from(data, 'base64') : data);
    },

    async 'doc:state'(state) {
      host.documentState({ ...state, filePath: (await approved.has(state.filePath)) ? state.filePath : null });
      return { ok: true };
    },

    async 'doc:confirm-discard'(request) {
      return { choice: await host.confirmDiscard(request) };
    },

    async 'recovery:write'({ id, project, documentName, originalPath }) {
      // the copy remembers where the document lives; that must be a file main approved, or restoring it
      // would let the page choose a file that Save then writes without a dialog
      if (originalPath !== null && !(await approved.has(originalPath))) {
        throw new ServiceError('not-approved', `The recovery copy of ${documentName} was not kept: it names a file this window did not open or save.`);
      }
      await recovery.write(id, project, documentName, originalPath);
      return { ok: true };
    },

    async 'recovery:clear'({ id }) {
      await recovery.clear(id);
      return { ok: true };
    },

    async 'recovery:restore'({ id }) {
      const item = await recovery.read(id);
      if (!item) return { status: 'failed', fileName: id, messages: [{ severity: 'error', code: 'recovery-missing', text: 'The recovery copy is gone or damaged.' }] };
      // written by main, but check again: a copy from an older version or another hand gets no file to save over
      const original = (await approved.has(item.entry.originalPath)) ? item.entry.originalPath : null;
      const messages: MessageDto[] = [{ severity: 'info', code: 'recovered', text: `Recovered the unsaved edits of ${item.entry.documentName} from ${item.entry.savedAt}.` }];
      if (item.entry.originalPath && !original) {
        messages.push({ severity: 'warning', code: 'recovered-unapproved-path', text: `The copy names ${item.entry.originalPath}, which this program did not open or save recently; saving asks where.` });
      }
      return {
        status: 'opened',
        document: {
          project: item.project,
          filePath: original,
          fileName: item.entry.documentName,
          format: 'project',
          messages,
          recovered: true,
        },
      };
    },

    async 'pattern:set'({ key, source }) {
      const request = requests.begin()!;
      try {
        return unwrap(await solver.setPattern(key, source, { requestId: request.id })) as ResponseOf<'pattern:set'>;
      } finally {
        requests.end(request);
      }
    },

    async solve({ requestId, key, drives }) {
      return asRequest(requestId, { status: 'cancelled' as const }, async (r) => jobAnswer(await job(r, 'interactive', 'solve', { key, drives }, { supersedeKey: 'solve' }))) as Promise<ResponseOf<'solve'>>;
    },

    async branches({ requestId, key, drives }) {
      return asRequest(requestId, { status: 'cancelled' as const }, async (r) => jobAnswer(await job(r, 'long', 'branches', { key, drives }, { supersedeKey: 'branches' }))) as Promise<ResponseOf<'branches'>>;
    },

    async sweep({ requestId, key, options }) {
      return asRequest(requestId, { status: 'cancelled' as const }, async (r) => {
        const outcome = await job(r, 'long', 'sweep', { key, options, pathId: requestId }, { supersedeKey: 'sweep', onProgress: progressTo(requestId) });
        if (outcome.status === 'done') sweeps.set(requestId, { key, options });
        return jobAnswer(outcome);
      }) as Promise<ResponseOf<'sweep'>>;
    },

    async tolerance({ requestId, key, options }) {
      return asRequest(requestId, { status: 'cancelled' as const }, async (r) => {
        // the sweep's request too: a worker that lost the path (restarted, evicted) solves it again
        const sweep = sweeps.get(options.pathId);
        const payload = { key, options, ...(sweep ? { sweep: { pathId: options.pathId, ...sweep } } : {}) };
        return jobAnswer(await job(r, 'long', 'tolerance', payload, { supersedeKey: 'tolerance', onProgress: progressTo(requestId) }));
      }) as Promise<ResponseOf<'tolerance'>>;
    },

    async shape({ key, anglesDeg, basePanel, requestId }) {
      return asRequest(requestId, { status: 'cancelled' as const }, async (r) => jobAnswer(await job(r, 'interactive', 'shape', { key, anglesDeg, basePanel }, { supersedeKey: 'shape' }))) as Promise<ResponseOf<'shape'>>;
    },

    async 'job:cancel'({ requestId }) {
      // both: a request main has not handed to a worker yet, and the job a lane runs or queues for it
      const live = requests.cancel(requestId);
      const inLane = solver.cancel(requestId);
      return { cancelled: live || inLane };
    },

    async 'clipboard:write'({ text }) {
      host.writeClipboard(text);
      return { ok: true };
    },

    async 'app:close-ready'() {
      host.closeReady();
      return { ok: true };
    },
  };

  /** One request from the renderer: check it, run it, check the answer, wrap it in an envelope. */
  async function dispatch(channel: string, payload: unknown): Promise<Envelope<unknown>> {
    const request = parseRequest(channel as Channel, payload);
    if (!request.ok) return request;
    try {
      const handler = handlers[channel as Channel] as (r: unknown) => Promise<unknown>;
      const value = await handler(request.value);
      return parseResponse(channel as Channel, value);
    } catch (err) {
      if (err instanceof ServiceError) return { ok: false, error: { code: err.code, message: err.message, where: channel } };
      return { ok: false, error: { code: 'internal', message: `${channel} failed: ${err instanceof Error ? err.message : String(err)}`, where: channel } };
    }
  }

  return { handlers, dispatch, approved };
}

export type Service = ReturnType<typeof createService>;
