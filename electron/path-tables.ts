// Angle tables and deployment schedules written from a computed path. An adapter of the desktop app until
// the fold-path writers are in the solver core: the same content, every file with the cautions line.
// Samples are written as solved (never interpolated); a schedule takes the samples at its step.

import { CAUTIONS } from '../solver/formats/cautions';
import type { Pattern } from '../solver/types';
import type { SweepResult, SweepSample } from '../solver/path';
import type { ExportOptionsSchema } from './contract';
import type { z } from 'zod';
import { JobFailure } from './worker-protocol';

const DEG = 180 / Math.PI;
type Options = z.output<typeof ExportOptionsSchema>;

function csvField(v: string): string {
  return /[",\n\r]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}
const num = (x: number, digits = 6) => (Number.isFinite(x) ? x.toFixed(digits) : '');

function chosenCreases(pattern: Pattern, options: Options, drive: number): number[] {
  if (!options.creases.length) return pattern.creases.filter((c) => c.assignment !== 'B' && c.index !== drive).map((c) => c.index);
  return options.creases.map((label) => {
    const i = pattern.labelIndex.get(label) ?? (/^\d+$/.test(label) && Number(label) < pattern.creases.length ? Number(label) : undefined);
    if (i === undefined) throw new JobFailure('unknown-crease', `the table asks for crease "${label}", which the pattern does not have`);
    return i;
  });
}

export function angleTable(pattern: Pattern, path: SweepResult, options: Options): { data: string; extension: string } {
  const creases = chosenCreases(pattern, options, path.drive);
  const driveLabel = pattern.creases[path.drive].label;
  const samples = path.samples.filter((_, i) => i % options.every === 0 || i === path.samples.length - 1);
  if (options.format === 'json') {
    const doc = {
      format: 'hingeplan-angle-table',
      version: 1,
      cautions: CAUTIONS,
      pattern: pattern.name,
      drive: driveLabel,
      units: 'degrees; valley positive, mountain negative',
      creases: creases.map((c) => pattern.creases[c].label),
      samples: samples.map((s) => ({ drive: s.drive * DEG, angles: creases.map((c) => s.angles[c] * DEG), maxResidual: s.maxResidual, condition: Number.isFinite(s.condition) ? s.condition : null, nearSingular: s.nearSingular })),
      events: path.events.map((e) => ({ type: e.type, drive: e.drive * DEG, text: e.text })),
      complete: path.status === 'complete',
    };
    return { data: JSON.stringify(doc, null, 1) + '\n', extension: 'json' };
  }
  const lines = [
    `# ${CAUTIONS}`,
    `# angle table of ${pattern.name}: drive ${driveLabel}, ${samples.length} solved samples; degrees, valley positive, mountain negative${path.status === 'complete' ? '' : '; the path ended early'}`,
    ['drive_deg', ...creases.map((c) => `${pattern.creases[c].label}_deg`), 'max_residual_rad', 'condition', 'near_singular'].map(csvField).join(','),
  ];
  for (const s of samples) {
    lines.push([num(s.drive * DEG), ...creases.map((c) => num(s.angles[c] * DEG)), s.maxResidual.toExponential(3), num(s.condition, 3), s.nearSingular ? 'yes' : 'no'].join(','));
  }
  for (const e of path.events) lines.push(`# event at ${num(e.drive * DEG, 3)}°: ${e.type}: ${e.text.replace(/\n/g, ' ')}`);
  return { data: lines.join('\n') + '\n', extension: 'csv' };
}

/** The path's samples at every `stepDeg` of drive from its first sample, with times at a constant drive rate. */
export function deploymentSchedule(pattern: Pattern, path: SweepResult, options: Options): { data: string; extension: string } {
  const creases = chosenCreases(pattern, options, path.drive);
  const driveLabel = pattern.creases[path.drive].label;
  const start = path.samples[0];
  if (!start) throw new JobFailure('empty-path', 'the path has no samples');
  // every row must be a solved sample: each multiple of the step along the path has to be one of them
  const end = path.samples[path.samples.length - 1];
  const span = Math.abs(end.drive - start.drive) * DEG;
  const dir = Math.sign(end.drive - start.drive) || 1;
  const picked: SweepSample[] = [];
  for (let k = 0; k * options.stepDeg <= span + 1e-9; k++) {
    const target = start.drive + (dir * k * options.stepDeg) / DEG;
    const hit = path.samples.find((s) => Math.abs(s.drive - target) < 1e-9);
    if (!hit) {
      throw new JobFailure('schedule-step', `the path has no sample at ${(target * DEG).toFixed(3)}°: compute it with a step that divides ${options.stepDeg}°`);
    }
    picked.push(hit);
  }
  if (picked.length < 2) throw new JobFailure('schedule-step', `the path spans less than one ${options.stepDeg}° step`);
  const rate = options.rateDegPerSec;
  const rows = picked.map((s, i) => ({
    step: i,
    time: (Math.abs(s.drive - start.drive) * DEG) / rate,
    drive: s.drive * DEG,
    angles: creases.map((c) => s.angles[c] * DEG),
    speeds: creases.map((c) => s.rates[c] * rate),
  }));
  if (options.format === 'json') {
    const doc = { format: 'hingeplan-deployment-schedule', version: 1, cautions: CAUTIONS, pattern: pattern.name, drive: driveLabel, driveRateDegPerSec: rate, creases: creases.map((c) => pattern.creases[c].label), rows };
    return { data: JSON.stringify(doc, null, 1) + '\n', extension: 'json' };
  }
  const lines = [
    `# ${CAUTIONS}`,
    `# deployment schedule of ${pattern.name}: drive ${driveLabel} at ${rate}°/s, a row every ${options.stepDeg}°; angles in degrees, hinge speeds in °/s`,
    ['step', 'time_s', 'drive_deg', ...creases.map((c) => `${pattern.creases[c].label}_deg`), ...creases.map((c) => `${pattern.creases[c].label}_deg_per_s`)].map(csvField).join(','),
  ];
  for (const r of rows) lines.push([String(r.step), num(r.time, 3), num(r.drive), ...r.angles.map((a) => num(a)), ...r.speeds.map((v) => num(v, 4))].join(','));
  return { data: lines.join('\n') + '\n', extension: 'csv' };
}
