// Linear algebra for following a path: the normal matrix JᵀJ of the closure Jacobian over a set of
// unknowns with one column removed (held), its envelope Cholesky factor kept as long as it stays useful,
// conjugate gradients preconditioned by that (possibly older) factor, and a tracker of the extreme
// eigenvalues of JᵀJ that gives the condition number and a signed smallest singular value at every sample
// without a new factorization each time. Along a path the Jacobian changes slowly, so a factor from a
// nearby state is an excellent preconditioner: this is how factorizations are reused.

import type { ClosureSystem } from '../closure/blocks';
import { EnvelopeMatrix } from '../math/envelope';

/** Pivots below this fraction of their diagonal are taken as zero (the variable is held). */
const PIVOT_TOLERANCE = 1e-14;

export class NormalSystem {
  readonly n: number;
  readonly rows: number;
  /** unknown index of every slot (−1 for held creases) */
  readonly slotUnknown: Int32Array;
  private envelope: EnvelopeMatrix | null = null;
  /** unknown whose column is removed (−1: none) */
  held = -1;
  factored = false;
  /** 1 for unknowns the factor keeps, 0 for the held column and zero pivots */
  readonly active: Uint8Array;
  /** zero pivots in the last factor (directions the Jacobian does not fix besides the held column) */
  zeroPivots = 0;
  /**
   * Tikhonov damping μ = damping × (largest diagonal of JᵀJ), added to JᵀJ in the factor and in apply(): for
   * an underdetermined path the solves then give the smallest motion of the other creases instead of
   * holding some of them. 0 (the default) solves exactly.
   */
  damping = 0;
  private mu = 0;
  factorizations = 0;
  private readonly rowWork: Float64Array;
  private readonly cg: Float64Array[];

  constructor(
    readonly sys: ClosureSystem,
    unknownOf: Int32Array,
    n: number,
    /** the live Jacobian (3 × slot entries): factor() and apply() read whatever it holds at the call */
    readonly jacobian: Float64Array,
  ) {
    this.n = n;
    this.rows = 3 * sys.blockCount;
    this.slotUnknown = new Int32Array(sys.slotCount);
    for (let p = 0; p < sys.slotCount; p++) this.slotUnknown[p] = unknownOf[sys.slotCrease[p]];

    this.active = new Uint8Array(n);
    this.rowWork = new Float64Array(this.rows);
    this.cg = Array.from({ length: 4 }, () => new Float64Array(n));
  }

