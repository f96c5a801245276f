// Builds worker entries the way scripts/build-app.mjs does (esbuild, CommonJS) into a temporary folder, so
// the tests run the bundles a user's machine would run.
import { build } from 'esbuild';
import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const ROOT = path.resolve(__dirname, '..', '..');
const built = new Map<string, Promise<string>>();

export function buildWorker(entry: string): Promise<string> {
  let p = built.get(entry);
  if (!p) {
    const out = path.join(mkdtempSync(path.join(os.tmpdir(), 'hingeplan-worker-')), `${path.basename(entry, '.ts')}.cjs`);
    p = build({ entryPoints: [path.join(ROOT, entry)], outfile: out, bundle: true, platform: 'node', format: 'cjs', target: 'node20', logLevel: 'warning', external: ['electron'] }).then(() => out);
    built.set(entry, p);
  }
  return p;
}

export const SAMPLES = path.join(ROOT, 'samples');
export { ROOT };
