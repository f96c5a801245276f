// What the views show, computed from the state as plain functions: the status in words, the state on
// screen (a solution or a path sample), the hinge table rows and its CSV, the tint scale, chart curves.

import { ContactChecker } from '../../solver/outputs/contact';
import type { Pattern } from '../../solver/types';
import type { PathResultDto, ProjectDto, SolutionDto, SolveResultDto } from '../../electron/contract';
import { CAUTIONS } from '../../solver/formats/cautions';
import { angleColor } from '../palette';
import type { AppState } from './app';
import { creaseIndexByLabel, creaseLabel, limitDeg, limitState } from './document';

// ---------- the status in words ----------

export interface StatusWords {
  /** one or two words: the kind of specification */
  headline: string;
  /** a sentence saying what it means and what to do */
  detail: string;
  tone: 'good' | 'note' | 'bad';
}

const listLabels = (labels: string[] | undefined, max = 6): string => {
  if (!labels?.length) return '';
  const shown = labels.slice(0, max).join(', ');
  return labels.length > max ? `${shown} and ${labels.length - max} more` : shown;
};

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

export function statusInWords(result: SolveResultDto | undefined, driveCount: number, drives: string[] = []): StatusWords {
  if (!result) return { headline: 'Not solved yet', detail: 'Set a drive to fold the pattern.', tone: 'note' };
  const firstError = result.messages.find((m) => m.severity === 'error')?.text;
  const fam = result.families.length;
  const famWords = fam ? ` ${plural(fam, 'family', 'families')} of states also ${fam === 1 ? 'passes' : 'pass'} through these values.` : '';
  switch (result.status) {
    case 'solved':
      return { headline: 'Solved', detail: `One folded state meets the drives.${famWords}`, tone: 'good' };
    case 'several-solutions':
      return {
        headline: 'Several solutions',
        detail: `${result.solutions.length} folded states meet the drives; choose one below.${famWords}`,
        tone: 'note',
      };
    case 'underspecified': {
      const add = listLabels(result.suggestedDrives);
      return {
        headline: 'Underspecified',
        detail:
          driveCount === 0
            ? `No drive is set; the pattern has ${plural(result.patternDof, 'degree')} of freedom.${add ? ` Mark a drive, e.g. ${add}.` : ''}`
            : `${plural(result.dof, 'degree')} of freedom left: the drives leave ${fam ? `${plural(fam, 'family', 'families')} of states` : 'a family of states'}, not one state.${add ? ` Add a drive at ${add}.` : ''}`,
        tone: 'note',
      };
    }
    case 'overspecified': {
      // consistent: the extra drives agree with the others, so it is a note, not an error
      const implied = (result.conflictingDrives ?? []).filter((d) => drives.includes(d));
      const free = drives.filter((d) => !implied.includes(d));
      const which =
        implied.length && implied.length < drives.length
          ? ` ${listLabels(implied)} ${implied.length === 1 ? 'follows' : 'follow'} from ${listLabels(free)}; remove ${implied.length === 1 ? 'it' : 'them'} or let ${implied.length === 1 ? 'it' : 'them'} follow.`
          : implied.length
            ? (() => {
                const extra = Math.max(1, drives.length - result.patternDof);
                const others = implied.length - extra === 1 ? 'the other' : 'the others';
                return extra === 1 ? ` One of ${listLabels(implied)} follows from ${others}; remove one.` : ` ${extra} of ${listLabels(implied)} follow from ${others}; remove ${extra}.`;
              })()
            : ' Remove a drive.';
      return {
        headline: 'Overspecified, consistent',
        detail: `${plural(driveCount, 'drive')} for a pattern with ${plural(result.patternDof, 'degree')} of freedom; the values agree.${which}`,
        tone: 'note',
      };
    }
    case 'inconsistent': {
      const worst = (result.worstVertices ?? []).map(([v, r]) => `vertex ${v} (${((r * 180) / Math.PI).toFixed(2)}°)`);
      return {
        headline: 'Inconsistent',
        detail: `No folded state meets all drives.${result.conflictingDrives?.length ? ` Conflicting drives: ${listLabels(result.conflictingDrives)}.` : ''}${worst.length ? ` Worst vertices: ${worst.join(', ')}.` : ''}`,
        tone: 'bad',
      };
    }
    case 'dependent-drives':
      return {
        headline: 'Dependent drives',
        detail: `${result.conflictingDrives?.length ? `${listLabels(result.conflictingDrives)} move together: one of them fixes the other. ` : ''}Remove one of them.`,
        tone: 'bad',
      };
    case 'unreachable': {
      const ranges = (result.reachableRangeDeg ?? []).map(([a, b]) => `${a.toFixed(1)}° to ${b.toFixed(1)}°`);
      const stops = result.excluded?.length ? ` ${plural(result.excluded.length, 'state')} would close but ${result.excluded.length === 1 ? 'puts' : 'put'} a hinge past its stop (drawn in the past-limit colour).` : '';
      return {
        headline: 'Unreachable',
        detail: `The pattern cannot fold to this drive value.${ranges.length ? ` Reachable: ${ranges.join(', ')}.` : ''}${stops}`,
        tone: 'bad',
      };
    }
    case 'not-isolated':
      return {
        headline: 'Not isolated',
        detail: `The drives do not pin the pattern down here: ${plural(result.dof, 'degree')} of freedom left at this state, a family passes through it.`,
        tone: 'note',
      };
    case 'invalid': {
      const stop = result.messages.find((m) => m.code === 'drive-outside-limit');
      if (stop) return { headline: 'Past a hinge stop', detail: `${stop.text} The last solved state stays on screen.`, tone: 'bad' };
      return { headline: 'Cannot solve', detail: firstError ?? 'The pattern or the drives have errors; see the messages.', tone: 'bad' };
    }
  }
}