  /** The envelope of JᵀJ's sparsity, built on first use (its ordering depends only on the pattern). */
  get env(): EnvelopeMatrix {
    if (!this.envelope) {
      const { sys, slotUnknown, n } = this;
      const adj: Set<number>[] = Array.from({ length: n }, () => new Set<number>());
      for (let b = 0; b < sys.blockCount; b++) {
        for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
          const a = slotUnknown[p];
          if (a < 0) continue;
          for (let q = sys.blockStart[b]; q < sys.blockStart[b + 1]; q++) {
            const c = slotUnknown[q];
            if (c >= 0 && c !== a) adj[a].add(c);
          }
        }
      }
      this.envelope = new EnvelopeMatrix(adj.map((s) => [...s]));
    }
    return this.envelope;
  }

  /** Factor JᵀJ of the live Jacobian with column `held` removed (its row and column become the identity). */
  factor(held: number): void {
    const { sys, slotUnknown } = this;
    const J = this.jacobian;
    this.held = held;
    const env = this.env;
    env.clear();
    for (let b = 0; b < sys.blockCount; b++) {
      const s = sys.blockStart[b], e = sys.blockStart[b + 1];
      for (let p = s; p < e; p++) {
        const a = slotUnknown[p];
        if (a < 0 || a === held) continue;
        const px = J[3 * p], py = J[3 * p + 1], pz = J[3 * p + 2];
        for (let q = s; q <= p; q++) {
          const c = slotUnknown[q];
          if (c < 0 || c === held) continue;
          env.add(a, c, px * J[3 * q] + py * J[3 * q + 1] + pz * J[3 * q + 2]);
        }
      }
    }
    if (held >= 0) env.add(held, held, 1);
    this.mu = 0;
    if (this.damping > 0) {
      let big = 0;
      for (let i = 0; i < this.n; i++) if (i !== held) big = Math.max(big, env.diagonal(i));
      this.mu = this.damping * (big || 1);
      env.addDiagonal(this.mu);
    }
    this.zeroPivots = env.factor(PIVOT_TOLERANCE);
    this.active.fill(1);
    if (held >= 0) this.active[held] = 0;
    for (const k of env.zeroPivots) this.active[env.perm[k]] = 0;
    this.factored = true;
    this.factorizations++;
  }

  /** x = F⁻¹ b on the active unknowns (0 elsewhere). */
  precondition(x: Float64Array, b: Float64Array): Float64Array {
    this.env.solve(x, b);
    for (let i = 0; i < this.n; i++) if (!this.active[i]) x[i] = 0;
    return x;
  }

  /** rows = J·v (live Jacobian; the held column and inactive unknowns count as zero). */
  times(rows: Float64Array, v: Float64Array): Float64Array {
    const { sys, slotUnknown, active } = this;
    const J = this.jacobian;
    rows.fill(0);
    for (let b = 0; b < sys.blockCount; b++) {
      let x = 0, y = 0, z = 0;
      for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
        const a = slotUnknown[p];
        if (a < 0 || !active[a]) continue;
        const w = v[a];
        x += J[3 * p] * w; y += J[3 * p + 1] * w; z += J[3 * p + 2] * w;
      }
      rows[3 * b] = x; rows[3 * b + 1] = y; rows[3 * b + 2] = z;
    }
    return rows;
  }

  /** out = Jᵀ·rows on the active unknowns (0 elsewhere). */
  transposeTimes(out: Float64Array, rows: Float64Array): Float64Array {
    const { sys, slotUnknown, active } = this;
    const J = this.jacobian;
    out.fill(0);
    for (let b = 0; b < sys.blockCount; b++) {
      const x = rows[3 * b], y = rows[3 * b + 1], z = rows[3 * b + 2];
      for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
        const a = slotUnknown[p];
        if (a < 0 || !active[a]) continue;
        out[a] += J[3 * p] * x + J[3 * p + 1] * y + J[3 * p + 2] * z;
      }
    }
    return out;
  }

  /** J·e_k for unknown k (even when k is held): the column of that unknown. */
  column(rows: Float64Array, k: number): Float64Array {
    const { sys, slotUnknown } = this;
    const J = this.jacobian;
    rows.fill(0);
    for (let b = 0; b < sys.blockCount; b++) {
      for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
        if (slotUnknown[p] !== k) continue;
        rows[3 * b] += J[3 * p]; rows[3 * b + 1] += J[3 * p + 1]; rows[3 * b + 2] += J[3 * p + 2];
      }
    }
    return rows;
  }

  /** out = (JᵀJ + μI)·v with the live Jacobian. */
  apply(out: Float64Array, v: Float64Array): Float64Array {
    this.times(this.rowWork, v);
    this.transposeTimes(out, this.rowWork);
    if (this.mu > 0) for (let i = 0; i < this.n; i++) if (this.active[i]) out[i] += this.mu * v[i];
    return out;
  }

  /**
   * Solve JᵀJ·x = b (live Jacobian, active unknowns) by conjugate gradients preconditioned with the factor.
   * x is the start on entry. Returns the iterations used and whether the relative residual reached `tol`.
   */
  solve(x: Float64Array, b: Float64Array, tol = 1e-12, maxIterations = 30): { iterations: number; converged: boolean } {
    const n = this.n;
    const [r, z, p, q] = this.cg;
    const active = this.active;
    let bnorm = 0;
    for (let i = 0; i < n; i++) if (active[i]) bnorm += b[i] * b[i]; else x[i] = 0;
    bnorm = Math.sqrt(bnorm);
    if (bnorm === 0) { x.fill(0); return { iterations: 0, converged: true }; }
    this.apply(q, x);
    let rnorm = 0;
    for (let i = 0; i < n; i++) { r[i] = active[i] ? b[i] - q[i] : 0; rnorm += r[i] * r[i]; }
    if (Math.sqrt(rnorm) <= tol * bnorm) return { iterations: 0, converged: true };
    this.precondition(z, r);
    p.set(z);
    let rz = dot(r, z);
    for (let it = 1; it <= maxIterations; it++) {
      this.apply(q, p);
      for (let i = 0; i < n; i++) if (!active[i]) q[i] = 0;
      const pq = dot(p, q);
      if (!(pq > 0)) return { iterations: it, converged: false };
      const alpha = rz / pq;
      rnorm = 0;
      for (let i = 0; i < n; i++) { x[i] += alpha * p[i]; r[i] -= alpha * q[i]; rnorm += r[i] * r[i]; }
      if (Math.sqrt(rnorm) <= tol * bnorm) return { iterations: it, converged: true };
      this.precondition(z, r);
      const rzNew = dot(r, z);
      const beta = rzNew / rz;
      rz = rzNew;
      for (let i = 0; i < n; i++) p[i] = z[i] + beta * p[i];
    }
    return { iterations: maxIterations, converged: false };
  }
}

