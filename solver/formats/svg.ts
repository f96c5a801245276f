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
import { MAX_CREASES, MAX_NESTING, MAX_TEXT_BYTES, utf8Length } from './limits';
import type { Drawing } from './drawing';
import { cssColour } from './colour';
import { apply, compose, IDENTITY, type Affine } from '../math/affine';

const SVG_NS = 'http://www.w3.org/2000/svg';
const XLINK_NS = 'http://www.w3.org/1999/xlink';
const MAX_USE_DEPTH = 16;
const MAX_LISTED = 10;

/** Lengths per unit in CSS pixels (CSS Values and Units 3: 1in = 96px = 2.54cm; 1pt = 1/72 in; 1pc = 12pt). */
const PX_PER: Record<string, number> = { px: 1, '': 1, in: 96, cm: 96 / 2.54, mm: 96 / 25.4, q: 96 / 101.6, pt: 96 / 72, pc: 16 };

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

/** How user units of the root become the pattern's: scale, y mirrored, and the size of the viewport. */
interface Viewport {
  map: Affine;
  unit?: string;
  w: number;
  h: number;
}

type Fail = { error: Message };

/** The root's width/height and viewBox: the pattern's unit and the map from user units (y mirrored). */
function viewportOf(root: El, messages: Message[]): Viewport | Fail {
  const vb = parseViewBox(root.getAttribute('viewBox'));
  if (root.getAttribute('viewBox') !== null && !vb) {
    return { error: { severity: 'error', code: 'svg-bad-viewbox', text: `The root <svg> has a viewBox "${root.getAttribute('viewBox')}" that is not four numbers with a positive width and height.`, where: { field: 'viewBox', ...(root.lineNumber ? { line: root.lineNumber } : {}) } } };
  }
  const physical = (s: { value: number; unit: string } | undefined) => (s && s.unit !== '%' ? s : undefined);
  const w = physical(parseSize(root.getAttribute('width'))), h = physical(parseSize(root.getAttribute('height')));
  let unit: string | undefined;
  let sx = 1, sy = 1;
  if (w || h) {
    const keep = [w?.unit, h?.unit].find((u) => u === 'mm' || u === 'cm' || u === 'in');
    const out = keep ?? 'mm';
    unit = out;
    const toUnit = (s: { value: number; unit: string }) => (s.value * PX_PER[s.unit]) / PX_PER[out];
    if (vb) {
      sx = w ? toUnit(w) / vb[2] : toUnit(h!) / vb[3];
      sy = h ? toUnit(h) / vb[3] : sx;
      if (!w) sx = sy;
      const par = (root.getAttribute('preserveAspectRatio') ?? '').trim();
      if (!/^none\b/.test(par) && Math.abs(sx - sy) > 1e-12 * Math.max(sx, sy)) sx = sy = /\bslice\b/.test(par) ? Math.max(sx, sy) : Math.min(sx, sy);
    } else sx = sy = PX_PER.px / PX_PER[out];
    if (!keep) messages.push({ severity: 'info', code: 'svg-units-px', text: `The drawing gives its size in ${w?.unit || h?.unit || 'plain numbers (px)'}; lengths are converted to mm at 96 px per inch (the CSS definition).`, where: { field: 'width' } });
  } else {
    messages.push({ severity: 'info', code: 'svg-units-missing', text: 'The drawing gives no width and height in a unit, so lengths are kept as drawn (user units), without a unit.', where: { field: 'width' } });
  }
  const viewH = vb ? vb[3] : h ? h.value * PX_PER[h.unit] : 0;
  const mirror = vb ? 2 * vb[1] + vb[3] : viewH;
  // pattern = scale · mirror(user), about the middle of the viewBox
  const out: Viewport = { map: [sx, 0, 0, -sy, 0, sy * mirror], w: vb ? vb[2] : w ? w.value * PX_PER[w.unit] : 0, h: viewH };
  if (unit) out.unit = unit;
  return out;
}

