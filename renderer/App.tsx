// The window: tool bar; drives, solutions and the crease picked on the left; the flat sheet and the folded
// shape in the middle with the path (its tabs) below; the hinge table on the right. The main job — set the
// drives, read every hinge, run the path, export the table — fits a 1280 × 800 screen without scrolling.
// The views only draw the state; the controller does the work.

import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { Controller } from './controller';
import { useStore } from './state/store';
import { canRedo, canUndo } from './state/history';
import { currentProject, isDirty } from './state/app';
import { contactPanels, hingeRows, hingeTableCsv, shownState } from './state/display';
import { pathOutcome } from './state/path-words';
import { renameCrease, setBasePanel, setCreaseLimit, setPanelName, removeDrive, creaseIndexByLabel, limitDeg, panelName } from './state/document';
import { derivePattern, limitViolations, shapeFor } from './geometry';
import { shortcutFor } from './shortcuts';
import { SheetView, Legend } from './views/SheetView';
import { FoldedView } from './views/FoldedView';
import { DrivePanel } from './views/DrivePanel';
import { SolutionCards } from './views/SolutionCards';
import { HingeTable } from './views/HingeTable';
import { Inspector } from './views/Inspector';
import { PathPanel } from './views/PathPanel';
import { NewDialog, ExportDialog, LayersDialog } from './views/Dialogs';
import { Notices } from './views/Notices';

/** Height of an element that may appear later (a callback ref, so it is measured whenever it mounts). */
function useElementHeight(): [(el: HTMLDivElement | null) => void, number] {
  const [h, setH] = useState(400);
  const observer = useRef<ResizeObserver | null>(null);
  const ref = useCallback((el: HTMLDivElement | null) => {
    observer.current?.disconnect();
    observer.current = null;
    if (!el || typeof ResizeObserver === 'undefined') return;
    const ro = new ResizeObserver(() => setH(Math.max(120, el.clientHeight)));
    ro.observe(el);
    observer.current = ro;
    setH(Math.max(120, el.clientHeight));
  }, []);
  return [ref, h];
}

