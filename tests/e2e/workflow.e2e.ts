// End-to-end tests of the main job on a laptop screen and of the cases where the app must say why: paths
// that used to end with no samples, a path from a chosen non-first solution, a drive past its hinge stop,
// an underspecified drive set, the colour code under colour-vision-deficiency emulation, and the charts'
// export. What the window shows is checked against the solver run directly in Node.
import assert from 'node:assert/strict';
import { promises as fs, readFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { PNG } from 'pngjs';
import { CAUTIONS, buildPattern, flatBranches, foldedShape, loadPatternText, miura, resolveDrives, solveDrives, sweep, waterbomb, type Pattern } from '../../solver';
import { assertTableMatches, screenshot, SAMPLES, waitSolved, withSession, type AppSession } from './harness';
import type { E2ETest } from './app.e2e';

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;

/** Wait for a path to be computed and shown (its summary or its outcome), and return the summary text. */
async function waitPath(page: Page, timeout = 90_000): Promise<{ summary: string; outcome: string }> {
  await page.waitForFunction(() => !document.querySelector('[data-testid=path-progress]') && (document.querySelector('[data-testid=path-summary]') || document.querySelector('[data-testid=path-outcome]')), null, { timeout });
  return {
    // (a path with no samples has no summary: do not wait for one)
    summary: (await page.locator('[data-testid=path-summary]').count()) ? ((await page.textContent('[data-testid=path-summary]')) ?? '') : '',
    outcome: (await page.locator('[data-testid=path-outcome]').count()) ? ((await page.textContent('[data-testid=path-outcome]')) ?? '') : '',
  };
}

/** Start a new path and wait until it is the one on screen. */
async function computeAndWait(page: Page, click: () => Promise<void>, timeout = 90_000) {
  const before = await page.evaluate(() => (window as unknown as { __hingeplan: { state: { path: { requestId?: string } } } }).__hingeplan.state.path.requestId ?? '');
  await click();
  await page.waitForFunction((b) => {
    const s = (window as unknown as { __hingeplan: { state: { path: { requestId?: string; status: string } } } }).__hingeplan.state.path;
    return s.requestId !== b && s.status !== 'running';
  }, before, { timeout });
  return waitPath(page, timeout);
}

function loadSample(file: string) {
  const loaded = loadPatternText(readFileSync(path.join(SAMPLES, file), 'utf8'), file);
  assert.ok(loaded.pattern && loaded.project, `${file} loads`);
  return { pattern: loaded.pattern, project: loaded.project };
}

function referenceSolve(pattern: Pattern, drives: { crease: string; angleDeg: number }[]) {
  return solveDrives(pattern, resolveDrives(pattern, drives).drives);
}

async function setDriveField(page: Page, label: string, value: number) {
  const field = page.getByLabel(`angle of drive ${label} in degrees`);
  await field.click();
  await field.fill(String(value));
  await field.press('Enter');
}

async function newFromGenerator(page: Page, host: AppSession['host'], kind: string, fields: Record<string, string>) {
  await page.click('button:has-text("New…")');
  const dialog = page.getByRole('dialog');
  await dialog.getByLabel(kind).check();
  for (const [label, value] of Object.entries(fields)) await dialog.getByLabel(label, { exact: true }).fill(value);
  host.confirmAnswers.push('discard');
  await dialog.getByRole('button', { name: 'Create' }).click();
  await page.waitForSelector('[role=dialog]', { state: 'detached', timeout: 30_000 });
}

/** The element is inside the viewport and is what a person sees at its centre (nothing covers it). */
async function assertVisible(page: Page, selector: string, what: string) {
  const r = await page.evaluate((sel) => {
    const el = document.querySelector(sel);
    if (!el) return { found: false } as const;
    const b = el.getBoundingClientRect();
    const top = document.elementFromPoint(b.left + b.width / 2, b.top + b.height / 2);
    return { found: true, box: { x: b.left, y: b.top, w: b.width, h: b.height }, vw: innerWidth, vh: innerHeight, on: !!top && (el === top || el.contains(top)) } as const;
  }, selector);
  assert.ok(r.found, `${what} is on the page`);
  const { box, vw, vh, on } = r as { box: { x: number; y: number; w: number; h: number }; vw: number; vh: number; on: boolean };
  assert.ok(box.w > 0 && box.h > 0, `${what} has a size`);
  assert.ok(box.x >= -0.5 && box.y >= -0.5 && box.x + box.w <= vw + 0.5 && box.y + box.h <= vh + 0.5, `${what} lies within the ${vw} × ${vh} window (${JSON.stringify(box)})`);
  assert.ok(on, `${what} is not covered`);
}

/** Nothing scrolls and no caption, header, button or label is cut short. */
async function assertFits(page: Page, size: string) {
  const r = await page.evaluate(() => {
    const scroller = document.scrollingElement!;
    const overflowing = [...document.querySelectorAll('.left, .right, .center, .path-panel, .path-body-charts, .views, .table-panel')]
      .filter((e) => e.scrollHeight > e.clientHeight + 1)
      .map((e) => `${e.className} (${e.scrollHeight} > ${e.clientHeight})`);
    const cut = [...document.querySelectorAll('.row.head .cell, .view-caption, .chart-caption > span, .status-headline, button, label, .legend-words span, .drive-label, .tab, h2, .scene-key span, .path-controls select, .rate-against')]
      .filter((e) => (e as HTMLElement).offsetParent !== null && e.scrollWidth > e.clientWidth + 1)
      .map((e) => `"${e.textContent?.trim().slice(0, 40)}" (${e.scrollWidth} > ${e.clientWidth})`);
    // the legend's tick labels stay inside their drawing
    const legend = document.querySelector('.legend-scale svg') as SVGSVGElement | null;
    const lb = legend?.getBoundingClientRect();
    const ticks = [...document.querySelectorAll('.legend-tick')].filter((t) => {
      const b = t.getBoundingClientRect();
      return !lb || b.left < lb.left - 0.5 || b.right > lb.right + 0.5;
    }).map((t) => t.textContent);
    return { page: scroller.scrollHeight > innerHeight + 1 || scroller.scrollWidth > innerWidth + 1, overflowing, cut, ticks };
  });
  assert.equal(r.page, false, `the window does not scroll at ${size}`);
  assert.deepEqual(r.overflowing, [], `no panel scrolls at ${size}`);
  assert.deepEqual(r.cut, [], `nothing is cut short at ${size}`);
  assert.deepEqual(r.ticks, [], `the legend's ticks are whole at ${size}`);
}

/** The mean colour of a small square of a screenshot around (x, y) in CSS pixels. */
function pixel(png: PNG, x: number, y: number): [number, number, number] {
  const acc = [0, 0, 0];
  let n = 0;
  for (let dy = -1; dy <= 1; dy++) for (let dx = -1; dx <= 1; dx++) {
    const i = (png.width * Math.round(y + dy) + Math.round(x + dx)) << 2;
    acc[0] += png.data[i]; acc[1] += png.data[i + 1]; acc[2] += png.data[i + 2]; n++;
  }
  return acc.map((v) => v / n) as [number, number, number];
}

/** Relative luminance (ITU-R BT.709 weights on linearised sRGB, as WCAG 2 defines it; common practice). */
function luminance([r, g, b]: [number, number, number]): number {
  const lin = (c: number) => { const s = c / 255; return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4; };
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}

const isolatedOf = (r: ReturnType<typeof solveDrives>) => r.solutions.filter((s) => s.localDof === 0);

export const workflowTests: E2ETest[] = [
  {
    name: 'layout: set two drives, read every hinge, run the path and export at 1280 × 800 without scrolling; also 1480 × 920 and 1920 × 1080',
    timeoutMs: 200_000,
    async run(h) {
      await withSession(h, 'layout', { openSample: 'two-motor-rig.hingeplan.json', viewport: { width: 1280, height: 800 } }, async ({ page }) => {
        assert.match(await waitSolved(page), /Solved|Several/);
        await setDriveField(page, 'c0', 35);
        await setDriveField(page, 'c2', -25);
        await waitSolved(page);
        await computeAndWait(page, () => page.click('[data-testid=compute-path]'));
        for (const [w, hgt] of [[1280, 800], [1480, 920], [1920, 1080]] as const) {
          await page.setViewportSize({ width: w, height: hgt });
          await page.waitForTimeout(400);
          const size = `${w} × ${hgt}`;
          await assertVisible(page, '[data-testid=rate-chart]', `the rate chart at ${size}`);
          await assertVisible(page, '[data-testid=angle-chart]', `the angle chart at ${size}`);
          await assertVisible(page, '[data-testid=scrub]', `the scrub slider at ${size}`);
          await assertVisible(page, '.table .row.head .c-angle', `the angle column's header at ${size}`);
          const cells = await page.locator('[data-testid=angle-cell]').count();
          for (let i = 0; i < cells; i++) await assertVisible(page, `.table-body .row:nth-child(${i + 1}) [data-testid=angle-cell]`, `hinge ${i + 1}'s angle at ${size}`);
          await assertVisible(page, '[aria-label="angle of drive c0 in degrees"]', `drive c0's field at ${size}`);
          await assertVisible(page, '[aria-label="angle of drive c2 in degrees"]', `drive c2's field at ${size}`);
          await assertVisible(page, '[data-testid=compute-path]', `Compute path at ${size}`);
          await assertVisible(page, 'button[title^="Export tables"]', `Export at ${size}`);
          await assertFits(page, size);
          // the 3D view's axis triad and a scale bar in the document's unit
          assert.deepEqual(await page.$$eval('[data-testid=scene] .scene-overlay text', (ts) => ts.map((t) => t.textContent).slice(0, 3)), ['x', 'y', 'z']);
          assert.match((await page.textContent('[data-testid=scene] .scale-text')) ?? '', /^\d+(\.\d+)? mm$/);
          await screenshot(page, `layout-${w}x${hgt}`);
        }
        // opening the branches does not push the charts away: they are a tab of the same area
        const before = await page.locator('[data-testid=angle-chart]').boundingBox();
        await page.click('[data-testid=tab-branches]');
        await page.waitForSelector('[data-testid=branch-map]', { timeout: 60_000 });
        await screenshot(page, 'layout-1920x1080-branches');
        await page.click('[data-testid=tab-charts]');
        const after = await page.locator('[data-testid=angle-chart]').boundingBox();
        assert.deepEqual(after, before, 'the angle chart is where it was');
        await assertFits(page, '1920 × 1080 after the branches');
      });
    },
  },
  {
    name: 'the colour code parts mountain from valley in greyscale and under deuteranopia and tritanopia (Chromium’s emulation)',
    timeoutMs: 150_000,
    async run(h) {
      await withSession(h, 'colour', { viewport: { width: 1480, height: 920 } }, async ({ page }) => {
        await waitSolved(page, 90_000);
        await waitPath(page, 150_000);
        const cdp = await page.context().newCDPSession(page);
        const ramp = await page.locator('.legend-scale svg rect').first().boundingBox();
        assert.ok(ramp, 'the legend is drawn');
        const ends: Record<string, { m: [number, number, number]; v: [number, number, number]; f: [number, number, number] }> = {};
        for (const type of ['none', 'achromatopsia', 'deuteranopia', 'protanopia', 'tritanopia'] as const) {
          await cdp.send('Emulation.setEmulatedVisionDeficiency', { type });
          await page.waitForTimeout(200);
          const file = await screenshot(page, type === 'none' ? 'colour-normal' : `colour-${type}`);
          const png = PNG.sync.read(await fs.readFile(file));
          const y = ramp!.y + ramp!.height / 2;
          ends[type] = { m: pixel(png, ramp!.x + 3, y), v: pixel(png, ramp!.x + ramp!.width - 3, y), f: pixel(png, ramp!.x + ramp!.width / 2, y) };
        }
        await cdp.send('Emulation.setEmulatedVisionDeficiency', { type: 'none' });
        // greyscale: the valley end is clearly lighter than the mountain end, and flat lies between
        const g = ends.achromatopsia;
        const [lm, lf, lv] = [luminance(g.m), luminance(g.f), luminance(g.v)];
        assert.ok(lv > lf && lf > lm, `greyscale lightness grows mountain → flat → valley (${lm.toFixed(3)}, ${lf.toFixed(3)}, ${lv.toFixed(3)})`);
        // WCAG 2 contrast ratio (L1 + 0.05) / (L2 + 0.05) between the two ends
        assert.ok((lv + 0.05) / (lm + 0.05) >= 4, `mountain and valley contrast in greyscale: ${((lv + 0.05) / (lm + 0.05)).toFixed(2)}`);
        for (const type of ['deuteranopia', 'protanopia', 'tritanopia'] as const) {
          const e = ends[type];
          const dist = Math.hypot(e.m[0] - e.v[0], e.m[1] - e.v[1], e.m[2] - e.v[2]);
          assert.ok(dist > 120, `${type}: the ends of the scale stay apart (RGB distance ${dist.toFixed(0)})`);
        }
      });
    },
  },
  {
    name: 'documents whose path used to have no samples get one, and a forced failure shows the solver’s reason with fixes that work',
    timeoutMs: 240_000,
    async run(h) {
      await withSession(h, 'zero-samples', { openSample: 'gripper-cell.hingeplan.json', viewport: { width: 1480, height: 920 } }, async ({ page, host }) => {
        // 1. the gripper cell with d1 and d2 held: the path of d0 starts from the solution on screen
        const gripper = loadSample('gripper-cell.hingeplan.json');
        await waitSolved(page);
        let shown = await computeAndWait(page, () => page.click('[data-testid=compute-path]'));
        assert.match(shown.summary, /(\d+) samples/);
        assert.ok(Number(/(\d+) samples/.exec(shown.summary)![1]) > 10, shown.summary);
        assert.match(shown.summary, /from solution #1/);
        // the old default (from the drives' values at the first sample) fails: the window gives the solver's reason
        const d0 = gripper.pattern.labelIndex.get('d0')!;
        const holds = resolveDrives(gripper.pattern, gripper.project.drives.filter((d) => d.crease !== 'd0')).drives;
        const ref = sweep(gripper.pattern, { drive: d0, from: 0, to: Math.PI, step: RAD, holds });
        assert.equal(ref.status, 'failed', 'the solver itself finds no start there');
        await page.getByLabel('path start').selectOption('flat:');
        shown = await computeAndWait(page, () => page.click('[data-testid=compute-path]'));
        const reason = (await page.textContent('[data-testid=path-reason]')) ?? '';
        assert.ok(reason.includes(ref.messages.find((m) => m.severity === 'error')!.text), `the reason is the solver's: ${reason}`);
        await screenshot(page, 'zero-samples-gripper-reason');
        shown = await computeAndWait(page, () => page.click('[data-testid=fix-from-solution]'));
        assert.match(shown.summary, /\d+ samples.*from solution #1/);

        // 2. a generated Miura sheet: the dialog's drive of 60° folds the mountain zigzag to −60°, and the
        // range follows it (0° to −180°)
        await newFromGenerator(page, host, 'Miura-ori sheet', { 'rows of cells': '3', 'columns of cells': '3' });
        await waitSolved(page);
        shown = await waitPath(page);
        // the New dialog's unit of length (mm by default) is the document's
        assert.match((await page.textContent('[data-testid=doc-title]')) ?? '', /, mm/);
        const drive = await page.getAttribute('[data-testid=drive-row]', 'data-crease');
        assert.equal(Number(await page.getByLabel(`angle of drive ${drive} in degrees`).inputValue()), -60);
        assert.equal(await page.getByLabel('path to, degrees').inputValue(), '-180');
        assert.ok(Number(/(\d+) samples/.exec(shown.summary)?.[1]) > 100, `the generated Miura has a path: ${shown.summary}`);
        // 0° → +180° from flat by the assignment is what gave "0 samples": now the reason and the fixes
        const m = miura({ rows: 3, cols: 3, a: 40, b: 30, alphaDeg: 70, driveDeg: 60 });
        const mp = buildPattern(m.project!.source).pattern!;
        const mref = sweep(mp, { drive: mp.labelIndex.get(drive!)!, from: 0, to: Math.PI, step: RAD });
        assert.equal(mref.status, 'failed');
        await page.getByLabel('path start').selectOption('flat:');
        await page.getByLabel('path to, degrees').fill('180');
        shown = await computeAndWait(page, () => page.click('[data-testid=compute-path]'));
        assert.match(shown.outcome, /No path/);
        assert.ok(((await page.textContent('[data-testid=path-reason]')) ?? '').includes(mref.messages.find((x) => x.severity === 'error')!.text));
        assert.equal(await page.locator('[data-testid=fix-flip]').count(), 1);
        assert.equal(await page.locator('[data-testid=fix-from-solution]').count(), 1);
        assert.equal(await page.locator('[data-testid=fix-branches]').count(), 1);
        await screenshot(page, 'zero-samples-miura-reason');
        shown = await computeAndWait(page, () => page.click('[data-testid=fix-flip]'));
        assert.equal(await page.getByLabel('path to, degrees').inputValue(), '-180');
        assert.ok(Number(/(\d+) samples/.exec(shown.summary)?.[1]) > 100, `flipped: ${shown.summary}`);
        // picking a branch: the branches tab lists them and one click follows it
        await page.getByLabel('path to, degrees').fill('180');
        shown = await computeAndWait(page, () => page.click('[data-testid=compute-path]'));
        await page.click('[data-testid=fix-branches]');
        await page.waitForSelector('[data-testid=branch-map]', { timeout: 60_000 });
        const rays = flatBranches(mp, { drive: mp.labelIndex.get(drive!)!, held: [] }).branches.filter((b) => b.tangent[mp.labelIndex.get(drive!)!] > 1e-9);
        shown = await computeAndWait(page, () => page.click(`[data-testid=branch-map] button:has-text("${rays[0].name}")`));
        assert.ok(Number(/(\d+) samples/.exec(shown.summary)?.[1]) > 10, `along ${rays[0].name}: ${shown.summary}`);
        assert.match(shown.summary, new RegExp(`along ${rays[0].name.replace(/[+]/g, '\\+')}`));

        // 3. a generated waterbomb base with d1 and d2 held
        await newFromGenerator(page, host, 'waterbomb base', {});
        await waitSolved(page);
        const wb = waterbomb({}).project!;
        // the midline halves are x0, x1, y0, y1: no label that reads as mountain on a crease held flat
        const labels = await page.$$eval('[data-testid=hinge-table] .row', (els) => els.map((e) => e.getAttribute('data-label')));
        assert.deepEqual(labels.filter((l) => /^[xy]/.test(l!)).sort(), ['x0', 'x1', 'y0', 'y1']);
        const wp = buildPattern(wb.source).pattern!;
        const wref = referenceSolve(wp, wb.drives);
        shown = await computeAndWait(page, () => page.click('[data-testid=compute-path]'));
        assert.ok(Number(/(\d+) samples/.exec(shown.summary)?.[1]) > 10, `the waterbomb has a path: ${shown.summary}`);
        // the path passes through the solution on screen at d0 = 60°
        const k = await page.evaluate(() => (window as unknown as { __hingeplan: { state: { selectedSolution: number } } }).__hingeplan.state.selectedSolution);
        const sample = await page.evaluate(() => {
          const s = (window as unknown as { __hingeplan: { state: { path: { result: { samples: { driveDeg: number; anglesDeg: number[] }[] } } } } }).__hingeplan.state.path.result.samples;
          return s.find((x) => Math.abs(x.driveDeg - 60) < 1e-9)?.anglesDeg;
        });
        assert.ok(sample, 'the path has a sample at 60°');
        for (let c = 0; c < wp.creases.length; c++) assert.ok(Math.abs(sample![c] - wref.solutions[k].angles[c] * DEG) < 1e-6, `crease ${wp.creases[c].label} at 60° is the solution's`);
        await screenshot(page, 'zero-samples-waterbomb');
      });
    },
  },
  {
    name: 'a path from a chosen non-first solution follows that solution and names its branch; switching back switches both',
    timeoutMs: 150_000,
    async run(h) {
      const { pattern } = loadSample('hinge-coupon.hingeplan.json');
      await withSession(h, 'path-solution-2', { openSample: 'hinge-coupon.hingeplan.json' }, async ({ page }) => {
        await waitSolved(page);
        await waitPath(page);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 45 }]);
        assert.ok(reference.solutions.length >= 2);
        // which branch from flat passes through each solution: follow every ray to 45° in Node
        const c0 = pattern.labelIndex.get('c0')!;
        const rays = flatBranches(pattern, { drive: c0, held: [] }).branches.filter((b) => b.tangent[c0] > 1e-9);
        const branchOf = (sol: Float64Array) =>
          rays.find((b) => {
            const s = sweep(pattern, { drive: c0, from: 0, to: 45 * RAD, samples: [0, 15 * RAD, 30 * RAD, 45 * RAD], branch: b.id });
            const at = s.samples.find((x) => Math.abs(x.drive - 45 * RAD) < 1e-12);
            return at && [...at.angles].every((a, c) => Math.abs(a - sol[c]) < 1e-7);
          })?.name;
        const names = reference.solutions.map((s) => branchOf(s.angles));
        assert.ok(names[0] && names[1] && names[0] !== names[1], `the two solutions lie on two branches (${names.join(', ')})`);
        const filter = page.getByLabel(/only the \d+ that follow/);
        if (await filter.count()) await filter.uncheck();
        let shown = await waitPath(page);
        assert.match(shown.summary, new RegExp(`from solution #1 .*on branch ${names[0]!.replace('+', '\\+')}`));
        shown = await computeAndWait(page, () => page.click('[data-testid=solution-card][data-index="1"]'));
        assert.match(shown.summary, new RegExp(`from solution #2 \\(differs from M/V\\), on branch ${names[1]!.replace('+', '\\+')}`));
        assert.match((await page.textContent('[data-testid=path-start]')) ?? '', /solution #2/);
        // scrub to the sample at 45°: the hinge table shows solution 2's angles
        // (the marker starts at the drive's own value, 45°: move away and back so the slider changes)
        for (const v of ['44', '45']) {
          await page.evaluate((value) => {
            const el = document.querySelector('[data-testid=scrub]') as HTMLInputElement;
            Object.getOwnPropertyDescriptor(HTMLInputElement.prototype, 'value')!.set!.call(el, value);
            el.dispatchEvent(new Event('input', { bubbles: true }));
          }, v);
        }
        await page.waitForSelector('[data-testid=shape-caption]:has-text("path sample 46")');
        await assertTableMatches(page, pattern, reference.solutions[1].angles, 'path sample at 45° from solution 2');
        // hovering a curve reads out its crease, angle and rate at that drive value
        const at = await page.evaluate(() => {
          const curve = document.querySelector('[data-testid=angle-chart] path.curve') as SVGPathElement;
          const p = curve.getPointAtLength(curve.getTotalLength() * 0.6);
          const q = new DOMPoint(p.x, p.y).matrixTransform(curve.getScreenCTM()!);
          return { x: q.x, y: q.y };
        });
        await page.mouse.move(at.x, at.y);
        const readout = (await page.locator('[data-testid=chart-readout]').textContent({ timeout: 5000 })) ?? '';
        assert.match(readout, /^\S+.* · -?\d+\.\d\d° · rate -?\d+\.\d{3} °\/° at c0 = \d+\.\d\d°$/);
        await screenshot(page, 'path-solution-2');
        shown = await computeAndWait(page, () => page.click('[data-testid=solution-card][data-index="0"]'));
        assert.match(shown.summary, new RegExp(`from solution #1 .*on branch ${names[0]!.replace('+', '\\+')}`));
      });
    },
  },
  {
    name: 'a drive past its hinge stop keeps the last valid state on screen with the violation marked; a passive hinge past a stop is drawn in the past-limit colour',
    timeoutMs: 120_000,
    async run(h) {
      const { pattern } = loadSample('hinge-coupon.hingeplan.json');
      await withSession(h, 'past-stop', { openSample: 'hinge-coupon.hingeplan.json' }, async ({ page }) => {
        await waitSolved(page);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 45 }]);
        const k = await page.evaluate(() => (window as unknown as { __hingeplan: { state: { selectedSolution: number } } }).__hingeplan.state.selectedSolution);
        // the slider shows c0's stops (0° … 170°): one zone past the upper stop (the lower is at 0°, so two)
        assert.ok((await page.locator('[data-crease=c0] [data-testid=slider-stop-zone]').count()) >= 1);
        await setDriveField(page, 'c0', 175);
        await page.waitForSelector('[data-testid=solve-status]:has-text("Past a hinge stop")');
        // the solver refuses the drive, naming its stops
        assert.equal(resolveDrives(pattern, [{ crease: 'c0', angleDeg: 175 }]).messages[0].code, 'drive-outside-limit');
        assert.match((await page.textContent('[data-crease=c0] [data-testid=drive-stops]')) ?? '', /past its stop/);
        assert.match((await page.textContent('[data-testid=shape-caption]')) ?? '', /last solved state \(a drive is now past its stop\)/);
        await assertTableMatches(page, pattern, reference.solutions[k].angles, 'the last valid state');
        assert.equal(await page.textContent('[data-testid=sheet-dof]'), '1');
        await screenshot(page, 'past-stop-drive');
        // back within the stops, then a stop on c1 that the solutions cross
        await setDriveField(page, 'c0', 45);
        await page.waitForFunction(() => !document.querySelector('[data-testid=solve-status]')?.textContent?.includes('Past a hinge stop'));
        await waitSolved(page);
        const lower = page.getByLabel('lower limit of crease c1');
        await lower.click();
        await lower.fill('-5');
        await lower.press('Enter');
        await page.waitForSelector('[data-testid=past-limit-panels]');
        const limited = JSON.parse(readFileSync(path.join(SAMPLES, 'hinge-coupon.hingeplan.json'), 'utf8'));
        limited.creases[pattern.labelIndex.get('c1')!].limits = { min: -5 };
        const lp = loadPatternText(JSON.stringify(limited), 'x.hingeplan.json').pattern!;
        const lref = referenceSolve(lp, [{ crease: 'c0', angleDeg: 45 }]);
        await waitSolved(page);
        const status = (await page.textContent('[data-testid=solve-status]')) ?? '';
        assert.match(status, new RegExp(lref.status === 'unreachable' ? 'Unreachable' : 'Solved|Several'), `status as the solver says (${lref.status}): ${status}`);
        assert.equal(await page.locator('.table-body .row[data-label=c1].is-violating').count(), 1, 'c1 is marked past its stop in the table');
        assert.match((await page.textContent('[data-testid=key-past-limit]')) ?? '', /panels/);
        await screenshot(page, 'past-stop-passive');
      });
    },
  },
  {
    name: 'an underspecified drive set shows its families (or its states on continua), not N solution cards; a suggested drive is set at full precision',
    timeoutMs: 120_000,
    async run(h) {
      const { pattern } = loadSample('two-motor-rig.hingeplan.json');
      await withSession(h, 'underspecified', { openSample: 'two-motor-rig.hingeplan.json' }, async ({ page }) => {
        await waitSolved(page);
        await page.click('[aria-label="remove drive c2"]');
        await page.waitForSelector('[data-testid=solve-status]:has-text("Underspecified")');
        await waitSolved(page);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 40 }]);
        assert.equal(reference.status, 'underspecified');
        assert.equal(await page.locator('[data-testid=solution-card]').count(), isolatedOf(reference).length, 'one card per isolated solution');
        assert.equal(await page.locator('[data-testid=family-card]').count(), reference.families.length, 'one card per family');
        const loose = reference.solutions.length - isolatedOf(reference).length;
        if (loose) assert.match((await page.textContent('[data-testid=loose-states]')) ?? '', new RegExp(`${loose} states lie on continua`));
        assert.match((await page.textContent('[data-testid=search-summary]')) ?? '', reference.search.complete ? /complete list/ : /not proven complete|stopped at/);
        await screenshot(page, 'underspecified');
        // drive the suggested crease where it is on screen: the state stays closed (not inconsistent)
        const suggested = reference.suggestedDrives!.map((c) => pattern.creases[c].label)[0];
        const before = await page.evaluate((label) => {
          const c = (window as unknown as { __hingeplan: { shownAngles(): number[] | null; driveIndex(l: string): number | undefined } }).__hingeplan;
          return c.shownAngles()?.[Number(document.querySelector(`.table-body .row[data-label="${label}"]`)?.getAttribute('data-crease'))];
        }, suggested);
        await page.locator(`button:has-text("Drive ${suggested}"), button:has-text("drive ${suggested}")`).first().click();
        await page.waitForSelector(`[data-testid=drive-row][data-crease="${suggested}"]`);
        const stored = await page.evaluate((label) => (window as unknown as { __hingeplan: { state: { doc: { history: { present: { drives: { crease: string; angleDeg: number }[] } } } } } }).__hingeplan.state.doc.history.present.drives.find((d) => d.crease === label)?.angleDeg, suggested);
        assert.equal(stored, before, `the drive keeps the shown angle to full precision (${before})`);
        assert.notEqual(Math.round(stored! * 100) / 100, stored, 'the angle has more than two decimals');
        const status = await waitSolved(page);
        assert.doesNotMatch(status, /Inconsistent|Unreachable/);
      });
    },
  },
  {
    name: 'the path charts export as SVG and PNG, each with the cautions line',
    timeoutMs: 120_000,
    async run(h) {
      await withSession(h, 'chart-export', { openSample: 'hinge-coupon.hingeplan.json' }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        await waitPath(page);
        const svgFile = path.join(tmp, 'charts.svg');
        host.saveAnswers.push(svgFile);
        await page.click('.chart-export button:has-text("SVG")');
        await page.waitForSelector('[data-testid=notice-info]:has-text("charts.svg")', { timeout: 30_000 });
        const svg = await fs.readFile(svgFile, 'utf8');
        assert.match(svg, /^<\?xml/);
        assert.ok(svg.includes(`<desc>${CAUTIONS}</desc>`), 'the SVG carries the cautions line');
        assert.ok((svg.match(/class="curve"/g) ?? []).length >= 2, 'both charts drew their curves');
        // well-formed XML: the page's own parser reads it back without an error
        const parsed = await page.evaluate((text) => new DOMParser().parseFromString(text, 'image/svg+xml').getElementsByTagName('parsererror').length, svg);
        assert.equal(parsed, 0);
        const pngFile = path.join(tmp, 'charts.png');
        host.saveAnswers.push(pngFile);
        await page.click('.chart-export button:has-text("PNG")');
        await page.waitForSelector('[data-testid=notice-info]:has-text("charts.png")', { timeout: 30_000 });
        const png = PNG.sync.read(await fs.readFile(pngFile));
        const width = Number(/width="(\d+)"/.exec(svg)![1]);
        assert.equal(png.width, 2 * width, 'the picture is drawn at twice the screen size');
      });
    },
  },
];

