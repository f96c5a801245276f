// The drives: a field and a slider per drive (degrees; the slider shows the hinge stops, and the zones past
// them in the past-limit colour), the solve status in words, DOF, the largest residual and the condition
// number of the state on screen.

import { useEffect, useState } from 'react';
import type { DriveSpec, SolveResultDto } from '../../electron/contract';
import type { JobStatus } from '../state/app';
import { statusInWords, type ShownState } from '../state/display';

/** A drive's hinge stops in degrees (either may be missing). */
export interface DriveStops {
  minDeg?: number;
  maxDeg?: number;
}

export interface DrivePanelProps {
  drives: DriveSpec[];
  /** hinge stops per drive label */
  stops?: Record<string, DriveStops>;
  result?: SolveResultDto;
  solveStatus: JobStatus;
  solveError?: string;
  shown: ShownState;
  onChange(label: string, angleDeg: number, dragging: boolean): void;
  onDragEnd(): void;
  onRemove(label: string): void;
  onAddSuggested(label: string): void;
  /** the sheet's DOF from the last solve that had one (a refused drive set does not change the sheet) */
  lastPatternDof?: number;
}

const shownValue = (deg: number) => String(Math.round(deg * 100) / 100);

/** Where on the slider's track a value sits, as a CSS length (the thumb's centre travels 6 px in from each end). */
const trackAt = (deg: number) => `calc(6px + (100% - 12px) * ${(Math.max(-180, Math.min(180, deg)) + 180) / 360})`;

function StopZones({ stops, past }: { stops: DriveStops; past: boolean }) {
  const zones: [number, number][] = [];
  if (stops.minDeg !== undefined && stops.minDeg > -180) zones.push([-180, stops.minDeg]);
  if (stops.maxDeg !== undefined && stops.maxDeg < 180) zones.push([stops.maxDeg, 180]);
  return (
    <span className={`slider-zones${past ? ' is-past' : ''}`} aria-hidden="true">
      {zones.map(([a, b]) => (
        <span key={a} className="slider-past-zone" data-testid="slider-stop-zone" style={{ left: trackAt(a), width: `calc((100% - 12px) * ${(b - a) / 360})` }} />
      ))}
      {[stops.minDeg, stops.maxDeg].map((v, i) => (v !== undefined ? <span key={i} className="slider-stop" style={{ left: trackAt(v) }} title={`hinge stop ${v}°`} /> : null))}
    </span>
  );
}

function DriveRow({ drive, stops, onChange, onDragEnd, onRemove }: { drive: DriveSpec; stops?: DriveStops } & Pick<DrivePanelProps, 'onChange' | 'onDragEnd' | 'onRemove'>) {
  const [text, setText] = useState(shownValue(drive.angleDeg));
  const [editing, setEditing] = useState(false);
  useEffect(() => {
    if (!editing) setText(shownValue(drive.angleDeg));
  }, [drive.angleDeg, editing]);
  const commitText = () => {
    setEditing(false);
    // a field left as it was shown keeps the drive's full value (the field shows it to 2 decimals)
    if (text === shownValue(drive.angleDeg)) return;
    const v = Number(text.replace('°', '').replace(',', '.').replace('−', '-'));
    if (Number.isFinite(v)) onChange(drive.crease, v, false);
    else setText(shownValue(drive.angleDeg));
  };
  const past = !!stops && ((stops.minDeg !== undefined && drive.angleDeg < stops.minDeg - 1e-9) || (stops.maxDeg !== undefined && drive.angleDeg > stops.maxDeg + 1e-9));
  const stopWords = stops && (stops.minDeg !== undefined || stops.maxDeg !== undefined) ? `stops ${stops.minDeg ?? '−180'}° … ${stops.maxDeg ?? '180'}°` : null;
  const id = `drive-${drive.crease}`;
  return (
    <div className={`drive-row${past ? ' is-past' : ''}`} data-testid="drive-row" data-crease={drive.crease}>
      <label htmlFor={id} className="drive-label" title={drive.crease}>
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
      <span className={`drive-stops${past ? ' is-past' : ''}`} data-testid="drive-stops">{past ? `past its stop (${stopWords})` : stopWords}</span>
      <button className="icon-button" title={`Stop driving ${drive.crease}`} aria-label={`remove drive ${drive.crease}`} onClick={() => onRemove(drive.crease)}>
        ×
      </button>
      <span className="drive-slider-box">
        {stops && <StopZones stops={stops} past={past} />}
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
      </span>
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
  const words = statusInWords(result, drives.length, drives.map((d) => d.crease));
  const sol = shown.solution;
  return (
    <section className="panel drives-panel" aria-label="Drives">
      <h2>Drives</h2>
      {drives.length === 0 && <p className="hint">No drive yet. Click a crease on the sheet, then “Make it a drive”.</p>}
      {drives.map((d) => (
        <DriveRow key={d.crease} drive={d} stops={props.stops?.[d.crease]} onChange={props.onChange} onDragEnd={props.onDragEnd} onRemove={props.onRemove} />
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
          <dd data-testid="sheet-dof">{result && result.status !== 'invalid' ? result.patternDof : props.lastPatternDof ?? '–'}</dd>
        </div>
        <div>
          <dt title="Largest closure residual at any vertex, radians (as in the command line and the exported tables)">residual</dt>
          <dd data-testid="residual">{sol ? `${sol.maxResidual.toExponential(1)} rad` : '–'}</dd>
        </div>
        <div>
          <dt title="Condition number of the closure Jacobian (large near singular states)">condition</dt>
          <dd data-testid="condition">{sol ? fmt(sol.condition, 1) : '–'}</dd>
        </div>
      </dl>
      {result?.messages.filter((m) => m.severity !== 'info' && !['drive-outside-limit', 'overspecified', 'outside-hinge-limits', 'underspecified'].includes(m.code)).slice(0, 4).map((m, i) => (
        <p key={i} className={`message message-${m.severity}`}>
          {m.text}
        </p>
      ))}
    </section>
  );
}
