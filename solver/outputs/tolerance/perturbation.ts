// Manufactured sheets: how a cut-and-hinged sheet departs from its drawing, as independent random parameters
// that move the closure system's geometry (the flat direction of every crease at every vertex, and the
// defect of every vertex). Two tolerances of the trade, either or both:
//  - position: every vertex lies uniformly in a zone (a circle) of diameter t around its nominal point, every
//    vertex independent (common practice for positional tolerances);
//  - sector: every sector angle (a panel corner at a vertex) lies uniformly within ±τ of nominal, every corner
//    independent; a vertex whose corners no longer add up to 360° carries the difference as its defect.
// The model also gives its first-order effect (the linearization at the drawing) for the linear estimates.

import type { Pattern } from '../../types';
import type { ClosureSystem } from '../../closure/blocks';
import { mulberry32 } from '../../math/random';

/** One independent parameter's first-order effect: changes of slot direction angles and block defects per unit. */
export interface ParameterEffect {
  /** [slot, ∂θ_slot/∂p] pairs */
  slots: [number, number][];
  /** [block, ∂d_block/∂p] pairs */
  blocks: [number, number][];
}

/** A random manufactured sheet, as parameters p (independent, zero mean) and the exact geometry they give. */
export interface PerturbationModel {
  /** number of parameters */
  readonly count: number;
  /** random numbers one sheet consumes (fixed, so every sheet has its own stretch of the stream) */
  readonly draws: number;
  /** variance of each parameter (for the first-order estimates) */
  readonly variance: Float64Array;
  /** draw one sheet's parameters from `rand` (exactly `draws` calls) */
  draw(rand: () => number, out: Float64Array): void;
  /** the exact geometry for parameters p: every slot's flat direction angle and every block's defect */
  apply(p: Float64Array, theta: Float64Array, defect: Float64Array): void;
  /** first-order effect of parameter i */
  effect(i: number): ParameterEffect;
  /** in words, for headers */
  readonly description: string;
  /** position part: the vertices that move, parameters 2i and 2i+1 being the x and y offsets of vertices[i] */
  readonly vertices?: number[];
}

export interface ToleranceSpec {
  /** diameter of the positional tolerance zone around each vertex, in the file's units (0 or absent: none) */
  position?: number;
  /** sector angle tolerance ±τ, radians (0 or absent: none) */
  sector?: number;
}

const TWO_PI = 2 * Math.PI;

/** Nominal flat direction angle of every slot (the closure system's order). */
export function nominalDirections(pattern: Pattern, sys: ClosureSystem): Float64Array {
  const theta = new Float64Array(sys.slotCount);
  pattern.interiorVertices.forEach((iv, b) => iv.directions.forEach((t, k) => (theta[sys.blockStart[b] + k] = t)));
  return theta;
}

/**
 * The built-in model: positions (two parameters per vertex that moves a crease at an interior vertex:
 * the offset in x and y, uniform in the disc of radius t/2, drawn as r = (t/2)·√u, φ = 2πv, the inverse of
 * the radius's distribution function, common practice) then sectors (one parameter per slot, uniform in ±τ).
 */