/** Read an SVG text into the lines and texts it draws. Never throws. */
export function parseSvg(text: string, fileName?: string): Drawing {
  const messages: Message[] = [];
  const stem = typeof fileName === 'string' ? fileName.replace(/^.*[\\/]/, '').replace(/\.[^.]*$/, '') : '';
  const drawing: Drawing = { name: stem || 'untitled', lines: [], texts: [], messages };
  const error = (code: string, msg: string, where?: Where) => {
    messages.push(where ? { severity: 'error', code, text: msg, where } : { severity: 'error', code, text: msg });
    return drawing;
  };
  if (typeof text !== 'string') return error('not-text', 'The SVG file is not text.');
  if (utf8Length(text, MAX_TEXT_BYTES) > MAX_TEXT_BYTES) return error('file-too-large', `The SVG file is larger than ${MAX_TEXT_BYTES / (1024 * 1024)} MiB, the most this program reads.`);

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
    return error('not-xml', `The SVG file is not well-formed XML${line ? ` at line ${line}${loc?.columnNumber ? `, column ${loc.columnNumber}` : ''}` : ''}: ${msg}.`, line ? { line } : undefined);
  }
  if (xmlWarnings.length) {
    messages.push({ severity: 'warning', code: 'xml-problem', text: `The XML has ${xmlWarnings.length} problem${xmlWarnings.length === 1 ? '' : 's'} the reader went past: ${xmlWarnings.slice(0, 3).join('; ')}${xmlWarnings.length > 3 ? '; …' : ''}.` });
  }
  const root = doc.documentElement;
  if (!root || root.localName !== 'svg') return error('not-svg', `The file is XML but not SVG (its root element is <${root?.localName ?? 'none'}>, not <svg>).`);

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
  const titleEl = Array.from(root.childNodes).find((c) => (c as unknown as El).localName === 'title') as El | undefined;
  const title = titleEl?.textContent?.trim();
  if (title) drawing.name = title;

  const viewport = viewportOf(root, messages);
  if ('error' in viewport) {
    messages.push(viewport.error);
    return drawing;
  }
  if (viewport.unit) drawing.units = viewport.unit;
  const walker = new SvgWalker(drawing, root, byId, rules, viewport);
  try {
    walker.walk(root, IDENTITY, {}, [], 0, false);
  } catch (e) {
    return error('internal-error', `The SVG could not be read because of a fault in this program (${String(e)}).`);
  }
  walker.finish();
  return drawing;
}

/** Elements that draw nothing by themselves (their content is drawn only through <use>, if at all). */
const NOT_DRAWN = new Set(['defs', 'clipPath', 'mask', 'marker', 'pattern', 'linearGradient', 'radialGradient', 'filter', 'metadata', 'title', 'desc', 'style', 'script', 'foreignObject']);

/** Walks the element tree with the current transform, the inherited style and the names of the groups around. */
class SvgWalker {
  private refusals: Message[] = [];
  private notRead = new Map<string, { count: number; first: El }>();
  private produced = 0;
  /** groups open around the element being read; deeper than MAX_NESTING is refused, not followed */
  private depth = 0;

  constructor(
    private readonly drawing: Drawing,
    private readonly root: El,
    private readonly byId: Map<string, El>,
    private readonly rules: Rule[],
    private readonly viewport: Viewport,
  ) {}

  private describe(el: El): Origin {
    const id = el.getAttribute('id');
    const line = el.lineNumber;
    const where: Where = { field: id ? `#${id}` : `<${el.localName}>` };
    if (line) where.line = line;
    return { text: id ? `<${el.localName} id="${id}">${line ? ` (line ${line})` : ''}` : `the <${el.localName}> at line ${line ?? '?'}`, where };
  }

  private fail(el: El, code: string, what: string): void {
    const o = this.describe(el);
    this.refusals.push({ severity: 'error', code, text: `${cap(o.text)} ${what}.`, where: o.where });
  }

  private skip(why: string, el: El): void {
    const s = this.notRead.get(why);
    if (s) s.count++;
    else this.notRead.set(why, { count: 1, first: el });
  }

  /** A length attribute in user units (CSS units allowed; % of the viewport); throws SvgError when it is not one. */
  private length(el: El, name: string, axis: 'x' | 'y' | 'd', fallback = 0): number {
    const raw = el.getAttribute(name);
    if (raw === null || raw.trim() === '') return fallback;
    const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(px|mm|cm|in|pt|pc|q|%)?\s*$/i.exec(raw);
    if (!m) throw new SvgError(`has ${name}="${raw}", which is not a length`);
    const v = Number(m[1]);
    const u = (m[2] ?? '').toLowerCase();
    if (u !== '%') return v * PX_PER[u];
    const { w, h } = this.viewport;
    return (v / 100) * (axis === 'x' ? w : axis === 'y' ? h : Math.hypot(w, h) / Math.SQRT2);
  }

  /** A property as specified for the element: style="…", then the <style> rules, then the attribute. */
  private css(el: El, prop: string): string | undefined {
    const inline = el.getAttribute('style');
    if (inline) {
      const v = parseDeclarations(inline).get(prop);
      if (v !== undefined) return v;
    }
    if (this.rules.length) {
      const classes = (el.getAttribute('class') ?? '').split(/\s+/).filter(Boolean);
      const id = el.getAttribute('id');
      let best: Rule | undefined;
      for (const r of this.rules) {
        if (!r.decls.has(prop) || (r.tag && r.tag !== el.localName) || (r.cls && !classes.includes(r.cls)) || (r.id && r.id !== id)) continue;
        if (!best || r.specificity > best.specificity || (r.specificity === best.specificity && r.order > best.order)) best = r;
      }
      if (best) return best.decls.get(prop);
    }
    const attr = el.getAttribute(prop);
    return attr === null ? undefined : attr.trim();
  }

