import type { Command } from '../command';

/** A subcommand as `hingeplan --help` lists it; its code is loaded only when it runs (start-up stays short). */
export interface CommandEntry {
  name: string;
  summary: string;
  /**
   * the command computes in resumable steps and writes what it has on Ctrl-C: Ctrl-C is watched from the
   * start. Other commands keep the default (Ctrl-C ends them at once, nothing written) until their
   * computation is done, then watch it while they write.
   */
  resumable?: boolean;
  load(): Promise<Command>;
}

/** Every subcommand, in the order `hingeplan --help` lists them. */
export const commands: CommandEntry[] = [
  { name: 'check', summary: 'validate a pattern file and summarise it (vertices, creases, panels, sheet, limits, diagnostics)', load: async () => (await import('./check')).check },
  { name: 'solve', summary: 'find every fold angle from the drives: all solutions, status, sensitivities', load: async () => (await import('./solve')).solve },
  { name: 'shape', summary: 'the folded shape for the drives: vertex positions (JSON), OBJ or ASCII STL', load: async () => (await import('./shape')).shape },
  { name: 'new', summary: 'write a project file from a built-in generator (vertex, miura, waterbomb, degree5)', load: async () => (await import('./new')).newCommand },
  { name: 'convert', summary: 'convert between the project file (.hingeplan.json), FOLD (.fold), DXF (.dxf) and SVG (.svg)', load: async () => (await import('./convert')).convert },
  { name: 'branches', summary: 'the directions a pattern can fold from the flat state (or from any state): rays, ratios, names', load: async () => (await import('./branches')).branchesCommand },
  { name: 'sweep', resumable: true, summary: 'follow the folding as one drive moves: every hinge angle and rate at each sample, and events', load: async () => (await import('./sweep')).sweepCommand },
  { name: 'grid', resumable: true, summary: 'every hinge angle over a grid of two drives', load: async () => (await import('./grid')).gridCommand },
  { name: 'follow', resumable: true, summary: 'follow a drive schedule (CSV of time and drive angles): every hinge angle per row, or a flag', load: async () => (await import('./follow')).followCommand },
  { name: 'table', resumable: true, summary: 'write the actuator angle table (CSV or JSON) with its metadata header', load: async () => (await import('./table')).tableCommand },
  { name: 'schedule', resumable: true, summary: 'a time-stamped deployment schedule: every hinge angle, velocity and acceleration; limit flags', load: async () => (await import('./schedule')).scheduleCommand },
  { name: 'tolerance', resumable: true, summary: 'will the manufactured sheet still fold? hinge spread, misfit and worst vertices over random sheets', load: async () => (await import('./tolerance')).toleranceCommand },
];

/** Edit distance (insertions, deletions, substitutions, transpositions of neighbours), for "did you mean". */
export function editDistance(a: string, b: string): number {
  const d: number[][] = Array.from({ length: a.length + 1 }, (_, i) => [i, ...Array(b.length).fill(0)]);
  for (let j = 1; j <= b.length; j++) d[0][j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[a.length][b.length];
}

/** The command a mistyped name most likely meant: a unique one it begins, else the nearest within a third of its length. */
export function nearestCommand(name: string): string | undefined {
  const lower = name.toLowerCase();
  const starts = commands.filter((c) => c.name.startsWith(lower));
  if (lower.length >= 2 && starts.length === 1) return starts[0].name;
  let best: string | undefined, bestD = Infinity;
  for (const c of commands) {
    const dist = editDistance(lower, c.name);
    if (dist < bestD) { bestD = dist; best = c.name; }
  }
  return bestD <= Math.max(1, Math.floor(lower.length / 3)) ? best : undefined;
}
