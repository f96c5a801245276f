// FOLD import and export (the open format for origami: JSON with vertices_coords, edges_vertices,
// edges_assignment, edges_foldAngle in degrees with valley positive, faces_vertices). Only the flat
// crease pattern of the top-level frame is read. Top-level keys this program does not use are kept
// untouched and written back, so a FOLD file survives a round trip through Hingeplan.
//
// Our own data lives in namespaced keys, as the format allows:
//   hingeplan:edges_label   per edge, string or null: the crease labels
//   hingeplan:edges_limits  per edge, null or {min?, max?} in degrees: hinge stops
//   hingeplan:drives        [{crease, angle}] in degrees
//   hingeplan:basePanel     index into faces_vertices (or the derived panel order)
//   hingeplan:faces_name    per panel in the same order, string or null: panel names
//   hingeplan:units         free-text units when frame_unit cannot say them
//   hingeplan:cautions      the cautions line, written with solved fold angles (ignored on reading)
//   hingeplan:loads         {arealDensity, gravity, panelMasses, springs}: loads for the drive torque (SI)
import type { Assignment, HingeLimit, Message, PatternSource } from '../types';
import type { DriveSpec } from '../model/drives';
import type { Project } from './project';
import { readJsonText } from './limits';
import { CAUTIONS } from './cautions';
import { loadsValue, readLoads, type FileLoads } from './loads';

export const FOLD_SPEC = 1.1;
export const FOLD_CREATOR = 'Hingeplan';
/** frame_unit values the FOLD specification defines */
export const FOLD_UNITS: readonly string[] = ['unit', 'in', 'pt', 'm', 'cm', 'mm', 'um', 'nm'];

const NS = 'hingeplan:';
/** Keys this reader consumes; every other top-level key is kept as it is. */
const CONSUMED = new Set([
  'file_spec',
  'file_creator',
  'file_title',
  'file_description',
  'frame_unit',
  'vertices_coords',
  'edges_vertices',
  'edges_assignment',
  'edges_foldAngle',
  'faces_vertices',
  `${NS}edges_label`,
  `${NS}edges_limits`,
  `${NS}drives`,
  `${NS}basePanel`,
  `${NS}faces_name`,
  `${NS}units`,
  `${NS}cautions`,
  `${NS}loads`,
]);

const DEG = 180 / Math.PI;
const RAD = Math.PI / 180;
const toDegrees = (rad: number) => +(rad * DEG).toPrecision(15);

export interface FoldWriteOptions {
  /** fold angle per crease, radians (valley positive); written as edges_foldAngle in degrees */
  foldAngles?: ArrayLike<number>;
}

/** Read a FOLD file. Never throws. */
export function parseFold(text: string, fileName?: string): { project?: Project; messages: Message[] } {
  const read = readJsonText(text, 'FOLD file');
  if (read.value === undefined) return { messages: read.messages };
  return parseFoldValue(read.value, fileName);
}

function isNum(x: unknown): x is number {
  return typeof x === 'number';
}

