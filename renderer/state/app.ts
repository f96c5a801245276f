// The whole interface state as plain data, changed only by the pure reducer below. The document (project)
// lives in an undo history; solve results, the path, selection and view switches sit beside it and are
// not undone. Work that talks to the main process lives in renderer/controller.ts and dispatches here.

import type {
  BranchesResultDto,
  DocumentFormatSchema,
  DrawingColourDto,
  DrawingLayerDto,
  DrawingOptionsDto,
  MessageDto,
  OpenedDocument,
  PathResultDto,
  ProjectDto,
  SolveResultDto,
} from '../../electron/contract';
import type { z } from 'zod';
import { commit, redo, seal, startHistory, undo, type History } from './history';
import { initialTolerance, toleranceReducer, type ToleranceAction, type ToleranceState } from './tolerance';

export type DocumentFormat = z.output<typeof DocumentFormatSchema>;

export interface DocState {
  /** stable per opened document: names its recovery copy */
  id: string;
  history: History<ProjectDto>;
  /** the project as last saved or opened; dirty when the present differs */
  saved: ProjectDto | null;
  filePath: string | null;
  fileName: string;
  format: DocumentFormat;
  /** the readers' warnings from opening */
  messages: MessageDto[];
  /** a drawing (DXF, SVG): its layers as read and the options it was read with, to read it again otherwise */
  drawing?: { layers: DrawingLayerDto[]; colours: DrawingColourDto[]; options: DrawingOptionsDto };
}

export type JobStatus = 'idle' | 'running' | 'done' | 'cancelled' | 'error';

export interface SolveState {
  status: JobStatus;
  requestId?: string;
  result?: SolveResultDto;
  /**
   * the last result that had a state to show, kept while the current one has none because a drive is past
   * its hinge stop: the views keep that state on screen with the violation marked
   */
  lastValid?: { result: SolveResultDto; selected: number };
  /** the drives the result belongs to (JSON), to tell a stale result from a current one */
  forDrives?: string;
  error?: string;
}

/** What a path started from: the solution on screen, a family's representative, the flat sheet along a branch, or a ray of a branch point. */
export type PathOrigin =
  | { kind: 'solution'; index: number; matchesAssignment: boolean }
  | { kind: 'family'; index: number }
  | { kind: 'flat'; branchId?: string }
  | { kind: 'ray'; name: string; atDeg: number };

/** The numbers a path was computed for (the form can change after). */
export interface PathAsked {
  drive: string;
  fromDeg: number;
  toDeg: number;
  stepDeg: number;
}

export interface PathState {
  status: JobStatus;
  requestId?: string;
  progress?: { done: number; total: number };
  result?: PathResultDto;
  error?: string;
  /** what the path was asked for, to redo it after a branch switch */
  drive?: string;
  branchId?: string;
  /** what the path on screen (result) started from and was asked for */
  origin?: PathOrigin;
  asked?: PathAsked;
  /** the same for the path being computed */
  pending?: { origin?: PathOrigin; asked?: PathAsked };
}

/** The path's form as typed (text, so a half-typed number stays as it is). */
export interface PathForm {
  drive: string;
  from: string;
  to: string;
  step: string;
  /** start from the solution on screen, or from the flat sheet (along branchId, or the one that follows M/V) */
  start: 'solution' | 'flat';
  branchId?: string;
  /** the range was typed by hand: a change of drive no longer resets it */
  rangeTouched: boolean;
  /** check panel contact at every sample, closer than the clearance (sheet units, as typed) counting */
  contact: boolean;
  clearance: string;
}

/** Tabs of the path area; other panels (drive torque, tolerance) add theirs here. */
export type PathTab = 'charts' | 'events' | 'branches' | 'tolerance' | 'torque';

export interface BranchState {
  status: JobStatus;
  requestId?: string;
  result?: BranchesResultDto;
  error?: string;
}

export interface Notice {
  id: number;
  kind: 'error' | 'warning' | 'info';
  title: string;
  messages: MessageDto[];
}

export type DialogName = null | 'new' | 'export' | 'layers';

