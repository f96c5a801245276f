// The path: what to follow (drive, range, step, and where to start: the solution on screen or the flat
// sheet along a branch), progress and cancel while it is computed, what it started from and which branch
// it follows, the solver's reason and the fixes when it ends with no samples or early, and tabs below:
// the charts with the scrub slider, the events and messages, the branches at flat. Other panels add their
// own tab to PATH_TABS (see DEVELOPERS.md).

import { useEffect, useRef, useState, type ReactNode } from 'react';
import type { BranchDto, BranchesResultDto, PathEventDto, PathResultDto, ProjectDto } from '../../electron/contract';
import type { PathForm, PathState, BranchState, PathTab } from '../state/app';
import { originWords, type PathFixId, type PathOutcome } from '../state/path-words';
import { PathCharts, EVENT_LOOK } from './PathCharts';
import { ContactControls, ContactNote } from './ContactControls';
import { TorqueChart } from './TorqueChart';
import { ToleranceBody, type ToleranceBodyProps } from './ToleranceBody';

export interface PathPanelProps {
  project: ProjectDto;
  path: PathState;
  branches: BranchState;
  form: PathForm;
  tab: PathTab;
  outcome: PathOutcome | null;
  scrubIndex: number | null;
  selectedCrease: number | null;
  /** the solution the path starts from by default, in words ("#2, follows M/V"), or null when there is none */
  solutionOnScreen: string | null;
  problem: string | null;
  onForm(patch: Partial<PathForm>): void;
  onTab(tab: PathTab): void;
  /** the tolerance tab's state and actions (renderer/views/ToleranceBody.tsx) */
  tolerance?: Omit<ToleranceBodyProps, 'project' | 'path' | 'pathRunning' | 'selectedCrease' | 'size'>;
  onCompute(): void;
  onCancel(): void;
  onFix(id: PathFixId): void;
  onScrub(index: number | null, done: boolean): void;
  onLoadBranches(): void;
  onPickBranch(id: string): void;
  onFollowRay(event: PathEventDto, branch: BranchDto): void;
  onExportChart?(format: 'svg' | 'png', svg: string, size: { width: number; height: number }): void;
  onPickCrease?(crease: number): void;
}

/** Size of an element, followed as it changes. */
function useSize<T extends HTMLElement>(): [React.RefObject<T | null>, { width: number; height: number }] {
  const ref = useRef<T>(null);
  const [size, setSize] = useState({ width: 600, height: 320 });
  useEffect(() => {
    const el = ref.current;
    if (!el || typeof ResizeObserver === 'undefined') return;
    const read = () => setSize({ width: Math.max(240, Math.floor(el.clientWidth)), height: Math.max(120, Math.floor(el.clientHeight)) });
    const ro = new ResizeObserver(read);
    ro.observe(el);
    read();
    return () => ro.disconnect();
  }, []);
  return [ref, size];
}

function BranchMap({ result, current, onPick }: { result: BranchesResultDto; current?: string; onPick(id: string): void }) {
  const groups = [...new Set(result.branches.map((b) => b.group))];
  return (
    <div className="branch-map" data-testid="branch-map">
      <p className="hint">The ways the sheet can leave the flat state with the other drives held. Choose one to follow it from flat.</p>
      {groups.map((g) => (
        <div key={g} className="branch-group">
          <div className="branch-group-name">{g}</div>
          <div className="branch-list">
            {result.branches
              .filter((b) => b.group === g)
              .map((b) => (
                <button key={b.id} className={`branch${b.id === current ? ' is-current' : ''}`} onClick={() => onPick(b.id)} title={b.matchesAssignment ? 'folds the way the creases are assigned' : 'folds against the assignment somewhere'}>
                  {b.name}
                  {b.matchesAssignment ? <span className="badge good">M/V</span> : null}
                </button>
              ))}
          </div>
        </div>
      ))}
      {result.messages.map((m, i) => (
        <p key={i} className={`message message-${m.severity}`}>
          {m.text}
        </p>
      ))}
    </div>
  );
}

