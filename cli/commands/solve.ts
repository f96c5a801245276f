import type { Command } from '../command';
import { parseCommandArgs } from '../args';
import { drivesFor, loadFile } from '../load';
import { exitForStatus, EXIT } from '../exit-codes';
import { reportJson } from '../report-json';
import { deg, textTable } from '../table-text';
import { solveDrives } from '../../solver/search/solve';
import { CAUTIONS } from '../../solver/formats/cautions';
import { ContactChecker } from '../../solver/outputs/contact';
import { ratesFromSensitivity } from '../../solver/outputs/torque';
import { checksOptions, loadsOption } from './path-common';
import { UsageError, numberOption } from '../args';
import type { SolutionChecks } from '../report-json';

export const solve: Command = {
  name: 'solve',
  summary: 'find every fold angle from the drives: all solutions, status, sensitivities',
  help: `Usage: hingeplan solve <file> [--set <crease>=<deg> …] [--json] [--contact on|off] [--clearance <length>]
                       [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

Finds every consistent set of the free fold angles for the given drives (degrees, valley positive), says what
kind of specification it was, and gives each solution's residual, local DOF, condition number and the
sensitivity of every free crease to every drive (degrees per degree).

  --set <crease>=<deg>   drive a crease (label or index); repeat for more drives. Without --set the
                         drives stored in the file are used.
  --contact on|off       check every solution's panels for contact (default on): "contacts": [[p, q], …]
                         lists the pairs of panels (indices) that pass through each other or come closer than
                         --clearance <length> (file units, default 0); panels stacked flat on each other
                         without a clearance are listed apart as "stackedPanels".
  --areal-density, --gravity, --spring   loads (as for \`hingeplan sweep\`, or the file's "loads"): each
                         solution gives the static holding torque of every drive, "torque": {"<drive>": N·m}.
  --json                 JSON on stdout: {status, dof, patternDof, drives, solutions: [{angles, maxResidual,
                         matchesAssignment, localDof, condition, signs, sensitivity, vertexResiduals,
                         contacts, stackedPanels?, torque?}], contact: {checked, clearance}, compromise?,
                         suggestedDrives?, conflictingDrives?, reachableRange?, messages}
Exit status: 0 solved / several solutions / overspecified but consistent / dependent drives;
2 invalid input or usage; 3 inconsistent or unreachable; 4 underspecified or not isolated.`,
  run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      set: { type: 'string', multiple: true },
      json: { type: 'boolean' },
      contact: checksOptions.contact, clearance: checksOptions.clearance,
      'areal-density': checksOptions['areal-density'], gravity: checksOptions.gravity, spring: checksOptions.spring,
    });
    const contactOn = ((values.contact as string | undefined) ?? 'on');
    if (contactOn !== 'on' && contactOn !== 'off') throw new UsageError(`--contact must be on or off, got "${contactOn}"`);
    const clearance = values.clearance === undefined ? 0 : numberOption(values.clearance as string, 'clearance');
    if (clearance < 0) throw new UsageError(`--clearance must be a length ≥ 0 in the file's units, got ${clearance}`);
    const path = positionals[0];
    const loaded = loadFile(io, path, 'solve');
    if (!loaded) return EXIT.usage;
    const drives = drivesFor(io, loaded, values.set as string[] | undefined, path!);
    if (!drives) return EXIT.usage;
    const { pattern } = loaded;
    const loads = loadsOption(io, loaded, values, path!);
    if (loads === null) return EXIT.usage;
    const report = solveDrives(pattern, drives);
    const checker = contactOn === 'on' ? new ContactChecker(pattern, { clearance }) : undefined;
    const checks: SolutionChecks[] = report.solutions.map((s) => {
      const r = checker?.checkAngles(s.angles);
      return {
        ...(r ? { contacts: r.contacts.map((c) => c.panels), stackedPanels: r.stacked } : {}),
        ...(loads ? { torque: new Map(drives.map((d) => [d.crease, loads.torque(s.angles, ratesFromSensitivity(pattern, s.sensitivity, d.crease))])) } : {}),
      };
    });
    if (values.json) {
      io.stdout(JSON.stringify(reportJson(pattern, drives, report, { contact: { checked: !!checker, clearance }, solutions: checks, torque: !!loads }), null, 2) + '\n');
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
      report.solutions.forEach((_, i) => {
        const c = checks[i];
        if (c.contacts?.length) out.push(`Solution #${i + 1}: panels in contact: ${c.contacts.slice(0, 10).map((p) => p.join('–')).join(', ')}${c.contacts.length > 10 ? ` and ${c.contacts.length - 10} more` : ''}`);
        if (c.torque) out.push(`Solution #${i + 1}: holding torque ${[...c.torque].map(([d, t]) => `${pattern.creases[d].label} ${+t.toPrecision(6)} N·m`).join(', ')}`);
      });
      if (report.solutions.length && drives.length) {
        const s = report.solutions[0];
        out.push('Sensitivity of solution #1 (degrees per degree of drive):');
        out.push(textTable(['crease', ...drives.map((d) => pattern.creases[d.crease].label)],
          [...s.sensitivity].map(([c, m]) => [pattern.creases[c].label, ...drives.map((d) => (m.get(d.crease) ?? 0).toFixed(6))])));
      }
    }
    out.push(CAUTIONS);
    io.stdout(out.join('\n') + '\n');
    return exitForStatus(report.status);
  },
};
