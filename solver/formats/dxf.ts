// Reading DXF text (R12 and later; the writer is ./dxf-write.ts). A small group-code reader of our own: DXF
// text is pairs of lines (a group code, then its value), and reading it ourselves gives every entity its line
// number for messages, reports every entity it does not read instead of logging it, and never throws.
//
// Read: LINE; LWPOLYLINE and POLYLINE (straight segments; a bulge is an arc and is refused); INSERT of a
// block (scaled, rotated, mirrored, in arrays; nested); TEXT and MTEXT on a label layer (crease labels).
// ARC, CIRCLE, ELLIPSE and SPLINE are curves and are refused with their line. Units from $INSUNITS.
// Entities in paper space, invisible ones and those on layers that are off or frozen are not read (counted).
import type { Message, Where } from '../types';
import { MAX_CREASES, MAX_TEXT_BYTES, utf8Length } from './limits';
import type { Drawing, DrawnLine, DrawnText } from './drawing';
import { rgbHex, type Colour } from './colour';
import { apply, compose, IDENTITY, type Affine } from '../math/affine';

/** $INSUNITS codes (DXF reference, header variables; common practice) and the unit names we use. */
export const INSUNITS: Record<number, string> = {
  1: 'in', 2: 'ft', 3: 'mi', 4: 'mm', 5: 'cm', 6: 'm', 7: 'km', 8: 'uin', 9: 'mil', 10: 'yd', 11: 'angstrom',
  12: 'nm', 13: 'um', 14: 'dm', 15: 'dam', 16: 'hm', 17: 'Gm', 18: 'au', 19: 'ly', 20: 'pc',
};

/** Nested block insertions followed at most this deep (a block that inserts itself is refused). */
const MAX_BLOCK_DEPTH = 16;
const MAX_LISTED = 10;

interface Entity {
  type: string;
  /** line of the entity's "0 / TYPE" group code */
  line: number;
  codes: number[];
  values: string[];
  lines: number[];
}


interface Layer {
  colour?: Colour;
  hidden?: 'off' | 'frozen';
}

interface Block {
  name: string;
  /** an external reference: its entities are in another file */
  external: boolean;
  base: [number, number];
  entities: Entity[];
  line: number;
}

/** A DXF text as groups: parallel lists of group codes, values and the line of each code. */
interface Groups {
  codes: number[];
  values: string[];
  lines: number[];
}

/** What the sections hold: the header's variables and each other section's entities. */
interface Sections {
  header: Map<string, { value: string; line: number }>;
  byName: Map<string, Entity[]>;
  eof: boolean;
}

type Fail = { error: Message };
const fail = (code: string, msg: string, line?: number): Fail => ({
  error: line === undefined ? { severity: 'error', code, text: msg } : { severity: 'error', code, text: `Line ${line}: ${msg}`, where: { line } },
});

/** The text as groups: a code line and a value line each. */
function readGroups(text: string): Groups | Fail {
  const raw = text.split(/\r\n|\r|\n/);
  if (raw.length && raw[raw.length - 1] === '') raw.pop();
  const g: Groups = { codes: [], values: [], lines: [] };
  for (let i = 0; i + 1 < raw.length; i += 2) {
    const c = raw[i].trim();
    if (!/^-?\d+$/.test(c)) {
      return fail('dxf-syntax', `expected a group code (a whole number) but found ${JSON.stringify(raw[i].slice(0, 40))}; this is not DXF text, or the file is damaged here.`, i + 1);
    }
    g.codes.push(Number(c));
    g.values.push(raw[i + 1]);
    g.lines.push(i + 1);
  }
  if (raw.length % 2 === 1 && raw[raw.length - 1].trim() !== '') return fail('dxf-syntax', 'the file ends after a group code, without its value: it is cut short.', raw.length);
  if (g.codes.length === 0) return fail('dxf-empty', 'The DXF file is empty.');
  return g;
}

