// `hingeplan <command> …`: a thin shell over the solver core. Output formats and exit statuses are a contract.
import { commands, nearestCommand } from './commands/index';
import { UsageError } from './args';
import { EXIT } from './exit-codes';
import { BrokenPipe, nodeIo, type Io } from './io';
import { escapeControlsKeepLines } from '../solver/formats/escape';
import { VERSION } from './version';
import { isMainThread } from 'node:worker_threads';
import { DRAWING_OPTIONS_HELP, takeDrawingOptions } from './drawing-options';

export const USAGE = `hingeplan ${VERSION}: fold-angle solver for rigid-panel deployable structures

Usage: hingeplan <command> [options]   (hingeplan <command> --help for each)

Commands:
${commands.map((c) => `  ${c.name.padEnd(10)} ${c.summary}`).join('\n')}

Angles are degrees; fold angle 0 = flat, valley positive, mountain negative, ±180 = folded flat.
Exit status: 0 solved, 2 invalid input or usage, 3 inconsistent or unreachable, 4 underspecified or not isolated,
130 stopped by Ctrl-C (what was computed is written), 141 standard output closed by its reader.
Kinematic model only (no thickness, hinge play, compliance, loads or dynamics): verify on hardware.
`;

/** Messages never carry a file's control characters to the terminal (see solver/formats/escape.ts). */
function safeIo(io: Io): Io {
  return {
    ...io,
    stderr: (t) => io.stderr(escapeControlsKeepLines(t)),
    progress: (t) => (io.progress ? io.progress(t) : io.stderr(t)),
  };
}

export async function main(argv: string[], rawIo: Io): Promise<number> {
  const io = safeIo(rawIo);
  const [name, ...rest] = argv;
  try {
    if (!name || name === '--help' || name === '-h' || name === 'help') {
      io.stdout(USAGE);
      return name ? EXIT.ok : EXIT.usage;
    }
    if (name === '--version' || name === '-V') {
      io.stdout(`${VERSION}\n`);
      return EXIT.ok;
    }
    const entry = commands.find((c) => c.name === name);
    if (!entry) {
      const near = nearestCommand(name);
      io.stderr(`hingeplan: unknown command "${name}"${near ? `; did you mean "${near}"?` : '.'} Commands: ${commands.map((c) => c.name).join(', ')} (hingeplan --help)\n`);
      return EXIT.usage;
    }
    if (entry.resumable) io.onInterrupt(() => { /* counted from now on; the command's steps stop on it */ });
    const command = await entry.load();
    if (rest.includes('--help') || rest.includes('-h')) {
      const help = command.readsNoPattern ? command.help : command.help.trimEnd() + '\n' + DRAWING_OPTIONS_HELP;
      io.stdout(help.endsWith('\n') ? help : help + '\n');
      return EXIT.ok;
    }
    let code: number;
    if (!command.readsNoPattern) {
      // drawings (DXF, SVG) are read with the same options by every command that loads a pattern
      const taken = takeDrawingOptions(rest);
      code = await command.run(taken.argv, { ...io, drawing: taken.options });
    } else code = await command.run(rest, io);
    return io.interrupts?.() ? EXIT.interrupted : code;
  } catch (e) {
    if (e instanceof BrokenPipe) return EXIT.brokenPipe;
    if (e instanceof UsageError) {
      io.stderr(`hingeplan ${name}: ${e.message} (see hingeplan ${name} --help)\n`);
      return EXIT.usage;
    }
    io.stderr(`hingeplan ${name}: internal error: ${(e as Error)?.message ?? String(e)}\n`);
    if (process.env.HINGEPLAN_DEBUG) io.stderr(`${(e as Error)?.stack}\n`);
    return EXIT.internal;
  }
}

// run when bundled as the program (dist/cli.js), not when imported by tests, nor in a worker thread the
// program starts (workers load the same bundle)
const entry = process.argv[1] ?? '';
if (isMainThread && /hingeplan(\.js)?$|cli\.js$|cli[\\/]main\.ts$/.test(entry)) {
  const io = nodeIo();
  main(process.argv.slice(2), io).then(
    (code) => {
      // a Ctrl-C seen at any moment (even after the output was complete) is reported as one
      process.exitCode = io.interrupts?.() ? EXIT.interrupted : code;
    },
    () => {
      process.exitCode = EXIT.internal;
    },
  );
}
