// The header of a table the app exports: the same fields `hingeplan table` and `hingeplan schedule` write,
// with the command line that reproduces every number of it from the document's file. Numbers go into the
// command as the shortest text that reads back to the same double, so the command line solves at exactly
// the values the app solved at.

import type { Pattern } from '../solver/types';
import type { TableHeader } from '../solver/outputs/table';
import { sha256, sha256Bytes } from '../solver/outputs/sha256';
import { fileText } from './text-bytes';
import { loadPatternText, writeProject, type Project } from '../solver';
import { PatternSourceSchema, type DriveSpec, type ExportOptionsSchema, type ProjectDto, type SweepOptionsSchema } from './contract';
import type { z } from 'zod';

type Sweep = z.output<typeof SweepOptionsSchema>;
type Options = z.output<typeof ExportOptionsSchema>;

/** One word for a POSIX shell: left bare when it is safe, else in single quotes (as the command line quotes its own). */
export function shellWord(a: string): string {
  return /^[A-Za-z0-9_@%+=:,./-]+$/.test(a) ? a : `'${a.replace(/'/g, `'\\''`)}'`;
}

/** The file the header names and hashes, and whether its contents on disk are the pattern that was solved. */
export interface HeaderFile {
  name: string;
  /** the file's bytes as read by the main process (absent for a document never saved) */
  bytes?: Uint8Array;
}

/**
 * File name and SHA-256 for the header. The SHA-256 of the file's own bytes (byte-order mark and all, as
 * `sha256sum` sees them) when it holds the pattern that was solved; otherwise (unsaved edits, a new
 * document, a file no longer UTF-8) of the text Save would write, and the header says so, since the
 * command reproduces the table only once that is saved.
 */
export function fileFields(project: ProjectDto, file: HeaderFile): { file: string; fileSha256: string } {
  const decoded = file.bytes ? fileText(file.bytes, file.name) : undefined;
  if (file.bytes && decoded?.ok) {
    const loaded = loadPatternText(decoded.text, file.name);
    // both through the contract's schema, so key order and null-for-absent cannot make equal patterns differ
    const norm = (a: unknown) => { const r = PatternSourceSchema.safeParse(a); return r.success ? JSON.stringify(r.data) : undefined; };
    const onDisk = loaded.project ? norm(loaded.project.source) : undefined;
    if (onDisk !== undefined && onDisk === norm(project.source)) return { file: file.name, fileSha256: sha256Bytes(file.bytes) };
  }
  return {
    file: `${file.name} (not saved as solved: the SHA-256 is of the project as Save would write it; save it before running the command)`,
    fileSha256: sha256(writeProject(project as Project)),
  };
}

const holdWords = (held: DriveSpec[]) => held.flatMap((h) => ['--hold', `${h.crease}=${String(h.angleDeg)}`]);
const branchWords = (sweep: Sweep) => (sweep.branchId !== undefined && /^\d+$/.test(sweep.branchId) && !sweep.startAnglesDeg ? ['--branch', sweep.branchId] : []);

/** A start state as `hingeplan --start` reads it: {"angles": {"<crease>": <deg>}}, every crease. */
function startJson(pattern: Pattern, anglesDeg: number[]): string {
  return JSON.stringify({ angles: Object.fromEntries(pattern.creases.map((c) => [c.label, anglesDeg[c.index] ?? 0])) });
}

/**
 * `hingeplan table` with the path's drive, range, step, holds and branch and the table's options. A path
 * that started from a state (a ray leaving a branch point) gets that state on standard input.
 */
export function tableCommand(pattern: Pattern, fileName: string, sweep: Sweep, options: Options): string {
  const words = [
    'hingeplan', 'table', fileName,
    '--drive', sweep.drive,
    '--from', String(sweep.fromDeg),
    '--to', String(sweep.toDeg),
    '--step', String(sweep.stepDeg),
    ...holdWords(sweep.held),
    ...branchWords(sweep),
    ...(sweep.startAnglesDeg ? ['--start', '/dev/stdin'] : []),
    ...contactWords(sweep),
    '--format', options.format,
    ...(options.rates ? ['--rates'] : []),
  ].map(shellWord).join(' ');
  return sweep.startAnglesDeg ? `printf '%s\\n' ${shellWord(startJson(pattern, sweep.startAnglesDeg))} | ${words}` : words;
}

/** The path's contact check as options (the loads come from the file's own "loads"). */
function contactWords(sweep: Sweep): string[] {
  if (sweep.contact === false) return ['--contact', 'off'];
  return sweep.clearance ? ['--clearance', String(sweep.clearance)] : [];
}

/**
 * `hingeplan schedule` over the path's drive range with its holds, branch or start state, and the schedule's
 * options, per-hinge limits included.
 */
export function scheduleCommand(pattern: Pattern, fileName: string, sweep: Sweep, options: Options): string {
  const timed = options.profile !== 'constant';
  const limitWords = options.hingeLimits.flatMap((l) => ['--limit', `${l.crease}=${l.maxRateDegPerS !== undefined ? String(l.maxRateDegPerS) : ''}${l.maxAccelDegPerS2 !== undefined ? `:${String(l.maxAccelDegPerS2)}` : ''}`]);
  const words = [
    'hingeplan', 'schedule', fileName,
    '--drive', sweep.drive,
    '--from', String(sweep.fromDeg),
    '--to', String(sweep.toDeg),
    '--time', String(options.timeS),
    '--profile', options.profile,
    ...(timed && options.accelTimeS !== undefined ? ['--accel-time', String(options.accelTimeS)] : []),
    ...(options.profile === 's-curve' && options.jerkTimeS !== undefined ? ['--jerk-time', String(options.jerkTimeS)] : []),
    ...(options.dtS !== undefined ? ['--dt', String(options.dtS)] : options.rows !== undefined ? ['--rows', String(options.rows)] : []),
    ...(options.maxRateDegPerS !== undefined ? ['--max-rate', String(options.maxRateDegPerS)] : []),
    ...(options.maxAccelDegPerS2 !== undefined ? ['--max-accel', String(options.maxAccelDegPerS2)] : []),
    ...limitWords,
    ...holdWords(sweep.held),
    ...branchWords(sweep),
    ...contactWords(sweep),
    ...(sweep.startAnglesDeg ? ['--start', '/dev/stdin'] : []),
    '--format', options.format,
  ].map(shellWord).join(' ');
  return sweep.startAnglesDeg ? `printf '%s\\n' ${shellWord(startJson(pattern, sweep.startAnglesDeg))} | ${words}` : words;
}

/** The whole header of an app export. */
export function appTableHeader(pattern: Pattern, project: ProjectDto, file: HeaderFile, version: string, command: string, now: Date = new Date()): TableHeader {
  return { patternName: pattern.name, ...fileFields(project, file), version, date: now.toISOString(), command };
}
