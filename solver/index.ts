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
