// The JSON shapes of solve reports on the command line (a contract: later tools parse them).
import type { Drive, Message, Pattern, Solution, SolveReport } from '../solver/types';
import { LazyArray } from '../solver/formats/json-text';

const DEG = 180 / Math.PI;

/** JSON has no ∞: infinite or undefined numbers become null. */
export function finite(x: number | undefined): number | null {
  return x === undefined || !Number.isFinite(x) ? null : x;
}

/** Every crease's angle in degrees by label; a driven crease at its drive value as the person gave it (60, not 59.99999999999999). */
export function anglesByLabel(pattern: Pattern, angles: Float64Array, drives: Drive[] = []): Record<string, number> {
  const out: Record<string, number> = {};
  for (const c of pattern.creases) out[c.label] = angles[c.index] * DEG;
  for (const d of drives) if (d.degrees !== undefined && angles[d.crease] === d.value) out[pattern.creases[d.crease].label] = d.degrees;
  return out;
}

/** What a command checked on each solution: contacts (panel pairs) and the drives' holding torque (N·m). */
export interface SolutionChecks {
  contacts?: [number, number][];
  stackedPanels?: [number, number][];
  torque?: Map<number, number>;
}

export function solutionJson(pattern: Pattern, s: Solution, index: number, drives: Drive[] = [], checks?: SolutionChecks) {
  // per free crease (movable, not a drive): its rate against each drive, degrees per degree
  const sensitivity: Record<string, Record<string, number>> = {};
  for (const c of pattern.creases) {
    if (c.assignment === 'B' || c.assignment === 'F' || s.sensitivity.has(c.index)) continue;
    const row: Record<string, number> = {};
    for (const [drive, values] of s.sensitivity) row[pattern.creases[drive].label] = values[c.index];
    if (s.sensitivity.size) sensitivity[c.label] = row;
  }
  return {
    index,
    angles: anglesByLabel(pattern, s.angles, drives),
    maxResidual: s.maxResidual,
    matchesAssignment: s.matchesAssignment,
    localDof: s.localDof,
    ...(s.nullity ? { nullity: s.nullity } : {}),
    ...(Number.isNaN(s.condition) ? { conditionEvaluated: false } : { condition: finite(s.condition) }),
    signs: s.signs,
    ...(s.stacked?.length ? { stacked: s.stacked.map((c) => pattern.creases[c].label) } : {}),
    sensitivity,
    vertexResiduals: Object.fromEntries(pattern.interiorVertices.map((iv, i) => [String(iv.vertex), s.vertexResiduals[i]])),
    ...(checks?.contacts ? { contacts: checks.contacts } : {}),
    ...(checks?.stackedPanels?.length ? { stackedPanels: checks.stackedPanels } : {}),
    ...(checks?.torque ? { torque: Object.fromEntries([...checks.torque].map(([c, v]) => [pattern.creases[c].label, v])) } : {}),
  };
}

export function messageJson(m: Message) {
  return { severity: m.severity, code: m.code, text: m.text, ...(m.where ? { where: m.where } : {}) };
}

export function reportJson(pattern: Pattern, drives: Drive[], report: SolveReport, checks?: { contact: { checked: boolean; clearance: number }; solutions: SolutionChecks[]; torque: boolean }) {
  const labels = (cs: number[] | undefined) => cs?.map((c) => pattern.creases[c].label);
  return {
    status: report.status,
    dof: report.dof,
    patternDof: finite(report.patternDof),
    drives: Object.fromEntries(drives.map((d) => [pattern.creases[d.crease].label, d.degrees ?? d.value * DEG])),
    // made one at a time as they are written: 64 solutions of an 80 × 80 sheet are 10 million entries
    solutions: new LazyArray(report.solutions.length, (i) => solutionJson(pattern, report.solutions[i], i + 1, drives, checks?.solutions[i])),
    ...(checks ? { contact: checks.contact, ...(checks.torque ? { torqueUnits: 'N·m' } : {}) } : {}),
    families: report.families.map((f) => ({
      dof: f.dof,
      representative: solutionJson(pattern, f.representative, 0, drives).angles,
      directions: f.directions.map((d) => Object.fromEntries([...d].map(([c, v]) => [pattern.creases[c].label, v]))),
      matchesAssignment: f.matchesAssignment,
    })),
    search: report.search,
    ...(report.compromise ? { compromise: solutionJson(pattern, report.compromise, 0) } : {}),
    ...(report.excluded?.length ? { excluded: report.excluded.map((s, i) => solutionJson(pattern, s, i + 1, drives)) } : {}),
    ...(report.suggestedDrives ? { suggestedDrives: labels(report.suggestedDrives) } : {}),
    ...(report.conflictingDrives ? { conflictingDrives: labels(report.conflictingDrives) } : {}),
    ...(report.reachableRange ? { reachableRange: report.reachableRange.map(([a, b]) => [a * DEG, b * DEG]) } : {}),
    messages: report.messages.map(messageJson),
  };
}
