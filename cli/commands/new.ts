import type { Command } from '../command';
import { intOption, numberOption, parseCommandArgs, UsageError } from '../args';
import { EXIT } from '../exit-codes';
import { printMessages } from '../load';
import { degree5, miura, singleVertex, waterbomb, type GeneratorResult } from '../../solver/model/generators';
import { writeProject } from '../../solver/formats/project';
import { writeFold } from '../../solver/formats/fold';
import { buildPattern } from '../../solver/model/pattern';
import type { Assignment } from '../../solver/types';

function list(value: string | undefined, name: string): number[] | undefined {
  if (value === undefined) return undefined;
  const parts = value.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.some((p) => p === '') || nums.some((x) => !Number.isFinite(x))) throw new UsageError(`--${name} must be numbers separated by commas, got "${value}"`);
  return nums;
}

export const newCommand: Command = {
  readsNoPattern: true,
  name: 'new',
  summary: 'write a project file from a built-in generator (vertex, miura, waterbomb, degree5)',
  help: `Usage: hingeplan new <kind> [options] [--out <file>] [--name <text>] [--units <text>]

Kinds:
  vertex     a single vertex from its sector angles
             --sectors <deg,deg,…>  (ccw from +x, must sum to 360)  [--assign M,V,U,…] [--radius <len>]
  miura      Miura-ori: --rows <cells> --cols <cells> --a <len> --b <len> --alpha <deg>
             (each cell 2 × 2 panels; a = straight-line segment, b = zigzag segment, alpha = acute angle)
  waterbomb  the waterbomb base (degree-8 centre vertex): [--size <len>]
  degree5    a generic degree-5 vertex with two suggested drives: [--sectors <five angles>] [--radius <len>]

The file holds the pattern and the generator's suggested drives. --out <file> writes it (a .fold ending
writes FOLD, anything else our project file); without --out the project file goes to stdout. --units names
the unit of the lengths given (free text, e.g. mm); it is written into the file.`,
  run(argv, io) {
    const { values, positionals } = parseCommandArgs(argv, {
      sectors: { type: 'string' }, assign: { type: 'string' }, radius: { type: 'string' },
      rows: { type: 'string' }, cols: { type: 'string' }, a: { type: 'string' }, b: { type: 'string' },
      alpha: { type: 'string' }, size: { type: 'string' }, out: { type: 'string' }, name: { type: 'string' }, units: { type: 'string' },
    });
    const units = (values.units as string | undefined)?.trim();
    if (units !== undefined && (!units || units.length > 50)) throw new UsageError('--units must be a unit name of 1 to 50 characters, e.g. mm');
    const kind = positionals[0];
    const name = values.name as string | undefined;
    const radius = values.radius === undefined ? undefined : numberOption(values.radius as string, 'radius');
    let result: GeneratorResult;
    switch (kind) {
      case 'vertex': {
        const sectorsDeg = list(values.sectors as string | undefined, 'sectors');
        if (!sectorsDeg) throw new UsageError('new vertex needs --sectors, e.g. --sectors 60,100,120,80');
        const assignments = (values.assign as string | undefined)?.split(',').map((s) => s.trim().toUpperCase()) as Assignment[] | undefined;
        result = singleVertex({ sectorsDeg, assignments, radius, name });
        break;
      }
      case 'miura':
        result = miura({
          rows: intOption(values.rows as string | undefined, 'rows'),
          cols: intOption(values.cols as string | undefined, 'cols'),
          a: numberOption(values.a as string | undefined, 'a'),
          b: numberOption(values.b as string | undefined, 'b'),
          alphaDeg: numberOption(values.alpha as string | undefined, 'alpha'),
          name,
        });
        break;
      case 'waterbomb':
        result = waterbomb({ size: values.size === undefined ? undefined : numberOption(values.size as string, 'size'), name });
        break;
      case 'degree5':
        result = degree5({ sectorsDeg: list(values.sectors as string | undefined, 'sectors'), radius, name });
        break;
      default:
        throw new UsageError(kind ? `unknown kind "${kind}": use vertex, miura, waterbomb or degree5` : 'a kind is required: vertex, miura, waterbomb or degree5');
    }
    if (!result.project) {
      printMessages(io, result.messages, `new ${kind}: `);
      return EXIT.usage;
    }
    if (units) result.project.units = units;
    const built = buildPattern(result.project.source);
    if (!built.pattern) {
      printMessages(io, built.messages, `new ${kind}: `);
      return EXIT.usage;
    }
    const out = values.out as string | undefined;
    const text = out && /\.fold$/i.test(out) ? writeFold(result.project) : writeProject(result.project);
    if (out) {
      const w = io.writeFile(out, text);
      if (w.error) { io.stderr(`hingeplan new: ${w.error}\n`); return EXIT.usage; }
      io.stderr(`wrote ${out}: ${built.pattern.vertices.length} vertices, ${built.pattern.creases.length} creases, ${built.pattern.panels.length} panels\n`);
    } else {
      io.stdout(text);
    }
    return EXIT.ok;
  },
};
