import type { Command } from '../command';
import { parseCommandArgs } from '../args';
import { drivesFor, loadFile } from '../load';
import { exitForStatus, EXIT } from '../exit-codes';
import { reportJson } from '../report-json';
import { deg, textTable } from '../table-text';
import { solveDrives } from '../../solver/search/solve';
import { CAUTIONS } from '../../solver/formats/cautions';
import { jsonText } from '../../solver/formats/json-text';
import { writeWhole } from '../output';

export const solve: Command = {
  name: 'solve',
  summary: 'find every fold angle from the drives: all solutions, status, sensitivities',
  help: `Usage: hingeplan solve <file> [--set <crease>=<deg> …] [--json [--pretty]]

Finds every consistent set of the free fold angles for the given drives (degrees, valley positive), says what
kind of specification it was, and gives each solution's residual, local DOF, condition number and the
sensitivity of every free crease to every drive (degrees per degree).

  --set <crease>=<deg>   drive a crease (label or index); repeat for more drives. Without --set the
                         drives stored in the file are used.
  --json                 JSON on stdout: {status, dof, patternDof, drives, solutions: [{angles, maxResidual,
                         matchesAssignment, localDof, condition, signs, sensitivity, vertexResiduals}],
                         compromise?, suggestedDrives?, conflictingDrives?, reachableRange?, messages}; drives
                         and the driven creases' angles are the values as given.
  --pretty               indent the JSON (default compact).
Exit status: 0 solved / several solutions / overspecified but consistent / dependent drives;
2 invalid input or usage; 3 inconsistent or unreachable; 4 underspecified or not isolated.`,
  run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      set: { type: 'string', multiple: true },
      json: { type: 'boolean' },
      pretty: { type: 'boolean' },
    });
    const path = positionals[0];
    const loaded = loadFile(io, path, 'solve');
    if (!loaded) return EXIT.usage;
    const drives = drivesFor(io, loaded, values.set as string[] | undefined, path!);
    if (!drives) return EXIT.usage;
    const { pattern } = loaded;
    const report = solveDrives(pattern, drives);
    if (values.json) {
      writeWhole(io, 'solve', jsonText(reportJson(pattern, drives, report), !!values.pretty) + '\n', undefined, [], 'json');
      return exitForStatus(report.status);
    }
    const out: string[] = [];
    out.push(`${pattern.name}: ${report.status}  (DOF left ${report.dof}, pattern DOF ${report.patternDof})`);
    for (const m of report.messages) out.push(`  ${m.severity}: ${m.text}`);
    const shown = report.solutions.length ? report.solutions : report.compromise ? [report.compromise] : [];
    if (shown.length) {
      const head = ['crease', 'assign', ...shown.map((_, i) => (report.solutions.length ? `#${i + 1}` : 'compromise'))];
      const rows = pattern.creases
        .filter((c) => c.assignment !== 'B')
        .map((c) => [c.label + (drives.some((d) => d.crease === c.index) ? ' (drive)' : ''), c.assignment, ...shown.map((s) => deg(s.angles[c.index]))]);
      out.push('');
      out.push(textTable(head, rows));
      out.push(textTable(['solution', 'max residual (rad)', 'matches M/V', 'local DOF', 'condition'], shown.map((s, i) => [
        `#${i + 1}`, s.maxResidual.toExponential(2), s.matchesAssignment ? 'yes' : 'no', s.localDof, Number.isFinite(s.condition) ? s.condition.toPrecision(4) : 'inf',
      ])));
      if (report.solutions.length && drives.length) {
        const s = report.solutions[0];
        out.push('Sensitivity of solution #1 (degrees per degree of drive):');
        out.push(textTable(['crease', ...drives.map((d) => pattern.creases[d.crease].label)],
          [...s.sensitivity].map(([c, m]) => [pattern.creases[c].label, ...drives.map((d) => (m.get(d.crease) ?? 0).toFixed(6))])));
      }
    }
    out.push(CAUTIONS);
    writeWhole(io, 'solve', out.join('\n') + '\n', undefined, [], 'text');
    return exitForStatus(report.status);
  },
};
