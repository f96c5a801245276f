// Static holding torque of each drive by virtual work: τ_d = ∂V/∂q_d along the closed state, with V the
// panels' potential energy in gravity plus the torsion springs' energy. The derivative along the
// constraint comes from the hinge rates (dρ/dθ of every crease for the path's drive, or the sensitivities
// for several drives): each panel's velocity is the sum of the hinge twists on its walk from the base panel,
// so ∂V/∂q = Σ_p m_p (−g) · ċ_p + Σ_k k_k (ρ_k − ρ₀_k) ρ̇_k. Positive τ: the actuator pushes the drive in
// its valley direction (towards larger fold angle) to hold the state. Static only: no dynamics, friction or
// hinge play.

import type { Message, Pattern } from '../types';
import { placePanels, planShape, type ShapePlan } from './placement';
import type { FileLoads } from '../formats/loads';

/** Standard acceleration of gravity, m/s² (the conventional value of the CGPM, 1901; common practice). */
export const STANDARD_GRAVITY = 9.80665;

export interface Spring {
  crease: number;
  /** N·m/rad */
  stiffness: number;
  /** fold angle at which the spring is relaxed, radians */
  rest: number;
}

export interface LoadSpec {
  /** kg/m², for every panel without a mass of its own */
  arealDensity?: number;
  /** kg, by panel index (overrides the areal density) */
  panelMasses?: Map<number, number>;
  /** m/s² in the base panel's frame; default (0, 0, −9.80665): the base panel flat, its top side up */
  gravity?: [number, number, number];
  springs?: Spring[];
}

const METRES: Record<string, number> = {
  mm: 1e-3, millimetre: 1e-3, millimetres: 1e-3, millimeter: 1e-3, millimeters: 1e-3,
  cm: 1e-2, centimetre: 1e-2, centimetres: 1e-2, centimeter: 1e-2, centimeters: 1e-2,
  m: 1, metre: 1, metres: 1, meter: 1, meters: 1,
  // the international inch, 25.4 mm exactly (common practice)
  in: 0.0254, inch: 0.0254, inches: 0.0254,
};

/** Metres per file unit, or a message saying why the file's units cannot be used for loads. */
export function metresPerUnit(units: string | undefined): { scale?: number; message?: Message } {
  const u = units?.trim().toLowerCase();
  if (u && u in METRES) return { scale: METRES[u] };
  const text = u
    ? `Torque needs the sheet's lengths in mm, cm, m or in; this file's units are ${JSON.stringify(units)}. Set "units" to one of those.`
    : 'Torque needs the sheet\'s length unit (mm, cm, m or in), and this file gives none. Set "units" in the file.';
  return { message: { severity: 'error', code: 'units-unknown', text, where: { field: 'units' } } };
}

/**
 * The loads of one pattern, ready to give energy and torque at any state. Lengths are converted from the
 * file's units to metres once; every result is SI (J, N·m).
 */
export class LoadModel {
  /** kg per panel */
  readonly masses: Float64Array;
  readonly gravity: [number, number, number];
  readonly springs: Spring[];
  readonly plan: ShapePlan;
  private readonly transforms: Float64Array;
  private readonly omega: Float64Array;
  private readonly linear: Float64Array;

  private constructor(readonly pattern: Pattern, readonly scale: number, spec: LoadSpec, basePanel: number) {
    const P = pattern.panels.length;
    this.masses = new Float64Array(P);
    for (let p = 0; p < P; p++) {
      const own = spec.panelMasses?.get(p);
      this.masses[p] = own ?? (spec.arealDensity ?? 0) * pattern.panels[p].area * scale * scale;
    }
    this.gravity = spec.gravity ?? [0, 0, -STANDARD_GRAVITY];
    this.springs = spec.springs ?? [];
    this.plan = planShape(pattern, basePanel);
    this.transforms = new Float64Array(12 * P);
    this.omega = new Float64Array(3 * P);
    this.linear = new Float64Array(3 * P);
  }

