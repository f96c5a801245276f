// Will the manufactured sheet still fold? The tolerance of the sheet (positions, sector angles), the number of
// sheets and the seed; progress and cancel while the solver worker follows the sheets; then a fan chart of
// each shown hinge's deviation along the path, the misfit curve, the numbers at one drive value, and the
// vertices that drive the misfit (also ringed on the flat sheet).

import { useEffect, useMemo, useRef, useState } from 'react';
import type { ProjectDto, ToleranceOptionsDto, ToleranceResultDto } from '../../electron/contract';
import type { Pattern } from '../../solver/types';
import { shownHinges, spreadWidth, type ToleranceState } from '../state/tolerance';
import { FanChart, MisfitChart } from './ToleranceCharts';
import { hingeColor, TOLERANCE_LOOK } from './tolerance-look';

export interface TolerancePanelProps {
  project: ProjectDto;
  pattern: Pattern;
  tolerance: ToleranceState;
  selectedCrease: number | null;
  /** the path's drive and range, the starting values of the form */
  defaults: { drive?: string; fromDeg: number; toDeg: number };
  onRun(request: Omit<ToleranceOptionsDto, 'held' | 'branchId'>): void;
  onCancel(): void;
  onChoose(creases: number[]): void;
}

function useWidth<T extends HTMLElement>(): [React.RefObject<T | null>, number] {
  const ref = useRef<T>(null);
  const [w, setW] = useState(600);
  useEffect(() => {
    const el = ref.current;
    if (!el || typeof ResizeObserver === 'undefined') return;
    const ro = new ResizeObserver(() => setW(Math.max(240, Math.floor(el.clientWidth))));
    ro.observe(el);
    setW(Math.max(240, Math.floor(el.clientWidth)));
    return () => ro.disconnect();
  }, []);
  return [ref, w];
}

const pct = (x: number | null) => (x === null ? '–' : `${(100 * x).toFixed(x === 0 || x === 1 ? 0 : 1)} %`);
const degText = (x: number | null | undefined, digits = 4) => (x === null || x === undefined ? '–' : `${x >= 0 ? '+' : ''}${x.toFixed(digits)}°`);

/** The form: what to analyse. Numbers are checked here before they are sent. */
function ToleranceForm(props: TolerancePanelProps) {
  const { project, tolerance } = props;
  const last = tolerance.request;
  const [drive, setDrive] = useState(last?.drive ?? props.defaults.drive ?? project.drives[0]?.crease ?? '');
  const [from, setFrom] = useState(String(last?.fromDeg ?? props.defaults.fromDeg));
  const [to, setTo] = useState(String(last?.toDeg ?? props.defaults.toDeg));
  const [step, setStep] = useState(String(last?.stepDeg ?? 10));
  const [position, setPosition] = useState(String(last?.positionTol ?? 0.1));
  const [sector, setSector] = useState(String(last?.sectorTolDeg ?? 0));
  const [samples, setSamples] = useState(String(last?.samples ?? 200));
  const [seed, setSeed] = useState(String(last?.seed ?? 1));
  const [problem, setProblem] = useState<string | null>(null);
  useEffect(() => {
    if (!project.drives.some((d) => d.crease === drive)) setDrive(project.drives[0]?.crease ?? '');
  }, [project.drives, drive]);
  const running = tolerance.status === 'running';
  const run = () => {
    const f = Number(from), t = Number(to), s = Number(step), p = Number(position), a = Number(sector), n = Number(samples), k = Number(seed);
    if (![f, t].every((v) => Number.isFinite(v) && v >= -180 && v <= 180)) return setProblem('The range must lie between −180° and 180°.');
    if (!(s > 0 && s <= 90)) return setProblem('The step must be above 0° and at most 90°.');
    if (!(p >= 0 && Number.isFinite(p))) return setProblem('The position tolerance must be a length of 0 or more.');
    if (!(a >= 0 && a < 45)) return setProblem('The sector tolerance must be at least 0° and below 45°.');
    if (!(Number.isInteger(n) && n >= 1 && n <= 100_000)) return setProblem('The number of sheets must be a whole number from 1 to 100000.');
    if (!(Number.isInteger(k) && k >= 0 && k < 2 ** 32)) return setProblem('The seed must be a whole number from 0 to 4294967295.');
    setProblem(null);
    props.onRun({ drive, fromDeg: f, toDeg: t, stepDeg: s, positionTol: p, sectorTolDeg: a, samples: n, seed: k });
  };
  const progress = tolerance.progress;
  const done = progress && progress.total > 0 ? Math.round((100 * progress.done) / progress.total) : 0;
  const units = project.units || 'file units';
  return (
    <>
      <div className="path-controls tolerance-controls">
        <h2>Tolerance</h2>
        <label>
          drive
          <select value={drive} onChange={(e) => setDrive(e.target.value)} aria-label="tolerance drive" disabled={!project.drives.length}>
            {project.drives.map((d) => <option key={d.crease} value={d.crease}>{d.crease}</option>)}
          </select>
        </label>
        <label>from <input className="small-number" value={from} onChange={(e) => setFrom(e.target.value)} aria-label="tolerance from, degrees" />°</label>
        <label>to <input className="small-number" value={to} onChange={(e) => setTo(e.target.value)} aria-label="tolerance to, degrees" />°</label>
        <label>step <input className="small-number" value={step} onChange={(e) => setStep(e.target.value)} aria-label="tolerance step, degrees" />°</label>
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
          <button className="primary" onClick={run} disabled={!drive} data-testid="run-tolerance">Run</button>
        )}
        {running && (
          <span className="progress" data-testid="tolerance-progress" role="progressbar" aria-valuenow={done} aria-valuemin={0} aria-valuemax={100}>
            <span className="progress-bar" style={{ width: `${done}%` }} />
            <span className="progress-text">{progress?.total ? `${done}% (${progress.done} of ${progress.total} sheets)` : 'nominal path…'}</span>
          </span>
        )}
        {!running && tolerance.status === 'cancelled' && <span className="path-note" data-testid="tolerance-cancelled">Cancelled{tolerance.result ? '; the previous result is shown' : ''}.</span>}
        {!running && tolerance.status === 'error' && <span className="path-note bad">The analysis failed: {tolerance.error}</span>}
      </div>
      {problem && <p className="message message-error" data-testid="tolerance-problem">{problem}</p>}
    </>
  );
}

