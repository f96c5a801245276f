// Running the command line in tests: in-process through main() with a collecting Io, or as the bundled
// program (built the way scripts/build-cli.mjs builds it, code splitting included) in a child process.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawn, type ChildProcess } from 'node:child_process';
import { build } from 'esbuild';
import { main } from '../../cli/main';
import { nodeIo, type Io } from '../../cli/io';

export interface Ran {
  code: number;
  out: string;
  err: string;
}

/** main() in this process; stdout and stderr collected; anything else from the real Io unless patched. */
export function runIn(args: string[], patch: Partial<Io> = {}): Promise<Ran> {
  let out = '';
  let err = '';
  const io: Io = { ...nodeIo(), stdout: (t) => { out += t; }, stderr: (t) => { err += t; }, progress: () => {}, stderrIsTTY: false, onInterrupt: () => () => {}, interrupts: () => 0, ...patch };
  return main(args, io).then((code) => ({ code, out, err }));
}

let bundle: Promise<string> | undefined;

/** The command line bundled as dist/cli.js is (split into chunks), in a temporary folder; built once per test file. */
export function bundledCli(): Promise<string> {
  bundle ??= (async () => {
    const dir = mkdtempSync(join(tmpdir(), 'hingeplan-bundle-'));
    await build({
      entryPoints: { cli: 'cli/main.ts' }, outdir: dir, chunkNames: 'cli-chunks/[name]-[hash]', bundle: true, splitting: true,
      platform: 'node', format: 'esm', target: 'node20', logLevel: 'silent',
      banner: { js: "import { createRequire as __hpRequire } from 'module'; const require = __hpRequire(import.meta.url);" },
    });
    return join(dir, 'cli.js');
  })();
  return bundle;
}

export interface Exited extends Ran {
  signal: NodeJS.Signals | null;
}

/** Run the bundled program; `during` gets the child (to signal it); resolves when it has exited. */
export async function runChild(args: string[], during?: (child: ChildProcess) => void, opts: { cwd?: string; stdin?: string } = {}): Promise<Exited> {
  const cli = await bundledCli();
  const child = spawn(process.execPath, [cli, ...args], { stdio: ['pipe', 'pipe', 'pipe'], cwd: opts.cwd });
  let out = '';
  let err = '';
  child.stdout!.on('data', (d) => { out += String(d); });
  child.stderr!.on('data', (d) => { err += String(d); });
  if (opts.stdin !== undefined) child.stdin!.end(opts.stdin);
  else child.stdin!.end();
  during?.(child);
  return new Promise((resolve) => child.on('close', (code, signal) => resolve({ code: code ?? -1, signal, out, err })));
}
