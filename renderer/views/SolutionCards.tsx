// Every isolated solution for the current drives as a card (its sign pattern, whether it folds the way the
// creases are assigned, its residual and condition, a small drawing of the shape), every family through
// the drive values as a card of its own (its DOF, its free directions, the drives that would pin it), and
// whether the list is proven complete. Choosing a card makes it current.

import { memo, useMemo, useState } from 'react';
import type { Pattern } from '../../solver/types';
import type { FamilyDto, ProjectDto, SolutionDto } from '../../electron/contract';
import { creaseLabel } from '../state/document';

type SearchSummaryDto = { complete: boolean; method: string; found: number; limit?: number; note: string };
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
  project: ProjectDto;
  solutions: SolutionDto[];
  families?: FamilyDto[];
  search?: SearchSummaryDto;
  suggestedDrives?: string[];
  selected: number;
  selectedFamily?: number | null;
  /** the shown state is a solution or family state (not a path sample) */
  active: boolean;
  basePanel: number;
  onSelect(index: number): void;
  onSelectFamily?(index: number): void;
  onAddDrive?(label: string): void;
}

/** Whether the list is proven to hold every state, in a few words and the solver's own note. */
function SearchLine({ search, shown }: { search: SearchSummaryDto; shown: number }) {
  const capped = search.limit !== undefined && search.found >= search.limit;
  // the verdict on one line; the solver's method and note (which can be long) open below it
  return (
    <details className={`search-line ${search.complete ? 'is-complete' : 'is-open'}`} data-testid="search-summary">
      <summary title={`${search.method}: ${search.note}`}>
        {search.complete ? '✓ complete list' : capped ? `⚠ stopped at ${search.limit} states` : '⚠ not proven complete'}
        <span className="search-note">
          {shown !== search.found ? ` · ${search.found} states found` : ''} · how
        </span>
      </summary>
      <span className="search-note">
        {search.method}
        {search.note ? `: ${search.note}` : ''}
      </span>
    </details>
  );
}

/** The moving creases of a free direction, largest first: "c1 +0.71, c3 −0.71". */
export function directionWords(project: ProjectDto, direction: [number, number][], max = 4): string {
  const parts = [...direction]
    .filter(([, v]) => Math.abs(v) > 1e-6)
    .sort((a, b) => Math.abs(b[1]) - Math.abs(a[1]))
    .map(([c, v]) => `${creaseLabel(project, c)} ${v >= 0 ? '+' : '−'}${Math.abs(v).toFixed(2)}`);
  return parts.length > max ? `${parts.slice(0, max).join(', ')} and ${parts.length - max} more` : parts.join(', ');
}

function FamilyCard({ family, index, project, pattern, basePanel, current, onSelect }: {
  family: FamilyDto; index: number; project: ProjectDto; pattern: Pattern; basePanel: number; current: boolean; onSelect(i: number): void;
}) {
  return (
    <button className={`card family${current ? ' is-current' : ''}`} data-testid="family-card" data-index={index} role="option" aria-selected={current} onClick={() => onSelect(index)}>
      <Thumbnail pattern={pattern} anglesDeg={family.representative.anglesDeg} basePanel={basePanel} />
      <span className="card-body">
        <span className="card-title">
          Family {index + 1} · {family.dof} DOF {family.matchesAssignment ? <span className="badge good">follows M/V</span> : <span className="badge">differs from M/V</span>}
        </span>
        {family.directions.slice(0, 2).map((d, k) => (
          <span key={k} className="card-numbers family-direction" title={directionWords(project, d, 1000)}>
            moves along {directionWords(project, d, 3)}
          </span>
        ))}
      </span>
    </button>
  );
}

