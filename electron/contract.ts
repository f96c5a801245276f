// The one contract for everything that crosses a process boundary: channel names, request and response
// schemas, and the TypeScript types derived from them. Imported by the main process, the preload, the
// e2e harness and the renderer, so the two sides can never disagree on a shape. Angles are degrees here
// (the interface's unit); the worker converts to the solver's radians.

import { z } from 'zod';

// The renderer's CSP forbids eval; zod's compiled parsers use `new Function`, so parse without them everywhere.
z.config({ jitless: true });

// ---------- shared pieces ----------

const finite = z.number();
/** A condition number, residual or rate that may be infinite crosses as null (JSON and zod have no ∞). */
const maybeInfinite = z.number().nullable();

export const AssignmentSchema = z.enum(['M', 'V', 'U', 'F', 'B']);

/** Files may carry null where we use undefined; both mean "not given". */
const optionalString = z
  .union([z.string().max(10_000), z.null(), z.undefined()])
  .transform((v) => v ?? undefined);

export const HingeLimitSchema = z.object({
  /** radians, as in the project file's source block */
  min: finite.optional(),
  max: finite.optional(),
});

const optionalLimit = z.union([HingeLimitSchema, z.null(), z.undefined()]).transform((v) => v ?? undefined);

const MAX_VERTICES = 400_000;
const MAX_EDGES = 800_000;

export const PatternSourceSchema = z.object({
  name: z.string().max(500),
  vertices: z.array(z.tuple([finite, finite])).max(MAX_VERTICES),
  edges: z.array(z.tuple([z.number().int().nonnegative(), z.number().int().nonnegative()])).max(MAX_EDGES),
  assignments: z.array(AssignmentSchema).max(MAX_EDGES),
  labels: z.array(optionalString).max(MAX_EDGES),
  limits: z.array(optionalLimit).max(MAX_EDGES),
  faces: z.array(z.array(z.number().int().nonnegative())).max(MAX_EDGES).optional(),
  basePanel: z.number().int().nonnegative().optional(),
  /** a name per panel, in panel order (undefined: known by its index) */
  panelNames: z.array(optionalString).max(MAX_EDGES).optional(),
});
export type PatternSourceDto = z.output<typeof PatternSourceSchema>;

/** A drive as a person states it; the range is the solver's to check (it names the drive in its message). */
export const DriveSpecSchema = z.object({ crease: z.string().min(1).max(10_000), angleDeg: finite });
export type DriveSpec = z.output<typeof DriveSpecSchema>;

/** Loads for the drive torque (SI units; springs by crease label, rest angle in degrees). */
export const LoadsSchema = z.object({
  arealDensity: finite.min(0).optional(),
  gravity: z.tuple([finite, finite, finite]).optional(),
  panelMasses: z.array(z.object({ panel: z.number().int().min(0), mass: finite.min(0) })).max(250_000).optional(),
  springs: z.array(z.object({ crease: z.string().min(1).max(200), stiffness: finite.min(0), rest: finite.min(-180).max(180).optional() })).max(250_000).optional(),
});
export type LoadsDto = z.output<typeof LoadsSchema>;

export const ProjectSchema = z.object({
  source: PatternSourceSchema,
  drives: z.array(DriveSpecSchema).max(10_000),
  units: z.string().max(50).optional(),
  notes: z.string().max(1_000_000).optional(),
  /** a folded state to start from, radians per crease (from a FOLD file's fold angles) */
  foldAngles: z.array(finite).optional(),
  /** loads for the static drive torque */
  loads: LoadsSchema.optional(),
  /** what a FOLD file carried that the project does not use, kept to be written back */
  fold: z.object({ extra: z.record(z.string(), z.unknown()), z: finite.optional() }).optional(),
});
export type ProjectDto = z.output<typeof ProjectSchema>;

export const WhereSchema = z.object({
  field: z.string().optional(),
  vertex: z.number().int().optional(),
  crease: z.number().int().optional(),
  creaseLabel: z.string().optional(),
  panel: z.number().int().optional(),
  hole: z.number().int().optional(),
  line: z.number().int().optional(),
});

