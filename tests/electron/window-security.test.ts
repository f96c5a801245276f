// The window's security settings, checked against Electron's security checklist (electronjs.org, "Security"
// tutorial: context isolation, no Node integration, sandbox, CSP, no remote content, no navigation or new
// windows, validated IPC senders), first in the options module and then in main.ts itself, run against a
// stand-in for the Electron module (the binary is not needed).
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  APP_ENTRY,
  CONTENT_SECURITY_POLICY,
  SECURITY_HEADERS,
  hardenWebContents,
  isAppUrl,
  mainWindowOptions,
  resolveAppAsset,
} from '../../electron/window';
import { CHANNEL_NAMES } from '../../electron/contract';
import { ROOT } from './support';

function directives(csp: string): Map<string, string[]> {
  return new Map(csp.split(';').map((d) => d.trim().split(/\s+/)).filter((d) => d[0]).map(([k, ...v]) => [k, v]));
}

describe('window options', () => {
  const prefs = mainWindowOptions('/app/preload.cjs').webPreferences!;
  it('isolates and sandboxes the renderer and keeps Node out of it', () => {
    expect(prefs.contextIsolation).toBe(true);
    expect(prefs.nodeIntegration).toBe(false);
    expect(prefs.nodeIntegrationInWorker).toBe(false);
    expect(prefs.nodeIntegrationInSubFrames).toBe(false);
    expect(prefs.sandbox).toBe(true);
    expect(prefs.webSecurity).toBe(true);
    expect(prefs.allowRunningInsecureContent).toBe(false);
    expect(prefs.webviewTag).toBe(false);
    expect(prefs.preload).toBe('/app/preload.cjs');
  });

  it('sends a strict content security policy: nothing remote, no inline or eval script', () => {
    const d = directives(CONTENT_SECURITY_POLICY);
    expect(d.get('default-src')).toEqual(["'none'"]);
    expect(d.get('script-src')).toEqual(["'self'"]);
    expect(d.get('style-src')).toEqual(["'self'"]);
    expect(d.get('connect-src')).toEqual(["'none'"]);
    expect(d.get('object-src')).toEqual(["'none'"]);
    expect(CONTENT_SECURITY_POLICY).not.toMatch(/unsafe-|https?:|\*/);
    expect(SECURITY_HEADERS['Content-Security-Policy']).toBe(CONTENT_SECURITY_POLICY);
  });

  it('puts the same policy in index.html (less frame-ancestors, which a meta tag cannot carry)', () => {
    const html = readFileSync(path.join(ROOT, 'renderer', 'index.html'), 'utf8');
    const meta = /http-equiv="Content-Security-Policy"\s+content="([^"]+)"/.exec(html)?.[1];
    expect(meta).toBeDefined();
    const fromHeader = directives(CONTENT_SECURITY_POLICY);
    fromHeader.delete('frame-ancestors');
    expect(directives(meta!)).toEqual(fromHeader);
  });

  it('blocks navigation away from the app, new windows, webviews and permission prompts', () => {
    const handlers = new Map<string, (...a: unknown[]) => void>();
    let openHandler: ((d: { url: string }) => { action: string }) | undefined;
    let permission: ((wc: unknown, p: string, cb: (ok: boolean) => void) => void) | undefined;
    hardenWebContents({
      on: ((event: string, fn: (...a: unknown[]) => void) => handlers.set(event, fn)) as never,
      setWindowOpenHandler: ((fn: typeof openHandler) => (openHandler = fn)) as never,
      session: { setPermissionRequestHandler: ((fn: typeof permission) => (permission = fn)) as never },
    });
    const nav = (url: string) => {
      let prevented = false;
      handlers.get('will-navigate')!({ preventDefault: () => (prevented = true) }, url);
      return prevented;
    };
    expect(nav('https://example.com/')).toBe(true);
    expect(nav('file:///etc/passwd')).toBe(true);
    expect(nav(APP_ENTRY)).toBe(false);
    let webview = false;
    handlers.get('will-attach-webview')!({ preventDefault: () => (webview = true) });
    expect(webview).toBe(true);
    expect(openHandler!({ url: 'https://example.com' })).toEqual({ action: 'deny' });
    let granted: boolean | undefined;
    permission!(null, 'media', (ok) => (granted = ok));
    expect(granted).toBe(false);
  });

  it('serves only files inside the renderer folder from the app scheme', () => {
    const root = '/srv/app/renderer';
    expect(resolveAppAsset(root, 'hingeplan://app/index.html')).toBe('/srv/app/renderer/index.html');
    expect(resolveAppAsset(root, 'hingeplan://app/')).toBe('/srv/app/renderer/index.html');
    expect(resolveAppAsset(root, 'hingeplan://app/assets/x.js')).toBe('/srv/app/renderer/assets/x.js');
    // the URL parser folds "%2e%2e/" away, so this stays inside the root; an encoded slash would not
    expect(resolveAppAsset(root, 'hingeplan://app/%2e%2e/secret.json')).toBe('/srv/app/renderer/secret.json');
    expect(resolveAppAsset(root, 'hingeplan://app/..%2fsecret.json')).toBeUndefined();
    expect(resolveAppAsset(root, 'hingeplan://other/index.html')).toBeUndefined();
    expect(resolveAppAsset(root, 'file:///srv/app/renderer/index.html')).toBeUndefined();
    expect(isAppUrl('https://app/')).toBe(false);
  });
});

