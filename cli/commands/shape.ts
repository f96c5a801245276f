import type { Command } from '../command';
import { intOption, parseCommandArgs, UsageError } from '../args';
import { drivesFor, loadFile, printMessages } from '../load';
import { EXIT, exitForStatus } from '../exit-codes';
import { solveDrives } from '../../solver/search/solve';
import { foldedShape } from '../../solver/outputs/shape';
import { shapeToJSON, shapeToOBJ, shapeToSTL } from '../../solver/formats/shape-export';

export const shape: Command = {
  name: 'shape',
  summary: 'the folded shape for the drives: vertex positions (JSON), OBJ or ASCII STL',
  help: `Usage: hingeplan shape <file> [--set <crease>=<deg> …] [--solution <k>] [--base-panel <p>]
                       [--format json|obj|stl] [--out <file>]

Solves for the drives (as \`hingeplan solve\`), then places every panel: the base panel stays fixed and every
other panel turns about the creases between it and the base. Vertex positions are in the file's units.

  --set <crease>=<deg>   drive a crease; repeat. Without --set the file's drives are used.
  --solution <k>         which solution (1-based, as numbered by \`hingeplan solve\`); default: the first
                         solution whose signs match the mountain/valley assignment, else the first.
  --base-panel <p>       the panel held fixed (zero-based panel index); default: the file's base panel.
  --format json|obj|stl  json (default): {"vertices": [[x, y, z], … in the file's vertex order],
                         "maxMismatch": <length>, "panels": …}; obj and stl are for CAD.
  --out <file>           write to a file (atomically) instead of stdout.`,
  run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      set: { type: 'string', multiple: true },
      solution: { type: 'string' },
      'base-panel': { type: 'string' },
      format: { type: 'string' },
      out: { type: 'string' },
    });
    const format = (values.format as string | undefined) ?? 'json';
    if (!['json', 'obj', 'stl'].includes(format)) throw new UsageError(`--format must be json, obj or stl, got "${format}"`);
    const path = positionals[0];
    const loaded = loadFile(io, path, 'shape');
    if (!loaded) return EXIT.usage;
    const drives = drivesFor(io, loaded, values.set as string[] | undefined, path!);
    if (!drives) return EXIT.usage;
    const { pattern } = loaded;
    const base = values['base-panel'] === undefined ? pattern.basePanel : intOption(values['base-panel'] as string, 'base-panel');
    if (base < 0 || base >= pattern.panels.length) throw new UsageError(`--base-panel must be a panel index from 0 to ${pattern.panels.length - 1}, got ${base}`);
    const report = solveDrives(pattern, drives, { detail: 0, conditions: 0 });
    const family = !report.solutions.length ? report.families[0] : undefined;
    if (!report.solutions.length && !family) {
      printMessages(io, report.messages, `${path}: `);
      return exitForStatus(report.status);
    }
    let k = 0;
    if (values.solution !== undefined) {
      if (family) throw new UsageError(`there are no isolated solutions to choose from: the drives leave a family of states (${report.status})`);
      k = intOption(values.solution as string, 'solution') - 1;
      if (k < 0 || k >= report.solutions.length) throw new UsageError(`--solution must be from 1 to ${report.solutions.length}, got ${k + 1}`);
    } else if (!family) {
      k = Math.max(0, report.solutions.findIndex((s) => s.matchesAssignment));
    }
    const sol = family ? family.representative : report.solutions[k];
    if (family) {
      // a continuum: the shape is one member of it, and the person must know that
      io.stderr(`warning: the drives leave a family of states (${family.dof} degree(s) of freedom); the shape written is one member of it, not a solution. Add drives to fix the pattern (see hingeplan solve).\n`);
    }
    const sh = foldedShape(pattern, sol.angles, base);
    const text =
      format === 'obj' ? shapeToOBJ(pattern, sh)
      : format === 'stl' ? shapeToSTL(pattern, sh)
      : JSON.stringify(shapeToJSON(pattern, sh, family
        ? { family: { dof: family.dof }, status: report.status, maxResidual: sol.maxResidual }
        : { solution: k + 1, status: report.status, maxResidual: sol.maxResidual }), null, 2) + '\n';
    if (values.out) {
      const w = io.writeFile(values.out as string, text);
      if (w.error) { io.stderr(`hingeplan shape: ${w.error}\n`); return EXIT.usage; }
    } else {
      io.stdout(text);
    }
    for (const m of report.messages.filter((m) => m.severity !== 'info')) io.stderr(`${m.severity}: ${m.text}\n`);
    return exitForStatus(report.status);
  },
};