/** The groups from..to as entities: each starts at a group with code 0. */
function entitiesIn(g: Groups, from: number, to: number): Entity[] {
  const out: Entity[] = [];
  let k = from;
  while (k < to) {
    if (g.codes[k] !== 0) {
      k++;
      continue;
    }
    const e: Entity = { type: g.values[k].trim().toUpperCase(), line: g.lines[k], codes: [], values: [], lines: [] };
    k++;
    while (k < to && g.codes[k] !== 0) {
      e.codes.push(g.codes[k]);
      e.values.push(g.values[k]);
      e.lines.push(g.lines[k]);
      k++;
    }
    out.push(e);
  }
  return out;
}

/** SECTION … ENDSEC blocks up to EOF: HEADER as variables ($NAME → value), the others as entities. */
function readSections(g: Groups): Sections | Fail {
  const n = g.codes.length;
  const word = (k: number) => g.values[k].trim().toUpperCase();
  const out: Sections = { header: new Map(), byName: new Map(), eof: false };
  let k = 0;
  while (k < n) {
    if (g.codes[k] === 0 && word(k) === 'EOF') {
      out.eof = true;
      break;
    }
    if (g.codes[k] !== 0 || word(k) !== 'SECTION') {
      k++;
      continue;
    }
    if (k + 1 >= n || g.codes[k + 1] !== 2) return fail('dxf-syntax', 'a SECTION without its name (group code 2).', g.lines[k]);
    const name = word(k + 1);
    let end = k + 2;
    while (end < n && !(g.codes[end] === 0 && word(end) === 'ENDSEC')) end++;
    if (end >= n) return fail('dxf-syntax', `the ${name} section that starts here has no ENDSEC: the file is cut short or damaged.`, g.lines[k]);
    if (name === 'HEADER') {
      for (let h = k + 2; h < end; h++) {
        if (g.codes[h] === 9 && h + 1 < end) out.header.set(word(h), { value: g.values[h + 1].trim(), line: g.lines[h + 1] });
      }
    } else out.byName.set(name, entitiesIn(g, k + 2, end));
    k = end + 1;
  }
  return out;
}

/** The drawing's units from $INSUNITS, with a message when it says none or one this reader does not know. */
function unitsOf(header: Sections['header'], messages: Message[]): string | undefined {
  const ins = header.get('$INSUNITS');
  if (ins === undefined) {
    messages.push({ severity: 'info', code: 'dxf-units-missing', text: 'The drawing does not say its units ($INSUNITS); lengths are kept as drawn, without a unit.' });
    return undefined;
  }
  const code = Number(ins.value);
  if (INSUNITS[code]) return INSUNITS[code];
  if (code === 0) messages.push({ severity: 'info', code: 'dxf-units-unitless', text: 'The drawing says it has no units ($INSUNITS 0); lengths are kept as drawn, without a unit.', where: { line: ins.line } });
  else messages.push({ severity: 'warning', code: 'dxf-units-unknown', text: `Line ${ins.line}: $INSUNITS ${ins.value} is not a unit this reader knows; lengths are kept as drawn, without a unit.`, where: { line: ins.line } });
  return undefined;
}

/** Layers of the TABLES section: their colour, and whether they are off or frozen. */
function readLayers(tables: Entity[]): Map<string, Layer> {
  const layers = new Map<string, Layer>();
  for (const e of tables) {
    if (e.type !== 'LAYER') continue;
    const name = groupValue(e, 2);
    if (name === undefined) continue;
    const layer: Layer = {};
    const flags = Number(groupValue(e, 70) ?? 0);
    const aci = Number(groupValue(e, 62) ?? 7);
    if (flags & 1) layer.hidden = 'frozen';
    else if (aci < 0) layer.hidden = 'off';
    layer.colour = colourOf(Math.abs(aci), groupValue(e, 420));
    layers.set(name.trim().toLowerCase(), layer);
  }
  return layers;
}

