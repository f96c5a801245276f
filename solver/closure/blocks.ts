// Closure blocks: one per interior vertex. Each computes its residual (the rotation vector of the product of
// the hinge rotations met walking once around the vertex) and its Jacobian block in one call, so the two can
// never disagree.

import type { Pattern } from '../types';
import {
  axisAngleRotation,
  inverseLeftJacobian,
  mat3,
  multiplyMat3,
  rotationVector,
  setIdentity,
  transformVec3,
  vec3,
} from '../math/rotation';

export interface ClosureSystem {
  readonly blockCount: number;
  /** blockStart[b] … blockStart[b+1]−1 index the slots of block b */
  readonly blockStart: Int32Array;
  /** crease index of each slot (ccw around the block's vertex) */
  readonly slotCrease: Int32Array;
  /** flat direction of each slot's crease leaving the vertex */
  readonly slotUx: Float64Array;
  readonly slotUy: Float64Array;
  /** pattern vertex of each block */
  readonly blockVertex: Int32Array;
  readonly slotCount: number;
}

export function buildClosureSystem(pattern: Pattern): ClosureSystem {
  const blocks = pattern.interiorVertices;
  const blockStart = new Int32Array(blocks.length + 1);
  blocks.forEach((b, i) => (blockStart[i + 1] = blockStart[i] + b.creases.length));
  const slotCount = blockStart[blocks.length];
  const slotCrease = new Int32Array(slotCount);
  const slotUx = new Float64Array(slotCount);
  const slotUy = new Float64Array(slotCount);
  const blockVertex = new Int32Array(blocks.length);
  blocks.forEach((b, i) => {
    blockVertex[i] = b.vertex;
    b.creases.forEach((c, k) => {
      slotCrease[blockStart[i] + k] = c;
      slotUx[blockStart[i] + k] = Math.cos(b.directions[k]);
      slotUy[blockStart[i] + k] = Math.sin(b.directions[k]);
    });
  });
  return { blockCount: blocks.length, blockStart, slotCrease, slotUx, slotUy, blockVertex, slotCount };
}

/** Scratch space for evaluation; one per thread of work. */
export interface ClosureScratch {
  prefix: Float64Array;
  step: Float64Array;
  next: Float64Array;
  phi: Float64Array;
  jinv: Float64Array;
  w: Float64Array;
}

export function closureScratch(): ClosureScratch {
  return { prefix: mat3(), step: mat3(), next: mat3(), phi: vec3(), jinv: mat3(), w: vec3() };
}

/**
 * Residual of block b into residual[3b..3b+2]; when `jacobian` is given, ∂r/∂ρ of every slot into
 * jacobian[3·slot..3·slot+2] (the exact derivative of the rotation vector, J_l⁻¹(r)·w_i, where w_i is the folded
 * direction of crease i). Returns the residual norm.
 */
export function evaluateBlock(
  sys: ClosureSystem,
  b: number,
  angles: Float64Array,
  residual: Float64Array,
  jacobian: Float64Array | null,
  s: ClosureScratch,
): number {
  const { prefix, step, next, phi, jinv, w } = s;
  setIdentity(prefix);
  const start = sys.blockStart[b];
  const end = sys.blockStart[b + 1];
  for (let k = start; k < end; k++) {
    const ux = sys.slotUx[k];
    const uy = sys.slotUy[k];
    if (jacobian) {
      transformVec3(w, prefix, ux, uy, 0);
      jacobian[3 * k] = w[0];
      jacobian[3 * k + 1] = w[1];
      jacobian[3 * k + 2] = w[2];
    }
    axisAngleRotation(step, ux, uy, 0, angles[sys.slotCrease[k]]);
    multiplyMat3(next, prefix, step);
    prefix.set(next);
  }
  rotationVector(phi, prefix);
  residual[3 * b] = phi[0];
  residual[3 * b + 1] = phi[1];
  residual[3 * b + 2] = phi[2];
  if (jacobian) {
    inverseLeftJacobian(jinv, phi);
    for (let k = start; k < end; k++) {
      const x = jacobian[3 * k], y = jacobian[3 * k + 1], z = jacobian[3 * k + 2];
      jacobian[3 * k] = jinv[0] * x + jinv[1] * y + jinv[2] * z;
      jacobian[3 * k + 1] = jinv[3] * x + jinv[4] * y + jinv[5] * z;
      jacobian[3 * k + 2] = jinv[6] * x + jinv[7] * y + jinv[8] * z;
    }
  }
  return Math.hypot(phi[0], phi[1], phi[2]);
}

/** Evaluate every block. residual has 3·blockCount entries, jacobian 3·slotCount. Returns the largest block norm. */
export function evaluateClosure(
  sys: ClosureSystem,
  angles: Float64Array,
  residual: Float64Array,
  jacobian: Float64Array | null,
  s: ClosureScratch = closureScratch(),
): number {
  let worst = 0;
  for (let b = 0; b < sys.blockCount; b++) {
    const r = evaluateBlock(sys, b, angles, residual, jacobian, s);
    if (r > worst) worst = r;
  }
  return worst;
}

/** Residual norm at each block. */
export function blockResiduals(sys: ClosureSystem, angles: Float64Array): number[] {
  const r = new Float64Array(3 * sys.blockCount);
  evaluateClosure(sys, angles, r, null);
  const out: number[] = [];
  for (let b = 0; b < sys.blockCount; b++) out.push(Math.hypot(r[3 * b], r[3 * b + 1], r[3 * b + 2]));
  return out;
}
