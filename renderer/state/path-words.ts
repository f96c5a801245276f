// The path in words: what it started from and which branch it follows, and, when it ends with no samples
// or early, the solver's reason and the fixes the window offers (start from the solution on screen, run
// the other way, pick a branch). Plain functions of the state; the path panel draws them.

import type { PathResultDto } from '../../electron/contract';
import type { AppState, PathAsked, PathOrigin } from './app';

export type PathFixId = 'from-solution' | 'from-flat' | 'flip' | 'branches';

export interface PathFix {
  id: PathFixId;
  label: string;
  title: string;
}

export interface PathOutcome {
  tone: 'note' | 'bad';
  headline: string;
  /** the solver's own words: its error messages, or the event that ended the path */
  reason: string;
  fixes: PathFix[];
}

const deg = (v: number) => `${+v.toFixed(2)}°`;

/** "from solution #2 (differs from M/V), on branch B+" and the like. */
export function originWords(origin: PathOrigin | undefined, path: PathResultDto): string {
  const mv = (m: boolean | undefined) => (m === undefined ? '' : m ? ' (follows M/V)' : ' (differs from M/V)');
  const branch = path.branchName && !/^(start state|solution \d+)$/.test(path.branchName) ? path.branchName : undefined;
  switch (origin?.kind) {
    case 'solution':
      return `from solution #${origin.index + 1}${mv(origin.matchesAssignment)}${branch ? `, on branch ${branch}` : ''}`;
    case 'family':
      return `from a state of family ${origin.index + 1}${branch ? `, on branch ${branch}` : ''}`;
    case 'ray':
      return `along ${origin.name} from the branch point at ${deg(origin.atDeg)}`;
    case 'flat':
    default:
      if (path.startKind === 'solution') return `from ${path.branchName ?? 'a solution'} at the first drive value${mv(path.branchMatchesAssignment)}`;
      return `from flat along ${branch ?? 'the branch that follows M/V'}${mv(path.branchMatchesAssignment)}`;
  }
}

/** The reverse range: the other side of flat (0° → 180° becomes 0° → −180°). */
export function flippedRange(asked: PathAsked): { fromDeg: number; toDeg: number } {
  return { fromDeg: asked.fromDeg === 0 ? 0 : -asked.fromDeg, toDeg: -asked.toDeg };
}

/** Why the path has no samples or ended early, and what to try; null when it ran to the end. */
export function pathOutcome(state: AppState): PathOutcome | null {
  const path = state.path.result;
  if (!path || state.path.status !== 'done') return null;
  const status = path.status ?? (path.complete ? 'complete' : path.samples.length ? 'partial' : 'failed');
  if (status === 'complete' || status === 'stopped') return null;
  const origin = state.path.origin;
  const asked = state.path.asked;
  const solutions = state.solve.result?.solutions ?? [];
  const fixes: PathFix[] = [];
  if (origin?.kind !== 'solution' && solutions.length) {
    const k = Math.min(state.selectedSolution, solutions.length - 1);
    fixes.push({ id: 'from-solution', label: `Start from solution #${k + 1}`, title: 'Follow the family of the solution on screen through the range' });
  }
  if (origin?.kind === 'solution' && status === 'failed') {
    fixes.push({ id: 'from-flat', label: 'Start from the flat sheet', title: 'Leave the flat state along the branch that follows the mountain/valley assignment' });
  }
  if (asked) {
    const f = flippedRange(asked);
    fixes.push({ id: 'flip', label: `Run the other way: ${deg(f.fromDeg)} → ${deg(f.toDeg)}`, title: 'The same drive on the other side of flat' });
  }
  fixes.push({ id: 'branches', label: 'Pick a branch…', title: 'List the branches at the flat state and follow one' });
  if (status === 'failed' || !path.samples.length) {
    const errors = path.messages.filter((m) => m.severity === 'error').map((m) => m.text);
    return { tone: 'bad', headline: 'No path', reason: errors.join(' ') || 'The solver found no state to start the path from.', fixes };
  }
  const last = path.samples[path.samples.length - 1].driveDeg;
  const end = path.events.find((e) => e.type !== 'branch-point' && Math.abs(e.driveDeg - last) <= Math.max(1e-6, (asked?.stepDeg ?? 1) * 1.01)) ?? path.events.find((e) => e.type !== 'branch-point');
  return {
    tone: 'note',
    headline: `Ended early at ${path.driveLabel} = ${deg(last)}`,
    reason: end?.text ?? path.messages.find((m) => m.severity !== 'info')?.text ?? 'The path stopped before the end of the range.',
    fixes,
  };
}
