// The crease picked on the sheet or in the table: what it is, where it is now, and the one-click actions
// on it (make or stop making it a drive, hold the panel beside it).

import { useState } from 'react';
import type { Pattern } from '../../solver/types';
import type { ProjectDto } from '../../electron/contract';
import { creaseLabel, isMovableAssignment, limitDeg, panelName } from '../state/document';
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
  /** rename a panel beside the crease */
  onPanelName?(panel: number, name: string): void;
  onClose(): void;
}

function PanelName({ project, panel, onCommit }: { project: ProjectDto; panel: number; onCommit(name: string): void }) {
  const current = project.source.panelNames?.[panel] ?? '';
  const [text, setText] = useState<string | null>(null);
  return (
    <input
      className="panel-name"
      aria-label={`name of panel ${panel}`}
      placeholder={`panel ${panel}`}
      value={text ?? current}
      onFocus={() => setText(current)}
      onChange={(e) => setText(e.target.value)}
      onBlur={() => {
        if (text !== null && text !== current) onCommit(text);
        setText(null);
      }}
      onKeyDown={(e) => {
        if (e.key === 'Enter') (e.target as HTMLInputElement).blur();
        if (e.key === 'Escape') {
          setText(null);
          (e.target as HTMLInputElement).blur();
        }
      }}
    />
  );
}

export function Inspector({ pattern, project, crease, angleDeg, rate, rateDrive, onToggleDrive, onBasePanel, onPanelName, onClose }: InspectorProps) {
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
        <dt>panels</dt>
        <dd className="panel-names">
          {[c.leftPanel, c.rightPanel].filter((p) => p >= 0).map((p) => (
            <span key={p} className={`panel-chip${p === base ? ' is-base' : ''}`} title={p === base ? 'the base panel, held still' : `panel ${p}`}>
              {onPanelName ? <PanelName project={project} panel={p} onCommit={(n) => onPanelName(p, n)} /> : panelName(project, p)}
              {p === base ? <span className="base-word">held</span> : null}
            </span>
          ))}
        </dd>
      </dl>
      <div className="inspector-actions">
        {movable ? (
          <button className={isDrive ? '' : 'primary'} onClick={() => onToggleDrive(crease)} data-testid="toggle-drive">
            {isDrive ? 'Stop driving it' : 'Make it a drive'}
          </button>
        ) : (
          <span className="hint">{c.assignment === 'B' ? 'A boundary edge does not fold.' : 'This crease is held flat.'}</span>
        )}
        {[c.leftPanel, c.rightPanel].filter((p) => p >= 0 && p !== base).map((p) => (
          <button key={p} onClick={() => onBasePanel(p)} title="Hold this panel still in the 3D view: it becomes the base panel">
            Hold {panelName(project, p)}
          </button>
        ))}
      </div>
    </section>
  );
}
