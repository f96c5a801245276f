// End-to-end tests of the tolerance panel: the shipped renderer in Chromium with the real handlers and solver
// worker behind it. What the panel shows is checked against the tolerance analysis run directly in Node.
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { loadPatternText } from '../../solver';
import { runSteps } from '../../solver/paths/sweep';
import { toleranceSteps } from '../../solver/outputs/tolerance/run';
import { worstVertices } from '../../solver/outputs/tolerance/table';
import { screenshot, SAMPLES, waitSolved, withSession } from './harness';
import type { E2ETest } from './app.e2e';

const D = Math.PI / 180;

/** Compute the path of the path form and wait until it is done (a new request that is no longer running). */
async function computePath(page: Page, range: { from: string; to: string; step: string }) {
  await fillForm(page, { 'path from, degrees': range.from, 'path to, degrees': range.to, 'path step, degrees': range.step });
  const before = await page.evaluate(() => (window as unknown as { __hingeplan: { state: { path: { requestId?: string } } } }).__hingeplan.state.path.requestId ?? '');
  await page.click('[data-testid=compute-path]');
  await page.waitForFunction((b) => {
    const s = (window as unknown as { __hingeplan: { state: { path: { requestId?: string; status: string } } } }).__hingeplan.state.path;
    return s.requestId !== b && s.status !== 'running';
  }, before, { timeout: 120_000 });
  await page.waitForSelector('[data-testid=path-summary]', { timeout: 30_000 });
}

/** The element lies inside the window and nothing covers its centre. */
async function assertVisible(page: Page, selector: string, what: string) {
  const r = await page.evaluate((sel) => {
    const el = document.querySelector(sel);
    if (!el) return null;
    const b = el.getBoundingClientRect();
    const top = document.elementFromPoint(b.left + b.width / 2, b.top + b.height / 2);
    return { x: b.left, y: b.top, w: b.width, h: b.height, vw: innerWidth, vh: innerHeight, on: !!top && (el === top || el.contains(top)) };
  }, selector);
  assert.ok(r, `${what} is on the page`);
  assert.ok(r.w > 0 && r.h > 0 && r.x >= -0.5 && r.y >= -0.5 && r.x + r.w <= r.vw + 0.5 && r.y + r.h <= r.vh + 0.5, `${what} lies within the window (${JSON.stringify(r)})`);
  assert.ok(r.on, `${what} is not covered`);
}

/** No button, label or header of the tolerance tab is cut short, and the window does not scroll. */
async function assertWhole(page: Page, size: string) {
  const r = await page.evaluate(() => ({
    scrolls: document.scrollingElement!.scrollHeight > innerHeight + 1 || document.scrollingElement!.scrollWidth > innerWidth + 1,
    cut: [...document.querySelectorAll('.tolerance-body button, .tolerance-body label, .tolerance-numbers th, .tab')]
      .filter((e) => (e as HTMLElement).offsetParent !== null && e.scrollWidth > e.clientWidth + 1)
      .map((e) => `"${e.textContent?.trim().slice(0, 40)}" (${e.scrollWidth} > ${e.clientWidth})`),
  }));
  assert.equal(r.scrolls, false, `the window does not scroll at ${size}`);
  assert.deepEqual(r.cut, [], `nothing in the tolerance tab is cut short at ${size}`);
}

async function fillForm(page: Page, f: Record<string, string>) {
  for (const [label, value] of Object.entries(f)) await page.getByLabel(label, { exact: true }).fill(value);
}

const signed = (s: string) => Number(s.replace('°', '').replace('+', ''));

