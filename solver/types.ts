// Plain data shared by every part of the solver core. Angles are radians here; degrees only at the edges
// (files, command line, interface). Fold angles: 0 = flat, valley positive, mountain negative.

export type Assignment = 'M' | 'V' | 'U' | 'F' | 'B';

export type Severity = 'error' | 'warning' | 'info';

/** Where in the input a problem is. Indices are zero-based, as in the file. */
export interface Where {
  field?: string;
  vertex?: number;
  crease?: number;
  creaseLabel?: string;
  panel?: number;
  hole?: number;
  line?: number;
}

/** A message with a stable code; errors are values, never throws across the core's boundary. */
export interface Message {
  severity: Severity;
  code: string;
  text: string;
  where?: Where;
}

export interface HingeLimit {
  /** radians; undefined means no limit on that side */
  min?: number;
  max?: number;
}

/** A crease pattern as read from a file, before anything is derived. */
export interface PatternSource {
  name: string;
  /** flat-sheet coordinates, [x, y] per vertex */
  vertices: [number, number][];
  /** vertex index pairs */
  edges: [number, number][];
  assignments: Assignment[];
  /** label per edge as the file gives it; undefined → the edge index is the reference */
  labels: (string | undefined)[];
  /** optional per edge */
  limits: (HingeLimit | undefined)[];
  /** panels as vertex cycles, when the file gives them */
  faces?: number[][];
  /** index into faces (derived panel order when faces are derived) */
  basePanel?: number;
  /** a name per panel, in panel order (undefined: the panel is known by its index) */
  panelNames?: (string | undefined)[];
}

export interface Crease {
  index: number;
  /** the stable reference: the file's label, else the edge index as a string */
  label: string;
  vertices: [number, number];
  assignment: Assignment;
  limit?: HingeLimit;
  /** panel on the left of vertices[0] → vertices[1], -1 if none */
  leftPanel: number;
  /** panel on the right, -1 if none */
  rightPanel: number;
  length: number;
}

export interface Panel {
  index: number;
  /** vertex indices, counter-clockwise */
  vertices: number[];
  /** crease (edge) indices, creases[k] joins vertices[k] and vertices[k+1] */
  creases: number[];
  area: number;
  centroid: [number, number];
  /** the name the file gives the panel, if any */
  name?: string;
}

export interface InteriorVertex {
  vertex: number;
  /** incident edge indices, counter-clockwise by direction angle */
  creases: number[];
  /** direction angle of each crease leaving the vertex, radians, ccw, increasing in [angles[0], angles[0] + 2π) */
  directions: number[];
  /** sectors[k] = angle from creases[k] to creases[k+1] (wrapping), radians */
  sectors: number[];
  /** 2π − Σ sectors; 0 for a developable vertex. Always 0 for a planar sheet, kept for completeness. */
  defect: number;
}

export interface Hole {
  index: number;
  /** vertex cycle of the hole's rim */
  vertices: number[];
  creases: number[];
}

/** A validated pattern with everything derived. Built by buildPattern(); never mutated afterwards. */
export interface Pattern {
  name: string;
  vertices: [number, number][];
  creases: Crease[];
  panels: Panel[];
  interiorVertices: InteriorVertex[];
  holes: Hole[];
  basePanel: number;
  /** label → crease index */
  labelIndex: Map<string, number>;
  /** characteristic size (bounding-box diagonal) used for tolerances */
  size: number;
}

export interface Drive {
  crease: number;
  /** radians */
  value: number;
}

export type SolveStatus =
  | 'solved'
  | 'several-solutions'
  | 'underspecified'
  | 'overspecified'
  | 'inconsistent'
  | 'dependent-drives'
  | 'unreachable'
  | 'not-isolated'
  | 'invalid';

export interface Solution {
  /** fold angle of every crease (radians), indexed by crease index; drives and held creases included */
  angles: Float64Array;
  /** largest closure residual over all vertices, radians */
  maxResidual: number;
  /** residual norm at each interior vertex, same order as pattern.interiorVertices */
  vertexResiduals: number[];
  /** signs agree with the mountain/valley assignment (unassigned creases agree with either sign) */
  matchesAssignment: boolean;
  /** dimension of the closed states through this one with the drives held: 0 for an isolated state */
  localDof: number;
  /** first-order free directions (free creases − Jacobian rank) where they exceed localDof: a singular isolated state */
  nullity?: number;
  /**
   * d(crease)/d(drive), degrees per degree: per drive crease, an array over every crease index (defined for the
   * free creases: movable and not driven; 0 elsewhere). Empty for a family's representative.
   */
  sensitivity: Map<number, Float64Array>;
  /** 2-norm condition number of the Jacobian on its non-null part (∞ when rank is 0) */
  condition: number;
  /** '+', '-' or '0' per crease: a compact sign pattern for display */
  signs: string;
  /** creases at ±180° whose two panels lie on each other (folded flat, stacked), when any */
  stacked?: number[];
}

/** How a solve looked for its solutions, and whether the list is proven to hold them all. */
export interface SearchSummary {
  /** true only where the method proves that every isolated solution and every family was found */
  complete: boolean;
  /** the method in words, e.g. "closed form (spherical four-bar)", "vertex-by-vertex enumeration" */
  method: string;
  /** how many distinct states (isolated solutions, family representatives, excluded states) were found */
  found: number;
  /** the cap that stopped the search, when one did (then complete is false) */
  limit?: number;
  /** what was done and, when not complete, what could have been missed */
  note: string;
}

/** A continuum of closed states through the drive values (local DOF > 0 with the drives held). */
export interface Family {
  /** local DOF with the drives held */
  dof: number;
  /** one closed state of the family (sensitivities are not defined there and are left empty) */
  representative: Solution;
  /** free directions of the family: an orthonormal null-space basis, each as crease index → component */
  directions: Map<number, number>[];
  /** the representative's signs agree with the mountain/valley assignment */
  matchesAssignment: boolean;
}

export interface SolveReport {
  status: SolveStatus;
  /** degrees of freedom that remain with the drives set (0 when the drives fix the pattern locally) */
  dof: number;
  /** DOF of the pattern with no drives, at a generic folded state */
  patternDof: number;
  /** isolated states only (local DOF 0 with the drives held), each with its sensitivities */
  solutions: Solution[];
  /** continua through the drive values: one representative per family found */
  families: Family[];
  /** how the solutions were looked for, and whether the list is complete */
  search: SearchSummary;
  /** states that close the pattern but put some hinge past its limit */
  excluded?: Solution[];
  /** for inconsistent/unreachable: the least-squares compromise */
  compromise?: Solution;
  /** underspecified: creases that would complete the specification */
  suggestedDrives?: number[];
  /** inconsistent / dependent: drives involved */
  conflictingDrives?: number[];
  /** unreachable with one free DOF: reachable range of the (single) drive, radians */
  reachableRange?: [number, number][];
  messages: Message[];
  iterations: number;
}

/** A folded state placed in space. */
export interface Shape {
  /** folded position of every vertex, in the file's vertex order (as reached from its first panel) */
  vertices: [number, number, number][];
  /** per panel: 3×4 row-major rigid transform from flat coordinates (x, y, 0) to space */
  panelTransforms: Float64Array[];
  /** largest distance between two placements of one vertex reached through different panels */
  maxMismatch: number;
  basePanel: number;
}