  private styleOf(el: El, parent: Inherited): Inherited {
    const out: Inherited = { ...parent };
    for (const p of ['stroke', 'fill', 'visibility'] as const) {
      const v = this.css(el, p);
      if (v !== undefined && v !== 'inherit') out[p] = v;
    }
    return out;
  }

  walk(el: El, ctm: Affine, parentStyle: Inherited, names: string[], useDepth: number, viaUse: boolean): void {
    if (el.namespaceURI !== SVG_NS && el.namespaceURI !== null) return; // another program's own elements
    const tag = el.localName;
    if (NOT_DRAWN.has(tag) || (tag === 'symbol' && !viaUse)) return;
    if (this.css(el, 'display') === 'none') {
      this.skip('hidden (display: none), with everything in them', el);
      return;
    }
    const style = this.styleOf(el, parentStyle);
    let m = ctm;
    const tr = el.getAttribute('transform');
    if (tr !== null && tr.trim() !== '') {
      const t = parseTransform(tr);
      if (!t) return this.fail(el, 'svg-bad-transform', `has a transform "${tr.slice(0, 60)}" that cannot be read`);
      m = compose(m, t);
    }
    try {
      switch (tag) {
        case 'svg':
        case 'symbol':
        case 'g':
        case 'a':
        case 'switch':
          return this.container(el, m, style, names, useDepth);
        case 'use':
          return this.use(el, m, style, names, useDepth);
        case 'line':
        case 'polyline':
        case 'polygon':
        case 'rect':
        case 'path':
          return this.shape(el, m, style, names);
        case 'circle':
        case 'ellipse':
          return this.fail(el, 'svg-curve', `is a ${tag}, a curve; creases and the outline are straight`);
        case 'text': {
          const x = numbers(el.getAttribute('x'))[0] ?? 0;
          const y = numbers(el.getAttribute('y'))[0] ?? 0;
          this.drawing.texts.push({ at: apply(compose(this.viewport.map, m), x, y), text: el.textContent ?? '', names, origin: this.describe(el) });
          return;
        }
        case 'image':
          return this.skip('images', el);
        default:
          return this.skip(`<${tag}> elements (not lines)`, el);
      }
    } catch (e) {
      if (e instanceof SvgError) this.fail(el, tag === 'path' && /curve/.test(e.message) ? 'svg-curve' : 'svg-bad-element', e.message);
      else throw e;
    }
  }

  /** g, a, switch, and svg or symbol (with their own position and viewBox): children with the group's name. */
  private container(el: El, m: Affine, style: Inherited, names: string[], useDepth: number): void {
    const tag = el.localName;
    if (el !== this.root && (tag === 'svg' || tag === 'symbol')) {
      m = compose(m, [1, 0, 0, 1, this.length(el, 'x', 'x'), this.length(el, 'y', 'y')]);
      const inner = parseViewBox(el.getAttribute('viewBox'));
      if (inner) {
        const s = Math.min(this.length(el, 'width', 'x', inner[2]) / inner[2], this.length(el, 'height', 'y', inner[3]) / inner[3]);
        m = compose(m, [s, 0, 0, s, -inner[0] * s, -inner[1] * s]);
      }
    }
    const own = (tag === 'g' || tag === 'svg' || tag === 'symbol') && el !== this.root ? groupNames(el) : [];
    const inner = own.length ? [...own, ...names] : names;
    if (this.depth >= MAX_NESTING) return this.fail(el, 'svg-too-deep', `is nested more than ${MAX_NESTING} groups deep; no drawing needs that`);
    this.depth++;
    try {
      for (const c of Array.from(el.childNodes)) if (c.nodeType === 1) this.walk(c as unknown as El, m, style, inner, useDepth, false);
    } finally {
      this.depth--;
    }
  }

  private use(el: El, m: Affine, style: Inherited, names: string[], useDepth: number): void {
    const href = el.getAttributeNS(XLINK_NS, 'href') ?? el.getAttribute('href') ?? el.getAttribute('xlink:href');
    const target = href && href.startsWith('#') ? this.byId.get(href.slice(1)) : undefined;
    if (!target) return this.fail(el, 'svg-bad-use', `refers to ${href ? `"${href}", which is not an element of this file` : 'nothing (no href)'}`);
    if (useDepth >= MAX_USE_DEPTH) return this.fail(el, 'svg-use-loop', `refers to elements that refer back to it (or nests <use> more than ${MAX_USE_DEPTH} deep)`);
    this.walk(target, compose(m, [1, 0, 0, 1, this.length(el, 'x', 'x'), this.length(el, 'y', 'y')]), style, names, useDepth + 1, true);
  }

