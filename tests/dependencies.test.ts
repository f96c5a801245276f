// The runtime dependencies in package.json are exactly the packages the shipped code imports (solver/,
// electron/, renderer/, cli/); everything only tests, benchmarks or the build use is a dev dependency.
// Common practice for npm packages: `dependencies` is what the program needs to run.
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { builtinModules } from 'node:module';
import { ROOT } from './electron/support';

const SHIPPED = ['solver', 'electron', 'renderer', 'cli'];
/** provided by the runtime that runs the shipped code, never installed from `dependencies` */
const RUNTIME = new Set(['electron']);

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const file = path.join(dir, name);
    if (statSync(file).isDirectory()) return sources(file);
    return /\.(ts|tsx)$/.test(name) ? [file] : [];
  });
}

/** Package names of the value imports of a file (type-only imports are erased by the build). */
function importedPackages(text: string): string[] {
  const out: string[] = [];
  for (const m of text.matchAll(/^\s*(import|export)\s+(type\s+)?[^'"]*?from\s+'([^']+)'|^\s*import\s+'([^']+)'/gm)) {
    if (m[2]) continue;
    const spec = m[3] ?? m[4];
    if (spec.startsWith('.') || spec.startsWith('node:') || builtinModules.includes(spec)) continue;
    out.push(spec.startsWith('@') ? spec.split('/').slice(0, 2).join('/') : spec.split('/')[0]);
  }
  return out;
}

describe('package dependencies', () => {
  const pkg = JSON.parse(readFileSync(path.join(ROOT, 'package.json'), 'utf8')) as { dependencies: Record<string, string>; devDependencies: Record<string, string> };
  const imported = new Map<string, string>();
  for (const dir of SHIPPED) for (const file of sources(path.join(ROOT, dir))) for (const p of importedPackages(readFileSync(file, 'utf8'))) imported.set(p, path.relative(ROOT, file));

  it('lists every package the shipped code imports as a runtime dependency', () => {
    const missing = [...imported].filter(([p]) => !RUNTIME.has(p) && !(p in pkg.dependencies)).map(([p, f]) => `${p} (imported by ${f})`);
    expect(missing).toEqual([]);
  });

  it('lists nothing as a runtime dependency that only tests or the build use', () => {
    expect(Object.keys(pkg.dependencies).filter((p) => !imported.has(p))).toEqual([]);
  });

  it('pins every version exactly', () => {
    const loose = Object.entries({ ...pkg.dependencies, ...pkg.devDependencies }).filter(([, v]) => !/^\d+\.\d+\.\d+$/.test(v));
    expect(loose).toEqual([]);
  });
});
