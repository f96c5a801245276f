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
  type ParsedRequestOf,
  type ProjectDto,
  type ResponseOf,
  type WriteResult,
} from './contract';
import { describeWriteError, readFileBytes, removeStaleTemps, writeFileAtomic, type RecentFiles, type RecoveryStore } from './files';
import type { SolverClient } from './solver-client';
import { ApprovedFiles } from './approved-files';
import type { LaneOutcome } from './worker-client';

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

export const EXPORT_FILES: Record<ExportKind, { title: string; filter: FileFilter; suffix: string }> = {
  fold: { title: 'Export FOLD', filter: FOLD_FILTER, suffix: '.fold' },
  obj: { title: 'Export folded shape (OBJ)', filter: { name: 'Wavefront OBJ', extensions: ['obj'] }, suffix: '.obj' },
  stl: { title: 'Export folded shape (STL)', filter: { name: 'STL mesh', extensions: ['stl'] }, suffix: '.stl' },
  'shape-json': { title: 'Export folded shape (JSON)', filter: { name: 'JSON', extensions: ['json'] }, suffix: '.shape.json' },
  'angle-table': { title: 'Export angle table', filter: { name: 'Table', extensions: ['csv', 'json'] }, suffix: '.angles' },
  schedule: { title: 'Export deployment schedule', filter: { name: 'Table', extensions: ['csv', 'json'] }, suffix: '.schedule' },
};

