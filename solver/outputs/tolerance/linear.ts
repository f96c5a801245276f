// First-order estimates beside the Monte Carlo figures. At the nominal state x (closed, residual 0) a small
// change δg of the sheet's geometry changes the residuals by G·δg (G = ∂r/∂g, blockGeometryJacobian through
// the model's parameter effects); the least-squares compromise answers with δρ = −(J_fᵀJ_f)⁻¹J_fᵀ·G·δg over
// the free creases, and leaves the residual (I − J_f(J_fᵀJ_f)⁻¹J_fᵀ)·G·δg. With independent parameters of
// variance σᵢ², each hinge's variance is Σᵢ σᵢ²·δρᵢ² and each vertex's mean-square residual Σᵢ σᵢ²·|δrᵢ|²
// (the propagation of variance, common practice). Where the Monte Carlo spread agrees, linear theory holds.

import { blockGeometryJacobian, closureScratch } from '../../closure/blocks';
import { SHEET_LOST, type SheetSolver } from './sheet';

export interface LinearEstimate {
  /** per drive value: first-order standard deviation of every hinge (radians, hinge order); null where singular */
  hingeStd: (Float64Array | null)[];
  /** per drive value: first-order root-mean-square closure residual of every vertex (radians); null where singular */
  vertexRms: (Float64Array | null)[];
  /** per drive value: the nominal state is singular (the free creases' Jacobian loses rank) */
  singular: boolean[];
}

/** The first-order estimate at every drive value, one resumable step per few parameters. */
export function* linearSteps(solver: SheetSolver): Generator<void, LinearEstimate> {
  const { setup, model, hinges } = solver;
  const sys = solver.nominalSys;
  const n = hinges.length;
  const B = sys.blockCount;
  const reference = solver.reference;
  const out: LinearEstimate = { hingeStd: [], vertexRms: [], singular: [] };
  const dTheta = new Float64Array(3 * sys.slotCount);
  const dDefect = new Float64Array(3 * B);
  const d3 = new Float64Array(3);
  const scratch = closureScratch();
  const column = new Float64Array(3 * B);
  const rhs = new Float64Array(n);
  const z = new Float64Array(n);
  const jz = new Float64Array(3 * B);
  const touched = new Uint8Array(B);
  const blockOfSlot = new Int32Array(sys.slotCount);
  for (let b = 0; b < B; b++) for (let s = sys.blockStart[b]; s < sys.blockStart[b + 1]; s++) blockOfSlot[s] = b;

  for (let j = 0; j < setup.at.length; j++) {
    const x = Float64Array.from(setup.nominal[j]);
    for (let h = 0; h < n; h++) x[hinges[h]] = reference.angles[j * n + h];
    const { env, singular, problem } = solver.nominalFactor(x);
    out.singular.push(singular);
    if (singular || reference.status[j] === SHEET_LOST) {
      out.hingeStd.push(null);
      out.vertexRms.push(null);
      continue;
    }
    for (let b = 0; b < B; b++) {
      blockGeometryJacobian(sys, b, x, dTheta, d3, scratch);
      dDefect.set(d3, 3 * b);
    }
    const hingeVar = new Float64Array(n);
    const vertexVar = new Float64Array(B);
    const list: number[] = [];
    for (let i = 0; i < model.count; i++) {
      const variance = model.variance[i];
      if (variance === 0) continue;
      const effect = model.effect(i);
      // the residual column G·eᵢ, nonzero only at the blocks the parameter touches
      for (const [s, c] of effect.slots) {
        const b = blockOfSlot[s];
        if (!touched[b]) { touched[b] = 1; list.push(b); }
        for (let k = 0; k < 3; k++) column[3 * b + k] += c * dTheta[3 * s + k];
      }
      for (const [b, c] of effect.blocks) {
        if (!touched[b]) { touched[b] = 1; list.push(b); }
        for (let k = 0; k < 3; k++) column[3 * b + k] += c * dDefect[3 * b + k];
      }
      rhs.fill(0);
      for (const b of list) {
        for (let p = sys.blockStart[b]; p < sys.blockStart[b + 1]; p++) {
          const a = problem.unknownOf[sys.slotCrease[p]];
          if (a >= 0) rhs[a] += problem.jacobian[3 * p] * column[3 * b] + problem.jacobian[3 * p + 1] * column[3 * b + 1] + problem.jacobian[3 * p + 2] * column[3 * b + 2];
        }
      }
      env.solve(z, rhs);
      for (let a = 0; a < n; a++) hingeVar[a] += variance * z[a] * z[a];
      // the residual left after the compromise: G·eᵢ − J_f·z
      problem.jacobianTimes(jz, z);
      for (let b = 0; b < B; b++) {
        const rx = column[3 * b] - jz[3 * b], ry = column[3 * b + 1] - jz[3 * b + 1], rz = column[3 * b + 2] - jz[3 * b + 2];
        vertexVar[b] += variance * (rx * rx + ry * ry + rz * rz);
      }
      for (const b of list) { touched[b] = 0; column[3 * b] = column[3 * b + 1] = column[3 * b + 2] = 0; }
      list.length = 0;
      if (i % 64 === 63) yield;
    }
    out.hingeStd.push(hingeVar.map(Math.sqrt));
    out.vertexRms.push(vertexVar.map(Math.sqrt));
    yield;
  }
  return out;
}