export const MessageSchema = z.object({
  severity: z.enum(['error', 'warning', 'info']),
  code: z.string(),
  text: z.string(),
  where: WhereSchema.optional(),
});
export type MessageDto = z.output<typeof MessageSchema>;

/** Errors that cross the boundary are values: a code, a message a person understands, and where. */
export const IpcErrorSchema = z.object({
  code: z.string(),
  message: z.string(),
  where: z.string().optional(),
});
export type IpcError = z.output<typeof IpcErrorSchema>;

// ---------- documents ----------

export const DocumentFormatSchema = z.enum(['project', 'fold', 'dxf', 'svg']);

/** A drawing's layer (DXF) or group (SVG) as read: the assignment its lines got, and how (solver/formats/drawing.ts). */
export const DrawingLayerSchema = z.object({
  name: z.string().max(1024),
  assignment: AssignmentSchema,
  how: z.enum(['layer', 'name', 'none']),
  lines: z.number().int().min(0),
});
export type DrawingLayerDto = z.output<typeof DrawingLayerSchema>;

/** A colour a drawing's lines are drawn in (solver/formats/drawing.ts): as `--stroke` names it, for people, its lines, what a mapping made of them. */
export const DrawingColourSchema = z.object({
  colour: z.string().max(64),
  text: z.string().max(256),
  lines: z.number().int().min(0),
  assignment: AssignmentSchema.optional(),
});
export type DrawingColourDto = z.output<typeof DrawingColourSchema>;

/** How to read a drawing again: layer names and line colours mapped to assignments (as `--layer`, `--stroke`), and the snap length. */
export const DrawingOptionsSchema = z.object({
  layers: z.array(z.object({ name: z.string().max(1024), assignment: AssignmentSchema })).max(10_000).default([]),
  strokes: z.array(z.object({ colour: z.string().max(64), assignment: AssignmentSchema })).max(10_000).default([]),
  snap: z.number().min(0).finite().optional(),
});
export type DrawingOptionsDto = z.output<typeof DrawingOptionsSchema>;

export const OpenedDocumentSchema = z.object({
  project: ProjectSchema,
  /** null for a new or built-in document: saving asks where */
  filePath: z.string().nullable(),
  fileName: z.string(),
  format: DocumentFormatSchema,
  messages: z.array(MessageSchema),
  /** the document came from a recovery copy and has not been saved yet */
  recovered: z.boolean().optional(),
  /** compute the path of the single drive right after opening (the built-in sample does) */
  computePath: z.boolean().optional(),
  /** a drawing: its layers or groups and the assignment each gave its lines */
  drawingLayers: z.array(DrawingLayerSchema).max(10_000).optional(),
  /** a drawing: the colours its lines are drawn in */
  drawingColours: z.array(DrawingColourSchema).max(10_000).optional(),
  /** a drawing: the options it was read with */
  drawingOptions: DrawingOptionsSchema.optional(),
});
export type OpenedDocument = z.output<typeof OpenedDocumentSchema>;

export const OpenResultSchema = z.discriminatedUnion('status', [
  z.object({ status: z.literal('opened'), document: OpenedDocumentSchema }),
  z.object({ status: z.literal('canceled') }),
  /** the file was read but the readers found problems; the messages say what and where */
  z.object({ status: z.literal('failed'), fileName: z.string(), messages: z.array(MessageSchema) }),
]);
export type OpenResult = z.output<typeof OpenResultSchema>;

export const WriteResultSchema = z.discriminatedUnion('status', [
  z.object({ status: z.literal('saved'), filePath: z.string(), fileName: z.string() }),
  z.object({ status: z.literal('canceled') }),
  z.object({ status: z.literal('failed'), message: z.string() }),
]);
export type WriteResult = z.output<typeof WriteResultSchema>;

export const GeneratorKindSchema = z.enum(['single-vertex', 'miura', 'waterbomb', 'degree5']);
export type GeneratorKind = z.output<typeof GeneratorKindSchema>;

