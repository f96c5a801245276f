// Exit statuses are a contract with scripts that call the command line.
import type { SolveStatus } from '../solver/types';

export const EXIT = {
  ok: 0,
  /** internal error: a bug, reported without a stack trace */
  internal: 1,
  /** invalid input or usage */
  usage: 2,
  /** inconsistent or unreachable */
  noSolution: 3,
  /** underspecified or not isolated; for schedules: solved, but a hinge is over a limit */
  notDetermined: 4,
  /** stopped by Ctrl-C; what was computed so far was written (128 + SIGINT, the shell's convention) */
  interrupted: 130,
  /** standard output was closed by its reader (`| head`): stopped quietly (128 + SIGPIPE, as the shell reports a program SIGPIPE ends) */
  brokenPipe: 141,
} as const;

export function exitForStatus(status: SolveStatus): number {
  switch (status) {
    case 'solved':
    case 'several-solutions':
    case 'overspecified':
    case 'dependent-drives':
      return EXIT.ok;
    case 'inconsistent':
    case 'unreachable':
      return EXIT.noSolution;
    case 'underspecified':
    case 'not-isolated':
      return EXIT.notDetermined;
    case 'invalid':
      return EXIT.usage;
  }
}
