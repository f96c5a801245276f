// The e2e harness: the renderer as it ships (dist/renderer) served from 127.0.0.1, Debian's Chromium driven
// by playwright-core, and behind `window.hingeplan` the real main-process handlers (electron/service.ts)
// with the real solver worker (dist/electron/solver-worker.cjs). File dialogs, the clipboard and the
// unsaved-changes prompt become harness functions a test answers in advance.

import http from 'node:http';
import { promises as fs, mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { createService, type DialogHost, type Service } from '../../electron/service';
import { SolverClient } from '../../electron/solver-client';
import { nodeWorkerSpawner } from '../../electron/worker-client';
import { RecentFiles, RecoveryStore } from '../../electron/files';
import { APP_ORIGIN, SECURITY_HEADERS, mimeType, resolveAppAsset } from '../../electron/window';
import type { EventName, EventOf } from '../../electron/contract';
import type { Pattern } from '../../solver/types';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
export const DIST = path.join(ROOT, 'dist');
export const SCREENSHOTS = path.join(ROOT, 'test-output', 'screenshots');
export const SAMPLES = path.join(ROOT, 'samples');

/** Flags for a quiet, local-only headless Chromium. */
export const CHROMIUM_FLAGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--disable-default-apps',
  '--disable-extensions',
  '--mute-audio',
];

export function chromiumPath(): string {
  if (process.env.CHROMIUM_PATH) return process.env.CHROMIUM_PATH;
  try {
    return execFileSync('which', ['chromium'], { encoding: 'utf8' }).trim();
  } catch {
    throw new Error('Chromium is not installed: run `apt-get update && apt-get install -y chromium` (Debian) once.');
  }
}