/** Blocks of the BLOCKS section by lower-case name: base point and entities. */
function readBlocks(list: Entity[]): Map<string, Block> {
  const blocks = new Map<string, Block>();
  for (let b = 0; b < list.length; b++) {
    if (list[b].type !== 'BLOCK') continue;
    const head = list[b];
    const name = groupValue(head, 2) ?? groupValue(head, 3) ?? '';
    const block: Block = { name, external: (Number(groupValue(head, 70) ?? 0) & 4) !== 0, base: [num(head, 10) ?? 0, num(head, 20) ?? 0], entities: [], line: head.line };
    b++;
    while (b < list.length && list[b].type !== 'ENDBLK') block.entities.push(list[b++]);
    blocks.set(name.toLowerCase(), block);
  }
  return blocks;
}

/** Read a DXF text into the lines and texts it draws. Never throws. */
export function parseDxf(text: string, fileName?: string): Drawing {
  const messages: Message[] = [];
  const stem = typeof fileName === 'string' ? fileName.replace(/^.*[\\/]/, '').replace(/\.[^.]*$/, '') : '';
  const drawing: Drawing = { name: stem || 'untitled', lines: [], texts: [], messages };
  const refused = (f: Fail) => {
    messages.push(f.error);
    return drawing;
  };
  if (typeof text !== 'string') return refused(fail('not-text', 'The DXF file is not text.'));
  if (utf8Length(text, MAX_TEXT_BYTES) > MAX_TEXT_BYTES) return refused(fail('file-too-large', `The DXF file is larger than ${MAX_TEXT_BYTES / (1024 * 1024)} MiB, the most this program reads.`));
  if (text.startsWith('AutoCAD Binary DXF')) return refused(fail('dxf-binary', 'This is a binary DXF file; save the drawing as DXF text (ASCII) and open that.'));
  const groups = readGroups(text);
  if ('error' in groups) return refused(groups);
  const sections = readSections(groups);
  if ('error' in sections) return refused(sections);
  if (!sections.eof) messages.push({ severity: 'warning', code: 'dxf-no-eof', text: 'The DXF file has no EOF marker at its end: it may be cut short. What it holds is read.' });
  const entities = sections.byName.get('ENTITIES');
  if (!entities) return refused(fail('dxf-no-entities', 'The DXF file has no ENTITIES section, so it draws nothing.'));
  const units = unitsOf(sections.header, messages);
  if (units !== undefined) drawing.units = units;
  const reader = new EntityReader(drawing, readLayers(sections.byName.get('TABLES') ?? []), readBlocks(sections.byName.get('BLOCKS') ?? []));
  reader.read(entities, IDENTITY, undefined, 0, []);
  reader.finish();
  return drawing;
}

interface Point {
  x: number;
  y: number;
  bulge: number;
  line: number;
}

/** Where an entity is drawn: through a map (a block insertion's), with the inserting layer and colour. */
interface Placement {
  m: Affine;
  layer: string;
  colour?: Colour;
  ocs: Affine;
}

/** Turns entities into the drawing's lines and texts; refusals and skipped entities are collected, then reported. */
class EntityReader {
  private skipped = new Map<string, { count: number; line: number }>();
  private refusals: Message[] = [];
  private zRef: { z: number; line: number } | undefined;
  private notFlat = false;
  private produced = 0;

  constructor(
    private readonly drawing: Drawing,
    private readonly layers: Map<string, Layer>,
    private readonly blocks: Map<string, Block>,
  ) {}

  private skip(what: string, line: number): void {
    const s = this.skipped.get(what);
    if (s) s.count++;
    else this.skipped.set(what, { count: 1, line });
  }

  private refuse(code: string, msg: string, where: Where): void {
    this.refusals.push({ severity: 'error', code, text: msg, where });
  }

