// Everything that decides how locked-down the window is, in one place and without importing Electron at
// run time, so a test can read the very options the main process uses. Electron's security checklist is
// the floor: isolated, sandboxed renderer without Node, strict CSP, our own scheme, no navigation, no popups.

import path from 'node:path';
import type { BrowserWindowConstructorOptions, WebContents } from 'electron';

/** The renderer is served from this privileged scheme, never from file:// or the network. */
export const APP_SCHEME = 'hingeplan';
export const APP_HOST = 'app';
export const APP_ORIGIN = `${APP_SCHEME}://${APP_HOST}`;
export const APP_ENTRY = `${APP_ORIGIN}/index.html`;

/** No remote content at all: scripts, styles, images and fonts come from the app itself. */
export const CONTENT_SECURITY_POLICY = [
  "default-src 'none'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self' data:",
  "font-src 'self'",
  "connect-src 'none'",
  "worker-src 'none'",
  "object-src 'none'",
  "frame-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-ancestors 'none'",
].join('; ');

/** Headers sent with every file of the renderer (the CSP also sits in index.html as a meta tag). */
export const SECURITY_HEADERS: Record<string, string> = {
  'Content-Security-Policy': CONTENT_SECURITY_POLICY,
  'X-Content-Type-Options': 'nosniff',
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Referrer-Policy': 'no-referrer',
};

export interface WindowBuild {
  /** a packaged build (app.isPackaged): no developer tools */
  packaged: boolean;
}

export function mainWindowOptions(preloadPath: string, build: WindowBuild): BrowserWindowConstructorOptions {
  return {
    width: 1480,
    height: 920,
    minWidth: 960,
    minHeight: 640,
    title: 'Hingeplan',
    backgroundColor: '#f4f2ee',
    show: false,
    webPreferences: {
      preload: preloadPath,
      contextIsolation: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      sandbox: true,
      webSecurity: true,
      allowRunningInsecureContent: false,
      experimentalFeatures: false,
      webviewTag: false,
      navigateOnDragDrop: false,
      spellcheck: false,
      // the developer tools can run any code in the page with its bridge: only in a build run from source
      devTools: !build.packaged,
    },
  };
}

export function isAppUrl(url: string): boolean {
  try {
    const u = new URL(url);
    return u.protocol === `${APP_SCHEME}:` && u.host === APP_HOST;
  } catch {
    return false;
  }
}

/**
 * The file under `root` that an app URL names, or undefined for anything outside it (other schemes, other
 * hosts, `..` tricks, encoded separators).
 */
export function resolveAppAsset(root: string, url: string): string | undefined {
  if (!isAppUrl(url)) return undefined;
  let pathname: string;
  try {
    pathname = decodeURIComponent(new URL(url).pathname);
  } catch {
    return undefined;
  }
  if (pathname.includes('\0') || pathname.includes('\\')) return undefined;
  const relative = pathname === '/' || pathname === '' ? 'index.html' : pathname.replace(/^\/+/, '');
  const resolved = path.resolve(root, relative);
  const rootResolved = path.resolve(root);
  if (resolved !== rootResolved && !resolved.startsWith(rootResolved + path.sep)) return undefined;
  return resolved;
}

const MIME: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.json': 'application/json',
  '.woff2': 'font/woff2',
  '.map': 'application/json',
};

export function mimeType(file: string): string {
  return MIME[path.extname(file).toLowerCase()] ?? 'application/octet-stream';
}

type Session = WebContents['session'];

/** The part of a session that hardening touches (a test passes a fake). */
export type HardenableSession = Pick<Session, 'setPermissionRequestHandler' | 'setPermissionCheckHandler' | 'setDevicePermissionHandler' | 'on'>;

/** The part of WebContents that hardening touches. */
export type HardenableContents = Pick<WebContents, 'on' | 'setWindowOpenHandler' | 'closeDevTools'> & { session: HardenableSession };

const hardenedSessions = new WeakSet<object>();

/**
 * Refuse every permission the page could ask for (camera, notifications, clipboard reads, HID/serial/USB
 * devices, ...): the app needs none. The request handler answers prompts; the check handler answers the
 * synchronous "is it granted?" some APIs ask without prompting, which Electron otherwise grants.
 */
export function hardenSession(session: HardenableSession): void {
  if (hardenedSessions.has(session)) return;
  hardenedSessions.add(session);
  session.setPermissionRequestHandler((_wc, _permission, callback) => callback(false));
  session.setPermissionCheckHandler(() => false);
  session.setDevicePermissionHandler(() => false);
  // device pickers: answer "no device" at once instead of letting a chooser appear
  session.on('select-hid-device', (event, _details, callback) => {
    event.preventDefault();
    callback();
  });
  session.on('select-usb-device', (event, _details, callback) => {
    event.preventDefault();
    callback();
  });
  session.on('select-serial-port', (event, _ports, _wc, callback) => {
    event.preventDefault();
    callback('');
  });
}

/**
 * Block every way the page could leave the app: navigation (links, drops, location changes), new windows,
 * embedded webviews; harden its session; and in a packaged build close the developer tools should anything
 * open them (the window is also made without them).
 */
export function hardenWebContents(contents: HardenableContents, build: WindowBuild): void {
  contents.on('will-navigate', (event: { preventDefault(): void }, url: string) => {
    if (!isAppUrl(url)) event.preventDefault();
  });
  contents.on('will-redirect', (event: { preventDefault(): void }, url: string) => {
    if (!isAppUrl(url)) event.preventDefault();
  });
  contents.on('will-attach-webview', (event: { preventDefault(): void }) => event.preventDefault());
  contents.setWindowOpenHandler(() => ({ action: 'deny' }));
  hardenSession(contents.session);
  if (build.packaged) contents.on('devtools-opened', () => contents.closeDevTools());
}

/** The built files, relative to dist/electron where main.cjs runs. */
export function builtPaths(mainDir: string): { preload: string; worker: string; rendererRoot: string } {
  return {
    preload: path.join(mainDir, 'preload.cjs'),
    worker: path.join(mainDir, 'solver-worker.cjs'),
    rendererRoot: path.resolve(mainDir, '..', 'renderer'),
  };
}