export const toleranceTests: E2ETest[] = [
  {
    name: 'tolerance panel: fan charts, misfit curve and worst vertices on the sunshade sheet match the solver in Node',
    timeoutMs: 240_000,
    async run(h) {
      const file = path.join(SAMPLES, 'sunshade-panel.hingeplan.json');
      const loaded = loadPatternText(readFileSync(file, 'utf8'), path.basename(file));
      const pattern = loaded.pattern!;
      await withSession(h, 'tolerance-sunshade', { viewport: { width: 1280, height: 800 } }, async ({ page, host }) => {
        await waitSolved(page, 90_000);
        // the sheets follow the path on screen: compute it first (20° … 60° every 20°)
        await computePath(page, { from: '20', to: '60', step: '20' });
        await page.click('[data-testid=tab-tolerance]');
        await fillForm(page, {
          'tolerance drive spacing, degrees': '20', 'position tolerance, mm': '0.1', 'sector tolerance, degrees': '0', 'number of sheets': '24', 'random seed': '7',
        });
        const events0 = host.progressEvents;
        await page.click('[data-testid=run-tolerance]');
        await page.waitForSelector('[data-testid=tolerance-summary]', { timeout: 180_000 });
        assert.ok(host.progressEvents > events0, 'progress reached the page');
        assert.match((await page.textContent('[data-testid=tolerance-summary]')) ?? '', /24 of 24 sheets \(seed 7\)/);

        // the same analysis in Node
        const drive = pattern.labelIndex.get('z6_4')!;
        const at = [20, 40, 60].map((d) => d * D); // as the worker turns the form's degrees into radians
        const ref = runSteps(toleranceSteps(pattern, { path: { drive, from: at[0], to: at[at.length - 1], samples: at, conditionEvery: 0 }, tolerance: { position: 0.1, sector: 0 }, samples: 24, seed: 7 }));
        const st = ref.statistics!;
        const j = at.length - 1;
        // three fan charts and the misfit curve (a perturbed Miura sheet does not close)
        assert.equal(await page.locator('[data-testid=fan-chart]').count(), 3);
        assert.equal(await page.locator('[data-testid=misfit-chart]').count(), 1);
        assert.equal(await page.locator('[data-testid=misfit-none]').count(), 0);
        // the numbers at 60° for each hinge charted
        const rows = page.locator('[data-testid=tolerance-numbers] tbody tr');
        assert.equal(await rows.count(), 3);
        for (let k = 0; k < 3; k++) {
          const row = rows.nth(k);
          const label = (await row.getAttribute('data-crease'))!;
          const h = ref.hinges.indexOf(pattern.labelIndex.get(label)!);
          const s = st.hinges[j][h];
          assert.ok(Math.abs(signed((await row.getByTestId('p05').textContent())!) - s.deviation.p05 / D) <= 0.00006, `${label} p05`);
          assert.ok(Math.abs(signed((await row.getByTestId('p95').textContent())!) - s.deviation.p95 / D) <= 0.00006, `${label} p95`);
          assert.ok(Math.abs(signed((await row.getByTestId('linear-std').textContent())!) - ref.linear!.hingeStd[j]![h] / D) <= 0.00006, `${label} first-order σ`);
        }
        // the widest hinge is charted first (none is selected on the sheet)
        const widest = ref.hinges
          .map((c, h) => ({ c, w: Math.max(...at.map((_, jj) => st.hinges[jj][h].angle.p95 - st.hinges[jj][h].angle.p05)) }))
          .sort((a, b) => b.w - a.w || a.c - b.c)[0];
        assert.equal(await rows.first().getAttribute('data-crease'), pattern.creases[widest.c].label);
        // the misfit at 60°
        const misfit = (await page.textContent('[data-testid=misfit-at]')) ?? '';
        assert.ok(misfit.includes(st.misfit[j].p50.toExponential(2)), `misfit median ${st.misfit[j].p50.toExponential(2)} in “${misfit}”`);
        // the worst vertices ringed on the sheet, in the solver's order
        const marks = await page.$$eval('[data-testid=misfit-mark]', (els) => els.map((e) => Number(e.getAttribute('data-vertex'))));
        assert.deepEqual(marks, worstVertices(ref).map((v) => v.vertex));
        assert.ok(marks.length > 0);
        // on a laptop screen the tab's controls and its first chart are in view and whole
        await assertVisible(page, '[data-testid=run-tolerance]', 'Run sheets at 1280 × 800');
        await assertVisible(page, '[data-testid=fan-chart]', 'the first fan chart at 1280 × 800');
        await assertWhole(page, '1280 × 800');
        await screenshot(page, 'tolerance-sunshade');
        await page.setViewportSize({ width: 1920, height: 1080 });
        await page.waitForTimeout(400);
        await assertVisible(page, '[data-testid=misfit-chart]', 'the misfit chart at 1920 × 1080');
        await assertWhole(page, '1920 × 1080');
        await screenshot(page, 'tolerance-sunshade-1920x1080');
        // charting another hinge: tick it in the chooser
        const chips = page.locator('.tolerance-choose input[type=checkbox]');
        const n = await chips.count();
        for (let k = 0; k < n; k++) {
          if (!(await chips.nth(k).isChecked())) { await chips.nth(k).check(); break; }
        }
        assert.equal(await page.locator('[data-testid=fan-chart]').count(), 4);
        // back on the charts of the path the rings go away
        await page.click('[data-testid=tab-charts]');
        assert.equal(await page.locator('[data-testid=misfit-mark]').count(), 0);
      });
    },
  },
  {
    name: 'tolerance panel: a long run shows progress and cancels; a single vertex folds rigidly on every sheet',
    timeoutMs: 180_000,
    async run(h) {
      // without a path there is nothing to follow: the tab says so (two drives: no path is computed on opening;
      // a one-drive file's path is, and may be done before the tab is clicked)
      await withSession(h, 'tolerance-no-path', { openSample: 'two-motor-rig.hingeplan.json' }, async ({ page }) => {
        await waitSolved(page, 90_000);
        await page.click('[data-testid=tab-tolerance]');
        assert.match((await page.textContent('[data-testid=tolerance-body]')) ?? '', /Compute the path first/);
      });
      await withSession(h, 'tolerance-coupon', { openSample: 'hinge-coupon.hingeplan.json' }, async ({ page }) => {
        await waitSolved(page, 90_000);
        await computePath(page, { from: '10', to: '150', step: '10' });
        await page.click('[data-testid=tab-tolerance]');
        await fillForm(page, { 'tolerance drive spacing, degrees': '10', 'position tolerance, mm': '0.2', 'number of sheets': '100000', 'random seed': '3' });
        await page.click('[data-testid=run-tolerance]');
        await page.waitForFunction(() => {
          const p = document.querySelector('[data-testid=tolerance-progress]');
          return p && Number(p.getAttribute('aria-valuenow')) >= 0 && /of 100000 sheets/.test(p.textContent ?? '');
        }, null, { timeout: 90_000 });
        await screenshot(page, 'tolerance-progress');
        await page.click('[data-testid=cancel-tolerance]');
        await page.waitForSelector('[data-testid=tolerance-cancelled]');
        assert.equal(await page.locator('[data-testid=tolerance-progress]').count(), 0);
        // a bad number is refused in the form, naming it
        await fillForm(page, { 'number of sheets': '0' });
        await page.click('[data-testid=run-tolerance]');
        assert.match((await page.textContent('[data-testid=tolerance-problem]')) ?? '', /number of sheets/);
        // a short run: every sheet of a single degree-4 vertex still closes
        await fillForm(page, { 'number of sheets': '20' });
        await page.click('[data-testid=run-tolerance]');
        await page.waitForSelector('[data-testid=tolerance-summary]', { timeout: 120_000 });
        assert.match((await page.textContent('[data-testid=tolerance-summary]')) ?? '', /20 of 20 sheets .*Every sheet still folds rigidly/);
        assert.equal(await page.locator('[data-testid=misfit-none]').count(), 1);
        assert.equal(await page.locator('[data-testid=misfit-mark]').count(), 0);
        assert.equal(await page.locator('[data-testid=fan-chart]').count(), 3);
        await screenshot(page, 'tolerance-coupon');
      });
    },
  },
];
