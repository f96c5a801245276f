// Tangent cone of the flat state: the directions in which a pattern can leave flat. First order gives
// Σ ρ_i u_i = 0 at each vertex (linear); second order gives Σ_{i<j} ρ_i ρ_j sin(θ_j − θ_i) = 0 (quadratic).
// Rays are the unit vectors of the linear null space on which every quadratic vanishes.

import { nullBasisFromQR, pivotedQR } from '../math/qr';
import type { Pattern } from '../types';
import { solveSmall } from '../closure/newton';
import { mulberry32 } from '../math/random';

export interface ConeRay {
  /** unit direction over all creases (zeros on held creases) */
  tangent: Float64Array;
  /** largest quadratic residual of the ray (0 for an exact ray) */
  quadraticResidual: number;
  /** the ray folds one straight crease line alone */
  straightLine?: number[];
}

export interface ConeOptions {
  /** creases held at 0 besides flat and boundary creases */
  held?: (crease: number) => boolean;
  /** drives whose values must be proportional to these targets along the ray (only their ratio matters) */
  ratio?: { crease: number; value: number }[];
  /** random starts for the quadratic system (deterministic) */
  starts?: number;
  /** directions (over all creases) to start from before the random ones, e.g. the mountain/valley signs */
  seeds?: Float64Array[];
  seed?: number;
  /** variable count above which the analysis is not attempted (dense null space) */
  maxVariables?: number;
}

export interface ConeResult {
  rays: ConeRay[];
  /** dimension of the linear null space */
  linearDimension: number;
  variables: number[];
  /** true when the pattern was too large for the dense analysis and only structural rays were found */
  partial: boolean;
  /**
   * false when the rays come from a search on the second-order equations (random starts on a null space of
   * three or more dimensions), which finds rays but cannot prove it found them all; true where they are
   * solved in closed form (a null space of one or two dimensions, or no second-order condition)
   */
  complete: boolean;
  /** the search's starts, when it searched */
  starts?: number;
}

export const CONE_MAX_VARIABLES = 400;


function gaussian(rand: () => number): number {
  const u = Math.max(rand(), 1e-300);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rand());
}

/**
 * Straight crease lines that can fold alone: chains of creases that pass straight through every interior
 * vertex they meet (the two creases are collinear there) and end on the sheet's rim. Folding one by the
 * same angle along its length closes every vertex exactly (common practice: a single straight fold).
 */