  /** line, polyline, polygon, rect, path: their straight pieces, when the shape is drawn with a stroke. */
  private shape(el: El, m: Affine, style: Inherited, names: string[]): void {
    const hidden = style.visibility === 'hidden' || style.visibility === 'collapse';
    const stroked = style.stroke !== undefined ? style.stroke !== 'none' && style.stroke !== 'transparent' : style.fill === undefined || style.fill === 'none';
    if (hidden || !stroked) return this.skip(hidden ? 'hidden (visibility)' : 'filled without a stroke (not lines)', el);
    const tag = el.localName;
    const chains: [number, number][][] = [];
    if (tag === 'line') chains.push([[this.length(el, 'x1', 'x'), this.length(el, 'y1', 'y')], [this.length(el, 'x2', 'x'), this.length(el, 'y2', 'y')]]);
    else if (tag === 'polyline' || tag === 'polygon') {
      const v = numbers(el.getAttribute('points'));
      if (v.some((x) => !Number.isFinite(x))) throw new SvgError('has points that are not numbers');
      const pts: [number, number][] = [];
      for (let i = 0; i + 1 < v.length; i += 2) pts.push([v[i], v[i + 1]]);
      if (tag === 'polygon' && pts.length > 2) pts.push(pts[0]);
      chains.push(pts);
    } else if (tag === 'rect') {
      if (this.length(el, 'rx', 'x') > 0 || this.length(el, 'ry', 'y') > 0) throw new SvgError('has rounded corners (rx, ry), which are arcs; creases and the outline are straight');
      const x = this.length(el, 'x', 'x'), y = this.length(el, 'y', 'y'), w = this.length(el, 'width', 'x'), h = this.length(el, 'height', 'y');
      if (!(w > 0 && h > 0)) return;
      chains.push([[x, y], [x + w, y], [x + w, y + h], [x, y + h], [x, y]]);
    } else chains.push(...pathSubpaths(el.getAttribute('d') ?? ''));
    const full = compose(this.viewport.map, m);
    const rgb = style.stroke ? cssColour(style.stroke) : undefined;
    for (const c of chains) {
      for (let i = 0; i + 1 < c.length; i++) {
        if (c[i].some((x) => !Number.isFinite(x)) || c[i + 1].some((x) => !Number.isFinite(x))) throw new SvgError('has a coordinate that is not a finite number');
        if (++this.produced > MAX_CREASES) return;
        const line: Drawing['lines'][number] = { a: apply(full, c[i][0], c[i][1]), b: apply(full, c[i + 1][0], c[i + 1][1]), names, origin: this.describe(el) };
        if (rgb) line.colour = { rgb };
        this.drawing.lines.push(line);
      }
    }
  }

  /** The refusals and what was not read, as the drawing's messages. */
  finish(): void {
    const messages = this.drawing.messages;
    if (this.produced > MAX_CREASES) messages.push({ severity: 'error', code: 'too-many-lines', text: `The drawing has more than ${MAX_CREASES} straight pieces; at most ${MAX_CREASES} are read.` });
    messages.push(...this.refusals.slice(0, MAX_LISTED));
    if (this.refusals.length > MAX_LISTED) messages.push({ severity: 'error', code: this.refusals[MAX_LISTED].code, text: `… and ${this.refusals.length - MAX_LISTED} more elements that cannot be read.` });
    for (const [why, s] of this.notRead) {
      const o = this.describe(s.first);
      messages.push({ severity: 'info', code: 'svg-not-read', text: `${s.count} element${s.count === 1 ? '' : 's'} ${why} ${s.count === 1 ? 'was' : 'were'} not read (the first: ${o.text}).`, where: o.where });
    }
  }
}

/** A group's names, the one shown first: its label attribute in any namespace, its data-name, its id. */
function groupNames(el: El): string[] {
  const out: string[] = [];
  const add = (v: string | null | undefined) => {
    const t = v?.trim();
    if (t && !out.includes(t)) out.push(t);
  };
  for (const a of Array.from(el.attributes)) if (a.localName === 'label') add(a.value);
  add(el.getAttribute('data-name'));
  add(el.getAttribute('id'));
  return out;
}

const numbers = (s: string | null): number[] => (s ?? '').trim().split(/[\s,]+/).filter((t) => t !== '').map(Number);

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
