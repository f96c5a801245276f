// Reading SVG (the writer is ./svg-write.ts). The XML syntax is read by @xmldom/xmldom (a DOM with line
// numbers, no entity expansion, every problem reported to us instead of logged); the drawing's geometry is
// ours: transforms, units, the y flip, styles (attributes, style="…" and simple <style> rules), groups.
//
// Read: line, polyline, polygon, rect, path (M L H V Z and their relative forms); g, a, svg, use and
// symbol; text in a group named for labels (crease labels). Curves (circle, ellipse, rounded rects, path
// commands C S Q T A) are refused with the element. Hidden elements and shapes that are only filled (no
// stroke) are not read (counted). Units: width/height with viewBox (mm, cm, in kept; px, pt, pc and plain
// numbers converted to mm at 96 px per inch, the CSS definition); no width/height: lengths as drawn, no unit.
// y is mirrored about the middle of the viewBox, so the drawing as seen on screen is the sheet seen from its
// top side and its coordinates stay in the viewBox's range.
import { DOMParser } from '@xmldom/xmldom';
import type { Message, Where } from '../types';
import { MAX_CREASES, MAX_TEXT_BYTES, utf8Length } from './limits';
import type { Drawing } from './drawing';
import { cssColour, type Colour } from './colour';

const SVG_NS = 'http://www.w3.org/2000/svg';
const XLINK_NS = 'http://www.w3.org/1999/xlink';
const MAX_USE_DEPTH = 16;
const MAX_LISTED = 10;

/** Lengths per unit in CSS pixels (CSS Values and Units 3: 1in = 96px = 2.54cm; 1pt = 1/72 in; 1pc = 12pt). */
const PX_PER: Record<string, number> = { px: 1, '': 1, in: 96, cm: 96 / 2.54, mm: 96 / 25.4, q: 96 / 101.6, pt: 96 / 72, pc: 16 };

type Affine = [number, number, number, number, number, number];
const IDENTITY: Affine = [1, 0, 0, 1, 0, 0];
const compose = (m: Affine, n: Affine): Affine => [
  m[0] * n[0] + m[2] * n[1], m[1] * n[0] + m[3] * n[1],
  m[0] * n[2] + m[2] * n[3], m[1] * n[2] + m[3] * n[3],
  m[0] * n[4] + m[2] * n[5] + m[4], m[1] * n[4] + m[3] * n[5] + m[5],
];
const apply = (m: Affine, x: number, y: number): [number, number] => [m[0] * x + m[2] * y + m[4], m[1] * x + m[3] * y + m[5]];

class SvgError extends Error {}

/** The parts of an xmldom element this reader uses. */
interface El {
  localName: string;
  namespaceURI: string | null;
  lineNumber?: number;
  childNodes: ArrayLike<{ nodeType: number }>;
  attributes: ArrayLike<{ name: string; localName: string; namespaceURI: string | null; value: string }>;
  getAttribute(name: string): string | null;
  getAttributeNS(ns: string, name: string): string | null;
  textContent: string | null;
  parentNode: unknown;
}