  private checkZ(z: number, line: number): void {
    if (this.notFlat) return;
    if (this.zRef === undefined) this.zRef = { z, line };
    else if (Math.abs(z - this.zRef.z) > 1e-9 * (1 + Math.abs(this.zRef.z))) {
      this.notFlat = true;
      this.refuse('dxf-not-flat', `Line ${line}: this entity lies at z = ${z}, while the one at line ${this.zRef.line} lies at z = ${this.zRef.z}: the drawing is not flat, and a crease pattern is drawn in one plane.`, { line });
    }
  }

  private emit(e: Entity, p: Placement, m: Affine, a: [number, number], b: [number, number]): void {
    if (++this.produced > MAX_CREASES) return;
    const line: DrawnLine = {
      a: apply(m, a[0], a[1]),
      b: apply(m, b[0], b[1]),
      names: [p.layer],
      origin: { text: `${e.type} at line ${e.line} on layer "${p.layer}"`, where: { line: e.line, field: `layer ${p.layer}` } },
    };
    if (p.colour) line.colour = p.colour;
    this.drawing.lines.push(line);
  }

  /** Read a list of entities drawn through map m (a block's), with the inserting entity's layer and colour. */
  read(list: Entity[], m: Affine, outer: { layer: string; colour?: Colour } | undefined, depth: number, inBlocks: string[]): void {
    for (let i = 0; i < list.length; i++) {
      const e = list[i];
      if (e.type === 'SEQEND' || e.type === 'ATTRIB' || e.type === 'VERTEX') continue;
      // a POLYLINE's vertices follow it as entities of their own, up to its SEQEND
      const next = e.type === 'POLYLINE' ? skipVertices(list, i) : i;
      const rawLayer = (groupValue(e, 8) ?? '0').trim();
      const layer = outer && rawLayer === '0' ? outer.layer : rawLayer;
      const info = this.layers.get(layer.toLowerCase());
      const why =
        Number(groupValue(e, 67) ?? 0) === 1 ? 'in paper space (layout sheets, title blocks)'
        : Number(groupValue(e, 60) ?? 0) === 1 ? 'invisible'
        : info?.hidden ? `on layer "${layer}", which is ${info.hidden}`
        : undefined;
      if (why) {
        this.skip(why, e.line);
        i = next;
        continue;
      }
      const aci = Number(groupValue(e, 62) ?? 256);
      const tc = groupValue(e, 420);
      const colour = tc !== undefined ? colourOf(aci, tc) : aci === 256 ? info?.colour : aci === 0 ? outer?.colour : colourOf(aci, undefined);
      // LINE, 3D polylines and MTEXT are in world coordinates; the other 2D entities in their own (OCS)
      const planar = e.type === 'LWPOLYLINE' || e.type === 'INSERT' || e.type === 'TEXT' || (e.type === 'POLYLINE' && !(Number(groupValue(e, 70) ?? 0) & 8));
      const ocs = planar ? ocsMap(e) : IDENTITY;
      if (ocs === 'tilted') {
        this.refuse('dxf-not-flat', `Line ${e.line}: this ${e.type} is drawn in a plane tilted against the drawing's plane (its extrusion direction is not ±z).`, { line: e.line });
        i = next;
        continue;
      }
      const p: Placement = { m, layer, ocs, ...(colour ? { colour } : {}) };
      switch (e.type) {
        case 'LINE':
          this.line(e, p);
          break;
        case 'LWPOLYLINE':
          this.lwpolyline(e, p);
          break;
        case 'POLYLINE':
          this.polylineWithVertices(e, list.slice(i + 1, next + 1), p);
          i = next;
          break;
        case 'ARC':
        case 'CIRCLE':
        case 'ELLIPSE':
        case 'SPLINE':
        case 'HELIX':
          this.refuse('dxf-curve', `Line ${e.line}: ${e.type === 'ARC' ? 'an ARC' : `a ${e.type}`} on layer "${layer}" is a curve; creases and the outline are straight. Replace it with lines (or a polyline without bulges).`, { line: e.line, field: `layer ${layer}` });
          break;
        case 'INSERT':
          this.insert(e, p, depth, inBlocks);
          break;
        case 'TEXT':
        case 'MTEXT':
          this.text(e, p);
          break;
        default:
          this.skip(`${e.type} entities (not lines)`, e.line);
      }
    }
  }

