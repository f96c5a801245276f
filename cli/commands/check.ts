import type { Command } from '../command';
import { parseCommandArgs } from '../args';
import { formatMessage, loadFile, readPattern } from '../load';
import { EXIT } from '../exit-codes';
import { messageJson } from '../report-json';
import { writeWhole, writeWholeJson } from '../output';
import { type Project } from '../../solver/formats/project';
import { decimalsText } from '../../solver/formats/numbers';
import type { Assignment, Pattern } from '../../solver/types';

const DEG = 180 / Math.PI;
/** Crease counts are always listed in this order, every assignment named, zeros included. */
const ASSIGNMENTS: Assignment[] = ['M', 'V', 'U', 'F', 'B'];
const SHOWN_LIMITS = 6;

export const check: Command = {
  name: 'check',
  summary: 'validate a pattern file and summarise it (vertices, creases, panels, sheet, limits, diagnostics)',
  help: `Usage: hingeplan check <file> [--json [--pretty]]

Reads a project file (.hingeplan.json), a FOLD file (.fold) or a drawing (.dxf, .svg), validates it, and
prints a summary: vertices, interior vertices, creases by assignment (always M, V, U, F, B in that order),
panels, holes, the flat sheet's size (its bounding box, in the file's units), the units, the base panel, the
hinge limits, the drives stored in the file, and every diagnostic (with the vertex, crease or field it
concerns). Exit status 0 when the file is usable, 2 when it is refused.

  --json     JSON on stdout: {"valid", "name", "vertices", "interiorVertices", "creases", "assignments":
             {"M", "V", "U", "F", "B"}, "panels", "holes", "sheet": {"width", "height"}, "units" (null when
             the file gives none), "basePanel", "limits": [{"crease", "min"?, "max"? (deg)}], "drives":
             [{"crease", "angle" (deg, as in the file)}], "cleaning"? (drawings: what each cleaning step did,
             with the snap), "messages"}; a refused file gives {"valid": false, "messages"}.
  --pretty   indent the JSON.`,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, { json: { type: 'boolean' }, pretty: { type: 'boolean' } });
    const path = positionals[0];
    const pretty = !!values.pretty;
    if (values.json && path) {
      const read = io.readFile(path);
      const print = (v: unknown) => writeWholeJson(io, 'check', v, pretty);
      if (read.bytes === undefined) {
        print({ valid: false, messages: [{ severity: 'error', code: 'unreadable-file', text: read.error }] });
        return EXIT.usage;
      }
      const r = await readPattern(read.bytes, path, io.drawing);
      const valid = !!r.pattern && !!r.project && !r.messages.some((m) => m.severity === 'error');
      if (!valid || !r.pattern || !r.project) {
        print({ valid: false, messages: r.messages.map(messageJson) });
        return EXIT.usage;
      }
      print({ valid: true, ...summary(r.pattern, r.project), ...(r.cleaning ? { cleaning: r.cleaning } : {}), messages: r.messages.map(messageJson) });
      return EXIT.ok;
    }
    const loaded = await loadFile(io, path, 'check');
    if (!loaded) return EXIT.usage;
    const s = summary(loaded.pattern, loaded.project);
    const units = s.units ?? '';
    const limitText = s.limits.length
      ? s.limits.slice(0, SHOWN_LIMITS).map((l) => `${l.crease} ${l.min === undefined ? '−180' : decimalsText(l.min, 4)}° … ${l.max === undefined ? '180' : decimalsText(l.max, 4)}°`).join(', ') +
        (s.limits.length > SHOWN_LIMITS ? `, and ${s.limits.length - SHOWN_LIMITS} more` : '')
      : 'none';
    const lines = [
      `${s.name}`,
      `  vertices          ${s.vertices} (${s.interiorVertices} interior)`,
      `  creases           ${s.creases}: ${ASSIGNMENTS.map((a) => `${s.assignments[a]} ${a}`).join(', ')}`,
      `  panels            ${s.panels}`,
      `  holes             ${s.holes}`,
      `  sheet             ${decimalsText(s.sheet.width, 6)} × ${decimalsText(s.sheet.height, 6)}${units ? ` ${units}` : ''} (bounding box of the flat sheet)`,
      `  units             ${s.units ?? 'not given in the file'}`,
      `  base panel        ${s.basePanel}`,
      `  hinge limits      ${limitText}`,
      `  drives in file    ${s.drives.length ? s.drives.map((d) => `${d.crease}=${d.angle}°`).join(', ') : 'none'}`,
      ...loaded.messages.map((m) => `  ${formatMessage(m)}`),
      loaded.messages.length ? '' : '  no problems found',
    ];
    writeWhole(io, 'check', lines.join('\n').trimEnd() + '\n', undefined, [], 'text');
    return EXIT.ok;
  },
};

function summary(pattern: Pattern, project: Project) {
  const assignments = Object.fromEntries(ASSIGNMENTS.map((a) => [a, 0])) as Record<Assignment, number>;
  for (const c of pattern.creases) assignments[c.assignment]++;
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of pattern.vertices) { x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y); }
  const limits = pattern.creases
    .filter((c) => c.limit && (c.limit.min !== undefined || c.limit.max !== undefined))
    .map((c) => ({
      crease: c.label,
      ...(c.limit!.min !== undefined ? { min: +(c.limit!.min * DEG).toPrecision(15) } : {}),
      ...(c.limit!.max !== undefined ? { max: +(c.limit!.max * DEG).toPrecision(15) } : {}),
    }));
  return {
    name: pattern.name,
    vertices: pattern.vertices.length,
    interiorVertices: pattern.interiorVertices.length,
    creases: pattern.creases.length,
    assignments,
    panels: pattern.panels.length,
    holes: pattern.holes.length,
    sheet: { width: pattern.vertices.length ? x1 - x0 : 0, height: pattern.vertices.length ? y1 - y0 : 0 },
    units: project.units ?? null,
    basePanel: pattern.basePanel,
    limits,
    drives: project.drives.map((d) => ({ crease: d.crease, angle: d.angleDeg })),
  };
}
