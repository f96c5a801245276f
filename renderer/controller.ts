// Everything the interface asks of the main process, in one place: opening and saving, solving when the
// drives change, paths with progress and cancel, exports, the unsaved-changes prompt and recovery copies.
// Views call these methods; results come back as actions on the store.

import type { HingeplanApi } from './api';
import type { BranchDto, PathEventDto, DriveSpec, DrawingOptionsDto, ExportKind, ExportOptionsDto, GeneratorSpec, MenuCommand, MessageDto, OpenResult, ProjectDto, SweepOptionsDto, ToleranceOptionsDto } from '../electron/contract';
import { currentProject, isDirty, type AppState, type PathOrigin } from './state/app';
import { flippedRange, type PathFixId } from './state/path-words';
import type { Store } from './state/store';
import { addDrive, creaseIndexByLabel, removeDrive, setDriveAngle, type Edit } from './state/document';
import { shownState } from './state/display';
import { svgToPngBase64 } from './chart-export';

let counter = 0;
export function newId(prefix: string): string {
  counter += 1;
  return `${prefix}-${Date.now().toString(36)}-${counter}`;
}

/** How long edits wait before their recovery copy is written. */
export const RECOVERY_DELAY_MS = 2000;

export interface PathRequest {
  drive?: string;
  fromDeg?: number;
  toDeg?: number;
  stepDeg?: number;
  /** start from the solution on screen (default) or from the flat sheet */
  start?: 'solution' | 'flat';
  /** from flat: along this branch (ids of the branches at flat) */
  branchId?: string;
  /** start from this state (degrees per crease): a ray leaving a branch point */
  startAnglesDeg?: number[];
  ray?: { name: string; atDeg: number };
}

export class Controller {
  private patternKeys = new WeakMap<object, string>();
  private patternsSent = new Map<string, Promise<boolean>>();
  private solvedFor: { source: unknown; drives: unknown } | null = null;
  private recoveryTimer: ReturnType<typeof setTimeout> | undefined;
  private lastDocState = '';
  /** the request id of the export being written, if one is */
  private runningExport: string | undefined;
  private unsubscribe: (() => void)[] = [];
  /** a document asked for its path at opening: computed once its first solve is in, from that solution */
  private autoPath = false;

  constructor(
    readonly api: HingeplanApi,
    readonly store: Store,
  ) {}

  get state(): AppState {
    return this.store.getState();
  }

  start(): void {
    this.unsubscribe.push(this.store.subscribe(() => this.onStateChange()));
    this.unsubscribe.push(
      this.api.onProgress((e) => {
        this.store.dispatch({ type: 'path-progress', requestId: e.requestId, done: e.done, total: e.total });
        this.store.dispatch({ type: 'tolerance-progress', requestId: e.requestId, done: e.done, total: e.total });
      }),
    );
    this.unsubscribe.push(this.api.onMenuCommand((e) => void this.command(e.command, e.path)));
  }

  stop(): void {
    for (const u of this.unsubscribe) u();
    this.unsubscribe = [];
    clearTimeout(this.recoveryTimer);
  }

  // ---------- documents ----------

  async startup(): Promise<void> {
    const r = await this.api.startup({});
    if (!r.ok) return this.fail('Hingeplan could not start', r.error.message);
    const info = r.value;
    if (info.startupMessages.length) this.store.dispatch({ type: 'notice', kind: 'error', title: 'The startup document could not be opened', messages: info.startupMessages });
    if (info.document) this.opened({ status: 'opened', document: info.document });
    if (info.recovery.length) {
      this.store.dispatch({
        type: 'notice',
        kind: 'info',
        title: 'Unsaved edits from an earlier session were kept',
        messages: info.recovery.map((e) => ({ severity: 'info', code: `recovery:${e.id}`, text: `${e.documentName}, ${new Date(e.savedAt).toLocaleString()}` })),
      });
    }
  }

