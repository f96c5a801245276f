// End-to-end: panel contact and drive torque along a path in the window, against the solver run in Node.
import assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { loadPatternText, sweep, LoadModel, resolveLoads, PathChecks, finishChecks } from '../../solver';
import { screenshot, type Harness } from './harness';
import type { E2ETest } from './app.e2e';

const RAD = Math.PI / 180;

/** Three panels in a row hinged by c1 and c2 (the strip of tests/contact.test.ts), with loads, in mm. */
function stripProject(): string {
  const vertices = [[-60, 0], [0, 0], [40, 0], [90, 0], [90, 20], [40, 20], [0, 20], [-60, 20]];
  const rim = [0, 1, 2, 3, 4, 5, 6, 7].map((v, k, a) => ({ vertices: [v, a[(k + 1) % 8]], assignment: 'B' }));
  return JSON.stringify({
    format: 'hingeplan-project', version: 1, name: 'gripper flaps', units: 'mm', vertices,
    creases: [...rim, { vertices: [1, 6], assignment: 'V', label: 'c1' }, { vertices: [2, 5], assignment: 'V', label: 'c2' }],
    faces: [[0, 1, 6, 7], [1, 2, 5, 6], [2, 3, 4, 5]], basePanel: 1,
    drives: [{ crease: 'c1', angle: 60 }, { crease: 'c2', angle: 120 }],
    loads: { arealDensity: 3, springs: [{ crease: 'c2', stiffness: 0.5, rest: 90 }] },
  }, null, 1);
}

/** The same path in Node: sweep with the checks, as the worker runs it. */
function reference(text: string) {
  const loaded = loadPatternText(text, 'flaps.hingeplan.json');
  const pattern = loaded.pattern!;
  const c1 = pattern.labelIndex.get('c1')!, c2 = pattern.labelIndex.get('c2')!;
  const holds = [{ crease: c2, value: 120 * RAD }];
  const r = resolveLoads(pattern, loaded.project!.loads);
  const loads = LoadModel.create(pattern, r.spec, 'mm').model!;
  const checks = new PathChecks(pattern, c1, holds, { contact: { clearance: 0 }, loads, units: 'mm' });
  const samples = Array.from({ length: 179 }, (_, k) => (k + 1) * RAD);
  const result = sweep(pattern, { drive: c1, from: RAD, to: 179 * RAD, samples, holds }, {
    onSample: (s) => { const o = checks.observe({ drive: s.drive, angles: s.angles, rates: s.rates }); s.checks = o; },
  });
  finishChecks(result, checks);
  return { result, c1, c2 };
}

export const contactTests: E2ETest[] = [
  {
    name: 'panel contact and drive torque along a path: the event, the panels in the contact colour, the torque chart',
    timeoutMs: 150_000,
    async run(h: Harness) {
      const s = await h.open({ openSample: 'hinge-coupon.hingeplan.json' });
      try {
        const { page, host, tmp } = s;
        // the sample's own solve and path first, so the window is idle when the file is opened
        await page.waitForSelector('[data-testid=path-summary]', { timeout: 90_000 });
        const file = path.join(tmp, 'flaps.hingeplan.json');
        const text = stripProject();
        await fs.writeFile(file, text);
        host.openAnswers.push(file);
        await page.click('button:has-text("Open…")');
        await page.waitForSelector('[data-testid=doc-title]:has-text("flaps.hingeplan.json")', { timeout: 30_000 });
        await page.getByLabel('path from, degrees').fill('1');
        await page.getByLabel('path to, degrees').fill('179');
        await page.getByLabel('path step, degrees').fill('1');
        assert.equal(await page.getByLabel('check panel contact').isChecked(), true, 'contact is checked by default');
        await page.getByLabel('contact clearance').fill('0');
        await page.click('[data-testid=compute-path]');
        await page.waitForSelector('[data-testid=contact-note]', { timeout: 90_000 });
        const { result, c1, c2 } = reference(text);
        const e = result.checks!.event!;
        const note = (await page.textContent('[data-testid=contact-note]')) ?? '';
        assert.match(note, new RegExp(`Panels 0 and 2 meet at c1 = ${(e.drive / RAD).toFixed(2).replace('.', '\\.')}°`), `the window says where the panels meet: ${note}`);
        assert.match((await page.textContent('[data-testid=path-summary]')) ?? '', /✱ 1 contact/);
        // a sample past the contact: both flaps in the contact colour, on the sheet and in 3D
        const past = result.samples.findIndex((x) => x.drive / RAD >= 150);
        await page.locator('[data-testid=scrub]').fill(String(past));
        await page.waitForSelector('[data-testid=contact-count]:has-text("2 panels")', { timeout: 20_000 });
        assert.equal(await page.locator('[data-testid=sheet-contact]').count(), 1);
        // before the contact nothing is marked
        await page.locator('[data-testid=scrub]').fill('50');
        await page.waitForFunction(() => !document.querySelector('[data-testid=contact-count]'), null, { timeout: 20_000 });
        // the torque chart (its own tab) with each drive's peak as the solver gives it
        await page.click('[data-testid=tab-torque]');
        await page.waitForSelector('[data-testid=torque-chart]');
        for (const [crease, label] of [[c1, 'c1'], [c2, 'c2']] as const) {
          const peak = result.checks!.peakTorque!.get(crease)!;
          const shown = (await page.textContent(`[data-testid=torque-peak-${label}]`)) ?? '';
          assert.ok(shown.includes(`peak ${+peak.value.toPrecision(4)} N·m at ${(peak.at / RAD).toFixed(1)}°`), `${label}: ${shown}`);
        }
        await screenshot(page, 'contact-torque');
        await page.click('[data-testid=tab-charts]');
        await page.locator('[data-testid=scrub]').fill(String(past));
        // a solution with the flaps through each other (c1 = 150°, past the first contact) is marked too
        const field = page.getByLabel('angle of drive c1 in degrees');
        await field.click();
        await field.fill('150');
        await field.press('Enter');
        await page.waitForSelector('[data-testid=hinge-table] .row[data-label=c1] [data-testid=angle-cell]:has-text("150.00°")', { timeout: 30_000 });
        // the solution itself (not the path sample last scrubbed to)
        await page.locator('[data-testid=solution-card]').first().click();
        await page.waitForSelector('[data-testid=shape-caption]:has-text("solution")', { timeout: 30_000 });
        await page.waitForSelector('[data-testid=contact-count]:has-text("2 panels")', { timeout: 30_000 });
        assert.deepEqual(s.pageErrors.filter((x) => !/GL Driver Message/.test(x)), [], 'the page reported errors');
      } catch (err) {
        await screenshot(s.page, 'contact-torque-FAILED').catch(() => undefined);
        throw err;
      } finally {
        await s.close();
      }
    },
  },
];