  private line(e: Entity, p: Placement): void {
    const c = [num(e, 10), num(e, 20), num(e, 11), num(e, 21)];
    if (c.some((v) => v === undefined || !Number.isFinite(v))) {
      this.refuse('dxf-bad-entity', `Line ${e.line}: this LINE lacks a finite start or end point (group codes 10, 20, 11, 21).`, { line: e.line });
      return;
    }
    this.checkZ(num(e, 30) ?? 0, e.line);
    this.checkZ(num(e, 31) ?? 0, e.line);
    this.emit(e, p, p.m, [c[0]!, c[1]!], [c[2]!, c[3]!]);
  }

  private lwpolyline(e: Entity, p: Placement): void {
    const pts: Point[] = [];
    for (let g = 0; g < e.codes.length; g++) {
      const c = e.codes[g];
      if (c === 10) pts.push({ x: Number(e.values[g]), y: NaN, bulge: 0, line: e.lines[g] });
      else if (c === 20 && pts.length) pts[pts.length - 1].y = Number(e.values[g]);
      else if (c === 42 && pts.length) {
        pts[pts.length - 1].bulge = Number(e.values[g]);
        pts[pts.length - 1].line = e.lines[g];
      }
    }
    this.checkZ(num(e, 38) ?? 0, e.line);
    this.segments(e, pts, (Number(groupValue(e, 70) ?? 0) & 1) === 1, p);
  }

  private polylineWithVertices(e: Entity, following: Entity[], p: Placement): void {
    const flags = Number(groupValue(e, 70) ?? 0);
    const pts: Point[] = [];
    for (const v of following) {
      if (v.type !== 'VERTEX') continue;
      if (Number(groupValue(v, 70) ?? 0) & 16) continue; // a spline frame's control point: not on the curve
      pts.push({ x: num(v, 10) ?? NaN, y: num(v, 20) ?? NaN, bulge: num(v, 42) ?? 0, line: v.line });
      this.checkZ(flags & 8 ? num(v, 30) ?? 0 : num(e, 30) ?? 0, v.line);
    }
    if (flags & (16 | 64)) {
      this.refuse('dxf-mesh', `Line ${e.line}: this POLYLINE is a ${flags & 64 ? 'polyface' : 'polygon'} mesh, a surface, not lines.`, { line: e.line });
      return;
    }
    if (flags & (2 | 4)) {
      this.refuse('dxf-curve', `Line ${e.line}: this POLYLINE is curve-fitted or spline-fitted; a crease is straight. Remove the fit (make it straight segments) and save again.`, { line: e.line });
      return;
    }
    this.segments(e, pts, (flags & 1) === 1, p);
  }

  /** A polyline's straight segments; a bulge (an arc) refuses the whole polyline. */
  private segments(e: Entity, pts: Point[], closed: boolean, p: Placement): void {
    const bad = pts.find((q) => !Number.isFinite(q.x) || !Number.isFinite(q.y) || !Number.isFinite(q.bulge));
    if (bad) {
      this.refuse('dxf-bad-entity', `Line ${bad.line}: a vertex of this ${e.type} (from line ${e.line}) lacks a finite x, y or bulge.`, { line: bad.line });
      return;
    }
    const count = closed ? pts.length : pts.length - 1;
    for (let s = 0; s < count; s++) {
      if (pts[s].bulge !== 0) {
        this.refuse('dxf-curve', `Line ${pts[s].line}: segment ${s + 1} of the ${e.type} at line ${e.line} on layer "${p.layer}" has a bulge (it is an arc); creases and the outline are straight.`, { line: pts[s].line, field: `layer ${p.layer}` });
        return;
      }
    }
    const m = compose(p.m, p.ocs);
    for (let s = 0; s < count; s++) {
      const a = pts[s], b = pts[(s + 1) % pts.length];
      this.emit(e, p, m, [a.x, a.y], [b.x, b.y]);
    }
  }

