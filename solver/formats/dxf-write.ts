// Writing a project's flat pattern as DXF: R12 (AC1009) text, which laser-cutter software and every CAD program read: a layer per
// assignment (mountain, valley, flat, unassigned, boundary) with linetypes of our own and the neutral
// colour 7, crease labels as TEXT on the layer "labels", the outline as one closed POLYLINE, $INSUNITS
// from the project's units, and comments (group 999) saying what each layer means and the cautions line.
import type { Assignment } from '../types';
import type { Project } from './project';
import { CAUTIONS } from './cautions';
import { coordinate, LABEL_LAYER, LAYER_MEANING, LAYER_NAMES, rimCycle } from './drawing';
import { INSUNITS } from './dxf';

const UNIT_CODES: Record<string, number> = Object.fromEntries(Object.entries(INSUNITS).map(([k, v]) => [v, Number(k)]));
for (const [alias, code] of [['inch', 1], ['µm', 13], ['micron', 13], ['millimetre', 4], ['millimeter', 4], ['metre', 6], ['meter', 6]] as const) UNIT_CODES[alias] = code;

const LINETYPES: { name: string; description: string; pattern: number[] }[] = [
  { name: 'CONTINUOUS', description: 'Solid line', pattern: [] },
  { name: 'HP_VALLEY', description: 'Valley crease __ __ __', pattern: [1, -0.5] },
  { name: 'HP_MOUNTAIN', description: 'Mountain crease __ . __ .', pattern: [1, -0.25, 0, -0.25] },
  { name: 'HP_FLAT', description: 'Flat crease . . . .', pattern: [0, -0.3] },
  { name: 'HP_UNASSIGNED', description: 'Unassigned crease ____ ____', pattern: [2, -0.3] },
];
const LINETYPE_OF: Record<Assignment, string> = { V: 'HP_VALLEY', M: 'HP_MOUNTAIN', F: 'HP_FLAT', U: 'HP_UNASSIGNED', B: 'CONTINUOUS' };
const ORDER: Assignment[] = ['B', 'M', 'V', 'F', 'U'];

/** Text for a DXF value line: no line breaks; characters past ASCII as \U+XXXX. */
function encodeText(s: string): string {
  let out = '';
  for (const ch of s) {
    const c = ch.codePointAt(0)!;
    if (c >= 32 && c < 127) out += ch;
    else if (c <= 0xffff) out += `\\U+${c.toString(16).toUpperCase().padStart(4, '0')}`;
    else out += '?';
  }
  return out;
}

