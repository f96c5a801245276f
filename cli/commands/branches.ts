import type { Command } from '../command';
import { intOption, parseCommandArgs, UsageError } from '../args';
import type { OptionSpec } from '../args';
import { drivesFor, loadFile, printMessages } from '../load';
import { EXIT, exitForStatus } from '../exit-codes';
import { messageJson } from '../report-json';
import { keyedJson, keyText, LazyArray, numberText } from '../../solver/formats/json-text';
import { textTable } from '../table-text';
import { branchesAt, flatBranches, type BranchAnalysis } from '../../solver/paths/branches';
import { solveDrives } from '../../solver/search/solve';
import type { Drive, Pattern } from '../../solver/types';
import { writeWhole, writeWholeJson } from '../output';
import { CAUTIONS } from '../../solver/formats/cautions';
import { creaseOption, holdsOption, joinNegativeNumbers } from './path-common';

/** `compact`: each ray's tangent and ratios (a member per crease) as text in one piece; else objects, for the indented form. */
function analysisJson(pattern: Pattern, a: BranchAnalysis, at: Float64Array | undefined, given: Drive[], compact: boolean) {
  const label = (c: number) => pattern.creases[c].label;
  const listed = pattern.creases.filter((c) => c.assignment !== 'B').map((c) => c.index);
  const listedKeys = compact ? listed.map((c) => keyText(label(c))) : [];
  const byCrease = (cs: number[], v: (c: number) => number) =>
    compact ? keyedJson(cs === listed ? listedKeys : cs.map((c) => keyText(label(c))), (i) => numberText(v(cs[i]))) : Object.fromEntries(cs.map((c) => [label(c), v(c)]));
  const DEG = 180 / Math.PI;
  return {
    state: a.state,
    nullity: Number.isFinite(a.nullity) ? a.nullity : null,
    partial: a.partial,
    ...(at ? { angles: Object.fromEntries(listed.map((c) => [label(c), given.find((d) => d.crease === c && d.value === at[c])?.degrees ?? at[c] * DEG])) } : {}),
    // made one at a time as they are written: each ray of an 80 × 80 sheet lists its 51,520 creases twice
    branches: new LazyArray(a.branches.length, (k) => {
      const b = a.branches[k];
      return {
        id: b.id,
        name: b.name,
        group: b.group,
        kind: b.kind,
        matchesAssignment: b.matchesAssignment,
        tangent: byCrease(listed, (c) => b.tangent[c]),
        reference: b.reference >= 0 ? label(b.reference) : null,
        ratios: byCrease([...b.ratios.keys()], (c) => b.ratios.get(c)!),
        ...(b.line ? { line: b.line.map(label) } : {}),
        verified: b.verified,
      };
    }),
    groups: a.groups.map((g) => ({ name: g.name, kind: g.kind, branches: g.branches, text: g.text })),
    messages: a.messages.map(messageJson),
  };
}