  private insert(e: Entity, p: Placement, depth: number, inBlocks: string[]): void {
    const name = groupValue(e, 2) ?? '';
    const block = this.blocks.get(name.toLowerCase());
    if (!block) {
      this.refuse('dxf-missing-block', `Line ${e.line}: this INSERT places the block "${name}", which the file does not define.`, { line: e.line });
      return;
    }
    if (block.external) {
      this.refuse('dxf-external-block', `Line ${e.line}: this INSERT places the block "${name}", an external reference: its lines are in another file. Bind or insert it into this drawing and save again.`, { line: e.line });
      return;
    }
    if (inBlocks.includes(name.toLowerCase()) || depth >= MAX_BLOCK_DEPTH) {
      this.refuse('dxf-block-loop', `Line ${e.line}: the block "${name}" is inserted inside itself${depth >= MAX_BLOCK_DEPTH ? ` or nested more than ${MAX_BLOCK_DEPTH} deep` : ''}.`, { line: e.line });
      return;
    }
    const sx = num(e, 41) ?? 1, sy = num(e, 42) ?? 1;
    const rot = ((num(e, 50) ?? 0) * Math.PI) / 180;
    const cols = Math.max(1, Math.floor(num(e, 70) ?? 1)), rows = Math.max(1, Math.floor(num(e, 71) ?? 1));
    const dc = num(e, 44) ?? 0, dr = num(e, 45) ?? 0;
    if (cols * rows * block.entities.length > MAX_CREASES) {
      this.refuse('too-many-lines', `Line ${e.line}: this INSERT places ${cols} × ${rows} copies of the block "${name}", more than this program reads.`, { line: e.line });
      return;
    }
    this.checkZ(num(e, 30) ?? 0, e.line);
    const c = Math.cos(rot), s = Math.sin(rot);
    for (let r = 0; r < rows; r++) {
      for (let q = 0; q < cols; q++) {
        // insertion point · rotation · array offset · scale · minus the block's base point
        let t: Affine = [1, 0, 0, 1, num(e, 10) ?? 0, num(e, 20) ?? 0];
        t = compose(t, [c, s, -s, c, 0, 0]);
        t = compose(t, [1, 0, 0, 1, q * dc, r * dr]);
        t = compose(t, [sx, 0, 0, sy, 0, 0]);
        t = compose(t, [1, 0, 0, 1, -block.base[0], -block.base[1]]);
        this.read(block.entities, compose(p.m, compose(p.ocs, t)), { layer: p.layer, colour: p.colour }, depth + 1, [...inBlocks, name.toLowerCase()]);
      }
    }
  }

  private text(e: Entity, p: Placement): void {
    const h = Number(groupValue(e, 72) ?? 0), v = Number(groupValue(e, 73) ?? 0);
    // a TEXT aligned other than left/baseline is placed by its second point (11, 21)
    const aligned = e.type === 'TEXT' && (h !== 0 || v !== 0) && num(e, 11) !== undefined;
    const x = aligned ? num(e, 11) : num(e, 10);
    const y = aligned ? num(e, 21) : num(e, 20);
    if (x === undefined || y === undefined || !Number.isFinite(x) || !Number.isFinite(y)) return;
    const body = e.type === 'TEXT' ? groupValue(e, 1) ?? '' : [...e.codes.map((c, g) => (c === 3 ? e.values[g] : '')), groupValue(e, 1) ?? ''].join('');
    const t: DrawnText = {
      at: apply(compose(p.m, p.ocs), x, y),
      text: e.type === 'TEXT' ? decodeText(body) : decodeText(plainMText(body)),
      names: [p.layer],
      origin: { text: `${e.type} at line ${e.line} on layer "${p.layer}"`, where: { line: e.line, field: `layer ${p.layer}` } },
    };
    this.drawing.texts.push(t);
  }