const sectorList = z.array(finite.positive().max(360)).min(3).max(64);
const optionalName = z.string().max(200).optional();
/** the length unit of the new document (free text, e.g. mm); the generators' lengths are in it */
const optionalUnits = z.string().max(50).optional();

/** The `new` kinds and their parameters (lengths in the document's unit, angles in degrees). */
export const GeneratorSpecSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('single-vertex'),
    sectorsDeg: sectorList,
    radius: finite.positive().optional(),
    driveDeg: finite.min(-180).max(180).optional(),
    name: optionalName,
    units: optionalUnits,
  }),
  z.object({
    kind: z.literal('miura'),
    rows: z.number().int().positive().max(1000),
    cols: z.number().int().positive().max(1000),
    a: finite.positive(),
    b: finite.positive(),
    alphaDeg: finite.positive().max(90),
    driveDeg: finite.min(-180).max(180).optional(),
    name: optionalName,
    units: optionalUnits,
  }),
  z.object({ kind: z.literal('waterbomb'), size: finite.positive().optional(), allMidlines: z.boolean().optional(), name: optionalName, units: optionalUnits }),
  z.object({ kind: z.literal('degree5'), sectorsDeg: sectorList.optional(), radius: finite.positive().optional(), name: optionalName, units: optionalUnits }),
]);
export type GeneratorSpec = z.input<typeof GeneratorSpecSchema>;

export const RecoveryEntrySchema = z.object({
  id: z.string().regex(/^[A-Za-z0-9_-]{1,80}$/),
  documentName: z.string(),
  savedAt: z.string(),
  originalPath: z.string().nullable(),
});
export type RecoveryEntry = z.output<typeof RecoveryEntrySchema>;

export const RecentFileSchema = z.object({ path: z.string(), name: z.string() });

// ---------- solver results ----------

export const SolveStatusSchema = z.enum([
  'solved',
  'several-solutions',
  'underspecified',
  'overspecified',
  'inconsistent',
  'dependent-drives',
  'unreachable',
  'not-isolated',
  'invalid',
]);
export type SolveStatusDto = z.output<typeof SolveStatusSchema>;

export const SolutionSchema = z.object({
  /** fold angle per crease, degrees, indexed by crease index */
  anglesDeg: z.array(finite),
  /** largest closure residual, radians */
  maxResidual: finite,
  vertexResiduals: z.array(finite),
  matchesAssignment: z.boolean(),
  localDof: z.number().int(),
  condition: maybeInfinite,
  signs: z.string(),
  /** d(crease)/d(drive) in degrees per degree: [crease index, drive crease index, value] */
  sensitivity: z.array(z.tuple([z.number().int(), z.number().int(), finite])),
  /** creases at ±180° with their panels stacked */
  stacked: z.array(z.number().int()).optional(),
});
export type SolutionDto = z.output<typeof SolutionSchema>;

export const SearchSummarySchema = z.object({
  complete: z.boolean(),
  method: z.string(),
  found: z.number().int(),
  limit: z.number().int().optional(),
  note: z.string(),
});

export const FamilySchema = z.object({
  dof: z.number().int(),
  representative: SolutionSchema,
  /** free directions: per direction, [crease index, component] for every crease that moves */
  directions: z.array(z.array(z.tuple([z.number().int(), finite]))),
  matchesAssignment: z.boolean(),
});
export type FamilyDto = z.output<typeof FamilySchema>;

export const SolveResultSchema = z.object({
  status: SolveStatusSchema,
  dof: z.number().int(),
  patternDof: z.number().int(),
  /** isolated solutions only (local DOF 0) */
  solutions: z.array(SolutionSchema),
  /** continua through the drive values, one representative each */
  families: z.array(FamilySchema),
  search: SearchSummarySchema,
  compromise: SolutionSchema.optional(),
  /** states that close the pattern but put some hinge past its limit (listed apart, not solutions) */
  excluded: z.array(SolutionSchema).optional(),
  /** labels of creases that would complete an underspecified set of drives */
  suggestedDrives: z.array(z.string()).optional(),
  conflictingDrives: z.array(z.string()).optional(),
  reachableRangeDeg: z.array(z.tuple([finite, finite])).optional(),
  /** interior vertices with the largest residual of the compromise: [pattern vertex, residual rad] */
  worstVertices: z.array(z.tuple([z.number().int(), finite])).optional(),
  messages: z.array(MessageSchema),
  iterations: z.number().int(),
});
export type SolveResultDto = z.output<typeof SolveResultSchema>;