  /** Apply an open/new result: show the document, or the readers' messages saying what is wrong. */
  opened(result: OpenResult): boolean {
    if (result.status === 'canceled') return false;
    if (result.status === 'failed') {
      this.store.dispatch({ type: 'notice', kind: 'error', title: `${result.fileName} could not be opened`, messages: result.messages });
      return false;
    }
    const doc = result.document;
    this.solvedFor = null;
    this.store.dispatch({ type: 'document-opened', document: doc, id: newId('doc') });
    const problems = doc.messages.filter((m) => m.severity !== 'info');
    if (problems.length) this.store.dispatch({ type: 'notice', kind: 'warning', title: `${doc.fileName}: the readers reported`, messages: problems });
    // a drawing's cleaning report (what was snapped, split, merged, dropped) is worth seeing once
    const report = doc.format === 'dxf' || doc.format === 'svg' ? doc.messages.filter((m) => m.severity === 'info') : [];
    if (report.length) this.store.dispatch({ type: 'notice', kind: 'info', title: `${doc.fileName}: how the drawing was read`, messages: report });
    this.store.dispatch({ type: 'fit-view' });
    this.autoPath = !!doc.computePath && doc.project.drives.length === 1;
    if (doc.recovered) this.scheduleRecovery();
    return true;
  }

  /** Ask before an action would drop unsaved edits. Resolves true when it may go ahead. */
  async confirmDiscard(action: string): Promise<boolean> {
    const doc = this.state.doc;
    if (!doc || !isDirty(doc)) return true;
    const r = await this.api.confirmDiscard({ documentName: doc.fileName, action });
    if (!r.ok) return false;
    if (r.value.choice === 'cancel') return false;
    if (r.value.choice === 'save') return this.save(false);
    await this.clearRecovery();
    return true;
  }

  async open(format: 'any' | 'fold' | 'drawing' = 'any'): Promise<void> {
    if (!(await this.confirmDiscard(format === 'fold' ? 'import a FOLD file' : format === 'drawing' ? 'import a drawing' : 'open another file'))) return;
    const r = await this.api.open({ format });
    if (!r.ok) return this.fail('The file could not be opened', r.error.message);
    this.opened(r.value);
  }

  /** Read the open drawing again with its layers assigned as given (the Layers dialog). A message, or null when done. */
  async rereadDrawing(options: DrawingOptionsDto): Promise<MessageDto[] | null> {
    const doc = this.state.doc;
    if (!doc?.filePath || !doc.drawing) return [{ severity: 'error', code: 'no-drawing', text: 'The document is not a drawing read from a file.' }];
    if (!(await this.confirmDiscard('read the drawing again'))) return null;
    const r = await this.api.rereadDrawing({ path: doc.filePath, options });
    if (!r.ok) return [{ severity: 'error', code: r.error.code, text: r.error.message }];
    if (r.value.status === 'failed') return r.value.messages;
    this.opened(r.value);
    return null;
  }

  async openRecent(path: string): Promise<void> {
    if (!(await this.confirmDiscard('open another file'))) return;
    const r = await this.api.openRecent({ path });
    if (!r.ok) return this.fail('The file could not be opened', r.error.message);
    this.opened(r.value);
  }

  async newDocument(spec: GeneratorSpec): Promise<boolean> {
    if (!(await this.confirmDiscard('start a new pattern'))) return false;
    const r = await this.api.newDocument(spec);
    if (!r.ok) {
      this.fail('The pattern could not be made', r.error.message);
      return false;
    }
    return this.opened(r.value);
  }

  async restoreRecovery(id: string): Promise<void> {
    if (!(await this.confirmDiscard('restore the recovered edits'))) return;
    const r = await this.api.restoreRecovery({ id });
    if (!r.ok) return this.fail('The recovery copy could not be read', r.error.message);
    this.opened(r.value);
  }

  async discardRecovery(id: string): Promise<void> {
    await this.api.clearRecovery({ id });
  }

  /** Save; resolves true when the document is on disk. */
  async save(saveAs: boolean): Promise<boolean> {
    const doc = this.state.doc;
    if (!doc) return false;
    const project = doc.history.present;
    const r = await this.api.save({ project, filePath: doc.filePath, saveAs: saveAs || doc.format !== 'project', suggestedName: doc.fileName });
    if (!r.ok) {
      this.fail('The document was not saved', r.error.message);
      return false;
    }
    if (r.value.status === 'canceled') return false;
    if (r.value.status === 'failed') {
      this.fail('The document was not saved', r.value.message);
      return false;
    }
    this.store.dispatch({ type: 'saved', filePath: r.value.filePath, fileName: r.value.fileName, project });
    await this.clearRecovery();
    return true;
  }

