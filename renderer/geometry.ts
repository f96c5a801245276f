// Geometry the views share: the derived pattern (built once per source with the solver's own builder, a
// pure function), the folded shape for the angles on screen, crease picking on the flat sheet, and the
// panels that touch a crease beyond its hinge limit.

import { buildPattern } from '../solver/model/pattern';
import { foldedShape } from '../solver/outputs/shape';
import type { Pattern, PatternSource, Shape } from '../solver/types';
import type { MessageDto, PatternSourceDto, ProjectDto } from '../electron/contract';
import { limitState } from './state/document';

const RAD = Math.PI / 180;

const patterns = new WeakMap<PatternSourceDto, { pattern?: Pattern; messages: MessageDto[] }>();

/** The pattern of a source; cached per source object, which the document keeps until an edit replaces it. */
export function derivePattern(source: PatternSourceDto): { pattern?: Pattern; messages: MessageDto[] } {
  let r = patterns.get(source);
  if (!r) {
    const built = buildPattern(source as PatternSource);
    r = { pattern: built.pattern, messages: built.messages as MessageDto[] };
    patterns.set(source, r);
  }
  return r;
}

export function shapeFor(pattern: Pattern, anglesDeg: readonly number[], basePanel?: number): Shape {
  const a = new Float64Array(pattern.creases.length);
  for (let i = 0; i < a.length; i++) a[i] = (anglesDeg[i] ?? 0) * RAD;
  return foldedShape(pattern, a, basePanel);
}

export interface Bounds {
  minX: number;
  minY: number;
  maxX: number;
  maxY: number;
}

export function flatBounds(pattern: Pattern): Bounds {
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (const [x, y] of pattern.vertices) {
    if (x < minX) minX = x;
    if (y < minY) minY = y;
    if (x > maxX) maxX = x;
    if (y > maxY) maxY = y;
  }
  if (!Number.isFinite(minX)) return { minX: 0, minY: 0, maxX: 1, maxY: 1 };
  return { minX, minY, maxX, maxY };
}

/** Distance from (px, py) to the segment a–b. */
export function segmentDistance(px: number, py: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax, dy = by - ay;
  const len2 = dx * dx + dy * dy;
  const t = len2 > 0 ? Math.max(0, Math.min(1, ((px - ax) * dx + (py - ay) * dy) / len2)) : 0;
  return Math.hypot(px - (ax + t * dx), py - (ay + t * dy));
}

/**
 * Finds the crease nearest a point of the flat sheet through a uniform grid of buckets, so hovering over
 * a sheet of thousands of creases costs a handful of distance checks.
 */
export class CreasePicker {
  private cells = new Map<number, number[]>();
  private readonly cell: number;
  private readonly cols: number;

  constructor(private readonly pattern: Pattern) {
    const b = flatBounds(pattern);
    const n = Math.max(1, pattern.creases.length);
    this.cell = Math.max((b.maxX - b.minX + b.maxY - b.minY) / Math.sqrt(n) / 1.5, 1e-9);
    this.cols = Math.ceil((b.maxX - b.minX) / this.cell) + 3;
    this.origin = [b.minX - this.cell, b.minY - this.cell];
    for (const c of pattern.creases) {
      const [a, bb] = c.vertices;
      const [ax, ay] = pattern.vertices[a];
      const [bx, by] = pattern.vertices[bb];
      const steps = Math.max(1, Math.ceil(Math.hypot(bx - ax, by - ay) / (this.cell / 2)));
      const seen = new Set<number>();
      for (let s = 0; s <= steps; s++) {
        const k = this.key(ax + ((bx - ax) * s) / steps, ay + ((by - ay) * s) / steps);
        if (seen.has(k)) continue;
        seen.add(k);
        const list = this.cells.get(k);
        if (list) list.push(c.index);
        else this.cells.set(k, [c.index]);
      }
    }
  }

  private readonly origin: [number, number];

  private key(x: number, y: number): number {
    const i = Math.floor((x - this.origin[0]) / this.cell);
    const j = Math.floor((y - this.origin[1]) / this.cell);
    return j * this.cols + i;
  }

  /** The crease within `tolerance` (sheet units) of (x, y) that is nearest, or null. */
  pick(x: number, y: number, tolerance: number): number | null {
    const r = Math.ceil(tolerance / this.cell);
    const ci = Math.floor((x - this.origin[0]) / this.cell);
    const cj = Math.floor((y - this.origin[1]) / this.cell);
    let best: number | null = null;
    let bestD = tolerance;
    for (let j = cj - r; j <= cj + r; j++) {
      for (let i = ci - r; i <= ci + r; i++) {
        const list = this.cells.get(j * this.cols + i);
        if (!list) continue;
        for (const c of list) {
          const [a, b] = this.pattern.creases[c].vertices;
          const [ax, ay] = this.pattern.vertices[a];
          const [bx, by] = this.pattern.vertices[b];
          const d = segmentDistance(x, y, ax, ay, bx, by);
          if (d < bestD) {
            bestD = d;
            best = c;
          }
        }
      }
    }
    return best;
  }
}

const pickers = new WeakMap<Pattern, CreasePicker>();
export function pickerFor(pattern: Pattern): CreasePicker {
  let p = pickers.get(pattern);
  if (!p) {
    p = new CreasePicker(pattern);
    pickers.set(pattern, p);
  }
  return p;
}

/** Creases whose angle is beyond a hinge limit, and the panels on either side of them. */
export function limitViolations(project: ProjectDto, pattern: Pattern, anglesDeg: readonly number[]): { creases: Set<number>; panels: Set<number> } {
  const creases = new Set<number>();
  const panels = new Set<number>();
  for (let i = 0; i < pattern.creases.length; i++) {
    if (!project.source.limits[i]) continue;
    if (limitState(project, i, anglesDeg[i] ?? 0) !== 'beyond') continue;
    creases.add(i);
    const c = pattern.creases[i];
    if (c.leftPanel >= 0) panels.add(c.leftPanel);
    if (c.rightPanel >= 0) panels.add(c.rightPanel);
  }
  return { creases, panels };
}