export function parseFoldValue(value: unknown, fileName?: string): { project?: Project; messages: Message[] } {
  const messages: Message[] = [];
  const error = (code: string, text: string, field?: string) => {
    messages.push(field ? { severity: 'error', code, text, where: { field } } : { severity: 'error', code, text });
  };
  const warn = (code: string, text: string, field?: string) => {
    messages.push(field ? { severity: 'warning', code, text, where: { field } } : { severity: 'warning', code, text });
  };
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    error('not-a-fold', 'The file is not a FOLD object (a JSON object with vertices_coords and edges_vertices).');
    return { messages };
  }
  const obj = value as Record<string, unknown>;

  if (obj.file_spec !== undefined && (!isNum(obj.file_spec) || obj.file_spec > 1.2)) {
    warn('fold-newer-spec', `The file says file_spec ${JSON.stringify(obj.file_spec)}; this reader knows FOLD 1.1 and 1.2 and reads what it can.`, 'file_spec');
  }
  if (obj.file_frames !== undefined) {
    messages.push({ severity: 'info', code: 'fold-frames-ignored', text: 'The file has file_frames; only the top-level frame is read (the frames are kept and written back).', where: { field: 'file_frames' } });
  }

  // vertices: 2D, or 3D with one common z (a flat sheet lifted off the plane)
  const vc = obj.vertices_coords;
  if (!Array.isArray(vc)) {
    error(vc === undefined ? 'missing-field' : 'wrong-type', vc === undefined ? 'The FOLD file has no vertices_coords.' : 'vertices_coords is not a list of coordinates.', 'vertices_coords');
    return { messages };
  }
  const vertices: [number, number][] = [];
  let z: number | undefined;
  let zFrom = -1;
  let bad = 0;
  for (let v = 0; v < vc.length; v++) {
    const p: unknown = vc[v];
    if (!Array.isArray(p) || p.length < 2 || p.length > 3 || !p.every(isNum)) {
      if (bad++ < 10) error('wrong-type', `vertices_coords[${v}] is not [x, y] or [x, y, z] numbers.`, `vertices_coords[${v}]`);
      vertices.push([NaN, NaN]);
      continue;
    }
    vertices.push([p[0], p[1]]);
    if (p.length === 3) {
      if (z === undefined) {
        z = p[2];
        zFrom = v;
      } else if (p[2] !== z && Math.abs(p[2] - z) > 1e-9 * (Math.abs(z) + Math.hypot(p[0], p[1]) + 1)) {
        error(
          'fold-not-flat',
          `Vertex ${v} has z = ${p[2]} while vertex ${zFrom} has z = ${z}: this FOLD file holds a folded state, and Hingeplan needs the flat crease pattern.`,
          `vertices_coords[${v}]`,
        );
        return { messages };
      }
    }
  }
  if (bad > 10) error('wrong-type', `… and ${bad - 10} more malformed vertices.`, 'vertices_coords');

  const evRaw = obj.edges_vertices;
  if (!Array.isArray(evRaw)) {
    error(evRaw === undefined ? 'missing-field' : 'wrong-type', evRaw === undefined ? 'The FOLD file has no edges_vertices.' : 'edges_vertices is not a list of vertex pairs.', 'edges_vertices');
    return { messages };
  }
  const ne = evRaw.length;
  const edges: [number, number][] = [];
  bad = 0;
  for (let e = 0; e < ne; e++) {
    const pair: unknown = evRaw[e];
    if (!Array.isArray(pair) || pair.length !== 2 || !pair.every(isNum)) {
      if (bad++ < 10) error('wrong-type', `edges_vertices[${e}] is not a pair of vertex indices.`, `edges_vertices[${e}]`);
      edges.push([-1, -1]);
    } else edges.push([pair[0], pair[1]]);
  }
  if (bad > 10) error('wrong-type', `… and ${bad - 10} more malformed edges.`, 'edges_vertices');

  const perEdge = (key: string): unknown[] | undefined => {
    const a = obj[key];
    if (a === undefined) return undefined;
    if (!Array.isArray(a)) {
      error('wrong-type', `${key} is not a list.`, key);
      return undefined;
    }
    if (a.length !== ne) {
      error('wrong-length', `${key} has ${a.length} entries but there are ${ne} edges.`, key);
      return undefined;
    }
    return a;
  };

  // assignments: M V U F B; lowercase accepted; C (cut) read as B
  const asRaw = perEdge('edges_assignment');
  const assignments: Assignment[] = [];
  let cuts = 0;
  let lower = 0;
  let badA = 0;
  for (let e = 0; e < ne; e++) {
    const a: unknown = asRaw ? asRaw[e] : 'U';
    const up = typeof a === 'string' ? a.toUpperCase() : '';
    if (typeof a === 'string' && a !== up) lower++;
    if (up === 'C') {
      cuts++;
      assignments.push('B');
    } else if (up === 'M' || up === 'V' || up === 'U' || up === 'F' || up === 'B') assignments.push(up);
    else {
      if (badA++ < 10) {
        messages.push({
          severity: 'error',
          code: 'bad-assignment',
          text: `edges_assignment[${e}] is ${JSON.stringify(a) ?? 'missing'}; expected M, V, U, F, B (or C, read as B).`,
          where: { field: `edges_assignment[${e}]`, crease: e },
        });
      }
      assignments.push('U');
    }
  }
  if (badA > 10) error('bad-assignment', `… and ${badA - 10} more unknown assignments.`, 'edges_assignment');
  if (obj.edges_assignment === undefined) {
    warn('no-assignments', 'The FOLD file has no edges_assignment: every edge is read as unassigned (U) and the rim is found from the geometry.', 'edges_assignment');
  }
  if (lower > 0) messages.push({ severity: 'info', code: 'assignment-lowercase', text: `${lower} edge assignments are lowercase; they are read as uppercase.`, where: { field: 'edges_assignment' } });
  if (cuts > 0) warn('cut-read-as-boundary', `${cuts} edges are cuts (C); they are read as boundary (B) edges and will be written back as B.`, 'edges_assignment');

  const labelsRaw = perEdge(`${NS}edges_label`);
  const labels: (string | undefined)[] = [];
  for (let e = 0; e < ne; e++) {
    const l = labelsRaw ? labelsRaw[e] : undefined;
    if (l === null || l === undefined) labels.push(undefined);
    else if (typeof l === 'string') labels.push(l);
    else {
      error('bad-label', `${NS}edges_label[${e}] is not a string or null.`, `${NS}edges_label[${e}]`);
      labels.push(undefined);
    }
  }

  const limRaw = perEdge(`${NS}edges_limits`);
  const limits: (HingeLimit | undefined)[] = [];
  for (let e = 0; e < ne; e++) {
    const l = limRaw ? limRaw[e] : undefined;
    if (l === null || l === undefined) {
      limits.push(undefined);
      continue;
    }
    const o = l as Record<string, unknown>;
    const ok =
      typeof l === 'object' &&
      !Array.isArray(l) &&
      Object.keys(o).every((k) => k === 'min' || k === 'max') &&
      (o.min === undefined || isNum(o.min)) &&
      (o.max === undefined || isNum(o.max));
    if (!ok) {
      error('bad-limit', `${NS}edges_limits[${e}] is not null or {min, max} in degrees.`, `${NS}edges_limits[${e}]`);
      limits.push(undefined);
      continue;
    }
    const h: HingeLimit = {};
    if (isNum(o.min)) h.min = o.min * RAD;
    if (isNum(o.max)) h.max = o.max * RAD;
    limits.push(h);
  }

  let foldAngles: number[] | undefined;
  const faRaw = perEdge('edges_foldAngle');
  if (faRaw) {
    const badAt = faRaw.findIndex((x) => !isNum(x) || !Number.isFinite(x) || x < -180 || x > 180);
    if (badAt >= 0) {
      warn('bad-fold-angle', `edges_foldAngle[${badAt}] is ${JSON.stringify(faRaw[badAt])}, not a number of degrees in −180 … 180; the file's fold angles are ignored.`, `edges_foldAngle[${badAt}]`);
    } else foldAngles = (faRaw as number[]).map((d) => d * RAD);
  }

  let faces: number[][] | undefined;
  if (obj.faces_vertices !== undefined) {
    if (!Array.isArray(obj.faces_vertices) || !obj.faces_vertices.every((f) => Array.isArray(f) && f.every(isNum))) {
      error('wrong-type', 'faces_vertices is not a list of vertex-index lists.', 'faces_vertices');
    } else faces = (obj.faces_vertices as number[][]).map((f) => f.slice());
  }

  const drives: DriveSpec[] = [];
  const dRaw = obj[`${NS}drives`];
  if (dRaw !== undefined) {
    if (!Array.isArray(dRaw)) error('wrong-type', `${NS}drives is not a list.`, `${NS}drives`);
    else
      dRaw.forEach((d, k) => {
        const o = d as Record<string, unknown>;
        if (d === null || typeof d !== 'object' || typeof o.crease !== 'string' || !isNum(o.angle)) {
          error('drive-malformed', `${NS}drives[${k}] is not {crease: label, angle: degrees}.`, `${NS}drives[${k}]`);
        } else drives.push({ crease: o.crease, angleDeg: o.angle, field: `${NS}drives[${k}]` });
      });
  }

  const stringField = (key: string): string | undefined => {
    const s = obj[key];
    if (s === undefined) return undefined;
    if (typeof s !== 'string') {
      warn('wrong-type', `${key} is not text; it is ignored.`, key);
      return undefined;
    }
    return s;
  };
  const title = stringField('file_title');
  const frameTitle = typeof obj.frame_title === 'string' ? obj.frame_title : undefined;
  const stem = typeof fileName === 'string' ? fileName.replace(/^.*[\\/]/, '').replace(/\.[^.]*$/, '') : '';
  const name = title ?? frameTitle ?? (stem || 'untitled');
  const notes = stringField('file_description');
  const units = stringField('frame_unit') ?? stringField(`${NS}units`);

  let basePanel: number | undefined;
  const bp = obj[`${NS}basePanel`];
  if (bp !== undefined) {
    if (typeof bp === 'number' && Number.isInteger(bp) && bp >= 0) basePanel = bp;
    else warn('bad-base-panel', `${NS}basePanel is not a panel index; the default base panel is used.`, `${NS}basePanel`);
  }

  let loads: FileLoads | undefined;
  if (obj[`${NS}loads`] !== undefined) {
    const r = readLoads(obj[`${NS}loads`], `${NS}loads`);
    messages.push(...r.messages);
    loads = r.loads;
  }

  if (messages.some((m) => m.severity === 'error')) return { messages };

  const extra: Record<string, unknown> = {};
  for (const k of Object.keys(obj)) if (!CONSUMED.has(k)) extra[k] = obj[k];

  const source: PatternSource = { name, vertices, edges, assignments, labels, limits };
  if (faces) source.faces = faces;
  if (basePanel !== undefined) source.basePanel = basePanel;
  const fn = obj[`${NS}faces_name`];
  if (fn !== undefined) {
    if (Array.isArray(fn) && fn.every((x) => x === null || typeof x === 'string')) source.panelNames = fn.map((x) => (typeof x === 'string' && x ? x : undefined));
    else warn('bad-panel-names', `${NS}faces_name is not a list of names (or null) by panel; the panels are known by their index.`, `${NS}faces_name`);
  }
  const project: Project = { source, drives, fold: { extra } };
  if (z !== undefined) project.fold!.z = z;
  if (units !== undefined) project.units = units;
  if (notes !== undefined) project.notes = notes;
  if (foldAngles) project.foldAngles = foldAngles;
  if (loads) project.loads = loads;
  return { project, messages };
}

