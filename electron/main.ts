// The main process: owns the window, the menu, file dialogs, recent files and the solver workers, and
// nothing else. The handlers themselves live in service.ts (plain Node, tested without Electron); this
// file wires them to ipcMain, Electron's dialogs and clipboard, the app's own scheme and the close prompt.

import { app, BrowserWindow, clipboard, dialog, ipcMain, Menu, protocol, session, type IpcMainInvokeEvent } from 'electron';
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { CHANNEL_NAMES, parseEvent, type EventName, type EventOf, type MenuCommand } from './contract';
import { RecentFiles, RecoveryStore } from './files';
import { menuTemplate } from './menu';
import { createService, type DialogHost } from './service';
import { SolverClient } from './solver-client';
import { nodeWorkerSpawner } from './worker-client';
import {
  APP_ENTRY,
  APP_SCHEME,
  SECURITY_HEADERS,
  builtPaths,
  hardenWebContents,
  isAppUrl,
  mainWindowOptions,
  mimeType,
  resolveAppAsset,
} from './window';

export const SAMPLE_FILE = path.join('samples', 'sunshade-panel.hingeplan.json');

/** A file named on the command line (`electron . my.hingeplan.json`, or the packaged app with a file). */
export function commandLineFile(argv: string[], packaged: boolean): string | undefined {
  const args = argv.slice(packaged ? 1 : 2).filter((a) => !a.startsWith('-'));
  return args.length ? path.resolve(args[0]) : undefined;
}

// Registered before `ready`: the renderer is served from hingeplan://app/, a secure standard origin.
protocol.registerSchemesAsPrivileged([{ scheme: APP_SCHEME, privileges: { standard: true, secure: true, supportFetchAPI: true } }]);

/** A packaged build has no developer tools: they would run any code in the page, bridge included. */
const build = { packaged: app.isPackaged };

app.on('web-contents-created', (_event, contents) => hardenWebContents(contents, build));

async function serveAsset(rendererRoot: string, request: Request): Promise<Response> {
  const file = resolveAppAsset(rendererRoot, request.url);
  if (!file) return new Response('not found', { status: 404 });
  try {
    const body = await fs.readFile(file);
    return new Response(body, { status: 200, headers: { 'Content-Type': mimeType(file), ...SECURITY_HEADERS } });
  } catch {
    return new Response('not found', { status: 404 });
  }
}

export async function startApp(): Promise<BrowserWindow> {
  const paths = builtPaths(__dirname);
  protocol.handle(APP_SCHEME, (request) => serveAsset(paths.rendererRoot, request));
  // no remote content: any request that is not for the app's own files is cancelled
  session.defaultSession.webRequest.onBeforeRequest((details, callback) => {
    callback({ cancel: !isAppUrl(details.url) && !(!build.packaged && details.url.startsWith('devtools:')) });
  });

  const userData = app.getPath('userData');
  const recovery = new RecoveryStore(path.join(userData, 'recovery'));
  const recent = new RecentFiles(path.join(userData, 'recent-files.json'));
  const solver = new SolverClient({ spawn: nodeWorkerSpawner(paths.worker) });

  const win = new BrowserWindow(mainWindowOptions(paths.preload, build));
  let dirty = false;
  let title = 'Hingeplan';
  let closeConfirmed = false;

  const send = <E extends EventName>(event: E, payload: EventOf<E>) => {
    if (win.isDestroyed() || !parseEvent(event, payload)) return;
    win.webContents.send(event, payload);
  };
  const sendCommand = (command: MenuCommand, filePath?: string) => send('menu:command', filePath ? { command, path: filePath } : { command });

  const rebuildMenu = async () => {
    const template = menuTemplate({ send: sendCommand, recent: await recent.list(), platform: process.platform, devTools: !build.packaged, quit: () => app.quit() });
    Menu.setApplicationMenu(Menu.buildFromTemplate(template));
  };

  const host: DialogHost = {
    async chooseOpenFile({ title: dialogTitle, filters }) {
      const r = await dialog.showOpenDialog(win, { title: dialogTitle, filters, properties: ['openFile'] });
      return r.canceled || !r.filePaths.length ? null : r.filePaths[0];
    },
    async chooseSaveFile({ title: dialogTitle, defaultName, filters }) {
      const r = await dialog.showSaveDialog(win, { title: dialogTitle, defaultPath: defaultName, filters, properties: ['showOverwriteConfirmation', 'createDirectory'] });
      return r.canceled || !r.filePath ? null : r.filePath;
    },
    async confirmDiscard({ documentName, action }) {
      const r = await dialog.showMessageBox(win, {
        type: 'question',
        buttons: ['Save', 'Discard changes', 'Cancel'],
        defaultId: 0,
        cancelId: 2,
        message: `Save the changes to ${documentName} before you ${action}?`,
        detail: 'Your edits are lost if you do not save them.',
      });
      return (['save', 'discard', 'cancel'] as const)[r.response] ?? 'cancel';
    },
    writeClipboard: (text) => clipboard.writeText(text),
    documentState(state) {
      dirty = state.dirty;
      title = state.title;
      win.setTitle(`${state.title}${state.dirty ? ' (edited)' : ''} — Hingeplan`);
      win.setDocumentEdited(state.dirty);
      if (state.filePath) win.setRepresentedFilename(state.filePath);
    },
    emit: send,
    closeReady() {
      closeConfirmed = true;
      win.close();
    },
    recentChanged: () => void rebuildMenu(),
  };

  const service = createService({
    solver,
    host,
    recovery,
    recent,
    startup: {
      version: app.getVersion(),
      platform: process.platform,
      openPath: commandLineFile(process.argv, app.isPackaged),
      samplePath: path.join(app.getAppPath(), SAMPLE_FILE),
    },
  });

  for (const channel of CHANNEL_NAMES) {
    ipcMain.handle(channel, (event: IpcMainInvokeEvent, payload: unknown) => {
      // answer only our own page, never a frame that navigated elsewhere
      if (!isAppUrl(event.senderFrame?.url ?? '')) {
        return { ok: false, error: { code: 'forbidden', message: 'requests are accepted from the app page only' } };
      }
      return service.dispatch(channel, payload);
    });
  }

  win.on('close', (event) => {
    if (!dirty || closeConfirmed) return;
    event.preventDefault();
    void dialog
      .showMessageBox(win, {
        type: 'question',
        buttons: ['Save', 'Discard changes', 'Cancel'],
        defaultId: 0,
        cancelId: 2,
        message: `Save the changes to ${title} before closing?`,
        detail: 'Your edits are lost if you do not save them.',
      })
      .then(({ response }) => {
        if (response === 0) sendCommand('save-and-close');
        else if (response === 1) {
          closeConfirmed = true;
          win.close();
        }
      });
  });
  win.once('ready-to-show', () => win.show());
  win.on('closed', () => solver.dispose());

  await rebuildMenu();
  await win.loadURL(APP_ENTRY);
  return win;
}

app.on('window-all-closed', () => app.quit());

app
  .whenReady()
  .then(startApp)
  .catch((err: unknown) => {
    dialog.showErrorBox('Hingeplan could not start', err instanceof Error ? err.message : String(err));
    app.exit(1);
  });
