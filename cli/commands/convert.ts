import type { Command } from '../command';
import { parseCommandArgs, UsageError } from '../args';
import { loadFile } from '../load';
import { EXIT } from '../exit-codes';
import { writeWhole } from '../output';
import { writeProject } from '../../solver/formats/project';
import { writeFold } from '../../solver/formats/fold';

function kindOf(path: string): 'fold' | 'project' | undefined {
  if (/\.fold$/i.test(path)) return 'fold';
  if (/\.json$/i.test(path)) return 'project';
  return undefined;
}

export const convert: Command = {
  name: 'convert',
  summary: 'convert between the project file (.hingeplan.json) and FOLD (.fold)',
  help: `Usage: hingeplan convert <in> <out>

Reads <in> (project or FOLD; validated first) and writes <out> in the format its extension names:
.fold for FOLD 1.1 (vertices_coords, edges_vertices, edges_assignment, edges_foldAngle, faces_vertices;
fields this program does not use are carried over from a FOLD input), .json for our project file.
The output is written to a temporary file beside <out>, flushed and renamed, so an existing <out> is never
left half-written; <out> may not be <in> (see \`hingeplan table --help\` for the rules of --out).`,
  run(argv, io) {
    const { positionals } = parseCommandArgs(argv, {});
    const [input, output] = positionals;
    if (!input || !output) throw new UsageError('two files are needed: <in> <out>');
    const kind = kindOf(output);
    if (!kind) throw new UsageError(`cannot tell the output format from "${output}": use .fold or .json`);
    const loaded = loadFile(io, input, 'convert');
    if (!loaded) return EXIT.usage;
    const { project, pattern } = loaded;
    const text = kind === 'fold' ? writeFold(project, project.foldAngles ? { foldAngles: project.foldAngles } : {}) : writeProject(project);
    const note = `${kind === 'fold' ? 'FOLD' : 'project'}, ${pattern.vertices.length} vertices, ${pattern.creases.length} creases`;
    return writeWhole(io, 'convert', text, output, [input], 'json', note) ? EXIT.ok : EXIT.usage;
  },
};
