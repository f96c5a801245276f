// What the DXF and SVG readers share: the lines and texts a drawing holds, how a layer or group name
// becomes an assignment, the geometry cleaning, crease labels from texts, and messages of the pattern
// checks pointed back at the drawing (DXF line, SVG element) instead of at vertex and crease numbers.
import type { Assignment, Message, PatternSource, Where } from '../types';
import { cleanSegments, type CleanCounts, type DrawnSegment, type Origin } from '../model/clean';
import { colourMatches, colourText, parseColourOption, type Colour } from './colour';
import { MAX_CREASES } from './limits';
import type { Project } from './project';

export type { Origin } from '../model/clean';

/** How a person reads their drawing: names and colours to assignments, and the snap length. */
export interface DrawingOptions {
  /** layer (DXF) or group (SVG) name → assignment; names compare without regard to case */
  layers?: { name: string; assignment: Assignment }[];
  /** line colour → assignment (CSS colour text or a DXF colour number) */
  strokes?: { colour: string; assignment: Assignment }[];
  /** snap length in the pattern's units (after the drawing's units are applied) */
  snap?: number;
}

/** A straight line as a reader found it, in the pattern's frame (y up, the pattern's units). */
export interface DrawnLine {
  a: [number, number];
  b: [number, number];
  /** names that may say the assignment, innermost first: the DXF layer; the SVG groups around the element */
  names: string[];
  colour?: Colour;
  origin: Origin;
}

/** A text in the drawing: on a layer or in a group named for labels it names the crease it sits on. */
export interface DrawnText {
  at: [number, number];
  text: string;
  names: string[];
  origin: Origin;
}

export interface Drawing {
  name: string;
  units?: string;
  lines: DrawnLine[];
  texts: DrawnText[];
  messages: Message[];
}

/** A layer (DXF) or group (SVG) of the drawing as it was read: the assignment its lines got, and how. */
export interface DrawingLayer {
  name: string;
  assignment: Assignment;
  /** layer: by the person's mapping; name: from the words in the name; none: nothing said (read as U) */
  how: 'layer' | 'name' | 'none';
  lines: number;
}

/** A colour the drawing's lines are drawn in, as `--stroke` names it, and what a stroke mapping made of them. */
export interface DrawingColour {
  /** the colour as `--stroke` takes it: a DXF colour number, else '#rrggbb' */
  colour: string;
  /** the colour for people (its number and RGB where both are known) */
  text: string;
  lines: number;
  /** the assignment a stroke mapping gave these lines, if one did */
  assignment?: Assignment;
}

export interface DrawingLoad {
  project?: Project;
  messages: Message[];
  /** the colours the lines are drawn in */
  colours?: DrawingColour[];
  /** the named layers or groups that gave lines their assignment (lines assigned by colour apart) */
  layers?: DrawingLayer[];
  /** what the cleaning did, step by step */
  cleaning?: CleanCounts & { snap: number };
  /** point a message of the pattern checks (vertex, crease) at the drawing */
  locate?: (m: Message) => Message;
}

const KEYWORDS: [RegExp, Assignment][] = [
  [/mountain/i, 'M'],
  [/valley/i, 'V'],
  [/flat/i, 'F'],
  [/boundary|border|outline|cut|\brim\b/i, 'B'],
  [/unassigned/i, 'U'],
];

/** The assignment a layer or group name says (mountain, valley, flat, boundary/border/outline/cut, unassigned), if exactly one. */
export function assignmentFromName(name: string): Assignment | 'ambiguous' | undefined {
  const found = new Set<Assignment>();
  for (const [re, a] of KEYWORDS) if (re.test(name)) found.add(a);
  if (found.size > 1) return 'ambiguous';
  return found.size ? [...found][0] : undefined;
}

/** Is this a layer or group of crease labels? */
export const isLabelName = (name: string) => /label/i.test(name);

const fmt = (x: number) => String(+x.toPrecision(6));

/** Check the person's options; problems are messages naming the option. */
function checkOptions(opts: DrawingOptions): { strokes: { colour: Colour; assignment: Assignment; text: string }[]; layers: Map<string, Assignment>; messages: Message[] } {
  const messages: Message[] = [];
  const strokes: { colour: Colour; assignment: Assignment; text: string }[] = [];
  for (const s of opts.strokes ?? []) {
    const c = parseColourOption(s.colour);
    if (!c) messages.push({ severity: 'error', code: 'bad-colour', text: `--stroke: "${s.colour}" is not a colour (a CSS colour such as red, #c00 or rgb(200, 0, 0), or a DXF colour number 1 … 255).`, where: { field: '--stroke' } });
    else strokes.push({ colour: c, assignment: s.assignment, text: s.colour });
  }
  const layers = new Map<string, Assignment>();
  for (const l of opts.layers ?? []) layers.set(l.name.trim().toLowerCase(), l.assignment);
  if (opts.snap !== undefined && !(Number.isFinite(opts.snap) && opts.snap >= 0)) {
    messages.push({ severity: 'error', code: 'bad-snap', text: `The snap length ${String(opts.snap)} is not a length ≥ 0.`, where: { field: '--snap' } });
  }
  return { strokes, layers, messages };
}