// ---------- main.ts against a stand-in Electron ----------

const fake = vi.hoisted(() => {
  const rec = {
    windows: [] as { options: unknown; handlers: Map<string, (...a: unknown[]) => void>; sent: unknown[][]; loaded: string[] }[],
    ipc: new Map<string, (event: unknown, payload: unknown) => unknown>(),
    protocolHandler: undefined as undefined | ((r: { url: string }) => Promise<Response>),
    privileged: [] as unknown[],
    beforeRequest: undefined as undefined | ((d: { url: string }, cb: (r: { cancel: boolean }) => void) => void),
    appHandlers: new Map<string, (...a: unknown[]) => void>(),
    messageBoxes: [] as unknown[],
    ready: undefined as undefined | Promise<unknown>,
  };
  class BrowserWindow {
    webContents: { send: (...a: unknown[]) => void };
    private rec;
    constructor(options: unknown) {
      this.rec = { options, handlers: new Map(), sent: [] as unknown[][], loaded: [] as string[] };
      rec.windows.push(this.rec);
      this.webContents = { send: (...a: unknown[]) => this.rec.sent.push(a) };
    }
    on(e: string, fn: (...a: unknown[]) => void) {
      this.rec.handlers.set(e, fn);
    }
    once(e: string, fn: (...a: unknown[]) => void) {
      this.rec.handlers.set(e, fn);
    }
    async loadURL(u: string) {
      this.rec.loaded.push(u);
    }
    isDestroyed() {
      return false;
    }
    setTitle() {}
    setDocumentEdited() {}
    setRepresentedFilename() {}
    show() {}
    close() {}
  }
  let resolveReady: (v?: unknown) => void = () => undefined;
  const readyPromise = new Promise((r) => (resolveReady = r));
  const electron = {
    app: {
      on: (e: string, fn: (...a: unknown[]) => void) => rec.appHandlers.set(e, fn),
      whenReady: () => {
        const p = readyPromise;
        resolveReady();
        return p;
      },
      getPath: () => '/tmp/hingeplan-fake-user-data',
      getVersion: () => '0.0.0',
      getAppPath: () => '/tmp/hingeplan-fake-app',
      isPackaged: false,
      quit: () => undefined,
      exit: () => undefined,
    },
    BrowserWindow,
    clipboard: { writeText: () => undefined },
    dialog: {
      showMessageBox: async (...a: unknown[]) => {
        rec.messageBoxes.push(a);
        return { response: 2 };
      },
      showOpenDialog: async () => ({ canceled: true, filePaths: [] }),
      showSaveDialog: async () => ({ canceled: true }),
      showErrorBox: () => undefined,
    },
    ipcMain: { handle: (c: string, fn: (e: unknown, p: unknown) => unknown) => rec.ipc.set(c, fn) },
    Menu: { buildFromTemplate: (t: unknown) => t, setApplicationMenu: () => undefined },
    protocol: {
      registerSchemesAsPrivileged: (s: unknown) => rec.privileged.push(s),
      handle: (_s: string, fn: (r: { url: string }) => Promise<Response>) => (rec.protocolHandler = fn),
    },
    session: { defaultSession: { webRequest: { onBeforeRequest: (fn: typeof rec.beforeRequest) => (rec.beforeRequest = fn) } } },
  };
  return { rec, electron };
});

