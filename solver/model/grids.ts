// Spatial helpers for the drawing cleaning: union–find, and uniform hash grids over points and over
// segments' bounding boxes, keyed by one number per cell so that large drawings make little garbage.

export class UnionFind {
  parent: Int32Array;
  constructor(n: number) {
    this.parent = new Int32Array(n);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }
  find(i: number): number {
    const p = this.parent;
    while (p[i] !== i) {
      p[i] = p[p[i]];
      i = p[i];
    }
    return i;
  }
  union(i: number, j: number): void {
    const a = this.find(i);
    const b = this.find(j);
    if (a !== b) this.parent[Math.max(a, b)] = Math.min(a, b);
  }
}

/** Cells of a grid as one number: columns and rows counted from the drawing's corner, so they stay small. */
const KEY_ROWS = 1 << 24;
const cellKey = (gx: number, gy: number) => (gx + 2) * KEY_ROWS + (gy + 2);

/** A uniform hash grid over points, for "every point within r of this one" queries. */
export class PointGrid {
  private cells = new Map<number, number[]>();
  constructor(private readonly cell: number, private readonly x0: number, private readonly y0: number) {}
  add(i: number, x: number, y: number): void {
    const k = cellKey(Math.floor((x - this.x0) / this.cell), Math.floor((y - this.y0) / this.cell));
    const list = this.cells.get(k);
    if (list) list.push(i);
    else this.cells.set(k, [i]);
  }
  /** indices of points in the cells that a disc of radius ≤ cell around (x, y) can touch */
  near(x: number, y: number, out: number[]): number[] {
    out.length = 0;
    const gx = Math.floor((x - this.x0) / this.cell);
    const gy = Math.floor((y - this.y0) / this.cell);
    for (let dx = -1; dx <= 1; dx++) {
      for (let dy = -1; dy <= 1; dy++) {
        const list = this.cells.get(cellKey(gx + dx, gy + dy));
        if (list) for (const i of list) out.push(i);
      }
    }
    return out;
  }
}

/** A uniform grid over segments' bounding boxes (grown by r), for candidate pairs and point-on-segment tests. */
export class SegmentGrid {
  private cells = new Map<number, number[]>();
  constructor(private readonly cell: number, private readonly x0: number, private readonly y0: number) {}
  add(s: number, ax: number, ay: number, bx: number, by: number, r: number): void {
    const c = this.cell;
    const gx1 = Math.floor((Math.max(ax, bx) + r - this.x0) / c), gy1 = Math.floor((Math.max(ay, by) + r - this.y0) / c);
    for (let gx = Math.floor((Math.min(ax, bx) - r - this.x0) / c); gx <= gx1; gx++) {
      for (let gy = Math.floor((Math.min(ay, by) - r - this.y0) / c); gy <= gy1; gy++) {
        const k = cellKey(gx, gy);
        const list = this.cells.get(k);
        if (list) list.push(s);
        else this.cells.set(k, [s]);
      }
    }
  }
  at(x: number, y: number): number[] {
    return this.cells.get(cellKey(Math.floor((x - this.x0) / this.cell), Math.floor((y - this.y0) / this.cell))) ?? [];
  }
  lists(): IterableIterator<number[]> {
    return this.cells.values();
  }
}

/**
 * A segment grid whose cells are about the mean segment length, coarsened until it holds at most ~16
 * entries per segment (long diagonal lines cover many cells), so the pair tests stay near linear.
 */
export function segmentGrid(list: number[], ends: (s: number) => number[], r: number, size: number, x0: number, y0: number): SegmentGrid {
  let total = 0;
  for (const s of list) {
    const [ax, ay, bx, by] = ends(s);
    total += Math.hypot(bx - ax, by - ay);
  }
  let cell = Math.max(total / list.length, size / 4096, r);
  for (;;) {
    let entries = 0;
    for (const s of list) {
      const [ax, ay, bx, by] = ends(s);
      entries += (Math.floor((Math.max(ax, bx) + r) / cell) - Math.floor((Math.min(ax, bx) - r) / cell) + 1) * (Math.floor((Math.max(ay, by) + r) / cell) - Math.floor((Math.min(ay, by) - r) / cell) + 1);
    }
    if (entries <= 16 * list.length + 64) break;
    cell *= 2;
  }
  const grid = new SegmentGrid(cell, x0 - 2 * r, y0 - 2 * r);
  for (const s of list) {
    const [ax, ay, bx, by] = ends(s);
    grid.add(s, ax, ay, bx, by, r);
  }
  return grid;
}

/** Position of p along a → b (0 at a, 1 at b) and its distance from the segment's line. */
export function project(px: number, py: number, ax: number, ay: number, bx: number, by: number): { t: number; d: number } {
  const dx = bx - ax;
  const dy = by - ay;
  const len2 = dx * dx + dy * dy;
  const t = ((px - ax) * dx + (py - ay) * dy) / len2;
  const d = Math.abs(dx * (py - ay) - dy * (px - ax)) / Math.sqrt(len2);
  return { t, d };
}

