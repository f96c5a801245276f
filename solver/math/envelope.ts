// Symmetric positive (semi-)definite systems in envelope (profile) storage with a reverse Cuthill–McKee
// ordering. Crease patterns give graph-like normal matrices whose profile after RCM stays narrow, so a
// profile Cholesky is simple, allocation-free once set up, and fast enough for sheets of ~10⁴ creases.

/** Reverse Cuthill–McKee ordering of an undirected graph given as adjacency lists. perm[k] = old index. */
export function reverseCuthillMcKee(adjacency: number[][]): Int32Array {
  const n = adjacency.length;
  const perm = new Int32Array(n);
  const seen = new Uint8Array(n);
  const degree = adjacency.map((a) => a.length);
  let filled = 0;
  while (filled < n) {
    // start each component from a vertex of least degree (a cheap peripheral-node guess)
    let start = -1;
    for (let i = 0; i < n; i++) if (!seen[i] && (start < 0 || degree[i] < degree[start])) start = i;
    // one pseudo-peripheral refinement: the last vertex reached by a BFS from start
    start = lastOfBreadthFirst(adjacency, start);
    const queueStart = filled;
    perm[filled++] = start;
    seen[start] = 1;
    for (let q = queueStart; q < filled; q++) {
      const v = perm[q];
      const next = adjacency[v].filter((w) => !seen[w]).sort((a, b) => degree[a] - degree[b] || a - b);
      for (const w of next) {
        seen[w] = 1;
        perm[filled++] = w;
      }
    }
  }
  perm.reverse();
  return perm;
}

function lastOfBreadthFirst(adjacency: number[][], start: number): number {
  const seen = new Set<number>([start]);
  let frontier = [start];
  let last = start;
  while (frontier.length) {
    const next: number[] = [];
    for (const v of frontier) for (const w of adjacency[v]) if (!seen.has(w)) { seen.add(w); next.push(w); }
    if (next.length) last = next.reduce((a, b) => (adjacency[a].length <= adjacency[b].length ? a : b));
    frontier = next;
  }
  return last;
}

/**
 * Envelope storage of a symmetric n × n matrix in a permuted order: row i (permuted) keeps columns
 * first[i] … i. Build once per sparsity pattern, then add values and factor as often as needed.
 */
export class EnvelopeMatrix {
  readonly n: number;
  /** perm[k] = original index at position k; inv[original] = k */
  readonly perm: Int32Array;
  readonly inv: Int32Array;
  readonly first: Int32Array;
  readonly rowStart: Int32Array;
  readonly values: Float64Array;
  private readonly work: Float64Array;
  /** positions of factorization pivots declared zero (rank deficiency) in the last factor() */
  zeroPivots: number[] = [];

  constructor(adjacency: number[][]) {
    this.n = adjacency.length;
    this.perm = reverseCuthillMcKee(adjacency);
    this.inv = new Int32Array(this.n);
    for (let k = 0; k < this.n; k++) this.inv[this.perm[k]] = k;
    this.first = new Int32Array(this.n);
    for (let k = 0; k < this.n; k++) {
      let f = k;
      for (const w of adjacency[this.perm[k]]) f = Math.min(f, this.inv[w]);
      this.first[k] = f;
    }
    this.rowStart = new Int32Array(this.n + 1);
    for (let k = 0; k < this.n; k++) this.rowStart[k + 1] = this.rowStart[k] + (k - this.first[k] + 1);
    this.values = new Float64Array(this.rowStart[this.n]);
    this.work = new Float64Array(this.n);
  }

  get storedEntries(): number {
    return this.rowStart[this.n];
  }

  clear(): void {
    this.values.fill(0);
  }

  /** A[i][j] += v for original indices i, j (adds to one triangle; call once per unordered pair plus diagonal). */
  add(i: number, j: number, v: number): void {
    let a = this.inv[i];
    let b = this.inv[j];
    if (b > a) { const t = a; a = b; b = t; }
    this.values[this.rowStart[a] + (b - this.first[a])] += v;
  }

  addDiagonal(v: number): void {
    for (let k = 0; k < this.n; k++) this.values[this.rowStart[k] + (k - this.first[k])] += v;
  }

  diagonal(i: number): number {
    const k = this.inv[i];
    return this.values[this.rowStart[k] + (k - this.first[k])];
  }

  /**
   * In-place Cholesky L·Lᵀ. A pivot below `relTol` × (its original diagonal, or the largest diagonal when
   * that is zero) is declared zero: its row and column are dropped (the variable is held), and listed in
   * zeroPivots. Returns the number of zero pivots.
   */
  factor(relTol = 1e-12): number {
    const { n, first, rowStart, values } = this;
    this.zeroPivots = [];
    let maxDiag = 0;
    for (let k = 0; k < n; k++) maxDiag = Math.max(maxDiag, values[rowStart[k] + (k - first[k])]);
    const floor = relTol * (maxDiag || 1);
    for (let i = 0; i < n; i++) {
      const fi = first[i];
      const ri = rowStart[i] - fi; // values[ri + j] = L[i][j]
      for (let j = fi; j <= i; j++) {
        const fj = first[j];
        const rj = rowStart[j] - fj;
        let sum = values[ri + j];
        const k0 = fi > fj ? fi : fj;
        for (let k = k0; k < j; k++) sum -= values[ri + k] * values[rj + k];
        if (j < i) {
          const d = values[rj + j];
          values[ri + j] = d === 0 ? 0 : sum / d;
        } else {
          const orig = values[ri + i] > 0 ? values[ri + i] : maxDiag;
          if (sum <= Math.max(floor, relTol * orig)) {
            this.zeroPivots.push(i);
            // hold the variable: zero its row so later rows do not couple to it
            for (let k = fi; k < i; k++) values[ri + k] = 0;
            values[ri + i] = 0;
          } else {
            values[ri + i] = Math.sqrt(sum);
          }
        }
      }
    }
    return this.zeroPivots.length;
  }

  /** Solve A·x = b after factor(); b and x in original order (x may alias b). Zero pivots give x = 0 there. */
  solve(x: Float64Array, b: Float64Array): Float64Array {
    const { n, first, rowStart, values, perm, work: y } = this;
    for (let k = 0; k < n; k++) y[k] = b[perm[k]];
    for (let i = 0; i < n; i++) {
      const fi = first[i];
      const ri = rowStart[i] - fi;
      let s = y[i];
      for (let k = fi; k < i; k++) s -= values[ri + k] * y[k];
      const d = values[ri + i];
      y[i] = d === 0 ? 0 : s / d;
    }
    for (let i = n - 1; i >= 0; i--) {
      const fi = first[i];
      const ri = rowStart[i] - fi;
      const d = values[ri + i];
      const yi = d === 0 ? 0 : y[i] / d;
      y[i] = yi;
      for (let k = fi; k < i; k++) y[k] -= values[ri + k] * yi;
    }
    for (let k = 0; k < n; k++) x[perm[k]] = y[k];
    return x;
  }
}