// ---------- the state on screen ----------

export interface ShownState {
  anglesDeg: number[];
  /** d(crease)/d(rate drive), degrees per degree; null where unknown */
  rates: (number | null)[] | null;
  /** the drive the rates are against (label), when there are rates */
  rateDrive?: string;
  source: 'solution' | 'family' | 'last-valid' | 'excluded' | 'compromise' | 'path' | 'flat';
  caption: string;
  solution?: SolutionDto;
  /** pairs of panels in contact in this state, when it was checked */
  contacts?: [number, number][];
}

export function shownState(state: AppState, creaseCount: number): ShownState {
  const project = state.doc?.history.present;
  const path = state.path.result;
  if (state.scrubIndex !== null && path && path.samples[state.scrubIndex]) {
    const s = path.samples[state.scrubIndex];
    return { anglesDeg: s.anglesDeg, rates: s.rates, rateDrive: path.driveLabel, source: 'path', caption: `path sample ${state.scrubIndex + 1} of ${path.samples.length}, ${path.driveLabel} = ${s.driveDeg.toFixed(2)}°${s.contact ? ' (past the first contact)' : ''}`, contacts: s.contacts ?? [] };
  }
  const fits = (s: SolutionDto | undefined) => !!s && s.anglesDeg.length === creaseCount;
  const result = state.solve.result;
  const rateDrive = rateDriveOf(state, project);
  if (result && state.selectedFamily !== null && fits(result.families[state.selectedFamily]?.representative)) {
    const f = result.families[state.selectedFamily];
    return { anglesDeg: f.representative.anglesDeg, rates: null, source: 'family', caption: `one state of family ${state.selectedFamily + 1} (${plural(f.dof, 'degree')} of freedom)`, solution: f.representative };
  }
  if (result && result.solutions.length && fits(result.solutions[0])) {
    const i = Math.min(state.selectedSolution, result.solutions.length - 1);
    const sol = result.solutions[i];
    // a state on a continuum has no sensitivities: its rates are not defined there
    if (sol.localDof > 0) return { anglesDeg: sol.anglesDeg, rates: null, source: 'solution', caption: `state ${i + 1} of ${result.solutions.length} found, on a family (${plural(sol.localDof, 'degree')} of freedom)`, solution: sol };
    return { anglesDeg: sol.anglesDeg, rates: ratesOf(sol, project, creaseCount, rateDrive), rateDrive, source: 'solution', caption: `solution ${i + 1} of ${result.solutions.length}`, solution: sol };
  }
  const last = state.solve.lastValid;
  if (last && last.result.solutions.length && fits(last.result.solutions[0])) {
    const sol = last.result.solutions[Math.min(last.selected, last.result.solutions.length - 1)];
    const driveStop = !!result?.messages.some((m) => m.code === 'drive-outside-limit');
    const caption = driveStop ? 'last solved state (a drive is now past its stop)' : 'last solved state (it is now past a hinge stop)';
    return { anglesDeg: sol.anglesDeg, rates: ratesOf(sol, project, creaseCount, rateDrive), rateDrive, source: 'last-valid', caption, solution: sol };
  }
  if (result?.excluded?.length && fits(result.excluded[0])) {
    return { anglesDeg: result.excluded[0].anglesDeg, rates: null, source: 'excluded', caption: 'a state past a hinge stop (not a solution)', solution: result.excluded[0] };
  }
  if (result?.compromise && fits(result.compromise)) {
    return { anglesDeg: result.compromise.anglesDeg, rates: null, source: 'compromise', caption: 'closest compromise (does not close)', solution: result.compromise };
  }
  return { anglesDeg: new Array(creaseCount).fill(0), rates: null, source: 'flat', caption: 'flat sheet' };
}