function baseName(name: string): string {
  return name.replace(/\.hingeplan\.json$/i, '').replace(/\.(json|fold)$/i, '') || 'pattern';
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

interface LoadAnswer {
  ok: boolean;
  format: 'project' | 'fold';
  project?: ProjectDto;
  messages: MessageDto[];
}

export function createService(deps: ServiceDeps) {
  const { solver, host, recovery, recent, startup } = deps;
  /** Files this window may write without asking: ones main itself got from a dialog, the command line or its recent list. */
  const approved = new ApprovedFiles(recent);

  async function openFile(filePath: string, extra: { computePath?: boolean; asSample?: boolean } = {}): Promise<OpenResult> {
    const fileName = path.basename(filePath);
    const read = await readFileBytes(filePath);
    if (!read.ok) {
      return { status: 'failed', fileName, messages: [{ severity: 'error', code: read.code, text: read.message }] };
    }
    // what an interrupted save of this file left beside it (the app's own temporary files only)
    if (!extra.asSample) await removeStaleTemps(filePath);
    const loaded = unwrap(await solver.run<LoadAnswer>('interactive', 'load', { bytes: read.bytes, fileName }));
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
      },
    };
  }

  async function writeTo(filePath: string, data: string): Promise<WriteResult> {
    try {
      await writeFileAtomic(filePath, data);
    } catch (err) {
      return { status: 'failed', message: describeWriteError(filePath, err) };
    }
    return { status: 'saved', filePath, fileName: path.basename(filePath) };
  }

  const handlers: Handlers = {
    async 'app:startup'() {
      const startupMessages: MessageDto[] = [];
      let document = null;
      const target = startup.openPath ?? startup.samplePath;
      const opened = await openFile(target, { computePath: true, asSample: !startup.openPath });
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

    async 'doc:new'(spec) {
      const made = unwrap(await solver.run<LoadAnswer>('interactive', 'generate', spec as Record<string, unknown>));
      const fileName = `${spec.name ?? spec.kind}.hingeplan.json`;
      if (!made.ok || !made.project) return { status: 'failed', fileName, messages: made.messages };
      return {
        status: 'opened',
        document: { project: made.project, filePath: null, fileName, format: 'project', messages: made.messages, computePath: made.project.drives.length === 1 },
      };
    },

    async 'doc:open'({ format }) {
      const filters = format === 'fold' ? [FOLD_FILTER] : [{ name: 'Patterns', extensions: ['json', 'fold'] }, PROJECT_FILTER, FOLD_FILTER];
      const chosen = await host.chooseOpenFile({ title: format === 'fold' ? 'Import FOLD' : 'Open pattern', filters });
      if (!chosen) return { status: 'canceled' };
      return openFile(chosen, { computePath: true });
    },

    async 'doc:open-recent'({ path: filePath }) {
      // only files the person opened before: the page cannot name an arbitrary file to read
      if (!(await recent.has(filePath))) {
        return { status: 'failed', fileName: path.basename(filePath), messages: [{ severity: 'error', code: 'not-recent', text: `${path.basename(filePath)} is not in the recent files list.` }] };
      }
      const r = await openFile(filePath, { computePath: true });
      if (r.status === 'failed' && r.messages.some((m) => m.code === 'file-missing')) {
        await recent.remove(filePath).catch(() => undefined);
        host.recentChanged();
      }
      return r;
    },

    async 'doc:save'({ project, filePath, saveAs, suggestedName }) {
      // the page's filePath is only a hint: a path main never approved makes Save ask, as Save As does
      let target = !saveAs && filePath && !/\.fold$/i.test(filePath) && (await approved.has(filePath)) ? filePath : null;
      if (!target) {
        target = await host.chooseSaveFile({ title: 'Save project', defaultName: `${baseName(suggestedName)}.hingeplan.json`, filters: [PROJECT_FILTER] });
        if (!target) return { status: 'canceled' };
      }
      const text = unwrap(await solver.run<string>('interactive', 'write-project', { project }));
      const result = await writeTo(target, text);
      if (result.status === 'saved') {
        // a project file main wrote where the person said: the next Save goes there without asking
        approved.add(target);
        await recent.add(target).catch(() => undefined);
        host.recentChanged();
      }
      return result;
    },

    async 'doc:export'({ kind, project, key, pathId, options, suggestedName, filePath }) {
      const spec = EXPORT_FILES[kind];
      const target = await host.chooseSaveFile({
        title: spec.title,
        defaultName: exportFileName(kind, suggestedName, options.format),
        filters: [spec.filter],
      });
      if (!target) return { status: 'canceled' };
      // a table's header names the document's file and hashes its bytes: read only a file main approved
      let file: { name: string; bytes?: Uint8Array } | undefined;
      if (kind === 'angle-table' || kind === 'schedule') {
        file = { name: filePath ? path.basename(filePath) : suggestedName };
        if (filePath && (await approved.has(filePath))) {
          const read = await readFileBytes(filePath);
          if (read.ok) file.bytes = read.bytes;
        }
      }
      const outcome = await solver.run<{ data: string }>('long', 'export', { kind, project, key, pathId, options, file, version: startup.version });
      if (outcome.status === 'failed') return { status: 'failed', message: outcome.error.message };
      if (outcome.status !== 'done') return { status: 'canceled' };
      return writeTo(target, outcome.value.data);
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
      const r = unwrap(await solver.setPattern(key, source));
      return r as ResponseOf<'pattern:set'>;
    },

    async solve({ requestId, key, drives }) {
      return jobAnswer(await solver.run('interactive', 'solve', { key, drives }, { requestId, supersedeKey: 'solve' })) as ResponseOf<'solve'>;
    },

    async branches({ requestId, key, drives }) {
      return jobAnswer(await solver.run('long', 'branches', { key, drives }, { requestId, supersedeKey: 'branches' })) as ResponseOf<'branches'>;
    },

    async sweep({ requestId, key, options }) {
      const outcome = await solver.run('long', 'sweep', { key, options, pathId: requestId }, {
        requestId,
        supersedeKey: 'sweep',
        onProgress: (done, total, phase) => host.emit('job:progress', { requestId, done, total, ...(phase ? { phase } : {}) }),
      });
      return jobAnswer(outcome) as ResponseOf<'sweep'>;
    },

    async shape({ key, anglesDeg, basePanel }) {
      return jobAnswer(await solver.run('interactive', 'shape', { key, anglesDeg, basePanel }, { supersedeKey: 'shape' })) as ResponseOf<'shape'>;
    },

    async 'job:cancel'({ requestId }) {
      return { cancelled: solver.cancel(requestId) };
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