  async exportFile(kind: ExportKind, options: ExportOptionsDto): Promise<string | null> {
    const doc = this.state.doc;
    const project = currentProject(this.state);
    if (!doc || !project) return null;
    const key = await this.ensurePattern(project);
    if (!key) return null;
    const shown = this.shownAngles();
    // a table export can take a while: "cancel running job" stops it too
    const requestId = newId('export');
    this.runningExport = requestId;
    const r = await this.api
      .exportFile({
        kind,
        project,
        key,
        pathId: this.state.path.result?.pathId,
        options: { ...options, anglesDeg: options.anglesDeg ?? shown ?? undefined, basePanel: project.source.basePanel },
        suggestedName: doc.fileName,
        filePath: doc.filePath,
        requestId,
      })
      .finally(() => {
        if (this.runningExport === requestId) this.runningExport = undefined;
      });
    if (!r.ok) {
      this.fail('The export failed', r.error.message);
      return null;
    }
    if (r.value.status === 'failed') {
      this.fail('The export failed', r.value.message);
      return null;
    }
    if (r.value.status === 'canceled') return null;
    this.store.dispatch({ type: 'notice', kind: 'info', title: `Exported ${r.value.fileName}`, messages: [{ severity: 'info', code: 'exported', text: r.value.filePath }] });
    return r.value.filePath;
  }

  /** The path charts as an SVG file or a PNG picture, to a file the person chooses. */
  async exportChart(format: 'svg' | 'png', svg: string, size: { width: number; height: number }): Promise<string | null> {
    const doc = this.state.doc;
    if (!doc) return null;
    let data = svg;
    if (format === 'png') {
      try {
        data = await svgToPngBase64(svg, size.width, size.height);
      } catch (err) {
        this.fail('The chart was not exported', err instanceof Error ? err.message : String(err));
        return null;
      }
    }
    const path = this.state.path.result;
    const r = await this.api.exportChart({ format, data, suggestedName: `${doc.fileName.replace(/\.hingeplan\.json$|\.json$|\.fold$/i, '')}.path-${path?.driveLabel ?? 'chart'}` });
    if (!r.ok) {
      this.fail('The chart was not exported', r.error.message);
      return null;
    }
    if (r.value.status === 'failed') {
      this.fail('The chart was not exported', r.value.message);
      return null;
    }
    if (r.value.status === 'canceled') return null;
    this.store.dispatch({ type: 'notice', kind: 'info', title: `Exported ${r.value.fileName}`, messages: [{ severity: 'info', code: 'exported', text: r.value.filePath }] });
    return r.value.filePath;
  }

  async copyText(text: string): Promise<boolean> {
    const r = await this.api.copyText({ text });
    if (!r.ok) this.fail('Nothing was copied', r.error.message);
    return r.ok;
  }

  // ---------- edits ----------

  /** Apply an edit to the document, or show why it was refused. */
  edit(make: (p: ProjectDto) => Edit, coalesceKey?: string): boolean {
    const project = currentProject(this.state);
    if (!project) return false;
    const r = make(project);
    if (!r.ok) {
      this.store.dispatch({ type: 'edit-refused', message: r.message });
      return false;
    }
    this.store.dispatch({ type: 'edit', project: r.project, coalesceKey });
    return true;
  }

  setDrive(label: string, angleDeg: number, dragging = false): void {
    this.edit((p) => setDriveAngle(p, label, angleDeg), dragging ? `drive:${label}` : undefined);
    if (!dragging) this.store.dispatch({ type: 'seal-edit' });
  }

  toggleDrive(index: number): void {
    const project = currentProject(this.state);
    if (!project) return;
    const label = project.source.labels[index] ?? String(index);
    if (project.drives.some((d) => d.crease === label)) this.edit((p) => removeDrive(p, label));
    else {
      // start the new drive where the crease is now, to full precision, so marking it does not jump the
      // shape nor turn a consistent state into an inconsistent one
      const now = this.shownAngles()?.[index] ?? 0;
      this.edit((p) => addDrive(p, index, now));
    }
  }