/**
 * A drawing (what a DXF or SVG reader found) as a project: assignments from names and colours, the
 * geometry cleaned, labels from texts, and a function that points the pattern checks' messages at the
 * drawing. Never throws.
 */
export function drawingToProject(drawing: Drawing, opts: DrawingOptions = {}): DrawingLoad {
  const messages: Message[] = [...drawing.messages];
  if (messages.some((m) => m.severity === 'error')) return { messages };
  const checked = checkOptions(opts);
  messages.push(...checked.messages);
  if (checked.messages.length) return { messages };
  if (drawing.lines.length > MAX_CREASES) {
    messages.push({ severity: 'error', code: 'too-many-lines', text: `The drawing has ${drawing.lines.length} straight pieces; at most ${MAX_CREASES} are read.` });
    return { messages };
  }

  const { segments, origins, layers, colours } = assignLines(drawing, checked, messages);

  const cleaned = cleanSegments(segments, origins, opts.snap);
  messages.push(...cleaned.messages);
  if (cleaned.messages.some((m) => m.severity === 'error')) return { messages, layers, colours, cleaning: { ...cleaned.counts, snap: cleaned.snap } };

  const edgeOrigin = (e: number) => origins[segments[cleaned.sources[e][0]].origin];
  const labels = labelsFromTexts(drawing.texts, cleaned.vertices, cleaned.edges, cleaned.snap, messages);
  const source: PatternSource = {
    name: drawing.name,
    vertices: cleaned.vertices,
    edges: cleaned.edges,
    assignments: cleaned.assignments,
    labels,
    limits: cleaned.edges.map(() => undefined),
  };
  const project: Project = { source, drives: [] };
  if (drawing.units !== undefined) project.units = drawing.units;

  const locate = locator(cleaned.vertices, cleaned.edges, edgeOrigin);
  return { project, messages, layers, colours, cleaning: { ...cleaned.counts, snap: cleaned.snap }, locate };
}

type Checked = ReturnType<typeof checkOptions>;

/**
 * Each line's assignment: a --layer name, then a --stroke colour, then the names' own words, else U (a
 * warning per layer). Messages summarise which layer or colour gave what, and options that matched nothing.
 */
function assignLines(drawing: Drawing, checked: Checked, messages: Message[]): { segments: DrawnSegment[]; origins: Origin[]; layers: DrawingLayer[]; colours: DrawingColour[] } {
  const colours = new Map<string, DrawingColour>();
  /** how each group of lines got its assignment, for the summary: one entry per (layer, rule) */
  const groups = new Map<string, { layer: string; how: 'layer' | 'stroke' | 'name' | 'none'; stroke?: string; assignment: Assignment; count: number; first: Origin }>();
  const strokeUsed = new Set<string>();
  const segments: DrawnSegment[] = [];
  const origins: Origin[] = [];
  for (const line of drawing.lines) {
    let assignment: Assignment | undefined;
    let how: 'layer' | 'stroke' | 'name' | 'none' = 'none';
    let stroke: string | undefined;
    let layer = line.names[0] ?? '';
    for (const n of line.names) {
      const a = checked.layers.get(n.trim().toLowerCase());
      if (a) {
        [assignment, layer, how] = [a, n, 'layer'];
        break;
      }
    }
    if (!assignment) {
      const s = checked.strokes.find((st) => colourMatches(line.colour, st.colour));
      if (s) {
        [assignment, how, stroke] = [s.assignment, 'stroke', s.text];
        strokeUsed.add(s.text);
      }
    }
    if (!assignment) {
      for (const n of line.names) {
        const a = assignmentFromName(n);
        if (a && a !== 'ambiguous') {
          [assignment, layer, how] = [a, n, 'name'];
          break;
        }
      }
    }
    assignment ??= 'U';
    if (line.colour && (line.colour.index !== undefined || line.colour.rgb)) {
      const option = line.colour.index !== undefined ? String(line.colour.index) : line.colour.rgb!;
      const entry = colours.get(option) ?? { colour: option, text: colourText(line.colour), lines: 0 };
      entry.lines++;
      if (how === 'stroke') entry.assignment = assignment;
      colours.set(option, entry);
    }
    const key = how === 'stroke' ? `stroke\u0000${stroke}` : `${how}\u0000${layer}`;
    const g = groups.get(key);
    if (g) g.count++;
    else groups.set(key, { layer, how, stroke, assignment, count: 1, first: line.origin });
    origins.push(line.origin);
    segments.push({ a: line.a, b: line.b, assignment, origin: origins.length - 1 });
  }
  const summary: string[] = [];
  for (const g of groups.values()) {
    const layerText = g.layer === '' ? 'no named layer or group' : `layer "${g.layer}"`;
    if (g.how === 'none') {
      const amb = assignmentFromName(g.layer) === 'ambiguous';
      messages.push({
        severity: 'warning',
        code: 'layer-unassigned',
        text: `${g.count} line${g.count === 1 ? ' is' : 's are'} on ${layerText}, read as unassigned (U): the name ${amb ? 'names more than one assignment' : 'says no mountain, valley, flat or boundary'}. Say which with --layer "${g.layer}=M" (or V, F, B, U) on the command line, or in the app's Layers dialog.`,
        where: g.first.where,
      });
    }
    const who = g.how === 'stroke' ? `colour ${g.stroke}` : `"${g.layer}"`;
    summary.push(`${who} → ${g.assignment} (${g.count}${g.how === 'layer' ? ', by --layer' : g.how === 'stroke' ? ', by --stroke' : ''})`);
  }
  for (const s of checked.strokes) {
    if (!strokeUsed.has(s.text)) messages.push({ severity: 'warning', code: 'stroke-unused', text: `--stroke ${s.text}: no line of the drawing has that colour.`, where: { field: '--stroke' } });
  }
  for (const [name] of checked.layers) {
    if (!drawing.lines.some((l) => l.names.some((n) => n.trim().toLowerCase() === name))) {
      messages.push({ severity: 'warning', code: 'layer-unused', text: `--layer ${name}: the drawing has no lines on a layer or group of that name.`, where: { field: '--layer' } });
    }
  }
  messages.push({ severity: 'info', code: 'drawing-read', text: `Read ${drawing.lines.length} straight piece${drawing.lines.length === 1 ? '' : 's'}: ${summary.join(', ')}.` });
  const layers: DrawingLayer[] = [];
  for (const g of groups.values()) if (g.how !== 'stroke') layers.push({ name: g.layer, assignment: g.assignment, how: g.how, lines: g.count });
  return { segments, origins, layers, colours: [...colours.values()] };
}

