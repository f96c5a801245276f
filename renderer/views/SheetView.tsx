// The flat sheet: panels shaded, creases in the trade's line styles (valley dashed, mountain dash-dot),
// tinted by the signed fold angle on screen (Hingeplan's scale, renderer/palette.ts), the base panel
// hatched, panels past a hinge stop cross-hatched, drives haloed. Creases are drawn as a
// few paths grouped by style and tint step, so a sheet of thousands of creases stays cheap to redraw;
// hovering and clicking find the crease geometrically.

import { memo, useCallback, useMemo, useRef, useState, type PointerEvent as ReactPointerEvent, type WheelEvent as ReactWheelEvent } from 'react';
import type { Pattern } from '../../solver/types';
import type { ProjectDto } from '../../electron/contract';
import { bucketColor, formatAngle, tintBucket, ASSIGNMENT_WORDS } from '../state/display';
import { PALETTE, angleColor } from '../palette';
import { creaseLabel } from '../state/document';
import { flatBounds, pickerFor } from '../geometry';

export interface SheetViewProps {
  pattern: Pattern;
  project: ProjectDto;
  anglesDeg: readonly number[];
  selectedCrease: number | null;
  hoverCrease: number | null;
  violatingPanels: Set<number>;
  /** panels in contact with another in the shown state */
  contactPanels?: Set<number>;
  /** creases past a hinge stop, haloed in the past-limit colour */
  violatingCreases?: Set<number>;
  /** vertices to ring (the tolerance analysis's worst vertices), the ring growing with the share */
  marks?: { vertex: number; share: number }[];
  onHover(index: number | null): void;
  onSelect(index: number | null): void;
}

type LineStyle = 'valley' | 'mountain' | 'unassigned' | 'flat' | 'boundary';

const STYLE_OF: Record<string, LineStyle> = { V: 'valley', M: 'mountain', U: 'unassigned', F: 'flat', B: 'boundary' };

/** Dash patterns in screen pixels (the strokes do not scale with zoom). */
export const DASHES: Record<LineStyle, string | undefined> = {
  valley: '7 4',
  mountain: '9 3 2 3',
  unassigned: undefined,
  flat: '1 4',
  boundary: undefined,
};

export interface CreaseGroup {
  key: string;
  style: LineStyle;
  color: string;
  d: string;
}

const segmentCache = new WeakMap<Pattern, string[]>();

/** The path text of every crease, made once per pattern (formatting numbers is the costly part). */
function segments(pattern: Pattern): string[] {
  let s = segmentCache.get(pattern);
  if (!s) {
    s = pattern.creases.map((c) => {
      const [ax, ay] = pattern.vertices[c.vertices[0]];
      const [bx, by] = pattern.vertices[c.vertices[1]];
      return `M${ax} ${ay}L${bx} ${by}`;
    });
    segmentCache.set(pattern, s);
  }
  return s;
}

/** Paths of the creases grouped by line style and tint step. */
export function creaseGroups(pattern: Pattern, anglesDeg: readonly number[]): CreaseGroup[] {
  const parts = new Map<string, { style: LineStyle; color: string; segs: string[] }>();
  const segs = segments(pattern);
  for (const c of pattern.creases) {
    const style = STYLE_OF[c.assignment] ?? 'unassigned';
    const color = style === 'boundary' ? PALETTE.boundary : style === 'flat' ? PALETTE.heldFlat : bucketColor(tintBucket(anglesDeg[c.index] ?? 0));
    const key = `${style}|${color}`;
    const seg = segs[c.index];
    const g = parts.get(key);
    if (g) g.segs.push(seg);
    else parts.set(key, { style, color, segs: [seg] });
  }
  return [...parts.entries()].map(([key, g]) => ({ key, style: g.style, color: g.color, d: g.segs.join('') }));
}

function panelPath(pattern: Pattern, panels: Iterable<number>): string {
  const out: string[] = [];
  for (const p of panels) {
    const vs = pattern.panels[p]?.vertices;
    if (!vs?.length) continue;
    out.push('M' + vs.map((v) => `${pattern.vertices[v][0]} ${pattern.vertices[v][1]}`).join('L') + 'Z');
  }
  return out.join('');
}

function segment(pattern: Pattern, index: number): string {
  const c = pattern.creases[index];
  if (!c) return '';
  const [ax, ay] = pattern.vertices[c.vertices[0]];
  const [bx, by] = pattern.vertices[c.vertices[1]];
  return `M${ax} ${ay}L${bx} ${by}`;
}