  /** End a scrub: the drive takes the sample's value (one undo step) and the solve follows. */
  commitScrub(): void {
    const s = this.state;
    const path = s.path.result;
    if (s.scrubIndex === null || !path) return;
    const sample = path.samples[s.scrubIndex];
    const project = currentProject(s);
    if (!project || !sample) return;
    if (project.drives.some((d) => d.crease === path.driveLabel)) this.setDrive(path.driveLabel, sample.driveDeg);
  }

  undo(): void {
    this.store.dispatch({ type: 'undo' });
  }

  redo(): void {
    this.store.dispatch({ type: 'redo' });
  }

  // ---------- solver ----------

  /** The key the solver knows this pattern by: one per source object, sent once. */
  async ensurePattern(project: ProjectDto): Promise<string | null> {
    const doc = this.state.doc;
    if (!doc) return null;
    let key = this.patternKeys.get(project.source);
    if (!key) {
      key = `${doc.id}:${newId('p')}`;
      this.patternKeys.set(project.source, key);
    }
    let sent = this.patternsSent.get(key);
    if (!sent) {
      sent = this.api.setPattern({ key, source: project.source }).then((r) => {
        if (!r.ok) {
          this.fail('The solver could not take the pattern', r.error.message);
          this.patternsSent.delete(key!);
          return false;
        }
        if (!r.value.ok) {
          this.store.dispatch({ type: 'notice', kind: 'error', title: 'The pattern has errors', messages: r.value.messages });
          return false;
        }
        return true;
      });
      this.patternsSent.set(key, sent);
    }
    return (await sent) ? key : null;
  }

  async solve(): Promise<void> {
    const project = currentProject(this.state);
    if (!project) return;
    this.solvedFor = { source: project.source, drives: project.drives };
    const requestId = newId('solve');
    const drives: DriveSpec[] = project.drives;
    this.store.dispatch({ type: 'solve-started', requestId, forDrives: JSON.stringify(drives) });
    const key = await this.ensurePattern(project);
    if (!key) {
      this.store.dispatch({ type: 'solve-failed', requestId, error: 'the pattern could not be given to the solver' });
      return;
    }
    const prefer = this.shownAngles() ?? undefined;
    const r = await this.api.solve({ requestId, key, drives });
    if (!r.ok) {
      this.store.dispatch({ type: 'solve-failed', requestId, error: r.error.message });
      return;
    }
    if (r.value.status === 'done') {
      this.store.dispatch({ type: 'solve-finished', requestId, result: r.value.value, preferAngles: prefer });
      if (this.autoPath && this.state.solve.requestId === requestId) {
        this.autoPath = false;
        void this.computePath();
      }
    }
  }

  /** Choose a solution card; a path that followed the solution on screen follows the new one. */
  selectSolution(index: number): void {
    this.store.dispatch({ type: 'select-solution', index });
    this.refollow();
  }

  selectFamily(index: number): void {
    this.store.dispatch({ type: 'select-family', index });
    this.refollow();
  }

  private refollow(): void {
    const p = this.state.path;
    if (p.status === 'running' || !p.result) return;
    if (p.origin?.kind === 'solution' || p.origin?.kind === 'family') void this.computePath({ start: 'solution' });
  }

  /** One of the fixes the path panel offers when a path has no samples or ends early. */
  async applyFix(id: PathFixId): Promise<void> {
    const asked = this.state.path.asked;
    switch (id) {
      case 'from-solution':
        this.store.dispatch({ type: 'path-form', patch: { start: 'solution' } });
        return this.computePath({ start: 'solution' });
      case 'from-flat':
        this.store.dispatch({ type: 'path-form', patch: { start: 'flat', branchId: undefined } });
        return this.computePath({ start: 'flat' });
      case 'flip': {
        if (!asked) return;
        const f = flippedRange(asked);
        this.store.dispatch({ type: 'path-form', patch: { from: String(f.fromDeg), to: String(f.toDeg), rangeTouched: true } });
        return this.computePath({ ...f, start: this.state.pathForm.start });
      }
      case 'branches':
        this.store.dispatch({ type: 'path-tab', tab: 'branches' });
        if (this.state.branches.status !== 'done') await this.loadBranches();
        return;
    }
  }