export const BranchSchema = z.object({
  id: z.string(),
  name: z.string(),
  group: z.string(),
  matchesAssignment: z.boolean(),
  /** unit tangent per crease */
  tangent: z.array(finite),
});
export type BranchDto = z.output<typeof BranchSchema>;

export const BranchesResultSchema = z.object({ branches: z.array(BranchSchema), messages: z.array(MessageSchema) });
export type BranchesResultDto = z.output<typeof BranchesResultSchema>;

export const PathEventTypeSchema = z.enum(['turning-point', 'branch-point', 'hinge-limit', 'folded-flat', 'corrector-failed', 'contact']);

export const PathSampleSchema = z.object({
  driveDeg: finite,
  anglesDeg: z.array(finite),
  maxResidual: finite,
  /** d(crease)/d(drive) per crease (degrees per degree) */
  rates: z.array(maybeInfinite),
  condition: maybeInfinite,
  nearSingular: z.boolean(),
  /** at or past the first contact of two panels */
  contact: z.boolean().optional(),
  /** pairs of panels (indices) in contact at this sample */
  contacts: z.array(z.tuple([z.number().int(), z.number().int()])).optional(),
  /** static holding torque per drive: [crease index, N·m] */
  torque: z.array(z.tuple([z.number().int(), finite])).optional(),
});
export type PathSampleDto = z.output<typeof PathSampleSchema>;

export const PathEventSchema = z.object({
  type: PathEventTypeSchema,
  driveDeg: finite,
  text: z.string(),
  crease: z.number().int().optional(),
  /** at a branch point: the rays leaving it, and the state there (degrees per crease) */
  branches: z.array(BranchSchema).optional(),
  anglesDeg: z.array(finite).optional(),
  /** contact: the two panels, a point of the contact (base panel's frame) and their distance there */
  panels: z.tuple([z.number().int(), z.number().int()]).optional(),
  point: z.tuple([finite, finite, finite]).optional(),
  distance: finite.optional(),
});
export type PathEventDto = z.output<typeof PathEventSchema>;

export const PathResultSchema = z.object({
  pathId: z.string(),
  driveCrease: z.number().int(),
  driveLabel: z.string(),
  branchId: z.string().optional(),
  branchName: z.string().optional(),
  /** the branch's signs follow the mountain/valley assignment */
  branchMatchesAssignment: z.boolean().optional(),
  /** where the sweep started: the flat state (along a branch), a solved state at the first value, or a given state */
  startKind: z.enum(['flat', 'solution', 'state']).optional(),
  samples: z.array(PathSampleSchema),
  events: z.array(PathEventSchema),
  messages: z.array(MessageSchema),
  /** the sweep stopped early (cancelled or failed); samples hold what was computed */
  complete: z.boolean(),
  /** what the path checked for contact */
  contact: z.object({ checked: z.boolean(), clearance: finite.min(0) }).optional(),
  /** per drive: [crease index, peak torque N·m, drive value there in degrees] */
  peakTorque: z.array(z.tuple([z.number().int(), finite, finite])).optional(),
  /** complete; partial: ended early (an event says why); stopped: cancelled; failed: no start (a message says why) */
  status: z.enum(['complete', 'partial', 'stopped', 'failed']).optional(),
});
export type PathResultDto = z.output<typeof PathResultSchema>;

export const ShapeSchema = z.object({
  vertices: z.array(z.tuple([finite, finite, finite])),
  maxMismatch: finite,
  basePanel: z.number().int(),
});
export type ShapeDto = z.output<typeof ShapeSchema>;