export function straightCreaseLines(pattern: Pattern, held: (c: number) => boolean = () => false): number[][] {
  const interiorAt = new Map<number, number>();
  pattern.interiorVertices.forEach((iv, k) => interiorAt.set(iv.vertex, k));
  const seen = new Set<number>();
  const lines: number[][] = [];
  const partner = (vertex: number, crease: number): number | undefined => {
    const k = interiorAt.get(vertex);
    if (k === undefined) return undefined;
    const iv = pattern.interiorVertices[k];
    const i = iv.creases.indexOf(crease);
    for (let j = 0; j < iv.creases.length; j++) {
      if (j === i) continue;
      // collinear through the vertex: the two directions differ by π (mod 2π)
      const d = Math.abs((((iv.directions[j] - iv.directions[i]) % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI) - Math.PI);
      if (d < 1e-9) return iv.creases[j];
    }
    return undefined;
  };
  const movable = (c: number) => {
    const a = pattern.creases[c].assignment;
    return a !== 'B' && a !== 'F' && !held(c);
  };
  for (const c0 of pattern.creases) {
    if (seen.has(c0.index) || !movable(c0.index)) continue;
    const chain = [c0.index];
    let ok = true;
    for (const endIndex of [0, 1] as const) {
      let crease = c0.index;
      let vertex = c0.vertices[endIndex];
      for (let guard = 0; guard < pattern.creases.length; guard++) {
        if (!interiorAt.has(vertex)) break; // reached the rim
        const next = partner(vertex, crease);
        if (next === undefined || !movable(next)) { ok = false; break; }
        if (next === c0.index) { ok = false; break; } // a closed loop cannot fold alone
        if (endIndex === 0) chain.unshift(next); else chain.push(next);
        const cr = pattern.creases[next];
        vertex = cr.vertices[0] === vertex ? cr.vertices[1] : cr.vertices[0];
        crease = next;
      }
      if (!ok) break;
    }
    chain.forEach((c) => seen.add(c));
    if (ok) lines.push(chain);
  }
  return lines;
}

/** Tangent cone of the flat state. */
export function flatCone(pattern: Pattern, opts: ConeOptions = {}): ConeResult {
  const held = opts.held ?? (() => false);
  const variables: number[] = [];
  const varOf = new Map<number, number>();
  for (const c of pattern.creases) {
    if (c.assignment === 'B' || c.assignment === 'F' || held(c.index)) continue;
    varOf.set(c.index, variables.length);
    variables.push(c.index);
  }
  const n = variables.length;
  const lineRays = straightLineRays(pattern, held, opts.ratio ?? [], n);
  if (n === 0) return { rays: [], linearDimension: 0, variables, partial: false, complete: true };
  if (n > (opts.maxVariables ?? CONE_MAX_VARIABLES)) {
    return { rays: lineRays, linearDimension: NaN, variables, partial: true, complete: false };
  }
  // linear rows: x and y components per vertex, plus drive-ratio rows
  const rows: number[][] = [];
  for (const iv of pattern.interiorVertices) {
    const rx = new Array(n).fill(0);
    const ry = new Array(n).fill(0);
    iv.creases.forEach((c, k) => {
      const j = varOf.get(c);
      if (j === undefined) return;
      rx[j] += Math.cos(iv.directions[k]);
      ry[j] += Math.sin(iv.directions[k]);
    });
    rows.push(rx, ry);
  }
  const ratio = (opts.ratio ?? []).filter((r) => varOf.has(r.crease));
  const ref = ratio.find((r) => r.value !== 0);
  for (const r of ratio) {
    if (r === ref) continue;
    const row = new Array(n).fill(0);
    if (ref) {
      // ρ_r · t_ref − ρ_ref · t_r = 0
      row[varOf.get(r.crease)!] = ref.value;
      row[varOf.get(ref.crease)!] -= r.value;
    } else {
      row[varOf.get(r.crease)!] = 1;
    }
    rows.push(row);
  }
  if (ratio.length && !ref) {
    const row = new Array(n).fill(0);
    row[varOf.get(ratio[0].crease)!] = 1;
    rows.push(row);
  }
  const N = nullSpace(rows, n);
  const k = N.length;
  if (k === 0) return { rays: [], linearDimension: 0, variables, partial: false, complete: true };
  // quadratic forms per vertex restricted to the null space: M_v = Nᵀ S_v N
  const forms: number[][][] = [];
  for (const iv of pattern.interiorVertices) {
    const idx: number[] = [];
    const th: number[] = [];
    iv.creases.forEach((c, q) => {
      const j = varOf.get(c);
      if (j !== undefined) { idx.push(j); th.push(iv.directions[q]); }
    });
    if (idx.length < 2) continue;
    // proj[a][q] = N[a][idx[q]]
    const M = Array.from({ length: k }, () => new Array(k).fill(0));
    for (let p = 0; p < idx.length; p++) {
      for (let q = p + 1; q < idx.length; q++) {
        const s = 0.5 * Math.sin(th[q] - th[p]);
        if (Math.abs(s) < 1e-15) continue;
        for (let a = 0; a < k; a++) {
          const na = N[a][idx[p]];
          const nb = N[a][idx[q]];
          for (let b = 0; b < k; b++) {
            M[a][b] += s * (na * N[b][idx[q]] + nb * N[b][idx[p]]);
          }
        }
      }
    }
    let big = 0;
    for (const row of M) for (const v of row) big = Math.max(big, Math.abs(v));
    if (big > 1e-12) forms.push(M);
  }
  const coeffRays: number[][] = [];
  let searched: number | undefined;
  if (forms.length === 0) {
    // every direction of the null space is a ray: report the basis, both ways
    for (const v of identityRows(k)) coeffRays.push(v, v.map((x) => -x));
  } else if (k === 1) {
    coeffRays.push([1], [-1]);
    // keep only if the quadratic vanishes
  } else if (k === 2 && forms.length >= 1) {
    for (const t of circleRoots(forms)) {
      coeffRays.push([Math.cos(t), Math.sin(t)], [-Math.cos(t), -Math.sin(t)]);
    }
  } else {
    for (const seed of opts.seeds ?? []) {
      const c0 = N.map((v) => v.reduce((acc, x, j) => acc + x * seed[variables[j]], 0));
      if (Math.hypot(...c0) < 1e-12) continue;
      const c = polishOnSphere(forms, c0);
      if (c) coeffRays.push(c);
    }
    const rand = mulberry32(opts.seed ?? 12345);
    const starts = opts.starts ?? Math.min(160, 24 + 4 * k);
    searched = starts + (opts.seeds?.length ?? 0);
    for (let s = 0; s < starts; s++) {
      const c0 = Array.from({ length: k }, () => gaussian(rand));
      const c = polishOnSphere(forms, c0);
      if (c) coeffRays.push(c);
    }
  }
  const rays: ConeRay[] = [];
  const add = (ray: ConeRay) => {
    for (const r of rays) {
      let d = 0;
      for (let i = 0; i < ray.tangent.length; i++) d = Math.max(d, Math.abs(r.tangent[i] - ray.tangent[i]));
      if (d < 1e-6) return;
    }
    rays.push(ray);
  };
  for (const ray of lineRays) add(ray);
  for (const c of coeffRays) {
    const q = forms.length ? Math.max(...forms.map((M) => Math.abs(quad(M, c)))) : 0;
    if (q > 1e-9) continue;
    const tangent = new Float64Array(pattern.creases.length);
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let a = 0; a < k; a++) s += c[a] * N[a][j];
      tangent[variables[j]] = Math.abs(s) < 1e-13 ? 0 : s;
    }
    normalizeInPlace(tangent);
    add({ tangent, quadraticResidual: q });
  }
  return { rays, linearDimension: k, variables, partial: false, complete: searched === undefined, ...(searched !== undefined ? { starts: searched } : {}) };
}