export const branchesCommand: Command = {
  name: 'branches',
  summary: 'the directions a pattern can fold from the flat state (or from any state): rays, ratios, names',
  help: `Usage: hingeplan branches <file> [--at <crease>=<deg> …] [--solution <k>] [--hold <crease>=<deg> …]
                          [--drive <crease>] [--json [--pretty]]

Lists the rays that leave a state: the tangent-cone analysis at the flat state (first order Σρu = 0 at every
vertex, second order Σρρ sin = 0), or at a folded state from the real Jacobian and the second order of the
closure. Rays are grouped: a curve through the state (its two senses, e.g. A+ and A−), or a straight crease
line folding alone (L1+, L1−, …). Where every vertex has at most four free creases the flat state's curves
are found vertex by vertex (each vertex's two modes, tied together across shared creases): every curve, or
the first 64 besides the straight lines when there are more (marked partial). Elsewhere the dense tangent-cone
analysis runs (up to 400 free creases): in closed form where the first-order motions span one or two
dimensions, else by a search from deterministic random starts, which is marked partial (every ray it lists
is one; it does not prove it found them all). Ids and names depend on the pattern and the held creases only: "+"
is the sense in which a curve's lowest-numbered moving crease folds valley-wards; the drive only sets what the
ratios are relative to. Each ray has its own signed first-order ratios (dρ/|dρ| of the reference crease: the
drive when it moves, else the curve's lowest-numbered moving crease), whether its signs match the
mountain/valley assignment, and the id for \`hingeplan sweep --branch\`.

  --at <crease>=<deg>    analyse the state with these fold angles instead of the flat state (solved as
                         \`hingeplan solve --set …\` would); repeat for more creases.
  --solution <k>         with --at: which solution (1-based); default: the first matching the assignment.
  --hold <crease>=<deg>  creases held in the analysis (they do not move along any ray; use the same holds as
                         the sweep that will follow a ray). At the flat state holds must be 0.
  --drive <crease>       ratios relative to this crease (ids and names do not change with it).
  --pretty               indent the JSON.
  --json                 {"state", "nullity", "partial", "angles"?, "branches": [{"id": <int>, "name": <string>,
                         "group", "kind": "curve"|"line"|"direction", "matchesAssignment": <bool>, "tangent":
                         {"<crease>": <num>}, "reference", "ratios": {"<crease>": <num>}, "line"?, "verified"}],
                         "groups": [{"name", "kind", "branches": [ids], "text"}], "messages"}
Exit status 0; 2 invalid input; 3 the --at values have no state.`,
  async run(argv, io) {
    const spec: OptionSpec = {
      at: { type: 'string', multiple: true },
      solution: { type: 'string' },
      hold: { type: 'string', multiple: true },
      drive: { type: 'string' },
      json: { type: 'boolean' },
      pretty: { type: 'boolean' },
    };
    const { values, positionals } = parseCommandArgs(joinNegativeNumbers(argv, spec), spec);
    const file = positionals[0];
    const loaded = await loadFile(io, file, 'branches');
    if (!loaded) return EXIT.usage;
    const { pattern } = loaded;
    const holds = holdsOption(io, loaded, values.hold as string[] | undefined, file!);
    if (!holds) return EXIT.usage;
    const drive = values.drive === undefined ? undefined : creaseOption(pattern, values.drive as string, 'drive');
    const held = holds.map((h) => h.crease);
    let analysis: BranchAnalysis;
    let at: Float64Array | undefined;
    let given: Drive[] = [];
    const ats = values.at as string[] | undefined;
    if (ats && ats.length) {
      const drives = drivesFor(io, loaded, ats.map((a) => a), file!);
      if (!drives) return EXIT.usage;
      const all = [...drives, ...holds.filter((h) => !drives.some((d) => d.crease === h.crease))];
      given = all;
      const report = solveDrives(pattern, all, { detail: 0, conditions: 0 });
      // isolated solutions, else a point of the family the values leave
      const states = report.solutions.length ? report.solutions : report.families.map((f) => f.representative);
      if (!states.length) {
        printMessages(io, report.messages, `${file}: `);
        return exitForStatus(report.status);
      }
      let k = Math.max(0, states.findIndex((s) => s.matchesAssignment));
      if (values.solution !== undefined) {
        k = intOption(values.solution as string, 'solution') - 1;
        if (k < 0 || k >= states.length) throw new UsageError(`--solution must be from 1 to ${states.length}, got ${k + 1}`);
      }
      at = states[k].angles;
      analysis = branchesAt(pattern, at, { held, drive });
    } else {
      if (holds.some((h) => h.value !== 0)) throw new UsageError('--hold values must be 0 at the flat state (use --at to analyse a folded state)');
      analysis = flatBranches(pattern, { held, drive });
    }
    if (values.json) {
      writeWholeJson(io, 'branches', analysisJson(pattern, analysis, at, given, !values.pretty), !!values.pretty);
      return EXIT.ok;
    }
    if (values.pretty) throw new UsageError('--pretty is for --json');
    const out: string[] = [];
    const kind = analysis.state === 'flat' ? '' : ` (${analysis.state})`;
    out.push(`${pattern.name}: ${analysis.branches.length} rays leave the ${at ? `state at ${(ats ?? []).join(', ')}` : 'flat state'}${kind}${analysis.partial ? '; partial analysis' : ''}`);
    for (const m of analysis.messages) out.push(`  ${m.severity}: ${m.text}`);
    if (analysis.branches.length) {
      out.push('');
      const label = (c: number) => pattern.creases[c].label;
      out.push(textTable(['id', 'name', 'matches M/V', 'moves', 'reference', 'ratios (first order)'], analysis.branches.map((b) => {
        const entries = [...b.ratios].filter(([c]) => c !== b.reference);
        const text = entries.slice(0, 5).map(([c, r]) => `${label(c)} ${r.toFixed(4)}`).join(', ') + (entries.length > 5 ? ', …' : '');
        return [b.id, b.name, b.matchesAssignment ? 'yes' : 'no', `${b.ratios.size} creases`, b.reference >= 0 ? label(b.reference) : '', text];
      }), ['r', 'l', 'l', 'r', 'l', 'l']).trimEnd());
      out.push('');
      for (const g of analysis.groups) out.push(`${g.name}: ${g.text} (ids ${g.branches.join(', ')})`);
    }
    out.push(CAUTIONS);
    writeWhole(io, 'branches', out.join('\n') + '\n', undefined, [], 'text');
    return EXIT.ok;
  },
};
