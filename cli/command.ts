import type { Io } from './io';

/** One subcommand of `hingeplan`. run() returns the exit status; it never throws for bad input. */
export interface Command {
  name: string;
  summary: string;
  /** full --help text */
  help: string;
  /** the command reads no pattern file, so it takes no drawing options (--layer, --stroke, --snap) */
  readsNoPattern?: boolean;
  run(argv: string[], io: Io): Promise<number> | number;
}
