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
  /** underspecified or not isolated */
  notDetermined: 4,
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
