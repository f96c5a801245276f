// The JSON shapes of solve reports on the command line (a contract: later tools parse them).
import type { Drive, Message, Pattern, Solution, SolveReport } from '../solver/types';
import { keyedJson, keyText, LazyArray, numberText } from '../solver/formats/json-text';

const DEG = 180 / Math.PI;

/** JSON has no ∞: infinite or undefined numbers become null. */
export function finite(x: number | undefined): number | null {
  return x === undefined || !Number.isFinite(x) ? null : x;
}

/** Every crease's angle in degrees by label; a driven crease at its drive value as the person gave it (60, not 59.99999999999999). */
export function anglesByLabel(pattern: Pattern, angles: Float64Array, drives: Drive[] = []): Record<string, number> {
  const out: Record<string, number> = {};
  for (const c of pattern.creases) out[c.label] = angleDeg(angles, drives, c.index);
  return out;
}

function angleDeg(angles: Float64Array, drives: Drive[], c: number): number {
  const d = drives.find((x) => x.crease === c && x.degrees !== undefined && angles[c] === x.value);
  return d ? d.degrees! : angles[c] * DEG;
}

/** The creases' labels as JSON member names, made once per pattern. */
const labelKeys = new WeakMap<Pattern, string[]>();
function labelKeysOf(pattern: Pattern): string[] {
  let keys = labelKeys.get(pattern);
  if (!keys) labelKeys.set(pattern, (keys = pattern.creases.map((c) => keyText(c.label))));
  return keys;
}

/** anglesByLabel as JSON: `compact`, text in one piece; else the object. */
function anglesJson(pattern: Pattern, angles: Float64Array, drives: Drive[], compact: boolean): unknown {
  return compact ? keyedJson(labelKeysOf(pattern), (c) => numberText(angleDeg(angles, drives, c))) : anglesByLabel(pattern, angles, drives);
}

/** What a command checked on each solution: contacts (panel pairs) and the drives' holding torque (N·m). */
export interface SolutionChecks {
  contacts?: [number, number][];
  stackedPanels?: [number, number][];
  torque?: Map<number, number>;
}

/**
 * A solution as JSON. `compact`: the members per crease (angles, sensitivity, vertex residuals) are written
 * as text in one piece each, the same JSON as the objects (tests/cli.test.ts compares them); else objects,
 * for the indented form.
 */
export function solutionJson(pattern: Pattern, s: Solution, index: number, drives: Drive[] = [], checks?: SolutionChecks, compact = false) {
  const driving = [...s.sensitivity.keys()];
  // per free crease (movable, not a drive): its rate against each drive, degrees per degree
  const free = (c: Pattern['creases'][number]) => driving.length > 0 && c.assignment !== 'B' && c.assignment !== 'F' && !s.sensitivity.has(c.index);
  const vertexKeys = pattern.interiorVertices.map((iv) => String(iv.vertex));
  let sensitivity: unknown, vertexResiduals: unknown;
  if (compact) {
    const keys = labelKeysOf(pattern);
    const driveKeys = driving.map((d) => keys[d]);
    const rows = driving.map((d) => s.sensitivity.get(d)!);
    sensitivity = keyedJson(keys, (c) => (free(pattern.creases[c]) ? '{' + rows.map((r, k) => driveKeys[k] + ':' + numberText(r[c])).join(',') + '}' : undefined));
    vertexResiduals = keyedJson(vertexKeys.map(keyText), (i) => numberText(s.vertexResiduals[i]));
  } else {
    const rows: Record<string, Record<string, number>> = {};
    for (const c of pattern.creases) if (free(c)) rows[c.label] = Object.fromEntries(driving.map((d) => [pattern.creases[d].label, s.sensitivity.get(d)![c.index]]));
    sensitivity = rows;
    vertexResiduals = Object.fromEntries(vertexKeys.map((v, i) => [v, s.vertexResiduals[i]]));
  }
  return {
    index,
    angles: anglesJson(pattern, s.angles, drives, compact),
    maxResidual: s.maxResidual,
    matchesAssignment: s.matchesAssignment,
    localDof: s.localDof,
    ...(s.nullity ? { nullity: s.nullity } : {}),
    ...(Number.isNaN(s.condition) ? { conditionEvaluated: false } : { condition: finite(s.condition) }),
    signs: s.signs,
    ...(s.stacked?.length ? { stacked: s.stacked.map((c) => pattern.creases[c].label) } : {}),
    sensitivity,
    vertexResiduals,
    ...(checks?.contacts ? { contacts: checks.contacts } : {}),
    ...(checks?.stackedPanels?.length ? { stackedPanels: checks.stackedPanels } : {}),
    ...(checks?.torque ? { torque: Object.fromEntries([...checks.torque].map(([c, v]) => [pattern.creases[c].label, v])) } : {}),
  };
}

export function messageJson(m: Message) {
  return { severity: m.severity, code: m.code, text: m.text, ...(m.where ? { where: m.where } : {}) };
}

export function reportJson(pattern: Pattern, drives: Drive[], report: SolveReport, checks?: { contact: { checked: boolean; clearance: number }; solutions: SolutionChecks[]; torque: boolean }, compact = false) {
  const labels = (cs: number[] | undefined) => cs?.map((c) => pattern.creases[c].label);
  return {
    status: report.status,
    dof: report.dof,
    patternDof: finite(report.patternDof),
    drives: Object.fromEntries(drives.map((d) => [pattern.creases[d.crease].label, d.degrees ?? d.value * DEG])),
    // made one at a time as they are written: 64 solutions of an 80 × 80 sheet are 10 million entries
    solutions: new LazyArray(report.solutions.length, (i) => solutionJson(pattern, report.solutions[i], i + 1, drives, checks?.solutions[i], compact)),
    ...(checks ? { contact: checks.contact, ...(checks.torque ? { torqueUnits: 'N·m' } : {}) } : {}),
    families: report.families.map((f) => ({
      dof: f.dof,
      representative: anglesJson(pattern, f.representative.angles, drives, compact),
      directions: f.directions.map((d) => Object.fromEntries([...d].map(([c, v]) => [pattern.creases[c].label, v]))),
      matchesAssignment: f.matchesAssignment,
    })),
    search: report.search,
    ...(report.compromise ? { compromise: solutionJson(pattern, report.compromise, 0, [], undefined, compact) } : {}),
    ...(report.excluded?.length ? { excluded: report.excluded.map((s, i) => solutionJson(pattern, s, i + 1, drives, undefined, compact)) } : {}),
    ...(report.suggestedDrives ? { suggestedDrives: labels(report.suggestedDrives) } : {}),
    ...(report.conflictingDrives ? { conflictingDrives: labels(report.conflictingDrives) } : {}),
    ...(report.reachableRange ? { reachableRange: report.reachableRange.map(([a, b]) => [a * DEG, b * DEG]) } : {}),
    messages: report.messages.map(messageJson),
  };
}
