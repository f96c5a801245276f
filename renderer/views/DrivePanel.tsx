// The drives: a field and a slider per drive (degrees), the solve status in words, DOF, the largest
// residual and the condition number of the state on screen.

import { useEffect, useState } from 'react';
import type { DriveSpec, SolveResultDto } from '../../electron/contract';
import type { JobStatus } from '../state/app';
import { statusInWords, type ShownState } from '../state/display';

export interface DrivePanelProps {
  drives: DriveSpec[];
  result?: SolveResultDto;
  solveStatus: JobStatus;
  solveError?: string;
  shown: ShownState;
  onChange(label: string, angleDeg: number, dragging: boolean): void;
  onDragEnd(): void;
  onRemove(label: string): void;
  onAddSuggested(label: string): void;
}

function DriveRow({ drive, onChange, onDragEnd, onRemove }: { drive: DriveSpec } & Pick<DrivePanelProps, 'onChange' | 'onDragEnd' | 'onRemove'>) {
  const [text, setText] = useState(drive.angleDeg.toFixed(2));
  const [editing, setEditing] = useState(false);
  useEffect(() => {
    if (!editing) setText(String(Math.round(drive.angleDeg * 100) / 100));
  }, [drive.angleDeg, editing]);
  const commitText = () => {
    setEditing(false);
    const v = Number(text.replace('°', '').replace(',', '.'));
    if (Number.isFinite(v)) onChange(drive.crease, v, false);
    else setText(String(drive.angleDeg));
  };
  const id = `drive-${drive.crease}`;
  return (
    <div className="drive-row" data-testid="drive-row" data-crease={drive.crease}>
      <label htmlFor={id} className="drive-label">
        {drive.crease}
      </label>
      <input
        id={id}
        className="drive-number"
        type="text"
        inputMode="decimal"
        aria-label={`angle of drive ${drive.crease} in degrees`}
        value={text}
        onFocus={() => setEditing(true)}
        onChange={(e) => setText(e.target.value)}
        onBlur={commitText}
        onKeyDown={(e) => {
          if (e.key === 'Enter') (e.target as HTMLInputElement).blur();
          if (e.key === 'Escape') {
            setText(String(drive.angleDeg));
            setEditing(false);
          }
        }}
      />
      <span className="unit">°</span>
      <input
        className="drive-slider"
        type="range"
        min={-180}
        max={180}
        step={0.5}
        value={drive.angleDeg}
        aria-label={`slider for drive ${drive.crease}`}
        onChange={(e) => onChange(drive.crease, Number(e.target.value), true)}
        onPointerUp={onDragEnd}
        onBlur={onDragEnd}
      />
      <button className="icon-button" title={`Stop driving ${drive.crease}`} aria-label={`remove drive ${drive.crease}`} onClick={() => onRemove(drive.crease)}>
        ×
      </button>
    </div>
  );
}

function fmt(x: number | null | undefined, digits = 2): string {
  if (x === null) return '∞';
  if (x === undefined || !Number.isFinite(x)) return '–';
  if (x !== 0 && (Math.abs(x) < 1e-3 || Math.abs(x) >= 1e5)) return x.toExponential(digits);
  return x.toFixed(digits);
}

export function DrivePanel(props: DrivePanelProps) {
  const { drives, result, solveStatus, shown } = props;
  const words = statusInWords(result, drives.length);
  const sol = shown.solution;
  return (
    <section className="panel drives-panel" aria-label="Drives">
      <h2>Drives</h2>
      {drives.length === 0 && <p className="hint">No drive yet. Click a crease on the sheet, then “Make it a drive”.</p>}
      {drives.map((d) => (
        <DriveRow key={d.crease} drive={d} onChange={props.onChange} onDragEnd={props.onDragEnd} onRemove={props.onRemove} />
      ))}
      <div className={`status status-${words.tone}`} data-testid="solve-status" role="status">
        <div className="status-headline">
          {words.headline}
          {solveStatus === 'running' && <span className="busy"> · solving…</span>}
        </div>
        <div className="status-detail">{words.detail}</div>
        {props.solveError && <div className="status-error">The solver failed: {props.solveError}</div>}
        {result?.status === 'underspecified' && result.suggestedDrives?.length ? (
          <div className="suggest">
            {result.suggestedDrives.slice(0, 4).map((l) => (
              <button key={l} onClick={() => props.onAddSuggested(l)}>
                Drive {l}
              </button>
            ))}
          </div>
        ) : null}
      </div>
      <dl className="numbers">
        <div>
          <dt title="Degrees of freedom left with these drives">DOF left</dt>
          <dd data-testid="dof">{result ? result.dof : '–'}</dd>
        </div>
        <div>
          <dt title="Degrees of freedom of the pattern with no drive">sheet DOF</dt>
          <dd>{result ? result.patternDof : '–'}</dd>
        </div>
        <div>
          <dt title="Largest closure residual at any vertex, degrees">residual</dt>
          <dd data-testid="residual">{sol ? `${fmt((sol.maxResidual * 180) / Math.PI)}°` : '–'}</dd>
        </div>
        <div>
          <dt title="Condition number of the closure Jacobian (large near singular states)">condition</dt>
          <dd data-testid="condition">{sol ? fmt(sol.condition, 1) : '–'}</dd>
        </div>
      </dl>
      {result?.messages.filter((m) => m.severity !== 'info').slice(0, 4).map((m, i) => (
        <p key={i} className={`message message-${m.severity}`}>
          {m.text}
        </p>
      ))}
    </section>
  );
}
