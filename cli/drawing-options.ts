// Options for reading DXF and SVG drawings, taken by every command that loads a pattern:
// --layer <name>=<M|V|F|B|U> (repeatable), --stroke <colour>=<M|V|F|B|U> (repeatable), --snap <length>.
// main.ts takes them off the command line before the command reads its own options, so every command that
// loads a pattern file reads drawings the same way; they are ignored for project and FOLD files.
import type { Assignment } from '../solver/types';
import type { DrawingOptions } from '../solver/formats/drawing';
import { parseColourOption } from '../solver/formats/colour';
import { UsageError } from './args';

export const DRAWING_OPTIONS_HELP = `
Drawings (.dxf, .svg) are read directly: straight lines by layer (DXF) or group (SVG g id or label); a name
containing mountain, valley, flat, or boundary/border/outline/cut/rim (any case) gives M, V, F or B, anything
else U with a warning. The ends are snapped, lines split where they cross or end on each other, duplicates,
zero-length lines and overlaps merged, each step reported; curves are refused with their place.
  --layer <name>=<M|V|F|B|U>   read the lines of this layer or group as that assignment; repeatable
  --stroke <colour>=<M|V|F|B|U>
                               read lines of this colour (CSS colour such as red, #c00, rgb(200,0,0), or a
                               DXF colour number 1-255) as that assignment; repeatable; --layer wins
  --snap <length>              ends and lines closer than this are one point, in the drawing's units after
                               its own units are applied (default: 1e-4 of the drawing's diagonal)`;

const ASSIGNMENT = /^[MVFBU]$/;

function split(value: string, option: string, left: string): [string, Assignment] {
  const i = value.lastIndexOf('=');
  if (i <= 0 || i === value.length - 1) throw new UsageError(`--${option} needs ${left}=<M|V|F|B|U>, got "${value}"`);
  const a = value.slice(i + 1).trim().toUpperCase();
  if (!ASSIGNMENT.test(a)) throw new UsageError(`--${option} ${value}: "${value.slice(i + 1)}" is not an assignment; use M, V, F, B or U`);
  return [value.slice(0, i).trim(), a as Assignment];
}

/**
 * Remove --layer, --stroke and --snap (as `--opt value` or `--opt=value`) from a command's arguments.
 * Throws UsageError for a malformed value; arguments after `--` are left alone.
 */
export function takeDrawingOptions(argv: string[]): { argv: string[]; options: DrawingOptions } {
  const rest: string[] = [];
  const options: DrawingOptions = {};
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === '--') {
      rest.push(...argv.slice(i));
      break;
    }
    const m = /^--(layer|stroke|snap)(?:=(.*))?$/.exec(arg);
    if (!m) {
      rest.push(arg);
      continue;
    }
    let value = m[2];
    if (value === undefined) {
      value = argv[++i];
      if (value === undefined) throw new UsageError(`--${m[1]} needs a value`);
    }
    if (m[1] === 'snap') {
      const v = Number(value);
      if (value.trim() === '' || !Number.isFinite(v) || v < 0) throw new UsageError(`--snap must be a length ≥ 0, got "${value}"`);
      options.snap = v;
    } else if (m[1] === 'layer') {
      const [name, assignment] = split(value, 'layer', '<name>');
      (options.layers ??= []).push({ name, assignment });
    } else {
      const [colour, assignment] = split(value, 'stroke', '<colour>');
      if (!parseColourOption(colour)) throw new UsageError(`--stroke ${value}: "${colour}" is not a colour (a CSS colour such as red, #c00 or rgb(200,0,0), or a DXF colour number 1-255)`);
      (options.strokes ??= []).push({ colour, assignment });
    }
  }
  return { argv: rest, options };
}