export const PatternSummarySchema = z.object({
  creases: z.number().int(),
  panels: z.number().int(),
  interiorVertices: z.number().int(),
  patternDof: z.number().int().nullable(),
});

/** A job that another job replaced, or that the user cancelled, answers with a status instead of a value. */
function jobResult<T extends z.ZodType>(value: T) {
  return z.discriminatedUnion('status', [
    z.object({ status: z.literal('done'), value }),
    z.object({ status: z.literal('superseded') }),
    z.object({ status: z.literal('cancelled') }),
  ]);
}

const requestId = z.string().regex(/^[A-Za-z0-9:_-]{1,80}$/);
/** Requests that set the solver working may carry the page's id for them, to cancel them with job:cancel. */
const optionalRequestId = { requestId: requestId.optional() };
const patternKey = z.string().min(1).max(120);

export const SweepOptionsSchema = z.object({
  drive: z.string().min(1).max(200),
  fromDeg: finite.min(-180).max(180),
  toDeg: finite.min(-180).max(180),
  stepDeg: finite.positive().max(90),
  /** the other drives, held at their values */
  held: z.array(DriveSpecSchema).max(1000).default([]),
  /** leave the flat state along this branch (from `branches`) */
  branchId: z.string().max(200).optional(),
  /** start from this state (the current solution) instead of the flat sheet */
  startAnglesDeg: z.array(finite).optional(),
  /** check panel contact at every sample (default on), closer than `clearance` (file units) counting */
  contact: z.boolean().default(true),
  clearance: finite.min(0).max(1e9).default(0),
  /** the document's units and loads, for the drive torque (no loads: no torque) */
  units: z.string().max(50).optional(),
  loads: LoadsSchema.optional(),
  /**
   * the start state is a solution of the drives: when nothing else is held at a non-zero value and the
   * state lies on a branch through the flat sheet, follow that branch from flat (the same path, solved
   * exactly vertex by vertex where it can be, and reproduced by `--branch`)
   */
  viaFlatBranch: z.boolean().optional(),
});
export type SweepOptionsDto = z.input<typeof SweepOptionsSchema>;

/**
 * The tolerance panel's request: the sheets follow the path on screen (computed by the `sweep` channel, kept
 * in the worker under its path id), at its samples every `everyDeg` of drive; the options of
 * `hingeplan tolerance` besides (degrees, the document's length unit).
 */
export const ToleranceOptionsSchema = z.object({
  /** the path the sheets follow: the request id of its sweep */
  pathId: z.string().min(1).max(120),
  /** take the path's samples about this far apart (the first and the last always) */
  everyDeg: finite.positive().max(360),
  /** diameter of the positional zone around every vertex, in the document's unit (--position-tol) */
  positionTol: finite.nonnegative().max(1e9).default(0),
  /** every sector angle within ± this many degrees (--sector-tol) */
  sectorTolDeg: finite.nonnegative().lt(45).default(0),
  samples: z.number().int().min(1).max(100_000),
  seed: z.number().int().min(0).max(4_294_967_295),
});
export type ToleranceOptionsDto = z.input<typeof ToleranceOptionsSchema>;

/** Undefined figures (a spread of fewer than two sheets, the first order at a singular state) cross as null. */
const figure = z.number().nullable();

export const ToleranceHingeSchema = z.object({
  crease: z.number().int(),
  label: z.string(),
  /** per drive value, degrees */
  nominalDeg: z.array(figure),
  meanDeg: z.array(figure),
  stdDeg: z.array(figure),
  p05Deg: z.array(figure),
  p50Deg: z.array(figure),
  p95Deg: z.array(figure),
  /** first-order standard deviation from the sensitivities, degrees */
  linearStdDeg: z.array(figure),
});
export type ToleranceHingeDto = z.output<typeof ToleranceHingeSchema>;

const SpreadFigures = z.object({ p05: figure, p50: figure, p95: figure, max: figure });

