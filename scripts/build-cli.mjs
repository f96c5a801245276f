// Bundles the command line into dist/cli.js; runs on `npm install` / `npm ci` (the prepare script).
import { build } from 'esbuild';

await build({
  entryPoints: ['cli/main.ts'],
  outfile: 'dist/cli.js',
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  sourcemap: true,
  logLevel: 'warning',
  banner: { js: "import { createRequire as __hpRequire } from 'module'; const require = __hpRequire(import.meta.url);" },
});
