// What the solver core offers the shells (cli/, electron/, renderer/). Pure TypeScript: no I/O.
export * from './types';
export { buildPattern, findCrease } from './pattern';
export { resolveDrives, parseSetOption, type DriveSpec } from './drives';
export { solveDrives, patternDegreesOfFreedom, matchesAssignment, limitViolations, type SolveOptions } from './solve';
export { foldedShape, applyTransform } from './shape';
export { flatCone, straightCreaseLines, type ConeRay } from './cone';
export { ClosureProblem, RESIDUAL_TOLERANCE } from './newton';
export { analyzeState, NEAR_SINGULAR_CONDITION } from './analysis';
export { loadPatternText, parseProject, writeProject, type Project } from './formats/project';
export { parseFold, writeFold } from './formats/fold';
export { shapeToJSON, shapeToOBJ, shapeToSTL } from './formats/shape-export';
export { CAUTIONS } from './formats/cautions';
export { singleVertex, miura, waterbomb, degree5 } from './generators';
export {
  sweep, sweepSteps, runSteps, createSweep, sampleValues, defaultConditionEvery, secondOrderRows,
  type SweepOptions, type SweepResult, type SweepSample, type SweepEvent, type SweepEventType, type SweepHooks, type SweepStatus, type SweepMethod,
} from './path';
export { flatBranches, branchesAt, tangentMatchesAssignment, type Branch, type BranchAnalysis, type BranchGroup } from './branches';
export {
  deploymentSchedule, scheduleSteps, driveProfile, followSchedule, followSteps, parseScheduleCsv, timeRows,
  type ProfileSpec, type ProfileKind, type DriveProfile, type ScheduleOptions, type ScheduleResult, type ScheduleRow, type HingeLimits,
  type ParsedSchedule, type FollowOptions, type FollowResult, type FollowRow,
} from './schedule';
export { gridSweep, gridSteps, type GridOptions, type GridResult, type GridNode } from './grid';
export { angleTable, scheduleTable, followTable, gridTable, type TableHeader, type TableFormat } from './table';
export { planPropagation, propagate, degree4States } from './propagate';
export { sha256 } from './sha256';