export const ToleranceResultSchema = z.object({
  driveCrease: z.number().int(),
  driveLabel: z.string(),
  branchName: z.string().optional(),
  /** drive values the nominal path reached, degrees */
  atDeg: z.array(finite),
  samples: z.number().int(),
  requested: z.number().int(),
  seed: z.number().int(),
  status: z.enum(['complete', 'stopped', 'partial', 'failed']),
  /** the tolerance model in words */
  model: z.string(),
  hinges: z.array(ToleranceHingeSchema),
  /** per drive value: the largest vertex closure residual over the sheets (radians) */
  misfit: z.array(SpreadFigures),
  /** per drive value: the equivalent gap at panel edges (the document's unit) */
  gap: z.array(SpreadFigures),
  /** per drive value: first-order RMS residual at the worst vertex (radians) */
  linearMisfit: z.array(figure),
  rigidFraction: z.array(figure),
  lost: z.array(z.number().int()),
  /** the vertices with the largest average share of the misfit, largest first */
  worstVertices: z.array(z.object({ vertex: z.number().int(), share: finite })),
  messages: z.array(MessageSchema),
});
export type ToleranceResultDto = z.output<typeof ToleranceResultSchema>;

export const ExportKindSchema = z.enum(['fold', 'dxf', 'svg', 'obj', 'stl', 'shape-json', 'angle-table', 'schedule']);
export type ExportKind = z.output<typeof ExportKindSchema>;

export const ScheduleProfileSchema = z.enum(['constant', 'trapezoid', 's-curve']);
export type ScheduleProfile = z.output<typeof ScheduleProfileSchema>;

/** The options of `hingeplan table` and `hingeplan schedule` that the export dialog offers (seconds, degrees). */
export const ExportOptionsSchema = z.object({
  /** angle table and schedule: file format */
  format: z.enum(['csv', 'json']).default('csv'),
  /** angle table: a rate column per crease (degrees per degree of drive), as --rates */
  rates: z.boolean().default(false),
  /** angle table: creases to include by label (empty = every crease that is not a boundary edge) */
  creases: z.array(z.string().max(200)).max(100_000).default([]),
  /** schedule: total time of the move, seconds (--time) */
  timeS: finite.positive().max(1e7).default(10),
  /** schedule: drive profile (--profile) */
  profile: ScheduleProfileSchema.default('trapezoid'),
  /** schedule: acceleration phase, seconds (--accel-time; default a quarter of the time) */
  accelTimeS: finite.nonnegative().optional(),
  /** schedule, s-curve: each jerk ramp, seconds (--jerk-time; default a quarter of the acceleration time) */
  jerkTimeS: finite.nonnegative().optional(),
  /** schedule: time step between rows, seconds (--dt), or the number of rows (--rows); default 101 rows */
  dtS: finite.positive().optional(),
  rows: z.number().int().min(2).max(100_000).optional(),
  /** schedule: limits for every hinge (--max-rate deg/s, --max-accel deg/s²) */
  maxRateDegPerS: finite.positive().optional(),
  maxAccelDegPerS2: finite.positive().optional(),
  /** schedule: limits of single hinges by label, over the ones for every hinge (--limit crease=rate:accel) */
  hingeLimits: z
    .array(z.object({ crease: z.string().min(1).max(200), maxRateDegPerS: finite.positive().optional(), maxAccelDegPerS2: finite.positive().optional() }))
    .max(100_000)
    .default([]),
  /** shape exports: the folded state's angles; FOLD: also written as the file's fold angles */
  anglesDeg: z.array(finite).optional(),
  basePanel: z.number().int().nonnegative().optional(),
});
export type ExportOptionsDto = z.input<typeof ExportOptionsSchema>;

// ---------- channels (renderer → main, request/response) ----------

const empty = z.object({}).strict();
const voidResult = z.object({ ok: z.literal(true) });

export const StartupSchema = z.object({
  version: z.string(),
  platform: z.string(),
  document: OpenedDocumentSchema.nullable(),
  recovery: z.array(RecoveryEntrySchema),
  recent: z.array(RecentFileSchema),
  /** the startup document failed to load; shown in the window */
  startupMessages: z.array(MessageSchema),
});
export type StartupInfo = z.output<typeof StartupSchema>;

