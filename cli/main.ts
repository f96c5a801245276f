// `hingeplan <command> …`: a thin shell over the solver core. Output formats and exit statuses are a contract.
import { commands } from './commands/index';
import { UsageError } from './args';
import { EXIT } from './exit-codes';
import { nodeIo, type Io } from './io';
import { VERSION } from './version';
import { isMainThread } from 'node:worker_threads';
import { DRAWING_OPTIONS_HELP, takeDrawingOptions } from './drawing-options';

export const USAGE = `hingeplan ${VERSION}: fold-angle solver for rigid-panel deployable structures

Usage: hingeplan <command> [options]   (hingeplan <command> --help for each)

Commands:
${commands.map((c) => `  ${c.name.padEnd(10)} ${c.summary}`).join('\n')}

Angles are degrees; fold angle 0 = flat, valley positive, mountain negative, ±180 = folded flat.
Exit status: 0 solved, 2 invalid input or usage, 3 inconsistent or unreachable, 4 underspecified or not isolated.
Kinematic model only (no thickness, hinge play, compliance, loads or dynamics): verify on hardware.
`;

export async function main(argv: string[], io: Io): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.stdout(USAGE);
    return name ? EXIT.ok : EXIT.usage;
  }
  if (name === '--version' || name === '-V') {
    io.stdout(`${VERSION}\n`);
    return EXIT.ok;
  }
  const command = commands.find((c) => c.name === name);
  if (!command) {
    io.stderr(`hingeplan: unknown command "${name}"; commands: ${commands.map((c) => c.name).join(', ')}\n`);
    return EXIT.usage;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    const help = command.readsNoPattern ? command.help : command.help.trimEnd() + '\n' + DRAWING_OPTIONS_HELP;
    io.stdout(help.endsWith('\n') ? help : help + '\n');
    return EXIT.ok;
  }
  try {
    if (!command.readsNoPattern) {
      const taken = takeDrawingOptions(rest);
      const drawingIo: Io = { ...io, drawing: taken.options };
      return await command.run(taken.argv, drawingIo);
    }
    return await command.run(rest, io);
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`hingeplan ${name}: ${e.message} (see hingeplan ${name} --help)\n`);
      return EXIT.usage;
    }
    io.stderr(`hingeplan ${name}: internal error: ${(e as Error).message ?? String(e)}\n`);
    if (process.env.HINGEPLAN_DEBUG) io.stderr(`${(e as Error).stack}\n`);
    return EXIT.internal;
  }
}

// run when bundled as the program (dist/cli.js), not when imported by tests, nor in a worker thread the
// program starts (workers load the same bundle)
const entry = process.argv[1] ?? '';
if (isMainThread && /hingeplan(\.js)?$|cli\.js$|cli[\\/]main\.ts$/.test(entry)) {
  main(process.argv.slice(2), nodeIo()).then(
    (code) => {
      process.exitCode = code;
    },
    () => {
      process.exitCode = EXIT.internal;
    },
  );
}
