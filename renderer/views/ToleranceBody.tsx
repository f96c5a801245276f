// The tolerance tab of the path area: will the manufactured sheet still fold along the path on screen? The
// tolerance of the sheet (positions, sector angles), the number of sheets and the seed, and how densely to take
// the path's samples; progress and cancel while the solver worker follows the sheets; then a fan chart of each
// charted hinge's deviation along the path beside its first-order band, the misfit curve, the numbers at one
// drive value, and the vertices that carry the misfit (also ringed on the flat sheet).

import { useEffect, useMemo, useState } from 'react';
import type { PathResultDto, ProjectDto, ToleranceOptionsDto, ToleranceResultDto } from '../../electron/contract';
import type { Pattern } from '../../solver/types';
import { shownHinges, spreadWidth, type ToleranceState } from '../state/tolerance';
import { FanChart, MisfitChart } from './ToleranceCharts';
import { hingeColor } from './tolerance-look';

export interface ToleranceBodyProps {
  project: ProjectDto;
  pattern: Pattern;
  tolerance: ToleranceState;
  /** the path on screen, which the sheets follow */
  path: PathResultDto | undefined;
  pathRunning: boolean;
  selectedCrease: number | null;
  /** the room the path area leaves (measured by PathPanel) */
  size: { width: number; height: number };
  onRun(request: ToleranceOptionsDto): void;
  onCancel(): void;
  onChoose(creases: number[]): void;
}

const pct = (x: number | null) => (x === null ? '–' : `${(100 * x).toFixed(x === 0 || x === 1 ? 0 : 1)} %`);
const signedDeg = (x: number | null | undefined, digits = 4) => (x === null || x === undefined ? '–' : `${x >= 0 ? '+' : ''}${x.toFixed(digits)}°`);

/** The path's sample spacing, degrees (for the default spacing of the drive values). */
function pathStep(path: PathResultDto | undefined): number {
  const s = path?.samples;
  return s && s.length > 1 ? Math.abs(s[1].driveDeg - s[0].driveDeg) : 1;
}

function ToleranceForm(props: ToleranceBodyProps) {
  const { tolerance, path } = props;
  const last = tolerance.request;
  const [every, setEvery] = useState(String(last?.everyDeg ?? Math.max(10, pathStep(path))));
  const [position, setPosition] = useState(String(last?.positionTol ?? 0.1));
  const [sector, setSector] = useState(String(last?.sectorTolDeg ?? 0));
  const [samples, setSamples] = useState(String(last?.samples ?? 200));
  const [seed, setSeed] = useState(String(last?.seed ?? 1));
  const [problem, setProblem] = useState<string | null>(null);
  const running = tolerance.status === 'running';
  const units = props.project.units || 'file units';
  const run = () => {
    const num = (t: string) => Number(t.trim().replace('°', '').replace(',', '.'));
    const e = num(every), p = num(position), a = num(sector), n = num(samples), k = num(seed);
    if (!path?.samples.length) return setProblem('Compute the path first: the sheets follow it.');
    if (!(e > 0 && e <= 360)) return setProblem('The spacing of the drive values must be above 0° and at most 360°.');
    if (!(p >= 0 && Number.isFinite(p))) return setProblem('The position tolerance must be a length of 0 or more.');
    if (!(a >= 0 && a < 45)) return setProblem('The sector tolerance must be at least 0° and below 45°.');
    if (!(Number.isInteger(n) && n >= 1 && n <= 100_000)) return setProblem('The number of sheets must be a whole number from 1 to 100000.');
    if (!(Number.isInteger(k) && k >= 0 && k < 2 ** 32)) return setProblem('The seed must be a whole number from 0 to 4294967295.');
    setProblem(null);
    props.onRun({ pathId: path.pathId, everyDeg: e, positionTol: p, sectorTolDeg: a, samples: n, seed: k });
  };
  const progress = tolerance.progress;
  const done = progress && progress.total > 0 ? Math.round((100 * progress.done) / progress.total) : 0;
  return (
    <>
      <div className="tolerance-form">
        <label title="the path's samples about this far apart (the first and the last always)">
          every <input className="small-number" value={every} onChange={(e) => setEvery(e.target.value)} aria-label="tolerance drive spacing, degrees" />°
        </label>
        <label title="every vertex lies uniformly in a circle of this diameter around its drawn point">
          position ⌀ <input className="small-number" value={position} onChange={(e) => setPosition(e.target.value)} aria-label={`position tolerance, ${units}`} /> {units}
        </label>
        <label title="every sector angle (a panel corner at a vertex) within ± this of its drawn value">
          sector ± <input className="small-number" value={sector} onChange={(e) => setSector(e.target.value)} aria-label="sector tolerance, degrees" />°
        </label>
        <label>sheets <input className="small-number" value={samples} onChange={(e) => setSamples(e.target.value)} aria-label="number of sheets" /></label>
        <label>seed <input className="small-number" value={seed} onChange={(e) => setSeed(e.target.value)} aria-label="random seed" /></label>
        {running ? (
          <button onClick={props.onCancel} className="danger" data-testid="cancel-tolerance">Cancel</button>
        ) : (
          <button className="primary" onClick={run} disabled={props.pathRunning} data-testid="run-tolerance" title="follow random manufactured sheets along the path">Run sheets</button>
        )}
        {running && (
          <span className="progress" data-testid="tolerance-progress" role="progressbar" aria-valuenow={done} aria-valuemin={0} aria-valuemax={100}>
            <span className="progress-bar" style={{ width: `${done}%` }} />
            <span className="progress-text">{progress?.total ? `${done}% (${progress.done} of ${progress.total} sheets)` : 'starting…'}</span>
          </span>
        )}
        {!running && tolerance.status === 'cancelled' && <span className="path-note" data-testid="tolerance-cancelled">Cancelled{tolerance.result ? '; the previous result is shown' : ''}.</span>}
        {!running && tolerance.status === 'error' && <span className="path-note bad" data-testid="tolerance-error">The analysis failed: {tolerance.error}</span>}
        {problem && <span className="message message-error" data-testid="tolerance-problem">{problem}</span>}
      </div>
    </>
  );
}