/** Serves dist/renderer with the same headers (CSP and all) as the app's own scheme, on 127.0.0.1 only. */
export async function startStaticServer(root = path.join(DIST, 'renderer')): Promise<{ url: string; close(): Promise<void> }> {
  const server = http.createServer(async (req, res) => {
    const file = resolveAppAsset(root, `${APP_ORIGIN}${(req.url ?? '/').split('?')[0]}`);
    if (!file || req.method !== 'GET') {
      res.writeHead(404).end('not found');
      return;
    }
    try {
      const body = await fs.readFile(file);
      res.writeHead(200, { 'Content-Type': mimeType(file), 'Cache-Control': 'no-store', ...SECURITY_HEADERS });
      res.end(body);
    } catch {
      res.writeHead(404).end('not found');
    }
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as { port: number };
  return {
    url: `http://127.0.0.1:${port}/index.html`,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

let bridgeScript: string | undefined;
async function pageBridge(): Promise<string> {
  if (!bridgeScript) {
    const out = await build({
      entryPoints: [path.join(ROOT, 'tests/e2e/page-bridge.ts')],
      bundle: true,
      write: false,
      format: 'iife',
      platform: 'browser',
      target: 'chrome120',
      logLevel: 'warning',
    });
    bridgeScript = out.outputFiles[0].text;
  }
  return bridgeScript;
}

/** Dialog answers queued by a test, and what the app asked for. */
export class HarnessHost implements DialogHost {
  openAnswers: (string | null)[] = [];
  saveAnswers: (string | null)[] = [];
  confirmAnswers: ('save' | 'discard' | 'cancel')[] = [];
  openRequests: { title: string }[] = [];
  saveRequests: { title: string; defaultName: string }[] = [];
  confirmRequests: { documentName: string; action: string }[] = [];
  clipboard = '';
  states: { dirty: boolean; title: string; filePath: string | null }[] = [];
  closed = false;
  progressEvents = 0;
  emitter: (<E extends EventName>(event: E, payload: EventOf<E>) => void) | null = null;

  async chooseOpenFile(request: { title: string }) {
    this.openRequests.push(request);
    return this.openAnswers.shift() ?? null;
  }
  async chooseSaveFile(request: { title: string; defaultName: string }) {
    this.saveRequests.push(request);
    return this.saveAnswers.shift() ?? null;
  }
  async confirmDiscard(request: { documentName: string; action: string }) {
    this.confirmRequests.push(request);
    return this.confirmAnswers.shift() ?? 'cancel';
  }
  writeClipboard(text: string) {
    this.clipboard = text;
  }
  documentState(state: { dirty: boolean; title: string; filePath: string | null }) {
    this.states.push(state);
  }
  emit<E extends EventName>(event: E, payload: EventOf<E>) {
    if (event === 'job:progress') this.progressEvents++;
    this.emitter?.(event, payload);
  }
  closeReady() {
    this.closed = true;
  }
  recentChanged() {}
}

export interface AppSession {
  page: Page;
  context: BrowserContext;
  host: HarnessHost;
  service: Service;
  tmp: string;
  /** problems the page reported (console errors, uncaught exceptions, CSP violations) */
  pageErrors: string[];
  close(): Promise<void>;
}

export interface SessionOptions {
  /** a sample (file name in samples/) to open at startup instead of the built-in one; it is copied into the
   * session's temporary folder first, so a test that saves never writes over the repository's samples */
  openSample?: string;
  viewport?: { width: number; height: number };
}

export class Harness {
  private browser: Browser | undefined;
  private server: { url: string; close(): Promise<void> } | undefined;

  async start(): Promise<void> {
    this.server = await startStaticServer();
    this.browser = await chromium.launch({ executablePath: chromiumPath(), args: CHROMIUM_FLAGS, headless: true });
  }

  async stop(): Promise<void> {
    await this.browser?.close();
    await this.server?.close();
  }

  /** A fresh window: its own backend (service, solver workers, temp folder) and its own page. */
  async open(options: SessionOptions = {}): Promise<AppSession> {
    const tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-e2e-'));
    let openPath: string | undefined;
    if (options.openSample) {
      openPath = path.join(tmp, options.openSample);
      await fs.copyFile(path.join(SAMPLES, options.openSample), openPath);
    }
    const host = new HarnessHost();
    const solver = new SolverClient({ spawn: nodeWorkerSpawner(path.join(DIST, 'electron', 'solver-worker.cjs')) });
    const service = createService({
      solver,
      host,
      recovery: new RecoveryStore(path.join(tmp, 'user-data', 'recovery')),
      recent: new RecentFiles(path.join(tmp, 'user-data', 'recent-files.json')),
      startup: { version: 'e2e', platform: process.platform, openPath, samplePath: path.join(SAMPLES, 'sunshade-panel.hingeplan.json') },
    });
    const context = await this.browser!.newContext({ viewport: options.viewport ?? { width: 1480, height: 920 }, deviceScaleFactor: 1 });
    // nothing but the app's own server: any other request is refused
    await context.route('**/*', (route) => (route.request().url().startsWith(new URL(this.server!.url).origin) ? route.continue() : route.abort()));
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('console', (m) => {
      if (m.type() === 'error') pageErrors.push(m.text());
    });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    await page.exposeBinding('__hpInvoke', (_source, channel: string, payload: unknown) => service.dispatch(channel, payload));
    host.emitter = (event, payload) => {
      void page.evaluate(([e, p]) => (window as unknown as { __hpEmit(e: string, p: unknown): void }).__hpEmit(e as string, p), [event, payload] as const).catch(() => undefined);
    };
    await page.addInitScript({ content: await pageBridge() });
    await page.goto(this.server!.url);
    return {
      page,
      context,
      host,
      service,
      tmp,
      pageErrors,
      async close() {
        await context.close();
        solver.dispose();
        await fs.rm(tmp, { recursive: true, force: true });
      },
    };
  }
}

export async function screenshot(page: Page, name: string): Promise<string> {
  await fs.mkdir(SCREENSHOTS, { recursive: true });
  const file = path.join(SCREENSHOTS, `${name}.png`);
  await page.screenshot({ path: file });
  return file;
}

/**
 * Open a session, run `fn`, and fail when the page reported errors (a broken content policy, a throw);
 * a failure leaves a screenshot named `<name>-FAILED`. The session is closed in every case.
 */
export async function withSession(h: Harness, name: string, options: SessionOptions, fn: (s: AppSession) => Promise<void>): Promise<void> {
  const s = await h.open(options);
  try {
    await fn(s);
    assert.deepEqual(s.pageErrors.filter((e) => !/GL Driver Message/.test(e)), [], 'the page reported errors');
  } catch (err) {
    await screenshot(s.page, `${name}-FAILED`).catch(() => undefined);
    throw err;
  } finally {
    await s.close();
  }
}

/** Wait until the solve status says something other than solving or not solved yet; its text. */
export async function waitSolved(page: Page, timeout = 60_000): Promise<string> {
  await page.waitForFunction(
    () => {
      const t = document.querySelector('[data-testid=solve-status]')?.textContent ?? '';
      return t && !t.includes('solving') && !t.includes('Not solved yet');
    },
    null,
    { timeout },
  );
  return (await page.textContent('[data-testid=solve-status]')) ?? '';
}

/** Angles in the hinge table as shown: label → degrees. */
export async function tableAngles(page: Page): Promise<Map<string, number>> {
  const rows = await page.$$eval('[data-testid=hinge-table] .row', (els) =>
    els.map((e) => [e.getAttribute('data-label')!, e.querySelector('[data-testid=angle-cell]')!.textContent!] as [string, string]),
  );
  return new Map(rows.map(([l, t]) => [l, Number(t.replace('°', ''))]));
}

/** Every angle the hinge table shows equals the solver's to the two decimals shown (half a last digit, 0.005°, plus rounding). */
export async function assertTableMatches(page: Page, pattern: Pattern, angles: Float64Array, what: string): Promise<void> {
  const shown = await tableAngles(page);
  assert.ok(shown.size > 0, 'the table shows rows');
  for (const [label, deg] of shown) {
    const c = pattern.labelIndex.get(label) ?? Number(label);
    const want = (angles[c] * 180) / Math.PI;
    assert.ok(Math.abs(deg - want) <= 0.0051, `${what}: crease ${label} shows ${deg}°, the solver says ${want.toFixed(4)}°`);
  }
}
