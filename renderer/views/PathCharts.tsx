// The path along the chosen branch: every hinge angle against the drive, the hinge rates below it with
// near-singular stretches shaded, events marked, the current value marked. Curves that coincide are drawn
// once (a Miura sheet has a handful of distinct curves for thousands of creases) and labelled at their
// right end; hovering shows the crease, its angle and rate at that drive value; a curve that leaves the
// rate plot is marked where it leaves. Dragging across either chart scrubs the path. The charts carry
// their colours as attributes, so the SVG exported from them stands alone.

import { memo, useMemo, useRef, useState, type PointerEvent as ReactPointerEvent } from 'react';
import { scaleLinear } from 'd3-scale';
import type { PathEventDto, PathResultDto, ProjectDto } from '../../electron/contract';
import { groupCurves, type CurveGroup } from '../state/display';
import { creaseLabel } from '../state/document';
import { PALETTE, angleColor } from '../palette';
import { CAUTIONS as CAUTIONS_TEXT } from '../../solver/formats/cautions';

const EVENT_LOOK: Record<PathEventDto['type'], { mark: string; word: string; color: string }> = {
  'branch-point': { mark: '◆', word: 'branch point', color: '#5b4a8a' },
  'turning-point': { mark: '▲', word: 'turning point', color: '#4a473f' },
  'hinge-limit': { mark: '■', word: 'hinge limit', color: PALETTE.pastLimit },
  'folded-flat': { mark: '●', word: 'folded flat', color: '#4a473f' },
  'corrector-failed': { mark: '✕', word: 'path lost', color: PALETTE.pastLimit },
  contact: { mark: '✱', word: 'contact', color: PALETTE.contact },
};

export { EVENT_LOOK };

const INK = { grid: '#e6e2d9', zero: '#a8a295', tick: '#5f5b53', label: '#4a473f', current: '#111111', shade: 'rgba(168, 23, 13, 0.12)' };
const FONT = "'DejaVu Sans', sans-serif";
export const MARGIN = { l: 48, r: 64, t: 12, b: 30 };
/** curves labelled at their end when there are at most this many distinct ones */
const MAX_END_LABELS = 12;

/** The colour of a curve: mountain and valley creases in their scale colours, others by where they go. */
export function curveColor(assignment: string, values: number[], kind: 'angle' | 'rate'): string {
  if (assignment === 'M') return PALETTE.mountain;
  if (assignment === 'V') return PALETTE.valley;
  if (assignment === 'F') return PALETTE.heldFlat;
  // an unassigned crease: by the sign it folds to over the path (rates by the angle they drive)
  let end = 0;
  for (let i = values.length - 1; i >= 0; i--) if (Number.isFinite(values[i])) { end = values[i]; break; }
  if (kind === 'rate') end = Math.sign(end) * 120;
  return angleColor(Math.sign(end) * Math.max(60, Math.abs(end)));
}

/** SVG path through the points; breaks where a value is missing or where an angle wraps past ±180°. */
function linePath(xs: number[], ys: number[], values: number[], wrap: boolean): string {
  let d = '';
  let pen = false;
  for (let i = 0; i < xs.length; i++) {
    if (!Number.isFinite(ys[i])) {
      pen = false;
      continue;
    }
    if (wrap && i > 0 && Math.abs(values[i] - values[i - 1]) > 180) pen = false;
    d += `${pen ? 'L' : 'M'}${xs[i].toFixed(1)} ${ys[i].toFixed(1)}`;
    pen = true;
  }
  return d;
}

/** Where a curve leaves the plot: the first sample past the top or the bottom of each excursion. */
export function clipMarks(values: number[], domain: [number, number]): { index: number; side: 'top' | 'bottom' }[] {
  const out: { index: number; side: 'top' | 'bottom' }[] = [];
  let outside: 'top' | 'bottom' | null = null;
  values.forEach((v, i) => {
    const side = !Number.isFinite(v) ? null : v > domain[1] ? 'top' : v < domain[0] ? 'bottom' : null;
    if (side && side !== outside) out.push({ index: i, side });
    outside = side;
  });
  return out;
}

/**
 * End labels spread so they do not overlap: y positions in the same order, at least `gap` apart, within
 * [lo, hi] (the gap shrinks when there are too many to fit).
 */