export function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

function normalize(v: Float64Array): number {
  const s = Math.sqrt(dot(v, v));
  if (s > 0) for (let i = 0; i < v.length; i++) v[i] /= s;
  return s;
}

export interface ConditionEstimate {
  /** σ_max / σ_min of J over the active unknowns (∞ when σ_min is 0) */
  condition: number;
  sigmaMin: number;
  sigmaMax: number;
  /**
   * sign of (J·v_min) against the previous estimate's, with v_min kept continuous: −1 when the smallest
   * singular value passed through zero since the last call (a turning or branch point), else +1
   */
  flip: number;
  iterations: number;
  refactored: boolean;
}

/**
 * Tracks the extreme eigenpairs of JᵀJ along a path. λ_max by a few warm power steps; λ_min by a
 * preconditioned eigensolver (locally optimal block CG with one vector: Rayleigh–Ritz on {v, F⁻¹r, p})
 * warm-started from the last sample, refactoring only when the old factor stops converging.
 */
export class ConditionTracker {
  private vmin: Float64Array | null = null;
  private started = false;
  private readonly buf: { X: Float64Array[]; AX: Float64Array[]; P: Float64Array[]; AP: Float64Array[]; basis: Float64Array[]; images: Float64Array[]; tmp: Float64Array[] };
  private vmax: Float64Array | null = null;
  private umin: Float64Array | null = null;
  private readonly w: Float64Array[];

  constructor(
    readonly ns: NormalSystem,
    /** unknown whose column is left out (the drive) */
    readonly held: number,
    /** relative change of λ_min between iterations accepted as settled */
    readonly tolerance = 1e-3,
    /** eigenpairs tracked together at the bottom of the spectrum */
    readonly block = 2,
  ) {
    this.w = Array.from({ length: 6 }, () => new Float64Array(ns.n));
    const vs = (k: number) => Array.from({ length: k }, () => new Float64Array(ns.n));
    this.buf = { X: vs(block), AX: vs(block), P: vs(block), AP: vs(block), basis: vs(3 * block), images: vs(3 * block), tmp: vs(3) };
  }

  reset(): void {
    this.vmin = this.vmax = this.umin = null;
    this.started = false;
  }

  /** Estimate at the state whose Jacobian the NormalSystem's live array holds now. */
  estimate(): ConditionEstimate {
    const ns = this.ns;
    const n = ns.n;
    let refactored = false;
    if (!ns.factored || ns.held !== this.held) { ns.factor(this.held); refactored = true; }
    const active = ns.active;
    let activeCount = 0;
    for (let i = 0; i < n; i++) activeCount += active[i];
    if (activeCount === 0) return { condition: 1, sigmaMin: 0, sigmaMax: 0, flip: 1, iterations: 0, refactored };
    // λ_max: warm power iteration
    const warm = !!this.vmax;
    if (!this.vmax) this.vmax = seeded(n, 7919, active);
    const vmax = this.vmax;
    const t = this.w[0];
    let lmax = 0;
    // warm: a lower bound within ~1% after three steps is enough for a condition number
    for (let it = 0; it < (warm ? 2 : 40); it++) {
      mask(vmax, active);
      normalize(vmax);
      ns.apply(t, vmax);
      mask(t, active);
      const l = dot(vmax, t);
      vmax.set(t);
      if (it >= 2 && Math.abs(l - lmax) <= 1e-4 * l) { lmax = l; break; }
      lmax = l;
    }
    normalize(vmax);
    // λ_min: preconditioned eigensolver, refactor once if it does not settle
    let result = this.smallest(active);
    if (!result.converged && !refactored) {
      ns.factor(this.held);
      refactored = true;
      result = this.smallest(ns.active);
    }
    const lmin = Math.max(result.lambda, 0);
    const sigmaMax = Math.sqrt(Math.max(lmax, 0));
    const sigmaMin = Math.sqrt(lmin);
    // signed test: J·v_min keeps its direction unless σ_min passed through zero
    const u = ns.times(new Float64Array(ns.rows), this.vmin!);
    let flip = 1;
    if (this.umin) flip = dot(u, this.umin) < 0 ? -1 : 1;
    this.umin = u;
    return {
      condition: sigmaMin > 0 ? sigmaMax / sigmaMin : Infinity,
      sigmaMin,
      sigmaMax,
      flip,
      iterations: result.iterations,
      refactored,
    };
  }

