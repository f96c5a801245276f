// The tolerance analysis as JSON or CSV, with the same kind of header as the angle tables (pattern and file
// hash, drive, branch, tolerance and model, seed, samples, program, date, the command that reproduces it and
// the cautions line). Angles in degrees, misfit in radians, gaps in the file's units.

import type { Pattern } from '../../types';
import { csvCell, holdsText, jsonNum, metadataLines, num, provenanceMeta, sourceMeta, SIGN_CONVENTION, type TableHeader } from '../table';
import type { ToleranceResult } from './run';
import type { Spread } from './stats';

const DEG = 180 / Math.PI;
export const TOLERANCE_FORMAT = 'hingeplan-tolerance';
/** z of the standard normal distribution at 95 %: the first-order p05/p95 are nominal ∓ 1.645·σ (common practice). */
export const NORMAL_95 = 1.6448536269514722;
/** Vertices listed as contributing most to the misfit. */
export const WORST_VERTICES = 10;

export interface ToleranceTableOptions {
  format: 'json' | 'csv';
  /** the file's length units, for the header ("mm"); default "file units" */
  units?: string;
}

export interface WorstVertex {
  /** pattern vertex index (file order) */
  vertex: number;
  /** block index (the closure system's order) */
  block: number;
  /** share of Σ|r|², averaged over the sheets and the drive values where some sheet did not close */
  share: number;
}

/** The vertices with the largest average share of the misfit, largest first (only those with a share). */
export function worstVertices(result: ToleranceResult, count = WORST_VERTICES): WorstVertex[] {
  const share = result.statistics?.share;
  if (!share) return [];
  return Array.from(share, (s, b) => ({ vertex: result.blockVertex[b], block: b, share: s }))
    .filter((v) => v.share > 0)
    .sort((a, b) => b.share - a.share || a.vertex - b.vertex)
    .slice(0, count);
}

/** The same from the first-order estimate (each vertex's mean-square residual over their sum), per drive value averaged. */
export function linearWorstVertices(result: ToleranceResult, count = WORST_VERTICES): WorstVertex[] {
  const rms = result.linear?.vertexRms.filter((v): v is Float64Array => !!v) ?? [];
  if (!rms.length) return [];
  const share = new Float64Array(rms[0].length);
  let used = 0;
  for (const v of rms) {
    const total = v.reduce((s, x) => s + x * x, 0);
    if (!(total > 0)) continue;
    v.forEach((x, b) => (share[b] += (x * x) / total));
    used++;
  }
  if (!used) return [];
  return Array.from(share, (s, b) => ({ vertex: result.blockVertex[b], block: b, share: s / used }))
    .filter((v) => v.share > 0)
    .sort((a, b) => b.share - a.share || a.vertex - b.vertex)
    .slice(0, count);
}

function degSpread(s: Spread, withMax: boolean) {
  return {
    mean: jsonNum(s.mean * DEG), std: jsonNum(s.std * DEG), p05: jsonNum(s.p05 * DEG), p50: jsonNum(s.p50 * DEG), p95: jsonNum(s.p95 * DEG),
    ...(withMax ? { max: jsonNum(s.max * DEG) } : {}),
  };
}

function plainSpread(s: Spread) {
  return { mean: jsonNum(s.mean), p05: jsonNum(s.p05), p50: jsonNum(s.p50), p95: jsonNum(s.p95), max: jsonNum(s.max) };
}

/** The first-order misfit at drive value j: the root-mean-square residual of the vertex where it is largest, and its gap. */
export function linearMisfit(result: ToleranceResult, j: number): { rms: number; gap: number } | null {
  const v = result.linear?.vertexRms[j];
  if (!v) return null;
  const reach = result.reach;
  let rms = 0, gap = 0;
  v.forEach((x, b) => { rms = Math.max(rms, x); gap = Math.max(gap, x * reach[b]); });
  return { rms, gap };
}

function header(pattern: Pattern, result: ToleranceResult, head: TableHeader, units: string) {
  const tol = result.tolerance;
  const branch = result.nominalPath?.branch;
  return {
    ...sourceMeta(TOLERANCE_FORMAT, head),
    drive: pattern.creases[result.drive].label,
    held: holdsText(pattern, result.holds),
    branch: branch ? `${branch.id ?? ''}${branch.id !== undefined ? ' ' : ''}${branch.name}${branch.matchesAssignment ? ' (matches the mountain/valley assignment)' : ''}` : 'none',
    positionTolerance: tol.position ? `${num(tol.position)} ${units} (diameter of the zone around each vertex)` : 'none',
    sectorTolerance: tol.sector ? `±${num(tol.sector * DEG)} deg (every sector angle)` : 'none',
    model: result.model || 'none',
    seed: result.seed,
    samples: `${result.statistics?.samples ?? 0} of ${result.requested}`,
    status: result.status,
    units: `degrees (angles, deviations); radians (misfit: largest vertex closure residual); ${units} (gap)`,
    signConvention: SIGN_CONVENTION,
    ...provenanceMeta(head),
  };
}