export interface ViewState {
  ghost: boolean;
  labels: boolean;
  /** bumps to ask the 3D view to fit the shape */
  fitRequest: number;
}

export interface AppState {
  doc: DocState | null;
  solve: SolveState;
  selectedSolution: number;
  /** a family chosen in the solutions panel: its representative is on screen (null: a solution is) */
  selectedFamily: number | null;
  pathForm: PathForm;
  pathTab: PathTab;
  /** the drive the rates on screen are taken against (label; null: the first drive) */
  rateDrive: string | null;
  path: PathState;
  branches: BranchState;
  /** when set, the shown state is this sample of the path (scrubbing) */
  scrubIndex: number | null;
  selectedCrease: number | null;
  hoverCrease: number | null;
  view: ViewState;
  notices: Notice[];
  dialog: DialogName;
  /** a message about the last edit that was refused (bad label, limits in the wrong order, ...) */
  editError: string | null;
  /** the tolerance analysis of the manufactured sheet (renderer/state/tolerance.ts) */
  tolerance: ToleranceState;
}

export const initialPathForm: PathForm = { drive: '', from: '0', to: '180', step: '1', start: 'solution', rangeTouched: false, contact: true, clearance: '0' };

/** The form a document starts with: its first drive, 0° to ±180° on the side the drive folds to now. */
export function pathFormFor(project: ProjectDto, drive?: string): PathForm {
  const d = project.drives.find((x) => x.crease === drive) ?? project.drives[0];
  return { ...initialPathForm, drive: d?.crease ?? '', to: d && d.angleDeg < 0 ? '-180' : '180' };
}

export const initialState: AppState = {
  doc: null,
  solve: { status: 'idle' },
  selectedSolution: 0,
  selectedFamily: null,
  pathForm: initialPathForm,
  pathTab: 'charts',
  rateDrive: null,
  path: { status: 'idle' },
  branches: { status: 'idle' },
  scrubIndex: null,
  selectedCrease: null,
  hoverCrease: null,
  view: { ghost: false, labels: false, fitRequest: 0 },
  notices: [],
  dialog: null,
  editError: null,
  tolerance: initialTolerance,
};

export type Action =
  | { type: 'document-opened'; document: OpenedDocument; id: string }
  | { type: 'edit'; project: ProjectDto; coalesceKey?: string }
  | { type: 'edit-refused'; message: string }
  | { type: 'seal-edit' }
  | { type: 'undo' }
  | { type: 'redo' }
  | { type: 'saved'; filePath: string; fileName: string; project: ProjectDto }
  | { type: 'solve-started'; requestId: string; forDrives: string }
  | { type: 'solve-finished'; requestId: string; result: SolveResultDto; preferAngles?: number[] }
  | { type: 'solve-failed'; requestId: string; error: string }
  | { type: 'select-solution'; index: number }
  | { type: 'select-family'; index: number }
  | { type: 'path-form'; patch: Partial<PathForm> }
  | { type: 'path-tab'; tab: PathTab }
  | { type: 'rate-drive'; label: string | null }
  | { type: 'path-started'; requestId: string; drive: string; branchId?: string; origin?: PathOrigin; asked?: PathAsked }
  | { type: 'path-progress'; requestId: string; done: number; total: number }
  | { type: 'path-finished'; requestId: string; result: PathResultDto }
  | { type: 'path-stopped'; requestId: string; status: 'cancelled' | 'error'; error?: string }
  | { type: 'path-cleared' }
  | { type: 'branches-started'; requestId: string }
  | { type: 'branches-finished'; requestId: string; result: BranchesResultDto }
  | { type: 'branches-failed'; requestId: string; error: string }
  | { type: 'scrub'; index: number | null }
  | { type: 'select-crease'; index: number | null }
  | { type: 'hover-crease'; index: number | null }
  | { type: 'toggle-ghost' }
  | { type: 'toggle-labels' }
  | { type: 'fit-view' }
  | { type: 'notice'; kind: Notice['kind']; title: string; messages: MessageDto[] }
  | { type: 'dismiss-notice'; id: number }
  | { type: 'dialog'; dialog: DialogName }
  | ToleranceAction;

