// The crease picked on the sheet or in the table: what it is, where it is now, and the one-click actions
// on it (make or stop making it a drive, hold the panel beside it).

import type { Pattern } from '../../solver/types';
import type { ProjectDto } from '../../electron/contract';
import { creaseLabel, isMovableAssignment, limitDeg } from '../state/document';
import { ASSIGNMENT_WORDS, formatAngle } from '../state/display';

export interface InspectorProps {
  pattern: Pattern;
  project: ProjectDto;
  crease: number;
  angleDeg: number;
  rate: number | null;
  /** the drive the rate is against */
  rateDrive?: string;
  onToggleDrive(index: number): void;
  onBasePanel(panel: number): void;
  onClose(): void;
}

export function Inspector({ pattern, project, crease, angleDeg, rate, rateDrive, onToggleDrive, onBasePanel, onClose }: InspectorProps) {
  const c = pattern.creases[crease];
  if (!c) return null;
  const label = creaseLabel(project, crease);
  const isDrive = project.drives.some((d) => d.crease === label);
  const { minDeg, maxDeg } = limitDeg(project, crease);
  const movable = isMovableAssignment(c.assignment);
  const base = project.source.basePanel ?? pattern.basePanel;
  return (
    <section className="panel inspector" aria-label="Crease" data-testid="inspector">
      <div className="inspector-head">
        <h2>
          Crease <span className="mono">{label}</span>
        </h2>
        <button className="icon-button" onClick={onClose} aria-label="close crease details">
          ×
        </button>
      </div>
      <dl className="facts">
        <dt>kind</dt>
        <dd>{ASSIGNMENT_WORDS[c.assignment]}</dd>
        <dt>fold angle</dt>
        <dd data-testid="inspector-angle">{formatAngle(angleDeg, 3)}</dd>
        <dt>rate</dt>
        <dd>{rate === null ? '–' : `${rate.toFixed(4)} °/°${rateDrive ? ` of ${rateDrive}` : ''}`}</dd>
        <dt>limits</dt>
        <dd>{minDeg === undefined && maxDeg === undefined ? 'none' : `${minDeg !== undefined ? formatAngle(minDeg, 1) : '−∞'} … ${maxDeg !== undefined ? formatAngle(maxDeg, 1) : '+∞'}`}</dd>
        <dt>length</dt>
        <dd>{c.length.toPrecision(4)}{project.units ? ` ${project.units}` : ''}</dd>
        <dt>index</dt>
        <dd>{crease} (vertices {c.vertices[0]}–{c.vertices[1]})</dd>
      </dl>
      <div className="inspector-actions">
        {movable ? (
          <button className={isDrive ? '' : 'primary'} onClick={() => onToggleDrive(crease)} data-testid="toggle-drive">
            {isDrive ? 'Stop driving it' : 'Make it a drive'}
          </button>
        ) : (
          <span className="hint">{c.assignment === 'B' ? 'A boundary edge does not fold.' : 'This crease is held flat.'}</span>
        )}
        {[c.leftPanel, c.rightPanel].filter((p) => p >= 0 && p !== base).slice(0, 1).map((p) => (
          <button key={p} onClick={() => onBasePanel(p)} title="Hold this panel still in the 3D view">
            Hold panel {p}
          </button>
        ))}
      </div>
    </section>
  );
}