export function sheetPerturbation(pattern: Pattern, sys: ClosureSystem, spec: ToleranceSpec): PerturbationModel {
  const radius = (spec.position ?? 0) / 2;
  const tau = spec.sector ?? 0;
  const theta0 = nominalDirections(pattern, sys);
  // slots: the other end of each slot's crease
  const other = new Int32Array(sys.slotCount);
  for (let b = 0; b < sys.blockCount; b++) {
    const v = sys.blockVertex[b];
    for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
      const c = pattern.creases[sys.slotCrease[p]];
      other[p] = c.vertices[0] === v ? c.vertices[1] : c.vertices[0];
    }
  }
  // the vertices that matter: interior vertices and the far ends of their creases, in file order
  const moved: number[] = [];
  const slotsOfVertex = new Map<number, number[]>();
  const touch = (v: number, slot: number) => {
    let list = slotsOfVertex.get(v);
    if (!list) { list = []; slotsOfVertex.set(v, list); }
    list.push(slot);
  };
  for (let b = 0; b < sys.blockCount; b++) {
    for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) { touch(sys.blockVertex[b], p); touch(other[p], p); }
  }
  if (radius > 0) moved.push(...[...slotsOfVertex.keys()].sort((a, b) => a - b));
  const movedIndex = new Map(moved.map((v, i) => [v, i]));
  const positionCount = 2 * moved.length;
  const sectorCount = tau > 0 ? sys.slotCount : 0;
  const count = positionCount + sectorCount;
  const variance = new Float64Array(count);
  // uniform in a disc of radius R: E[x²] = E[y²] = R²/4; uniform in ±τ: τ²/3
  variance.fill((radius * radius) / 4, 0, positionCount);
  variance.fill((tau * tau) / 3, positionCount);
  const P = pattern.vertices;

  const slotVertexOf = (p: number, b: number) => [sys.blockVertex[b], other[p]] as const;
  const blockOfSlot = new Int32Array(sys.slotCount);
  for (let b = 0; b < sys.blockCount; b++) for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) blockOfSlot[p] = b;

  return {
    count,
    draws: count,
    vertices: moved,
    variance,
    description: [
      radius > 0 ? `vertex positions uniform in a circle of diameter ${2 * radius} around nominal, every vertex independent` : '',
      tau > 0 ? `sector angles uniform within ±${(tau * 180) / Math.PI}° of nominal, every panel corner independent` : '',
    ].filter(Boolean).join('; ') || 'no perturbation',
    draw(rand, out) {
      for (let i = 0; i < moved.length; i++) {
        const r = radius * Math.sqrt(rand());
        const phi = TWO_PI * rand();
        out[2 * i] = r * Math.cos(phi);
        out[2 * i + 1] = r * Math.sin(phi);
      }
      for (let k = 0; k < sectorCount; k++) out[positionCount + k] = tau * (2 * rand() - 1);
    },
    apply(p, theta, defect) {
      defect.fill(0);
      for (let b = 0; b < sys.blockCount; b++) {
        for (let s = sys.blockStart[b]; s < sys.blockStart[b + 1]; s++) {
          let t = theta0[s];
          if (positionCount > 0) {
            const [v, w] = slotVertexOf(s, b);
            const iv = movedIndex.get(v)!;
            const iw = movedIndex.get(w)!;
            const dx0 = P[w][0] - P[v][0], dy0 = P[w][1] - P[v][1];
            const dx = dx0 + p[2 * iw] - p[2 * iv], dy = dy0 + p[2 * iw + 1] - p[2 * iv + 1];
            // the turn of the crease from its drawn direction, so a zero offset leaves θ exactly as drawn
            t += Math.atan2(dx0 * dy - dy0 * dx, dx0 * dx + dy0 * dy);
          }
          theta[s] = t;
        }
        if (sectorCount > 0) {
          // sector k runs from slot k to slot k+1; slot 0 keeps its direction, the last sector closes the defect
          const s0 = sys.blockStart[b], s1 = sys.blockStart[b + 1];
          let shift = 0;
          for (let s = s0; s < s1; s++) {
            theta[s] += shift;
            shift += p[positionCount + s];
          }
          defect[b] = -shift;
        }
      }
    },
    effect(i) {
      if (i < positionCount) {
        const v = moved[i >> 1];
        const axis = i & 1; // 0: x, 1: y
        const slots: [number, number][] = [];
        for (const s of slotsOfVertex.get(v) ?? []) {
          const b = blockOfSlot[s];
          const [a, w] = slotVertexOf(s, b);
          const dx = P[w][0] - P[a][0], dy = P[w][1] - P[a][1];
          const L2 = dx * dx + dy * dy;
          // θ = atan2(dy, dx): ∂θ/∂(x_w, y_w) = (−dy, dx)/L², and the opposite for the slot's own vertex
          const sign = v === w ? 1 : -1;
          slots.push([s, (sign * (axis === 0 ? -dy : dx)) / L2]);
        }
        return { slots, blocks: [] };
      }
      const s = i - positionCount;
      const b = blockOfSlot[s];
      const slots: [number, number][] = [];
      for (let q = s + 1; q < sys.blockStart[b + 1]; q++) slots.push([q, 1]);
      return { slots, blocks: [[b, -1]] };
    },
  };
}

/**
 * The random numbers of sheet `index`: mulberry32's state advances by a fixed increment per call, so the
 * stream from position k·draws on is the generator seeded at seed + k·draws·increment. Every sheet then has
 * its own stretch of one stream, none overlapping while samples × draws < 2³² (the period), and the sheets
 * are the same whichever thread draws them or in which order.
 */
export function sheetRandom(seed: number, index: number, draws: number): () => number {
  const offset = Math.imul(Math.imul(index, draws) >>> 0, 0x6d2b79f5) >>> 0;
  return mulberry32((seed + offset) >>> 0);
}

/** Samples × draws must stay below mulberry32's period for the sheets' streams not to overlap. */
export const STREAM_PERIOD = 2 ** 32;

/** Write a geometry (direction angles and defects) into a system's slot directions. */
export function setGeometry(sys: { slotUx: Float64Array; slotUy: Float64Array; blockDefect: Float64Array }, theta: Float64Array, defect: Float64Array): void {
  for (let s = 0; s < theta.length; s++) {
    sys.slotUx[s] = Math.cos(theta[s]);
    sys.slotUy[s] = Math.sin(theta[s]);
  }
  sys.blockDefect.set(defect);
}
