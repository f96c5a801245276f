// End-to-end tests: the shipped renderer in Chromium, the real handlers and solver worker behind it.
// Each test checks what a person sees against the solver run directly in Node, and saves a screenshot.
import assert from 'node:assert/strict';
import { promises as fs, readFileSync } from 'node:fs';
import path from 'node:path';
import Papa from 'papaparse';
import { createHash } from 'node:crypto';
import type { Page } from 'playwright-core';
import { CAUTIONS, loadPatternText, solveDrives, resolveDrives, type Pattern } from '../../solver';
import { assertTableMatches, screenshot, SAMPLES, waitSolved, withSession, type Harness } from './harness';
import { metadata } from '../support/table-header';

export interface E2ETest {
  name: string;
  timeoutMs?: number;
  run(h: Harness): Promise<void>;
}

const DEG = 180 / Math.PI;
const COUPON_FILE = 'hinge-coupon.hingeplan.json';
const COUPON = path.join(SAMPLES, COUPON_FILE);

function loadSample(file: string) {
  const loaded = loadPatternText(readFileSync(file, 'utf8'), path.basename(file));
  assert.ok(loaded.pattern && loaded.project, `${file} loads`);
  return { pattern: loaded.pattern, project: loaded.project, drives: loaded.drives! };
}

function referenceSolve(pattern: Pattern, drives: { crease: string; angleDeg: number }[]) {
  const resolved = resolveDrives(pattern, drives);
  return solveDrives(pattern, resolved.drives);
}

async function currentCardIndex(page: Page): Promise<number> {
  const idx = await page.getAttribute('[data-testid=solution-card][aria-selected=true]', 'data-index');
  assert.ok(idx !== null, 'a solution card is current');
  return Number(idx);
}

/** Click the middle of a crease on the flat sheet (sheet coordinates → screen through the SVG's own matrix). */
async function clickCrease(page: Page, pattern: Pattern, index: number) {
  const c = pattern.creases[index];
  const [a, b] = c.vertices.map((v) => pattern.vertices[v]);
  const point = await page.evaluate(([x, y]) => {
    const g = document.querySelector('[data-testid=sheet] g.sheet-flip') as SVGGElement;
    const p = new DOMPoint(x, y).matrixTransform(g.getScreenCTM()!);
    return { x: p.x, y: p.y };
  }, [(a[0] + b[0]) / 2, (a[1] + b[1]) / 2]);
  await page.mouse.move(point.x, point.y);
  await page.mouse.down();
  await page.mouse.up();
}

async function setDriveField(page: Page, label: string, value: number) {
  const field = page.getByLabel(`angle of drive ${label} in degrees`);
  await field.click();
  await field.fill(String(value));
  await field.press('Enter');
}

