// Reading any pattern file the program knows: a project or FOLD file (./project.ts, ./fold.ts) or a DXF or
// SVG drawing (./dxf.ts, ./svg.ts, ./drawing.ts), told apart by extension or content. The one entry point the
// shells use; apart from ./project.ts so that a reader of project files alone does not load the drawing
// readers (the command line loads this module only for a drawing).

import type { DrawingOptions } from './drawing';
import { drawingToProject } from './drawing';
import { parseDxf } from './dxf';
import { parseSvg } from './svg';
import { buildPattern } from '../model/pattern';
import { drawingFormat, loadStructuredText, patternFileText, type LoadResult } from './project';

/**
 * Read any pattern file the program knows (a project or FOLD, told apart by the `.fold` extension or a
 * `vertices_coords` key; a DXF or SVG drawing, by extension or content), build the pattern and check the
 * drives. `drawing` says how to read a drawing's layers, colours and snap. Never throws.
 */
export function loadPatternText(text: string, fileName?: string, drawing: DrawingOptions = {}): LoadResult {
  const kind = drawingFormat(text, fileName);
  if (kind) return loadDrawing(kind, text, fileName, drawing);
  return loadStructuredText(text, fileName);
}

/**
 * loadPatternText for a file's bytes, as the shells read them. A DXF file is decoded as DXF says (UTF-8 from
 * AutoCAD 2007 on, its code page before: ./dxf-text.ts); every other file must be UTF-8, and invalid bytes
 * are refused with their place (./text.ts) before anything else. Hash these same bytes for a table header.
 */
export function loadPatternBytes(bytes: Uint8Array, fileName?: string, drawing: DrawingOptions = {}): LoadResult {
  const decoded = patternFileText(bytes, fileName);
  if (decoded.text === undefined) return { messages: decoded.messages };
  return loadPatternText(decoded.text, fileName, drawing);
}

function loadDrawing(format: 'dxf' | 'svg', text: string, fileName: string | undefined, options: DrawingOptions): LoadResult {
  const drawing = format === 'dxf' ? parseDxf(text, fileName) : parseSvg(text, fileName);
  const r = drawingToProject(drawing, options);
  const base: LoadResult = { format, messages: r.messages };
  if (r.cleaning) base.cleaning = r.cleaning;
  if (r.layers) base.layers = r.layers;
  if (r.colours) base.colours = r.colours;
  if (!r.project) return base;
  const built = buildPattern(r.project.source);
  base.messages = [...r.messages, ...built.messages.map((m) => (r.locate ? r.locate(m) : m))];
  base.project = r.project;
  if (!built.pattern) return base;
  return { ...base, pattern: built.pattern, drives: [] };
}