function straightLineRays(
  pattern: Pattern,
  held: (c: number) => boolean,
  ratio: { crease: number; value: number }[],
  _n: number,
): ConeRay[] {
  const rays: ConeRay[] = [];
  for (const line of straightCreaseLines(pattern, held)) {
    // a line ray satisfies the drive ratio only if it carries the drives in that ratio
    const onLine = new Set(line);
    const driven = ratio.filter((r) => onLine.has(r.crease));
    const off = ratio.filter((r) => !onLine.has(r.crease));
    if (ratio.length) {
      if (off.some((r) => r.value !== 0)) continue;
      if (driven.length > 1 && driven.some((r) => Math.abs(r.value - driven[0].value) > 1e-12)) continue;
    }
    for (const sign of [1, -1]) {
      const tangent = new Float64Array(pattern.creases.length);
      for (const c of line) tangent[c] = sign / Math.sqrt(line.length);
      rays.push({ tangent, quadraticResidual: 0, straightLine: line });
    }
  }
  return rays;
}

/** Orthonormal basis of the null space of the given rows (each of length n), by pivoted QR. */
export function nullSpace(rows: number[][], n: number, tol = 1e-9): number[][] {
  if (rows.length === 0) return identityRows(n);
  const m = rows.length;
  const A = new Float64Array(m * n);
  rows.forEach((row, i) => row.forEach((v, j) => (A[i + j * m] = v)));
  return nullBasisFromQR(pivotedQR(A, m, n, tol));
}

function identityRows(k: number): number[][] {
  return Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? 1 : 0)));
}

function quad(M: number[][], c: number[]): number {
  let s = 0;
  for (let a = 0; a < c.length; a++) for (let b = 0; b < c.length; b++) s += c[a] * M[a][b] * c[b];
  return s;
}

