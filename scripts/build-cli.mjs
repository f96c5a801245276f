// Bundles the command line into dist/cli.js; runs on `npm install` / `npm ci` (the prepare script).
// Code splitting with a dynamic import per command (cli/commands/index.ts): `hingeplan --help` loads only
// the entry, `hingeplan check` only the readers, `hingeplan sweep` the path code; shared code goes into
// chunks under dist/cli-chunks/ (removed and written anew on every build).
import { build } from 'esbuild';
import { rmSync } from 'node:fs';

rmSync('dist/cli-chunks', { recursive: true, force: true });
await build({
  entryPoints: { cli: 'cli/main.ts' },
  outdir: 'dist',
  chunkNames: 'cli-chunks/[name]-[hash]',
  bundle: true,
  splitting: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  sourcemap: true,
  logLevel: 'warning',
  banner: { js: "import { createRequire as __hpRequire } from 'module'; const require = __hpRequire(import.meta.url);" },
});
