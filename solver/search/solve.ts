// Solving from a partial specification: find the closed states for the given drives (search), say what each
// is (classification: isolated solution or family), then what kind of specification it was (the report).
//
//  1. search (solver/search/candidates.ts): exhaustive enumeration vertex by vertex where it applies, with a
//     cap that is reported; a numerical search with a fixed budget elsewhere;
//  2. classification (solver/search/classify.ts): local DOF with the drives held (proven by the enumeration,
//     else one rank analysis per state), sensitivities, families grouped by a walk between their points;
//  3. the report (solver/search/report.ts): the status from every state found, the messages.

import type { Drive, Message, Pattern, SolveReport } from '../types';
import { ClosureProblem, RESIDUAL_TOLERANCE } from '../closure/newton';
import { searchStates } from './candidates';
import { classifyStates } from './classify';
import { buildReport } from './report';
import { isMovable } from './states';

export { isMovable, matchesAssignment, limitViolations, signPattern, assignmentSigns } from './states';
export { followRay } from './candidates';
export { patternDegreesOfFreedom } from './classify';
export { listLabels } from './report';

export interface SolveOptions {
  /** most closed states to collect (default 64); a search stopped by it says so */
  cap?: number;
  /** random starts of the numerical search where the enumeration does not apply (default 24) */
  starts?: number;
  seed?: number;
  /** the pattern's own DOF when the caller knows it */
  patternDof?: number;
  /** keep states beyond a hinge limit apart from the solutions (default true) */
  respectLimits?: boolean;
  /**
   * the precision the drive values were stated to (radians, default 0.005°, half the last digit of a value
   * shown to two decimals): drives that agree with the others to within it are overspecified, not inconsistent
   */
  drivePrecision?: number;
  /** vertex solves the enumeration may take */
  maxSteps?: number;
  /** solutions (in the report's order) whose sensitivities are computed (default all; 'matching': those that follow the assignment, else the first); the others carry none */
  detail?: number | 'matching';
  /** solutions (in the report's order) whose condition number is evaluated (default 1: each costs a factorization; the rest are NaN, said in a message) */
  conditions?: number | 'matching';
}

export const DEFAULT_DRIVE_PRECISION = (0.005 * Math.PI) / 180;

export function solveDrives(pattern: Pattern, drives: Drive[], options: SolveOptions = {}): SolveReport {
  const messages: Message[] = [];
  if (pattern.interiorVertices.length === 0) {
    messages.push({ severity: 'info', code: 'no-interior-vertex', text: 'The pattern has no interior vertex: every free crease folds independently.' });
  }
  const driveSet = new Set(drives.map((d) => d.crease));
  const problem = new ClosureProblem(pattern, (c) => driveSet.has(c));
  const free = Array.from(problem.unknownCreases);
  const movable = pattern.creases.filter((c) => isMovable(pattern, c.index)).map((c) => c.index);
  const search = searchStates(pattern, problem, drives, { cap: options.cap, starts: options.starts, seed: options.seed, maxSteps: options.maxSteps });
  const ctx = { pattern, problem, drives, free, known: search.known };
  const cls = classifyStates(ctx, search.candidates, movable, options);
  return buildReport({ ...ctx, movable, search, cls, messages, drivePrecision: options.drivePrecision ?? DEFAULT_DRIVE_PRECISION });
}

export { RESIDUAL_TOLERANCE };
