// The path along the chosen branch: every hinge angle against the drive, the hinge rates below it with
// near-singular stretches shaded, events marked, the current value marked. Curves that coincide are drawn
// once (a Miura sheet has a handful of distinct curves for thousands of creases). Dragging across either
// chart scrubs the path.

import { memo, useMemo, useRef, type PointerEvent as ReactPointerEvent } from 'react';
import { scaleLinear } from 'd3-scale';
import type { PathEventDto, PathResultDto, ProjectDto } from '../../electron/contract';
import { groupCurves, type CurveGroup } from '../state/display';

const EVENT_LOOK: Record<PathEventDto['type'], { mark: string; word: string }> = {
  'branch-point': { mark: '◆', word: 'branch point' },
  'turning-point': { mark: '▲', word: 'turning point' },
  'hinge-limit': { mark: '■', word: 'hinge limit' },
  'folded-flat': { mark: '●', word: 'folded flat' },
  'corrector-failed': { mark: '✕', word: 'path lost' },
  contact: { mark: '✱', word: 'contact' },
};

export { EVENT_LOOK };

const CURVE_COLORS: Record<string, string> = { V: '#16688c', M: '#b24a24', U: '#6b675f', F: '#a39e92' };

interface ChartProps {
  path: PathResultDto;
  groups: CurveGroup[];
  assignments: string[];
  selectedCrease: number | null;
  current: number | null;
  width: number;
  height: number;
  yLabel: string;
  yDomain: [number, number];
  kind: 'angle' | 'rate';
  shadeNearSingular?: boolean;
  onScrub(index: number, done: boolean): void;
  testId: string;
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

const ChartBody = memo(function ChartBody(p: Omit<ChartProps, 'current' | 'onScrub'>) {
  const { path, groups, width, height } = p;
  const m = { l: 46, r: 12, t: 10, b: 22 };
  const drives = path.samples.map((s) => s.driveDeg);
  const lo = Math.min(...drives), hi = Math.max(...drives);
  const x = scaleLinear().domain(lo === hi ? [lo - 1, hi + 1] : [lo, hi]).range([m.l, width - m.r]);
  const y = scaleLinear().domain(p.yDomain).range([height - m.b, m.t]).nice();
  // angles never go past ±180°: keep the axis there even when rounding would widen it
  if (p.kind === 'angle') y.domain([Math.max(-180, y.domain()[0]), Math.min(180, y.domain()[1])]);
  const xs = drives.map((d) => x(d));
  const span = p.yDomain[1] - p.yDomain[0];
  const paths = useMemo(
    () =>
      groups.map((g) => ({
        // values far off the chart are pulled in (the clip hides them) so the SVG stays small
        d: linePath(
          xs,
          g.values.map((v) => (Number.isFinite(v) ? y(Math.max(p.yDomain[0] - span, Math.min(p.yDomain[1] + span, v))) : NaN)),
          g.values,
          p.kind === 'angle',
        ),
        creases: g.creases,
        color: CURVE_COLORS[p.assignments[g.creases[0]]] ?? '#6b675f',
      })),
    // xs and y follow from the path and the size
    [groups, width, height, p.yDomain[0], p.yDomain[1]],
  );
  const shaded = useMemo(() => {
    if (!p.shadeNearSingular) return [];
    const out: [number, number][] = [];
    let start = -1;
    path.samples.forEach((s, i) => {
      if (s.nearSingular && start < 0) start = i;
      if ((!s.nearSingular || i === path.samples.length - 1) && start >= 0) {
        const end = s.nearSingular ? i : i - 1;
        out.push([xs[Math.max(0, start - (start > 0 ? 0.5 : 0))] ?? xs[start], xs[end]]);
        start = -1;
      }
    });
    return out;
  }, [path, width, p.shadeNearSingular]);
  const ticksX = x.ticks(8);
  const ticksY = y.ticks(5);
  return (
    <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`}>
      {shaded.map(([a, b], i) => (
        <rect key={i} className="near-singular" x={Math.min(a, b) - 2} y={m.t} width={Math.abs(b - a) + 4} height={height - m.t - m.b}>
          <title>near-singular: the rates grow without bound here</title>
        </rect>
      ))}
      {ticksY.map((t) => (
        <g key={`y${t}`}>
          <line x1={m.l} x2={width - m.r} y1={y(t)} y2={y(t)} className={t === 0 ? 'axis-zero' : 'grid'} />
          <text x={m.l - 5} y={y(t) + 3} textAnchor="end" className="tick">
            {t}
          </text>
        </g>
      ))}
      {ticksX.map((t) => (
        <text key={`x${t}`} x={x(t)} y={height - 6} textAnchor="middle" className="tick">
          {t}°
        </text>
      ))}
      <text x={12} y={m.t + (height - m.t - m.b) / 2} className="axis-label" transform={`rotate(-90 12 ${m.t + (height - m.t - m.b) / 2})`} textAnchor="middle">
        {p.yLabel}
      </text>
      <clipPath id={`clip-${p.testId}`}>
        <rect x={m.l} y={m.t} width={width - m.l - m.r} height={height - m.t - m.b} />
      </clipPath>
      <g clipPath={`url(#clip-${p.testId})`}>
      {paths.map((c, i) => {
        const sel = p.selectedCrease !== null && c.creases.includes(p.selectedCrease);
        return (
          <path key={i} d={c.d} stroke={sel ? '#111' : c.color} strokeWidth={sel ? 2.4 : 1.3} fill="none" className="curve" opacity={p.selectedCrease !== null && !sel ? 0.55 : 0.95}>
            <title>{c.creases.length > 1 ? `${c.creases.length} creases follow this curve` : `crease ${c.creases[0]}`}</title>
          </path>
        );
      })}
      </g>
      {path.events.map((e, i) => (
        <g key={i} className={`event event-${e.type}`} transform={`translate(${x(e.driveDeg)} 0)`}>
          <line y1={m.t} y2={height - m.b} />
          <text y={m.t + 9} textAnchor="middle">
            {EVENT_LOOK[e.type].mark}
          </text>
          <title>{`${EVENT_LOOK[e.type].word} at ${e.driveDeg.toFixed(2)}°: ${e.text}`}</title>
        </g>
      ))}
    </svg>
  );
});

/** The curves are drawn once per path; scrubbing only moves the marker, a layer of its own. */
function Chart(p: ChartProps) {
  const { current, onScrub, testId, ...rest } = p;
  const ref = useRef<HTMLDivElement>(null);
  const dragging = useRef(false);
  const drives = p.path.samples.map((s) => s.driveDeg);
  const lo = Math.min(...drives), hi = Math.max(...drives);
  const x = scaleLinear().domain(lo === hi ? [lo - 1, hi + 1] : [lo, hi]).range([46, p.width - 12]);
  const cur = current !== null && p.path.samples[current] ? x(p.path.samples[current].driveDeg) : null;
  const indexAt = (clientX: number): number => {
    const r = ref.current!.getBoundingClientRect();
    const drive = x.invert(((clientX - r.left) / r.width) * p.width);
    let best = 0;
    drives.forEach((d, i) => {
      if (Math.abs(d - drive) < Math.abs(drives[best] - drive)) best = i;
    });
    return best;
  };
  const onPointer = (e: ReactPointerEvent<HTMLDivElement>, kind: 'down' | 'move' | 'up') => {
    if (kind === 'down') {
      dragging.current = true;
      (e.target as Element).setPointerCapture?.(e.pointerId);
    }
    if (!dragging.current) return;
    onScrub(indexAt(e.clientX), kind === 'up');
    if (kind === 'up') dragging.current = false;
  };
  return (
    <div
      ref={ref}
      className="chart"
      style={{ width: p.width, height: p.height }}
      data-testid={testId}
      onPointerDown={(e) => onPointer(e, 'down')}
      onPointerMove={(e) => onPointer(e, 'move')}
      onPointerUp={(e) => onPointer(e, 'up')}
    >
      <ChartBody {...rest} testId={testId} />
      {cur !== null && <div className="current" style={{ transform: `translateX(${cur}px)`, height: p.height - 24 }} />}
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

/** A y range that keeps the bulk of the rates readable when they blow up near a singular state. */
export function rateDomain(groups: CurveGroup[]): [number, number] {
  const all = groups.flatMap((g) => g.values.filter(Number.isFinite)).map(Math.abs).sort((a, b) => a - b);
  if (!all.length) return [-1, 1];
  const q = all[Math.floor(all.length * 0.95)] || all[all.length - 1] || 1;
  const r = Math.max(1, q * 1.2);
  return [-r, r];
}

export interface PathChartsProps {
  path: PathResultDto;
  project: ProjectDto;
  selectedCrease: number | null;
  current: number | null;
  width: number;
  onScrub(index: number, done: boolean): void;
}

export function PathCharts({ path, project, selectedCrease, current, width, onScrub }: PathChartsProps) {
  const creases = useMemo(
    () => project.source.assignments.map((a, i) => (a === 'B' ? -1 : i)).filter((i) => i >= 0),
    [project.source.assignments],
  );
  const angleGroups = useMemo(() => groupCurves(path, creases, 'angle'), [path, creases]);
  const rateGroups = useMemo(() => groupCurves(path, creases, 'rate'), [path, creases]);
  const rDomain = useMemo(() => rateDomain(rateGroups), [rateGroups]);
  const aDomain = useMemo(() => angleDomain(angleGroups), [angleGroups]);
  const h = 150;
  return (
    <div className="charts">
      <div className="chart-caption">
        Hinge angles (°) against drive {path.driveLabel}: {angleGroups.length} distinct {angleGroups.length === 1 ? 'curve' : 'curves'} for {creases.length} creases
      </div>
      <Chart path={path} groups={angleGroups} assignments={project.source.assignments} selectedCrease={selectedCrease} current={current} width={width} height={h} kind="angle" yLabel="angle °" yDomain={aDomain} onScrub={onScrub} testId="angle-chart" />
      <div className="chart-caption">
        Hinge rates (° per ° of drive); <span className="near-singular-key">shaded</span>: near-singular
      </div>
      <Chart path={path} groups={rateGroups} assignments={project.source.assignments} selectedCrease={selectedCrease} current={current} width={width} height={h - 20} kind="rate" yLabel="rate" yDomain={rDomain} shadeNearSingular onScrub={onScrub} testId="rate-chart" />
    </div>
  );
}