  /** The path form's numbers, or the first problem with them in words. */
  pathNumbers(request: PathRequest = {}): { drive: string; fromDeg: number; toDeg: number; stepDeg: number } | string {
    const form = this.state.pathForm;
    const project = currentProject(this.state);
    const drive = request.drive ?? (project?.drives.some((d) => d.crease === form.drive) ? form.drive : project?.drives[0]?.crease);
    if (!drive) return 'Mark a crease as a drive first (click it on the sheet).';
    const num = (t: string) => Number(t.trim().replace('°', '').replace(',', '.').replace('−', '-'));
    const fromDeg = request.fromDeg ?? num(form.from);
    const toDeg = request.toDeg ?? num(form.to);
    const stepDeg = request.stepDeg ?? num(form.step);
    if (![fromDeg, toDeg].every((v) => Number.isFinite(v) && v >= -180 && v <= 180)) return 'The range must lie between −180° and 180°.';
    if (!(stepDeg > 0 && stepDeg <= 90)) return 'The step must be above 0° and at most 90°.';
    if (fromDeg === toDeg) return 'The range is empty: “from” equals “to”.';
    return { drive, fromDeg, toDeg, stepDeg };
  }

  /**
   * Compute the path of a drive over the form's range. By default it starts from the solution on screen
   * (or the family's state on screen): the sweep follows that state's family to the start of the range and
   * on, so the charts show the solution the person chose. From the flat sheet it leaves along the branch
   * chosen (or the one that follows the assignment); a ray of a branch point starts from its state.
   */
  async computePath(request: PathRequest = {}): Promise<void> {
    const project = currentProject(this.state);
    if (!project) return;
    const numbers = this.pathNumbers(request);
    if (typeof numbers === 'string') {
      this.store.dispatch({ type: 'notice', kind: 'warning', title: 'The path was not computed', messages: [{ severity: 'warning', code: 'bad-path-request', text: numbers }] });
      return;
    }
    const { drive, fromDeg, toDeg, stepDeg } = numbers;
    const start = request.start ?? this.state.pathForm.start;
    let origin: PathOrigin;
    let startAnglesDeg: number[] | undefined;
    let branchId: string | undefined;
    const s = this.state;
    const result = s.solve.result;
    if (request.startAnglesDeg) {
      startAnglesDeg = request.startAnglesDeg;
      origin = { kind: 'ray', name: request.ray?.name ?? 'a ray', atDeg: request.ray?.atDeg ?? fromDeg };
      branchId = request.branchId;
    } else if (start === 'solution' && result && s.selectedFamily !== null && result.families[s.selectedFamily]) {
      startAnglesDeg = result.families[s.selectedFamily].representative.anglesDeg;
      origin = { kind: 'family', index: s.selectedFamily };
    } else if (start === 'solution' && result?.solutions.length) {
      const k = Math.min(s.selectedSolution, result.solutions.length - 1);
      startAnglesDeg = result.solutions[k].anglesDeg;
      origin = { kind: 'solution', index: k, matchesAssignment: result.solutions[k].matchesAssignment };
    } else {
      branchId = request.branchId ?? (start === 'flat' ? s.pathForm.branchId : undefined);
      origin = { kind: 'flat', ...(branchId ? { branchId } : {}) };
    }
    const form = this.state.pathForm;
    const clearance = Number(form.clearance.trim().replace(',', '.'));
    if (form.contact && !(Number.isFinite(clearance) && clearance >= 0)) {
      this.store.dispatch({ type: 'notice', kind: 'warning', title: 'The path was not computed', messages: [{ severity: 'warning', code: 'bad-clearance', text: `The clearance must be a length of 0 or more${project.units ? ` (${project.units})` : ''}.` }] });
      return;
    }
    const requestId = newId('sweep');
    this.store.dispatch({ type: 'path-started', requestId, drive, branchId, origin, asked: { drive, fromDeg, toDeg, stepDeg } });
    const key = await this.ensurePattern(project);
    if (!key) {
      this.store.dispatch({ type: 'path-stopped', requestId, status: 'error', error: 'the pattern could not be given to the solver' });
      return;
    }
    const options: SweepOptionsDto = {
      drive,
      fromDeg,
      toDeg,
      stepDeg,
      held: project.drives.filter((d) => d.crease !== drive),
      ...(branchId && !startAnglesDeg ? { branchId } : {}),
      ...(startAnglesDeg ? { startAnglesDeg } : {}),
      // a solution's path runs along its branch from flat when it lies on one (exact, and `--branch` repeats it)
      ...(startAnglesDeg && origin.kind !== 'ray' ? { viaFlatBranch: true } : {}),
      contact: form.contact,
      clearance: form.contact ? clearance : 0,
      ...(project.units ? { units: project.units } : {}),
      ...(project.loads ? { loads: project.loads } : {}),
    };
    const r = await this.api.sweep({ requestId, key, options });
    if (!r.ok) {
      this.store.dispatch({ type: 'path-stopped', requestId, status: 'error', error: r.error.message });
      return;
    }
    if (r.value.status === 'done') this.store.dispatch({ type: 'path-finished', requestId, result: r.value.value });
    else this.store.dispatch({ type: 'path-stopped', requestId, status: 'cancelled' });
  }

