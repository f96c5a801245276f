// Pure edits of a project (the document): each takes a project and returns a new one, or an error value
// that names the problem. Nothing here touches the interface or the disk.

import type { DriveSpec, ProjectDto } from '../../electron/contract';

export type Edit = { ok: true; project: ProjectDto } | { ok: false; message: string };

const DEG = Math.PI / 180;

/** The stable reference of a crease: its label from the file, else its index (as the solver reads it). */
export function creaseLabel(project: ProjectDto, index: number): string {
  return project.source.labels[index] ?? String(index);
}

export function creaseIndexByLabel(project: ProjectDto, label: string): number | undefined {
  const i = project.source.labels.indexOf(label);
  if (i >= 0) return i;
  if (/^\d+$/.test(label)) {
    const k = Number(label);
    if (k < project.source.edges.length && project.source.labels[k] === undefined) return k;
  }
  return undefined;
}

export function isMovableAssignment(a: string): boolean {
  return a !== 'B' && a !== 'F';
}

function clampAngle(deg: number): number {
  return Math.max(-180, Math.min(180, deg));
}

export function setDriveAngle(project: ProjectDto, label: string, angleDeg: number): Edit {
  if (!Number.isFinite(angleDeg)) return { ok: false, message: `The angle for drive ${label} is not a number.` };
  const k = project.drives.findIndex((d) => d.crease === label);
  if (k < 0) return { ok: false, message: `Crease ${label} is not a drive.` };
  const value = clampAngle(angleDeg);
  if (project.drives[k].angleDeg === value) return { ok: true, project };
  const drives = project.drives.map((d, i) => (i === k ? { ...d, angleDeg: value } : d));
  return { ok: true, project: { ...project, drives } };
}

export function addDrive(project: ProjectDto, index: number, angleDeg = 0): Edit {
  if (index < 0 || index >= project.source.edges.length) return { ok: false, message: `There is no crease ${index}.` };
  const a = project.source.assignments[index];
  const label = creaseLabel(project, index);
  if (!isMovableAssignment(a)) {
    return { ok: false, message: `Crease ${label} is ${a === 'B' ? 'on the boundary' : 'held flat'}; only folding creases can be drives.` };
  }
  if (project.drives.some((d) => d.crease === label)) return { ok: false, message: `Crease ${label} is already a drive.` };
  const drive: DriveSpec = { crease: label, angleDeg: clampAngle(angleDeg) };
  return { ok: true, project: { ...project, drives: [...project.drives, drive] } };
}

export function removeDrive(project: ProjectDto, label: string): Edit {
  if (!project.drives.some((d) => d.crease === label)) return { ok: false, message: `Crease ${label} is not a drive.` };
  return { ok: true, project: { ...project, drives: project.drives.filter((d) => d.crease !== label) } };
}

/** Rename a crease; drives that referred to the old label follow it. */
export function renameCrease(project: ProjectDto, index: number, newLabel: string): Edit {
  const label = newLabel.trim();
  const old = creaseLabel(project, index);
  if (index < 0 || index >= project.source.edges.length) return { ok: false, message: `There is no crease ${index}.` };
  if (label === old) return { ok: true, project };
  if (!label) return { ok: false, message: `A crease label cannot be empty (crease ${index}).` };
  if (label.length > 200) return { ok: false, message: `The label for crease ${index} is longer than 200 characters.` };
  const n = project.source.edges.length;
  for (let i = 0; i < n; i++) {
    if (i !== index && creaseLabel(project, i) === label) {
      return { ok: false, message: `Label "${label}" is already used by crease ${i}; labels must be unique.` };
    }
  }
  // a bare number would be read as a crease index by the solver: allow only the crease's own index
  if (/^\d+$/.test(label) && Number(label) !== index && Number(label) < n) {
    return { ok: false, message: `Label "${label}" would be read as crease ${label}; choose a label that is not another crease's index.` };
  }
  const labels = [...project.source.labels];
  labels[index] = label === String(index) ? undefined : label;
  const drives = project.drives.map((d) => (d.crease === old ? { ...d, crease: label } : d));
  return { ok: true, project: { ...project, source: { ...project.source, labels }, drives } };
}

