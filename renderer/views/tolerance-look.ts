// The colours of the tolerance tab, from the palette: hinge bands on the sheet's fold-angle scale (a mountain
// hinge in the mountain colour, a valley in the valley colour), so a chart reads like the sheet; the misfit and
// the rings at its worst vertices in the palette's misfit role; first-order estimates dotted in ink.
import { PALETTE, angleColor } from '../palette';

export const TOLERANCE_LOOK = {
  misfit: PALETTE.misfit,
  linear: '#4a473f',
  grid: '#e6e2d9',
  zero: '#a8a295',
  tick: '#5f5b53',
  label: '#4a473f',
  font: "'DejaVu Sans', sans-serif",
} as const;

/** The band colour of a hinge: its side of the fold-angle scale, from its assignment or its nominal fold. */
export function hingeColor(assignment: string | undefined, nominalDeg: number | null): string {
  const side = assignment === 'M' ? -1 : assignment === 'V' ? 1 : Math.sign(nominalDeg ?? 0) || 1;
  return angleColor(side * 150);
}
