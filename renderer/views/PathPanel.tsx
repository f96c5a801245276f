// The path: what to follow (drive, range, step), progress and cancel while it is computed, the charts, the
// scrub slider, the events, and the branch map to switch branch.

import { useEffect, useRef, useState } from 'react';
import type { BranchDto, BranchesResultDto, PathEventDto, PathResultDto, ProjectDto } from '../../electron/contract';
import type { PathState, BranchState } from '../state/app';
import { PathCharts, EVENT_LOOK } from './PathCharts';
import type { PathRequest } from '../controller';
import { ContactControls, ContactNote } from './ContactControls';
import { TorqueChart } from './TorqueChart';

export interface PathPanelProps {
  project: ProjectDto;
  path: PathState;
  branches: BranchState;
  scrubIndex: number | null;
  selectedCrease: number | null;
  defaults: { fromDeg: number; toDeg: number; stepDeg: number; contact?: boolean; clearance?: number };
  onCompute(request: PathRequest): void;
  onCancel(): void;
  onScrub(index: number | null, done: boolean): void;
  onLoadBranches(): void;
  onFollowRay(event: PathEventDto, branch: BranchDto): void;
}

function useWidth<T extends HTMLElement>(): [React.RefObject<T | null>, number] {
  const ref = useRef<T>(null);
  const [w, setW] = useState(600);
  useEffect(() => {
    const el = ref.current;
    if (!el || typeof ResizeObserver === 'undefined') return;
    const ro = new ResizeObserver(() => setW(Math.max(240, Math.floor(el.clientWidth))));
    ro.observe(el);
    setW(Math.max(240, Math.floor(el.clientWidth)));
    return () => ro.disconnect();
  }, []);
  return [ref, w];
}