function Summary({ result, origin }: { result: PathResultDto; origin: string }) {
  const counts = new Map<string, number>();
  for (const e of result.events) counts.set(e.type, (counts.get(e.type) ?? 0) + 1);
  const first = result.samples[0]?.driveDeg ?? 0;
  const last = result.samples[result.samples.length - 1]?.driveDeg ?? 0;
  return (
    <div className="path-summary" data-testid="path-summary">
      <span>
        {result.samples.length} samples, {first.toFixed(1)}° to {last.toFixed(1)}°{result.complete ? '' : ' (ended early)'},{' '}
        <span data-testid="path-origin">{origin}</span>
      </span>
      {[...counts].map(([t, n]) => (
        <span key={t} className={`event-chip event-${t}`}>
          {EVENT_LOOK[t as keyof typeof EVENT_LOOK].mark} {n} {EVENT_LOOK[t as keyof typeof EVENT_LOOK].word}
          {n > 1 ? 's' : ''}
        </span>
      ))}
    </div>
  );
}

function Outcome({ outcome, onFix }: { outcome: PathOutcome; onFix(id: PathFixId): void }) {
  // a path that ended early keeps its charts: one line; one with no samples gets the room
  return (
    <div className={`path-outcome tone-${outcome.tone}${outcome.tone === 'note' ? ' is-compact' : ''}`} data-testid="path-outcome" role="status">
      <div>
        <strong>{outcome.headline}.</strong> <span data-testid="path-reason">{outcome.reason}</span>
      </div>
      <div className="path-fixes">
        {outcome.fixes.map((f) => (
          <button key={f.id} onClick={() => onFix(f.id)} title={f.title} data-testid={`fix-${f.id}`}>
            {f.label}
          </button>
        ))}
      </div>
    </div>
  );
}

function EventList({ result, onFollowRay }: { result: PathResultDto; onFollowRay(event: PathEventDto, branch: BranchDto): void }) {
  if (!result.events.length && !result.messages.length) return <p className="hint">No events on this path.</p>;
  return (
    <div className="event-list" data-testid="event-list">
      {result.events.map((e, i) => (
        <div key={`e${i}`} className={`event-row event-${e.type}`}>
          <span className="event-mark">{EVENT_LOOK[e.type].mark}</span>
          <span className="event-at">{result.driveLabel} = {e.driveDeg.toFixed(2)}°</span>
          <span className="event-text">{e.text}</span>
          {e.type === 'branch-point' && e.branches?.length ? (
            <span className="branch-list" data-testid="branch-point">
              leave along
              {e.branches.map((b) => (
                <button key={b.id} className="branch" onClick={() => onFollowRay(e, b)} title={b.matchesAssignment ? 'folds the way the creases are assigned' : 'folds against the assignment somewhere'}>
                  {b.name} <span className="branch-kind">{b.group}</span>
                  {b.matchesAssignment ? <span className="badge good">M/V</span> : null}
                </button>
              ))}
            </span>
          ) : null}
        </div>
      ))}
      {result.messages.map((m, i) => (
        <p key={`m${i}`} className={`message message-${m.severity}`}>
          {m.text}
        </p>
      ))}
    </div>
  );
}

/** A tab of the path area: its title (with a count) and what it shows. */
export interface PathTabSpec {
  id: PathTab;
  title: string;
}