  /** The refusals and what was not read, as the drawing's messages. */
  finish(): void {
    const messages = this.drawing.messages;
    if (this.produced > MAX_CREASES) {
      messages.push({ severity: 'error', code: 'too-many-lines', text: `The drawing has more than ${MAX_CREASES} straight pieces; at most ${MAX_CREASES} are read.` });
    }
    messages.push(...this.refusals.slice(0, MAX_LISTED));
    if (this.refusals.length > MAX_LISTED) messages.push({ severity: 'error', code: this.refusals[MAX_LISTED].code, text: `… and ${this.refusals.length - MAX_LISTED} more entities that cannot be read.` });
    for (const [what, s] of this.skipped) {
      messages.push({ severity: what.startsWith('on layer') ? 'warning' : 'info', code: 'dxf-not-read', text: `${s.count} entit${s.count === 1 ? 'y' : 'ies'} ${what} ${s.count === 1 ? 'was' : 'were'} not read (the first at line ${s.line}).`, where: { line: s.line } });
    }
  }
}

function skipVertices(list: Entity[], i: number): number {
  let j = i + 1;
  while (j < list.length && list[j].type === 'VERTEX') j++;
  return j < list.length && list[j].type === 'SEQEND' ? j : j - 1;
}

function groupValue(e: Entity, code: number): string | undefined {
  const g = e.codes.indexOf(code);
  return g < 0 ? undefined : e.values[g].trim();
}

function num(e: Entity, code: number): number | undefined {
  const v = groupValue(e, code);
  return v === undefined ? undefined : Number(v);
}

/** The entity's own coordinate system for 2D entities: identity for +z, x mirrored for −z (the arbitrary-axis rule). */
function ocsMap(e: Entity): Affine | 'tilted' {
  const nx = num(e, 210) ?? 0, ny = num(e, 220) ?? 0, nz = num(e, 230) ?? 1;
  const len = Math.hypot(nx, ny, nz);
  if (!(len > 0)) return IDENTITY;
  if (Math.abs(nx / len) > 1e-9 || Math.abs(ny / len) > 1e-9) return 'tilted';
  return nz > 0 ? IDENTITY : [-1, 0, 0, 1, 0, 0];
}

function colourOf(aci: number, trueColour: string | undefined): Colour | undefined {
  const c: Colour = {};
  if (Number.isInteger(aci) && aci >= 1 && aci <= 255) c.index = aci;
  if (trueColour !== undefined) {
    const v = Number(trueColour);
    if (Number.isInteger(v) && v >= 0) c.rgb = rgbHex((v >> 16) & 255, (v >> 8) & 255, v & 255);
  }
  return c.index === undefined && c.rgb === undefined ? undefined : c;
}

/** DXF text codes: \U+XXXX characters and the %% codes for °, ±, ⌀ and %. */
function decodeText(s: string): string {
  return s
    .replace(/\\U\+([0-9a-fA-F]{4})/g, (_, h: string) => String.fromCharCode(parseInt(h, 16)))
    .replace(/%%([dDpPcC%])/g, (_, c: string) => ({ d: '°', p: '±', c: '⌀', '%': '%' })[c.toLowerCase()] ?? '');
}

/** MTEXT without its formatting codes ({\f…;text}, \P new paragraphs, and the like). */
function plainMText(s: string): string {
  return s
    .replace(/\\[PpNn]/g, ' ')
    .replace(/\\[ACcFfHhQqTtWw][^;\\{}]*;/g, '')
    .replace(/\\[LlOoKk]/g, '')
    .replace(/\\S([^;]*);/g, '$1')
    .replace(/\\([\\{}])/g, '$1')
    .replace(/[{}]/g, '');
}
