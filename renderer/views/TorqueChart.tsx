// The static holding torque of every drive along the path (N·m against the drive), with each drive's peak.
// Shown when the document has loads (an areal density, panel masses or springs).
import { scaleLinear } from 'd3-scale';
import type { PathResultDto } from '../../electron/contract';

const COLORS = ['#16688c', '#b24a24', '#4d7f2a', '#7a5aa6', '#a07a1c'];

export function TorqueChart({ path, labels, width, current }: { path: PathResultDto; labels: string[]; width: number; current: number | null }) {
  const series = new Map<number, (number | null)[]>();
  path.samples.forEach((s, i) => {
    for (const [c, t] of s.torque ?? []) {
      if (!series.has(c)) series.set(c, new Array(path.samples.length).fill(null));
      series.get(c)![i] = t;
    }
  });
  if (!series.size) return null;
  const height = 150;
  const m = { l: 56, r: 12, t: 10, b: 22 };
  const drives = path.samples.map((s) => s.driveDeg);
  const lo = Math.min(...drives), hi = Math.max(...drives);
  const all = [...series.values()].flat().filter((v): v is number => v !== null);
  const ymin = Math.min(0, ...all), ymax = Math.max(0, ...all);
  const x = scaleLinear().domain(lo === hi ? [lo - 1, hi + 1] : [lo, hi]).range([m.l, width - m.r]);
  const y = scaleLinear().domain(ymin === ymax ? [ymin - 1, ymax + 1] : [ymin, ymax]).range([height - m.b, m.t]).nice();
  const line = (vals: (number | null)[]) => vals.map((v, i) => (v === null ? '' : `${i && vals[i - 1] !== null ? 'L' : 'M'}${x(drives[i]).toFixed(1)} ${y(v).toFixed(1)}`)).join('');
  const peaks = new Map((path.peakTorque ?? []).map(([c, t, at]) => [c, { t, at }]));
  return (
    <div className="torque-chart" data-testid="torque-chart">
      <svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} role="img" aria-label="holding torque of each drive along the path">
        {y.ticks(4).map((t) => (
          <g key={t}>
            <line x1={m.l} x2={width - m.r} y1={y(t)} y2={y(t)} className={t === 0 ? 'axis-zero' : 'grid'} />
            <text x={m.l - 5} y={y(t) + 3} textAnchor="end" className="tick">{+t.toPrecision(3)}</text>
          </g>
        ))}
        {x.ticks(8).map((t) => (
          <text key={`x${t}`} x={x(t)} y={height - 6} textAnchor="middle" className="tick">{t}°</text>
        ))}
        <text x={12} y={m.t + (height - m.t - m.b) / 2} className="axis-label" transform={`rotate(-90 12 ${m.t + (height - m.t - m.b) / 2})`} textAnchor="middle">torque N·m</text>
        {[...series].map(([c, vals], k) => (
          <path key={c} d={line(vals)} fill="none" stroke={COLORS[k % COLORS.length]} strokeWidth={1.5} />
        ))}
        {current !== null && drives[current] !== undefined && <line x1={x(drives[current])} x2={x(drives[current])} y1={m.t} y2={height - m.b} className="current" />}
      </svg>
      <div className="torque-legend">
        {[...series.keys()].map((c, k) => (
          <span key={c} data-testid={`torque-peak-${labels[c] ?? c}`}>
            <span className="key-swatch" style={{ background: COLORS[k % COLORS.length] }} /> {labels[c] ?? c}
            {peaks.has(c) ? `: peak ${+peaks.get(c)!.t.toPrecision(4)} N·m at ${peaks.get(c)!.at.toFixed(1)}°` : ''}
          </span>
        ))}
        <span className="scene-hint">static holding torque (positive: the actuator pushes towards valley); no dynamics, friction or hinge play</span>
      </div>
    </div>
  );
}
