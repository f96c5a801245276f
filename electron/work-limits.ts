// How much work the app takes on in one request, counted and checked before anything is allocated. A path
// travels whole to the window (worker → main → renderer, checked against the contract at each step), and
// a table is written as one text, so both are bounded by what they hold: samples × creases for a path,
// rows × value columns for a table. A refusal names the option to change and the limit; nothing is cut
// short silently. The solver core has limits of its own (samples per sweep, rows per schedule).

import { JobFailure } from './worker-protocol';

/**
 * Samples × creases of a path sent to the window: 8 million (a 20 × 20 Miura sheet, 3,280 creases, at 0.1°;
 * a 40 × 40 one at 0.3°). Such a path is about 1 GB across the processes while it travels.
 */
export const MAX_PATH_VALUES = 8_000_000;
/** Rows × value columns of a table the app writes: 10 million cells, about 200 MB of text (a string holds 512 MiB at most). */
export const MAX_TABLE_CELLS = 10_000_000;
/** Rows of a schedule, as the solver takes them. */
export const MAX_SCHEDULE_ROWS = 100_000;

const grouped = (n: number) => Math.round(n).toLocaleString('en-US');
const millions = (n: number) => {
  const m = n / 1e6;
  return `${m >= 100 ? grouped(m) : String(+m.toPrecision(3))} million`;
};

/** The smallest step (rounded up to two significant digits) that keeps a path within `maxSamples`. */
function smallestStep(spanDeg: number, maxSamples: number): string {
  const step = spanDeg / Math.max(1, maxSamples - 2);
  const scale = 10 ** (Math.floor(Math.log10(step)) - 1);
  return String(+(Math.ceil(step / scale) * scale).toPrecision(2));
}

/** Samples a sweep from → to every step asks for (the end value included), without listing them. */
export function sampleCount(fromDeg: number, toDeg: number, stepDeg: number): number {
  return Math.floor(Math.abs(toDeg - fromDeg) / stepDeg + 1e-9) + 2;
}

/** Refuse a path whose samples × creases the window cannot take. */
export function checkPathSize(fromDeg: number, toDeg: number, stepDeg: number, creases: number): void {
  const samples = sampleCount(fromDeg, toDeg, stepDeg);
  if (samples * creases <= MAX_PATH_VALUES) return;
  throw new JobFailure(
    'path-too-large',
    `A path of ${grouped(samples)} samples over ${grouped(creases)} creases is ${millions(samples * creases)} values; the window takes at most ${millions(MAX_PATH_VALUES)}. Use a step of at least ${smallestStep(Math.abs(toDeg - fromDeg), Math.floor(MAX_PATH_VALUES / creases))}° or a shorter range.`,
    'step',
  );
}

/** Rows a schedule of `timeS` seconds gets from a time step or a row count (default 101), without listing them. */
export function scheduleRowCount(timeS: number, dtS?: number, rows?: number): number {
  if (dtS !== undefined) return Math.floor(timeS / dtS + 1e-9) + 2;
  return rows ?? 101;
}

/** Refuse a schedule with more rows than the solver takes, or more cells than the app writes. */
export function checkScheduleSize(timeS: number, dtS: number | undefined, rows: number | undefined, creases: number): void {
  const count = scheduleRowCount(timeS, dtS, rows);
  const option = dtS !== undefined ? 'time step' : 'rows';
  if (count > MAX_SCHEDULE_ROWS) {
    throw new JobFailure(
      'too-many-rows',
      dtS !== undefined
        ? `A time step of ${dtS} s over ${timeS} s gives ${grouped(count)} rows; a schedule takes at most ${grouped(MAX_SCHEDULE_ROWS)}. Use a time step of at least ${+(timeS / (MAX_SCHEDULE_ROWS - 2)).toPrecision(2)} s.`
        : `${grouped(count)} rows is more than the ${grouped(MAX_SCHEDULE_ROWS)} a schedule takes.`,
      option,
    );
  }
  // every hinge gets an angle, a velocity and an acceleration column
  const cells = count * creases * 3;
  if (cells > MAX_TABLE_CELLS) {
    throw new JobFailure(
      'table-too-large',
      `A schedule of ${grouped(count)} rows over ${grouped(creases)} creases is ${millions(cells)} cells (angle, velocity and acceleration of each); the app writes at most ${millions(MAX_TABLE_CELLS)}. Use at most ${grouped(Math.floor(MAX_TABLE_CELLS / (3 * creases)))} rows.`,
      option,
    );
  }
}

/** Refuse an angle table with more cells than the app writes. */
export function checkAngleTableSize(samples: number, columns: number, rates: boolean): void {
  const cells = samples * columns * (rates ? 2 : 1);
  if (cells <= MAX_TABLE_CELLS) return;
  throw new JobFailure(
    'table-too-large',
    `An angle table of ${grouped(samples)} rows over ${grouped(columns)} creases${rates ? ' with their rates' : ''} is ${millions(cells)} cells; the app writes at most ${millions(MAX_TABLE_CELLS)}. Choose fewer creases${rates ? ', leave out the rates,' : ''} or compute the path with a larger step.`,
    'creases',
  );
}
