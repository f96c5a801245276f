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

/** An affine map x' = a x + c y + e, y' = b x + d y + f. */
type Affine = [number, number, number, number, number, number];
const IDENTITY: Affine = [1, 0, 0, 1, 0, 0];
const compose = (m: Affine, n: Affine): Affine => [
  m[0] * n[0] + m[2] * n[1], m[1] * n[0] + m[3] * n[1],
  m[0] * n[2] + m[2] * n[3], m[1] * n[2] + m[3] * n[3],
  m[0] * n[4] + m[2] * n[5] + m[4], m[1] * n[4] + m[3] * n[5] + m[5],
];
const apply = (m: Affine, x: number, y: number): [number, number] => [m[0] * x + m[2] * y + m[4], m[1] * x + m[3] * y + m[5]];

interface Layer {
  colour?: Colour;
  hidden?: 'off' | 'frozen';
}

interface Block {
  name: string;
  base: [number, number];
  entities: Entity[];
  line: number;
}

/** Read a DXF text into the lines and texts it draws. Never throws. */
export function parseDxf(text: string, fileName?: string): Drawing {
  const messages: Message[] = [];
  const stem = typeof fileName === 'string' ? fileName.replace(/^.*[\\/]/, '').replace(/\.[^.]*$/, '') : '';
  const drawing: Drawing = { name: stem || 'untitled', lines: [], texts: [], messages };
  const error = (code: string, msg: string, line?: number) => {
    messages.push(line === undefined ? { severity: 'error', code, text: msg } : { severity: 'error', code, text: `Line ${line}: ${msg}`, where: { line } });
  };
  if (typeof text !== 'string') {
    error('not-text', 'The DXF file is not text.');
    return drawing;
  }
  if (utf8Length(text, MAX_TEXT_BYTES) > MAX_TEXT_BYTES) {
    error('file-too-large', `The DXF file is larger than ${MAX_TEXT_BYTES / (1024 * 1024)} MiB, the most this program reads.`);
    return drawing;
  }
  if (text.startsWith('AutoCAD Binary DXF')) {
    error('dxf-binary', 'This is a binary DXF file; save the drawing as DXF text (ASCII) and open that.');
    return drawing;
  }

  // groups: a code line and a value line each
  const raw = text.split(/\r\n|\r|\n/);
  if (raw.length && raw[raw.length - 1] === '') raw.pop();
  const codes: number[] = [];
  const values: string[] = [];
  const lines: number[] = [];
  for (let i = 0; i + 1 < raw.length; i += 2) {
    const c = raw[i].trim();
    if (!/^-?\d+$/.test(c)) {
      error('dxf-syntax', `expected a group code (a whole number) but found ${JSON.stringify(raw[i].slice(0, 40))}; this is not DXF text, or the file is damaged here.`, i + 1);
      return drawing;
    }
    codes.push(Number(c));
    values.push(raw[i + 1]);
    lines.push(i + 1);
  }
  if (raw.length % 2 === 1) {
    const last = raw.length;
    if (raw[last - 1].trim() !== '') {
      error('dxf-syntax', 'the file ends after a group code, without its value: it is cut short.', last);
      return drawing;
    }
  }
  if (codes.length === 0) {
    error('dxf-empty', 'The DXF file is empty.');
    return drawing;
  }
  const n = codes.length;
  const str = (k: number) => values[k].trim();

  // split into entities: each starts at a group with code 0
  const entitiesIn = (from: number, to: number): Entity[] => {
    const out: Entity[] = [];
    let k = from;
    while (k < to) {
      if (codes[k] !== 0) {
        k++;
        continue;
      }
      const e: Entity = { type: str(k).toUpperCase(), line: lines[k], codes: [], values: [], lines: [] };
      k++;
      while (k < to && codes[k] !== 0) {
        e.codes.push(codes[k]);
        e.values.push(values[k]);
        e.lines.push(lines[k]);
        k++;
      }
      out.push(e);
    }
    return out;
  };

  // sections
  const sections = new Map<string, Entity[]>();
  const headerVars = new Map<string, { value: string; line: number }>();
  let sawEof = false;
  let k = 0;
  while (k < n) {
    if (codes[k] === 0 && str(k).toUpperCase() === 'EOF') {
      sawEof = true;
      break;
    }
    if (codes[k] === 0 && str(k).toUpperCase() === 'SECTION') {
      const startLine = lines[k];
      if (k + 1 >= n || codes[k + 1] !== 2) {
        error('dxf-syntax', 'a SECTION without its name (group code 2).', startLine);
        return drawing;
      }
      const name = str(k + 1).toUpperCase();
      let end = k + 2;
      while (end < n && !(codes[end] === 0 && str(end).toUpperCase() === 'ENDSEC')) end++;
      if (end >= n) {
        error('dxf-syntax', `the ${name} section that starts here has no ENDSEC: the file is cut short or damaged.`, startLine);
        return drawing;
      }
      if (name === 'HEADER') {
        for (let h = k + 2; h < end; h++) {
          if (codes[h] === 9 && h + 1 < end) headerVars.set(str(h).toUpperCase(), { value: str(h + 1), line: lines[h + 1] });
        }
      } else sections.set(name, entitiesIn(k + 2, end));
      k = end + 1;
      continue;
    }
    k++;
  }
  if (!sawEof) messages.push({ severity: 'warning', code: 'dxf-no-eof', text: 'The DXF file has no EOF marker at its end: it may be cut short. What it holds is read.' });
  if (!sections.has('ENTITIES')) {
    error('dxf-no-entities', 'The DXF file has no ENTITIES section, so it draws nothing.');
    return drawing;
  }

  // units
  const ins = headerVars.get('$INSUNITS');
  if (ins !== undefined) {
    const code = Number(ins.value);
    if (INSUNITS[code]) drawing.units = INSUNITS[code];
    else if (code === 0) messages.push({ severity: 'info', code: 'dxf-units-unitless', text: 'The drawing says it has no units ($INSUNITS 0); lengths are kept as drawn, without a unit.', where: { line: ins.line } });
    else messages.push({ severity: 'warning', code: 'dxf-units-unknown', text: `Line ${ins.line}: $INSUNITS ${ins.value} is not a unit this reader knows; lengths are kept as drawn, without a unit.`, where: { line: ins.line } });
  } else messages.push({ severity: 'info', code: 'dxf-units-missing', text: 'The drawing does not say its units ($INSUNITS); lengths are kept as drawn, without a unit.' });

  // layers: colour and whether they are shown
  const layers = new Map<string, Layer>();
  for (const e of sections.get('TABLES') ?? []) {
    if (e.type !== 'LAYER') continue;
    const name = groupValue(e, 2);
    if (name === undefined) continue;
    const layer: Layer = {};
    const flags = Number(groupValue(e, 70) ?? 0);
    const aci = Number(groupValue(e, 62) ?? 7);
    const tc = groupValue(e, 420);
    if (flags & 1) layer.hidden = 'frozen';
    else if (aci < 0) layer.hidden = 'off';
    layer.colour = colourOf(Math.abs(aci), tc);
    layers.set(name.trim().toLowerCase(), layer);
  }

  // blocks
  const blocks = new Map<string, Block>();
  {
    const list = sections.get('BLOCKS') ?? [];
    for (let b = 0; b < list.length; b++) {
      if (list[b].type !== 'BLOCK') continue;
      const head = list[b];
      const name = groupValue(head, 2) ?? groupValue(head, 3) ?? '';
      const block: Block = { name, base: [num(head, 10) ?? 0, num(head, 20) ?? 0], entities: [], line: head.line };
      b++;
      while (b < list.length && list[b].type !== 'ENDBLK') block.entities.push(list[b++]);
      blocks.set(name.toLowerCase(), block);
    }
  }

  // entities → lines and texts
  const skipped = new Map<string, { count: number; line: number }>();
  const skip = (what: string, line: number) => {
    const s = skipped.get(what);
    if (s) s.count++;
    else skipped.set(what, { count: 1, line });
  };
  const refusals: Message[] = [];
  const refuse = (code: string, msg: string, where: Where) => {
    refusals.push({ severity: 'error', code, text: msg, where });
  };
  let zRef: number | undefined;
  let zRefLine = 0;
  let notFlat = false;
  const checkZ = (z: number, line: number) => {
    if (notFlat) return;
    if (zRef === undefined) {
      zRef = z;
      zRefLine = line;
    } else if (Math.abs(z - zRef) > 1e-9 * (1 + Math.abs(zRef))) {
      notFlat = true;
      refuse('dxf-not-flat', `Line ${line}: this entity lies at z = ${z}, while the one at line ${zRefLine} lies at z = ${zRef}: the drawing is not flat, and a crease pattern is drawn in one plane.`, { line });
    }
  };
  let produced = 0;

  const emit = (
    e: Entity,
    m: Affine,
    layer: string,
    colour: Colour | undefined,
    a: [number, number],
    b: [number, number],
    what: string,
  ) => {
    if (++produced > MAX_CREASES) return;
    const line: DrawnLine = {
      a: apply(m, a[0], a[1]),
      b: apply(m, b[0], b[1]),
      names: [layer],
      origin: { text: `${what} at line ${e.line} on layer "${layer}"`, where: { line: e.line, field: `layer ${layer}` } },
    };
    if (colour) line.colour = colour;
    drawing.lines.push(line);
  };

  /** Read a list of entities drawn through map m (a block's), with the inserting entity's layer and colour. */
  const readEntities = (list: Entity[], m: Affine, outer: { layer: string; colour?: Colour } | undefined, depth: number, inBlocks: string[]) => {
    for (let i = 0; i < list.length; i++) {
      const e = list[i];
      if (e.type === 'SEQEND' || e.type === 'ATTRIB' || e.type === 'VERTEX') continue;
      const rawLayer = groupValue(e, 8) ?? '0';
      const layer = outer && rawLayer.trim() === '0' ? outer.layer : rawLayer.trim();
      const info = layers.get(layer.toLowerCase());
      if (Number(groupValue(e, 67) ?? 0) === 1) {
        skip('in paper space (layout sheets, title blocks)', e.line);
        if (e.type === 'POLYLINE') i = skipVertices(list, i);
        continue;
      }
      if (Number(groupValue(e, 60) ?? 0) === 1) {
        skip('invisible', e.line);
        if (e.type === 'POLYLINE') i = skipVertices(list, i);
        continue;
      }
      if (info?.hidden) {
        skip(`on layer "${layer}", which is ${info.hidden}`, e.line);
        if (e.type === 'POLYLINE') i = skipVertices(list, i);
        continue;
      }
      const aci = Number(groupValue(e, 62) ?? 256);
      const tc = groupValue(e, 420);
      const colour = tc !== undefined ? colourOf(aci, tc) : aci === 256 ? info?.colour : aci === 0 ? outer?.colour : colourOf(aci, undefined);
      // LINE, 3D polylines and MTEXT are in world coordinates; the other 2D entities in their own (OCS)
      const planar = e.type === 'LWPOLYLINE' || e.type === 'INSERT' || e.type === 'TEXT' || (e.type === 'POLYLINE' && !(Number(groupValue(e, 70) ?? 0) & 8));
      const ocs = planar ? ocsMap(e) : IDENTITY;
      if (ocs === 'tilted') {
        refuse('dxf-not-flat', `Line ${e.line}: this ${e.type} is drawn in a plane tilted against the drawing's plane (its extrusion direction is not ±z).`, { line: e.line });
        if (e.type === 'POLYLINE') i = skipVertices(list, i);
        continue;
      }
      switch (e.type) {
        case 'LINE': {
          const p = [num(e, 10), num(e, 20), num(e, 11), num(e, 21)];
          if (p.some((v) => v === undefined || !Number.isFinite(v))) {
            refuse('dxf-bad-entity', `Line ${e.line}: this LINE lacks a finite start or end point (group codes 10, 20, 11, 21).`, { line: e.line });
            break;
          }
          checkZ(num(e, 30) ?? 0, e.line);
          checkZ(num(e, 31) ?? 0, e.line);
          emit(e, m, layer, colour, [p[0]!, p[1]!], [p[2]!, p[3]!], 'LINE');
          break;
        }
        case 'LWPOLYLINE': {
          const pts: { x: number; y: number; bulge: number; line: number }[] = [];
          for (let g = 0; g < e.codes.length; g++) {
            const c = e.codes[g];
            if (c === 10) pts.push({ x: Number(e.values[g]), y: NaN, bulge: 0, line: e.lines[g] });
            else if (c === 20 && pts.length) pts[pts.length - 1].y = Number(e.values[g]);
            else if (c === 42 && pts.length) {
              pts[pts.length - 1].bulge = Number(e.values[g]);
              pts[pts.length - 1].line = e.lines[g];
            }
          }
          checkZ(num(e, 38) ?? 0, e.line);
          polyline(e, pts, (Number(groupValue(e, 70) ?? 0) & 1) === 1, compose(m, ocs), layer, colour, 'LWPOLYLINE');
          break;
        }
        case 'POLYLINE': {
          const flags = Number(groupValue(e, 70) ?? 0);
          const pts: { x: number; y: number; bulge: number; line: number }[] = [];
          let j = i + 1;
          for (; j < list.length && list[j].type === 'VERTEX'; j++) {
            const v = list[j];
            const vflags = Number(groupValue(v, 70) ?? 0);
            if (vflags & 16) continue; // a spline frame's control point: not on the curve
            pts.push({ x: num(v, 10) ?? NaN, y: num(v, 20) ?? NaN, bulge: num(v, 42) ?? 0, line: v.line });
            checkZ(flags & 8 ? num(v, 30) ?? 0 : num(e, 30) ?? 0, v.line);
          }
          if (j < list.length && list[j].type === 'SEQEND') i = j;
          else i = j - 1;
          if (flags & (16 | 64)) {
            refuse('dxf-mesh', `Line ${e.line}: this POLYLINE is a ${flags & 64 ? 'polyface' : 'polygon'} mesh, a surface, not lines.`, { line: e.line });
            break;
          }
          if (flags & (2 | 4)) {
            refuse('dxf-curve', `Line ${e.line}: this POLYLINE is curve-fitted or spline-fitted; a crease is straight. Remove the fit (make it straight segments) and save again.`, { line: e.line });
            break;
          }
          polyline(e, pts, (flags & 1) === 1, compose(m, ocs), layer, colour, 'POLYLINE');
          break;
        }
        case 'ARC':
        case 'CIRCLE':
        case 'ELLIPSE':
        case 'SPLINE':
        case 'HELIX':
          refuse('dxf-curve', `Line ${e.line}: ${e.type === 'ARC' ? 'an ARC' : `a ${e.type}`} on layer "${layer}" is a curve; creases and the outline are straight. Replace it with lines (or a polyline without bulges).`, { line: e.line, field: `layer ${layer}` });
          break;
        case 'INSERT': {
          const name = groupValue(e, 2) ?? '';
          const block = blocks.get(name.toLowerCase());
          if (!block) {
            refuse('dxf-missing-block', `Line ${e.line}: this INSERT places the block "${name}", which the file does not define.`, { line: e.line });
            break;
          }
          if (inBlocks.includes(name.toLowerCase()) || depth >= MAX_BLOCK_DEPTH) {
            refuse('dxf-block-loop', `Line ${e.line}: the block "${name}" is inserted inside itself${depth >= MAX_BLOCK_DEPTH ? ` or nested more than ${MAX_BLOCK_DEPTH} deep` : ''}.`, { line: e.line });
            break;
          }
          const sx = num(e, 41) ?? 1, sy = num(e, 42) ?? 1;
          const rot = ((num(e, 50) ?? 0) * Math.PI) / 180;
          const cols = Math.max(1, Math.floor(num(e, 70) ?? 1)), rows = Math.max(1, Math.floor(num(e, 71) ?? 1));
          const dc = num(e, 44) ?? 0, dr = num(e, 45) ?? 0;
          if (cols * rows * block.entities.length > MAX_CREASES) {
            refuse('too-many-lines', `Line ${e.line}: this INSERT places ${cols} × ${rows} copies of the block "${name}", more than this program reads.`, { line: e.line });
            break;
          }
          checkZ(num(e, 30) ?? 0, e.line);
          const c = Math.cos(rot), s = Math.sin(rot);
          for (let r = 0; r < rows; r++) {
            for (let q = 0; q < cols; q++) {
              // insertion point · rotation · array offset · scale · minus the block's base point
              let t: Affine = [1, 0, 0, 1, num(e, 10) ?? 0, num(e, 20) ?? 0];
              t = compose(t, [c, s, -s, c, 0, 0]);
              t = compose(t, [1, 0, 0, 1, q * dc, r * dr]);
              t = compose(t, [sx, 0, 0, sy, 0, 0]);
              t = compose(t, [1, 0, 0, 1, -block.base[0], -block.base[1]]);
              readEntities(block.entities, compose(m, compose(ocs, t)), { layer, colour }, depth + 1, [...inBlocks, name.toLowerCase()]);
            }
          }
          break;
        }
        case 'TEXT':
        case 'MTEXT': {
          const h = Number(groupValue(e, 72) ?? 0), v = Number(groupValue(e, 73) ?? 0);
          const aligned = e.type === 'TEXT' && (h !== 0 || v !== 0) && num(e, 11) !== undefined;
          const x = aligned ? num(e, 11) : num(e, 10);
          const y = aligned ? num(e, 21) : num(e, 20);
          if (x === undefined || y === undefined || !Number.isFinite(x) || !Number.isFinite(y)) break;
          const body = e.type === 'TEXT' ? groupValue(e, 1) ?? '' : [...e.codes.map((c, g) => (c === 3 ? e.values[g] : '')), groupValue(e, 1) ?? ''].join('');
          const t: DrawnText = {
            at: apply(compose(m, ocs), x, y),
            text: e.type === 'TEXT' ? decodeText(body) : decodeText(plainMText(body)),
            names: [layer],
            origin: { text: `${e.type} at line ${e.line} on layer "${layer}"`, where: { line: e.line, field: `layer ${layer}` } },
          };
          drawing.texts.push(t);
          break;
        }
        default:
          skip(`${e.type} entities (not lines)`, e.line);
      }
    }
  };

  const polyline = (
    e: Entity,
    pts: { x: number; y: number; bulge: number; line: number }[],
    closed: boolean,
    m: Affine,
    layer: string,
    colour: Colour | undefined,
    what: string,
  ) => {
    const bad = pts.find((p) => !Number.isFinite(p.x) || !Number.isFinite(p.y) || !Number.isFinite(p.bulge));
    if (bad) {
      refuse('dxf-bad-entity', `Line ${bad.line}: a vertex of this ${what} (from line ${e.line}) lacks a finite x, y or bulge.`, { line: bad.line });
      return;
    }
    const count = closed ? pts.length : pts.length - 1;
    for (let s = 0; s < count; s++) {
      if (pts[s].bulge !== 0) {
        refuse('dxf-curve', `Line ${pts[s].line}: segment ${s + 1} of the ${what} at line ${e.line} on layer "${layer}" has a bulge (it is an arc); creases and the outline are straight.`, { line: pts[s].line, field: `layer ${layer}` });
        return;
      }
    }
    for (let s = 0; s < count; s++) {
      const p = pts[s], q = pts[(s + 1) % pts.length];
      emit(e, m, layer, colour, [p.x, p.y], [q.x, q.y], what);
    }
  };

  readEntities(sections.get('ENTITIES')!, IDENTITY, undefined, 0, []);
  if (produced > MAX_CREASES) {
    messages.push({ severity: 'error', code: 'too-many-lines', text: `The drawing has more than ${MAX_CREASES} straight pieces; at most ${MAX_CREASES} are read.` });
  }
  const listed = refusals.slice(0, MAX_LISTED);
  messages.push(...listed);
  if (refusals.length > MAX_LISTED) messages.push({ severity: 'error', code: refusals[MAX_LISTED].code, text: `… and ${refusals.length - MAX_LISTED} more entities that cannot be read.` });
  for (const [what, s] of skipped) {
    messages.push({ severity: what.startsWith('on layer') ? 'warning' : 'info', code: 'dxf-not-read', text: `${s.count} entit${s.count === 1 ? 'y' : 'ies'} ${what} ${s.count === 1 ? 'was' : 'were'} not read (the first at line ${s.line}).`, where: { line: s.line } });
  }
  return drawing;
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