/** The drive rates are shown against: the one chosen, when it is still a drive, else the first. */
export function rateDriveOf(state: AppState, project: ProjectDto | undefined): string | undefined {
  const drives = project?.drives ?? [];
  return drives.find((d) => d.crease === state.rateDrive)?.crease ?? drives[0]?.crease;
}

/** Rate of every crease with respect to one drive (default the first), from the solution's sensitivity. */
export function ratesOf(sol: SolutionDto, project: ProjectDto | undefined, creaseCount: number, driveLabel?: string): (number | null)[] | null {
  if (!project || !project.drives.length) return null;
  const drive = creaseIndexByLabel(project, driveLabel ?? project.drives[0].crease);
  if (drive === undefined) return null;
  const rates: (number | null)[] = new Array(creaseCount).fill(null);
  for (const d of project.drives) {
    const k = creaseIndexByLabel(project, d.crease);
    // a drive moves only with itself; the other drives are held while this one moves
    if (k !== undefined) rates[k] = k === drive ? 1 : 0;
  }
  for (const [c, d, v] of sol.sensitivity) if (d === drive) rates[c] = v;
  return rates;
}

// ---------- hinge table ----------

export interface HingeRow {
  index: number;
  label: string;
  assignment: string;
  minDeg?: number;
  maxDeg?: number;
  angleDeg: number;
  rate: number | null;
  status: string;
  isDrive: boolean;
  violates: boolean;
}

export const ASSIGNMENT_WORDS: Record<string, string> = { M: 'mountain', V: 'valley', U: 'unassigned', F: 'flat (held)', B: 'boundary' };

export function hingeRows(project: ProjectDto, shown: ShownState, includeBoundary = false): HingeRow[] {
  const driveLabels = new Set(project.drives.map((d) => d.crease));
  const rows: HingeRow[] = [];
  const n = project.source.edges.length;
  for (let i = 0; i < n; i++) {
    const assignment = project.source.assignments[i];
    if (assignment === 'B' && !includeBoundary) continue;
    const label = creaseLabel(project, i);
    const angleDeg = shown.anglesDeg[i] ?? 0;
    const { minDeg, maxDeg } = limitDeg(project, i);
    const lim = limitState(project, i, angleDeg);
    const isDrive = driveLabels.has(label);
    const sign = angleDeg > 1e-6 ? 'V' : angleDeg < -1e-6 ? 'M' : '0';
    const words: string[] = [];
    if (isDrive) words.push('drive');
    if (assignment === 'F') words.push('held flat');
    if (lim === 'beyond') words.push('past stop');
    else if (lim === 'at-limit') words.push('at stop');
    if ((assignment === 'M' && sign === 'V') || (assignment === 'V' && sign === 'M')) words.push('opposes M/V');
    if (Math.abs(Math.abs(angleDeg) - 180) < 0.5) words.push('folded flat');
    rows.push({ index: i, label, assignment, minDeg, maxDeg, angleDeg, rate: shown.rates?.[i] ?? null, status: words.join(', ') || 'ok', isDrive, violates: lim === 'beyond' });
  }
  return rows;
}

export type SortKey = 'index' | 'label' | 'assignment' | 'angle' | 'rate' | 'status';

export function sortRows(rows: HingeRow[], key: SortKey, descending: boolean): HingeRow[] {
  const value = (r: HingeRow): number | string => {
    switch (key) {
      case 'index': return r.index;
      case 'label': return r.label;
      case 'assignment': return r.assignment;
      case 'angle': return r.angleDeg;
      case 'rate': return r.rate ?? -Infinity;
      case 'status': return r.status;
    }
  };
  const collator = new Intl.Collator(undefined, { numeric: true });
  const sorted = [...rows].sort((a, b) => {
    const va = value(a), vb = value(b);
    const c = typeof va === 'number' && typeof vb === 'number' ? va - vb : collator.compare(String(va), String(vb));
    return c || a.index - b.index;
  });
  return descending ? sorted.reverse() : sorted;
}