/** Numbers at one drive value for the shown hinges: nominal, the deviation's percentiles, σ and the first-order σ. */
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
              <td data-testid="p05">{degText(d(h.p05Deg[j]))}</td>
              <td data-testid="p50">{degText(d(h.p50Deg[j]))}</td>
              <td data-testid="p95">{degText(d(h.p95Deg[j]))}</td>
              <td data-testid="std">{h.stdDeg[j] === null ? '–' : `${h.stdDeg[j]!.toFixed(4)}°`}</td>
              <td data-testid="linear-std">{h.linearStdDeg[j] === null ? '–' : `${h.linearStdDeg[j]!.toFixed(4)}°`}</td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

function Results(props: TolerancePanelProps & { result: ToleranceResultDto; width: number }) {
  const { result, pattern, tolerance, width } = props;
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
  const perRow = Math.max(1, Math.min(hinges.length + 1, Math.floor(width / 150)));
  const chartW = Math.floor((width - 8 * (perRow - 1) - 4) / perRow);
  const j = Math.min(at, result.atDeg.length - 1);
  const lost = result.lost.reduce((a, b) => Math.max(a, b), 0);
  return (
    <div className="tolerance-results">
      <p className="path-summary" data-testid="tolerance-summary">
        {result.samples} of {result.requested} sheets (seed {result.seed}){result.status === 'partial' ? ', the nominal path ended early' : ''}
        {result.branchName ? ` on branch ${result.branchName}` : ''}; {result.model}.{' '}
        {rigid ? 'Every sheet still folds rigidly.' : `Sheets that still fold rigidly: ${result.rigidFraction.map(pct).join(', ')}.`}
        {lost > 0 ? ` Up to ${lost} sheets lost at some drive values.` : ''}
      </p>
      <div className="tolerance-choose" aria-label="hinges to chart">
        show:
        {choices.map((h) => (
          <label key={h.crease} className="chip">
            <input type="checkbox" checked={hinges.includes(h)} onChange={() => toggle(h.crease)} aria-label={`chart ${h.label}`} />
            {h.label}
          </label>
        ))}
      </div>
      <div className="tolerance-charts">
        {hinges.map((h) => (
          <FanChart key={h.crease} hinge={h} atDeg={result.atDeg} width={chartW} height={128} driveLabel={result.driveLabel} color={hingeColor(pattern.creases[h.crease]?.assignment, h.nominalDeg[h.nominalDeg.length - 1])} />
        ))}
        {rigid ? (
          <p className="hint tolerance-rigid" data-testid="misfit-none">No misfit: every sheet closes at every drive value (largest residual ≤ 1e-10 rad).</p>
        ) : (
          <MisfitChart result={result} width={chartW} height={128} />
        )}
      </div>
      <p className="chart-key">
        <span className="key-band" /> 5–95 % of the sheets, <span className="key-median" /> median, <span className="key-linear" /> first order (±1.645σ; misfit: RMS at the worst vertex)
      </p>
      <div className="tolerance-at">
        <label>
          at {result.driveLabel} =
          <select value={j} onChange={(e) => setAt(Number(e.target.value))} aria-label="tolerance drive value">
            {result.atDeg.map((a, k) => <option key={k} value={k}>{a}°</option>)}
          </select>
        </label>
        <span data-testid="misfit-at">misfit median {result.misfit[j]?.p50?.toExponential(2) ?? '–'}, 95 % {result.misfit[j]?.p95?.toExponential(2) ?? '–'} rad; gap 95 % {result.gap[j]?.p95?.toExponential(2) ?? '–'} {props.project.units || 'file units'}; rigid {pct(result.rigidFraction[j] ?? null)}</span>
      </div>
      <NumbersAt hinges={hinges} j={j} />
      {result.worstVertices.length > 0 && (
        <p className="tolerance-worst" data-testid="worst-vertices">
          <span className="worst-ring" style={{ borderColor: TOLERANCE_LOOK.misfit }} /> vertices carrying most of the misfit:{' '}
          {result.worstVertices.slice(0, 6).map((v) => `${v.vertex} (${(100 * v.share).toFixed(1)} %)`).join(', ')}
        </p>
      )}
      {result.messages.filter((m) => m.severity !== 'info').map((m, i) => (
        <p key={i} className={`message message-${m.severity}`}>{m.text}</p>
      ))}
    </div>
  );
}

export function TolerancePanel(props: TolerancePanelProps) {
  const [ref, width] = useWidth<HTMLDivElement>();
  const result = props.tolerance.result;
  return (
    <section className="panel path-panel tolerance-panel" aria-label="Tolerance">
      <ToleranceForm {...props} />
      <div ref={ref} className="chart-area">
        {result ? <Results {...props} result={result} width={width} /> : props.tolerance.status !== 'running' && (
          <p className="hint">How far does each hinge land from nominal on manufactured sheets, and how much misfit must they absorb? Set the tolerance and run.</p>
        )}
      </div>
    </section>
  );
}