const Panels = memo(function Panels({ pattern, basePanel }: { pattern: Pattern; basePanel: number }) {
  const all = useMemo(() => panelPath(pattern, pattern.panels.map((p) => p.index)), [pattern]);
  const base = useMemo(() => panelPath(pattern, [basePanel]), [pattern, basePanel]);
  return (
    <>
      <path d={all} className="sheet-panels" />
      <path d={base} className="sheet-base" fill="url(#sheet-base)" data-testid="base-panel" />
    </>
  );
});

/** Rings at the vertices that carry most of the misfit: radius from 1 % to 3 % of the sheet with the share. */
function MisfitMarks({ pattern, marks, size }: { pattern: Pattern; marks: { vertex: number; share: number }[]; size: number }) {
  const top = Math.max(...marks.map((m) => m.share), 1e-300);
  return (
    <g data-testid="misfit-marks">
      {marks.map((m) => {
        const [x, y] = pattern.vertices[m.vertex] ?? [0, 0];
        const r = size * (0.01 + 0.02 * Math.sqrt(m.share / top));
        return (
          <circle key={m.vertex} cx={x} cy={y} r={r} fill={PALETTE.misfit} fillOpacity={0.12} stroke={PALETTE.misfit} strokeWidth={2} vectorEffect="non-scaling-stroke" data-testid="misfit-mark" data-vertex={m.vertex}>
            <title>{`vertex ${m.vertex}: ${(100 * m.share).toFixed(1)} % of the misfit`}</title>
          </circle>
        );
      })}
    </g>
  );
}

/** Hatch patterns of the base panel and of panels past a hinge stop, in screen pixels (scale: sheet units per pixel). */
export function HatchDefs({ id, scale = 1 }: { id: string; scale?: number }) {
  return (
    <defs>
      <pattern id={`${id}-base`} width="6" height="6" patternUnits="userSpaceOnUse" patternTransform={`rotate(45) scale(${scale})`}>
        <rect width="6" height="6" fill="#dcebe4" />
        <line x1="0" y1="0" x2="0" y2="6" stroke={PALETTE.base} strokeWidth="2" />
      </pattern>
      <pattern id={`${id}-past`} width="6" height="6" patternUnits="userSpaceOnUse" patternTransform={`scale(${scale})`}>
        <rect width="6" height="6" fill="#f4d9d5" />
        <path d="M0 0L6 6M6 0L0 6" stroke={PALETTE.pastLimit} strokeWidth="1.3" />
      </pattern>
    </defs>
  );
}

function LineKey({ dash, color, width = 2 }: { dash?: string; color: string; width?: number }) {
  return (
    <svg width="30" height="8" aria-hidden="true">
      <line x1="1" y1="4" x2="29" y2="4" stroke={color} strokeWidth={width} strokeDasharray={dash} />
    </svg>
  );
}

export function Legend() {
  const stops = [-180, -150, -120, -90, -60, -30, -15, 0, 15, 30, 60, 90, 120, 150, 180];
  const W = 196;
  // room for the half of "−180°" that hangs past each end of the ramp
  const PAD = 18;
  return (
    <div className="legend" aria-label="Colour code">
      <div className="legend-scale">
        <svg width={W + 2 * PAD} height="30" viewBox={`0 0 ${W + 2 * PAD} 30`} role="img" aria-label="fold angle scale from mountain −180° through flat 0° to valley +180°">
          <defs>
            <linearGradient id="tint-ramp" x1="0" x2="1" y1="0" y2="0">
              {stops.map((s) => (
                <stop key={s} offset={(s + 180) / 360} stopColor={angleColor(s)} />
              ))}
            </linearGradient>
          </defs>
          <rect x={PAD} y="3" width={W} height="9" fill="url(#tint-ramp)" stroke="#77736a" strokeWidth="0.5" />
          {[-180, -90, 0, 90, 180].map((s) => (
            <g key={s} transform={`translate(${PAD + ((s + 180) / 360) * W} 0)`}>
              <line y1="12" y2="16" stroke="#55524b" />
              <text y="26" textAnchor="middle" className="legend-tick">
                {s > 0 ? `+${s}` : s < 0 ? `−${-s}` : '0'}°
              </text>
            </g>
          ))}
        </svg>
        <div className="legend-words">
          <span className="mountain-word">mountain −</span>
          <span>flat</span>
          <span className="valley-word">+ valley</span>
        </div>
      </div>
      <div className="legend-lines">
        <LineKey dash={DASHES.valley} color={PALETTE.valley} />
        <span>valley</span>
        <LineKey dash={DASHES.mountain} color={PALETTE.mountain} />
        <span>mountain</span>
        <LineKey color={PALETTE.flat} />
        <span>unassigned</span>
        <LineKey dash="8 0" color={PALETTE.drive} width={7} />
        <span>drive</span>
        <svg width="16" height="12" aria-hidden="true">
          <HatchDefs id="legend" />
          <rect x="1" y="1" width="14" height="10" fill="url(#legend-base)" stroke={PALETTE.base} />
        </svg>
        <span>base panel</span>
        <svg width="16" height="12" aria-hidden="true">
          <rect x="1" y="1" width="14" height="10" fill="url(#legend-past)" stroke={PALETTE.pastLimit} />
        </svg>
        <span>past a stop</span>
      </div>
    </div>
  );
}