  /**
   * Block LOBPCG for the `block` smallest eigenpairs of JᵀJ preconditioned with the factor. A block (not
   * one vector) so that eigenvalues crossing inside the cluster at the bottom are not lost while tracking.
   * Images under JᵀJ are carried along as linear combinations, so each iteration applies JᵀJ only to the
   * new preconditioned residuals. All vectors live in preallocated buffers.
   */
  private smallest(active: Uint8Array): { lambda: number; iterations: number; converged: boolean } {
    const ns = this.ns;
    const n = ns.n;
    const bs = this.block;
    const { X, AX, P, AP, basis, images, tmp } = this.buf;
    const fresh = !this.started;
    if (fresh) {
      // start: the factor applied to spread vectors (one inverse-iteration step)
      for (let j = 0; j < bs; j++) ns.precondition(X[j], seeded(n, [104729, 7877, 6007, 3001][j % 4] + j, active));
      this.started = true;
    }
    const prev = tmp[0];
    prev.set(X[0]);
    // (X, AX) orthonormal with images
    let k = 0;
    for (let j = 0; j < bs; j++) if (this.addToBasis(X[j], null, k, active)) k++;
    let nx = k;
    for (let j = 0; j < nx; j++) { X[j].set(basis[j]); AX[j].set(images[j]); }
    const lambdas = new Array(bs).fill(0);
    for (let j = 0; j < nx; j++) lambdas[j] = dot(X[j], AX[j]);
    let np = 0;
    const maxIterations = fresh ? 40 : 8;
    let it = 0;
    let converged = false;
    const r = tmp[1], w = tmp[2];
    for (; it < maxIterations; it++) {
      k = 0;
      for (let j = 0; j < nx; j++) if (this.addToBasis(X[j], AX[j], k, active)) k++;
      const kx = k;
      for (let j = 0; j < nx; j++) {
        for (let i = 0; i < n; i++) r[i] = AX[j][i] - lambdas[j] * X[j][i];
        ns.precondition(w, r);
        if (this.addToBasis(w, null, k, active)) k++;
      }
      for (let j = 0; j < np; j++) if (this.addToBasis(P[j], AP[j], k, active)) k++;
      const A: number[][] = Array.from({ length: k }, () => new Array(k).fill(0));
      for (let a = 0; a < k; a++) for (let c = a; c < k; c++) A[a][c] = A[c][a] = dot(basis[a], images[c]);
      const { values, vectors } = symmetricEigen(A);
      const order = values.map((_, i) => i).sort((a, c) => values[a] - values[c]).slice(0, Math.min(bs, k));
      let change = 0;
      for (let j = 0; j < order.length; j++) {
        const o = order[j];
        const x = X[j], ax = AX[j], p = P[j], ap = AP[j];
        // P: the part of the new vector outside the old X (the locally optimal direction); X = old-X part + P
        p.fill(0); ap.fill(0);
        for (let a = kx; a < k; a++) {
          const c = vectors[a][o];
          if (c === 0) continue;
          const B = basis[a], I = images[a];
          for (let i = 0; i < n; i++) { p[i] += c * B[i]; ap[i] += c * I[i]; }
        }
        x.set(p); ax.set(ap);
        for (let a = 0; a < kx; a++) {
          const c = vectors[a][o];
          if (c === 0) continue;
          const B = basis[a], I = images[a];
          for (let i = 0; i < n; i++) { x[i] += c * B[i]; ax[i] += c * I[i]; }
        }
        const v = values[o];
        change = Math.max(change, Math.abs(v - lambdas[j]) / Math.max(Math.abs(v), 1e-300));
        lambdas[j] = v;
      }
      nx = np = order.length;
      if (change <= this.tolerance) { converged = true; it++; break; }
    }
    // keep the orientation of the smallest vector continuous along the path
    if (dot(X[0], prev) < 0) for (let i = 0; i < n; i++) X[0][i] = -X[0][i];
    this.vmin = X[0];
    return { lambda: lambdas[0], iterations: it, converged };
  }

