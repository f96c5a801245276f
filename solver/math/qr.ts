// Householder QR with column pivoting on a column-major Float64Array: the rank-revealing factorization
// behind the dense local analysis (rank, null space, least-squares sensitivities, condition estimate).

export interface PivotedQR {
  m: number;
  n: number;
  /** factored matrix: R in and above the diagonal, Householder vectors below (column-major, m × n) */
  qr: Float64Array;
  tau: Float64Array;
  /** perm[k] = original column at position k */
  perm: Int32Array;
  rank: number;
}

/** Factor A·P = Q·R. Columns whose remaining norm is at most `tol` are left as the null part. */
export function pivotedQR(A: Float64Array, m: number, n: number, tol: number): PivotedQR {
  const qr = Float64Array.from(A);
  const perm = new Int32Array(n).map((_, i) => i);
  const norms = new Float64Array(n);
  const k = Math.min(m, n);
  const tau = new Float64Array(k);
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < m; i++) s += qr[i + j * m] ** 2;
    norms[j] = s;
  }
  let rank = 0;
  for (let step = 0; step < k; step++) {
    // pivot: the column with the largest remaining norm (recomputed exactly to avoid downdating drift)
    let best = step;
    let bestNorm = -1;
    for (let j = step; j < n; j++) {
      let s = 0;
      for (let i = step; i < m; i++) s += qr[i + j * m] ** 2;
      norms[j] = s;
      if (s > bestNorm) { bestNorm = s; best = j; }
    }
    if (Math.sqrt(bestNorm) <= tol) break;
    if (best !== step) {
      for (let i = 0; i < m; i++) {
        const t = qr[i + step * m];
        qr[i + step * m] = qr[i + best * m];
        qr[i + best * m] = t;
      }
      const t = perm[step]; perm[step] = perm[best]; perm[best] = t;
    }
    // Householder vector for column `step`, rows step..m−1
    const c0 = step * m;
    let alpha = Math.sqrt(bestNorm);
    if (qr[c0 + step] > 0) alpha = -alpha;
    const v0 = qr[c0 + step] - alpha;
    qr[c0 + step] = alpha;
    // v = [1, x/v0], τ = −v0/α
    for (let i = step + 1; i < m; i++) qr[c0 + i] /= v0;
    tau[step] = -v0 / alpha;
    for (let j = step + 1; j < n; j++) {
      const cj = j * m;
      let s = qr[cj + step];
      for (let i = step + 1; i < m; i++) s += qr[c0 + i] * qr[cj + i];
      s *= tau[step];
      qr[cj + step] -= s;
      for (let i = step + 1; i < m; i++) qr[cj + i] -= s * qr[c0 + i];
    }
    rank++;
  }
  return { m, n, qr, tau, perm, rank };
}

/** b ← Qᵀ b (b has m entries). */
export function applyQt(f: PivotedQR, b: Float64Array): Float64Array {
  const { m, qr, tau, rank } = f;
  for (let step = 0; step < rank; step++) {
    const c0 = step * m;
    let s = b[step];
    for (let i = step + 1; i < m; i++) s += qr[c0 + i] * b[i];
    s *= tau[step];
    b[step] -= s;
    for (let i = step + 1; i < m; i++) b[i] -= s * qr[c0 + i];
  }
  return b;
}

/** R entry (row i, permuted column j). */
export function rAt(f: PivotedQR, i: number, j: number): number {
  return f.qr[i + j * f.m];
}

/** Solve R11·y = c for the leading rank × rank triangle (c has ≥ rank entries; y gets rank entries). */
export function solveR11(f: PivotedQR, c: Float64Array, y: Float64Array): Float64Array {
  const r = f.rank;
  for (let i = r - 1; i >= 0; i--) {
    let s = c[i];
    for (let j = i + 1; j < r; j++) s -= rAt(f, i, j) * y[j];
    y[i] = s / rAt(f, i, i);
  }
  return y;
}

