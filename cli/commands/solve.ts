import type { Command } from '../command';
import { writeWhole, writeWholeJson } from '../output';
import { intOption, numberOption, parseCommandArgs, UsageError } from '../args';
import { drivesFor, loadFile } from '../load';
import { exitForStatus, EXIT } from '../exit-codes';
import { reportJson } from '../report-json';
import { deg, textTable } from '../table-text';
import { solveDrives } from '../../solver/search/solve';
import { groupSolutions } from '../../solver/search/summary';
import { CAUTIONS } from '../../solver/formats/cautions';
import { ContactChecker } from '../../solver/outputs/contact';
import { ratesFromSensitivity } from '../../solver/outputs/torque';
import { checksOptions, loadsOption } from './path-common';
import type { SolutionChecks } from '../report-json';
import type { Pattern, SolveReport } from '../../solver/types';

export const solve: Command = {
  name: 'solve',
  summary: 'find every fold angle from the drives: all solutions, status, sensitivities',
  help: `Usage: hingeplan solve <file> [--set <crease>=<deg> …] [--solutions matching|all|<n>] [--conditions matching|all|<n>]
                       [--max-states <n>] [--json [--pretty]]
                       [--contact on|off] [--clearance <length>]
                       [--areal-density <kg/m²>] [--gravity gx,gy,gz] [--spring <crease>=<N·m/rad>[:<rest>] …]

Finds the closed states for the given drives (degrees, valley positive), says what kind of specification it
was, and gives each solution's residual, local DOF, condition number and the sensitivity of every free crease
to every drive (degrees per degree). Isolated states are solutions; a continuum through the drive values is a
family (its DOF, one representative, its free directions). The search says whether the list is complete:
patterns whose vertices close one after another with at most three unknowns each (a single vertex, sheets of
degree-4 vertices) are enumerated exhaustively in closed form; others are searched numerically.

  --set <crease>=<deg>   drive a crease (label or index); repeat for more drives. Without --set the
                         drives stored in the file are used.
  --solutions <which>    which solutions to print in full: matching (those whose signs follow the
                         mountain/valley assignment, else the first; the default for text), all (the default
                         for --json), or the first <n>. The others are summarised by how they differ.
  --conditions <which>   which printed solutions get a condition number (each costs a factorization of the
                         sheet's normal matrix, 0.1–0.2 s on 13,000 creases): matching (default), all, or the
                         first <n>. The others say "not evaluated" (JSON: no "condition" field,
                         "conditionEvaluated": false); their isolation is proven all the same (local DOF).
  --max-states <n>       stop the search after n closed states (default 64); a stopped search says so
  --json                 JSON on stdout: {status, dof, patternDof, drives, search: {complete, method, found,
                         limit?, note}, solutions: [{index, angles, maxResidual, matchesAssignment, localDof,
                         condition, signs, stacked?, sensitivity, vertexResiduals, contacts, stackedPanels?,
                         torque?}], contact: {checked, clearance}, torqueUnits?, omitted?: {count, groups},
                         families: [{dof, representative, directions, matchesAssignment}], compromise?,
                         suggestedDrives?, conflictingDrives?, reachableRange?, excluded?, messages}; drives
                         and the driven creases' angles are the values as given (60, not 59.99999999999999).
  --pretty               indent the JSON (default compact).
  --contact on|off       check every printed solution's panels for contact (default on): "contacts": [[p, q], …]
                         lists the pairs of panels (indices) that pass through each other or come closer than
                         --clearance <length> (file units, default 0); panels stacked flat on each other
                         without a clearance are listed apart as "stackedPanels".
  --areal-density, --gravity, --spring   loads (as for \`hingeplan sweep\`, or the file's "loads"): each
                         printed solution gives the static holding torque of every drive, "torque": {"<drive>": N·m}.
Exit status: 0 solved / several solutions / overspecified but consistent / dependent drives;
2 invalid input or usage; 3 inconsistent or unreachable; 4 underspecified or not isolated.`,
  async run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      set: { type: 'string', multiple: true },
      solutions: { type: 'string' },
      conditions: { type: 'string' },
      'max-states': { type: 'string' },
      json: { type: 'boolean' },
      pretty: { type: 'boolean' },
      contact: checksOptions.contact, clearance: checksOptions.clearance,
      'areal-density': checksOptions['areal-density'], gravity: checksOptions.gravity, spring: checksOptions.spring,
    });
    const which = (values.solutions as string | undefined) ?? (values.json ? 'all' : 'matching');
    if (!/^(matching|all|[1-9]\d*)$/.test(which)) throw new UsageError(`--solutions must be matching, all or a whole number ≥ 1, got "${which}"`);
    const conds = (values.conditions as string | undefined) ?? 'matching';
    if (!/^(matching|all|[1-9]\d*)$/.test(conds)) throw new UsageError(`--conditions must be matching, all or a whole number ≥ 1, got "${conds}"`);
    const cap = intOption(values['max-states'] as string | undefined, 'max-states', 64);
    if (cap < 1 || cap > 1_000_000) throw new UsageError('--max-states must be between 1 and 1000000');
    const contactOn = ((values.contact as string | undefined) ?? 'on');
    if (contactOn !== 'on' && contactOn !== 'off') throw new UsageError(`--contact must be on or off, got "${contactOn}"`);
    const clearance = values.clearance === undefined ? 0 : numberOption(values.clearance as string, 'clearance');
    if (clearance < 0) throw new UsageError(`--clearance must be a length ≥ 0 in the file's units, got ${clearance}`);
    const path = positionals[0];
    const loaded = await loadFile(io, path, 'solve');
    if (!loaded) return EXIT.usage;
    const drives = drivesFor(io, loaded, values.set as string[] | undefined, path!);
    if (!drives) return EXIT.usage;
    const { pattern } = loaded;
    const loads = loadsOption(io, loaded, values, path!);
    if (loads === null) return EXIT.usage;
    // sensitivities are worked out for the solutions printed in full, condition numbers for those asked for
    const leading = (w: string) => (w === 'all' ? Infinity : w === 'matching' ? 'matching' : Number(w));
    const report = solveDrives(pattern, drives, { cap, detail: leading(which), conditions: leading(conds) });
    const shown = shownSolutions(report, which);
    const omitted = report.solutions.map((_, i) => i).filter((i) => i >= shown.length);
    const groups = omitted.length ? groupSolutions(pattern, report.solutions, 0, omitted) : [];
    // contact and torque of the solutions printed in full
    const checker = contactOn === 'on' ? new ContactChecker(pattern, { clearance }) : undefined;
    const checks: SolutionChecks[] = report.solutions.slice(0, shown.length).map((s) => {
      const r = checker?.checkAngles(s.angles);
      return {
        ...(r ? { contacts: r.contacts.map((c) => c.panels), stackedPanels: r.stacked } : {}),
        ...(loads && s.sensitivity.size ? { torque: new Map(drives.map((d) => [d.crease, loads.torque(s.angles, ratesFromSensitivity(pattern, s.sensitivity, d.crease))])) } : {}),
      };
    });
    if (values.json) {
      const json = reportJson(pattern, drives, { ...report, solutions: report.solutions.slice(0, shown.length) }, { contact: { checked: !!checker, clearance }, solutions: checks, torque: !!loads }, !values.pretty);
      const out = omitted.length
        ? { ...json, omitted: { count: omitted.length, groups: groups.map((g) => ({ count: g.count, solutions: g.solutions, text: g.text })) } }
        : json;
      writeWholeJson(io, 'solve', out, !!values.pretty);
      return exitForStatus(report.status);
    }
    if (values.pretty) throw new UsageError('--pretty is for --json');
    writeWhole(io, 'solve', textReport(pattern, drives.map((d) => d.crease), report, shown.length, groups, checks) + '\n', undefined, [], 'text');
    return exitForStatus(report.status);
  },
};

