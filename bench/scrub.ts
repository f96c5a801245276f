// Frame rate of scrubbing a computed path in the shipped renderer, for a Miura-ori sheet of 20 × 20 cells
// (3,280 creases, 1,600 panels): every frame moves to the next sample, which re-tints the sheet, re-places
// the 3D shape and refreshes the hinge table. Runs in Debian's Chromium through the e2e harness (software
// WebGL, no GPU). `npx tsx bench/scrub.ts [seconds] [cells]`; prints frames per second.
import { Harness, screenshot } from '../tests/e2e/harness';

const seconds = Number(process.argv[2] ?? 6);
const cells = Number(process.argv[3] ?? 20);

const harness = new Harness();
await harness.start();
const session = await harness.open({ openSample: 'hinge-coupon.hingeplan.json' });
const { page, host } = session;
try {
  await page.waitForSelector('[data-testid=solve-status]');
  await page.click('button:has-text("New…")');
  const dialog = page.getByRole('dialog');
  await dialog.getByLabel('rows of cells').fill(String(cells));
  await dialog.getByLabel('columns of cells').fill(String(cells));
  host.confirmAnswers.push('discard');
  await dialog.getByRole('button', { name: 'Create' }).click();
  await page.waitForSelector('[data-testid=doc-title]:has-text("miura")', { timeout: 60_000 });
  // the generator's single drive starts a path at once; wait for it
  const t0 = Date.now();
  await page.waitForSelector('[data-testid=path-summary]', { timeout: 300_000 });
  const pathSeconds = (Date.now() - t0) / 1000;
  const facts = await page.evaluate(() => {
    const c = (window as unknown as { __hingeplan: { state: { path: { result?: { samples: unknown[] } }; doc: { history: { present: { source: { edges: unknown[] } } } } } } }).__hingeplan;
    return { samples: c.state.path.result?.samples.length ?? 0, creases: c.state.doc.history.present.source.edges.length };
  });
  // SCRUB_HIDE=".sheet-view" (a CSS selector) leaves a view out, to see what each one costs
  // (through the CSSOM: the page's CSP refuses style elements)
  if (process.env.SCRUB_HIDE) await page.evaluate((sel) => document.querySelectorAll<HTMLElement>(sel).forEach((e) => (e.style.visibility = 'hidden')), process.env.SCRUB_HIDE);
  const result = await page.evaluate(async (ms) => {
    type C = { store: { dispatch(a: unknown): void }; state: { path: { result?: { samples: unknown[] } } } };
    const c = (window as unknown as { __hingeplan: C }).__hingeplan;
    const n = c.state.path.result!.samples.length;
    const scene = document.querySelector('[data-testid=scene]') as HTMLElement;
    const drawn0 = Number(scene.dataset.frames ?? 0);
    const intervals: number[] = [];
    let frames = 0;
    let i = 0;
    let last = 0;
    const start = performance.now();
    await new Promise<void>((resolve) => {
      // one scrub step per display frame; React re-renders the sheet tint, the table and the chart marker
      // before the next frame, and the 3D scene draws in that frame, so a slow update shows as a longer frame
      const step = (t: number) => {
        if (last) intervals.push(t - last);
        last = t;
        if (performance.now() - start >= ms) return resolve();
        i = (i + 1) % n;
        c.store.dispatch({ type: 'scrub', index: i });
        frames++;
        requestAnimationFrame(step);
      };
      requestAnimationFrame(step);
    });
    const elapsed = (performance.now() - start) / 1000;
    const drawn = Number(scene.dataset.frames ?? 0) - drawn0;
    intervals.sort((a, b) => a - b);
    return {
      updatesPerSecond: frames / elapsed,
      shapeFramesPerSecond: drawn / elapsed,
      medianUpdateMs: intervals[Math.floor(intervals.length / 2)],
      p95UpdateMs: intervals[Math.floor(intervals.length * 0.95)],
    };
  }, seconds * 1000);
  await screenshot(page, 'bench-scrub-miura');
  if (process.env.SCRUB_PROFILE) {
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Profiler.enable');
    await cdp.send('Profiler.start');
    await page.evaluate(async () => {
      const c = (window as unknown as { __hingeplan: { store: { dispatch(a: unknown): void } } }).__hingeplan;
      for (let k = 0; k < 60; k++) {
        c.store.dispatch({ type: 'scrub', index: k * 3 });
        await new Promise((r) => requestAnimationFrame(r));
      }
    });
    const { profile } = (await cdp.send('Profiler.stop')) as unknown as { profile: { nodes: { id: number; callFrame: { functionName: string; url: string; lineNumber: number } }[]; samples: number[]; timeDeltas: number[] } };
    const byId = new Map(profile.nodes.map((n) => [n.id, n]));
    const self = new Map<string, number>();
    profile.samples.forEach((id, i) => {
      const f = byId.get(id)!.callFrame;
      const k = `${f.functionName || '(anonymous)'} ${f.url.split('/').pop()}:${f.lineNumber}`;
      self.set(k, (self.get(k) ?? 0) + (profile.timeDeltas[i] ?? 0));
    });
    console.log([...self].sort((a, b) => b[1] - a[1]).slice(0, 15).map(([k, v]) => `  ${(v / 1000).toFixed(0)} ms ${k}`).join('\n'));
  }
  console.log(`scrub benchmark: Miura-ori ${cells} × ${cells} cells, ${facts.creases} creases, path of ${facts.samples} samples (computed in ${pathSeconds.toFixed(1)} s)`);
  console.log(`  scrub steps (sheet tint, hinge table, chart marker): ${result.updatesPerSecond.toFixed(1)} per second; frame time median ${result.medianUpdateMs.toFixed(1)} ms, 95th percentile ${result.p95UpdateMs.toFixed(1)} ms`);
  console.log(`  3D shape frames drawn: ${result.shapeFramesPerSecond.toFixed(1)} frames per second`);
  console.log(`  (headless Chromium ${await page.evaluate(() => navigator.userAgent.match(/Chrome\/[\d.]+/)?.[0])}, software WebGL, ${seconds} s of scrubbing)`);
} finally {
  await session.close();
  await harness.stop();
}
