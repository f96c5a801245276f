// Statistics over the sheets followed: per hinge and drive value the mean, standard deviation and
// percentiles of the angle and of its deviation from nominal; the misfit and gap percentiles; the fraction
// of sheets that still fold rigidly; and each vertex's share of the misfit. Deviations are taken from the
// reference sheet (the drawn sheet through the same routine), so a sheet with no perturbation deviates by
// exactly zero and a zero tolerance gives exactly zero spread.

import { SHEET_CLOSES, SHEET_LOST, type SheetResult } from './sheet';

export interface Spread {
  mean: number;
  /** sample standard deviation (n − 1); NaN with fewer than two sheets */
  std: number;
  p05: number;
  p50: number;
  p95: number;
  /** the largest value (misfit, gap) or the largest |deviation| (hinges) */
  max: number;
}

export interface HingeSpread {
  nominal: number;
  /** of the angle (the deviation's shifted by the nominal angle; std is the same for both) */
  angle: Spread;
  deviation: Spread;
}

export interface ToleranceStatistics {
  /** sheets summarized: the first `samples` of the run, in index order */
  samples: number;
  /** per drive value, per hinge (radians) */
  hinges: HingeSpread[][];
  /** per drive value: largest vertex residual over the sheet (radians) */
  misfit: Spread[];
  /** per drive value: equivalent gap at panel edges (file units) */
  gap: Spread[];
  /** per drive value: fraction of the sheets solved there whose perturbed sheet still closes */
  rigidFraction: number[];
  /** fraction of sheets that close at every drive value */
  rigidAlongPath: number;
  /** per drive value: sheets lost (did not settle, or left the branch) */
  lost: number[];
  /** per drive value, per vertex (block order): average share of Σ|r|² over the sheets that did not close */
  shares: Float64Array[];
  /** per vertex: the shares averaged over the drive values where some sheet did not close */
  share: Float64Array;
}

/**
 * The p-quantile of sorted values by linear interpolation between order statistics at h = (n − 1)·p:
 * definition 7 of R. J. Hyndman, Y. Fan, "Sample quantiles in statistical packages", The American
 * Statistician 50(4), 1996 (the default of R and NumPy).
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  const f = h - lo;
  return f === 0 ? sorted[lo] : sorted[lo] + f * (sorted[hi] - sorted[lo]);
}

/** Mean, standard deviation, percentiles and largest value of some numbers (sorted in place). */
export function spreadOf(values: Float64Array, largest: 'value' | 'abs' = 'value'): Spread {
  const n = values.length;
  if (n === 0) return { mean: NaN, std: NaN, p05: NaN, p50: NaN, p95: NaN, max: NaN };
  // sums of the values shifted by the first one: equal values give a mean of exactly that value and a
  // standard deviation of exactly zero (and the shift keeps the sums well conditioned)
  const shift = values[0];
  let sum = 0;
  for (let i = 0; i < n; i++) sum += values[i] - shift;
  const offset = sum / n;
  const mean = shift + offset;
  let sq = 0;
  for (let i = 0; i < n; i++) sq += (values[i] - shift - offset) * (values[i] - shift - offset);
  values.sort();
  const max = largest === 'abs' ? Math.max(Math.abs(values[0]), Math.abs(values[n - 1])) : values[n - 1];
  return {
    mean,
    std: n > 1 ? Math.sqrt(sq / (n - 1)) : NaN,
    p05: quantileSorted(values, 0.05),
    p50: quantileSorted(values, 0.5),
    p95: quantileSorted(values, 0.95),
    max,
  };
}

/** The statistics of sheets (given in index order) against the reference sheet. */
export function sheetStatistics(reference: SheetResult, sheets: SheetResult[], hingeCount: number, blockCount: number, drives: number): ToleranceStatistics {
  const H = hingeCount;
  const B = blockCount;
  const hinges: HingeSpread[][] = [];
  const misfit: Spread[] = [];
  const gap: Spread[] = [];
  const rigidFraction: number[] = [];
  const lost: number[] = [];
  const shares: Float64Array[] = [];
  const share = new Float64Array(B);
  let shareDrives = 0;
  for (let j = 0; j < drives; j++) {
    const kept = sheets.filter((s) => s.status[j] !== SHEET_LOST);
    lost.push(sheets.length - kept.length);
    const column = new Float64Array(kept.length);
    const row: HingeSpread[] = [];
    for (let h = 0; h < H; h++) {
      const nominal = reference.angles[j * H + h];
      kept.forEach((s, i) => (column[i] = s.angles[j * H + h] - nominal));
      const deviation = spreadOf(column, 'abs');
      const angle: Spread = {
        mean: nominal + deviation.mean, std: deviation.std, p05: nominal + deviation.p05, p50: nominal + deviation.p50,
        p95: nominal + deviation.p95, max: nominal + (column.length ? column[column.length - 1] : NaN),
      };
      row.push({ nominal, angle, deviation });
    }
    hinges.push(row);
    misfit.push(spreadOf(Float64Array.from(kept, (s) => s.misfit[j])));
    gap.push(spreadOf(Float64Array.from(kept, (s) => s.gap[j])));
    const closes = kept.filter((s) => s.status[j] === SHEET_CLOSES).length;
    rigidFraction.push(kept.length ? closes / kept.length : NaN);
    // shares are multiples of 2⁻³², so these sums are exact and do not depend on the order of the sheets
    const sum = new Float64Array(B);
    let open = 0;
    for (const s of kept) {
      if (s.status[j] === SHEET_CLOSES) continue;
      open++;
      for (let b = 0; b < B; b++) sum[b] += s.shares[j * B + b];
    }
    if (open > 0) {
      for (let b = 0; b < B; b++) { sum[b] /= open; share[b] += sum[b]; }
      shareDrives++;
    }
    shares.push(sum);
  }
  if (shareDrives > 0) for (let b = 0; b < B; b++) share[b] /= shareDrives;
  const alongPath = sheets.filter((s) => s.status.every((x) => x === SHEET_CLOSES)).length;
  return {
    samples: sheets.length,
    hinges,
    misfit,
    gap,
    rigidFraction,
    rigidAlongPath: sheets.length ? alongPath / sheets.length : NaN,
    lost,
    shares,
    share,
  };
}