vi.mock('electron', () => ({ ...fake.electron, default: fake.electron }));

describe('main.ts', () => {
  beforeAll(async () => {
    await import('../../electron/main');
    // let whenReady().then(startApp) run
    for (let i = 0; i < 20 && !fake.rec.windows[0]?.loaded.length; i++) await new Promise((r) => setTimeout(r, 10));
  });

  it('creates its window with exactly the checked options, and loads the app from its own scheme', () => {
    expect(fake.rec.windows.length).toBe(1);
    const w = fake.rec.windows[0];
    expect(w.options).toEqual(mainWindowOptions(path.join(ROOT, 'electron', 'preload.cjs')));
    expect(w.loaded).toEqual([APP_ENTRY]);
    expect(fake.rec.privileged).toEqual([[{ scheme: 'hingeplan', privileges: { standard: true, secure: true, supportFetchAPI: true } }]]);
  });

  it('hardens every web contents as it is created', () => {
    let denied = false;
    fake.rec.appHandlers.get('web-contents-created')!(
      {},
      {
        on: () => undefined,
        setWindowOpenHandler: (fn: () => { action: string }) => (denied = fn().action === 'deny'),
        session: { setPermissionRequestHandler: () => undefined },
      },
    );
    expect(denied).toBe(true);
  });

  it('handles every contract channel, and only for the app page', async () => {
    expect([...fake.rec.ipc.keys()].sort()).toEqual([...CHANNEL_NAMES].sort());
    const cancel = fake.rec.ipc.get('job:cancel')!;
    expect(await cancel({ senderFrame: { url: 'https://evil.example/' } }, { requestId: 'a' })).toMatchObject({ ok: false, error: { code: 'forbidden' } });
    expect(await cancel({ senderFrame: { url: APP_ENTRY } }, { requestId: 'a' })).toEqual({ ok: true, value: { cancelled: false } });
    expect(await cancel({ senderFrame: { url: APP_ENTRY } }, { requestId: 'bad id' })).toMatchObject({ ok: false, error: { code: 'bad-request' } });
  });

  it('serves renderer files with the security headers and refuses anything outside', async () => {
    const ok = await fake.rec.protocolHandler!({ url: 'hingeplan://app/index.html' });
    expect(ok.status).toBe(200);
    expect(ok.headers.get('content-security-policy')).toBe(CONTENT_SECURITY_POLICY);
    expect(ok.headers.get('content-type')).toContain('text/html');
    expect((await fake.rec.protocolHandler!({ url: 'hingeplan://app/%2e%2e/package.json' })).status).toBe(404);
  });

  it('cancels every request for remote content', () => {
    const answer = (url: string) => {
      let cancel: boolean | undefined;
      fake.rec.beforeRequest!({ url }, (r) => (cancel = r.cancel));
      return cancel;
    };
    expect(answer('https://cdn.example.com/lib.js')).toBe(true);
    expect(answer('http://127.0.0.1:8080/')).toBe(true);
    expect(answer('hingeplan://app/assets/index.js')).toBe(false);
  });

  it('asks before closing a window with unsaved edits, and not when there are none', async () => {
    const w = fake.rec.windows[0];
    const close = w.handlers.get('close')!;
    let prevented = false;
    close({ preventDefault: () => (prevented = true) });
    expect(prevented).toBe(false);
    await fake.rec.ipc.get('doc:state')!({ senderFrame: { url: APP_ENTRY } }, { dirty: true, title: 'panel.hingeplan.json', filePath: null });
    close({ preventDefault: () => (prevented = true) });
    expect(prevented).toBe(true);
    expect(fake.rec.messageBoxes.length).toBe(1);
  });
});