  /**
   * Orthogonalize v against basis[0…k−1] (Gram–Schmidt, a second pass after heavy cancellation) into
   * basis[k], with its image into images[k] (from `av` when given, else computed). False when it vanishes.
   */
  private addToBasis(v: Float64Array, av: Float64Array | null, k: number, active: Uint8Array): boolean {
    const { basis, images } = this.buf;
    const ns = this.ns;
    const n = ns.n;
    const x = basis[k], ax = images[k];
    x.set(v);
    mask(x, active);
    if (av) { ax.set(av); mask(ax, active); } else { ns.apply(ax, x); mask(ax, active); }
    const before = Math.sqrt(dot(x, x));
    if (before === 0) return false;
    let norm = before;
    for (let pass = 0; pass < 2; pass++) {
      for (let j = 0; j < k; j++) {
        const b = basis[j], ib = images[j];
        const d = dot(b, x);
        for (let i = 0; i < n; i++) { x[i] -= d * b[i]; ax[i] -= d * ib[i]; }
      }
      const after = Math.sqrt(dot(x, x));
      const heavy = after < 0.5 * norm;
      norm = after;
      if (!heavy) break;
    }
    if (!(norm > 1e-8 * before)) return false;
    for (let i = 0; i < n; i++) { x[i] /= norm; ax[i] /= norm; }
    return true;
  }
}

function mask(v: Float64Array, active: Uint8Array): void {
  for (let i = 0; i < v.length; i++) if (!active[i]) v[i] = 0;
}

function seeded(n: number, mult: number, active: Uint8Array): Float64Array {
  const v = new Float64Array(n);
  for (let i = 0; i < n; i++) v[i] = active[i] ? 1 + ((i * mult) % 17) / 17 : 0;
  return v;
}

/** Eigenvalues and eigenvectors (columns of `vectors`) of a small symmetric matrix (cyclic Jacobi). */
export function symmetricEigen(A: number[][]): { values: number[]; vectors: number[][] } {
  const k = A.length;
  const M = A.map((r) => [...r]);
  const V: number[][] = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? 1 : 0)));
  let scale = 0;
  for (const r of M) for (const x of r) scale = Math.max(scale, Math.abs(x));
  for (let sweep = 0; sweep < 80; sweep++) {
    let off = 0;
    for (let p = 0; p < k; p++) for (let q = p + 1; q < k; q++) off = Math.max(off, Math.abs(M[p][q]));
    if (off <= 1e-17 * scale) break;
    for (let p = 0; p < k; p++) {
      for (let q = p + 1; q < k; q++) {
        if (Math.abs(M[p][q]) <= 1e-300) continue;
        const theta = (M[q][q] - M[p][p]) / (2 * M[p][q]);
        const tt = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(tt * tt + 1), s = tt * c;
        for (let i = 0; i < k; i++) {
          const mip = M[i][p], miq = M[i][q];
          M[i][p] = c * mip - s * miq;
          M[i][q] = s * mip + c * miq;
        }
        for (let i = 0; i < k; i++) {
          const mpi = M[p][i], mqi = M[q][i];
          M[p][i] = c * mpi - s * mqi;
          M[q][i] = s * mpi + c * mqi;
        }
        for (let i = 0; i < k; i++) {
          const vip = V[i][p], viq = V[i][q];
          V[i][p] = c * vip - s * viq;
          V[i][q] = s * vip + c * viq;
        }
      }
    }
  }
  return { values: M.map((r, i) => r[i]), vectors: V };
}
