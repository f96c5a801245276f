import type { Command } from '../command';
import { parseCommandArgs } from '../args';
import { formatMessage, loadFile } from '../load';
import { EXIT } from '../exit-codes';
import { messageJson } from '../report-json';
import { loadPatternText } from '../../solver/formats/project';

const DEG = 180 / Math.PI;

export const check: Command = {
  name: 'check',
  summary: 'validate a pattern file and summarise it (vertices, creases, panels, holes, diagnostics)',
  help: `Usage: hingeplan check <file> [--json]

Reads a project file (.hingeplan.json), a FOLD file (.fold) or a drawing (.dxf, .svg), validates it, and prints a summary: vertices,
interior vertices, creases by assignment, panels, holes, the base panel, the drives stored in the file, and
every diagnostic (with the vertex, crease or field it concerns). Exit status 0 when the file is usable,
2 when it is refused.

  --json   JSON on stdout: {valid, name, vertices, interiorVertices, creases, assignments, panels, holes,
           basePanel, drives, vertexDefects, cleaning? (drawings: what each cleaning step did, with the
           snap), messages}`,
  run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, { json: { type: 'boolean' } });
    const path = positionals[0];
    if (values.json && path) {
      const read = io.readFile(path);
      if (read.text === undefined) {
        io.stdout(JSON.stringify({ valid: false, messages: [{ severity: 'error', code: 'unreadable-file', text: read.error }] }, null, 2) + '\n');
        return EXIT.usage;
      }
      const r = loadPatternText(read.text, path, io.drawing);
      const valid = !!r.pattern && !r.messages.some((m) => m.severity === 'error');
      if (!valid || !r.pattern) {
        io.stdout(JSON.stringify({ valid: false, messages: r.messages.map(messageJson) }, null, 2) + '\n');
        return EXIT.usage;
      }
      const cleaning = r.cleaning ? { cleaning: r.cleaning } : {};
      io.stdout(JSON.stringify({ valid: true, ...summary(r.pattern, r.project?.drives ?? []), ...cleaning, messages: r.messages.map(messageJson) }, null, 2) + '\n');
      return EXIT.ok;
    }
    const loaded = loadFile(io, path, 'check');
    if (!loaded) return EXIT.usage;
    const s = summary(loaded.pattern, loaded.project.drives);
    const lines = [
      `${s.name}`,
      `  vertices          ${s.vertices} (${s.interiorVertices} interior)`,
      `  creases           ${s.creases} (${Object.entries(s.assignments).map(([k, v]) => `${v} ${k}`).join(', ')})`,
      `  panels            ${s.panels}`,
      `  holes             ${s.holes}`,
      `  base panel        ${s.basePanel}`,
      `  drives in file    ${s.drives.length ? s.drives.map((d) => `${d.crease}=${d.angle}`).join(', ') : 'none'}`,
      `  largest defect    ${s.largestDefect.toExponential(2)}°`,
      ...loaded.messages.map((m) => `  ${formatMessage(m)}`),
      loaded.messages.length ? '' : '  no problems found',
    ];
    io.stdout(lines.join('\n').trimEnd() + '\n');
    return EXIT.ok;
  },
};

function summary(pattern: import('../../solver/types').Pattern, drives: { crease: string; angleDeg: number }[]) {
  const assignments: Record<string, number> = {};
  for (const c of pattern.creases) assignments[c.assignment] = (assignments[c.assignment] ?? 0) + 1;
  const defects = pattern.interiorVertices.map((iv) => Math.abs(iv.defect) * DEG);
  return {
    name: pattern.name,
    vertices: pattern.vertices.length,
    interiorVertices: pattern.interiorVertices.length,
    creases: pattern.creases.length,
    assignments,
    panels: pattern.panels.length,
    holes: pattern.holes.length,
    basePanel: pattern.basePanel,
    drives: drives.map((d) => ({ crease: d.crease, angle: d.angleDeg })),
    largestDefect: defects.length ? Math.max(...defects) : 0,
    vertexDefects: Object.fromEntries(pattern.interiorVertices.map((iv) => [String(iv.vertex), iv.defect * DEG])),
  };
}