export const channels = {
  'app:startup': { request: empty, response: StartupSchema },
  'doc:new': { request: GeneratorSpecSchema.and(z.object(optionalRequestId)), response: OpenResultSchema },
  'doc:open': { request: z.object({ format: z.enum(['any', 'fold', 'drawing']).default('any'), ...optionalRequestId }), response: OpenResultSchema },
  'doc:open-recent': { request: z.object({ path: z.string().max(4096), ...optionalRequestId }), response: OpenResultSchema },
  /** read a drawing the window has open again, with its layers assigned as given (only a file main approved) */
  'doc:reread-drawing': { request: z.object({ path: z.string().max(4096), options: DrawingOptionsSchema, ...optionalRequestId }), response: OpenResultSchema },
  'doc:save': {
    request: z.object({
      project: ProjectSchema,
      /** the document's current file (must be one this window opened or saved) or null */
      filePath: z.string().max(4096).nullable(),
      saveAs: z.boolean(),
      suggestedName: z.string().max(200),
      ...optionalRequestId,
    }),
    response: WriteResultSchema,
  },
  'doc:export': {
    request: z.object({
      kind: ExportKindSchema,
      project: ProjectSchema,
      key: patternKey,
      pathId: z.string().max(120).optional(),
      options: ExportOptionsSchema,
      suggestedName: z.string().max(200),
      /** the document's file (one this window opened or saved), whose text the table header names and hashes */
      filePath: z.string().max(4096).nullable().default(null),
      ...optionalRequestId,
    }),
    response: WriteResultSchema,
  },
  'doc:export-chart': {
    request: z.object({
      /** svg: the chart's SVG text; png: the picture as base64 (no data: prefix) */
      format: z.enum(['svg', 'png']),
      data: z.string().max(50_000_000),
      /** e.g. "sunshade-panel.angles" (the extension is added) */
      suggestedName: z.string().max(200),
    }),
    response: WriteResultSchema,
  },
  'doc:state': {
    request: z.object({ dirty: z.boolean(), title: z.string().max(300), filePath: z.string().max(4096).nullable() }),
    response: voidResult,
  },
  'doc:confirm-discard': {
    request: z.object({ documentName: z.string().max(300), action: z.string().max(100) }),
    response: z.object({ choice: z.enum(['save', 'discard', 'cancel']) }),
  },
  'recovery:write': {
    request: z.object({ id: RecoveryEntrySchema.shape.id, project: ProjectSchema, documentName: z.string().max(300), originalPath: z.string().max(4096).nullable() }),
    response: voidResult,
  },
  'recovery:clear': { request: z.object({ id: RecoveryEntrySchema.shape.id }), response: voidResult },
  'recovery:restore': { request: z.object({ id: RecoveryEntrySchema.shape.id }), response: OpenResultSchema },
  'pattern:set': {
    request: z.object({ key: patternKey, source: PatternSourceSchema }),
    response: z.object({ ok: z.boolean(), summary: PatternSummarySchema.nullable(), messages: z.array(MessageSchema) }),
  },
  'solve': {
    request: z.object({ requestId, key: patternKey, drives: z.array(DriveSpecSchema).max(10_000) }),
    response: jobResult(SolveResultSchema),
  },
  'branches': {
    request: z.object({ requestId, key: patternKey, drives: z.array(DriveSpecSchema).max(10_000) }),
    response: jobResult(BranchesResultSchema),
  },
  'sweep': {
    request: z.object({ requestId, key: patternKey, options: SweepOptionsSchema }),
    response: jobResult(PathResultSchema),
  },
  'tolerance': {
    request: z.object({ requestId, key: patternKey, options: ToleranceOptionsSchema }),
    response: jobResult(ToleranceResultSchema),
  },
  'shape': {
    request: z.object({ key: patternKey, anglesDeg: z.array(finite), basePanel: z.number().int().nonnegative().optional(), ...optionalRequestId }),
    response: jobResult(ShapeSchema),
  },
  'job:cancel': { request: z.object({ requestId }), response: z.object({ cancelled: z.boolean() }) },
  'clipboard:write': { request: z.object({ text: z.string().max(50_000_000) }), response: voidResult },
  'app:close-ready': { request: empty, response: voidResult },
} as const;

