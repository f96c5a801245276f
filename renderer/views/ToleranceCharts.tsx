// The tolerance analysis drawn along the path: for each shown hinge a fan chart of its deviation from nominal
// (the 5–95 % band of the sheets, the median, and the first-order ±1.645σ band as dotted lines), and the misfit
// curve (median, 95th percentile and largest of the sheets' largest vertex residual, with the first-order RMS
// at the worst vertex). Deviations rather than angles: a tenth of a degree on a 60° fold would not show.

import { memo } from 'react';
import { scaleLinear } from 'd3-scale';
import type { ToleranceHingeDto, ToleranceResultDto } from '../../electron/contract';
import { TOLERANCE_LOOK } from './tolerance-look';

const M = { l: 46, r: 10, t: 18, b: 20 };
const NORMAL_95 = 1.6448536269514722;

function line(xs: number[], ys: (number | null)[], y: (v: number) => number): string {
  let d = '';
  let pen = false;
  ys.forEach((v, i) => {
    if (v === null || !Number.isFinite(v)) { pen = false; return; }
    d += `${pen ? 'L' : 'M'}${xs[i].toFixed(1)} ${y(v).toFixed(1)}`;
    pen = true;
  });
  return d;
}

/** The closed outline between two curves (where both are defined), for the band. */
function band(xs: number[], lo: (number | null)[], hi: (number | null)[], y: (v: number) => number): string {
  const idx = xs.map((_, i) => i).filter((i) => lo[i] !== null && hi[i] !== null);
  if (idx.length < 2) return '';
  const top = idx.map((i) => `${xs[i].toFixed(1)} ${y(hi[i]!).toFixed(1)}`);
  const bottom = [...idx].reverse().map((i) => `${xs[i].toFixed(1)} ${y(lo[i]!).toFixed(1)}`);
  return `M${top.join('L')}L${bottom.join('L')}Z`;
}

function ticks(scale: { ticks(n: number): number[] }, n: number): number[] {
  return scale.ticks(n);
}

/** Drive ticks about every 60 pixels. */
function driveTicks(x: { ticks(n: number): number[] }, width: number): number[] {
  return x.ticks(Math.max(2, Math.floor((width - M.l - M.r) / 60)));
}

function fmt(v: number): string {
  const a = Math.abs(v);
  if (a === 0) return '0';
  return a >= 0.1 ? v.toFixed(2) : a >= 1e-3 ? v.toPrecision(2) : v.toExponential(0);
}

interface Frame {
  width: number;
  height: number;
  atDeg: number[];
}

function xScale(f: Frame) {
  const lo = f.atDeg[0], hi = f.atDeg[f.atDeg.length - 1];
  return scaleLinear().domain(lo === hi ? [lo - 1, hi + 1] : [lo, hi]).range([M.l, f.width - M.r]);
}

/** One hinge: the sheets' 5–95 % band of deviation, the median, the first-order band, along the drive. */
export const FanChart = memo(function FanChart({ hinge, atDeg, width, height, driveLabel, color }: { hinge: ToleranceHingeDto; atDeg: number[]; width: number; height: number; driveLabel: string; color: string }) {
  const f = { width, height, atDeg };
  const x = xScale(f);
  const xs = atDeg.map((a) => x(a));
  const dev = (list: (number | null)[]) => list.map((v, j) => (v === null || hinge.nominalDeg[j] === null ? null : v - hinge.nominalDeg[j]!));
  const lo = dev(hinge.p05Deg), mid = dev(hinge.p50Deg), hi = dev(hinge.p95Deg);
  const linHi = hinge.linearStdDeg.map((s) => (s === null ? null : NORMAL_95 * s));
  const linLo = linHi.map((v) => (v === null ? null : -v));
  const values = [...lo, ...hi, ...linLo, ...linHi].filter((v): v is number => v !== null && Number.isFinite(v));
  const big = Math.max(1e-12, ...values.map(Math.abs));
  const y = scaleLinear().domain([-big, big]).range([height - M.b, M.t]).nice();
  return (
    <svg width={width} height={height} className="fan-chart" data-testid="fan-chart" data-crease={hinge.label} role="img" aria-label={`spread of ${hinge.label} along ${driveLabel}`}>
      <text x={4} y={12} fontSize={11} fontWeight={600} fill={TOLERANCE_LOOK.label} fontFamily={TOLERANCE_LOOK.font}>{hinge.label}, ° from nominal</text>
      {ticks(y, 4).map((t) => (
        <g key={t}>
          <line x1={M.l} x2={width - M.r} y1={y(t)} y2={y(t)} stroke={t === 0 ? TOLERANCE_LOOK.zero : TOLERANCE_LOOK.grid} />
          <text x={M.l - 4} y={y(t) + 3} textAnchor="end" fontSize={10} fill={TOLERANCE_LOOK.tick} fontFamily={TOLERANCE_LOOK.font}>{fmt(t)}</text>
        </g>
      ))}
      {driveTicks(x, width).map((t) => (
        <text key={t} x={x(t)} y={height - 6} textAnchor={x(t) > width - M.r - 12 ? 'end' : 'middle'} fontSize={10} fill={TOLERANCE_LOOK.tick} fontFamily={TOLERANCE_LOOK.font}>{t}°</text>
      ))}
      <path d={band(xs, lo, hi, y)} fill={color} fillOpacity={0.28} stroke="none" data-testid="fan-band" />
      <path d={line(xs, mid, y)} fill="none" stroke={color} strokeWidth={1.6} data-testid="fan-median" />
      <path d={line(xs, linHi, y)} fill="none" stroke={TOLERANCE_LOOK.linear} strokeWidth={1.2} strokeDasharray="2 3" />
      <path d={line(xs, linLo, y)} fill="none" stroke={TOLERANCE_LOOK.linear} strokeWidth={1.2} strokeDasharray="2 3" />
      {xs.map((px, j) => (
        <circle key={j} cx={px} cy={mid[j] === null ? -10 : y(mid[j]!)} r={2.2} fill={color}>
          <title>{`${driveLabel} = ${atDeg[j]}°: 5 % ${lo[j]?.toFixed(4)}°, median ${mid[j]?.toFixed(4)}°, 95 % ${hi[j]?.toFixed(4)}°; first order ±${linHi[j]?.toFixed(4) ?? '–'}°`}</title>
        </circle>
      ))}
    </svg>
  );
});