export function spreadLabels(ys: number[], gap: number, lo: number, hi: number): number[] {
  const order = ys.map((y, i) => ({ y, i })).sort((a, b) => a.y - b.y);
  const n = order.length;
  const g = n > 1 ? Math.min(gap, (hi - lo) / (n - 1)) : gap;
  const p = order.map((o) => Math.max(lo, Math.min(hi, o.y)));
  for (let k = 1; k < n; k++) p[k] = Math.max(p[k], p[k - 1] + g);
  if (n) p[n - 1] = Math.min(p[n - 1], hi);
  for (let k = n - 2; k >= 0; k--) p[k] = Math.min(p[k], p[k + 1] - g);
  const placed: number[] = new Array(n);
  order.forEach((o, k) => (placed[o.i] = p[k]));
  return placed;
}

/** A curve's value at its right end, on the side it arrives from (±180° are one rotation). */
export function endValue(values: number[]): { i: number; v: number } | null {
  for (let i = values.length - 1; i >= 0; i--) {
    if (!Number.isFinite(values[i])) continue;
    const prev = values.slice(0, i).reverse().find(Number.isFinite);
    const v = prev !== undefined && Math.abs(values[i] - prev) > 180 ? Math.sign(prev) * Math.abs(values[i]) : values[i];
    return { i, v };
  }
  return null;
}

interface ChartProps {
  path: PathResultDto;
  groups: CurveGroup[];
  labels: string[];
  colors: string[];
  selectedCrease: number | null;
  hovered: number | null;
  width: number;
  height: number;
  yLabel: string;
  xLabel: string;
  yDomain: [number, number];
  kind: 'angle' | 'rate';
  shadeNearSingular?: boolean;
  testId: string;
  /** a click on a curve's end label picks its (first) crease */
  onPick?(crease: number): void;
}

function xScale(path: PathResultDto, width: number) {
  const drives = path.samples.map((s) => s.driveDeg);
  const lo = Math.min(...drives), hi = Math.max(...drives);
  return scaleLinear().domain(lo === hi ? [lo - 1, hi + 1] : [drives[0], drives[drives.length - 1]]).range([MARGIN.l, width - MARGIN.r]);
}

function yScale(p: { yDomain: [number, number]; height: number; kind: 'angle' | 'rate' }) {
  const y = scaleLinear().domain(p.yDomain).range([p.height - MARGIN.b, MARGIN.t]).nice();
  // angles never go past ±180°: keep the axis there even when rounding would widen it
  if (p.kind === 'angle') y.domain([Math.max(-180, y.domain()[0]), Math.min(180, y.domain()[1])]);
  return y;
}

