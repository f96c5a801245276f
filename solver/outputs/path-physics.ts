// The physical checks a path runs at every state it solves: panel contact (on by default) and, when loads
// are given, the static holding torque of every drive. One PathChecks object follows one path: it sees the
// states in order (a sweep's samples, a schedule's drive values, a followed schedule's rows), flags every
// state at or past the first contact, refines that first contact between the last state without it and the
// first with it, and keeps the peak torque of each drive.

import type { Drive, Message, Pattern } from '../types';
import { ClosureProblem } from '../closure/newton';
import { analyzeState } from '../closure/analysis';
import { ContactChecker } from './contact';
import { StatesBetween, contactText, refineFirstContact, type FirstContact, type PathState } from './contact-path';
import type { LoadModel } from './torque';
import type { SweepEvent, SweepResult } from '../paths/sweep';
import type { FollowResult } from './schedule';

export interface PathChecksOptions {
  /** contact checking: false for off; clearance in file units (default 0: interpenetration only) */
  contact?: false | { clearance?: number };
  /** stop the path at the first contact */
  stopAtContact?: boolean;
  /** loads for the holding torque; none: no torque */
  loads?: LoadModel;
  /** file units, for the words of the contact event */
  units?: string;
  /** refine the first contact between states (default true; off where several drives move at once) */
  refine?: boolean;
}

export interface StateChecks {
  /** at or past the first contact */
  contact: boolean;
  /** pairs in contact at this state (panel indices) */
  contacts: [number, number][];
  /** holding torque per drive crease (the path's drive and every held crease), N·m */
  torque?: Map<number, number>;
}

export interface ContactEvent {
  type: 'contact';
  /** drive value of the refined first contact, radians */
  drive: number;
  panels: [number, number];
  point: [number, number, number];
  distance: number;
  text: string;
  angles: Float64Array;
}

export interface ChecksSummary {
  contact: { checked: boolean; clearance: number };
  /** the first contact, when there is one */
  event?: ContactEvent;
  /** per drive crease: the torque of largest magnitude and the drive value where it is (radians) */
  peakTorque?: Map<number, { value: number; at: number }>;
  messages: Message[];
}

export class PathChecks {
  private readonly checker?: ContactChecker;
  private readonly states: StatesBetween;
  private previous?: PathState;
  private first?: FirstContact;
  private readonly peak = new Map<number, { value: number; at: number }>();
  private readonly messages: Message[] = [];
  private readonly clearance: number;
  private problem?: ClosureProblem;

  constructor(readonly pattern: Pattern, readonly drive: number, readonly holds: Drive[], readonly options: PathChecksOptions) {
    const contact = options.contact;
    this.clearance = contact === false ? 0 : Math.max(0, contact?.clearance ?? 0);
    if (contact !== false) {
      this.checker = new ContactChecker(pattern, { clearance: this.clearance });
      this.messages.push(...this.checker.messages);
    }
    this.states = new StatesBetween(pattern, drive, holds);
  }

  /** Check one state of the path (in path order); `stop` is true when the path should end here. */
  observe(state: PathState & { rates?: Float64Array }): StateChecks & { stop: boolean } {
    let contacts: [number, number][] = [];
    let stop = false;
    if (this.checker) {
      const report = this.checker.checkAngles(state.angles);
      contacts = report.contacts.map((c) => c.panels);
      if (!this.first && report.contacts.length) {
        const prev = this.previous;
        this.first = prev && this.options.refine !== false
          ? refineFirstContact(this.checker, this.states, prev, { ...state, report })
          : { drive: state.drive, angles: state.angles, report, contact: report.contacts[0], before: state.drive };
        if (!prev && this.options.refine !== false) this.messages.push({ severity: 'warning', code: 'contact-at-start', text: 'Panels are already in contact at the first state of the path.' });
        stop = !!this.options.stopAtContact;
      }
    }
    let torque: Map<number, number> | undefined;
    const loads = this.options.loads;
    if (loads) {
      torque = new Map();
      if (state.rates) torque.set(this.drive, loads.torque(state.angles, state.rates));
      for (const [crease, rates] of this.heldRates(state.angles, !state.rates)) torque.set(crease, loads.torque(state.angles, rates));
      for (const [c, t] of torque) {
        const p = this.peak.get(c);
        if (!p || Math.abs(t) > Math.abs(p.value)) this.peak.set(c, { value: t, at: state.drive });
      }
    }
    this.previous = { drive: state.drive, angles: state.angles };
    return { contact: !!this.first, contacts, ...(torque ? { torque } : {}), stop };
  }