/** A transform list (SVG 1.1 §7.6): matrix, translate, scale, rotate, skewX, skewY. */
export function parseTransform(text: string): Affine | undefined {
  let m: Affine = IDENTITY;
  const re = /\s*(matrix|translate|scale|rotate|skewX|skewY)\s*\(([^)]*)\)\s*,?/gy;
  let pos = 0;
  const t = text.trim();
  while (pos < t.length) {
    re.lastIndex = pos;
    const g = re.exec(t);
    if (!g) return undefined;
    pos = re.lastIndex;
    const args = g[2].trim() === '' ? [] : g[2].trim().split(/\s*,\s*|\s+/).map(Number);
    if (args.some((a) => !Number.isFinite(a))) return undefined;
    const rad = (d: number) => (d * Math.PI) / 180;
    let n: Affine;
    switch (g[1]) {
      case 'matrix':
        if (args.length !== 6) return undefined;
        n = args as Affine;
        break;
      case 'translate':
        if (args.length < 1 || args.length > 2) return undefined;
        n = [1, 0, 0, 1, args[0], args[1] ?? 0];
        break;
      case 'scale':
        if (args.length < 1 || args.length > 2) return undefined;
        n = [args[0], 0, 0, args[1] ?? args[0], 0, 0];
        break;
      case 'rotate': {
        if (args.length !== 1 && args.length !== 3) return undefined;
        const c = Math.cos(rad(args[0])), s = Math.sin(rad(args[0]));
        const [cx, cy] = [args[1] ?? 0, args[2] ?? 0];
        n = compose(compose([1, 0, 0, 1, cx, cy], [c, s, -s, c, 0, 0]), [1, 0, 0, 1, -cx, -cy]);
        break;
      }
      case 'skewX':
        if (args.length !== 1) return undefined;
        n = [1, 0, Math.tan(rad(args[0])), 1, 0, 0];
        break;
      default:
        if (args.length !== 1) return undefined;
        n = [1, Math.tan(rad(args[0])), 0, 1, 0, 0];
    }
    m = compose(m, n);
  }
  return m;
}

