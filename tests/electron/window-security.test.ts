// The window's security settings, checked against Electron's security checklist (electronjs.org, "Security"
// tutorial: context isolation, no Node integration, sandbox, CSP, no remote content, no navigation or new
// windows, validated IPC senders), first in the options module and then in main.ts itself, run against a
// stand-in for the Electron module (the binary is not needed).
import { beforeAll, describe, expect, it, vi } from 'vitest';
import type { MenuItemConstructorOptions } from 'electron';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import {
  APP_ENTRY,
  CONTENT_SECURITY_POLICY,
  SECURITY_HEADERS,
  hardenSession,
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

/** A stand-in web contents and session that record what hardening installs. */
function fakeContents() {
  const handlers = new Map<string, (...a: unknown[]) => void>();
  const sessionHandlers = new Map<string, (...a: unknown[]) => void>();
  const rec = {
    handlers,
    sessionHandlers,
    openHandler: undefined as ((d: { url: string }) => { action: string }) | undefined,
    request: undefined as ((wc: unknown, p: string, cb: (ok: boolean) => void) => void) | undefined,
    check: undefined as ((wc: unknown, p: string, origin: string) => boolean) | undefined,
    device: undefined as ((d: unknown) => boolean) | undefined,
    devToolsClosed: 0,
  };
  const session = {
    setPermissionRequestHandler: (fn: typeof rec.request) => (rec.request = fn),
    setPermissionCheckHandler: (fn: typeof rec.check) => (rec.check = fn),
    setDevicePermissionHandler: (fn: typeof rec.device) => (rec.device = fn),
    on: (e: string, fn: (...a: unknown[]) => void) => sessionHandlers.set(e, fn),
  };
  const contents = {
    on: (event: string, fn: (...a: unknown[]) => void) => handlers.set(event, fn),
    setWindowOpenHandler: (fn: typeof rec.openHandler) => (rec.openHandler = fn),
    closeDevTools: () => rec.devToolsClosed++,
    session,
  };
  return { contents: contents as never, rec };
}

// every permission Electron 45's session handlers can be asked about (electron.d.ts, setPermissionCheckHandler)
const PERMISSIONS = ['clipboard-read', 'clipboard-sanitized-write', 'display-capture', 'fileSystem', 'fullscreen', 'geolocation', 'hid', 'idle-detection', 'local-fonts', 'media', 'mediaKeySystem', 'midi', 'midiSysex', 'notifications', 'openExternal', 'pointerLock', 'serial', 'storage-access', 'usb', 'window-management', 'unknown'];

describe('window options', () => {
  const prefs = mainWindowOptions('/app/preload.cjs', { packaged: false }).webPreferences!;
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

  it('has no developer tools in a packaged build (they could run any code in the page, bridge included)', () => {
    expect(mainWindowOptions('/app/preload.cjs', { packaged: true }).webPreferences!.devTools).toBe(false);
    expect(prefs.devTools).toBe(true);
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
    const { contents, rec } = fakeContents();
    const { handlers } = rec;
    hardenWebContents(contents, { packaged: false });
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
    expect(rec.openHandler!({ url: 'https://example.com' })).toEqual({ action: 'deny' });
    for (const p of PERMISSIONS) {
      let granted: boolean | undefined;
      rec.request!(null, p, (ok) => (granted = ok));
      expect(granted, `request ${p}`).toBe(false);
    }
    // in a build run from source the developer tools stay usable
    expect(handlers.has('devtools-opened')).toBe(false);
  });

  it('answers permission checks no, for every permission and origin, not only prompts', () => {
    const { contents, rec } = fakeContents();
    hardenWebContents(contents, { packaged: true });
    expect(rec.check).toBeDefined();
    for (const p of PERMISSIONS) for (const origin of [APP_ENTRY, 'https://example.com']) expect(rec.check!(null, p, origin), `check ${p} from ${origin}`).toBe(false);
    expect(rec.device!({ deviceType: 'usb', origin: APP_ENTRY })).toBe(false);
    // device pickers get "no device" at once, and the default chooser is prevented
    for (const event of ['select-hid-device', 'select-usb-device']) {
      let prevented = false;
      let answer: unknown = 'none';
      rec.sessionHandlers.get(event)!({ preventDefault: () => (prevented = true) }, {}, (id?: string) => (answer = id));
      expect([event, prevented, answer]).toEqual([event, true, undefined]);
    }
    let port: string | undefined;
    rec.sessionHandlers.get('select-serial-port')!({ preventDefault: () => undefined }, [], null, (id: string) => (port = id));
    expect(port).toBe('');
  });

  it('closes the developer tools in a packaged build should anything open them', () => {
    const { contents, rec } = fakeContents();
    hardenWebContents(contents, { packaged: true });
    rec.handlers.get('devtools-opened')!();
    expect(rec.devToolsClosed).toBe(1);
  });

  it('hardens a session once however many contents share it (no pile of listeners)', () => {
    let ons = 0;
    const session = { setPermissionRequestHandler: () => undefined, setPermissionCheckHandler: () => undefined, setDevicePermissionHandler: () => undefined, on: () => ons++ };
    hardenSession(session as never);
    hardenSession(session as never);
    expect(ons).toBe(3);
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
    menus: [] as unknown[],
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
    Menu: { buildFromTemplate: (t: unknown) => t, setApplicationMenu: (m: unknown) => rec.menus.push(m) },
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
    expect(w.options).toEqual(mainWindowOptions(path.join(ROOT, 'electron', 'preload.cjs'), { packaged: false }));
    expect(w.loaded).toEqual([APP_ENTRY]);
    expect(fake.rec.privileged).toEqual([[{ scheme: 'hingeplan', privileges: { standard: true, secure: true, supportFetchAPI: true } }]]);
  });

  it('hardens every web contents as it is created: no new windows, no permission even when only checked', () => {
    const { contents, rec } = fakeContents();
    fake.rec.appHandlers.get('web-contents-created')!({}, contents);
    expect(rec.openHandler!({ url: 'https://example.com' })).toEqual({ action: 'deny' });
    expect(rec.check!(null, 'clipboard-read', APP_ENTRY)).toBe(false);
    expect(rec.handlers.has('devtools-opened')).toBe(false);
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

/** All items of a menu template, submenus included. */
function menuItems(t: MenuItemConstructorOptions[]): MenuItemConstructorOptions[] {
  return t.flatMap((i) => [i, ...(Array.isArray(i.submenu) ? menuItems(i.submenu) : [])]);
}

describe('main.ts in a packaged build', () => {
  beforeAll(async () => {
    // the same main.ts loaded again, as the packaged app would run it
    fake.electron.app.isPackaged = true;
    vi.resetModules();
    await import('../../electron/main');
    for (let i = 0; i < 20 && !fake.rec.windows[1]?.loaded.length; i++) await new Promise((r) => setTimeout(r, 10));
  });

  it('makes its window without developer tools and offers none in the menu', () => {
    const w = fake.rec.windows[1];
    expect((w.options as { webPreferences: { devTools: boolean } }).webPreferences.devTools).toBe(false);
    expect(w.options).toEqual(mainWindowOptions(path.join(ROOT, 'electron', 'preload.cjs'), { packaged: true }));
    const menu = menuItems(fake.rec.menus.at(-1) as MenuItemConstructorOptions[]);
    expect(menu.some((i) => i.label === 'Save')).toBe(true);
    expect(menu.some((i) => i.role === 'toggleDevTools')).toBe(false);
  });

  it('closes developer tools that open anyway, and loads no devtools: page', () => {
    const { contents, rec } = fakeContents();
    fake.rec.appHandlers.get('web-contents-created')!({}, contents);
    rec.handlers.get('devtools-opened')!();
    expect(rec.devToolsClosed).toBe(1);
    let cancel: boolean | undefined;
    fake.rec.beforeRequest!({ url: 'devtools://devtools/bundled/inspector.html' }, (r) => (cancel = r.cancel));
    expect(cancel).toBe(true);
  });
});