function csvField(v: string): string {
  return /[",\n\r]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** The hinge table as CSV (RFC 4180 quoting), with the cautions line every exported table carries. */
export function hingeTableCsv(rows: HingeRow[], caption: string): string {
  const lines = [
    `# ${CAUTIONS}`,
    `# hinge table, ${caption}; angles in degrees, valley positive, mountain negative`,
    ['index', 'label', 'assignment', 'min_deg', 'max_deg', 'angle_deg', 'rate_deg_per_deg', 'status'].join(','),
  ];
  for (const r of rows) {
    lines.push(
      [
        String(r.index),
        csvField(r.label),
        r.assignment,
        r.minDeg !== undefined ? r.minDeg.toFixed(4) : '',
        r.maxDeg !== undefined ? r.maxDeg.toFixed(4) : '',
        r.angleDeg.toFixed(6),
        r.rate === null ? '' : r.rate.toFixed(6),
        csvField(r.status),
      ].join(','),
    );
  }
  return lines.join('\n') + '\n';
}

// ---------- tint by signed fold angle ----------

/** The colour of a signed fold angle (degrees): Hingeplan's diverging scale (renderer/palette.ts). */
export const tintScale = (angleDeg: number): string => angleColor(angleDeg);

/** Tints are drawn in steps of this many degrees, so a sheet of thousands of creases needs few paths. */
export const TINT_STEP_DEG = 5;

export function tintBucket(angleDeg: number): number {
  return Math.round(Math.max(-180, Math.min(180, angleDeg)) / TINT_STEP_DEG);
}

const bucketColors = new Map<number, string>();
export function bucketColor(bucket: number): string {
  let c = bucketColors.get(bucket);
  if (c === undefined) {
    c = angleColor(bucket * TINT_STEP_DEG);
    bucketColors.set(bucket, c);
  }
  return c;
}

// ---------- path charts ----------

export interface CurveGroup {
  /** crease indices that follow this same curve */
  creases: number[];
  /** one value per sample */
  values: number[];
}

/**
 * Creases whose curves coincide (a Miura sheet has a handful of distinct curves for thousands of creases)
 * are drawn once; the legend says how many creases each line stands for.
 */
export function groupCurves(path: PathResultDto, creases: number[], pick: 'angle' | 'rate', tolerance = 1e-6): CurveGroup[] {
  const groups = new Map<string, CurveGroup>();
  const quantum = tolerance * 10;
  for (const c of creases) {
    const values = path.samples.map((s) => (pick === 'angle' ? s.anglesDeg[c] : (s.rates[c] ?? NaN)));
    const key = values.map((v) => (Number.isFinite(v) ? Math.round(v / quantum) : 'x')).join(',');
    const g = groups.get(key);
    if (g) g.creases.push(c);
    else groups.set(key, { creases: [c], values });
  }
  return [...groups.values()];
}

/** Sample index nearest to a drive value. */
export function sampleNearest(path: PathResultDto, driveDeg: number): number {
  let best = 0;
  let bestD = Infinity;
  path.samples.forEach((s, i) => {
    const d = Math.abs(s.driveDeg - driveDeg);
    if (d < bestD) {
      bestD = d;
      best = i;
    }
  });
  return best;
}

export function formatAngle(deg: number, digits = 2): string {
  const v = Math.abs(deg) < 0.5 * 10 ** -digits ? 0 : deg;
  return `${v.toFixed(digits)}°`;
}

/** Every panel that is in contact with another in the shown state: a path sample's from the path, else checked here. */
export function contactPanels(shown: ShownState, pattern: Pattern | undefined): Set<number> {
  const out = new Set<number>();
  let pairs = shown.contacts;
  if (!pairs && pattern && shown.source === 'solution') pairs = solutionContacts(pattern, shown.anglesDeg);
  for (const [p, q] of pairs ?? []) { out.add(p); out.add(q); }
  return out;
}

// one checker per pattern: its triangulation and pair relations are built once, each state then costs a few ms
const checkers = new WeakMap<Pattern, ContactChecker>();
function solutionContacts(pattern: Pattern, anglesDeg: readonly number[]): [number, number][] {
  let c = checkers.get(pattern);
  if (!c) { c = new ContactChecker(pattern); checkers.set(pattern, c); }
  return c.checkAngles(Float64Array.from(anglesDeg, (a) => (a * Math.PI) / 180)).contacts.map((x) => x.panels);
}