function BranchMap({ result, current, onPick }: { result: BranchesResultDto; current?: string; onPick(id: string): void }) {
  const groups = [...new Set(result.branches.map((b) => b.group))];
  return (
    <div className="branch-map" data-testid="branch-map">
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

function Summary({ result }: { result: PathResultDto }) {
  const counts = new Map<string, number>();
  for (const e of result.events) counts.set(e.type, (counts.get(e.type) ?? 0) + 1);
  const first = result.samples[0]?.driveDeg ?? 0;
  const last = result.samples[result.samples.length - 1]?.driveDeg ?? 0;
  return (
    <span className="path-summary" data-testid="path-summary">
      {result.samples.length} samples, {first.toFixed(1)}° to {last.toFixed(1)}°{result.complete ? '' : ' (stopped early)'}
      {[...counts].map(([t, n]) => (
        <span key={t} className={`event-chip event-${t}`}>
          {EVENT_LOOK[t as keyof typeof EVENT_LOOK].mark} {n} {EVENT_LOOK[t as keyof typeof EVENT_LOOK].word}
          {n > 1 ? 's' : ''}
        </span>
      ))}
    </span>
  );
}

export function PathPanel(props: PathPanelProps) {
  const { project, path, branches, scrubIndex } = props;
  const [drive, setDrive] = useState(path.drive ?? project.drives[0]?.crease ?? '');
  const [from, setFrom] = useState(String(props.defaults.fromDeg));
  const [to, setTo] = useState(String(props.defaults.toDeg));
  const [step, setStep] = useState(String(props.defaults.stepDeg));
  const [contact, setContact] = useState(props.defaults.contact ?? true);
  const [clearance, setClearance] = useState(String(props.defaults.clearance ?? 0));
  const [problem, setProblem] = useState<string | null>(null);
  const [ref, width] = useWidth<HTMLDivElement>();
  useEffect(() => {
    if (!project.drives.some((d) => d.crease === drive)) setDrive(project.drives[0]?.crease ?? '');
  }, [project.drives, drive]);
  useEffect(() => {
    if (path.drive) setDrive(path.drive);
  }, [path.drive]);
  const compute = (branchId?: string) => {
    const f = Number(from), t = Number(to), s = Number(step);
    if (![f, t].every((v) => Number.isFinite(v) && v >= -180 && v <= 180)) return setProblem('The range must lie between −180° and 180°.');
    if (!(s > 0 && s <= 90)) return setProblem('The step must be above 0° and at most 90°.');
    if (f === t) return setProblem('The range is empty: “from” equals “to”.');
    const c = Number(clearance);
    if (contact && !(Number.isFinite(c) && c >= 0)) return setProblem(`The clearance must be a length of 0 or more${project.units ? ` (${project.units})` : ''}.`);
    setProblem(null);
    props.onCompute({ drive, fromDeg: f, toDeg: t, stepDeg: s, branchId, contact, clearance: contact ? c : 0 });
  };
  const result = path.result;
  const running = path.status === 'running';
  const pct = path.progress && path.progress.total > 0 ? Math.round((100 * path.progress.done) / path.progress.total) : 0;
  const current = scrubIndex ?? (result ? nearestToDrive(result, project) : null);
  const hasBranchPoints = !!result?.events.some((e) => e.type === 'branch-point');
  return (
    <section className="panel path-panel" aria-label="Path">
      <div className="path-controls">
        <h2>Path</h2>
        <label>
          drive
          <select value={drive} onChange={(e) => setDrive(e.target.value)} aria-label="drive to follow" disabled={!project.drives.length}>
            {project.drives.map((d) => (
              <option key={d.crease} value={d.crease}>
                {d.crease}
              </option>
            ))}
          </select>
        </label>
        <label>
          from <input className="small-number" value={from} onChange={(e) => setFrom(e.target.value)} aria-label="path from, degrees" />°
        </label>
        <label>
          to <input className="small-number" value={to} onChange={(e) => setTo(e.target.value)} aria-label="path to, degrees" />°
        </label>
        <label>
          step <input className="small-number" value={step} onChange={(e) => setStep(e.target.value)} aria-label="path step, degrees" />°
        </label>
        <ContactControls checked={contact} clearance={clearance} units={project.units} onChecked={setContact} onClearance={setClearance} />
        {running ? (
          <button onClick={props.onCancel} data-testid="cancel-path" className="danger">
            Cancel
          </button>
        ) : (
          <button className="primary" onClick={() => compute(path.branchId)} disabled={!drive} data-testid="compute-path" title="Ctrl+Enter">
            Compute path
          </button>
        )}
        <button onClick={props.onLoadBranches} disabled={branches.status === 'running'} title="The ways the sheet can leave the flat state">
          {branches.status === 'running' ? 'Finding branches…' : 'Branches at flat'}
        </button>
        {running && (
          <span className="progress" data-testid="path-progress" role="progressbar" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100}>
            <span className="progress-bar" style={{ width: `${pct}%` }} />
            <span className="progress-text">{path.progress?.total ? `${pct}% (${path.progress.done} of ${path.progress.total})` : 'starting…'}</span>
          </span>
        )}
        {!running && path.status === 'cancelled' && <span className="path-note" data-testid="path-cancelled">Path cancelled{result ? '; the previous path is shown' : ''}.</span>}
        {!running && path.status === 'error' && <span className="path-note bad">The path failed: {path.error}</span>}
        {!running && result && path.status === 'done' && <Summary result={result} />}
      </div>
      {problem && <p className="message message-error">{problem}</p>}
      {result && !running && <ContactNote result={result} />}
      {branches.status === 'done' && branches.result && (
        <BranchMap result={branches.result} current={path.branchId} onPick={(id) => compute(id)} />
      )}
      {branches.status === 'error' && <p className="message message-error">Branches: {branches.error}</p>}
      {result?.events
        .filter((e) => e.type === 'branch-point' && e.branches?.length)
        .map((e, i) => (
          <div key={i} className="branch-map" data-testid="branch-point">
            <div className="branch-group">
              <div className="branch-group-name">◆ branch point at {result.driveLabel} = {e.driveDeg.toFixed(2)}°: leave it along</div>
              <div className="branch-list">
                {e.branches!.map((b) => (
                  <button key={b.id} className="branch" onClick={() => props.onFollowRay(e, b)} title={b.matchesAssignment ? 'folds the way the creases are assigned' : 'folds against the assignment somewhere'}>
                    {b.name} <span className="branch-kind">{b.group}</span>
                    {b.matchesAssignment ? <span className="badge good">M/V</span> : null}
                  </button>
                ))}
              </div>
            </div>
          </div>
        ))}
      {hasBranchPoints && branches.status === 'idle' && <p className="hint">The path passes branch points (◆): “Branches at flat” lists where else the sheet can go.</p>}
      <div ref={ref} className="chart-area">
        {result ? (
          <>
            <PathCharts path={result} project={project} selectedCrease={props.selectedCrease} current={current} width={width} onScrub={(i, done) => props.onScrub(i, done)} />
            <TorqueChart path={result} labels={project.source.labels.map((l, i) => l ?? String(i))} width={width} current={current} />
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
          !running && <p className="hint">Compute a path to see every hinge angle along the drive’s range.</p>
        )}
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
