// Every solution for the current drives as a card: its sign pattern, whether it folds the way the creases
// are assigned, its residual and a small drawing of the shape. Choosing a card makes it current.

import { memo, useMemo, useState } from 'react';
import type { Pattern } from '../../solver/types';
import type { SolutionDto } from '../../electron/contract';
import { shapeFor } from '../geometry';

const VIEW = (() => {
  const d = [0.35, -0.75, 0.85];
  const n = Math.hypot(...d);
  const f = d.map((x) => -x / n);
  // right = f × z, up = right × f
  const r = [f[1], -f[0], 0];
  const rn = Math.hypot(...r);
  const right = r.map((x) => x / rn);
  const up = [right[1] * f[2] - right[2] * f[1], right[2] * f[0] - right[0] * f[2], right[0] * f[1] - right[1] * f[0]];
  return { f, right, up };
})();

const dot = (a: number[], b: number[]) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];

/** Polygons of the folded panels seen from the 3D view's starting direction, far ones first. */
export function thumbnailPolygons(pattern: Pattern, anglesDeg: readonly number[], basePanel: number): { points: string; shade: number }[] {
  const shape = shapeFor(pattern, anglesDeg, basePanel);
  const polys = pattern.panels.map((p) => {
    const T = shape.panelTransforms[p.index];
    const pts = p.vertices.map((v) => {
      const [x, y] = pattern.vertices[v];
      return [T[0] * x + T[1] * y + T[3], T[4] * x + T[5] * y + T[7], T[8] * x + T[9] * y + T[11]];
    });
    const normal = [T[2], T[6], T[10]];
    const depth = pts.reduce((s, q) => s + dot(q, VIEW.f), 0) / pts.length;
    const facing = dot(normal, VIEW.f);
    const shade = 0.55 + 0.45 * Math.abs(facing);
    return { pts: pts.map((q) => [dot(q, VIEW.right), -dot(q, VIEW.up)]), depth, shade: facing < 0 ? shade : shade * 0.8 };
  });
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (const p of polys) for (const [x, y] of p.pts) {
    minX = Math.min(minX, x);
    maxX = Math.max(maxX, x);
    minY = Math.min(minY, y);
    maxY = Math.max(maxY, y);
  }
  const s = 88 / Math.max(maxX - minX, maxY - minY, 1e-9);
  const ox = (96 - (maxX - minX) * s) / 2, oy = (72 - (maxY - minY) * s) / 2;
  return polys
    .sort((a, b) => b.depth - a.depth)
    .map((p) => ({ points: p.pts.map(([x, y]) => `${((x - minX) * s + ox).toFixed(1)},${((y - minY) * s + oy).toFixed(1)}`).join(' '), shade: p.shade }));
}

const Thumbnail = memo(function Thumbnail({ pattern, anglesDeg, basePanel }: { pattern: Pattern; anglesDeg: number[]; basePanel: number }) {
  const polys = useMemo(() => thumbnailPolygons(pattern, anglesDeg, basePanel), [pattern, anglesDeg, basePanel]);
  return (
    <svg className="thumb" width="96" height="72" viewBox="0 0 96 72" aria-hidden="true">
      {polys.map((p, i) => {
        const g = Math.round(120 + 120 * p.shade);
        return <polygon key={i} points={p.points} fill={`rgb(${g - 6}, ${g - 2}, ${Math.min(255, g + 4)})`} stroke="#5b584f" strokeWidth="0.4" />;
      })}
    </svg>
  );
});

function SignGlyphs({ signs }: { signs: string }) {
  const shown = signs.length > 48 ? signs.slice(0, 48) : signs;
  return (
    <span className="signs" title={`fold signs per crease: + valley, − mountain, 0 flat\n${signs}`}>
      {[...shown].map((c, i) => (
        <span key={i} className={c === '+' ? 'sign-v' : c === '-' ? 'sign-m' : 'sign-0'}>
          {c === '-' ? '−' : c}
        </span>
      ))}
      {signs.length > shown.length && <span className="sign-more">…</span>}
    </span>
  );
}

export interface SolutionCardsProps {
  pattern: Pattern;
  solutions: SolutionDto[];
  selected: number;
  /** the shown state is a solution (not a path sample) */
  active: boolean;
  basePanel: number;
  onSelect(index: number): void;
}

export function SolutionCards({ pattern, solutions, selected, active, basePanel, onSelect }: SolutionCardsProps) {
  const matching = solutions.filter((s) => s.matchesAssignment).length;
  const [onlyMatching, setOnlyMatching] = useState(true);
  const filter = onlyMatching && matching > 0 && matching < solutions.length;
  const order = solutions
    .map((s, i) => ({ s, i }))
    .filter(({ s, i }) => !filter || s.matchesAssignment || i === selected)
    .sort((a, b) => Number(b.s.matchesAssignment) - Number(a.s.matchesAssignment) || a.i - b.i);
  if (!solutions.length) return null;
  return (
    <section className="panel solutions-panel" aria-label="Solutions">
      <h2>
        Solutions <span className="count">{solutions.length}</span>
      </h2>
      {matching > 0 && matching < solutions.length && (
        <label className="filter">
          <input type="checkbox" checked={onlyMatching} onChange={(e) => setOnlyMatching(e.target.checked)} /> only the {matching} that follow the mountain/valley assignment
        </label>
      )}
      <div className="cards" role="listbox" aria-label="Solutions for these drives">
        {order.map(({ s, i }) => (
          <button
            key={i}
            role="option"
            aria-selected={active && i === selected}
            className={`card${active && i === selected ? ' is-current' : ''}`}
            data-testid="solution-card"
            data-index={i}
            onClick={() => onSelect(i)}
          >
            <Thumbnail pattern={pattern} anglesDeg={s.anglesDeg} basePanel={basePanel} />
            <span className="card-body">
              <span className="card-title">
                #{i + 1} {s.matchesAssignment ? <span className="badge good">follows M/V</span> : <span className="badge">differs from M/V</span>}
              </span>
              <SignGlyphs signs={s.signs} />
              <span className="card-numbers">
                residual {((s.maxResidual * 180) / Math.PI).toExponential(1)}° · local DOF {s.localDof}
              </span>
            </span>
          </button>
        ))}
      </div>
    </section>
  );
}
