// Writing a project's flat pattern as SVG: one <g> per assignment (ids mountain, valley, flat, unassigned,
// boundary) with neutral black strokes told apart by dash patterns of our own, the outline as one closed
// polygon, crease labels as text in the group "labels", width/height in the project's units, and a <desc>
// with what each group means and the cautions line.
import type { Assignment } from '../types';
import type { Project } from './project';
import { CAUTIONS } from './cautions';
import { coordinate, LABEL_LAYER, LAYER_MEANING, LAYER_NAMES, rimCycle } from './drawing';

const DASHES: Record<Assignment, number[] | undefined> = { B: undefined, V: [4, 2], M: [4, 1.5, 1, 1.5], F: [1, 1.5], U: [8, 2] };
const ORDER: Assignment[] = ['B', 'M', 'V', 'F', 'U'];
/** Units an SVG length can carry; other units are written as mm when they convert, else as plain numbers. */
const SVG_UNITS = new Set(['mm', 'cm', 'in']);
const TO_MM: Record<string, number> = { m: 1000, um: 0.001, nm: 1e-6, km: 1e6, dm: 100, ft: 304.8, yd: 914.4, mil: 0.0254, pt: 25.4 / 72 };

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** Write a project's flat pattern as SVG. */
export function writeSvg(project: Project): string {
  const src = project.source;
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const [x, y] of src.vertices) {
    x0 = Math.min(x0, x); y0 = Math.min(y0, y); x1 = Math.max(x1, x); y1 = Math.max(y1, y);
  }
  if (!Number.isFinite(x0)) [x0, y0, x1, y1] = [0, 0, 1, 1];
  const W = Math.max(x1 - x0, 1e-9), H = Math.max(y1 - y0, 1e-9);
  const size = Math.hypot(W, H);
  const units = project.units;
  // width and height say the unit; without one (or with a unit SVG cannot say) they are left out, so a
  // reader keeps the numbers as they are instead of taking them for pixels
  let sizeAttrs = '';
  let unitNote = '';
  if (units !== undefined && SVG_UNITS.has(units)) sizeAttrs = ` width="${coordinate(W)}${units}" height="${coordinate(H)}${units}"`;
  else if (units !== undefined && TO_MM[units] !== undefined) {
    sizeAttrs = ` width="${coordinate(W * TO_MM[units])}mm" height="${coordinate(H * TO_MM[units])}mm"`;
    unitNote = ` One user unit is 1 ${units}.`;
  } else unitNote = units ? ` Lengths are in ${units}, which an SVG size cannot say.` : ' The pattern has no unit.';
  // y up in the pattern, y down in SVG: mirrored about the middle of the viewBox
  const X = (x: number) => coordinate(x);
  const Y = (y: number) => coordinate(y0 + y1 - y);
  const stroke = size / 1000;
  const used = new Set(src.assignments);
  const lines: string[] = [];
  lines.push('<?xml version="1.0" encoding="UTF-8"?>');
  lines.push(`<svg xmlns="http://www.w3.org/2000/svg"${sizeAttrs} viewBox="${X(x0)} ${coordinate(y0)} ${coordinate(W)} ${coordinate(H)}">`);
  lines.push(`  <title>${esc(src.name)}</title>`);
  const meaning = ORDER.filter((a) => used.has(a)).map((a) => `group "${LAYER_NAMES[a]}": ${LAYER_MEANING[a]}`);
  lines.push(`  <desc>Hingeplan flat crease pattern, seen from the top side (valleys fold towards the viewer).${esc(unitNote)} ${esc(meaning.join('; '))}; group "${LABEL_LAYER}": crease labels, each at the middle of its crease. ${esc(CAUTIONS)}</desc>`);
  const rim = rimCycle(src);
  for (const a of ORDER) {
    if (!used.has(a)) continue;
    const dash = DASHES[a] ? ` stroke-dasharray="${DASHES[a]!.map((d) => coordinate(+(d * stroke * 2).toPrecision(6))).join(' ')}"` : '';
    lines.push(`  <g id="${LAYER_NAMES[a]}" fill="none" stroke="#000000" stroke-width="${coordinate(+stroke.toPrecision(6))}" stroke-linecap="round" stroke-linejoin="round"${dash}>`);
    lines.push(`    <desc>${esc(LAYER_MEANING[a])}</desc>`);
    if (a === 'B' && rim) {
      lines.push(`    <polygon points="${rim.map((v) => `${X(src.vertices[v][0])},${Y(src.vertices[v][1])}`).join(' ')}"/>`);
    } else {
      src.edges.forEach(([p, q], e) => {
        if (src.assignments[e] !== a) return;
        lines.push(`    <line x1="${X(src.vertices[p][0])}" y1="${Y(src.vertices[p][1])}" x2="${X(src.vertices[q][0])}" y2="${Y(src.vertices[q][1])}"/>`);
      });
    }
    lines.push('  </g>');
  }
  const labelled = src.edges.map((_, e) => e).filter((e) => src.labels[e] !== undefined);
  if (labelled.length) {
    const lengths = src.edges.map(([p, q]) => Math.hypot(src.vertices[p][0] - src.vertices[q][0], src.vertices[p][1] - src.vertices[q][1])).sort((a, b) => a - b);
    const fontSize = +((lengths[Math.floor(lengths.length / 2)] ?? 1) * 0.12).toPrecision(4);
    lines.push(`  <g id="${LABEL_LAYER}" font-family="sans-serif" font-size="${coordinate(fontSize)}" text-anchor="middle" dominant-baseline="central" fill="#555555" stroke="none">`);
    for (const e of labelled) {
      const [p, q] = src.edges[e];
      const mx = (src.vertices[p][0] + src.vertices[q][0]) / 2, my = (src.vertices[p][1] + src.vertices[q][1]) / 2;
      // along the crease, kept readable; screen angles turn the other way (y down)
      let angle = (-Math.atan2(src.vertices[q][1] - src.vertices[p][1], src.vertices[q][0] - src.vertices[p][0]) * 180) / Math.PI;
      if (angle > 90) angle -= 180;
      if (angle <= -90) angle += 180;
      const rot = Math.abs(angle) > 1e-9 ? ` transform="rotate(${+angle.toPrecision(10)} ${X(mx)} ${Y(my)})"` : '';
      lines.push(`    <text x="${X(mx)}" y="${Y(my)}"${rot}>${esc(src.labels[e]!)}</text>`);
    }
    lines.push('  </g>');
  }
  lines.push('</svg>');
  return lines.join('\n') + '\n';
}
