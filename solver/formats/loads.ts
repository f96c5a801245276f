// The loads a file can carry for the static drive torque: an areal density, gravity, per-panel masses and
// torsion springs. The same shape in the project file ("loads") and in FOLD ("hingeplan:loads"): SI units
// (kg/m², m/s², kg, N·m/rad), rest angles in degrees, springs by crease label.

import type { Message } from '../types';

export interface FileLoads {
  /** kg/m² */
  arealDensity?: number;
  /** m/s² in the base panel's frame */
  gravity?: [number, number, number];
  /** kg per panel (index into the panels) */
  panelMasses?: { panel: number; mass: number }[];
  /** N·m/rad; rest in degrees (default 0, flat) */
  springs?: { crease: string; stiffness: number; rest?: number }[];
}

const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** Read a loads object; `field` names it in messages (`loads`, `hingeplan:loads`). */
export function readLoads(value: unknown, field: string): { loads?: FileLoads; messages: Message[] } {
  const messages: Message[] = [];
  const bad = (code: string, text: string, at: string) => messages.push({ severity: 'error', code, text, where: { field: at } });
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    bad('wrong-type', `${field} should be an object {arealDensity, gravity, panelMasses, springs}.`, field);
    return { messages };
  }
  const o = value as Record<string, unknown>;
  const loads: FileLoads = {};
  for (const k of Object.keys(o)) if (!['arealDensity', 'gravity', 'panelMasses', 'springs'].includes(k)) bad('unknown-field', `${field} has a field "${k}" that this format does not have (a misspelling?).`, `${field}.${k}`);
  if (o.arealDensity !== undefined) {
    if (finite(o.arealDensity) && o.arealDensity >= 0) loads.arealDensity = o.arealDensity;
    else bad('bad-areal-density', `${field}.arealDensity must be a number ≥ 0 (kg/m²).`, `${field}.arealDensity`);
  }
  if (o.gravity !== undefined) {
    if (Array.isArray(o.gravity) && o.gravity.length === 3 && o.gravity.every(finite)) loads.gravity = [o.gravity[0], o.gravity[1], o.gravity[2]];
    else bad('bad-gravity', `${field}.gravity must be three numbers [gx, gy, gz] in m/s².`, `${field}.gravity`);
  }
  if (o.panelMasses !== undefined) {
    if (!Array.isArray(o.panelMasses)) bad('wrong-type', `${field}.panelMasses must be a list of {panel, mass}.`, `${field}.panelMasses`);
    else {
      loads.panelMasses = [];
      o.panelMasses.forEach((m, k) => {
        const e = m as Record<string, unknown> | null;
        const at = `${field}.panelMasses[${k}]`;
        if (!e || typeof e !== 'object' || !Number.isInteger(e.panel) || (e.panel as number) < 0 || !finite(e.mass) || e.mass < 0 || Object.keys(e).some((x) => x !== 'panel' && x !== 'mass')) {
          bad('bad-mass', `${at} must be {"panel": <index ≥ 0>, "mass": <kg ≥ 0>}.`, at);
        } else loads.panelMasses!.push({ panel: e.panel as number, mass: e.mass });
      });
    }
  }
  if (o.springs !== undefined) {
    if (!Array.isArray(o.springs)) bad('wrong-type', `${field}.springs must be a list of {crease, stiffness, rest}.`, `${field}.springs`);
    else {
      loads.springs = [];
      o.springs.forEach((sp, k) => {
        const e = sp as Record<string, unknown> | null;
        const at = `${field}.springs[${k}]`;
        const ok = !!e && typeof e === 'object' && typeof e.crease === 'string' && e.crease !== '' && finite(e.stiffness) && e.stiffness >= 0
          && (e.rest === undefined || (finite(e.rest) && Math.abs(e.rest) <= 180)) && Object.keys(e).every((x) => ['crease', 'stiffness', 'rest'].includes(x));
        if (!ok) bad('bad-spring', `${at} must be {"crease": <label>, "stiffness": <N·m/rad ≥ 0>, "rest": <deg in −180 … 180, optional>}.`, at);
        else loads.springs!.push({ crease: e!.crease as string, stiffness: e!.stiffness as number, ...(e!.rest !== undefined ? { rest: e!.rest as number } : {}) });
      });
    }
  }
  return messages.length ? { messages } : { loads, messages };
}

/** The loads as written to a file (only the fields that are set). */
export function loadsValue(loads: FileLoads): Record<string, unknown> {
  return {
    ...(loads.arealDensity !== undefined ? { arealDensity: loads.arealDensity } : {}),
    ...(loads.gravity ? { gravity: loads.gravity } : {}),
    ...(loads.panelMasses?.length ? { panelMasses: loads.panelMasses } : {}),
    ...(loads.springs?.length ? { springs: loads.springs } : {}),
  };
}