const j = (v: unknown) => JSON.stringify(v);
function arrayLines(items: unknown[]): string {
  if (items.length === 0) return '[]';
  return '[\n' + items.map((it) => '    ' + j(it)).join(',\n') + '\n  ]';
}

/** Write a project as FOLD 1.1, with the kept keys of the file it came from. */
export function writeFold(project: Project, opts: FoldWriteOptions = {}): string {
  const src = project.source;
  const extra = project.fold?.extra ?? {};
  const z = project.fold?.z;
  const entries: [string, string][] = [
    ['file_spec', j(FOLD_SPEC)],
    ['file_creator', j(FOLD_CREATOR)],
    ['file_title', j(src.name)],
  ];
  if (project.notes !== undefined) entries.push(['file_description', j(project.notes)]);
  // the file's own classes and attributes when it had them, else ours; always in this place
  entries.push(['file_classes', j(extra.file_classes ?? ['singleModel'])]);
  entries.push(['frame_classes', j(extra.frame_classes ?? ['creasePattern'])]);
  entries.push(['frame_attributes', j(extra.frame_attributes ?? (z === undefined ? ['2D'] : ['3D']))]);
  const unitIsFold = project.units !== undefined && FOLD_UNITS.includes(project.units);
  if (unitIsFold) entries.push(['frame_unit', j(project.units)]);
  entries.push(['vertices_coords', arrayLines(src.vertices.map(([x, y]) => (z === undefined ? [x, y] : [x, y, z])))]);
  entries.push(['edges_vertices', arrayLines(src.edges.map(([a, b]) => [a, b]))]);
  entries.push(['edges_assignment', j(src.assignments)]);
  const angles = opts.foldAngles ?? project.foldAngles;
  if (angles !== undefined && angles.length === src.edges.length) {
    entries.push(['edges_foldAngle', j(Array.from(angles, (r) => (Number.isFinite(r) ? toDegrees(r) : 0)))]);
    // a folded state is a result: it travels with the cautions
    if (opts.foldAngles !== undefined) entries.push([`${NS}cautions`, j(CAUTIONS)]);
  }
  if (src.faces !== undefined) entries.push(['faces_vertices', arrayLines(src.faces)]);
  if (src.labels.some((l) => l !== undefined)) entries.push([`${NS}edges_label`, j(src.edges.map((_, k) => src.labels[k] ?? null))]);
  if (src.limits.some((l) => l !== undefined)) {
    const lims = src.edges.map((_, k) => {
      const l = src.limits[k];
      if (!l) return null;
      const o: Record<string, number> = {};
      if (l.min !== undefined) o.min = toDegrees(l.min);
      if (l.max !== undefined) o.max = toDegrees(l.max);
      return o;
    });
    entries.push([`${NS}edges_limits`, j(lims)]);
  }
  if (project.drives.length > 0) entries.push([`${NS}drives`, arrayLines(project.drives.map((d) => ({ crease: d.crease, angle: d.angleDeg })))]);
  if (src.basePanel !== undefined) entries.push([`${NS}basePanel`, j(src.basePanel)]);
  if (src.panelNames?.some((n) => n)) entries.push([`${NS}faces_name`, j(Array.from(src.panelNames, (n) => n || null))]);
  if (project.units !== undefined && !unitIsFold) entries.push([`${NS}units`, j(project.units)]);
  if (project.loads !== undefined) entries.push([`${NS}loads`, j(loadsValue(project.loads))]);
  const written = new Set(entries.map(([k]) => k));
  for (const [k, v] of Object.entries(extra)) {
    if (!written.has(k) && v !== undefined) entries.push([k, j(v)]);
  }
  return '{\n' + entries.map(([k, v]) => `  ${j(k)}: ${v}`).join(',\n') + '\n}\n';
}