/** The misfit along the drive: median, 95th percentile and largest over the sheets, and the first-order RMS. */
export const MisfitChart = memo(function MisfitChart({ result, width, height }: { result: ToleranceResultDto; width: number; height: number }) {
  const f = { width, height, atDeg: result.atDeg };
  const x = xScale(f);
  const xs = result.atDeg.map((a) => x(a));
  const p50 = result.misfit.map((m) => m.p50), p95 = result.misfit.map((m) => m.p95), max = result.misfit.map((m) => m.max);
  const values = [...max, ...result.linearMisfit].filter((v): v is number => v !== null && Number.isFinite(v));
  const top = Math.max(1e-15, ...values);
  const y = scaleLinear().domain([0, top]).range([height - M.b, M.t]).nice();
  return (
    <svg width={width} height={height} className="misfit-chart" data-testid="misfit-chart" role="img" aria-label={`misfit along ${result.driveLabel}`}>
      <text x={4} y={12} fontSize={11} fontWeight={600} fill={TOLERANCE_LOOK.label} fontFamily={TOLERANCE_LOOK.font}>misfit, largest vertex residual (rad)</text>
      {ticks(y, 4).map((t) => (
        <g key={t}>
          <line x1={M.l} x2={width - M.r} y1={y(t)} y2={y(t)} stroke={TOLERANCE_LOOK.grid} />
          <text x={M.l - 4} y={y(t) + 3} textAnchor="end" fontSize={10} fill={TOLERANCE_LOOK.tick} fontFamily={TOLERANCE_LOOK.font}>{fmt(t)}</text>
        </g>
      ))}
      {driveTicks(x, width).map((t) => (
        <text key={t} x={x(t)} y={height - 6} textAnchor={x(t) > width - M.r - 12 ? 'end' : 'middle'} fontSize={10} fill={TOLERANCE_LOOK.tick} fontFamily={TOLERANCE_LOOK.font}>{t}°</text>
      ))}
      <path d={band(xs, p50, max, y)} fill={TOLERANCE_LOOK.misfit} fillOpacity={0.12} stroke="none" />
      <path d={line(xs, max, y)} fill="none" stroke={TOLERANCE_LOOK.misfit} strokeWidth={1} data-testid="misfit-max" />
      <path d={line(xs, p95, y)} fill="none" stroke={TOLERANCE_LOOK.misfit} strokeWidth={1.4} strokeDasharray="6 3" data-testid="misfit-p95" />
      <path d={line(xs, p50, y)} fill="none" stroke={TOLERANCE_LOOK.misfit} strokeWidth={2} data-testid="misfit-p50" />
      <path d={line(xs, result.linearMisfit, y)} fill="none" stroke={TOLERANCE_LOOK.linear} strokeWidth={1.2} strokeDasharray="2 3" />
      {xs.map((px, j) => (
        <circle key={j} cx={px} cy={p50[j] === null ? -10 : y(p50[j]!)} r={2.2} fill={TOLERANCE_LOOK.misfit}>
          <title>{`${result.driveLabel} = ${result.atDeg[j]}°: median ${p50[j]?.toExponential(3)}, 95 % ${p95[j]?.toExponential(3)}, largest ${max[j]?.toExponential(3)} rad; gap 95 % ${result.gap[j]?.p95?.toExponential(3)}`}</title>
        </circle>
      ))}
    </svg>
  );
});
