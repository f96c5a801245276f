import type { Command } from '../command';
import { parseCommandArgs, UsageError } from '../args';
import { formatMessage, loadFile } from '../load';
import { EXIT } from '../exit-codes';
import { writeProject } from '../../solver/formats/project';
import { writeFold } from '../../solver/formats/fold';
import { writeDxf } from '../../solver/formats/dxf-write';
import { writeSvg } from '../../solver/formats/svg-write';

type Kind = 'fold' | 'project' | 'dxf' | 'svg';
const KIND_NAMES: Record<Kind, string> = { fold: 'FOLD', project: 'project', dxf: 'DXF', svg: 'SVG' };

function kindOf(path: string): Kind | undefined {
  if (/\.fold$/i.test(path)) return 'fold';
  if (/\.json$/i.test(path)) return 'project';
  if (/\.dxf$/i.test(path)) return 'dxf';
  if (/\.svg$/i.test(path)) return 'svg';
  return undefined;
}

export const convert: Command = {
  name: 'convert',
  summary: 'convert between the project file (.hingeplan.json), FOLD (.fold), DXF (.dxf) and SVG (.svg)',
  help: `Usage: hingeplan convert <in> <out> [--layer <name>=<M|V|F|B|U> …] [--stroke <colour>=<…> …] [--snap <length>]

Reads <in> (project, FOLD, DXF or SVG; validated first) and writes <out> in the format its extension names:
.fold for FOLD 1.1 (vertices_coords, edges_vertices, edges_assignment, edges_foldAngle, faces_vertices;
fields this program does not use are carried over from a FOLD input), .json for our project file,
.dxf for DXF text (R12: a layer per assignment named mountain, valley, flat, unassigned, boundary; the
outline as one closed polyline; crease labels as TEXT on the layer "labels"; $INSUNITS from the units),
.svg for SVG (a group per assignment with the same names, width and height in the units, y up on paper).
DXF and SVG carry the flat pattern only: drives, hinge limits and fold angles stay in the project file.
The output is written to a temporary file and renamed, so an existing <out> is never left half-written.`,
  run(argv, io) {
    const { positionals } = parseCommandArgs(argv, {});
    const [input, output] = positionals;
    if (!input || !output) throw new UsageError('two files are needed: <in> <out>');
    const kind = kindOf(output);
    if (!kind) throw new UsageError(`cannot tell the output format from "${output}": use .json, .fold, .dxf or .svg`);
    const loaded = loadFile(io, input, 'convert');
    if (!loaded) return EXIT.usage;
    const { project, pattern } = loaded;
    const text =
      kind === 'fold' ? writeFold(project, project.foldAngles ? { foldAngles: project.foldAngles } : {})
      : kind === 'dxf' ? writeDxf(project)
      : kind === 'svg' ? writeSvg(project)
      : writeProject(project);
    const w = io.writeFile(output, text);
    if (w.error) {
      io.stderr(`hingeplan convert: ${w.error}\n`);
      return EXIT.usage;
    }
    for (const m of loaded.messages) if (m.severity !== 'error') io.stderr(`${input}: ${formatMessage(m)}\n`);
    io.stderr(`wrote ${output} (${KIND_NAMES[kind]}: ${pattern.vertices.length} vertices, ${pattern.creases.length} creases)\n`);
    return EXIT.ok;
  },
};