  /** Check the loads against the pattern and units; errors name the field at fault. */
  static create(pattern: Pattern, spec: LoadSpec, units: string | undefined, basePanel = pattern.basePanel): { model?: LoadModel; messages: Message[] } {
    const messages: Message[] = [];
    const { scale, message } = metresPerUnit(units);
    if (message) messages.push(message);
    const bad = (code: string, text: string, field: string) => messages.push({ severity: 'error', code, text, where: { field } });
    if (spec.arealDensity !== undefined && !(Number.isFinite(spec.arealDensity) && spec.arealDensity >= 0)) bad('bad-areal-density', `The areal density must be a number ≥ 0 (kg/m²), not ${spec.arealDensity}.`, 'arealDensity');
    for (const [p, m] of spec.panelMasses ?? []) {
      if (!(Number.isInteger(p) && p >= 0 && p < pattern.panels.length)) bad('bad-panel', `Panel ${p} does not exist (the sheet has panels 0 … ${pattern.panels.length - 1}).`, 'panelMasses');
      else if (!(Number.isFinite(m) && m >= 0)) bad('bad-mass', `The mass of panel ${p} must be a number ≥ 0 (kg), not ${m}.`, 'panelMasses');
    }
    if (spec.gravity && !(spec.gravity.length === 3 && spec.gravity.every(Number.isFinite))) bad('bad-gravity', 'Gravity must be three finite numbers gx, gy, gz in m/s².', 'gravity');
    const seen = new Set<number>();
    for (const s of spec.springs ?? []) {
      const c = pattern.creases[s.crease];
      if (!c) { bad('bad-spring', `A spring is on crease ${s.crease}, which does not exist.`, 'springs'); continue; }
      if (c.assignment === 'B') bad('bad-spring', `Crease ${c.label} is on the sheet's rim; a spring needs a hinge.`, 'springs');
      if (!(Number.isFinite(s.stiffness) && s.stiffness >= 0)) bad('bad-spring', `The stiffness of the spring on ${c.label} must be a number ≥ 0 (N·m/rad), not ${s.stiffness}.`, 'springs');
      if (!(Number.isFinite(s.rest) && Math.abs(s.rest) <= Math.PI + 1e-12)) bad('bad-spring', `The rest angle of the spring on ${c.label} must be within −180° … 180°.`, 'springs');
      if (seen.has(s.crease)) bad('bad-spring', `Crease ${c.label} has two springs; give one (add the stiffnesses).`, 'springs');
      seen.add(s.crease);
    }
    if (messages.some((m) => m.severity === 'error') || scale === undefined) return { messages };
    return { model: new LoadModel(pattern, scale, spec, basePanel), messages };
  }

  /** Total mass of the panels, kg. */
  get totalMass(): number {
    let m = 0;
    for (const x of this.masses) m += x;
    return m;
  }

  /** Potential energy (J) of the state with these fold angles: gravity on every panel's centroid plus springs. */
  energy(angles: ArrayLike<number>): number {
    const T = placePanels(this.plan, angles, this.transforms);
    const [gx, gy, gz] = this.gravity;
    let V = 0;
    this.pattern.panels.forEach((panel, p) => {
      const m = this.masses[p];
      if (m === 0) return;
      const [x, y] = panel.centroid;
      const o = 12 * p;
      const cx = T[o] * x + T[o + 1] * y + T[o + 3], cy = T[o + 4] * x + T[o + 5] * y + T[o + 7], cz = T[o + 8] * x + T[o + 9] * y + T[o + 11];
      V -= m * (gx * cx + gy * cy + gz * cz) * this.scale;
    });
    for (const s of this.springs) V += 0.5 * s.stiffness * (angles[s.crease] - s.rest) ** 2;
    return V;
  }