/** Roots t ∈ [0, π) of the common zeros of binary quadratic forms on the unit circle. */
function circleRoots(forms: number[][][]): number[] {
  // use the first form to get candidates, keep those where all forms vanish
  const [M] = forms;
  const A = M[0][0], B = M[0][1], C = M[1][1];
  // A cos² + 2B cos sin + C sin² = 0
  const roots: number[] = [];
  if (Math.abs(C) > 1e-14) {
    // tan t = x: C x² + 2B x + A = 0
    const disc = B * B - A * C;
    if (disc >= -1e-14) {
      const sq = Math.sqrt(Math.max(0, disc));
      for (const x of disc > 1e-14 ? [(-B + sq) / C, (-B - sq) / C] : [-B / C]) roots.push(Math.atan(x) < 0 ? Math.atan(x) + Math.PI : Math.atan(x));
    }
  } else {
    roots.push(Math.PI / 2); // cos t = 0 is a root when C = 0
    if (Math.abs(B) > 1e-14) {
      const t = Math.atan2(-A, 2 * B);
      roots.push(((t % Math.PI) + Math.PI) % Math.PI);
    }
  }
  return roots.filter((t) => forms.every((F) => Math.abs(quad(F, [Math.cos(t), Math.sin(t)])) < 1e-9));
}

/** Gauss–Newton on {cᵀM_v c = 0 ∀v, |c|² = 1}; returns the unit solution or undefined. */
function polishOnSphere(forms: number[][][], c0: number[]): number[] | undefined {
  const k = c0.length;
  let c = c0.map((x) => x / Math.hypot(...c0));
  for (let it = 0; it < 80; it++) {
    // residuals and Jacobian rows
    const R: number[] = [];
    const Jr: number[][] = [];
    for (const M of forms) {
      const Mc = M.map((row) => row.reduce((s, v, j) => s + v * c[j], 0));
      R.push(Mc.reduce((s, v, j) => s + v * c[j], 0));
      Jr.push(Mc.map((v) => 2 * v));
    }
    R.push(c.reduce((s, v) => s + v * v, 0) - 1);
    Jr.push(c.map((v) => 2 * v));
    const worst = Math.max(...R.map(Math.abs));
    if (worst < 1e-14) break;
    // minimum-norm Gauss–Newton step: δ = −Jᵀ (J Jᵀ + μI)⁻¹ R, or normal equations when overdetermined
    const m = R.length;
    const A = Array.from({ length: k }, (_, a) => Array.from({ length: k }, (_, b) => {
      let s = a === b ? 1e-12 : 0;
      for (let r = 0; r < m; r++) s += Jr[r][a] * Jr[r][b];
      return s;
    }));
    const g = Array.from({ length: k }, (_, a) => {
      let s = 0;
      for (let r = 0; r < m; r++) s += Jr[r][a] * R[r];
      return s;
    });
    const d = solveSym(A, g);
    let step = 1;
    const before = R.reduce((s, v) => s + v * v, 0);
    let improved = false;
    for (let ls = 0; ls < 20; ls++) {
      const trial = c.map((v, i) => v - step * d[i]);
      const t = sumSq(forms, trial);
      if (t < before) { c = trial; improved = true; break; }
      step /= 2;
    }
    if (!improved) break;
  }
  const norm = Math.hypot(...c);
  c = c.map((x) => x / norm);
  const worst = Math.max(...forms.map((M) => Math.abs(quad(M, c))));
  return worst < 1e-10 ? c : undefined;
}

function sumSq(forms: number[][][], c: number[]): number {
  let s = 0;
  for (const M of forms) { const q = quad(M, c); s += q * q; }
  const n = c.reduce((a, v) => a + v * v, 0) - 1;
  return s + n * n;
}

function solveSym(A: number[][], b: number[]): number[] {
  return solveSmall(A, b);
}

function normalizeInPlace(v: Float64Array): void {
  let s = 0;
  for (const x of v) s += x * x;
  const n = Math.sqrt(s) || 1;
  for (let i = 0; i < v.length; i++) v[i] /= n;
}
