// Contact along a path: every sample checked, and the first contact refined between the last sample without
// it and the first with it, by bisection on the drive to 0.01°. States between samples are solved exactly
// (vertex-by-vertex propagation where it applies, else Newton from the straight line between the samples),
// never interpolated.

import type { Drive, Pattern } from '../types';
import { buildClosureSystem, type ClosureSystem } from '../closure/blocks';
import { ClosureProblem, RESIDUAL_TOLERANCE } from '../closure/newton';
import { planPropagation, propagate, propagationWork, type PropagationPlan, type PropagationWork } from '../paths/propagate';
import { wrapAngle } from '../math/rotation';
import { ContactChecker, type ContactReport, type PanelContact } from './contact';

const DEG = 180 / Math.PI;
/** The first contact is located to this drive interval (radians). */
export const CONTACT_REFINEMENT = 0.01 / DEG;

export interface PathState {
  /** drive value, radians */
  drive: number;
  /** fold angle of every crease, radians */
  angles: Float64Array;
}

/** Closed states at drive values between two states of one path, with the other drives held. */
export class StatesBetween {
  private readonly sys: ClosureSystem;
  private plan?: PropagationPlan;
  private work?: PropagationWork;
  private problem?: ClosureProblem;

  constructor(readonly pattern: Pattern, readonly drive: number, readonly holds: Drive[] = []) {
    this.sys = buildClosureSystem(pattern);
    if (holds.length === 0) {
      const r = planPropagation(pattern, this.sys, drive);
      if (r.plan) { this.plan = r.plan; this.work = propagationWork(this.sys, pattern.creases.length); }
    }
  }

  /** The closed state at drive value s (between a.drive and b.drive), or undefined when none is found. */
  at(s: number, a: PathState, b: PathState): Float64Array | undefined {
    const n = this.pattern.creases.length;
    const f = b.drive === a.drive ? 0 : (s - a.drive) / (b.drive - a.drive);
    const guess = new Float64Array(n);
    for (let c = 0; c < n; c++) guess[c] = a.angles[c] + f * wrapAngle(b.angles[c] - a.angles[c]);
    guess[this.drive] = s;
    for (const h of this.holds) guess[h.crease] = h.value;
    if (this.plan && this.work) {
      const x = new Float64Array(n);
      x[this.drive] = s;
      const out = propagate(this.sys, this.plan, x, { kind: 'nearest', reference: guess }, this.work);
      if (out.ok && out.maxResidual <= RESIDUAL_TOLERANCE && out.maxDisagreement <= 1e-9) return x;
    }
    const held = new Set([this.drive, ...this.holds.map((h) => h.crease)]);
    this.problem ??= new ClosureProblem(this.pattern, (c) => held.has(c), this.sys);
    const r = this.problem.solve(guess, { polishTolerance: 1e-13, maxStep: 0.05, wrap: false });
    if (!r.converged) return undefined;
    for (let c = 0; c < n; c++) if (!held.has(c)) r.angles[c] = wrapAngle(r.angles[c]);
    return r.angles;
  }
}

export interface FirstContact {
  /** drive value of the first state found in contact, radians (within CONTACT_REFINEMENT of the last without) */
  drive: number;
  angles: Float64Array;
  report: ContactReport;
  /** the contact reported for the event: the first pair in panel order */
  contact: PanelContact;
  /** the last state found without contact */
  before: number;
}

/**
 * Bisection on the drive between `clear` (no contact) and `hit` (in contact, with its report) down to
 * `tolerance`. States that cannot be solved shrink the bracket from the contact side, as if in contact.
 */
export function refineFirstContact(
  checker: ContactChecker,
  states: StatesBetween,
  clear: PathState,
  hit: PathState & { report: ContactReport },
  tolerance = CONTACT_REFINEMENT,
): FirstContact {
  let lo: PathState = clear;
  let hi = hit;
  for (let it = 0; it < 60 && Math.abs(hi.drive - lo.drive) > tolerance; it++) {
    const s = (lo.drive + hi.drive) / 2;
    const x = states.at(s, lo, hi);
    if (!x) { hi = { ...hi, drive: s }; continue; }
    const report = checker.checkAngles(x);
    if (report.contacts.length) hi = { drive: s, angles: x, report };
    else lo = { drive: s, angles: x };
  }
  return { drive: hi.drive, angles: hi.angles, report: hi.report, contact: hi.report.contacts[0], before: lo.drive };
}

/** Words for the event: which panels, where, how far apart, at which drive value. */
export function contactText(pattern: Pattern, driveCrease: number, c: FirstContact, clearance: number, units?: string): string {
  const u = units ? ` ${units}` : '';
  const [p, q] = c.contact.panels;
  const at = c.contact.point.map((x) => +x.toFixed(6)).join(', ');
  const more = c.report.contacts.length > 1 ? ` (${c.report.contacts.length} pairs in contact there)` : '';
  const what = clearance > 0 ? `come within the clearance of ${clearance}${u} (${+c.contact.distance.toPrecision(6)}${u} apart)` : 'meet';
  const past = clearance > 0 ? 'past it they are closer than the clearance' : 'past it they pass through each other';
  return `Panels ${p} and ${q} ${what} at ${pattern.creases[driveCrease].label} = ${(c.drive * DEG).toFixed(2)}°, near (${at})${more}; ${past}.`;
}