/** The tolerance analysis as a JSON document or a CSV table with its metadata header. */
export function toleranceTable(pattern: Pattern, result: ToleranceResult, head: TableHeader, opts: ToleranceTableOptions): string {
  const units = opts.units || 'file units';
  const meta = header(pattern, result, head, units);
  const st = result.statistics;
  const label = (c: number) => pattern.creases[c].label;
  const at = result.at;
  const worst = worstVertices(result);
  const linearWorst = linearWorstVertices(result);
  if (opts.format === 'json') {
    const hinges = Object.fromEntries(result.hinges.map((c, h) => [label(c), at.map((_, j) => {
      const s = st!.hinges[j][h];
      return { nominal: jsonNum(s.nominal * DEG), ...degSpread(s.angle, false), deviation: degSpread(s.deviation, true) };
    })]));
    const linearHinges = Object.fromEntries(result.hinges.map((c, h) => [label(c), at.map((_, j) => {
      const std = result.linear?.hingeStd[j]?.[h];
      if (std === undefined) return null;
      const nominal = st!.hinges[j][h].nominal;
      return { std: jsonNum(std * DEG), p05: jsonNum((nominal - NORMAL_95 * std) * DEG), p95: jsonNum((nominal + NORMAL_95 * std) * DEG) };
    })]));
    const doc = {
      ...meta,
      positionTolerance: result.tolerance.position ?? 0,
      sectorTolerance: (result.tolerance.sector ?? 0) * DEG,
      lengthUnits: units,
      samples: st?.samples ?? 0,
      requested: result.requested,
      at: at.map((a) => jsonNum(a * DEG)),
      hinges: st ? hinges : {},
      misfit: st ? st.misfit.map(plainSpread) : [],
      gap: st ? st.gap.map(plainSpread) : [],
      rigidFraction: st ? st.rigidFraction.map(jsonNum) : [],
      rigidAlongPath: st ? jsonNum(st.rigidAlongPath) : null,
      lost: st ? st.lost : [],
      worstVertices: worst.map((v) => ({
        vertex: v.vertex, at: pattern.vertices[v.vertex], share: jsonNum(v.share),
        shareByDrive: st!.shares.map((s) => jsonNum(s[v.block])),
      })),
      linear: result.linear ? {
        method: 'first order at the nominal state: δρ = −(J_fᵀJ_f)⁻¹·J_fᵀ·G·δg, variances propagated from the tolerance model; p05/p95 = nominal ∓ 1.645·std (normal approximation)',
        hinges: linearHinges,
        misfit: at.map((_, j) => { const m = linearMisfit(result, j); return m ? { rms: jsonNum(m.rms) } : null; }),
        gap: at.map((_, j) => { const m = linearMisfit(result, j); return m ? { rms: jsonNum(m.gap) } : null; }),
        worstVertices: linearWorst.map((v) => ({ vertex: v.vertex, at: pattern.vertices[v.vertex], share: jsonNum(v.share) })),
      } : null,
      singular: at.filter((_, j) => result.singular[j]).map((a) => jsonNum(a * DEG)),
      effort: result.effort,
      messages: result.messages.map((m) => ({ severity: m.severity, code: m.code, text: m.text })),
    };
    return JSON.stringify(doc, null, 2) + '\n';
  }
  const cols = ['drive', 'quantity', 'item', 'nominal', 'mean', 'std', 'p05', 'p50', 'p95', 'max', 'linear'];
  const lines = [metadataLines(meta) + cols.join(',')];
  const row = (cells: (string | number | undefined)[]) => {
    const padded = Array.from({ length: cols.length }, (_, k) => cells[k]);
    lines.push(padded.map((c) => (typeof c === 'number' ? num(c) : csvCell(c ?? ''))).join(','));
  };
  if (st) {
    at.forEach((a, j) => {
      const d = a * DEG;
      result.hinges.forEach((c, h) => {
        const s = st.hinges[j][h];
        const lin = result.linear?.hingeStd[j]?.[h];
        row([d, 'angle', label(c), s.nominal * DEG, s.angle.mean * DEG, s.angle.std * DEG, s.angle.p05 * DEG, s.angle.p50 * DEG, s.angle.p95 * DEG, undefined, lin === undefined ? undefined : lin * DEG]);
      });
      result.hinges.forEach((c, h) => {
        const s = st.hinges[j][h].deviation;
        const lin = result.linear?.hingeStd[j]?.[h];
        row([d, 'deviation', label(c), 0, s.mean * DEG, s.std * DEG, s.p05 * DEG, s.p50 * DEG, s.p95 * DEG, s.max * DEG, lin === undefined ? undefined : lin * DEG]);
      });
      const lm = linearMisfit(result, j);
      const m = st.misfit[j], g = st.gap[j];
      row([d, 'misfit', '', undefined, m.mean, m.std, m.p05, m.p50, m.p95, m.max, lm?.rms]);
      row([d, 'gap', '', undefined, g.mean, g.std, g.p05, g.p50, g.p95, g.max, lm?.gap]);
      row([d, 'rigid-fraction', '', undefined, st.rigidFraction[j]]);
      row([d, 'lost', '', undefined, st.lost[j]]);
      for (const v of worst) row([d, 'share', `vertex ${v.vertex}`, undefined, st.shares[j][v.block]]);
    });
  }
  for (const v of worst) lines.push(`# worst vertex: ${v.vertex} at (${pattern.vertices[v.vertex].map(num).join(', ')}) share ${num(v.share)}`);
  for (const m of result.messages) lines.push(`# ${m.severity}: [${m.code}] ${m.text.replace(/[\r\n]+/g, ' ')}`);
  return lines.join('\n') + '\n';
}
