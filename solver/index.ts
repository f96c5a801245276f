// What the solver core offers the shells (cli/, electron/, renderer/). Pure TypeScript: no I/O.
export * from './types';
export { buildPattern, findCrease } from './model/pattern';
export { resolveDrives, parseSetOption, type DriveSpec } from './model/drives';
export { solveDrives, patternDegreesOfFreedom, matchesAssignment, limitViolations, type SolveOptions } from './search/solve';
export { foldedShape, applyTransform } from './outputs/shape';
export { flatCone, straightCreaseLines, type ConeRay } from './paths/cone';
export { ClosureProblem, RESIDUAL_TOLERANCE } from './closure/newton';
export { analyzeState, NEAR_SINGULAR_CONDITION } from './closure/analysis';
export { loadPatternText, drawingFormat, parseProject, writeProject, type Project, type PatternFormat } from './formats/project';
export { parseFold, writeFold } from './formats/fold';
export { parseDxf } from './formats/dxf';
export { writeDxf } from './formats/dxf-write';
export { decodeDxf } from './formats/dxf-text';
export { parseSvg } from './formats/svg';
export { writeSvg } from './formats/svg-write';
export { drawingToProject, assignmentFromName, type DrawingOptions, type Drawing } from './formats/drawing';
export { cleanSegments, DEFAULT_SNAP_FRACTION, type CleanCounts, type DrawnSegment } from './model/clean';
export { shapeToJSON, shapeToOBJ, shapeToSTL } from './formats/shape-export';
export { CAUTIONS } from './formats/cautions';
export { singleVertex, miura, waterbomb, degree5 } from './model/generators';
export {
  sweep, sweepSteps, runSteps, createSweep, sampleValues, defaultConditionEvery, secondOrderRows,
  type SweepOptions, type SweepResult, type SweepSample, type SweepEvent, type SweepEventType, type SweepHooks, type SweepStatus, type SweepMethod,
} from './paths/sweep';
export { flatBranches, branchesAt, tangentMatchesAssignment, type Branch, type BranchAnalysis, type BranchGroup } from './paths/branches';
export {
  deploymentSchedule, scheduleSteps, driveProfile, followSchedule, followSteps, parseScheduleCsv, timeRows,
  type ProfileSpec, type ProfileKind, type DriveProfile, type ScheduleOptions, type ScheduleResult, type ScheduleRow, type HingeLimits,
  type ParsedSchedule, type FollowOptions, type FollowResult, type FollowRow,
} from './outputs/schedule';
export { gridSweep, gridSteps, type GridOptions, type GridResult, type GridNode } from './outputs/grid';
export { angleTable, scheduleTable, followTable, gridTable, type TableHeader, type TableFormat } from './outputs/table';
export { planPropagation, propagate, degree4States } from './paths/propagate';
export { sha256 } from './outputs/sha256';
export { planShape, placePanels, placementMismatch, type ShapePlan } from './outputs/placement';
export { ContactChecker, checkContacts, contactPairs, STACK_ANGLE, type ContactOptions, type ContactReport, type PanelContact } from './outputs/contact';
export { StatesBetween, refineFirstContact, contactText, CONTACT_REFINEMENT, type PathState, type FirstContact } from './outputs/contact-path';
export { LoadModel, metresPerUnit, ratesFromSensitivity, resolveLoads, STANDARD_GRAVITY, type LoadSpec, type Spring, type LoadOverrides } from './outputs/torque';
export { PathChecks, finishChecks, checkFollowedRows, type PathChecksOptions, type StateChecks, type ChecksSummary, type ContactEvent } from './outputs/path-physics';
export { readLoads, type FileLoads } from './formats/loads';
export {
  toleranceSteps, nominalSteps, toleranceResult, checkToleranceOptions, checkToleranceSize,
  type ToleranceOptions, type ToleranceResult, type ToleranceStatus,
} from './outputs/tolerance/run';
export { SheetSolver, type SheetResult, type ToleranceSetup } from './outputs/tolerance/sheet';
export { sheetPerturbation, type PerturbationModel, type ToleranceSpec } from './outputs/tolerance/perturbation';
export { linearSteps, type LinearEstimate } from './outputs/tolerance/linear';
export { toleranceTable, worstVertices } from './outputs/tolerance/table';
