// The display's panel placement must be the solver's: same walk, same transforms, for any angles.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { buildPattern, foldedShape, miura, waterbomb } from '../../solver';
import { placePanels, planShape } from '../../renderer/shape-kernel';

const sheets = [
  buildPattern(miura({ rows: 3, cols: 4, a: 20, b: 15, alphaDeg: 65 }).project!.source).pattern!,
  buildPattern(waterbomb({}).project!.source).pattern!,
];

describe('display shape kernel', () => {
  it('places every panel exactly as foldedShape does (solver/outputs/shape.ts), for random angles and base panels', () => {
    for (const pattern of sheets) {
      fc.assert(
        fc.property(
          fc.array(fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }), { minLength: pattern.creases.length, maxLength: pattern.creases.length }),
          fc.nat({ max: pattern.panels.length - 1 }),
          (list, base) => {
            const angles = Float64Array.from(list);
            const reference = foldedShape(pattern, angles, base);
            const out = placePanels(planShape(pattern, base), angles, new Float64Array(12 * pattern.panels.length));
            reference.panelTransforms.forEach((T, p) => {
              for (let k = 0; k < 12; k++) expect(Math.abs(out[12 * p + k] - T[k])).toBeLessThan(1e-9);
            });
          },
        ),
        { numRuns: 40 },
      );
    }
  });

  it('keeps the base panel where the flat sheet has it', () => {
    const pattern = sheets[0];
    const angles = new Float64Array(pattern.creases.length).fill(0.7);
    const out = placePanels(planShape(pattern, 5), angles, new Float64Array(12 * pattern.panels.length));
    expect(Array.from(out.subarray(60, 72))).toEqual([1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0]);
  });
});