/** Point a message of the pattern checks (a crease, or a vertex) at where the drawing drew it. */
function locator(vertices: [number, number][], edges: [number, number][], edgeOrigin: (e: number) => Origin): (m: Message) => Message {
  const incident: number[] = new Array(vertices.length).fill(-1);
  edges.forEach(([a, b], e) => {
    if (incident[a] < 0) incident[a] = e;
    if (incident[b] < 0) incident[b] = e;
  });
  return (m: Message): Message => {
    const w = m.where;
    if (!w) return m;
    if (w.crease !== undefined && w.crease >= 0 && w.crease < edges.length) {
      const o = edgeOrigin(w.crease);
      return { ...m, text: `${m.text} (Drawn as ${o.text}.)`, where: { ...w, ...o.where } as Where };
    }
    if (w.vertex !== undefined && w.vertex >= 0 && w.vertex < vertices.length && incident[w.vertex] >= 0) {
      const o = edgeOrigin(incident[w.vertex]);
      const [x, y] = vertices[w.vertex];
      return { ...m, text: `${m.text} (Vertex ${w.vertex} is at (${fmt(x)}, ${fmt(y)}) in the pattern, an end of ${o.text}.)`, where: { ...w, ...o.where } as Where };
    }
    return m;
  };
}

/**
 * Crease labels from texts on label layers or groups: a text names the edge whose midpoint is nearest,
 * when it lies within a quarter of that edge's length (our writers put it on the midpoint).
 */
