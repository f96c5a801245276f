// `npm run test:e2e`: runs the end-to-end tests one after another in one Chromium, each in a fresh window
// with its own backend, and closes with "N passed, N failed". `tsx tests/e2e/run.ts <word> …` runs only the
// tests whose names contain one of the words.
import { Harness } from './harness';
import { e2eTests as appTests } from './app.e2e';
import { workflowTests } from './workflow.e2e';
import { toleranceTests } from './tolerance.e2e';
import { contactTests } from './contact.e2e';

const e2eTests = [...appTests, ...workflowTests, ...toleranceTests, ...contactTests];

const words = process.argv.slice(2).map((w) => w.toLowerCase());
const chosen = e2eTests.filter((t) => !words.length || words.some((w) => t.name.toLowerCase().includes(w)));

function withTimeout<T>(p: Promise<T>, ms: number, name: string): Promise<T> {
  let timer: ReturnType<typeof setTimeout>;
  return Promise.race([
    p.finally(() => clearTimeout(timer)),
    new Promise<T>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`${name} took longer than ${ms / 1000} s`)), ms);
    }),
  ]);
}

const harness = new Harness();
const started = Date.now();
let passed = 0;
let failed = 0;
try {
  await harness.start();
  for (const t of chosen) {
    const t0 = Date.now();
    try {
      await withTimeout(t.run(harness), t.timeoutMs ?? 120_000, t.name);
      passed++;
      console.log(`  ✓ ${t.name} (${((Date.now() - t0) / 1000).toFixed(1)} s)`);
    } catch (err) {
      failed++;
      console.log(`  ✗ ${t.name} (${((Date.now() - t0) / 1000).toFixed(1)} s)\n      ${(err instanceof Error ? err.stack ?? err.message : String(err)).split('\n').slice(0, 6).join('\n      ')}`);
    }
  }
} catch (err) {
  failed = Math.max(1, chosen.length - passed);
  console.log(`  ✗ the harness could not start: ${err instanceof Error ? err.message : String(err)}`);
} finally {
  await harness.stop().catch(() => undefined);
}
console.log(`\ne2e: ${chosen.length} tests in ${((Date.now() - started) / 1000).toFixed(1)} s; screenshots in test-output/screenshots/`);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed || !chosen.length ? 1 : 0);