export function PathPanel(props: PathPanelProps) {
  const { project, path, branches, scrubIndex, form, tab } = props;
  const [ref, size] = useSize<HTMLDivElement>();
  const result = path.result;
  const running = path.status === 'running';
  const pct = path.progress && path.progress.total > 0 ? Math.round((100 * path.progress.done) / path.progress.total) : 0;
  const current = scrubIndex ?? (result ? nearestToDrive(result, project) : null);
  const branchPoints = result?.events.filter((e) => e.type === 'branch-point').length ?? 0;
  const tabs: PathTabSpec[] = [
    { id: 'charts', title: 'Angles and rates' },
    { id: 'events', title: `Events${result ? ` (${result.events.length})` : ''}` },
    { id: 'branches', title: 'Branches at flat' },
    { id: 'torque', title: 'Drive torque' },
    ...(props.tolerance ? [{ id: 'tolerance' as const, title: `Tolerance${props.tolerance.tolerance.status === 'running' ? ' …' : ''}` }] : []),
  ];
  const startValue = form.start === 'solution' ? 'solution' : `flat:${form.branchId ?? ''}`;
  // the room left for the two charts: captions, the scrub row and the axes' labels come off the top
  const chartRoom = Math.max(160, size.height - 18 * 2 - 30);
  const heights = { angle: Math.round(chartRoom * 0.54), rate: chartRoom - Math.round(chartRoom * 0.54) };
  let body: ReactNode;
  if (tab === 'torque') {
    body = result && result.samples.some((x) => x.torque?.length) ? (
      <TorqueChart path={result} labels={project.source.labels.map((l, i) => l ?? String(i))} width={size.width} current={current} />
    ) : (
      <p className="hint">The static holding torque of every drive appears here when the document has loads (an areal density, panel masses or springs in its “loads”) and a path is computed.</p>
    );
  } else if (tab === 'tolerance' && props.tolerance) {
    body = <ToleranceBody {...props.tolerance} project={project} path={result} pathRunning={running} selectedCrease={props.selectedCrease} size={size} />;
  } else if (tab === 'events') body = result ? <EventList result={result} onFollowRay={props.onFollowRay} /> : <p className="hint">Compute a path to see its events.</p>;
  else if (tab === 'branches') {
    body =
      branches.status === 'done' && branches.result ? (
        <BranchMap result={branches.result} current={form.start === 'flat' ? form.branchId : undefined} onPick={props.onPickBranch} />
      ) : branches.status === 'error' ? (
        <p className="message message-error">Branches: {branches.error}</p>
      ) : (
        <p className="hint">{branches.status === 'running' ? 'Finding the branches at the flat state…' : 'The branches at the flat state are listed here.'}</p>
      );
  } else {
    body = result && result.samples.length ? (
      <>
        <PathCharts path={result} project={project} selectedCrease={props.selectedCrease} current={current} width={size.width} heights={heights} onScrub={(i, done) => props.onScrub(i, done)} onPickCrease={props.onPickCrease} onExport={props.onExportChart} />
        <div className="scrub">
          <input
            type="range"
            min={0}
            max={Math.max(0, result.samples.length - 1)}
            step={1}
            value={current ?? 0}
            aria-label="scrub along the path"
            data-testid="scrub"
            onChange={(e) => props.onScrub(Number(e.target.value), false)}
            onPointerUp={() => props.onScrub(current, true)}
            onKeyUp={() => props.onScrub(current, true)}
          />
          <span className="scrub-value">
            {result.driveLabel} = {current !== null && result.samples[current] ? result.samples[current].driveDeg.toFixed(2) : '–'}°
          </span>
        </div>
      </>
    ) : (
      !running && !props.outcome && <p className="hint">Compute a path to see every hinge angle along the drive’s range.</p>
    );
  }
  return (
    <section className="panel path-panel" aria-label="Path">
      <div className="path-head">
        <h2>Path</h2>
        <div className="tabs" role="tablist" aria-label="Path views">
          {tabs.map((t) => (
            <button
              key={t.id}
              role="tab"
              aria-selected={tab === t.id}
              className={`tab${tab === t.id ? ' is-current' : ''}`}
              data-testid={`tab-${t.id}`}
              onClick={() => {
                props.onTab(t.id);
                if (t.id === 'branches' && branches.status === 'idle') props.onLoadBranches();
              }}
            >
              {t.title}
            </button>
          ))}
        </div>
      </div>
      <div className="path-controls">
        <label>
          drive
          <select value={form.drive} onChange={(e) => props.onForm({ drive: e.target.value })} aria-label="drive to follow" disabled={!project.drives.length}>
            {project.drives.map((d) => (
              <option key={d.crease} value={d.crease}>
                {d.crease}
              </option>
            ))}
          </select>
        </label>
        <label>
          from <input className="small-number" value={form.from} onChange={(e) => props.onForm({ from: e.target.value, rangeTouched: true })} aria-label="path from, degrees" />°
        </label>
        <label>
          to <input className="small-number" value={form.to} onChange={(e) => props.onForm({ to: e.target.value, rangeTouched: true })} aria-label="path to, degrees" />°
        </label>
        <label>
          step <input className="small-number" value={form.step} onChange={(e) => props.onForm({ step: e.target.value })} aria-label="path step, degrees" />°
        </label>
        <label>
          start
          <select
            value={startValue}
            aria-label="path start"
            data-testid="path-start"
            onChange={(e) => {
              const v = e.target.value;
              if (v === 'solution') props.onForm({ start: 'solution' });
              else props.onForm({ start: 'flat', branchId: v.slice(5) || undefined });
            }}
          >
            <option value="solution">{props.solutionOnScreen ?? 'solution on screen (none)'}</option>
            <option value="flat:">flat sheet, branch by M/V</option>
            {branches.result?.branches.map((b) => (
              <option key={b.id} value={`flat:${b.id}`}>
                flat sheet, branch {b.name}
                {b.matchesAssignment ? ' (M/V)' : ''}
              </option>
            ))}
          </select>
        </label>
        <ContactControls checked={form.contact} clearance={form.clearance} units={project.units} onChecked={(v) => props.onForm({ contact: v })} onClearance={(v) => props.onForm({ clearance: v })} />
        {running ? (
          <button onClick={props.onCancel} data-testid="cancel-path" className="danger">
            Cancel
          </button>
        ) : (
          <button className="primary" onClick={props.onCompute} disabled={!form.drive} data-testid="compute-path" title="Ctrl+Enter">
            Compute path
          </button>
        )}
      </div>
      <div className="path-status">
        {running && (
          <span className="progress" data-testid="path-progress" role="progressbar" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100}>
            <span className="progress-bar" style={{ width: `${pct}%` }} />
            <span className="progress-text">{path.progress?.total ? `${pct}% (${path.progress.done} of ${path.progress.total})` : 'starting…'}</span>
          </span>
        )}
        {!running && path.status === 'cancelled' && <span className="path-note" data-testid="path-cancelled">Path cancelled{result ? '; the previous path is shown' : ''}.</span>}
        {!running && path.status === 'error' && <span className="path-note bad">The path failed: {path.error}</span>}
        {props.problem && <span className="message message-error">{props.problem}</span>}
        {result && result.samples.length > 0 && path.status !== 'error' && <Summary result={result} origin={originWords(path.origin, result)} />}
        {result && !running && <ContactNote result={result} />}
        {branchPoints > 0 && tab === 'charts' && (
          <button className="link-button" onClick={() => props.onTab('events')}>
            ◆ leave a branch point…
          </button>
        )}
      </div>
      {!running && props.outcome && <Outcome outcome={props.outcome} onFix={props.onFix} />}
      <div ref={ref} className={`path-body path-body-${tab}`} role="tabpanel">
        {body}
      </div>
    </section>
  );
}

function nearestToDrive(result: PathResultDto, project: ProjectDto): number | null {
  const d = project.drives.find((x) => x.crease === result.driveLabel);
  if (!d || !result.samples.length) return null;
  let best = 0;
  result.samples.forEach((s, i) => {
    if (Math.abs(s.driveDeg - d.angleDeg) < Math.abs(result.samples[best].driveDeg - d.angleDeg)) best = i;
  });
  return best;
}