const ChartBody = memo(function ChartBody(p: ChartProps) {
  const { path, groups, width, height } = p;
  const x = xScale(path, width);
  const y = yScale(p);
  const dom = y.domain() as [number, number];
  const xs = path.samples.map((s) => x(s.driveDeg));
  const span = dom[1] - dom[0];
  const curves = useMemo(
    () =>
      groups.map((g, k) => ({
        // values far off the chart are pulled in (the clip hides them) so the SVG stays small
        d: linePath(xs, g.values.map((v) => (Number.isFinite(v) ? y(Math.max(dom[0] - span, Math.min(dom[1] + span, v))) : NaN)), g.values, p.kind === 'angle'),
        marks: p.kind === 'rate' ? clipMarks(g.values, dom) : [],
        creases: g.creases,
        color: p.colors[k],
        label: p.labels[k],
        end: endValue(g.values),
      })),
    // xs and y follow from the path and the size
    [groups, width, height, dom[0], dom[1], p.colors, p.labels],
  );
  const shaded = useMemo(() => {
    if (!p.shadeNearSingular) return [];
    const out: [number, number][] = [];
    let start = -1;
    path.samples.forEach((s, i) => {
      if (s.nearSingular && start < 0) start = i;
      if ((!s.nearSingular || i === path.samples.length - 1) && start >= 0) {
        const end = s.nearSingular ? i : i - 1;
        out.push([xs[start], xs[end]]);
        start = -1;
      }
    });
    return out;
  }, [path, width, p.shadeNearSingular]);
  const labelled = curves.length <= MAX_END_LABELS;
  const endYs = labelled ? spreadLabels(curves.map((c) => (c.end ? y(Math.max(dom[0], Math.min(dom[1], c.end.v))) : MARGIN.t)), 11, MARGIN.t + 4, height - MARGIN.b) : [];
  const ticksX = x.ticks(Math.max(3, Math.floor((width - MARGIN.l - MARGIN.r) / 60)));
  const ticksY = y.ticks(Math.max(3, Math.floor((height - MARGIN.t - MARGIN.b) / 28)));
  const plotH = height - MARGIN.t - MARGIN.b;
  const emphasis = p.hovered ?? (p.selectedCrease !== null ? curves.findIndex((c) => c.creases.includes(p.selectedCrease!)) : -1);
  return (
    <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} fontFamily={FONT} xmlns="http://www.w3.org/2000/svg">
      <rect x={0} y={0} width={width} height={height} fill="#fffdf9" />
      {shaded.map(([a, b], i) => (
        <rect key={i} className="near-singular" x={Math.min(a, b) - 2} y={MARGIN.t} width={Math.abs(b - a) + 4} height={plotH} fill={INK.shade}>
          <title>near-singular: the rates grow without bound here</title>
        </rect>
      ))}
      {ticksY.map((t) => (
        <g key={`y${t}`}>
          <line x1={MARGIN.l} x2={width - MARGIN.r} y1={y(t)} y2={y(t)} stroke={t === 0 ? INK.zero : INK.grid} />
          <text x={MARGIN.l - 5} y={y(t) + 3} textAnchor="end" className="tick" fontSize={10} fill={INK.tick}>
            {t}
          </text>
        </g>
      ))}
      {ticksX.map((t) => (
        <text key={`x${t}`} x={x(t)} y={height - MARGIN.b + 12} textAnchor="middle" className="tick" fontSize={10} fill={INK.tick}>
          {t}°
        </text>
      ))}
      <text x={MARGIN.l + (width - MARGIN.l - MARGIN.r) / 2} y={height - 4} textAnchor="middle" className="axis-label" fontSize={10} fill={INK.label}>
        {p.xLabel}
      </text>
      <text x={11} y={MARGIN.t + plotH / 2} className="axis-label" transform={`rotate(-90 11 ${MARGIN.t + plotH / 2})`} textAnchor="middle" fontSize={10} fill={INK.label}>
        {p.yLabel}
      </text>
      <clipPath id={`clip-${p.testId}`}>
        <rect x={MARGIN.l} y={MARGIN.t - 1} width={width - MARGIN.l - MARGIN.r} height={plotH + 2} />
      </clipPath>
      <g clipPath={`url(#clip-${p.testId})`}>
        {curves.map((c, i) => {
          const on = i === emphasis;
          return (
            <path key={i} d={c.d} stroke={c.color} strokeWidth={on ? 2.6 : 1.4} fill="none" className="curve" data-curve={i} opacity={emphasis >= 0 && !on ? 0.5 : 1}>
              <title>{c.label}</title>
            </path>
          );
        })}
      </g>
      {curves.flatMap((c, i) =>
        c.marks.map((m, j) => {
          const mx = xs[m.index];
          const my = m.side === 'top' ? MARGIN.t : height - MARGIN.b;
          const pts = m.side === 'top' ? `${mx - 4},${my + 6} ${mx + 4},${my + 6} ${mx},${my - 1}` : `${mx - 4},${my - 6} ${mx + 4},${my - 6} ${mx},${my + 1}`;
          return (
            <polygon key={`clip-${i}-${j}`} points={pts} fill={c.color} stroke="#fffdf9" strokeWidth={0.8} className="clip-mark" data-testid="clip-mark">
              <title>{`${c.label} leaves the plot here (${m.side === 'top' ? 'above' : 'below'} ${m.side === 'top' ? dom[1] : dom[0]})`}</title>
            </polygon>
          );
        }),
      )}
      {labelled &&
        curves.map((c, i) =>
          c.end ? (
            <text
              key={`l${i}`} x={width - MARGIN.r + 4} y={endYs[i] + 3} fontSize={9.5} fill={c.color === PALETTE.valley ? '#8a6200' : c.color} className="curve-label" fontWeight={i === emphasis ? 700 : 400}
              onPointerDown={(e) => e.stopPropagation()}
              onClick={() => p.onPick?.(c.creases[0])}
            >
              <title>{`${c.label}: click to pick the crease`}</title>
              {c.label.length > 11 ? `${c.label.slice(0, 10)}…` : c.label}
            </text>
          ) : null,
        )}
      {path.events.map((e, i) => (
        <g key={i} className={`event event-${e.type}`} transform={`translate(${x(e.driveDeg)} 0)`}>
          <line y1={MARGIN.t} y2={height - MARGIN.b} stroke={EVENT_LOOK[e.type].color} strokeDasharray="2 3" />
          <text y={MARGIN.t + 9} textAnchor="middle" fontSize={10} fill={EVENT_LOOK[e.type].color}>
            {EVENT_LOOK[e.type].mark}
          </text>
          <title>{`${EVENT_LOOK[e.type].word} at ${e.driveDeg.toFixed(2)}°: ${e.text}`}</title>
        </g>
      ))}
    </svg>
  );
});

