// Builds the desktop app as it ships: the main process, the preload and the solver worker bundled by
// esbuild to CommonJS in dist/electron (Electron loads them with require), and the renderer built by vite
// into dist/renderer. `--only=electron` or `--only=renderer` builds one half.
import { build as esbuild } from 'esbuild';
import { build as viteBuild } from 'vite';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const only = process.argv.find((a) => a.startsWith('--only='))?.slice('--only='.length);

async function buildElectron() {
  const common = {
    bundle: true,
    platform: 'node',
    format: 'cjs',
    // Electron 45 runs Node 22; the preload runs in Chromium's sandbox with only `electron` to require
    target: 'node22',
    sourcemap: true,
    logLevel: 'warning',
    external: ['electron'],
    absWorkingDir: root,
  };
  await Promise.all([
    esbuild({ ...common, entryPoints: ['electron/main.ts'], outfile: 'dist/electron/main.cjs' }),
    esbuild({ ...common, entryPoints: ['electron/preload.ts'], outfile: 'dist/electron/preload.cjs' }),
    esbuild({ ...common, entryPoints: ['electron/solver-worker.ts'], outfile: 'dist/electron/solver-worker.cjs' }),
  ]);
}

async function buildRenderer() {
  await viteBuild({ configFile: path.join(root, 'vite.config.ts'), logLevel: 'warn' });
}

const started = Date.now();
if (only !== 'renderer') await buildElectron();
if (only !== 'electron') await buildRenderer();
console.log(`build:app: ${only ?? 'electron + renderer'} built in ${((Date.now() - started) / 1000).toFixed(1)} s → dist/`);