export type Channel = keyof typeof channels;
export type RequestOf<C extends Channel> = z.input<(typeof channels)[C]['request']>;
export type ParsedRequestOf<C extends Channel> = z.output<(typeof channels)[C]['request']>;
export type ResponseOf<C extends Channel> = z.output<(typeof channels)[C]['response']>;

/** What every invoke answers: a value, or an error as a value. */
export type Envelope<T> = { ok: true; value: T } | { ok: false; error: IpcError };

export const CHANNEL_NAMES = Object.keys(channels) as Channel[];

// ---------- events (main → renderer) ----------

export const MenuCommandSchema = z.enum([
  'new',
  'open',
  'import-fold',
  'import-drawing',
  'save',
  'save-as',
  'export-fold',
  'export-dxf',
  'export-svg',
  'export-obj',
  'export-stl',
  'export-table',
  'undo',
  'redo',
  'compute-path',
  'cancel-job',
  'fit-view',
  'toggle-ghost',
  'toggle-labels',
  'open-recent',
  'save-and-close',
]);
export type MenuCommand = z.output<typeof MenuCommandSchema>;

export const events = {
  'job:progress': z.object({ requestId, done: z.number().nonnegative(), total: z.number().nonnegative(), phase: z.string().max(100).optional() }),
  'menu:command': z.object({ command: MenuCommandSchema, path: z.string().max(4096).optional() }),
} as const;
export type EventName = keyof typeof events;
export type EventOf<E extends EventName> = z.output<(typeof events)[E]>;
export const EVENT_NAMES = Object.keys(events) as EventName[];

// ---------- validation helpers used on both sides ----------

/** One line per problem: the path into the payload and what is wrong there. */
export function describeIssues(error: z.ZodError): string {
  return error.issues
    .slice(0, 5)
    .map((i) => `${i.path.length ? i.path.join('.') : '(payload)'}: ${i.message}`)
    .join('; ');
}

export function parseRequest<C extends Channel>(channel: C, payload: unknown): Envelope<ParsedRequestOf<C>> {
  const spec = channels[channel];
  if (!spec) return { ok: false, error: { code: 'unknown-channel', message: `no such channel: ${String(channel)}` } };
  const r = spec.request.safeParse(payload ?? {});
  if (!r.success) return { ok: false, error: { code: 'bad-request', message: `${channel}: ${describeIssues(r.error)}`, where: channel } };
  return { ok: true, value: r.data as ParsedRequestOf<C> };
}

export function parseResponse<C extends Channel>(channel: C, value: unknown): Envelope<ResponseOf<C>> {
  const r = channels[channel].response.safeParse(value);
  if (!r.success) return { ok: false, error: { code: 'bad-response', message: `${channel}: ${describeIssues(r.error)}`, where: channel } };
  return { ok: true, value: r.data as ResponseOf<C> };
}

/** An envelope as it arrives from the other side: checks its frame, then its value against the channel. */
export function parseEnvelope<C extends Channel>(channel: C, raw: unknown): Envelope<ResponseOf<C>> {
  const frame = z
    .union([z.object({ ok: z.literal(true), value: z.unknown() }), z.object({ ok: z.literal(false), error: IpcErrorSchema })])
    .safeParse(raw);
  if (!frame.success) return { ok: false, error: { code: 'bad-response', message: `${channel}: the answer is not an envelope`, where: channel } };
  if (!frame.data.ok) return { ok: false, error: frame.data.error };
  return parseResponse(channel, frame.data.value);
}

export function parseEvent<E extends EventName>(name: E, payload: unknown): EventOf<E> | undefined {
  const spec = events[name];
  if (!spec) return undefined;
  const r = spec.safeParse(payload);
  return r.success ? (r.data as EventOf<E>) : undefined;
}

/** Non-finite numbers (an infinite condition number) cross as null. */
export function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