interface HoverInfo {
  curve: number;
  sample: number;
  x: number;
  y: number;
}

/** The curves are drawn once per path; scrubbing only moves the marker, a layer of its own. */
function Chart(p: ChartProps & { current: number | null; onScrub(index: number, done: boolean): void; onHover(h: HoverInfo | null): void; hover: HoverInfo | null; readout: (h: HoverInfo) => string }) {
  const { current, onScrub, onHover, hover, readout, ...rest } = p;
  const ref = useRef<HTMLDivElement>(null);
  const dragging = useRef(false);
  const drives = p.path.samples.map((s) => s.driveDeg);
  const x = xScale(p.path, p.width);
  const y = yScale(p);
  const cur = current !== null && p.path.samples[current] ? x(p.path.samples[current].driveDeg) : null;
  const locate = (clientX: number, clientY: number) => {
    const r = ref.current!.getBoundingClientRect();
    const px = ((clientX - r.left) / (r.width || p.width)) * p.width;
    const py = ((clientY - r.top) / (r.height || p.height)) * p.height;
    const drive = x.invert(px);
    let best = 0;
    drives.forEach((d, i) => {
      if (Math.abs(d - drive) < Math.abs(drives[best] - drive)) best = i;
    });
    return { index: best, px, py };
  };
  const onPointer = (e: ReactPointerEvent<HTMLDivElement>, kind: 'down' | 'move' | 'up') => {
    if (kind === 'down') {
      dragging.current = true;
      (e.target as Element).setPointerCapture?.(e.pointerId);
    }
    const at = locate(e.clientX, e.clientY);
    if (!dragging.current) {
      // hover: the curve nearest the pointer at this sample
      let bestCurve = -1, bestD = 14;
      p.groups.forEach((g, k) => {
        const v = g.values[at.index];
        if (!Number.isFinite(v)) return;
        const d = Math.abs(y(v) - at.py);
        if (d < bestD) {
          bestD = d;
          bestCurve = k;
        }
      });
      onHover(bestCurve >= 0 ? { curve: bestCurve, sample: at.index, x: at.px, y: at.py } : null);
      return;
    }
    onScrub(at.index, kind === 'up');
    if (kind === 'up') dragging.current = false;
  };
  const mine = hover && hover.curve >= 0 ? hover : null;
  return (
    <div
      ref={ref}
      className="chart"
      style={{ width: p.width, height: p.height }}
      data-testid={p.testId}
      onPointerDown={(e) => onPointer(e, 'down')}
      onPointerMove={(e) => onPointer(e, 'move')}
      onPointerUp={(e) => onPointer(e, 'up')}
      onPointerLeave={() => onHover(null)}
    >
      <ChartBody {...rest} hovered={mine?.curve ?? null} />
      {cur !== null && <div className="current" style={{ transform: `translateX(${cur}px)`, top: MARGIN.t, height: p.height - MARGIN.t - MARGIN.b }} />}
      {mine && (
        <div className="chart-readout" data-testid="chart-readout" style={{ left: Math.min(mine.x + 12, p.width - 230), top: Math.max(0, mine.y - 30) }}>
          {readout(mine)}
        </div>
      )}
    </div>
  );
}