workflowTests.push({
  name: 'a panel is named beside a crease, held as the base panel by its name, and saved with the project',
  timeoutMs: 90_000,
  async run(h) {
    const { pattern } = loadSample('hinge-coupon.hingeplan.json');
    await withSession(h, 'panel-names', { openSample: 'hinge-coupon.hingeplan.json' }, async ({ page, host, tmp }) => {
      await waitSolved(page);
      await page.click('.table-body .row[data-label=c1]');
      const c1 = pattern.creases[pattern.labelIndex.get('c1')!];
      const other = [c1.leftPanel, c1.rightPanel].find((p) => p >= 0 && p !== pattern.basePanel)!;
      const field = page.getByLabel(`name of panel ${other}`);
      await field.click();
      await field.fill('mirror plate');
      await field.press('Enter');
      await page.click('button:has-text("Hold mirror plate")');
      await page.waitForSelector('[data-testid=key-base]:has-text("mirror plate")');
      const target = path.join(tmp, 'named.hingeplan.json');
      host.saveAnswers.push(target);
      await page.click('button:has-text("Save as…")');
      await page.waitForFunction(() => !document.querySelector('[data-testid=doc-title]')?.textContent?.includes('edited'));
      const saved = loadPatternText(await fs.readFile(target, 'utf8'), 'named.hingeplan.json');
      assert.equal(saved.project!.source.basePanel, other);
      assert.equal(saved.pattern!.panels[other].name, 'mirror plate');
      await screenshot(page, 'panel-names');
    });
  },
});