/** Solve R11ᵀ·y = c. */
export function solveR11T(f: PivotedQR, c: Float64Array, y: Float64Array): Float64Array {
  const r = f.rank;
  for (let i = 0; i < r; i++) {
    let s = c[i];
    for (let j = 0; j < i; j++) s -= rAt(f, j, i) * y[j];
    y[i] = s / rAt(f, i, i);
  }
  return y;
}

/**
 * Orthonormal basis of the null space of A from the factor: the columns of [−R11⁻¹R12; I] in original
 * column order, orthonormalized (modified Gram–Schmidt, twice).
 */
export function nullBasisFromQR(f: PivotedQR): number[][] {
  const { n, rank } = f;
  const out: number[][] = [];
  const y = new Float64Array(rank);
  const c = new Float64Array(rank);
  for (let j = rank; j < n; j++) {
    for (let i = 0; i < rank; i++) c[i] = rAt(f, i, j);
    solveR11(f, c, y);
    const v = new Array(n).fill(0);
    for (let i = 0; i < rank; i++) v[f.perm[i]] = -y[i];
    v[f.perm[j]] = 1;
    out.push(v);
  }
  for (let pass = 0; pass < 2; pass++) {
    for (let a = 0; a < out.length; a++) {
      for (let b = 0; b < a; b++) {
        let d = 0;
        for (let i = 0; i < n; i++) d += out[a][i] * out[b][i];
        for (let i = 0; i < n; i++) out[a][i] -= d * out[b][i];
      }
      const norm = Math.hypot(...out[a]) || 1;
      for (let i = 0; i < n; i++) out[a][i] /= norm;
    }
  }
  return out;
}

/**
 * Largest and smallest non-zero singular values of A (power and inverse iteration). When A is rank
 * deficient they are those of the r × n block [R11 R12], found from a second QR of its transpose.
 */
export function singularValueBounds(f: PivotedQR, iterations = 60): { max: number; min: number } {
  const r = f.rank;
  if (r === 0) return { max: 0, min: 0 };
  if (r < f.n) {
    const t = new Float64Array(f.n * r);
    for (let i = 0; i < r; i++) for (let j = i; j < f.n; j++) t[j + i * f.n] = rAt(f, i, j);
    const g = pivotedQR(t, f.n, r, 0);
    if (g.rank === r) return triangleBounds(g, iterations);
  }
  return triangleBounds(f, iterations);
}

function triangleBounds(f: PivotedQR, iterations: number): { max: number; min: number } {
  const r = f.rank;
  const x = new Float64Array(r).map((_, i) => 1 + ((i * 7919) % 11) / 11);
  const t = new Float64Array(r);
  const u = new Float64Array(r);
  const normalize = (v: Float64Array) => {
    const s = Math.hypot(...v) || 1;
    for (let i = 0; i < v.length; i++) v[i] /= s;
    return s;
  };
  // σ_max² of R11: power iteration on R11ᵀR11
  normalize(x);
  let lmax = 0;
  for (let it = 0; it < iterations; it++) {
    for (let i = 0; i < r; i++) { let s = 0; for (let j = i; j < r; j++) s += rAt(f, i, j) * x[j]; t[i] = s; }
    for (let j = 0; j < r; j++) { let s = 0; for (let i = 0; i <= j; i++) s += rAt(f, i, j) * t[i]; u[j] = s; }
    const l = normalize(u);
    x.set(u);
    if (Math.abs(l - lmax) <= 1e-10 * l) { lmax = l; break; }
    lmax = l;
  }
  // σ_min² of R11: power iteration on (R11ᵀR11)⁻¹
  const z = new Float64Array(r).map((_, i) => 1 - ((i * 104729) % 13) / 13 + 0.1);
  normalize(z);
  let linv = 0;
  for (let it = 0; it < iterations; it++) {
    solveR11T(f, z, t);
    solveR11(f, t, u);
    const l = normalize(u);
    z.set(u);
    if (Math.abs(l - linv) <= 1e-10 * l) { linv = l; break; }
    linv = l;
  }
  return { max: Math.sqrt(lmax), min: linv > 0 ? 1 / Math.sqrt(linv) : 0 };
}