export function SolutionCards({ pattern, project, solutions, families = [], search, suggestedDrives, selected, selectedFamily = null, active, basePanel, onSelect, onSelectFamily, onAddDrive }: SolutionCardsProps) {
  // isolated solutions are cards; states the solver left among them with local DOF > 0 lie on continua
  const isolated = solutions.map((s, i) => ({ s, i })).filter(({ s }) => s.localDof === 0);
  const onFamilies = solutions.length - isolated.length;
  const matching = isolated.filter(({ s }) => s.matchesAssignment).length;
  const [onlyMatching, setOnlyMatching] = useState(true);
  const [showLoose, setShowLoose] = useState(false);
  const filter = onlyMatching && matching > 0 && matching < isolated.length;
  const order = (showLoose ? solutions.map((s, i) => ({ s, i })) : isolated)
    .filter(({ s, i }) => !filter || s.matchesAssignment || i === selected || s.localDof > 0)
    .sort((a, b) => Number(b.s.matchesAssignment) - Number(a.s.matchesAssignment) || a.i - b.i);
  if (!solutions.length && !families.length && !search) return null;
  return (
    <section className="panel solutions-panel" aria-label="Solutions">
      <h2>
        Solutions <span className="count" data-testid="solution-count">{isolated.length}</span>
        {families.length > 0 && (
          <>
            {' '}
            families <span className="count" data-testid="family-count">{families.length}</span>
          </>
        )}
      </h2>
      {search && <SearchLine search={search} shown={isolated.length + families.length} />}
      {matching > 0 && matching < isolated.length && (
        <label className="filter">
          <input type="checkbox" checked={onlyMatching} onChange={(e) => setOnlyMatching(e.target.checked)} /> only the {matching} that follow the mountain/valley assignment
        </label>
      )}
      {onFamilies > 0 && (
        <p className="loose-states" data-testid="loose-states">
          {onFamilies} {onFamilies === 1 ? 'state lies' : 'states lie'} on continua (local DOF above 0): members of families, not isolated solutions.
          {suggestedDrives?.length && onAddDrive ? (
            <>
              {' '}Pin them down with a drive:{' '}
              {suggestedDrives.slice(0, 3).map((l) => (
                <button key={l} onClick={() => onAddDrive(l)}>
                  drive {l}
                </button>
              ))}
            </>
          ) : null}{' '}
          <button className="link-button" onClick={() => setShowLoose(!showLoose)}>
            {showLoose ? 'hide them' : 'show them'}
          </button>
        </p>
      )}
      {families.length > 0 && (
        <p className="family-note" data-testid="family-note">
          {families.length === 1 ? 'A family is a continuum through the drive values, not one state; one of its states is drawn.' : 'Families are continua through the drive values, not single states; one state of each is drawn.'}
          {suggestedDrives?.length && onAddDrive ? (
            <>
              {' '}Pin {families.length === 1 ? 'it' : 'them'} down:{' '}
              {suggestedDrives.slice(0, 3).map((l) => (
                <button key={l} onClick={() => onAddDrive(l)} title={`Make ${l} a drive at its angle in the state on screen`}>
                  drive {l}
                </button>
              ))}
            </>
          ) : null}
        </p>
      )}
      <div className="cards" role="listbox" aria-label="Solutions for these drives">
        {families.map((f, k) => (
          <FamilyCard
            key={`f${k}`} family={f} index={k} project={project} pattern={pattern} basePanel={basePanel} current={active && selectedFamily === k}
            onSelect={(i) => onSelectFamily?.(i)}
          />
        ))}
        {order.map(({ s, i }) => (
          <button
            key={i}
            role="option"
            aria-selected={active && selectedFamily === null && i === selected}
            className={`card${active && selectedFamily === null && i === selected ? ' is-current' : ''}`}
            data-testid="solution-card"
            data-index={i}
            onClick={() => onSelect(i)}
          >
            <Thumbnail pattern={pattern} anglesDeg={s.anglesDeg} basePanel={basePanel} />
            <span className="card-body">
              <span className="card-title">
                #{i + 1} {s.matchesAssignment ? <span className="badge good">follows M/V</span> : <span className="badge">differs from M/V</span>}
                {s.localDof > 0 && <span className="badge note">on a family</span>}
              </span>
              <SignGlyphs signs={s.signs} />
              <span className="card-numbers">
                residual {s.maxResidual.toExponential(1)} rad{s.condition !== null ? ` · condition ${s.condition.toPrecision(3)}` : ' · singular'}
              </span>
            </span>
          </button>
        ))}
      </div>
    </section>
  );
}