function labelsFromTexts(texts: DrawnText[], vertices: [number, number][], edges: [number, number][], snap: number, messages: Message[]): (string | undefined)[] {
  const labels: (string | undefined)[] = edges.map(() => undefined);
  const wanted = texts.filter((t) => t.names.some(isLabelName));
  const ignored = texts.length - wanted.length;
  if (ignored > 0) messages.push({ severity: 'info', code: 'texts-ignored', text: `${ignored} text${ignored === 1 ? ' is' : 's are'} not on a layer or in a group named for labels and ${ignored === 1 ? 'was' : 'were'} not read.` });
  if (!wanted.length) return labels;
  const mids = edges.map(([a, b]) => [(vertices[a][0] + vertices[b][0]) / 2, (vertices[a][1] + vertices[b][1]) / 2, Math.hypot(vertices[a][0] - vertices[b][0], vertices[a][1] - vertices[b][1])]);
  // a coarse grid of midpoints, so matching stays fast on large sheets
  let maxLen = 0;
  for (const m of mids) maxLen = Math.max(maxLen, m[2]);
  const cell = Math.max(maxLen / 2, snap, 1e-300);
  const grid = new Map<string, number[]>();
  mids.forEach((m, e) => {
    const k = `${Math.floor(m[0] / cell)},${Math.floor(m[1] / cell)}`;
    const l = grid.get(k);
    if (l) l.push(e);
    else grid.set(k, [e]);
  });
  const used = new Map<string, number>();
  let unmatched = 0;
  let matched = 0;
  const problem = (code: string, text: string, where: Where) => {
    if (unmatched++ < 10) messages.push({ severity: 'warning', code, text, where });
  };
  for (const t of wanted) {
    const label = t.text.trim();
    if (label === '') continue;
    const gx = Math.floor(t.at[0] / cell);
    const gy = Math.floor(t.at[1] / cell);
    let best = -1;
    let bestD = Infinity;
    for (let dx = -1; dx <= 1; dx++) {
      for (let dy = -1; dy <= 1; dy++) {
        for (const e of grid.get(`${gx + dx},${gy + dy}`) ?? []) {
          const d = Math.hypot(mids[e][0] - t.at[0], mids[e][1] - t.at[1]);
          if (d < bestD) {
            bestD = d;
            best = e;
          }
        }
      }
    }
    if (best < 0 || bestD > Math.max(0.25 * mids[best][2], snap)) {
      problem('label-unmatched', `The label "${label}" (${t.origin.text}) is not at the middle of any line, so it names no crease; it is not read.`, t.origin.where);
      continue;
    }
    if (/^\d+$/.test(label) && Number(label) !== best) {
      problem('label-is-index', `The label "${label}" (${t.origin.text}) is a number other than its crease's index (${best}), which would make crease references ambiguous; it is not read.`, t.origin.where);
      continue;
    }
    if (labels[best] !== undefined) {
      problem('label-twice', `The label "${label}" (${t.origin.text}) sits on a crease that already has the label "${labels[best]}"; it is not read.`, t.origin.where);
      continue;
    }
    const prev = used.get(label);
    if (prev !== undefined) {
      problem('label-duplicate', `The label "${label}" (${t.origin.text}) already names crease ${prev}; labels must be unique, so it is not read.`, t.origin.where);
      continue;
    }
    labels[best] = label;
    used.set(label, best);
    matched++;
  }
  if (unmatched > 10) messages.push({ severity: 'warning', code: 'label-unmatched', text: `… and ${unmatched - 10} more labels not read.` });
  if (matched) messages.push({ severity: 'info', code: 'labels-read', text: `Read ${matched} crease label${matched === 1 ? '' : 's'} from texts on the label layer.` });
  return labels;
}

/** Assignment names for our writers' layers and groups: plain words, read back by assignmentFromName. */
export const LAYER_NAMES: Record<Assignment, string> = { M: 'mountain', V: 'valley', F: 'flat', U: 'unassigned', B: 'boundary' };
export const LABEL_LAYER = 'labels';
export const LAYER_MEANING: Record<Assignment, string> = {
  M: 'mountain creases (fold away from the top side; fold angle negative)',
  V: 'valley creases (fold towards the top side; fold angle positive)',
  F: 'flat creases (held flat)',
  U: 'unassigned creases (may fold either way)',
  B: 'the outline of the sheet (its rim; cut here)',
};

/** The rim of a pattern as one closed vertex cycle, when its boundary edges form exactly one. */
export function rimCycle(source: PatternSource): number[] | undefined {
  const next = new Map<number, number[]>();
  let count = 0;
  source.edges.forEach(([a, b], e) => {
    if (source.assignments[e] !== 'B') return;
    count++;
    for (const [p, q] of [[a, b], [b, a]]) {
      const l = next.get(p);
      if (l) l.push(q);
      else next.set(p, [q]);
    }
  });
  if (count < 3) return undefined;
  for (const l of next.values()) if (l.length !== 2) return undefined;
  const start = next.keys().next().value as number;
  const cycle = [start];
  let prev = -1;
  let cur = start;
  for (;;) {
    const [p, q] = next.get(cur)!;
    const nxt = p !== prev ? p : q;
    if (nxt === start) break;
    if (cycle.length > count) return undefined;
    cycle.push(nxt);
    prev = cur;
    cur = nxt;
  }
  return cycle.length === count ? cycle : undefined;
}

/** Format a coordinate for a drawing file: shortest exact decimal, never in exponent form. */
export function coordinate(x: number): string {
  if (x === 0 || Object.is(x, -0)) return '0';
  const s = String(x);
  if (!/e/i.test(s)) return s;
  // very small or very large: fixed notation with enough digits to keep the value
  const digits = Math.min(100, Math.max(0, 16 - Math.floor(Math.log10(Math.abs(x)))));
  return x.toFixed(Math.min(digits, 100)).replace(/(\.\d*?)0+$/, '$1').replace(/\.$/, '');
}