/** Write a project's flat pattern as R12 DXF text. */
export function writeDxf(project: Project): string {
  const src = project.source;
  const out: string[] = [];
  const g = (code: number, value: string | number) => {
    out.push(String(code).padStart(3, ' '), typeof value === 'number' ? coordinate(value) : value);
  };
  const units = project.units;
  const unitCode = units === undefined ? 0 : UNIT_CODES[units] ?? UNIT_CODES[units.toLowerCase()] ?? 0;
  const used = new Set(src.assignments);
  g(999, encodeText(`Hingeplan flat crease pattern "${src.name}"${units ? `, lengths in ${units}` : ''}. Seen from the top side (valleys fold towards the viewer).`));
  for (const a of ORDER) if (used.has(a)) g(999, `Layer ${LAYER_NAMES[a]}: ${LAYER_MEANING[a]}`);
  g(999, `Layer ${LABEL_LAYER}: crease labels, each at the middle of its crease`);
  if (units !== undefined && unitCode === 0) g(999, encodeText(`Units: ${units} ($INSUNITS cannot say this unit)`));
  g(999, CAUTIONS);

  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const [x, y] of src.vertices) {
    x0 = Math.min(x0, x); y0 = Math.min(y0, y); x1 = Math.max(x1, x); y1 = Math.max(y1, y);
  }
  if (!Number.isFinite(x0)) x0 = y0 = x1 = y1 = 0;
  g(0, 'SECTION'); g(2, 'HEADER');
  g(9, '$ACADVER'); g(1, 'AC1009');
  g(9, '$INSUNITS'); g(70, unitCode);
  g(9, '$EXTMIN'); g(10, x0); g(20, y0); g(30, 0);
  g(9, '$EXTMAX'); g(10, x1); g(20, y1); g(30, 0);
  g(0, 'ENDSEC');

  // linetype dashes scale with the sheet: a dash is 1% of its diagonal
  const unit = Math.max(Math.hypot(x1 - x0, y1 - y0) / 100, 1e-9);
  g(0, 'SECTION'); g(2, 'TABLES');
  g(0, 'TABLE'); g(2, 'LTYPE'); g(70, LINETYPES.length);
  for (const lt of LINETYPES) {
    g(0, 'LTYPE'); g(2, lt.name); g(70, 0); g(3, lt.description); g(72, 65); g(73, lt.pattern.length);
    g(40, lt.pattern.reduce((acc, d) => acc + Math.abs(d) * unit, 0));
    for (const d of lt.pattern) g(49, d * unit);
  }
  g(0, 'ENDTAB');
  const layerList = [...ORDER.filter((a) => used.has(a)).map((a) => ({ name: LAYER_NAMES[a], colour: 7, linetype: LINETYPE_OF[a] })), { name: LABEL_LAYER, colour: 8, linetype: 'CONTINUOUS' }];
  g(0, 'TABLE'); g(2, 'LAYER'); g(70, layerList.length + 1);
  for (const l of [{ name: '0', colour: 7, linetype: 'CONTINUOUS' }, ...layerList]) {
    g(0, 'LAYER'); g(2, l.name); g(70, 0); g(62, l.colour); g(6, l.linetype);
  }
  g(0, 'ENDTAB');
  g(0, 'TABLE'); g(2, 'STYLE'); g(70, 1);
  g(0, 'STYLE'); g(2, 'STANDARD'); g(70, 0); g(40, 0); g(41, 1); g(50, 0); g(71, 0); g(42, 2.5); g(3, 'txt'); g(4, '');
  g(0, 'ENDTAB');
  g(0, 'ENDSEC');

  g(0, 'SECTION'); g(2, 'ENTITIES');
  const rim = rimCycle(src);
  const onRim = new Set<number>();
  if (rim) {
    src.edges.forEach((_, e) => src.assignments[e] === 'B' && onRim.add(e));
    g(0, 'POLYLINE'); g(8, LAYER_NAMES.B); g(66, 1); g(10, 0); g(20, 0); g(30, 0); g(70, 1);
    for (const v of rim) {
      g(0, 'VERTEX'); g(8, LAYER_NAMES.B); g(10, src.vertices[v][0]); g(20, src.vertices[v][1]); g(30, 0);
    }
    g(0, 'SEQEND'); g(8, LAYER_NAMES.B);
  }
  for (const a of ORDER) {
    src.edges.forEach(([p, q], e) => {
      if (src.assignments[e] !== a || onRim.has(e)) return;
      g(0, 'LINE'); g(8, LAYER_NAMES[a]);
      g(10, src.vertices[p][0]); g(20, src.vertices[p][1]); g(30, 0);
      g(11, src.vertices[q][0]); g(21, src.vertices[q][1]); g(31, 0);
    });
  }
  const lengths = src.edges.map(([p, q]) => Math.hypot(src.vertices[p][0] - src.vertices[q][0], src.vertices[p][1] - src.vertices[q][1])).sort((a, b) => a - b);
  const height = Math.max((lengths[Math.floor(lengths.length / 2)] ?? 1) * 0.12, 1e-9);
  src.edges.forEach(([p, q], e) => {
    const label = src.labels[e];
    if (label === undefined) return;
    const [ax, ay] = src.vertices[p];
    const [bx, by] = src.vertices[q];
    const mx = (ax + bx) / 2, my = (ay + by) / 2;
    let angle = (Math.atan2(by - ay, bx - ax) * 180) / Math.PI;
    if (angle > 90) angle -= 180;
    if (angle <= -90) angle += 180;
    // middle-centred at the crease's midpoint (72 = 1 centre, 73 = 2 middle; the point is 11/21)
    g(0, 'TEXT'); g(8, LABEL_LAYER); g(10, mx); g(20, my); g(30, 0); g(40, height); g(1, encodeText(label));
    g(50, +angle.toPrecision(12)); g(72, 1); g(11, mx); g(21, my); g(31, 0); g(73, 2);
  });
  g(0, 'ENDSEC');
  g(0, 'EOF');
  return out.join('\r\n') + '\r\n';
}