let noticeCounter = 0;

export function isDirty(doc: DocState | null): boolean {
  return !!doc && doc.history.present !== doc.saved;
}

export function currentProject(state: AppState): ProjectDto | null {
  return state.doc?.history.present ?? null;
}

/** Index of the solution nearest to the given angles (to stay on the same branch after a re-solve). */
export function nearestSolution(result: SolveResultDto, anglesDeg: number[] | undefined): number {
  if (result.solutions.length < 2) return 0;
  // with nothing on screen yet, start from the first solution that folds the way the creases are assigned
  if (!anglesDeg) return Math.max(0, result.solutions.findIndex((s) => s.matchesAssignment));
  let best = 0;
  let bestD = Infinity;
  result.solutions.forEach((s, i) => {
    let d = 0;
    for (let k = 0; k < s.anglesDeg.length; k++) {
      const e = s.anglesDeg[k] - (anglesDeg[k] ?? 0);
      d += e * e;
    }
    if (d < bestD) {
      bestD = d;
      best = i;
    }
  });
  return best;
}

export function reducer(state: AppState, action: Action): AppState {
  switch (action.type) {
    case 'document-opened': {
      const d = action.document;
      return {
        ...initialState,
        view: state.view,
        notices: state.notices.filter((n) => n.kind !== 'error'),
        pathForm: pathFormFor(d.project),
        doc: {
          id: action.id,
          history: startHistory(d.project),
          // a recovered document is not saved anywhere yet
          saved: d.recovered ? null : d.project,
          filePath: d.filePath,
          fileName: d.fileName,
          format: d.format,
          messages: d.messages,
          ...(d.drawingLayers ? { drawing: { layers: d.drawingLayers, colours: d.drawingColours ?? [], options: d.drawingOptions ?? { layers: [], strokes: [] } } } : {}),
        },
      };
    }
    case 'edit': {
      if (!state.doc) return state;
      const history = commit(state.doc.history, action.project, action.coalesceKey);
      if (history === state.doc.history) return { ...state, editError: null };
      return { ...state, doc: { ...state.doc, history }, editError: null };
    }
    case 'edit-refused':
      return { ...state, editError: action.message };
    case 'seal-edit':
      return state.doc ? { ...state, doc: { ...state.doc, history: seal(state.doc.history) } } : state;
    case 'undo':
    case 'redo': {
      if (!state.doc) return state;
      const history = action.type === 'undo' ? undo(state.doc.history) : redo(state.doc.history);
      if (history === state.doc.history) return state;
      return { ...state, doc: { ...state.doc, history }, scrubIndex: null, editError: null };
    }
    case 'saved':
      if (!state.doc) return state;
      return {
        ...state,
        doc: { ...state.doc, saved: action.project, filePath: action.filePath, fileName: action.fileName, format: 'project', drawing: undefined },
      };
    case 'solve-started':
      return { ...state, solve: { ...state.solve, status: 'running', requestId: action.requestId, forDrives: action.forDrives } };
    case 'solve-finished': {
      if (state.solve.requestId !== action.requestId) return state;
      const prev = state.solve.result;
      const hasState = (r: SolveResultDto | undefined) => !!r && (r.solutions.length > 0 || r.families.length > 0);
      // a drive past its stop leaves nothing to show: keep the last state that had one
      const pastStop = !hasState(action.result) && action.result.messages.some((m) => m.code === 'drive-outside-limit' || m.code === 'outside-hinge-limits');
      const lastValid = pastStop ? (hasState(prev) ? { result: prev!, selected: state.selectedSolution } : state.solve.lastValid) : undefined;
      const families = action.result.families.length;
      return {
        ...state,
        solve: { status: 'done', requestId: action.requestId, result: action.result, forDrives: state.solve.forDrives, ...(lastValid ? { lastValid } : {}) },
        selectedSolution: nearestSolution(action.result, action.preferAngles),
        // a family stays chosen while the drives keep one; with no isolated solution its representative is shown
        selectedFamily: state.selectedFamily !== null && state.selectedFamily < families ? state.selectedFamily : !action.result.solutions.length && families ? 0 : null,
      };
    }
    case 'solve-failed':
      if (state.solve.requestId !== action.requestId) return state;
      return { ...state, solve: { ...state.solve, status: 'error', error: action.error } };
    case 'select-solution':
      return { ...state, selectedSolution: action.index, selectedFamily: null, scrubIndex: null };
    case 'select-family':
      return { ...state, selectedFamily: action.index, scrubIndex: null };
    case 'path-form': {
      const form = { ...state.pathForm, ...action.patch };
      // a new drive to follow gets the range on the side it folds to, unless the range was typed
      if (action.patch.drive !== undefined && action.patch.drive !== state.pathForm.drive && !form.rangeTouched && state.doc) {
        const { from, to } = pathFormFor(state.doc.history.present, action.patch.drive);
        form.from = from;
        form.to = to;
      }
      return { ...state, pathForm: form };
    }
    case 'path-tab':
      return state.pathTab === action.tab ? state : { ...state, pathTab: action.tab };
    case 'rate-drive':
      return { ...state, rateDrive: action.label };
    case 'path-started':
      return {
        ...state,
        path: {
          status: 'running', requestId: action.requestId, progress: { done: 0, total: 0 }, drive: action.drive, branchId: action.branchId,
          result: state.path.result, origin: state.path.origin, asked: state.path.asked, pending: { origin: action.origin, asked: action.asked },
        },
        scrubIndex: null,
      };
    case 'path-progress':
      if (state.path.requestId !== action.requestId || state.path.status !== 'running') return state;
      return { ...state, path: { ...state.path, progress: { done: action.done, total: action.total } } };
    case 'path-finished':
      if (state.path.requestId !== action.requestId) return state;
      return { ...state, path: { ...state.path, status: 'done', result: action.result, progress: undefined, origin: state.path.pending?.origin, asked: state.path.pending?.asked, pending: undefined } };
    case 'path-stopped':
      if (state.path.requestId !== action.requestId) return state;
      return { ...state, path: { ...state.path, status: action.status, error: action.error } };
    case 'path-cleared':
      return { ...state, path: { status: 'idle' }, scrubIndex: null };
    case 'branches-started':
      return { ...state, branches: { status: 'running', requestId: action.requestId } };
    case 'branches-finished':
      if (state.branches.requestId !== action.requestId) return state;
      return { ...state, branches: { status: 'done', requestId: action.requestId, result: action.result } };
    case 'branches-failed':
      if (state.branches.requestId !== action.requestId) return state;
      return { ...state, branches: { status: 'error', requestId: action.requestId, error: action.error } };
    case 'scrub': {
      const n = state.path.result?.samples.length ?? 0;
      if (action.index === null || n === 0) return { ...state, scrubIndex: null };
      return { ...state, scrubIndex: Math.max(0, Math.min(n - 1, Math.round(action.index))) };
    }
    case 'select-crease':
      return { ...state, selectedCrease: action.index };
    case 'hover-crease':
      return state.hoverCrease === action.index ? state : { ...state, hoverCrease: action.index };
    case 'toggle-ghost':
      return { ...state, view: { ...state.view, ghost: !state.view.ghost } };
    case 'toggle-labels':
      return { ...state, view: { ...state.view, labels: !state.view.labels } };
    case 'fit-view':
      return { ...state, view: { ...state.view, fitRequest: state.view.fitRequest + 1 } };
    case 'notice':
      return {
        ...state,
        notices: [...state.notices.slice(-4), { id: ++noticeCounter, kind: action.kind, title: action.title, messages: action.messages }],
      };
    case 'dismiss-notice':
      return { ...state, notices: state.notices.filter((n) => n.id !== action.id) };
    case 'dialog':
      return { ...state, dialog: action.dialog };
    case 'tolerance-started':
    case 'tolerance-progress':
    case 'tolerance-finished':
    case 'tolerance-stopped':
    case 'tolerance-choose':
      return { ...state, tolerance: toleranceReducer(state.tolerance, action) };
  }
}