export const e2eTests: E2ETest[] = [
  {
    name: 'opens the built-in sunshade sample with its drive set and a path computed',
    timeoutMs: 180_000,
    async run(h) {
      await withSession(h, 'startup-sunshade', {}, async ({ page }) => {
        await page.waitForSelector('[data-testid=doc-title]:has-text("sunshade-panel.hingeplan.json")', { timeout: 30_000 });
        const row = page.locator('[data-testid=drive-row][data-crease=z6_4]');
        assert.equal(await row.getByLabel('angle of drive z6_4 in degrees').inputValue(), '60');
        const status = await waitSolved(page, 90_000);
        assert.match(status, /Solved|Several solutions/);
        // the card on screen follows the mountain/valley assignment of the sample
        const current = page.locator('[data-testid=solution-card][aria-selected=true]');
        assert.match((await current.textContent()) ?? '', /follows M\/V/);
        await page.waitForSelector('[data-testid=path-summary]', { timeout: 150_000 });
        assert.match((await page.textContent('[data-testid=path-summary]')) ?? '', /\d+ samples/);
        await screenshot(page, 'startup-sunshade');
      });
    },
  },
  {
    name: 'a drive typed in shows the solver’s angles in the table and the crease inspector',
    async run(h) {
      const { pattern } = loadSample(COUPON);
      await withSession(h, 'set-drive', { openSample: COUPON_FILE }, async ({ page }) => {
        await waitSolved(page);
        await setDriveField(page, 'c0', 30);
        await page.waitForFunction(() => document.querySelector('[data-testid=hinge-table] .row[data-label=c0] [data-testid=angle-cell]')?.textContent === '30.00°');
        await waitSolved(page);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 30 }]);
        const idx = await currentCardIndex(page);
        await assertTableMatches(page, pattern, reference.solutions[idx].angles, `solution ${idx + 1}`);
        // the inspector of a crease clicked on the sheet shows the same angle, to three decimals
        const c1 = pattern.labelIndex.get('c1')!;
        await clickCrease(page, pattern, c1);
        await page.waitForSelector('[data-testid=inspector]:has-text("c1")');
        const text = (await page.textContent('[data-testid=inspector-angle]'))!;
        assert.ok(Math.abs(Number(text.replace('°', '')) - reference.solutions[idx].angles[c1] * DEG) <= 0.0006, `inspector shows ${text}`);
        await page.mouse.move(10, 10);
        await screenshot(page, 'set-drive');
      });
    },
  },
  {
    name: 'choosing another solution card shows that solution',
    async run(h) {
      const { pattern } = loadSample(COUPON);
      await withSession(h, 'switch-solution', { openSample: COUPON_FILE }, async ({ page }) => {
        await waitSolved(page);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 45 }]);
        assert.ok(reference.solutions.length >= 2, 'the coupon has more than one solution at 45°');
        const filter = page.getByLabel(/only the \d+ that follow/);
        if (await filter.count()) await filter.uncheck();
        const cards = page.locator('[data-testid=solution-card]');
        assert.equal(await cards.count(), reference.solutions.length);
        const before = await currentCardIndex(page);
        const other = (before + 1) % reference.solutions.length;
        await page.click(`[data-testid=solution-card][data-index="${other}"]`);
        assert.equal(await currentCardIndex(page), other);
        await assertTableMatches(page, pattern, reference.solutions[other].angles, `solution ${other + 1}`);
        assert.match((await page.textContent('[data-testid=shape-caption]')) ?? '', new RegExp(`solution ${other + 1} of ${reference.solutions.length}`));
        await screenshot(page, 'switch-solution');
      });
    },
  },
  {
    name: 'a long sweep shows progress and can be cancelled; a short one completes',
    timeoutMs: 240_000,
    async run(h) {
      await withSession(h, 'sweep-cancel', { openSample: COUPON_FILE }, async ({ page, host }) => {
        await waitSolved(page);
        // a new Miura-ori sheet of 20 × 20 cells from the generator dialog
        await page.click('button:has-text("New…")');
        const dialog = page.getByRole('dialog');
        await dialog.getByLabel('rows of cells').fill('20');
        await dialog.getByLabel('columns of cells').fill('20');
        host.confirmAnswers.push('discard');
        await dialog.getByRole('button', { name: 'Create' }).click();
        await page.waitForSelector('[data-testid=doc-title]:has-text("miura")', { timeout: 30_000 });
        await waitSolved(page, 90_000);
        // the generator's document has one drive, so its path starts at once; stop it, ask for a finer one
        if (await page.locator('[data-testid=cancel-path]').count()) await page.click('[data-testid=cancel-path]');
        await page.getByLabel('path step, degrees').fill('0.1');
        const events0 = host.progressEvents;
        await page.click('[data-testid=compute-path]');
        await page.waitForFunction(() => {
          const p = document.querySelector('[data-testid=path-progress]');
          return p && Number(p.getAttribute('aria-valuenow')) > 0;
        }, null, { timeout: 90_000 });
        assert.ok(host.progressEvents > events0, 'progress events reached the page');
        await screenshot(page, 'sweep-progress');
        await page.click('[data-testid=cancel-path]');
        await page.waitForSelector('[data-testid=path-cancelled]');
        assert.equal(await page.locator('[data-testid=path-progress]').count(), 0);
        await screenshot(page, 'sweep-cancelled');
        // a coarse path of the same sheet runs to the end
        await page.getByLabel('path step, degrees').fill('10');
        await page.click('[data-testid=compute-path]');
        await page.waitForSelector('[data-testid=path-summary]', { timeout: 120_000 });
        assert.match((await page.textContent('[data-testid=path-summary]')) ?? '', /\d+ samples/);
      });
    },
  },
  {
    name: 'the angle table exports with the cautions line and parses back to the path’s angles',
    timeoutMs: 150_000,
    async run(h) {
      const { pattern } = loadSample(COUPON);
      await withSession(h, 'export-table', { openSample: COUPON_FILE }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        await page.getByLabel('path from, degrees').fill('0');
        await page.getByLabel('path to, degrees').fill('160');
        await page.getByLabel('path step, degrees').fill('10');
        await page.click('[data-testid=compute-path]');
        // the path asked for (not the one computed at opening): its samples run to 160°
        await page.waitForSelector('[data-testid=path-summary]:has-text("to 160.0°")', { timeout: 60_000 });
        await page.click('button:has-text("Export…")');
        const dialog = page.getByRole('dialog');
        await dialog.getByLabel('Angle table of the computed path').check();
        await dialog.getByLabel('table format').selectOption('csv');
        await dialog.getByLabel('rate columns (° per ° of drive)').check();
        const target = path.join(tmp, 'coupon.angles.csv');
        host.saveAnswers.push(target);
        await screenshot(page, 'export-dialog');
        await dialog.getByTestId('export-go').click();
        await page.waitForSelector('[data-testid=notice-info]:has-text("Exported")', { timeout: 30_000 });
        assert.match(host.saveRequests.at(-1)!.defaultName, /hinge-coupon\.angles\.csv$/);
        const text = await fs.readFile(target, 'utf8');
        assert.ok(text.includes(CAUTIONS), 'the table carries the cautions line');
        // the header of `hingeplan table`: "# key: value" lines before the column row
        const meta = metadata(text);
        assert.equal(meta.get('format'), 'hingeplan-angle-table');
        assert.equal(meta.get('cautions'), CAUTIONS);
        assert.equal(meta.get('file'), COUPON_FILE);
        // Node's SHA-256 (OpenSSL) of the file the app opened
        assert.equal(meta.get('fileSha256'), createHash('sha256').update(readFileSync(path.join(tmp, COUPON_FILE))).digest('hex'));
        // the path started from solution 1 on screen, which lies on branch 1 (A+) from flat: `--branch 1` repeats it
        assert.equal(meta.get('command'), `hingeplan table ${COUPON_FILE} --drive c0 --from 0 --to 160 --step 10 --branch 1 --format csv --rates`);
        const body = text.split('\n').filter((l) => l && !l.startsWith('#')).join('\n');
        const parsed = Papa.parse<Record<string, string>>(body, { header: true, skipEmptyLines: true });
        assert.deepEqual(parsed.errors, []);
        assert.equal(parsed.data.length, 17);
        const cols = parsed.meta.fields!;
        assert.ok(cols.includes('rate:c1'), `rate columns (${cols.join(', ')})`);
        // each row's angles are a closed state of the coupon at that drive value: check against the solver
        for (const row of [parsed.data[3], parsed.data[Math.floor(parsed.data.length / 2)], parsed.data.at(-1)!]) {
          const drive = Number(row.drive);
          const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: drive }]);
          const matches = reference.solutions.some((s) => ['c1', 'c2', 'c3'].every((l) => Math.abs(Number(row[l]) - s.angles[pattern.labelIndex.get(l)!] * DEG) < 1e-7));
          assert.ok(matches, `the row at ${drive}° is one of the solver's states`);
        }
      });
    },
  },
  {
    name: 'a schedule exports from the dialog and its drive velocity follows the chosen S-curve',
    timeoutMs: 150_000,
    async run(h) {
      const { pattern } = loadSample(COUPON);
      await withSession(h, 'export-schedule', { openSample: COUPON_FILE }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        await page.getByLabel('path from, degrees').fill('0');
        await page.getByLabel('path to, degrees').fill('160');
        await page.getByLabel('path step, degrees').fill('20');
        await page.click('[data-testid=compute-path]');
        // the path asked for (not the one computed at opening): its samples run to 160°
        await page.waitForSelector('[data-testid=path-summary]:has-text("to 160.0°")', { timeout: 60_000 });
        await page.click('button:has-text("Export…")');
        const dialog = page.getByRole('dialog');
        await dialog.getByLabel('Deployment schedule of the computed path').check();
        await dialog.getByLabel('total time (s)').fill('8');
        await dialog.getByLabel('drive profile').selectOption('s-curve');
        await dialog.getByLabel('acceleration time (s)').fill('2');
        await dialog.getByLabel('jerk time (s)').fill('0.5');
        await dialog.getByRole('spinbutton', { name: /^rows/ }).fill('41');
        await dialog.getByLabel('hinge rate limit (°/s)').fill('40');
        // a limit of one hinge of its own, as the command line's --limit
        await dialog.getByLabel('crease of hinge limit 1').fill('c1');
        await dialog.getByLabel('rate limit 1 (°/s)').fill('30');
        const target = path.join(tmp, 'coupon.schedule.csv');
        host.saveAnswers.push(target);
        await screenshot(page, 'export-dialog-schedule');
        await dialog.getByTestId('export-go').click();
        await page.waitForSelector('[data-testid=notice-info]:has-text("Exported")', { timeout: 60_000 });
        assert.match(host.saveRequests.at(-1)!.defaultName, /hinge-coupon\.schedule\.csv$/);
        const text = await fs.readFile(target, 'utf8');
        const meta = metadata(text);
        assert.equal(meta.get('format'), 'hingeplan-deployment-schedule');
        assert.equal(meta.get('cautions'), CAUTIONS);
        assert.equal(meta.get('command'), `hingeplan schedule ${COUPON_FILE} --drive c0 --from 0 --to 160 --time 8 --profile s-curve --accel-time 2 --jerk-time 0.5 --rows 41 --max-rate 40 --limit c1=30 --branch 1 --format csv`);
        const body = text.split('\n').filter((l) => l && !l.startsWith('#')).join('\n');
        const parsed = Papa.parse<Record<string, string>>(body, { header: true, skipEmptyLines: true });
        assert.deepEqual(parsed.errors, []);
        assert.equal(parsed.data.length, 41);
        // jerk-limited S-curve (common practice for point-to-point motion): within the acceleration phase t_a
        // the acceleration ramps at jerk j for t_j, holds a_max, ramps down for t_j; the velocity gained is
        // a_max (t_a − t_j) = v_max, and v_max = Δ / (T − t_a). Δ = 160°, T = 8 s, t_a = 2 s, t_j = 0.5 s.
        const T = 8, ta = 2, tj = 0.5, vmax = 160 / (T - ta), amax = vmax / (ta - tj), j = amax / tj;
        const rise = (t: number) => (t <= tj ? (j * t * t) / 2 : t <= ta - tj ? (j * tj * tj) / 2 + amax * (t - tj) : vmax - (j * (ta - t) ** 2) / 2);
        const velocity = (t: number) => (t <= ta ? rise(t) : t >= T - ta ? rise(T - t) : vmax);
        for (const row of parsed.data) {
          const t = Number(row.t);
          assert.ok(Math.abs(Number(row.drive_velocity) - velocity(t)) < 1e-9, `drive velocity at ${t} s: ${row.drive_velocity}, the S-curve gives ${velocity(t)}`);
        }
        // the rows are solved at the profile's drive values, not taken from the 20° samples of the path
        const row = parsed.data[7];
        assert.ok(Number(row.drive) % 20 !== 0, `row at ${row.t} s is between samples (${row.drive}°)`);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: Number(row.drive) }]);
        assert.ok(reference.solutions.some((s) => ['c1', 'c2', 'c3'].every((l) => Math.abs(Number(row[l]) - s.angles[pattern.labelIndex.get(l)!] * DEG) < 1e-7)), `the row at ${row.drive}° is one of the solver's states`);
      });
    },
  },
  {
    name: 'requests too large to compute are refused with a message in the window, and the app stays up',
    timeoutMs: 150_000,
    async run(h) {
      await withSession(h, 'oversized-requests', { openSample: COUPON_FILE }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        // a path of 1.8 million samples: refused at once, naming the step to use
        await page.getByLabel('path from, degrees').fill('0');
        await page.getByLabel('path to, degrees').fill('180');
        await page.getByLabel('path step, degrees').fill('0.0001');
        await page.click('[data-testid=compute-path]');
        await page.getByText(/the window takes at most 8 million\. Use a step of at least/).waitFor({ timeout: 30_000 });
        // a path the window can take, then a schedule of it with a time step of a nanosecond
        await page.getByLabel('path step, degrees').fill('20');
        await page.click('[data-testid=compute-path]');
        await page.waitForSelector('[data-testid=path-summary]', { timeout: 60_000 });
        await page.click('button:has-text("Export…")');
        const dialog = page.getByRole('dialog');
        await dialog.getByLabel('Deployment schedule of the computed path').check();
        await dialog.getByLabel('total time (s)').fill('10');
        await dialog.getByLabel('rows by').selectOption('dt');
        await dialog.getByLabel('time step (s)').fill('0.000000001');
        const target = path.join(tmp, 'never.schedule.csv');
        host.saveAnswers.push(target);
        const started = Date.now();
        await dialog.getByTestId('export-go').click();
        const notice = page.locator('[data-testid=notice-error]').filter({ hasText: /a schedule takes at most 100,000/ });
        await notice.waitFor({ timeout: 30_000 });
        assert.ok(Date.now() - started < 15_000, 'refused in seconds');
        assert.match((await notice.textContent()) ?? '', /time step of 1e-9 s over 10 s gives/);
        await fs.access(target).then(() => assert.fail('no file is written'), () => undefined);
        await screenshot(page, 'oversized-requests');
        // the dialog stays open with what was asked; the app goes on: a drive typed in is solved
        await dialog.getByRole('button', { name: 'Cancel' }).click();
        await setDriveField(page, 'c0', 30);
        assert.match(await waitSolved(page), /Solved|Several/);
      });
    },
  },
  {
    name: 'a malformed file shows the readers’ message with where it is, and the app stays up',
    async run(h) {
      await withSession(h, 'malformed-file', { openSample: COUPON_FILE }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        const broken = path.join(tmp, 'broken.hingeplan.json');
        await fs.writeFile(broken, '{\n  "format": "hingeplan-project",\n  "version": 1,\n  "vertices": [[0, 0], [1, 0],\n');
        host.openAnswers.push(broken);
        await page.click('button:has-text("Open…")');
        const notice = page.locator('[data-testid=notice-error]');
        await notice.waitFor();
        const text = (await notice.textContent()) ?? '';
        assert.match(text, /broken\.hingeplan\.json could not be opened/);
        assert.match(text, /line \d+/);
        // the document that was open is still there and still solved
        assert.match((await page.textContent('[data-testid=doc-title]')) ?? '', /hinge-coupon/);
        assert.match(await waitSolved(page), /Solved|Several/);
        // a file that reads but names a vertex that does not exist
        const badRef = path.join(tmp, 'bad-crease.hingeplan.json');
        const sample = JSON.parse(readFileSync(COUPON, 'utf8'));
        sample.creases[2].vertices = [0, 99];
        await fs.writeFile(badRef, JSON.stringify(sample, null, 2));
        host.openAnswers.push(badRef);
        await page.click('button:has-text("Open…")');
        await page.waitForSelector('[data-testid=notice-error]:has-text("bad-crease.hingeplan.json")');
        const second = (await page.locator('[data-testid=notice-error]').last().textContent()) ?? '';
        assert.match(second, /creases\[2\]/);
        await screenshot(page, 'malformed-file');
      });
    },
  },
  {
    name: 'a drawing imports through the core readers: an SVG coupon shows its creases, panels and cleaning report, and exports as DXF',
    async run(h) {
      await withSession(h, 'import-drawing', { openSample: COUPON_FILE }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        const drawn = path.join(tmp, 'coupon-drawn.svg');
        await fs.copyFile(path.join(SAMPLES, '..', 'tests', 'fixtures', 'drawings', 'coupon.svg'), drawn);
        const expected = loadPatternText(readFileSync(drawn, 'utf8'), drawn).pattern!;
        host.openAnswers.push(drawn);
        await page.click('button:has-text("Import drawing…")');
        assert.equal(host.openRequests.at(-1)!.title, 'Import drawing (DXF or SVG)');
        await page.waitForSelector('[data-testid=doc-title]:has-text("coupon-drawn.svg")');
        const title = (await page.textContent('[data-testid=doc-title]')) ?? '';
        const creases = expected.creases.filter((c) => c.assignment !== 'B').length;
        assert.equal(creases, 4);
        assert.match(title, new RegExp(`${creases} creases, ${expected.panels.length} panels, mm`));
        const report = page.locator('[data-testid=notice-info]:has-text("how the drawing was read")');
        await report.waitFor();
        const text = (await report.textContent()) ?? '';
        assert.match(text, /Dropped 1 line drawn twice/);
        assert.match(text, /T-junctions/);
        await screenshot(page, 'import-drawing');
        // the flat pattern out as DXF, read back by the same core reader
        await page.click('button:has-text("Export…")');
        const dialog = page.getByRole('dialog');
        await dialog.getByLabel(/Flat pattern as DXF/).check();
        const target = path.join(tmp, 'coupon-flat.dxf');
        host.saveAnswers.push(target);
        await dialog.getByTestId('export-go').click();
        await page.waitForSelector('[data-testid=notice-info]:has-text("Exported")', { timeout: 30_000 });
        assert.match(host.saveRequests.at(-1)!.defaultName, /coupon-drawn\.dxf$/);
        const dxf = await fs.readFile(target, 'utf8');
        assert.ok(dxf.includes(CAUTIONS), 'the DXF carries the cautions line');
        const back = loadPatternText(dxf, target).pattern!;
        assert.equal(back.creases.filter((c) => c.assignment !== 'B').length, creases);
        assert.equal(back.panels.length, expected.panels.length);
      });
    },
  },
  {
    name: 'unsaved edits are kept: opening asks first, saving writes the file, undo and redo work from the keyboard',
    async run(h) {
      await withSession(h, 'unsaved-and-save', { openSample: COUPON_FILE }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        await setDriveField(page, 'c0', 20);
        await page.waitForSelector('[data-testid=doc-title]:has-text("edited")');
        host.confirmAnswers.push('cancel');
        await page.click('button:has-text("Open…")');
        await page.waitForTimeout(200);
        assert.equal(host.confirmRequests.length, 1);
        assert.equal(host.openRequests.length, 0, 'no file dialog after Cancel');
        assert.equal(await page.getByLabel('angle of drive c0 in degrees').inputValue(), '20');
        // undo and redo from the keyboard (focus outside the text fields)
        await page.click('.doc-title');
        await page.keyboard.press('Control+z');
        await page.waitForFunction(() => (document.querySelector('[aria-label="angle of drive c0 in degrees"]') as HTMLInputElement).value === '45');
        await page.keyboard.press('Control+Shift+z');
        await page.waitForFunction(() => (document.querySelector('[aria-label="angle of drive c0 in degrees"]') as HTMLInputElement).value === '20');
        // Save as… asks where; the copy opened at startup stays as it was
        const target = path.join(tmp, 'coupon-20.hingeplan.json');
        host.saveAnswers.push(target);
        await page.keyboard.press('Control+Shift+s');
        await page.waitForFunction(() => !document.querySelector('[data-testid=doc-title]')?.textContent?.includes('edited'));
        const saved = loadPatternText(await fs.readFile(target, 'utf8'), 'coupon-20.hingeplan.json');
        assert.equal(saved.project!.drives[0].angleDeg, 20);
        assert.equal(host.states.at(-1)!.dirty, false);
        const left = (await fs.readdir(tmp)).filter((n) => n.endsWith('.tmp'));
        assert.deepEqual(left, [], 'no temporary file is left next to the saved one');
        assert.equal(loadPatternText(await fs.readFile(path.join(tmp, COUPON_FILE), 'utf8'), COUPON_FILE).project!.drives[0].angleDeg, 45);
        // a plain Save now writes to the chosen file without asking
        await setDriveField(page, 'c0', 25);
        await page.waitForSelector('[data-testid=doc-title]:has-text("edited")');
        const asked = host.saveRequests.length;
        await page.click('.doc-title');
        await page.keyboard.press('Control+s');
        await page.waitForFunction(() => !document.querySelector('[data-testid=doc-title]')?.textContent?.includes('edited'));
        assert.equal(host.saveRequests.length, asked);
        assert.equal(loadPatternText(await fs.readFile(target, 'utf8'), 'x.hingeplan.json').project!.drives[0].angleDeg, 25);
        await screenshot(page, 'unsaved-and-save');
      });
    },
  },
  {
    name: 'dragging a drive supersedes stale solves: the table ends on the solver’s state at the last value',
    async run(h) {
      const { pattern } = loadSample(COUPON);
      await withSession(h, 'drag-drive', { openSample: COUPON_FILE }, async ({ page }) => {
        await waitSolved(page);
        const slider = page.getByLabel('slider for drive c0');
        await slider.focus();
        // 40 steps of 0.5° as fast as the keyboard repeats: each asks for a solve, most are superseded
        for (let i = 0; i < 40; i++) await slider.press('ArrowRight');
        const final = Number(await slider.inputValue());
        assert.ok(final > 55, `the slider moved to ${final}°`);
        const docValue = await page.getByLabel('angle of drive c0 in degrees').inputValue();
        assert.equal(Number(docValue), final, 'the drive field follows the slider');
        await page.waitForFunction((v) => document.querySelector('[data-testid=hinge-table] .row[data-label=c0] [data-testid=angle-cell]')?.textContent === `${v.toFixed(2)}°`, final);
        await waitSolved(page);
        await page.waitForTimeout(300);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: final }]);
        const idx = await currentCardIndex(page);
        await assertTableMatches(page, pattern, reference.solutions[idx].angles, 'after the drag');
        // the run of slider steps is one undo step
        await page.click('.doc-title');
        await page.keyboard.press('Control+z');
        await page.waitForFunction(() => (document.querySelector('[aria-label="angle of drive c0 in degrees"]') as HTMLInputElement).value === '45');
      });
    },
  },
  {
    name: 'the hinge table copies as CSV with the cautions line',
    async run(h) {
      const { pattern } = loadSample(COUPON);
      await withSession(h, 'copy-table', { openSample: COUPON_FILE }, async ({ page, host }) => {
        await waitSolved(page);
        await page.click('button:has-text("Copy as CSV")');
        await page.waitForFunction(() => true);
        for (let i = 0; i < 20 && !host.clipboard; i++) await page.waitForTimeout(50);
        const lines = host.clipboard.split('\n');
        assert.equal(lines[0], `# ${CAUTIONS}`);
        const parsed = Papa.parse<Record<string, string>>(lines.filter((l) => !l.startsWith('#')).join('\n'), { header: true, skipEmptyLines: true });
        assert.deepEqual(parsed.errors, []);
        assert.equal(parsed.data.length, pattern.creases.filter((c) => c.assignment !== 'B').length);
        const reference = referenceSolve(pattern, [{ crease: 'c0', angleDeg: 45 }]);
        const idx = await currentCardIndex(page);
        for (const row of parsed.data) {
          assert.ok(Math.abs(Number(row.angle_deg) - reference.solutions[idx].angles[Number(row.index)] * DEG) < 1e-5, `row ${row.label}`);
        }
      });
    },
  },
  {
    name: 'a drawing whose layer names say nothing: the Layers dialog lists them, and the drawing read again with them assigned matches the core reader',
    async run(h) {
      await withSession(h, 'drawing-layers', { openSample: COUPON_FILE, viewport: { width: 1280, height: 800 } }, async ({ page, host, tmp }) => {
        await waitSolved(page);
        const drawn = path.join(tmp, 'coupon-unnamed.svg');
        const text = readFileSync(path.join(SAMPLES, '..', 'tests', 'fixtures', 'drawings', 'coupon.svg'), 'utf8').replace('id="mountains"', 'id="folds-a"');
        await fs.writeFile(drawn, text);
        host.openAnswers.push(drawn);
        await page.click('button:has-text("Import drawing…")');
        await page.waitForSelector('[data-testid=doc-title]:has-text("coupon-unnamed.svg")');
        await page.click('button:has-text("Layers…")');
        const dialog = page.getByRole('dialog', { name: 'Layers of the drawing' });
        await dialog.waitFor();
        const row = dialog.locator('tr', { hasText: 'folds-a' });
        assert.match((await row.textContent()) ?? '', /folds-a\s*4\s*name says nothing/);
        // the colours the lines are drawn in, none mapped yet
        const colourRow = dialog.getByRole('table', { name: 'line colours of the drawing' }).locator('tr', { hasText: '#222222' });
        assert.match((await colourRow.textContent()) ?? '', /#222222\s*7/);
        assert.equal(await dialog.getByLabel('assignment of colour #222222').inputValue(), '');
        const select = dialog.getByLabel('assignment of layer folds-a');
        assert.equal(await select.inputValue(), 'U');
        await select.selectOption('M');
        await screenshot(page, 'drawing-layers');
        await dialog.getByRole('button', { name: 'Read again' }).click();
        await dialog.waitFor({ state: 'detached' });
        // the core reader with the same mapping, run in Node, is the reference
        const expected = loadPatternText(text, drawn, { layers: [{ name: 'folds-a', assignment: 'M' }] }).pattern!;
        const want = expected.creases.filter((c) => c.assignment !== 'B').map((c) => c.assignment).sort().join('');
        assert.equal(want, 'MMMV');
        await page.waitForFunction((w) => {
          const cells = [...document.querySelectorAll('[role=cell].c-assign')].map((c) => c.textContent?.trim() ?? '');
          return cells.filter((c) => c !== 'B').sort().join('') === w;
        }, want, { timeout: 30_000 });
      });
    },
  },
];