/** Numbers at one drive value for the charted hinges: nominal, the deviation's percentiles, σ and the first-order σ. */
function NumbersAt({ hinges, j }: { hinges: ToleranceResultDto['hinges']; j: number }) {
  return (
    <table className="tolerance-numbers" data-testid="tolerance-numbers">
      <thead>
        <tr><th>hinge</th><th>nominal</th><th>5 %</th><th>median</th><th>95 %</th><th>σ</th><th>σ, first order</th></tr>
      </thead>
      <tbody>
        {hinges.map((h) => {
          const n = h.nominalDeg[j];
          const d = (v: number | null) => (v === null || n === null ? null : v - n);
          return (
            <tr key={h.crease} data-crease={h.label}>
              <td className="mono">{h.label}</td>
              <td data-testid="nominal">{n === null ? '–' : `${n.toFixed(4)}°`}</td>
              <td data-testid="p05">{signedDeg(d(h.p05Deg[j]))}</td>
              <td data-testid="p50">{signedDeg(d(h.p50Deg[j]))}</td>
              <td data-testid="p95">{signedDeg(d(h.p95Deg[j]))}</td>
              <td data-testid="std">{h.stdDeg[j] === null ? '–' : `${h.stdDeg[j]!.toFixed(4)}°`}</td>
              <td data-testid="linear-std">{h.linearStdDeg[j] === null ? '–' : `${h.linearStdDeg[j]!.toFixed(4)}°`}</td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

function Results(props: ToleranceBodyProps & { result: ToleranceResultDto }) {
  const { result, pattern, tolerance, size } = props;
  const [at, setAt] = useState(result.atDeg.length - 1);
  useEffect(() => setAt(result.atDeg.length - 1), [result]);
  const hinges = useMemo(() => shownHinges(result, tolerance.chosen, props.selectedCrease), [result, tolerance.chosen, props.selectedCrease]);
  const widest = useMemo(() => [...result.hinges].sort((a, b) => spreadWidth(b) - spreadWidth(a) || a.crease - b.crease).slice(0, 8), [result]);
  const choices = useMemo(() => {
    const sel = props.selectedCrease !== null ? result.hinges.find((h) => h.crease === props.selectedCrease) : undefined;
    return sel && !widest.includes(sel) ? [sel, ...widest] : widest;
  }, [widest, result, props.selectedCrease]);
  const toggle = (c: number) => {
    const current = hinges.map((h) => h.crease);
    props.onChoose(current.includes(c) ? current.filter((x) => x !== c) : [...current, c]);
  };
  const rigid = result.rigidFraction.every((f) => f === 1);
  // the fans and the misfit side by side, as many in a row as fit at 150 px or more
  const width = Math.max(240, size.width - 6);
  const perRow = Math.max(1, Math.min(hinges.length + 1, Math.floor(width / 150)));
  const chartW = Math.floor((width - 8 * (perRow - 1)) / perRow);
  const chartH = Math.max(110, Math.min(160, Math.round(size.height * 0.45)));
  const j = Math.min(at, result.atDeg.length - 1);
  const lost = result.lost.reduce((a, b) => Math.max(a, b), 0);
  const units = props.project.units || 'file units';
  return (
    <>
      <p className="path-summary" data-testid="tolerance-summary">
        {result.samples} of {result.requested} sheets (seed {result.seed}){result.status === 'partial' ? ', the path ended early' : ''}
        {result.branchName ? ` along ${result.branchName}` : ''}; {result.model}.{' '}
        {rigid ? 'Every sheet still folds rigidly.' : `Sheets that still fold rigidly: ${result.rigidFraction.map(pct).join(', ')}.`}
        {lost > 0 ? ` Up to ${lost} sheets lost at some drive values.` : ''}
      </p>
      <div className="tolerance-choose" aria-label="hinges to chart">
        chart:
        {choices.map((h) => (
          <label key={h.crease}>
            <input type="checkbox" checked={hinges.includes(h)} onChange={() => toggle(h.crease)} aria-label={`chart ${h.label}`} />
            {h.label}
          </label>
        ))}
      </div>
      <div className="tolerance-charts">
        {hinges.map((h) => (
          <FanChart key={h.crease} hinge={h} atDeg={result.atDeg} width={chartW} height={chartH} driveLabel={result.driveLabel} color={hingeColor(pattern.creases[h.crease]?.assignment, h.nominalDeg[h.nominalDeg.length - 1])} />
        ))}
        {rigid ? (
          <p className="hint tolerance-rigid" data-testid="misfit-none">No misfit: every sheet closes at every drive value (largest residual ≤ 1e-10 rad).</p>
        ) : (
          <MisfitChart result={result} width={chartW} height={chartH} />
        )}
      </div>
      <p className="tolerance-key">Band: 5–95 % of the sheets; solid: median; dotted: first order (±1.645σ; misfit: RMS at the worst vertex).</p>
      <div className="tolerance-at">
        <label>
          at {result.driveLabel} ={' '}
          <select value={j} onChange={(e) => setAt(Number(e.target.value))} aria-label="tolerance drive value">
            {result.atDeg.map((a, k) => <option key={k} value={k}>{a}°</option>)}
          </select>
        </label>
        <span data-testid="misfit-at">misfit median {result.misfit[j]?.p50?.toExponential(2) ?? '–'}, 95 % {result.misfit[j]?.p95?.toExponential(2) ?? '–'} rad; gap 95 % {result.gap[j]?.p95?.toExponential(2) ?? '–'} {units}; rigid {pct(result.rigidFraction[j] ?? null)}</span>
      </div>
      <NumbersAt hinges={hinges} j={j} />
      {result.worstVertices.length > 0 && (
        <p className="tolerance-worst" data-testid="worst-vertices">
          <span className="worst-ring" /> vertices carrying most of the misfit (ringed on the sheet):{' '}
          {result.worstVertices.slice(0, 6).map((v) => `${v.vertex} (${(100 * v.share).toFixed(1)} %)`).join(', ')}
        </p>
      )}
      {result.messages.filter((m) => m.severity !== 'info').map((m, i) => (
        <p key={i} className={`message message-${m.severity}`}>{m.text}</p>
      ))}
    </>
  );
}

export function ToleranceBody(props: ToleranceBodyProps) {
  const result = props.tolerance.result;
  return (
    <div className="tolerance-body" data-testid="tolerance-body">
      <ToleranceForm {...props} />
      {result ? <Results {...props} result={result} /> : props.tolerance.status !== 'running' && (
        <p className="hint">
          {props.path?.samples.length
            ? 'How far does each hinge land from nominal on manufactured sheets, and how much misfit must they absorb along this path? Set the tolerance and run.'
            : 'Compute the path first: the sheets follow it, on its branch.'}
        </p>
      )}
    </div>
  );
}
