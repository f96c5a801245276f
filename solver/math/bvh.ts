// A bounding-volume hierarchy of axis-aligned boxes for finding the pairs of items whose boxes overlap.
// The tree is built once from the items' places (median splits on the longer extent); afterwards only the
// boxes change (`refit`, bottom-up in O(n)), which suits rigid panels that move but stay neighbours.
// Leaves hold a few items each: testing a handful of boxes in a plain loop costs less than walking the
// deeper tree to them.

/** Items per leaf at most. */
const LEAF_SIZE = 8;

export class BoxTree {
  /** per node: children (−1 for a leaf) */
  readonly left: Int32Array;
  readonly right: Int32Array;
  /** per leaf: its items are order[first[n]] … order[first[n] + size[n] − 1] (size 0 for an inner node) */
  readonly first: Int32Array;
  readonly size: Int32Array;
  readonly order: Int32Array;
  /** per node: min x, y, z, max x, y, z */
  readonly box: Float64Array;
  readonly nodeCount: number;
  private itemBoxes: Float64Array = new Float64Array(0);
  private stack = new Int32Array(256);

  /** `places` holds three numbers (x, y, z) per item: where the item is when the tree is built. */
  constructor(places: Float64Array, readonly count: number) {
    const total = Math.max(1, 2 * count - 1);
    this.left = new Int32Array(total).fill(-1);
    this.right = new Int32Array(total).fill(-1);
    this.first = new Int32Array(total);
    this.size = new Int32Array(total);
    this.box = new Float64Array(6 * total);
    const order = new Int32Array(count);
    for (let i = 0; i < count; i++) order[i] = i;
    this.order = order;
    let next = 0;
    // preorder numbering: a parent's index is below its children's, so refit runs from the end
    const build = (lo: number, hi: number): number => {
      const node = next++;
      if (hi - lo <= LEAF_SIZE) { this.first[node] = lo; this.size[node] = hi - lo; return node; }
      let axis = 0, best = -1;
      for (let k = 0; k < 3; k++) {
        let mn = Infinity, mx = -Infinity;
        for (let i = lo; i < hi; i++) { const v = places[3 * order[i] + k]; if (v < mn) mn = v; if (v > mx) mx = v; }
        if (mx - mn > best) { best = mx - mn; axis = k; }
      }
      const part = Array.from(order.subarray(lo, hi)).sort((p, q) => places[3 * p + axis] - places[3 * q + axis] || p - q);
      order.set(part, lo);
      const mid = (lo + hi) >> 1;
      this.left[node] = build(lo, mid);
      this.right[node] = build(mid, hi);
      return node;
    };
    if (count > 0) build(0, count);
    this.nodeCount = next;
  }

  /** New item boxes (six numbers per item: min x, y, z, max x, y, z); every node's box is recomputed. */
  refit(itemBoxes: Float64Array): void {
    this.itemBoxes = itemBoxes;
    const B = this.box;
    for (let n = this.nodeCount - 1; n >= 0; n--) {
      const o = 6 * n;
      if (this.size[n] > 0) {
        B[o] = B[o + 1] = B[o + 2] = Infinity;
        B[o + 3] = B[o + 4] = B[o + 5] = -Infinity;
        for (let i = this.first[n], e = i + this.size[n]; i < e; i++) {
          const b = 6 * this.order[i];
          for (let k = 0; k < 3; k++) {
            if (itemBoxes[b + k] < B[o + k]) B[o + k] = itemBoxes[b + k];
            if (itemBoxes[b + 3 + k] > B[o + 3 + k]) B[o + 3 + k] = itemBoxes[b + 3 + k];
          }
        }
        continue;
      }
      const l = 6 * this.left[n], r = 6 * this.right[n];
      for (let k = 0; k < 3; k++) {
        B[o + k] = Math.min(B[l + k], B[r + k]);
        B[o + 3 + k] = Math.max(B[l + 3 + k], B[r + 3 + k]);
      }
    }
  }

  /** Call visit(p, q) (p ≠ q, each unordered pair once) for every two items whose boxes come within `margin`. */
  overlappingPairs(margin: number, visit: (p: number, q: number) => void): void {
    if (this.count < 2) return;
    const B = this.box, IB = this.itemBoxes, size = this.size, first = this.first, order = this.order, left = this.left, right = this.right;
    let stack = this.stack;
    let top = 0;
    stack[top++] = 0;
    stack[top++] = 0;
    while (top > 0) {
      const j = stack[--top];
      const i = stack[--top];
      if (top + 6 > stack.length) {
        const grown = new Int32Array(stack.length * 2);
        grown.set(stack);
        stack = this.stack = grown;
      }
      const li = size[i] > 0, lj = size[j] > 0;
      if (i === j) {
        if (li) {
          // pairs inside one leaf
          for (let x = first[i], e = x + size[i]; x < e; x++) {
            const p = order[x], a = 6 * p;
            for (let y = x + 1; y < e; y++) {
              const q = order[y], b = 6 * q;
              if (IB[a] <= IB[b + 3] + margin && IB[b] <= IB[a + 3] + margin && IB[a + 1] <= IB[b + 4] + margin
                && IB[b + 1] <= IB[a + 4] + margin && IB[a + 2] <= IB[b + 5] + margin && IB[b + 2] <= IB[a + 5] + margin) visit(p, q);
            }
          }
          continue;
        }
        const l = left[i], r = right[i];
        stack[top++] = l; stack[top++] = l;
        stack[top++] = r; stack[top++] = r;
        stack[top++] = l; stack[top++] = r;
        continue;
      }
      const a = 6 * i, b = 6 * j;
      if (!(B[a] <= B[b + 3] + margin && B[b] <= B[a + 3] + margin && B[a + 1] <= B[b + 4] + margin
        && B[b + 1] <= B[a + 4] + margin && B[a + 2] <= B[b + 5] + margin && B[b + 2] <= B[a + 5] + margin)) continue;
      if (li && lj) {
        // two leaves: every item of one against every item of the other, each first against the other leaf's box
        for (let x = first[i], ex = x + size[i]; x < ex; x++) {
          const p = order[x], pa = 6 * p;
          if (!(IB[pa] <= B[b + 3] + margin && B[b] <= IB[pa + 3] + margin && IB[pa + 1] <= B[b + 4] + margin
            && B[b + 1] <= IB[pa + 4] + margin && IB[pa + 2] <= B[b + 5] + margin && B[b + 2] <= IB[pa + 5] + margin)) continue;
          for (let y = first[j], ey = y + size[j]; y < ey; y++) {
            const q = order[y], qb = 6 * q;
            if (IB[pa] <= IB[qb + 3] + margin && IB[qb] <= IB[pa + 3] + margin && IB[pa + 1] <= IB[qb + 4] + margin
              && IB[qb + 1] <= IB[pa + 4] + margin && IB[pa + 2] <= IB[qb + 5] + margin && IB[qb + 2] <= IB[pa + 5] + margin) visit(p, q);
          }
        }
        continue;
      }
      // descend into the bigger box (or the one that is not a leaf)
      const si = B[a + 3] - B[a] + B[a + 4] - B[a + 1] + B[a + 5] - B[a + 2];
      const sj = B[b + 3] - B[b] + B[b + 4] - B[b + 1] + B[b + 5] - B[b + 2];
      if (lj || (!li && si >= sj)) {
        stack[top++] = left[i]; stack[top++] = j;
        stack[top++] = right[i]; stack[top++] = j;
      } else {
        stack[top++] = i; stack[top++] = left[j];
        stack[top++] = i; stack[top++] = right[j];
      }
    }
  }
}
