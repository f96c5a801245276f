// The colours of the tolerance panel's roles. Hinge bands take the sheet's own fold-angle scale (a mountain
// hinge in the mountain colour, a valley in the valley colour), so a chart reads like the sheet; the misfit
// and the worst vertices share one colour of their own, away from the scale, from the drive highlight and
// from the past-limit red, so a marked vertex is never read as a fold angle or a broken stop.
import { tintScale } from '../state/display';

export const TOLERANCE_LOOK = {
  /** misfit curve, worst-vertex rings and their legend */
  misfit: '#7a2f86',
  /** first-order estimates: dotted, in ink grey */
  linear: '#4a473f',
  grid: '#e6e2d9',
  zero: '#a8a295',
} as const;

/** The band colour of a hinge: its side of the fold-angle scale, from its assignment or its nominal fold. */
export function hingeColor(assignment: string | undefined, nominalDeg: number | null): string {
  const side = assignment === 'M' ? -1 : assignment === 'V' ? 1 : Math.sign(nominalDeg ?? 0) || 1;
  return tintScale(side * 150);
}