/** The extent of the angles, padded, within ±180°. */
export function angleDomain(groups: CurveGroup[]): [number, number] {
  let lo = 0, hi = 0;
  for (const g of groups) for (const v of g.values) if (Number.isFinite(v)) {
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  const pad = Math.max(5, (hi - lo) * 0.06);
  return [Math.max(-180, lo - pad), Math.min(180, hi + pad)];
}

/**
 * A y range that keeps the bulk of the rates readable when they blow up near a singular state: the 95th
 * percentile of |rate|; curves beyond it are marked where they leave the plot, and the caption says so.
 */
export function rateDomain(groups: CurveGroup[]): [number, number] {
  const all = groups.flatMap((g) => g.values.filter(Number.isFinite)).map(Math.abs).sort((a, b) => a - b);
  if (!all.length) return [-1, 1];
  const q = all[Math.floor(all.length * 0.95)] || all[all.length - 1] || 1;
  const r = Math.max(1, q * 1.2);
  return [-r, r];
}

/** How many curves leave the rate plot, and the largest |rate| they reach. */
export function clippedCurves(groups: CurveGroup[], domain: [number, number]): { count: number; peak: number } {
  let count = 0, peak = 0;
  for (const g of groups) {
    let out = false;
    for (const v of g.values) if (Number.isFinite(v) && (v > domain[1] || v < domain[0])) { out = true; peak = Math.max(peak, Math.abs(v)); }
    if (out) count++;
  }
  return { count, peak };
}

export interface PathChartsProps {
  path: PathResultDto;
  project: ProjectDto;
  selectedCrease: number | null;
  current: number | null;
  width: number;
  /** heights of the angle and rate charts (the panel fits them to its room) */
  heights?: { angle: number; rate: number };
  onScrub(index: number, done: boolean): void;
  /** a curve's label was clicked: pick its crease */
  onPickCrease?(crease: number): void;
  /** the charts as one stand-alone SVG, for the export buttons */
  onExport?(format: 'svg' | 'png', svg: string, size: { width: number; height: number }): void;
}

export function PathCharts({ path, project, selectedCrease, current, width, heights, onScrub, onPickCrease, onExport }: PathChartsProps) {
  const creases = useMemo(
    () => project.source.assignments.map((a, i) => (a === 'B' ? -1 : i)).filter((i) => i >= 0),
    [project.source.assignments],
  );
  const angleGroups = useMemo(() => groupCurves(path, creases, 'angle'), [path, creases]);
  const rateGroups = useMemo(() => groupCurves(path, creases, 'rate'), [path, creases]);
  const rDomain = useMemo(() => rateDomain(rateGroups), [rateGroups]);
  const aDomain = useMemo(() => angleDomain(angleGroups), [angleGroups]);
  const name = (g: CurveGroup) =>
    g.creases.length === 2 ? `${creaseLabel(project, g.creases[0])}, ${creaseLabel(project, g.creases[1])}` : `${creaseLabel(project, g.creases[0])}${g.creases.length > 2 ? ` +${g.creases.length - 1}` : ''}`;
  const aLabels = useMemo(() => angleGroups.map(name), [angleGroups, project]);
  const rLabels = useMemo(() => rateGroups.map(name), [rateGroups, project]);
  const aColors = useMemo(() => angleGroups.map((g) => curveColor(project.source.assignments[g.creases[0]], g.values, 'angle')), [angleGroups, project]);
  const rColors = useMemo(() => rateGroups.map((g) => curveColor(project.source.assignments[g.creases[0]], path.samples.map((s) => s.anglesDeg[g.creases[0]]), 'angle')), [rateGroups, project, path]);
  const clipped = useMemo(() => clippedCurves(rateGroups, yScale({ yDomain: rDomain, height: 100, kind: 'rate' }).domain() as [number, number]), [rateGroups, rDomain]);
  const [hover, setHover] = useState<{ chart: 'angle' | 'rate'; h: HoverInfo } | null>(null);
  const hA = heights?.angle ?? 150;
  const hR = heights?.rate ?? 130;
  const holder = useRef<HTMLDivElement>(null);
  const readout = (groups: CurveGroup[], labels: string[]) => (h: HoverInfo) => {
    const g = groups[h.curve];
    const c = g.creases[0];
    const s = path.samples[h.sample];
    const rate = s.rates[c];
    return `${labels[h.curve]}${g.creases.length > 1 ? ' creases' : ''} · ${s.anglesDeg[c].toFixed(2)}° · rate ${rate === null ? '∞' : rate.toFixed(3)} °/° at ${path.driveLabel} = ${s.driveDeg.toFixed(2)}°`;
  };
  const exportAs = (format: 'svg' | 'png') => {
    const svgs = holder.current?.querySelectorAll('.chart > svg');
    if (!svgs || svgs.length < 2 || !onExport) return;
    const svg = standaloneChartSvg(path, [...svgs] as SVGSVGElement[], width, [hA, hR]);
    onExport(format, svg, { width, height: Number(/height="(\d+)"/.exec(svg)?.[1] ?? hA + hR) });
  };
  return (
    <div className="charts" ref={holder}>
      <div className="chart-caption">
        <span>
          Hinge angles (°) against drive {path.driveLabel}: {angleGroups.length} distinct {angleGroups.length === 1 ? 'curve' : 'curves'}, {creases.length} creases
        </span>
        {onExport && (
          <span className="chart-export">
            export <button onClick={() => exportAs('svg')} title="Both charts as an SVG file">SVG</button>
            <button onClick={() => exportAs('png')} title="Both charts as a PNG picture">PNG</button>
          </span>
        )}
      </div>
      <Chart
        path={path} groups={angleGroups} labels={aLabels} colors={aColors} selectedCrease={selectedCrease} hovered={null} current={current} width={width} height={hA}
        kind="angle" yLabel="fold angle (°)" xLabel={`drive ${path.driveLabel} (°)`} yDomain={aDomain} onScrub={onScrub} testId="angle-chart" onPick={onPickCrease}
        hover={hover?.chart === 'angle' ? hover.h : null} onHover={(h) => setHover(h ? { chart: 'angle', h } : null)} readout={readout(angleGroups, aLabels)}
      />
      <div className="chart-caption">
        <span>Hinge rates (° per ° of {path.driveLabel})</span>
        <span className="chip">
          <span className="near-singular-key">shaded</span>: near-singular
        </span>
        {clipped.count > 0 && (
          <span className="clipped-note" data-testid="clipped-note" title="These curves leave the plot where the triangles are; their largest rate is given">
            ▲▼ {clipped.count} off the plot, |rate| to {clipped.peak.toPrecision(3)}
          </span>
        )}
      </div>
      <Chart
        path={path} groups={rateGroups} labels={rLabels} colors={rColors} selectedCrease={selectedCrease} hovered={null} current={current} width={width} height={hR}
        kind="rate" yLabel="rate (°/°)" xLabel={`drive ${path.driveLabel} (°)`} yDomain={rDomain} shadeNearSingular onScrub={onScrub} testId="rate-chart" onPick={onPickCrease}
        hover={hover?.chart === 'rate' ? hover.h : null} onHover={(h) => setHover(h ? { chart: 'rate', h } : null)} readout={readout(rateGroups, rLabels)}
      />
    </div>
  );
}

function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/**
 * The two charts stacked in one SVG file with a title line and the cautions line every exported file
 * carries. The charts draw with attributes only, so the file looks the same outside the app.
 */
export function standaloneChartSvg(path: PathResultDto, charts: SVGSVGElement[], width: number, heights: number[], cautions = CAUTIONS_TEXT): string {
  const serializer = new XMLSerializer();
  const head = 22;
  let yOff = head;
  const bodies = charts.map((svg, i) => {
    const inner = serializer.serializeToString(svg).replace(/^<svg[^>]*>/, '').replace(/<\/svg>$/, '');
    const g = `<g transform="translate(0 ${yOff})">${inner}</g>`;
    yOff += heights[i];
    return g;
  });
  // the cautions line in full, wrapped at word boundaries to the width
  const perLine = Math.max(40, Math.floor(width / 5.4));
  const lines: string[] = [];
  for (const word of cautions.split(' ')) {
    if (lines.length && (lines[lines.length - 1] + ' ' + word).length <= perLine) lines[lines.length - 1] += ' ' + word;
    else lines.push(word);
  }
  const total = yOff + 10 + lines.length * 12;
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${total}" viewBox="0 0 ${width} ${total}" font-family="DejaVu Sans, sans-serif">`,
    `<desc>${escapeXml(cautions)}</desc>`,
    `<rect width="${width}" height="${total}" fill="#fffdf9"/>`,
    `<text x="8" y="15" font-size="12" fill="#22211e">${escapeXml(`Hinge angles and rates against drive ${path.driveLabel} (${path.samples.length} samples${path.branchName ? `, branch ${path.branchName}` : ''})`)}</text>`,
    ...bodies,
    ...lines.map((l, i) => `<text x="8" y="${yOff + 14 + i * 12}" font-size="9" fill="#5f5b53" class="cautions">${escapeXml(l)}</text>`),
    `</svg>`,
  ].join('\n');
}