  /**
   * dρ/dq_h of every crease for each held crease h (and the drive itself when its rates are not given) at a
   * closed state: the sensitivities with every drive held.
   */
  private heldRates(angles: Float64Array, withDrive: boolean): [number, Float64Array][] {
    const drives = [...(withDrive ? [this.drive] : []), ...this.holds.map((h) => h.crease)];
    if (!drives.length) return [];
    const held = new Set([this.drive, ...this.holds.map((h) => h.crease)]);
    this.problem ??= new ClosureProblem(this.pattern, (c) => held.has(c));
    this.problem.evaluate(angles, true);
    const free = this.problem.unknownCreases;
    const a = analyzeState(this.problem, free, drives);
    return drives.map((crease, d) => {
      const rates = new Float64Array(this.pattern.creases.length);
      rates[crease] = 1;
      free.forEach((c, k) => { rates[c] = a.sensitivity ? a.sensitivity[k][d] : 0; });
      return [crease, rates];
    });
  }

  summary(): ChecksSummary {
    const f = this.first;
    const event: ContactEvent | undefined = f
      ? {
          type: 'contact',
          drive: f.drive,
          panels: f.contact.panels,
          point: f.contact.point,
          distance: f.contact.distance,
          text: contactText(this.pattern, this.drive, f, this.clearance, this.options.units),
          angles: f.angles,
        }
      : undefined;
    return {
      contact: { checked: !!this.checker, clearance: this.clearance },
      ...(event ? { event } : {}),
      ...(this.options.loads ? { peakTorque: this.peak } : {}),
      messages: this.messages,
    };
  }
}

/** Put what the checks found into a sweep's result: the summary, the contact event (in path order), messages. */
export function finishChecks(result: SweepResult, checks: PathChecks): void {
  const summary = checks.summary();
  result.checks = summary;
  result.messages.push(...summary.messages);
  const e = summary.event;
  if (e) {
    const sense = result.samples.length > 1 ? Math.sign(result.samples[result.samples.length - 1].drive - result.samples[0].drive) || 1 : 1;
    const at = result.events.findIndex((x) => (x.drive - e.drive) * sense > 0);
    const event: SweepEvent = { type: 'contact', drive: e.drive, text: e.text, angles: e.angles, panels: e.panels, point: e.point, distance: e.distance };
    if (at < 0) result.events.push(event); else result.events.splice(at, 0, event);
  }
}

/**
 * Check every solved row of a followed schedule, in order (`drive`: the crease whose value places a row on
 * the path). With stopAtContact the rows past the first contact lose their state and are flagged.
 */
export function checkFollowedRows(result: FollowResult, checks: PathChecks, drive: number): void {
  let stopped = false;
  for (const r of result.rows) {
    if (!r.angles) continue;
    if (stopped) { r.angles = undefined; r.rates = undefined; r.maxResidual = undefined; r.unreachable = 'past the first contact (stop at contact)'; continue; }
    const out = checks.observe({ drive: r.angles[drive], angles: r.angles, ...(r.rates ? { rates: r.rates } : {}) });
    r.checks = { contact: out.contact, contacts: out.contacts, ...(out.torque ? { torque: out.torque } : {}) };
    if (out.stop) stopped = true;
  }
  const summary = checks.summary();
  result.checks = summary;
  result.messages.push(...summary.messages);
  const e = summary.event;
  if (e) result.events.push({ type: 'contact', drive: e.drive, text: e.text, angles: e.angles, panels: e.panels, point: e.point, distance: e.distance });
  if (stopped && result.status === 'complete') result.status = 'partial';
}