/** The solutions printed in full: they lead the report's order (matching ones first). */
function shownSolutions(report: SolveReport, which: string): number[] {
  const all = report.solutions.map((_, i) => i);
  if (which === 'all') return all;
  if (which === 'matching') {
    const matching = all.filter((i) => report.solutions[i].matchesAssignment);
    return matching.length ? matching : all.slice(0, 1);
  }
  return all.slice(0, Number(which));
}

function textReport(pattern: Pattern, driveCreases: number[], report: SolveReport, shownCount: number, groups: ReturnType<typeof groupSolutions>, checks: SolutionChecks[] = []): string {
  const out: string[] = [];
  out.push(`${pattern.name}: ${report.status}  (DOF left ${report.dof}, pattern DOF ${report.patternDof})`);
  // the options that ask for what a message says was left out
  const ask: Record<string, string> = { 'sensitivity-not-evaluated': '--solutions all', 'condition-not-evaluated': '--conditions all' };
  for (const m of report.messages) out.push(`  ${m.severity}: ${ask[m.code] ? `${m.text.replace(/\.$/, '')}; ${ask[m.code]} for every one.` : m.text}`);
  const s = report.search;
  out.push(`  search: ${s.complete ? 'complete' : 'not complete'}: ${s.method}; found ${s.found}${s.limit !== undefined ? ` (cap ${s.limit})` : ''}; ${s.note}${s.limit !== undefined && !s.complete ? ' (--max-states <n> to look further)' : ''}.`);
  const shown = report.solutions.slice(0, shownCount);
  const columns = shown.length ? shown : report.compromise ? [report.compromise] : [];
  if (columns.length) {
    const head = ['crease', 'assign', ...columns.map((_, i) => (shown.length ? `#${i + 1}` : 'compromise'))];
    const rows = pattern.creases
      .filter((c) => c.assignment !== 'B')
      .map((c) => [c.label + (driveCreases.includes(c.index) ? ' (drive)' : ''), c.assignment, ...columns.map((x) => deg(x.angles[c.index]))]);
    out.push('');
    out.push(textTable(head, rows));
    out.push(textTable(['solution', 'max residual (rad)', 'matches M/V', 'local DOF', 'condition', 'folded flat'], columns.map((x, i) => [
      shown.length ? `#${i + 1}` : 'compromise', x.maxResidual.toExponential(2), x.matchesAssignment ? 'yes' : 'no', x.localDof,
      Number.isFinite(x.condition) ? x.condition.toPrecision(4) : Number.isNaN(x.condition) ? 'not evaluated' : 'inf',
      x.stacked?.length ? `${x.stacked.length} crease(s)` : '-',
    ])));
    const first = shown[0];
    if (first && driveCreases.length && first.sensitivity.size) {
      out.push('Sensitivity of solution #1 (degrees per degree of drive):');
      out.push(textTable(['crease', ...driveCreases.map((d) => pattern.creases[d].label)],
        pattern.creases.filter((c) => c.assignment !== 'B' && c.assignment !== 'F' && !first.sensitivity.has(c.index))
          .map((c) => [c.label, ...driveCreases.map((d) => (first.sensitivity.get(d)?.[c.index] ?? 0).toFixed(6))])));
    }
  }
  checks.forEach((c, i) => {
    if (c.contacts?.length) out.push(`Solution #${i + 1}: panels in contact: ${c.contacts.slice(0, 10).map((p) => p.join('–')).join(', ')}${c.contacts.length > 10 ? ` and ${c.contacts.length - 10} more` : ''}`);
    if (c.torque) out.push(`Solution #${i + 1}: holding torque ${[...c.torque].map(([d, t]) => `${pattern.creases[d].label} ${+t.toPrecision(6)} N·m`).join(', ')}`);
  });
  const rest = report.solutions.length - shownCount;
  if (rest > 0) {
    out.push(`${rest} more solution(s), not printed (--solutions all prints them); compared with #1 they:`);
    for (const g of groups.slice(0, 12)) out.push(`  ${String(g.count).padStart(5)}  ${g.text} (e.g. #${g.solutions[0]})`);
    if (groups.length > 12) out.push(`  … and ${groups.length - 12} more groups`);
  }
  for (const [k, f] of report.families.entries()) {
    const dir = f.directions[0];
    const top = dir ? [...dir].sort((p, q) => Math.abs(q[1]) - Math.abs(p[1])).slice(0, 4).map(([c, v]) => `${pattern.creases[c].label} ${v.toFixed(3)}`).join(', ') : '';
    out.push(`Family ${k + 1}: ${f.dof} degree(s) of freedom${f.matchesAssignment ? ', follows the assignment' : ''}; free direction${f.dof > 1 ? 's include' : ''}: ${top}${dir && dir.size > 4 ? ', …' : ''}`);
  }
  out.push(CAUTIONS);
  return out.join('\n');
}