/** Points of a path's straight commands, as subpaths; throws SvgError naming a curve or a syntax problem. */
export function pathSubpaths(d: string): [number, number][][] {
  const tokens = d.match(/[a-zA-Z]|[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?|\S/g) ?? [];
  const out: [number, number][][] = [];
  let cur: [number, number][] = [];
  let x = 0, y = 0, sx = 0, sy = 0;
  let cmd = '';
  let k = 0;
  let index = 0;
  const number = (): number => {
    const t = tokens[k];
    if (t === undefined || !/^[+-]?(\d|\.)/.test(t)) throw new SvgError(`expected a number after command ${cmd} (command ${index})`);
    k++;
    if (tokens[k] === ',') k++;
    return Number(t);
  };
  const isNumber = () => tokens[k] !== undefined && /^[+-]?(\d|\.)/.test(tokens[k]);
  while (k < tokens.length) {
    const t = tokens[k];
    if (/^[a-zA-Z]$/.test(t)) {
      cmd = t;
      k++;
      index++;
    } else if (t === ',') {
      k++;
      continue;
    } else if (!isNumber() || cmd === '' || /[zZ]/.test(cmd)) throw new SvgError(`unexpected ${JSON.stringify(t)} in the path data`);
    const rel = cmd === cmd.toLowerCase();
    switch (cmd.toUpperCase()) {
      case 'M': {
        const nx = number() + (rel ? x : 0), ny = number() + (rel ? y : 0);
        if (cur.length > 1) out.push(cur);
        cur = [[nx, ny]];
        [x, y, sx, sy] = [nx, ny, nx, ny];
        cmd = rel ? 'l' : 'L'; // further pairs are lines
        while (isNumber()) {
          x = number() + (rel ? x : 0);
          y = number() + (rel ? y : 0);
          cur.push([x, y]);
        }
        break;
      }
      case 'L':
        do {
          x = number() + (rel ? x : 0);
          y = number() + (rel ? y : 0);
          cur.push([x, y]);
        } while (isNumber());
        break;
      case 'H':
        do {
          x = number() + (rel ? x : 0);
          cur.push([x, y]);
        } while (isNumber());
        break;
      case 'V':
        do {
          y = number() + (rel ? y : 0);
          cur.push([x, y]);
        } while (isNumber());
        break;
      case 'Z':
        if (cur.length) {
          cur.push([sx, sy]);
          out.push(cur);
        }
        cur = [[sx, sy]];
        [x, y] = [sx, sy];
        break;
      case 'C': case 'S': case 'Q': case 'T': case 'A':
        throw new SvgError(`has a curve (command ${cmd}, the ${ordinal(index)} command of its path data); creases and the outline are straight: use only M, L, H, V and Z`);
      default:
        throw new SvgError(`has an unknown path command ${JSON.stringify(cmd)}`);
    }
  }
  if (cur.length > 1) out.push(cur);
  return out;
}

function ordinal(n: number): string {
  const s = n % 100 >= 11 && n % 100 <= 13 ? 'th' : ['th', 'st', 'nd', 'rd'][n % 10] ?? 'th';
  return `${n}${s}`;
}

/** Simple rules of <style> elements: selectors tag, .class, #id, tag.class (comma lists); anything else is skipped. */
interface Rule { tag?: string; cls?: string; id?: string; decls: Map<string, string>; specificity: number; order: number }

function parseDeclarations(text: string): Map<string, string> {
  const m = new Map<string, string>();
  for (const part of text.split(';')) {
    const i = part.indexOf(':');
    if (i < 0) continue;
    m.set(part.slice(0, i).trim().toLowerCase(), part.slice(i + 1).replace(/!important/i, '').trim());
  }
  return m;
}

function parseRules(css: string, rules: Rule[]): number {
  let skipped = 0;
  const body = css.replace(/\/\*[\s\S]*?\*\//g, '').replace(/@[^{;]*;/g, '');
  const re = /([^{}]+)\{([^}]*)\}/g;
  let g: RegExpExecArray | null;
  while ((g = re.exec(body))) {
    const decls = parseDeclarations(g[2]);
    for (const sel of g[1].split(',')) {
      const s = sel.trim();
      const m = /^([a-zA-Z][\w-]*)?(?:\.([\w-]+))?(?:#([\w-]+))?$/.exec(s);
      if (!m || s === '') {
        skipped++;
        continue;
      }
      const [, tag, cls, id] = m;
      rules.push({ tag, cls, id, decls, specificity: (id ? 100 : 0) + (cls ? 10 : 0) + (tag ? 1 : 0), order: rules.length });
    }
  }
  return skipped;
}

interface Inherited {
  stroke?: string; // as specified: a colour or 'none'
  fill?: string;
  visibility?: string;
}

/** Read an SVG text into the lines and texts it draws. Never throws. */
export function parseSvg(text: string, fileName?: string): Drawing {
  const messages: Message[] = [];
  const stem = typeof fileName === 'string' ? fileName.replace(/^.*[\\/]/, '').replace(/\.[^.]*$/, '') : '';
  const drawing: Drawing = { name: stem || 'untitled', lines: [], texts: [], messages };
  const error = (code: string, msg: string, where?: Where) => messages.push(where ? { severity: 'error', code, text: msg, where } : { severity: 'error', code, text: msg });
  if (typeof text !== 'string') {
    error('not-text', 'The SVG file is not text.');
    return drawing;
  }
  if (utf8Length(text, MAX_TEXT_BYTES) > MAX_TEXT_BYTES) {
    error('file-too-large', `The SVG file is larger than ${MAX_TEXT_BYTES / (1024 * 1024)} MiB, the most this program reads.`);
    return drawing;
  }

  let doc: { documentElement: El | null; getElementsByTagName(n: string): ArrayLike<El> };
  const xmlWarnings: string[] = [];
  try {
    doc = new DOMParser({
      onError: (level: string, msg: string) => {
        if (level !== 'fatalError') xmlWarnings.push(msg);
      },
    }).parseFromString(text, 'image/svg+xml') as unknown as typeof doc;
  } catch (e) {
    const loc = (e as { locator?: { lineNumber?: number; columnNumber?: number } }).locator;
    const line = loc?.lineNumber && loc.lineNumber > 0 ? loc.lineNumber : undefined;
    const msg = String((e as Error).message ?? e).split('\n')[0];
    error('not-xml', `The SVG file is not well-formed XML${line ? ` at line ${line}${loc?.columnNumber ? `, column ${loc.columnNumber}` : ''}` : ''}: ${msg}.`, line ? { line } : undefined);
    return drawing;
  }
  if (xmlWarnings.length) {
    messages.push({ severity: 'warning', code: 'xml-problem', text: `The XML has ${xmlWarnings.length} problem${xmlWarnings.length === 1 ? '' : 's'} the reader went past: ${xmlWarnings.slice(0, 3).join('; ')}${xmlWarnings.length > 3 ? '; …' : ''}.` });
  }
  const root = doc.documentElement;
  if (!root || root.localName !== 'svg') {
    error('not-svg', `The file is XML but not SVG (its root element is <${root?.localName ?? 'none'}>, not <svg>).`);
    return drawing;
  }

  // ids for <use>, styles from <style>
  const byId = new Map<string, El>();
  const rules: Rule[] = [];
  let skippedSelectors = 0;
  const all = doc.getElementsByTagName('*');
  for (let i = 0; i < all.length; i++) {
    const el = all[i];
    const id = el.getAttribute('id');
    if (id && !byId.has(id)) byId.set(id, el);
    if (el.localName === 'style') skippedSelectors += parseRules(el.textContent ?? '', rules);
  }
  if (skippedSelectors) messages.push({ severity: 'info', code: 'svg-css-skipped', text: `${skippedSelectors} CSS selector${skippedSelectors === 1 ? '' : 's'} of the <style> element${skippedSelectors === 1 ? ' is' : 's are'} more than a tag, class or id and ${skippedSelectors === 1 ? 'was' : 'were'} not applied.` });
  const titleEl = [...Array.from(root.childNodes)].find((c) => (c as unknown as El).localName === 'title') as El | undefined;
  const title = titleEl?.textContent?.trim();
  if (title) drawing.name = title;

  const describe = (el: El): Origin => {
    const id = el.getAttribute('id');
    const line = el.lineNumber;
    const where: Where = { field: id ? `#${id}` : `<${el.localName}>` };
    if (line) where.line = line;
    return { text: id ? `<${el.localName} id="${id}">${line ? ` (line ${line})` : ''}` : `the <${el.localName}> at line ${line ?? '?'}`, where };
  };
  const fail = (el: El, code: string, what: string) => {
    const o = describe(el);
    refusals.push({ severity: 'error', code, text: `${cap(o.text)} ${what}.`, where: o.where });
  };
  const refusals: Message[] = [];
  const notRead = new Map<string, { count: number; first: El }>();
  const skip = (why: string, el: El) => {
    const s = notRead.get(why);
    if (s) s.count++;
    else notRead.set(why, { count: 1, first: el });
  };

  // the viewport: user units → the pattern's units, and the mirror line
  const vb = parseViewBox(root.getAttribute('viewBox'));
  if (root.getAttribute('viewBox') !== null && !vb) {
    error('svg-bad-viewbox', `The root <svg> has a viewBox "${root.getAttribute('viewBox')}" that is not four numbers with a positive width and height.`, { field: 'viewBox', line: root.lineNumber });
    return drawing;
  }
  const width = parseSize(root.getAttribute('width'));
  const height = parseSize(root.getAttribute('height'));
  let unit: string | undefined;
  let sx = 1, sy = 1;
  const physical = (s: { value: number; unit: string } | undefined) => (s && s.unit !== '%' ? s : undefined);
  const w = physical(width), h = physical(height);
  if (w || h) {
    const keep = [w?.unit, h?.unit].find((u) => u === 'mm' || u === 'cm' || u === 'in');
    unit = keep ?? 'mm';
    const toUnit = (s: { value: number; unit: string }) => (s.value * PX_PER[s.unit]) / PX_PER[unit!];
    if (vb) {
      sx = w ? toUnit(w) / vb[2] : toUnit(h!) / vb[3];
      sy = h ? toUnit(h) / vb[3] : sx;
      if (!w) sx = sy;
      const par = (root.getAttribute('preserveAspectRatio') ?? '').trim();
      if (!/^none\b/.test(par) && Math.abs(sx - sy) > 1e-12 * Math.max(sx, sy)) {
        const s = /\bslice\b/.test(par) ? Math.max(sx, sy) : Math.min(sx, sy);
        sx = sy = s;
      }
    } else sx = sy = PX_PER.px / PX_PER[unit];
    if (!keep) messages.push({ severity: 'info', code: 'svg-units-px', text: `The drawing gives its size in ${w?.unit || h?.unit || 'plain numbers (px)'}; lengths are converted to mm at 96 px per inch (the CSS definition).`, where: { field: 'width' } });
  } else {
    messages.push({ severity: 'info', code: 'svg-units-missing', text: 'The drawing gives no width and height in a unit, so lengths are kept as drawn (user units), without a unit.', where: { field: 'width' } });
  }
  if (unit) drawing.units = unit;
  const viewH = vb ? vb[3] : h ? (h.value * PX_PER[h.unit]) : 0;
  const mirror = vb ? 2 * vb[1] + vb[3] : viewH;
  // pattern = scale · mirror(user)
  const rootMap: Affine = [sx, 0, 0, -sy, 0, sy * mirror];

  const viewport = { w: vb ? vb[2] : w ? w.value * PX_PER[w.unit] : 0, h: vb ? vb[3] : viewH };
  const length = (el: El, name: string, axis: 'x' | 'y' | 'd', fallback = 0): number => {
    const raw = el.getAttribute(name);
    if (raw === null || raw.trim() === '') return fallback;
    const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(px|mm|cm|in|pt|pc|q|%)?\s*$/i.exec(raw);
    if (!m) throw new SvgError(`has ${name}="${raw}", which is not a length`);
    const v = Number(m[1]);
    const u = (m[2] ?? '').toLowerCase();
    if (u === '%') {
      const ref = axis === 'x' ? viewport.w : axis === 'y' ? viewport.h : Math.hypot(viewport.w, viewport.h) / Math.SQRT2;
      return (v / 100) * ref;
    }
    return v * PX_PER[u];
  };
  const numbers = (s: string | null): number[] => (s ?? '').trim().split(/[\s,]+/).filter((t) => t !== '').map(Number);

  const cssFor = (el: El, prop: string): string | undefined => {
    const inline = el.getAttribute('style');
    if (inline) {
      const v = parseDeclarations(inline).get(prop);
      if (v !== undefined) return v;
    }
    if (rules.length) {
      const classes = (el.getAttribute('class') ?? '').split(/\s+/).filter(Boolean);
      const id = el.getAttribute('id');
      let best: Rule | undefined;
      for (const r of rules) {
        if (!r.decls.has(prop)) continue;
        if (r.tag && r.tag !== el.localName) continue;
        if (r.cls && !classes.includes(r.cls)) continue;
        if (r.id && r.id !== id) continue;
        if (!best || r.specificity > best.specificity || (r.specificity === best.specificity && r.order > best.order)) best = r;
      }
      if (best) return best.decls.get(prop);
    }
    const attr = el.getAttribute(prop);
    return attr === null ? undefined : attr.trim();
  };
  const styleOf = (el: El, parent: Inherited): Inherited => {
    const out: Inherited = { ...parent };
    for (const p of ['stroke', 'fill', 'visibility'] as const) {
      const v = cssFor(el, p);
      if (v !== undefined && v !== 'inherit') out[p] = v;
    }
    return out;
  };
  const groupName = (el: El): string | undefined => {
    for (const a of Array.from(el.attributes)) if (a.localName === 'label' && a.value.trim() !== '') return a.value.trim();
    const id = el.getAttribute('id');
    return id && id.trim() !== '' ? id.trim() : undefined;
  };

  let produced = 0;
  const addLine = (el: El, m: Affine, style: Inherited, names: string[], p: [number, number], q: [number, number]) => {
    if (++produced > MAX_CREASES) return;
    const colour: Colour | undefined = style.stroke ? (cssColour(style.stroke) ? { rgb: cssColour(style.stroke)! } : undefined) : undefined;
    const line = { a: apply(m, p[0], p[1]), b: apply(m, q[0], q[1]), names, origin: describe(el) } as Drawing['lines'][number];
    if (colour) line.colour = colour;
    drawing.lines.push(line);
  };
  const drawn = (style: Inherited): boolean => {
    if (style.stroke !== undefined) return style.stroke !== 'none' && style.stroke !== 'transparent';
    return style.fill === undefined || style.fill === 'none';
  };

  const walk = (el: El, ctm: Affine, parentStyle: Inherited, names: string[], useDepth: number, viaUse: boolean) => {
    if (el.namespaceURI !== SVG_NS && el.namespaceURI !== null) return; // another program's own elements
    const tag = el.localName;
    if (['defs', 'clipPath', 'mask', 'marker', 'pattern', 'linearGradient', 'radialGradient', 'filter', 'metadata', 'title', 'desc', 'style', 'script', 'foreignObject'].includes(tag)) return;
    if (tag === 'symbol' && !viaUse) return;
    const display = cssFor(el, 'display');
    if (display === 'none') {
      skip('hidden (display: none), with everything in them', el);
      return;
    }
    const style = styleOf(el, parentStyle);
    let m = ctm;
    const tr = el.getAttribute('transform');
    if (tr !== null && tr.trim() !== '') {
      const t = parseTransform(tr);
      if (!t) {
        fail(el, 'svg-bad-transform', `has a transform "${tr.slice(0, 60)}" that cannot be read`);
        return;
      }
      m = compose(m, t);
    }
    try {
      switch (tag) {
        case 'svg':
        case 'symbol':
        case 'g':
        case 'a':
        case 'switch': {
          if (el !== root && (tag === 'svg' || tag === 'symbol')) {
            const x = length(el, 'x', 'x'), y = length(el, 'y', 'y');
            m = compose(m, [1, 0, 0, 1, x, y]);
            const inner = parseViewBox(el.getAttribute('viewBox'));
            if (inner) {
              const ww = length(el, 'width', 'x', inner[2]), hh = length(el, 'height', 'y', inner[3]);
              const s = Math.min(ww / inner[2], hh / inner[3]);
              m = compose(m, [s, 0, 0, s, -inner[0] * s, -inner[1] * s]);
            }
          }
          const name = tag === 'g' || tag === 'svg' || tag === 'symbol' ? (el === root ? undefined : groupName(el)) : undefined;
          const inner = name ? [name, ...names] : names;
          for (const c of Array.from(el.childNodes)) if (c.nodeType === 1) walk(c as unknown as El, m, style, inner, useDepth, false);
          return;
        }
        case 'use': {
          const href = el.getAttributeNS(XLINK_NS, 'href') ?? el.getAttribute('href') ?? el.getAttribute('xlink:href');
          const target = href && href.startsWith('#') ? byId.get(href.slice(1)) : undefined;
          if (!target) {
            fail(el, 'svg-bad-use', `refers to ${href ? `"${href}", which is not an element of this file` : 'nothing (no href)'}`);
            return;
          }
          if (useDepth >= MAX_USE_DEPTH) {
            fail(el, 'svg-use-loop', `refers to elements that refer back to it (or nests <use> more than ${MAX_USE_DEPTH} deep)`);
            return;
          }
          m = compose(m, [1, 0, 0, 1, length(el, 'x', 'x'), length(el, 'y', 'y')]);
          walk(target, m, style, names, useDepth + 1, true);
          return;
        }
        case 'line':
        case 'polyline':
        case 'polygon':
        case 'rect':
        case 'path': {
          if (!drawn(style) || style.visibility === 'hidden' || style.visibility === 'collapse') {
            skip(style.visibility === 'hidden' || style.visibility === 'collapse' ? 'hidden (visibility)' : 'filled without a stroke (not lines)', el);
            return;
          }
          const full = compose(rootMap, m);
          const chains: [number, number][][] = [];
          if (tag === 'line') chains.push([[length(el, 'x1', 'x'), length(el, 'y1', 'y')], [length(el, 'x2', 'x'), length(el, 'y2', 'y')]]);
          else if (tag === 'polyline' || tag === 'polygon') {
            const v = numbers(el.getAttribute('points'));
            if (v.some((x) => !Number.isFinite(x))) throw new SvgError('has points that are not numbers');
            const pts: [number, number][] = [];
            for (let i = 0; i + 1 < v.length; i += 2) pts.push([v[i], v[i + 1]]);
            if (tag === 'polygon' && pts.length > 2) pts.push(pts[0]);
            chains.push(pts);
          } else if (tag === 'rect') {
            const rx = length(el, 'rx', 'x'), ry = length(el, 'ry', 'y');
            if (rx > 0 || ry > 0) throw new SvgError('has rounded corners (rx, ry), which are arcs; creases and the outline are straight');
            const x = length(el, 'x', 'x'), y = length(el, 'y', 'y'), ww = length(el, 'width', 'x'), hh = length(el, 'height', 'y');
            if (!(ww > 0 && hh > 0)) return;
            chains.push([[x, y], [x + ww, y], [x + ww, y + hh], [x, y + hh], [x, y]]);
          } else chains.push(...pathSubpaths(el.getAttribute('d') ?? ''));
          for (const c of chains) {
            for (let i = 0; i + 1 < c.length; i++) {
              if (c[i].some((x) => !Number.isFinite(x)) || c[i + 1].some((x) => !Number.isFinite(x))) throw new SvgError('has a coordinate that is not a finite number');
              addLine(el, full, style, names, c[i], c[i + 1]);
            }
          }
          return;
        }
        case 'circle':
        case 'ellipse':
          fail(el, 'svg-curve', `is a ${tag}, a curve; creases and the outline are straight`);
          return;
        case 'text': {
          const x = numbers(el.getAttribute('x'))[0] ?? 0;
          const y = numbers(el.getAttribute('y'))[0] ?? 0;
          const at = apply(compose(rootMap, m), x, y);
          drawing.texts.push({ at, text: el.textContent ?? '', names, origin: describe(el) });
          return;
        }
        case 'image':
          skip('images', el);
          return;
        default:
          skip(`<${tag}> elements (not lines)`, el);
      }
    } catch (e) {
      if (e instanceof SvgError) fail(el, tag === 'path' && /curve/.test(e.message) ? 'svg-curve' : 'svg-bad-element', e.message);
      else throw e;
    }
  };
  try {
    walk(root, IDENTITY, {}, [], 0, false);
  } catch (e) {
    error('internal-error', `The SVG could not be read because of a fault in this program (${String(e)}).`);
    return drawing;
  }
  if (produced > MAX_CREASES) error('too-many-lines', `The drawing has more than ${MAX_CREASES} straight pieces; at most ${MAX_CREASES} are read.`);
  messages.push(...refusals.slice(0, MAX_LISTED));
  if (refusals.length > MAX_LISTED) messages.push({ severity: 'error', code: refusals[MAX_LISTED].code, text: `… and ${refusals.length - MAX_LISTED} more elements that cannot be read.` });
  for (const [why, s] of notRead) {
    const o = describe(s.first);
    messages.push({ severity: 'info', code: 'svg-not-read', text: `${s.count} element${s.count === 1 ? '' : 's'} ${why} ${s.count === 1 ? 'was' : 'were'} not read (the first: ${o.text}).`, where: o.where });
  }
  return drawing;
}

type Origin = Drawing['lines'][number]['origin'];

function cap(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

function parseViewBox(s: string | null): [number, number, number, number] | undefined {
  if (s === null) return undefined;
  const v = s.trim().split(/[\s,]+/).map(Number);
  if (v.length !== 4 || v.some((x) => !Number.isFinite(x)) || !(v[2] > 0) || !(v[3] > 0)) return undefined;
  return v as [number, number, number, number];
}

function parseSize(s: string | null): { value: number; unit: string } | undefined {
  if (s === null) return undefined;
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(px|mm|cm|in|pt|pc|q|%)?\s*$/i.exec(s);
  if (!m || !(Number(m[1]) > 0)) return undefined;
  return { value: Number(m[1]), unit: (m[2] ?? '').toLowerCase() };
}