workflowTests.push({
  name: 'a crease made a drive keeps its full angle: an overspecified but consistent set is a note naming the implied drive; an inconsistent one shows the compromise and its gap in the document’s unit',
  timeoutMs: 90_000,
  async run(h) {
    const { pattern } = loadSample('hinge-coupon.hingeplan.json');
    await withSession(h, 'overspecified', { openSample: 'hinge-coupon.hingeplan.json' }, async ({ page }) => {
      await waitSolved(page);
      await page.click('.table-body .row[data-label=c1]');
      await page.click('[data-testid=toggle-drive]');
      await page.waitForSelector('[data-testid=drive-row][data-crease=c1]');
      const status = await waitSolved(page);
      const shownC1 = await page.evaluate(() => (window as unknown as { __hingeplan: { state: { doc: { history: { present: { drives: { crease: string; angleDeg: number }[] } } } } } }).__hingeplan.state.doc.history.present.drives.find((d) => d.crease === 'c1')!.angleDeg);
      const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 45 }, { crease: 'c1', angleDeg: shownC1 }]);
      assert.equal(reference.status, 'overspecified', 'the solver finds the two drives consistent');
      assert.match(status, /Overspecified, consistent/);
      assert.equal(await page.locator('[data-testid=solve-status].status-note').count(), 1, 'drawn as a note, not as an error');
      // the drive the solver finds implied, or either of the two when it names both
      const implied = reference.conflictingDrives!.map((c) => pattern.creases[c].label);
      assert.match(status, implied.length === 1 ? new RegExp(`${implied[0]} follows from`) : /One of c0, c1 follows from the other/);
      await screenshot(page, 'overspecified');
      // a value that contradicts the other drive: the least-squares compromise, its gap with the unit
      await setDriveField(page, 'c1', -30);
      await page.waitForSelector('[data-testid=solve-status]:has-text("Inconsistent")');
      const bad = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 45 }, { crease: 'c1', angleDeg: -30 }]);
      assert.equal(bad.status, 'inconsistent');
      assert.match((await page.textContent('[data-testid=shape-caption]')) ?? '', /closest compromise/);
      // the gap is the largest distance between two placements of one vertex of the compromise's shape
      const gap = foldedShape(pattern, bad.compromise!.angles, pattern.basePanel).maxMismatch;
      assert.equal(await page.textContent('[data-testid=mismatch]'), `closure gap ${gap.toPrecision(2)} mm`);
      await screenshot(page, 'inconsistent');
    });
  },
});