export interface LimitInputDeg {
  minDeg?: number;
  maxDeg?: number;
}

/** Set or clear a hinge limit (degrees in, radians in the file's source block as the solver reads it). */
export function setCreaseLimit(project: ProjectDto, index: number, limit: LimitInputDeg): Edit {
  if (index < 0 || index >= project.source.edges.length) return { ok: false, message: `There is no crease ${index}.` };
  const label = creaseLabel(project, index);
  for (const [name, v] of [['lower', limit.minDeg], ['upper', limit.maxDeg]] as const) {
    if (v !== undefined && (!Number.isFinite(v) || v < -180 || v > 180)) {
      return { ok: false, message: `The ${name} limit of crease ${label} must be between −180° and 180°.` };
    }
  }
  if (limit.minDeg !== undefined && limit.maxDeg !== undefined && limit.minDeg > limit.maxDeg) {
    return { ok: false, message: `The lower limit of crease ${label} (${limit.minDeg}°) is above its upper limit (${limit.maxDeg}°).` };
  }
  const limits = [...project.source.limits];
  while (limits.length < project.source.edges.length) limits.push(undefined);
  limits[index] =
    limit.minDeg === undefined && limit.maxDeg === undefined
      ? undefined
      : {
          ...(limit.minDeg !== undefined ? { min: limit.minDeg * DEG } : {}),
          ...(limit.maxDeg !== undefined ? { max: limit.maxDeg * DEG } : {}),
        };
  return { ok: true, project: { ...project, source: { ...project.source, limits } } };
}

export function limitDeg(project: ProjectDto, index: number): LimitInputDeg {
  const l = project.source.limits[index];
  return {
    minDeg: l?.min !== undefined ? l.min / DEG : undefined,
    maxDeg: l?.max !== undefined ? l.max / DEG : undefined,
  };
}

/** A panel's name as shown: its name from the file, else "panel <index>". */
export function panelName(project: ProjectDto, panel: number): string {
  return project.source.panelNames?.[panel] ?? `panel ${panel}`;
}

/** Name a panel (an empty name clears it); names are unique, at most 200 characters. */
export function setPanelName(project: ProjectDto, panel: number, name: string): Edit {
  const n = name.trim();
  if (!Number.isInteger(panel) || panel < 0) return { ok: false, message: `There is no panel ${panel}.` };
  if (n.length > 200) return { ok: false, message: `The name of panel ${panel} is longer than 200 characters.` };
  const names = [...(project.source.panelNames ?? [])];
  if ((names[panel] ?? '') === n) return { ok: true, project };
  const twin = names.findIndex((x, k) => k !== panel && x === n);
  if (n && twin >= 0) return { ok: false, message: `Panel ${twin} is already named "${n}"; panel names must be unique.` };
  while (names.length <= panel) names.push(undefined);
  names[panel] = n || undefined;
  while (names.length && names[names.length - 1] === undefined) names.pop();
  return { ok: true, project: { ...project, source: { ...project.source, panelNames: names.length ? names : undefined } } };
}

export function setBasePanel(project: ProjectDto, panel: number): Edit {
  if (!Number.isInteger(panel) || panel < 0) return { ok: false, message: `There is no panel ${panel}.` };
  if (project.source.basePanel === panel) return { ok: true, project };
  return { ok: true, project: { ...project, source: { ...project.source, basePanel: panel } } };
}

/** Which side of a hinge limit an angle is on; the tolerance keeps an angle sitting on its limit "at". */
export function limitState(project: ProjectDto, index: number, angleDeg: number, tolDeg = 1e-6): 'ok' | 'at-limit' | 'beyond' | 'none' {
  const { minDeg, maxDeg } = limitDeg(project, index);
  if (minDeg === undefined && maxDeg === undefined) return 'none';
  if ((minDeg !== undefined && angleDeg < minDeg - tolDeg) || (maxDeg !== undefined && angleDeg > maxDeg + tolDeg)) return 'beyond';
  if ((minDeg !== undefined && Math.abs(angleDeg - minDeg) <= Math.max(tolDeg, 0.05)) || (maxDeg !== undefined && Math.abs(angleDeg - maxDeg) <= Math.max(tolDeg, 0.05))) return 'at-limit';
  return 'ok';
}
