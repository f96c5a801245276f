#!/usr/bin/env node
// Entry point of `npx hingeplan`: the bundled command line built by `npm install` (scripts/build-cli.mjs).
import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';

const bundle = fileURLToPath(new URL('../dist/cli.js', import.meta.url));
if (!existsSync(bundle)) {
  process.stderr.write('hingeplan: the command line is not built yet; run `npm install` or `npm run build:cli` first\n');
  process.exit(2);
}
await import(pathToFileURL(bundle).href);
