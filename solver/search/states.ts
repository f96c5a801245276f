// Facts about one closed state that the search, the classification and the paths all read: signs against the
// mountain/valley assignment, hinge limits, creases folded flat, and when two states are the same rotation.

import type { Pattern } from '../types';
import { wrapAngle } from '../math/rotation';

// At singular states (flat, folded flat) Newton reaches a residual of 1e-15 only within ~1e-7 rad of the
// exact state (the residual grows with the square of the distance there), so signs are read with that margin.
const SIGN_EPS = 1e-7;
const FLAT_FOLDED_EPS = 1e-6;
/** Two states are one when every crease agrees to this (radians, ±180° being one rotation). */
export const SAME_STATE_TOLERANCE = 1e-6;

export function isMovable(pattern: Pattern, c: number): boolean {
  const a = pattern.creases[c].assignment;
  return a !== 'B' && a !== 'F';
}

export function signPattern(pattern: Pattern, angles: Float64Array): string {
  return pattern.creases
    .map((c) => (c.assignment === 'B' ? '' : angles[c.index] > SIGN_EPS ? '+' : angles[c.index] < -SIGN_EPS ? '-' : '0'))
    .join('');
}

export function matchesAssignment(pattern: Pattern, angles: Float64Array): boolean {
  for (const c of pattern.creases) {
    const a = angles[c.index];
    if (Math.abs(a) >= Math.PI - FLAT_FOLDED_EPS) continue; // folded flat: either side closes the same way
    if (c.assignment === 'M' && a > SIGN_EPS) return false;
    if (c.assignment === 'V' && a < -SIGN_EPS) return false;
  }
  return true;
}

/** Valley +1, mountain −1, others 0 per crease. */
export function assignmentSigns(pattern: Pattern): Float64Array {
  const v = new Float64Array(pattern.creases.length);
  for (const c of pattern.creases) v[c.index] = c.assignment === 'V' ? 1 : c.assignment === 'M' ? -1 : 0;
  return v;
}

/** Creases whose angle is outside their hinge limits. */
export function limitViolations(pattern: Pattern, angles: Float64Array): number[] {
  const out: number[] = [];
  for (const c of pattern.creases) {
    const l = c.limit;
    if (!l) continue;
    const a = angles[c.index];
    if ((l.min !== undefined && a < l.min - 1e-9) || (l.max !== undefined && a > l.max + 1e-9)) out.push(c.index);
  }
  return out;
}

/** Creases folded flat (±180°): their two panels lie on each other. */
export function stackedCreases(pattern: Pattern, angles: Float64Array): number[] {
  const out: number[] = [];
  for (const c of pattern.creases) if (c.assignment !== 'B' && Math.abs(angles[c.index]) >= Math.PI - FLAT_FOLDED_EPS) out.push(c.index);
  return out;
}

// +180° and −180° are the same hinge rotation: states that differ only there are one solution.
export function sameState(a: Float64Array, b: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (Math.abs(wrapAngle(a[i] - b[i])) > SAME_STATE_TOLERANCE) return false;
  return true;
}

/**
 * Folded-flat creases take the sign the assignment asks for (valley +180°, mountain −180°, else as found), so
 * one rotation state always has one representation.
 */
export function canonicalFoldedFlat(pattern: Pattern, angles: Float64Array): void {
  for (const c of pattern.creases) {
    const a = angles[c.index];
    if (Math.abs(a) < Math.PI - 1e-9) continue;
    angles[c.index] = c.assignment === 'M' ? -Math.PI : c.assignment === 'V' ? Math.PI : Math.sign(a) * Math.PI;
  }
}
