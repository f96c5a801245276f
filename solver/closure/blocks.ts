// Closure blocks: one per interior vertex. Each computes its residual (the rotation vector of the product of
// the hinge rotations met walking once around the vertex) and its Jacobian block in one call, so the two can
// never disagree.

import type { Pattern } from '../types';
import { axisAngleRotation, inverseLeftJacobian, mat3, multiplyMat3, rotationVector, setIdentity, vec3 } from '../math/rotation';

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
  /**
   * Angular defect of each block (2π − Σ sectors, radians), when a vertex is not developable: panels cut
   * apart whose corners no longer add up to 360°. Absent for a flat sheet (every defect 0).
   */
  readonly blockDefect?: Float64Array;
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
 * direction of crease i). Returns the residual norm. The axes are in the sheet's plane, so each factor
 * R(u, ρ) is written out with u_z = 0.
 */
export function evaluateBlock(
  sys: ClosureSystem,
  b: number,
  angles: Float64Array,
  residual: Float64Array,
  jacobian: Float64Array | null,
  s: ClosureScratch,
): number {
  const P = s.prefix;
  P[0] = 1; P[1] = 0; P[2] = 0; P[3] = 0; P[4] = 1; P[5] = 0; P[6] = 0; P[7] = 0; P[8] = 1;
  const start = sys.blockStart[b];
  const end = sys.blockStart[b + 1];
  for (let k = start; k < end; k++) {
    const x = sys.slotUx[k], y = sys.slotUy[k];
    if (jacobian) {
      // w_k = P·u_k
      jacobian[3 * k] = P[0] * x + P[1] * y;
      jacobian[3 * k + 1] = P[3] * x + P[4] * y;
      jacobian[3 * k + 2] = P[6] * x + P[7] * y;
    }
    // P ← P·R(u_k, ρ_k), R = [[t x²+c, t xy, s y], [t xy, t y²+c, −s x], [−s y, s x, c]]
    const rho = angles[sys.slotCrease[k]];
    const c = Math.cos(rho), sn = Math.sin(rho), t = 1 - c;
    const r00 = t * x * x + c, r01 = t * x * y, r02 = sn * y;
    const r11 = t * y * y + c, r12 = -sn * x;
    const r20 = -sn * y, r21 = sn * x, r22 = c;
    for (let row = 0; row < 9; row += 3) {
      const a0 = P[row], a1 = P[row + 1], a2 = P[row + 2];
      P[row] = a0 * r00 + a1 * r01 + a2 * r20;
      P[row + 1] = a0 * r01 + a1 * r11 + a2 * r21;
      P[row + 2] = a0 * r02 + a1 * r12 + a2 * r22;
    }
  }
  const defect = sys.blockDefect ? sys.blockDefect[b] : 0;
  if (defect !== 0) {
    // walking round a vertex with defect d comes back to the first panel turned by d about the normal:
    // closure is P = Rz(d), so the residual is log(P·Rz(−d)); a constant right factor leaves ∂r/∂ρ as it is
    const cd = Math.cos(defect), sd = Math.sin(defect);
    for (let row = 0; row < 9; row += 3) {
      const a0 = P[row], a1 = P[row + 1];
      P[row] = a0 * cd - a1 * sd;
      P[row + 1] = a0 * sd + a1 * cd;
    }
  }
  const phi = s.phi;
  rotationVector(phi, P);
  residual[3 * b] = phi[0];
  residual[3 * b + 1] = phi[1];
  residual[3 * b + 2] = phi[2];
  if (jacobian) {
    const Ji = inverseLeftJacobian(s.jinv, phi);
    for (let k = start; k < end; k++) {
      const x = jacobian[3 * k], y = jacobian[3 * k + 1], z = jacobian[3 * k + 2];
      jacobian[3 * k] = Ji[0] * x + Ji[1] * y + Ji[2] * z;
      jacobian[3 * k + 1] = Ji[3] * x + Ji[4] * y + Ji[5] * z;
      jacobian[3 * k + 2] = Ji[6] * x + Ji[7] * y + Ji[8] * z;
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

/**
 * How block b's residual moves with the flat geometry (a manufactured sheet is not the drawn one): ∂r/∂θ_k for
 * every slot's flat direction angle θ_k into dTheta[3·k..3·k+2] (k over all slots, only block b's are written),
 * and ∂r/∂d for the block's defect into dDefect[0..2]. Turning crease k's axis in the sheet's plane gives the
 * left-trivialized derivative A_k·ẑ − A_k·R_k·ẑ (A_k the rotations met before crease k): the difference of the
 * folded normals of the two panels at the crease; the defect's factor Rz(−d) gives −P·ẑ. Both pass through
 * J_l⁻¹(r) like ∂r/∂ρ.
 */
export function blockGeometryJacobian(
  sys: ClosureSystem,
  b: number,
  angles: Float64Array,
  dTheta: Float64Array,
  dDefect: Float64Array,
  s: ClosureScratch,
): void {
  const { prefix, step, next, phi, jinv } = s;
  setIdentity(prefix);
  const start = sys.blockStart[b];
  const end = sys.blockStart[b + 1];
  for (let k = start; k < end; k++) {
    const zx = prefix[2], zy = prefix[5], zz = prefix[8];
    axisAngleRotation(step, sys.slotUx[k], sys.slotUy[k], 0, angles[sys.slotCrease[k]]);
    multiplyMat3(next, prefix, step);
    prefix.set(next);
    dTheta[3 * k] = zx - prefix[2];
    dTheta[3 * k + 1] = zy - prefix[5];
    dTheta[3 * k + 2] = zz - prefix[8];
  }
  dDefect[0] = -prefix[2];
  dDefect[1] = -prefix[5];
  dDefect[2] = -prefix[8];
  const defect = sys.blockDefect ? sys.blockDefect[b] : 0;
  if (defect !== 0) {
    axisAngleRotation(step, 0, 0, 1, -defect);
    multiplyMat3(next, prefix, step);
    prefix.set(next);
  }
  rotationVector(phi, prefix);
  inverseLeftJacobian(jinv, phi);
  const apply = (out: Float64Array, o: number) => {
    const x = out[o], y = out[o + 1], z = out[o + 2];
    out[o] = jinv[0] * x + jinv[1] * y + jinv[2] * z;
    out[o + 1] = jinv[3] * x + jinv[4] * y + jinv[5] * z;
    out[o + 2] = jinv[6] * x + jinv[7] * y + jinv[8] * z;
  };
  for (let k = start; k < end; k++) apply(dTheta, 3 * k);
  apply(dDefect, 0);
}

/** The same system with its own slot directions and defects (a perturbed sheet); topology arrays are shared. */
export function geometryCopy(sys: ClosureSystem): ClosureSystem & { slotUx: Float64Array; slotUy: Float64Array; blockDefect: Float64Array } {
  return {
    ...sys,
    slotUx: Float64Array.from(sys.slotUx),
    slotUy: Float64Array.from(sys.slotUy),
    blockDefect: sys.blockDefect ? Float64Array.from(sys.blockDefect) : new Float64Array(sys.blockCount),
  };
}