export function App({ controller }: { controller: Controller }) {
  const state = useStore(controller.store, (s) => s);
  const dispatch = controller.store.dispatch;
  const doc = state.doc;
  const project = doc?.history.present ?? null;
  const derived = useMemo(() => (project ? derivePattern(project.source) : null), [project]);
  const pattern = derived?.pattern;
  const creaseCount = project?.source.edges.length ?? 0;
  const shown = useMemo(() => shownState(state, creaseCount), [state, creaseCount]);
  const violations = useMemo(
    () => (project && pattern ? limitViolations(project, pattern, shown.anglesDeg) : { creases: new Set<number>(), panels: new Set<number>() }),
    [project, pattern, shown.anglesDeg],
  );
  const rows = useMemo(() => (project ? hingeRows(project, shown) : []), [project, shown]);
  const touching = useMemo(() => contactPanels(shown, pattern), [shown, pattern]);
  // the gap check walks the whole shape: not while scrubbing, where every sample is a solved state anyway
  const mismatch = useMemo(
    () => (pattern && project && shown.source !== 'path' ? shapeFor(pattern, shown.anglesDeg, project.source.basePanel).maxMismatch : undefined),
    [pattern, project, shown.anglesDeg, shown.source],
  );
  const [tableRef, tableHeight] = useElementHeight();
  const outcome = useMemo(() => pathOutcome(state), [state.path, state.solve.result, state.selectedSolution]);
  const stops = useMemo(() => {
    const out: Record<string, { minDeg?: number; maxDeg?: number }> = {};
    if (project) for (const d of project.drives) {
      const i = creaseIndexByLabel(project, d.crease);
      if (i !== undefined) out[d.crease] = limitDeg(project, i);
    }
    return out;
  }, [project]);
  const lastPatternDof = state.solve.lastValid?.result.patternDof;
  const solutionOnScreen = useMemo(() => {
    const r = state.solve.result;
    if (!r) return null;
    if (state.selectedFamily !== null && r.families[state.selectedFamily]) return `the state of family ${state.selectedFamily + 1}`;
    if (!r.solutions.length) return null;
    const k = Math.min(state.selectedSolution, r.solutions.length - 1);
    return `solution #${k + 1}${r.solutions[k].matchesAssignment ? ' (M/V)' : ''}`;
  }, [state.solve.result, state.selectedSolution, state.selectedFamily]);
  const [pathProblem, setPathProblem] = useState<string | null>(null);
  const addDriveAt = (label: string) => {
    const i = project ? creaseIndexByLabel(project, label) : undefined;
    if (i !== undefined) controller.toggleDrive(i);
  };

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement | null;
      const inTextField = !!t && (t.tagName === 'INPUT' || t.tagName === 'TEXTAREA' || t.tagName === 'SELECT' || t.isContentEditable) && (t as HTMLInputElement).type !== 'range' && (t as HTMLInputElement).type !== 'checkbox';
      const command = shortcutFor({ key: e.key, ctrlKey: e.ctrlKey, metaKey: e.metaKey, shiftKey: e.shiftKey, altKey: e.altKey, inTextField });
      if (!command) return;
      if (controller.store.getState().dialog && command !== 'cancel-job') return;
      e.preventDefault();
      void controller.command(command);
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [controller]);

  const basePanel = project?.source.basePanel ?? pattern?.basePanel ?? 0;
  const selected = state.selectedCrease;

  return (
    <div className="app">
      <header className="toolbar" role="toolbar" aria-label="Document">
        <span className="brand">Hingeplan</span>
        <button onClick={() => dispatch({ type: 'dialog', dialog: 'new' })} title="New pattern from a generator (Ctrl+N)">New…</button>
        <button onClick={() => void controller.open('any')} title="Open a project or FOLD file (Ctrl+O)">Open…</button>
        <button onClick={() => void controller.open('fold')} title="Import a FOLD file (Ctrl+I)">Import FOLD…</button>
        <button onClick={() => void controller.open('drawing')} title="Import a crease pattern drawn in CAD or a drawing program (DXF or SVG)">Import drawing…</button>
        {doc?.drawing && doc.filePath && (
          <button onClick={() => dispatch({ type: 'dialog', dialog: 'layers' })} title="The drawing's layers and the assignment each gives its lines; set them and read the drawing again">
            Layers…
          </button>
        )}
        <button onClick={() => void controller.save(false)} disabled={!doc} title="Save (Ctrl+S)">Save</button>
        <button onClick={() => void controller.save(true)} disabled={!doc} title="Save as (Ctrl+Shift+S)">Save as…</button>
        <button onClick={() => dispatch({ type: 'dialog', dialog: 'export' })} disabled={!doc} title="Export tables, FOLD, DXF, SVG, OBJ, STL (Ctrl+E)">Export…</button>
        <span className="sep" />
        <button onClick={() => controller.undo()} disabled={!doc || !canUndo(doc.history)} title="Undo (Ctrl+Z)">Undo</button>
        <button onClick={() => controller.redo()} disabled={!doc || !canRedo(doc.history)} title="Redo (Ctrl+Shift+Z)">Redo</button>
        <span className="doc-title" data-testid="doc-title">
          {doc ? (
            <>
              {doc.fileName}
              {isDirty(doc) && <span className="edited" title="unsaved changes"> · edited</span>}
              {pattern && <span className="doc-facts"> · {pattern.creases.filter((c) => c.assignment !== 'B').length} creases, {pattern.panels.length} panels{project?.units ? `, ${project.units}` : ''}</span>}
            </>
          ) : (
            'no document'
          )}
        </span>
      </header>
      <Notices notices={state.notices} onDismiss={(id) => dispatch({ type: 'dismiss-notice', id })} onRestore={(id) => void controller.restoreRecovery(id)} onDiscardRecovery={(id) => void controller.discardRecovery(id)} />
      {state.editError && (
        <div className="edit-error" role="alert">
          {state.editError}
          <button className="icon-button" onClick={() => dispatch({ type: 'edit-refused', message: '' })} aria-label="dismiss">×</button>
        </div>
      )}
      {project && pattern ? (
        <main className="workspace">
          <aside className="left">
            <DrivePanel
              drives={project.drives}
              stops={stops}
              result={state.solve.result}
              solveStatus={state.solve.status}
              solveError={state.solve.status === 'error' ? state.solve.error : undefined}
              shown={shown}
              lastPatternDof={lastPatternDof}
              onChange={(label, v, dragging) => controller.setDrive(label, v, dragging)}
              onDragEnd={() => dispatch({ type: 'seal-edit' })}
              onRemove={(label) => controller.edit((p) => removeDrive(p, label))}
              onAddSuggested={addDriveAt}
            />
            {state.solve.result && (
              <SolutionCards
                pattern={pattern}
                project={project}
                solutions={state.solve.result.solutions}
                families={state.solve.result.families}
                search={state.solve.result.search}
                suggestedDrives={state.solve.result.suggestedDrives}
                selected={state.selectedSolution}
                selectedFamily={state.selectedFamily}
                active={shown.source === 'solution' || shown.source === 'family'}
                basePanel={basePanel}
                onSelect={(i) => controller.selectSolution(i)}
                onSelectFamily={(i) => controller.selectFamily(i)}
                onAddDrive={addDriveAt}
              />
            )}
            {selected !== null && pattern.creases[selected] && (
              <Inspector
                pattern={pattern}
                project={project}
                crease={selected}
                angleDeg={shown.anglesDeg[selected] ?? 0}
                rate={shown.rates?.[selected] ?? null}
                rateDrive={shown.rateDrive}
                onToggleDrive={(i) => controller.toggleDrive(i)}
                onBasePanel={(p) => controller.edit((pr) => setBasePanel(pr, p))}
                onPanelName={(p, name) => controller.edit((pr) => setPanelName(pr, p, name))}
                onClose={() => dispatch({ type: 'select-crease', index: null })}
              />
            )}
          </aside>
          <section className="center">
            <div className="views">
              <div className="view-box">
                <div className="view-toolbar">
                  <span className="view-caption">Flat sheet, tinted by fold angle</span>
                </div>
                <SheetView
                  pattern={pattern}
                  project={project}
                  anglesDeg={shown.anglesDeg}
                  selectedCrease={selected}
                  hoverCrease={state.hoverCrease}
                  violatingPanels={violations.panels}
                  contactPanels={touching}
                  violatingCreases={violations.creases}
                  marks={state.pathTab === 'tolerance' ? state.tolerance.result?.worstVertices : undefined}
                  onHover={(i) => dispatch({ type: 'hover-crease', index: i })}
                  onSelect={(i) => dispatch({ type: 'select-crease', index: i })}
                />
                <Legend />
              </div>
              <div className="view-box">
                <FoldedView
                  pattern={pattern}
                  project={project}
                  anglesDeg={shown.anglesDeg}
                  caption={`Folded: ${shown.caption}`}
                  selectedCrease={selected}
                  violatingPanels={violations.panels}
                  contactPanels={touching}
                  ghost={state.view.ghost}
                  labels={state.view.labels}
                  fitRequest={state.view.fitRequest}
                  maxMismatch={mismatch}
                  baseName={panelName(project, basePanel)}
                  onToggleGhost={() => dispatch({ type: 'toggle-ghost' })}
                  onToggleLabels={() => dispatch({ type: 'toggle-labels' })}
                  onFit={() => dispatch({ type: 'fit-view' })}
                />
              </div>
            </div>
            <PathPanel
              project={project}
              path={state.path}
              branches={state.branches}
              form={state.pathForm}
              tab={state.pathTab}
              outcome={outcome}
              scrubIndex={state.scrubIndex}
              selectedCrease={selected}
              solutionOnScreen={solutionOnScreen}
              problem={pathProblem}
              onForm={(patch) => dispatch({ type: 'path-form', patch })}
              onTab={(tab) => dispatch({ type: 'path-tab', tab })}
              tolerance={{
                pattern,
                tolerance: state.tolerance,
                onRun: (r) => void controller.runTolerance(r),
                onCancel: () => void controller.cancelTolerance(),
                onChoose: (creases) => dispatch({ type: 'tolerance-choose', creases }),
              }}
              onCompute={() => {
                const n = controller.pathNumbers();
                setPathProblem(typeof n === 'string' ? n : null);
                if (typeof n !== 'string') void controller.computePath();
              }}
              onCancel={() => void controller.cancelPath()}
              onFix={(id) => void controller.applyFix(id)}
              onScrub={(i, done) => {
                if (i !== null) dispatch({ type: 'scrub', index: i });
                if (done) controller.commitScrub();
              }}
              onLoadBranches={() => void controller.loadBranches()}
              onPickBranch={(id) => {
                dispatch({ type: 'path-form', patch: { start: 'flat', branchId: id } });
                dispatch({ type: 'path-tab', tab: 'charts' });
                void controller.computePath({ start: 'flat', branchId: id });
              }}
              onFollowRay={(e, b) => {
                dispatch({ type: 'path-tab', tab: 'charts' });
                void controller.followRay(e, b);
              }}
              onExportChart={(format, svg, size) => void controller.exportChart(format, svg, size)}
              onPickCrease={(i) => dispatch({ type: 'select-crease', index: i })}
            />
          </section>
          <aside className="right">
            <div className="table-holder" ref={tableRef}>
              <HingeTable
                rows={rows}
                selectedCrease={selected}
                caption={`Angles of the ${shown.caption}.`}
                height={Math.max(120, tableHeight - (shown.rateDrive ? 100 : 80))}
                rateDrive={shown.rateDrive}
                drives={project.drives.map((d) => d.crease)}
                rateDriveFixed={shown.source === 'path'}
                onRateDrive={(label) => dispatch({ type: 'rate-drive', label })}
                onSelect={(i) => dispatch({ type: 'select-crease', index: i })}
                onRename={(i, label) => controller.edit((p) => renameCrease(p, i, label))}
                onLimit={(i, limit) => controller.edit((p) => setCreaseLimit(p, i, limit))}
                onCopy={(r) => void controller.copyText(hingeTableCsv(r, shown.caption))}
              />
            </div>
          </aside>
        </main>
      ) : (
        <main className="empty">
          {derived && !pattern ? (
            <p>The pattern has errors and cannot be shown.</p>
          ) : (
            <div className="empty-start">
              <p>Open a pattern, import a FOLD file, or start from a generator.</p>
              <div>
                <button className="primary" onClick={() => dispatch({ type: 'dialog', dialog: 'new' })}>New from a generator…</button>
                <button onClick={() => void controller.open('any')}>Open…</button>
              </div>
            </div>
          )}
        </main>
      )}
      {state.dialog === 'new' && (
        <NewDialog
          onClose={() => dispatch({ type: 'dialog', dialog: null })}
          onCreate={async (spec) => {
            if (!(await controller.confirmDiscard('start a new pattern'))) return null;
            const r = await controller.api.newDocument(spec);
            if (!r.ok) return [{ severity: 'error', code: r.error.code, text: r.error.message }];
            if (r.value.status === 'failed') return r.value.messages;
            controller.opened(r.value);
            dispatch({ type: 'dialog', dialog: null });
            return null;
          }}
        />
      )}
      {state.dialog === 'layers' && doc?.drawing && (
        <LayersDialog
          layers={doc.drawing.layers}
          colours={doc.drawing.colours}
          options={doc.drawing.options}
          units={currentProject(state)?.units}
          onClose={() => dispatch({ type: 'dialog', dialog: null })}
          onRead={(o) => controller.rereadDrawing(o)}
        />
      )}
      {state.dialog === 'export' && (
        <ExportDialog hasPath={!!state.path.result} onClose={() => dispatch({ type: 'dialog', dialog: null })} onExport={(k, o) => controller.exportFile(k, o)} />
      )}
    </div>
  );
}
