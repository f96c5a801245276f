// The folded shape in 3D: orbit (drag), pan (right-drag or shift-drag), zoom (wheel), fit (and follow the
// shape as it folds until the person zooms or pans), optional flat ghost and labels, an axis triad and a
// scale bar in the document's unit. The scene itself is renderer/views/folded-scene.ts.

import { useEffect, useRef, useState } from 'react';
import type { Pattern } from '../../solver/types';
import type { ProjectDto } from '../../electron/contract';
import { creaseLabel } from '../state/document';
import { formatAngle } from '../state/display';
import { FoldedScene, webglAvailable } from './folded-scene';

export interface FoldedViewProps {
  pattern: Pattern;
  project: ProjectDto;
  anglesDeg: readonly number[];
  caption: string;
  selectedCrease: number | null;
  violatingPanels: Set<number>;
  /** panels in contact with another in the shown state */
  contactPanels?: Set<number>;
  ghost: boolean;
  labels: boolean;
  fitRequest: number;
  maxMismatch?: number;
  /** the base panel's name (or "panel k") */
  baseName?: string;
  onToggleGhost(): void;
  onToggleLabels(): void;
  onFit(): void;
}

export function FoldedView(props: FoldedViewProps) {
  const hostRef = useRef<HTMLDivElement>(null);
  const sceneRef = useRef<FoldedScene | null>(null);
  const [failed, setFailed] = useState<string | null>(null);
  const [following, setFollowing] = useState(true);
  const { pattern, project, anglesDeg, selectedCrease, violatingPanels, ghost, labels, fitRequest } = props;
  const basePanel = project.source.basePanel ?? pattern.basePanel;
  const fitted = useRef<Pattern | null>(null);

  useEffect(() => {
    const host = hostRef.current;
    if (!host) return;
    if (!webglAvailable()) {
      setFailed('The 3D view needs WebGL, which this computer does not offer. The sheet, the charts and the table still work.');
      return;
    }
    let scene: FoldedScene;
    try {
      scene = new FoldedScene(host);
    } catch (err) {
      setFailed(`The 3D view could not start: ${err instanceof Error ? err.message : String(err)}`);
      return;
    }
    sceneRef.current = scene;
    scene.onAutoFitChange = setFollowing;
    const ro = typeof ResizeObserver !== 'undefined' ? new ResizeObserver(() => scene.resize()) : null;
    ro?.observe(host);
    return () => {
      ro?.disconnect();
      scene.dispose();
      sceneRef.current = null;
      fitted.current = null;
    };
  }, []);

  useEffect(() => {
    const scene = sceneRef.current;
    if (!scene) return;
    scene.units = project.units ?? '';
    scene.setPattern(pattern);
    scene.setAngles(anglesDeg, basePanel);
    if (fitted.current !== pattern) {
      fitted.current = pattern;
      scene.fit();
    }
  }, [pattern, anglesDeg, basePanel, project.units]);

  useEffect(() => {
    const scene = sceneRef.current;
    if (!scene) return;
    const driveLabels = new Set(project.drives.map((d) => d.crease));
    scene.setOptions({
      ghost,
      labels,
      selected: selectedCrease,
      drives: pattern.creases.filter((c) => driveLabels.has(c.label)).map((c) => c.index),
      violatingPanels,
      ...(props.contactPanels ? { contactPanels: props.contactPanels } : {}),
      basePanel,
      labelText: (c) => `${creaseLabel(project, c)} ${formatAngle(anglesDeg[c] ?? 0, 1)}`,
    });
  }, [ghost, labels, selectedCrease, violatingPanels, props.contactPanels, basePanel, project, pattern, anglesDeg]);

  useEffect(() => {
    if (fitRequest > 0) sceneRef.current?.fit();
  }, [fitRequest]);

  return (
    <div className="folded-view">
      <div className="view-toolbar">
        <span className="view-caption" data-testid="shape-caption">{props.caption}</span>
        <button onClick={props.onFit} title="Fit the shape to the view and follow it as it folds (F)" className={following ? 'is-on' : ''} data-testid="fit">
          {following ? 'Fit: following' : 'Fit'}
        </button>
      </div>
      <div className="scene-host" ref={hostRef} data-testid="scene">
        {failed && <div className="scene-failed">{failed}</div>}
      </div>
      <div className="scene-key">
        <span className="key-item">
          <span className="key-swatch key-base" /> <span data-testid="key-base">base: {props.baseName ?? 'panel'} (held)</span>
        </span>
        <span className="key-item">
          <span className="key-swatch key-violating" />
          <span className={violatingPanels.size ? 'key-used' : ''} data-testid="key-past-limit">past a hinge stop{violatingPanels.size ? ` (${violatingPanels.size} panels)` : ''}</span>
        </span>
        <span className="key-item">
          <span className="key-swatch key-contact" />
          <span className={props.contactPanels?.size ? 'key-used' : ''}>in contact{props.contactPanels?.size ? <span data-testid="contact-count"> ({props.contactPanels.size} panels)</span> : null}</span>
        </span>
        <span className="key-item">
          <span className="key-swatch key-under" /> underside
        </span>
        {props.maxMismatch !== undefined && props.maxMismatch > 1e-6 && (
          <span className="mismatch" data-testid="mismatch" title="The panels do not close up: the largest distance between two placements of one vertex, reached through different panels">
            closure gap {props.maxMismatch.toPrecision(2)}{project.units ? ` ${project.units}` : ' (file units)'}
          </span>
        )}
        <label className="scene-toggle" title="Show the flat sheet behind the shape (G)">
          <input type="checkbox" checked={ghost} onChange={props.onToggleGhost} /> ghost
        </label>
        <label className="scene-toggle" title="Label every hinge (L)">
          <input type="checkbox" checked={labels} onChange={props.onToggleLabels} /> labels
        </label>
        <span className="scene-hint" title="drag: orbit · right-drag or shift-drag: pan · wheel: zoom">drag · right-drag · wheel</span>
      </div>
    </div>
  );
}