  /**
   * Leave a branch point of the path along one of its rays: start half a degree of drive along the ray's
   * first-order direction (the solver closes that state) and follow the drive to the same end.
   */
  async followRay(event: PathEventDto, branch: BranchDto): Promise<void> {
    const path = this.state.path.result;
    if (!path || !event.anglesDeg) return;
    const d = path.driveCrease;
    const td = branch.tangent[d] ?? 0;
    if (Math.abs(td) < 1e-6) {
      this.store.dispatch({ type: 'notice', kind: 'warning', title: `Branch ${branch.name} does not move the drive`, messages: [{ severity: 'warning', code: 'ray-without-drive', text: `Along ${branch.name} the drive ${path.driveLabel} stays put; drive another crease to follow it.` }] });
      return;
    }
    const scale = 0.5 / Math.abs((td * 180) / Math.PI);
    const start = event.anglesDeg.map((a, c) => a + ((branch.tangent[c] ?? 0) * 180 * scale) / Math.PI);
    const fromDeg = start[d];
    const asked = this.state.path.asked;
    const ends = asked ? [asked.fromDeg, asked.toDeg] : [0, 180];
    const toDeg = Math.sign(td) > 0 ? Math.max(fromDeg, ...ends) : Math.min(fromDeg, ...ends);
    await this.computePath({ drive: path.driveLabel, fromDeg, toDeg: toDeg === fromDeg ? (td > 0 ? 180 : -180) : toDeg, stepDeg: asked?.stepDeg, startAnglesDeg: start, branchId: `ray:${branch.name}`, ray: { name: branch.name, atDeg: event.driveDeg } });
  }

  /** Stop what runs: an export being written, and the path being computed. */
  async cancelRunning(): Promise<void> {
    if (this.runningExport) await this.api.cancelJob({ requestId: this.runningExport });
    await this.cancelPath();
  }

  async cancelPath(): Promise<void> {
    const id = this.state.path.requestId;
    if (!id || this.state.path.status !== 'running') return;
    await this.api.cancelJob({ requestId: id });
    this.store.dispatch({ type: 'path-stopped', requestId: id, status: 'cancelled' });
  }

  // ---------- tolerance ----------

  /** Follow random manufactured sheets along the path on screen in the solver worker (hingeplan tolerance). */
  async runTolerance(options: ToleranceOptionsDto): Promise<void> {
    const project = currentProject(this.state);
    if (!project) return;
    const requestId = newId('tolerance');
    this.store.dispatch({ type: 'tolerance-started', requestId, request: options });
    const key = await this.ensurePattern(project);
    if (!key) {
      this.store.dispatch({ type: 'tolerance-stopped', requestId, status: 'error', error: 'the pattern could not be given to the solver' });
      return;
    }
    const r = await this.api.tolerance({ requestId, key, options });
    if (!r.ok) {
      this.store.dispatch({ type: 'tolerance-stopped', requestId, status: 'error', error: r.error.message });
      return;
    }
    if (r.value.status === 'done') this.store.dispatch({ type: 'tolerance-finished', requestId, result: r.value.value });
    else this.store.dispatch({ type: 'tolerance-stopped', requestId, status: 'cancelled' });
  }

  async cancelTolerance(): Promise<void> {
    const id = this.state.tolerance.requestId;
    if (!id || this.state.tolerance.status !== 'running') return;
    await this.api.cancelJob({ requestId: id });
    this.store.dispatch({ type: 'tolerance-stopped', requestId: id, status: 'cancelled' });
  }

