// Hingeplan's colour code, in one place: the diverging scale over the signed fold angle and the colours of
// the roles drawn beside it. Chosen for this job, not taken from another program:
// - mountain (−180°) is a dark indigo, valley (+180°) an amber, flat a warm mid grey. Blue against yellow
//   survives the red–green deficiencies, and lightness grows from mountain (L* ≈ 23) through flat (≈ 58)
//   to valley (≈ 71), so a greyscale print orders every angle and tritanopia still parts the two sides;
// - even the light valley end keeps crease lines visible on the paper-white panels;
// - past a hinge limit is an oxblood red, the base panel an emerald green, the drive highlight a sky blue:
//   away from the scale and from each other under every common deficiency (tests/renderer/palette.test.ts
//   checks the distances with culori's simulation of Machado et al. 2009 and CIEDE2000).
// The trade's line styles carry mountain and valley too: valley dashed, mountain dash-dot.
// styles.css repeats these values as custom properties; the same test keeps the two in step.

import { formatHex, interpolate } from 'culori';

export const PALETTE = {
  /** the scale's ends and middle */
  mountain: '#2e2a7a',
  flat: '#8f8b82',
  valley: '#e3a200',
  /** a hinge past its limit: panels on the sheet (cross-hatched) and in 3D, the crease, the slider's zone */
  pastLimit: '#a8170d',
  /** the base panel (held still): hatched on the sheet, filled in 3D */
  base: '#00764c',
  /** the drives: a halo on the sheet, thick lines in 3D, their tags */
  drive: '#46b9ff',
  /** panels in 3D: top side and underside */
  panelTop: '#f4f1ea',
  panelUnder: '#c4bfb3',
  /** ink: text, the boundary, the selected crease */
  ink: '#22211e',
  boundary: '#3b3934',
  /** a crease held flat (dotted) */
  heldFlat: '#8c877c',
  /** panels in contact with another (passing through it, or closer than the clearance): sheet and 3D */
  contact: '#d4007f',
  /**
   * the tolerance analysis's misfit: its curve and the rings at the vertices that carry it. A vivid violet,
   * the colour farthest from the scale and the other roles under every common deficiency that is not near
   * black (tests/renderer/palette.test.ts)
   */
  misfit: '#a048f8',
} as const;

export type PaletteRole = keyof typeof PALETTE;

const toMountain = interpolate([PALETTE.flat, PALETTE.mountain], 'oklab');
const toValley = interpolate([PALETTE.flat, PALETTE.valley], 'oklab');

/**
 * The colour of a signed fold angle in degrees (clamped to ±180°). Interpolated in OKLab from flat to each
 * end, so lightness changes evenly; the square root eases small angles away from flat so they read as
 * folded.
 */
export function angleColor(angleDeg: number): string {
  const a = Math.max(-180, Math.min(180, Number.isFinite(angleDeg) ? angleDeg : 0));
  const t = Math.sqrt(Math.abs(a) / 180);
  return formatHex(a < 0 ? toMountain(t) : toValley(t)) ?? PALETTE.flat;
}