export function SheetView(props: SheetViewProps) {
  const { pattern, project, anglesDeg, selectedCrease, hoverCrease, violatingPanels, violatingCreases, onHover, onSelect } = props;
  const groupRef = useRef<SVGGElement>(null);
  const wrapRef = useRef<HTMLDivElement>(null);
  const bounds = useMemo(() => flatBounds(pattern), [pattern]);
  const [zoom, setZoom] = useState<{ s: number; cx: number; cy: number } | null>(null);
  const [tip, setTip] = useState<{ x: number; y: number } | null>(null);
  const drag = useRef<{ x: number; y: number; moved: boolean } | null>(null);

  const w = bounds.maxX - bounds.minX || 1;
  const h = bounds.maxY - bounds.minY || 1;
  const pad = Math.max(w, h) * 0.04;
  const view = zoom
    ? { x: zoom.cx - (w + 2 * pad) / zoom.s / 2, y: zoom.cy - (h + 2 * pad) / zoom.s / 2, w: (w + 2 * pad) / zoom.s, h: (h + 2 * pad) / zoom.s }
    : { x: bounds.minX - pad, y: bounds.minY - pad, w: w + 2 * pad, h: h + 2 * pad };
  // flip y: the sheet's y axis points up
  const viewBox = `${view.x} ${-(view.y + view.h)} ${view.w} ${view.h}`;

  const groups = useMemo(() => creaseGroups(pattern, anglesDeg), [pattern, anglesDeg]);
  const drives = useMemo(() => {
    const labels = new Set(project.drives.map((d) => d.crease));
    return pattern.creases.filter((c) => labels.has(c.label)).map((c) => c.index);
  }, [pattern, project.drives]);
  const violating = useMemo(() => panelPath(pattern, violatingPanels), [pattern, violatingPanels]);
  const touching = useMemo(() => panelPath(pattern, props.contactPanels ?? []), [pattern, props.contactPanels]);
  const basePanel = project.source.basePanel ?? pattern.basePanel;

  const toSheet = useCallback((clientX: number, clientY: number): [number, number] | null => {
    const g = groupRef.current;
    const m = g?.getScreenCTM?.();
    if (!m) return null;
    const p = new DOMPoint(clientX, clientY).matrixTransform(m.inverse());
    return [p.x, p.y];
  }, []);

  const pixelSize = useCallback((): number => {
    const m = groupRef.current?.getScreenCTM?.();
    return m ? 1 / Math.hypot(m.a, m.b) : view.w / 600;
  }, [view.w]);

  const pickAt = (e: ReactPointerEvent): number | null => {
    const p = toSheet(e.clientX, e.clientY);
    if (!p) return null;
    return pickerFor(pattern).pick(p[0], p[1], 6 * pixelSize());
  };

  const onMove = (e: ReactPointerEvent<SVGSVGElement>) => {
    if (drag.current && e.buttons & 1) {
      const dx = e.clientX - drag.current.x, dy = e.clientY - drag.current.y;
      if (Math.abs(dx) + Math.abs(dy) > 3) drag.current.moved = true;
      if (drag.current.moved) {
        const px = pixelSize();
        const base = zoom ?? { s: 1, cx: bounds.minX + w / 2, cy: bounds.minY + h / 2 };
        setZoom({ s: base.s, cx: base.cx - dx * px, cy: base.cy + dy * px });
        drag.current = { x: e.clientX, y: e.clientY, moved: true };
        return;
      }
    }
    const hit = pickAt(e);
    onHover(hit);
    const r = wrapRef.current?.getBoundingClientRect();
    setTip(hit !== null && r ? { x: e.clientX - r.left, y: e.clientY - r.top } : null);
  };

  const onWheel = (e: ReactWheelEvent<SVGSVGElement>) => {
    const p = toSheet(e.clientX, e.clientY);
    if (!p) return;
    const base = zoom ?? { s: 1, cx: bounds.minX + w / 2, cy: bounds.minY + h / 2 };
    const s = Math.max(1, Math.min(40, base.s * (e.deltaY < 0 ? 1.2 : 1 / 1.2)));
    if (s === 1) return setZoom(null);
    // keep the point under the cursor in place
    const k = base.s / s;
    setZoom({ s, cx: p[0] + (base.cx - p[0]) * k, cy: p[1] + (base.cy - p[1]) * k });
  };

  const hover = hoverCrease !== null ? pattern.creases[hoverCrease] : undefined;
  const isDrive = (i: number) => drives.includes(i);

  return (
    <div className="sheet-view" ref={wrapRef} data-testid="sheet">
      <svg
        className="sheet-svg"
        viewBox={viewBox}
        preserveAspectRatio="xMidYMid meet"
        onPointerMove={onMove}
        onPointerLeave={() => {
          onHover(null);
          setTip(null);
        }}
        onPointerDown={(e) => {
          drag.current = { x: e.clientX, y: e.clientY, moved: false };
        }}
        onPointerUp={(e) => {
          const wasDrag = drag.current?.moved;
          drag.current = null;
          if (!wasDrag) onSelect(pickAt(e));
        }}
        onWheel={onWheel}
        onDoubleClick={() => setZoom(null)}
        role="img"
        aria-label={`Flat sheet of ${pattern.name}: ${pattern.creases.length} creases, ${pattern.panels.length} panels`}
      >
        <HatchDefs id="sheet" scale={pixelSize()} />
        <g ref={groupRef} className="sheet-flip" transform="scale(1 -1)">
          <Panels pattern={pattern} basePanel={basePanel} />
          {violating && <path d={violating} className="sheet-violating" fill="url(#sheet-past)" data-testid="past-limit-panels" />}
          {touching && <path d={touching} className="sheet-contact" data-testid="sheet-contact" />}
          {drives.map((i) => (
            <path key={`drive-${i}`} d={segment(pattern, i)} className="sheet-drive-halo" vectorEffect="non-scaling-stroke" />
          ))}
          {[...(violatingCreases ?? [])].map((i) => (
            <path key={`past-${i}`} d={segment(pattern, i)} className="sheet-past-halo" vectorEffect="non-scaling-stroke" data-testid="past-limit-crease" />
          ))}
          {selectedCrease !== null && <path d={segment(pattern, selectedCrease)} className="sheet-selected-halo" vectorEffect="non-scaling-stroke" />}
          {hoverCrease !== null && hoverCrease !== selectedCrease && (
            <path d={segment(pattern, hoverCrease)} className="sheet-hover-halo" vectorEffect="non-scaling-stroke" />
          )}
          {groups.map((g) => (
            <path
              key={g.key}
              d={g.d}
              stroke={g.color}
              strokeDasharray={DASHES[g.style]}
              className={`crease crease-${g.style}`}
              vectorEffect="non-scaling-stroke"
              fill="none"
            />
          ))}
          {props.marks && props.marks.length > 0 && <MisfitMarks pattern={pattern} marks={props.marks} size={Math.max(w, h)} />}
        </g>
      </svg>
      {drives.length > 0 && (
        <div className="sheet-drive-tags">
          {drives.map((i) => (
            <span key={i} className="drive-tag">
              drive {pattern.creases[i].label}
            </span>
          ))}
        </div>
      )}
      {hover && tip && (
        <div className="hover-label" style={{ left: tip.x + 14, top: tip.y + 10 }} data-testid="hover-label">
          <strong>{creaseLabel(project, hover.index)}</strong> {ASSIGNMENT_WORDS[hover.assignment]} · {formatAngle(anglesDeg[hover.index] ?? 0)}
          {isDrive(hover.index) ? ' · drive' : ''}
        </div>
      )}
      {zoom && (
        <button className="sheet-reset" onClick={() => setZoom(null)} title="Show the whole sheet (double-click)">
          Whole sheet
        </button>
      )}
    </div>
  );
}