  async loadBranches(): Promise<void> {
    const project = currentProject(this.state);
    if (!project) return;
    const requestId = newId('branches');
    this.store.dispatch({ type: 'branches-started', requestId });
    const key = await this.ensurePattern(project);
    if (!key) return;
    const r = await this.api.branches({ requestId, key, drives: project.drives });
    if (!r.ok) this.store.dispatch({ type: 'branches-failed', requestId, error: r.error.message });
    else if (r.value.status === 'done') this.store.dispatch({ type: 'branches-finished', requestId, result: r.value.value });
  }

  /** Angles on screen (degrees per crease), or null when nothing is solved. */
  shownAngles(): number[] | null {
    const project = currentProject(this.state);
    if (!project) return null;
    const shown = shownState(this.state, project.source.edges.length);
    return shown.source === 'flat' ? null : shown.anglesDeg;
  }

  // ---------- reactions to state changes ----------

  private onStateChange(): void {
    const s = this.state;
    const project = currentProject(s);
    if (project && (!this.solvedFor || this.solvedFor.source !== project.source || this.solvedFor.drives !== project.drives)) {
      void this.solve();
    }
    const doc = s.doc;
    const docState = doc ? JSON.stringify([isDirty(doc), doc.fileName, doc.filePath]) : '';
    if (doc && docState !== this.lastDocState) {
      this.lastDocState = docState;
      void this.api.setDocumentState({ dirty: isDirty(doc), title: doc.fileName, filePath: doc.filePath });
      if (isDirty(doc)) this.scheduleRecovery();
    } else if (doc && isDirty(doc)) this.scheduleRecovery();
  }

  private scheduleRecovery(): void {
    clearTimeout(this.recoveryTimer);
    this.recoveryTimer = setTimeout(() => void this.writeRecovery(), RECOVERY_DELAY_MS);
  }

  async writeRecovery(): Promise<void> {
    const doc = this.state.doc;
    if (!doc || !isDirty(doc)) return;
    await this.api.writeRecovery({ id: doc.id, project: doc.history.present, documentName: doc.fileName, originalPath: doc.filePath });
  }

  private async clearRecovery(): Promise<void> {
    clearTimeout(this.recoveryTimer);
    const doc = this.state.doc;
    if (doc) await this.api.clearRecovery({ id: doc.id });
  }

  // ---------- menu commands and shortcuts ----------

  async command(command: MenuCommand, path?: string): Promise<void> {
    switch (command) {
      case 'new':
        this.store.dispatch({ type: 'dialog', dialog: 'new' });
        return;
      case 'open':
        return this.open('any');
      case 'import-fold':
        return this.open('fold');
      case 'import-drawing':
        return this.open('drawing');
      case 'open-recent':
        if (path) return this.openRecent(path);
        return;
      case 'save':
        await this.save(false);
        return;
      case 'save-as':
        await this.save(true);
        return;
      case 'save-and-close':
        if (await this.save(false)) await this.api.closeReady({});
        return;
      case 'export-fold':
        await this.exportFile('fold', {});
        return;
      case 'export-dxf':
        await this.exportFile('dxf', {});
        return;
      case 'export-svg':
        await this.exportFile('svg', {});
        return;
      case 'export-obj':
        await this.exportFile('obj', {});
        return;
      case 'export-stl':
        await this.exportFile('stl', {});
        return;
      case 'export-table':
        this.store.dispatch({ type: 'dialog', dialog: 'export' });
        return;
      case 'undo':
        return this.undo();
      case 'redo':
        return this.redo();
      case 'compute-path':
        return this.computePath();
      case 'cancel-job':
        return this.cancelRunning();
      case 'fit-view':
        this.store.dispatch({ type: 'fit-view' });
        return;
      case 'toggle-ghost':
        this.store.dispatch({ type: 'toggle-ghost' });
        return;
      case 'toggle-labels':
        this.store.dispatch({ type: 'toggle-labels' });
        return;
    }
  }

  private fail(title: string, text: string): void {
    this.store.dispatch({ type: 'notice', kind: 'error', title, messages: [{ severity: 'error', code: 'failed', text }] });
  }

  /** The drive crease index of a label (for views). */
  driveIndex(label: string): number | undefined {
    const project = currentProject(this.state);
    return project ? creaseIndexByLabel(project, label) : undefined;
  }
}