  /**
   * dV/dq (N·m) along the direction `rates` (dρ/dq of every crease, radians per radian) at the state
   * `angles`: the holding torque of the drive q whose rates these are.
   */
  torque(angles: ArrayLike<number>, rates: ArrayLike<number>): number {
    const plan = this.plan;
    const T = placePanels(plan, angles, this.transforms);
    const W = this.omega, L = this.linear;
    // spatial twist of every panel (angular velocity ω, and v₀ with velocity(x) = v₀ + ω × x), base first
    for (let k = 0; k < plan.panels; k++) {
      const p = plan.order[k];
      const parent = plan.parent[p];
      const o = 3 * p;
      if (parent < 0) { W[o] = W[o + 1] = W[o + 2] = 0; L[o] = L[o + 1] = L[o + 2] = 0; continue; }
      const q = 3 * parent, t = 12 * parent;
      const rate = plan.sign[p] * rates[plan.crease[p]];
      // the hinge line in space: through a = T_parent(ax, ay, 0), along w = R_parent (ux, uy, 0)
      const ux = plan.ux[p], uy = plan.uy[p], ax = plan.ax[p], ay = plan.ay[p];
      const wx = T[t] * ux + T[t + 1] * uy, wy = T[t + 4] * ux + T[t + 5] * uy, wz = T[t + 8] * ux + T[t + 9] * uy;
      const px = T[t] * ax + T[t + 1] * ay + T[t + 3], py = T[t + 4] * ax + T[t + 5] * ay + T[t + 7], pz = T[t + 8] * ax + T[t + 9] * ay + T[t + 11];
      const hx = rate * wx, hy = rate * wy, hz = rate * wz;
      W[o] = W[q] + hx; W[o + 1] = W[q + 1] + hy; W[o + 2] = W[q + 2] + hz;
      // v₀ of a rotation about the line through a: −ω × a
      L[o] = L[q] - (hy * pz - hz * py);
      L[o + 1] = L[q + 1] - (hz * px - hx * pz);
      L[o + 2] = L[q + 2] - (hx * py - hy * px);
    }
    const [gx, gy, gz] = this.gravity;
    let dV = 0;
    this.pattern.panels.forEach((panel, p) => {
      const m = this.masses[p];
      if (m === 0) return;
      const [x, y] = panel.centroid;
      const o = 12 * p, i = 3 * p;
      const cx = T[o] * x + T[o + 1] * y + T[o + 3], cy = T[o + 4] * x + T[o + 5] * y + T[o + 7], cz = T[o + 8] * x + T[o + 9] * y + T[o + 11];
      const vx = L[i] + W[i + 1] * cz - W[i + 2] * cy;
      const vy = L[i + 1] + W[i + 2] * cx - W[i] * cz;
      const vz = L[i + 2] + W[i] * cy - W[i + 1] * cx;
      dV -= m * (gx * vx + gy * vy + gz * vz) * this.scale;
    });
    for (const s of this.springs) dV += s.stiffness * (angles[s.crease] - s.rest) * rates[s.crease];
    return dV;
  }
}

/**
 * dρ/dq_d of every crease for drive d of a solution (rad/rad): the solution's sensitivity to d (per crease),
 * with 1 for d itself and 0 for the other drives and for flat and rim creases.
 */
export function ratesFromSensitivity(pattern: Pattern, sensitivity: Map<number, ArrayLike<number>>, drive: number): Float64Array {
  const rates = new Float64Array(pattern.creases.length);
  const row = sensitivity.get(drive);
  if (row) for (let c = 0; c < rates.length; c++) rates[c] = Number.isFinite(row[c]) ? row[c] : 0;
  for (const d of sensitivity.keys()) rates[d] = 0;
  for (const c of pattern.creases) if (c.assignment === 'B' || c.assignment === 'F') rates[c.index] = 0;
  rates[drive] = 1;
  return rates;
}

/** Loads given on top of the file's (a command line's options): they replace the file's values. */
export interface LoadOverrides {
  arealDensity?: number;
  gravity?: [number, number, number];
  /** springs by crease index (replace the file's spring on that crease) */
  springs?: Spring[];
}

/**
 * The loads for a pattern from its file's loads and the overrides: springs resolved from labels, rest angles
 * to radians. `asked` is false when nothing has a mass or a spring (no torque to compute).
 */
export function resolveLoads(pattern: Pattern, file: FileLoads | undefined, over: LoadOverrides = {}): { spec: LoadSpec; asked: boolean; messages: Message[] } {
  const messages: Message[] = [];
  const springs = new Map<number, Spring>();
  (file?.springs ?? []).forEach((s, k) => {
    const c = pattern.labelIndex.get(s.crease) ?? (/^\d+$/.test(s.crease) && Number(s.crease) < pattern.creases.length ? Number(s.crease) : undefined);
    if (c === undefined) messages.push({ severity: 'error', code: 'unknown-crease', text: `loads.springs[${k}] names crease "${s.crease}", which the pattern does not have.`, where: { field: `loads.springs[${k}]` } });
    else springs.set(c, { crease: c, stiffness: s.stiffness, rest: (s.rest ?? 0) * (Math.PI / 180) });
  });
  for (const s of over.springs ?? []) springs.set(s.crease, s);
  const panelMasses = new Map<number, number>();
  for (const m of file?.panelMasses ?? []) panelMasses.set(m.panel, m.mass);
  const arealDensity = over.arealDensity ?? file?.arealDensity;
  const gravity = over.gravity ?? file?.gravity;
  const spec: LoadSpec = {
    ...(arealDensity !== undefined ? { arealDensity } : {}),
    ...(panelMasses.size ? { panelMasses } : {}),
    ...(gravity ? { gravity } : {}),
    springs: [...springs.values()],
  };
  return { spec, asked: arealDensity !== undefined || panelMasses.size > 0 || springs.size > 0, messages };
}
