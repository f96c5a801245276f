// What a drawing reader cannot read is refused with a stable code, a message a person understands and where
// it is: the DXF line number, the SVG element (id, else its tag and line). Never a throw.
import { describe, expect, it } from 'vitest';
import { loadPatternText, type LoadResult } from '../solver/formats/project';
import type { DrawingOptions } from '../solver/formats/drawing';

/** A DXF text from groups [code, value], one per two lines, as R12 writes them. */
function dxf(groups: [number, string | number][]): string {
  return groups.map(([c, v]) => `${String(c).padStart(3)}\n${v}`).join('\n') + '\n';
}
const header: [number, string | number][] = [[0, 'SECTION'], [2, 'HEADER'], [9, '$INSUNITS'], [70, 4], [0, 'ENDSEC']];
const square = (layer = 'outline'): [number, string | number][] => [
  [0, 'LWPOLYLINE'], [8, layer], [90, 4], [70, 1], [10, 0], [20, 0], [10, 100], [20, 0], [10, 100], [20, 100], [10, 0], [20, 100],
];
const line = (layer: string, x1: number, y1: number, x2: number, y2: number): [number, string | number][] => [
  [0, 'LINE'], [8, layer], [10, x1], [20, y1], [30, 0], [11, x2], [21, y2], [31, 0],
];
function dxfFile(entities: [number, string | number][], opts: DrawingOptions = {}): LoadResult {
  return loadPatternText(dxf([...header, [0, 'SECTION'], [2, 'ENTITIES'], ...entities, [0, 'ENDSEC'], [0, 'EOF']]), 'test.dxf', opts);
}
/** Line number of the first group (code, value) in a text made by dxf(). */
function lineOf(text: string, value: string, nth = 1): number {
  const lines = text.split('\n');
  let seen = 0;
  for (let i = 1; i < lines.length; i += 2) if (lines[i] === value && ++seen === nth) return i; // the code line is i (1-based: i)
  return -1;
}
function refusal(r: LoadResult, code: string) {
  expect(r.pattern, 'no pattern for a refused file').toBeUndefined();
  const m = r.messages.find((x) => x.code === code && x.severity === 'error');
  expect(m, `${code} in ${JSON.stringify(r.messages)}`).toBeDefined();
  return m!;
}

describe('DXF refusals name the line', () => {
  it('text that is not DXF: the line of the first thing that is not a group code', () => {
    const r = loadPatternText('  0\nSECTION\n  2\nENTITIES\nhello\nworld\n', 'x.dxf');
    const m = refusal(r, 'dxf-syntax');
    expect(m.where?.line).toBe(5);
    expect(m.text).toMatch(/Line 5/);
  });
  it('a binary DXF', () => {
    refusal(loadPatternText('AutoCAD Binary DXF\r\n\u001a\u0000…', 'x.dxf'), 'dxf-binary');
  });
  it('a section cut short', () => {
    const m = refusal(loadPatternText(dxf([[0, 'SECTION'], [2, 'ENTITIES'], ...line('valley', 0, 0, 1, 1)]), 'x.dxf'), 'dxf-syntax');
    expect(m.where?.line).toBe(1);
    expect(m.text).toMatch(/no ENDSEC/);
  });
  it('a file with no ENTITIES section', () => {
    refusal(loadPatternText(dxf([...header, [0, 'EOF']]), 'x.dxf'), 'dxf-no-entities');
  });
  it('an ARC, a CIRCLE and a SPLINE: curves, each with its line and layer', () => {
    const entities: [number, string | number][] = [...square(), [0, 'ARC'], [8, 'valley'], [10, 50], [20, 50], [40, 10], [50, 0], [51, 90], [0, 'CIRCLE'], [8, 'cut'], [10, 50], [20, 50], [40, 5], [0, 'SPLINE'], [8, 'mountain']];
    const r = dxfFile(entities);
    const text = dxf([...header, [0, 'SECTION'], [2, 'ENTITIES'], ...entities, [0, 'ENDSEC'], [0, 'EOF']]);
    const curves = r.messages.filter((m) => m.code === 'dxf-curve');
    expect(curves.map((m) => m.where?.line)).toEqual([lineOf(text, 'ARC'), lineOf(text, 'CIRCLE'), lineOf(text, 'SPLINE')]);
    expect(curves[0].text).toMatch(/ARC on layer "valley" is a curve/);
    expect(r.pattern).toBeUndefined();
  });
  it('a polyline segment with a bulge (an arc): the line of its bulge', () => {
    const entities: [number, string | number][] = [[0, 'LWPOLYLINE'], [8, 'outline'], [90, 4], [70, 1], [10, 0], [20, 0], [10, 100], [20, 0], [42, 0.4], [10, 100], [20, 100], [10, 0], [20, 100]];
    const text = dxf([...header, [0, 'SECTION'], [2, 'ENTITIES'], ...entities, [0, 'ENDSEC'], [0, 'EOF']]);
    const m = refusal(loadPatternText(text, 'x.dxf'), 'dxf-curve');
    expect(m.where?.line).toBe(lineOf(text, '0.4'));
    expect(m.text).toMatch(/segment 2 of the LWPOLYLINE .* has a bulge/);
  });
  it('a spline-fitted POLYLINE and a polyface mesh', () => {
    refusal(dxfFile([[0, 'POLYLINE'], [8, 'x'], [66, 1], [70, 4], [0, 'VERTEX'], [10, 0], [20, 0], [0, 'SEQEND']]), 'dxf-curve');
    refusal(dxfFile([[0, 'POLYLINE'], [8, 'x'], [66, 1], [70, 64], [0, 'VERTEX'], [10, 0], [20, 0], [0, 'SEQEND']]), 'dxf-mesh');
  });
  it('a drawing that is not flat (different z) and an entity in a tilted plane', () => {
    const m = refusal(dxfFile([...square(), [0, 'LINE'], [8, 'valley'], [10, 0], [20, 0], [30, 0], [11, 100], [21, 100], [31, 5]]), 'dxf-not-flat');
    expect(m.text).toMatch(/z = 5/);
    refusal(dxfFile([...square(), [0, 'LWPOLYLINE'], [8, 'valley'], [90, 2], [10, 0], [20, 0], [10, 1], [20, 1], [210, 0], [220, 1], [230, 0]]), 'dxf-not-flat');
  });
  it('a LINE without its end point, an INSERT of a missing block, a block that inserts itself, an external block', () => {
    const m = refusal(dxfFile([...square(), [0, 'LINE'], [8, 'valley'], [10, 0], [20, 0]]), 'dxf-bad-entity');
    expect(m.where?.line).toBeGreaterThan(0);
    refusal(dxfFile([...square(), [0, 'INSERT'], [8, '0'], [2, 'nowhere'], [10, 0], [20, 0]]), 'dxf-missing-block');
    const loop = dxf([...header, [0, 'SECTION'], [2, 'BLOCKS'], [0, 'BLOCK'], [2, 'me'], [10, 0], [20, 0], [0, 'INSERT'], [8, '0'], [2, 'me'], [10, 1], [20, 1], [0, 'ENDBLK'], [0, 'ENDSEC'],
      [0, 'SECTION'], [2, 'ENTITIES'], ...square(), [0, 'INSERT'], [8, '0'], [2, 'me'], [10, 0], [20, 0], [0, 'ENDSEC'], [0, 'EOF']]);
    refusal(loadPatternText(loop, 'x.dxf'), 'dxf-block-loop');
    const xref = dxf([...header, [0, 'SECTION'], [2, 'BLOCKS'], [0, 'BLOCK'], [2, 'elsewhere'], [70, 4], [10, 0], [20, 0], [1, 'other.dwg'], [0, 'ENDBLK'], [0, 'ENDSEC'],
      [0, 'SECTION'], [2, 'ENTITIES'], ...square(), [0, 'INSERT'], [8, '0'], [2, 'elsewhere'], [10, 0], [20, 0], [0, 'ENDSEC'], [0, 'EOF']]);
    expect(refusal(loadPatternText(xref, 'x.dxf'), 'dxf-external-block').text).toMatch(/external reference/);
  });
  it('lines of different assignments on top of each other: both named with their lines', () => {
    const entities = [...square(), ...line('mountain', 0, 0, 100, 100), ...line('valley', 100, 100, 0, 0)];
    const text = dxf([...header, [0, 'SECTION'], [2, 'ENTITIES'], ...entities, [0, 'ENDSEC'], [0, 'EOF']]);
    const m = refusal(loadPatternText(text, 'x.dxf'), 'overlap-conflict');
    expect(m.text).toMatch(/LINE at line \d+ on layer "mountain" \(M\) and LINE at line \d+ on layer "valley" \(V\) lie on top of each other/);
    expect(m.where?.line).toBe(lineOf(text, 'LINE', 2));
  });
  it('a crease that ends inside a panel (dangling, longer than the snap): the pattern check, pointed at the DXF line', () => {
    const entities = [...square(), ...line('valley', 0, 0, 100, 100), ...line('mountain', 0, 100, 30, 70)];
    const text = dxf([...header, [0, 'SECTION'], [2, 'ENTITIES'], ...entities, [0, 'ENDSEC'], [0, 'EOF']]);
    const m = refusal(loadPatternText(text, 'x.dxf'), 'dangling-crease');
    expect(m.where?.line).toBe(lineOf(text, 'LINE', 2));
    expect(m.text).toMatch(/Drawn as LINE at line \d+ on layer "mountain"/);
  });
  it('a hole in the sheet: the pattern check, pointed at a line of its rim', () => {
    const entities = [...square(), ...line('cut', 40, 40, 60, 40), ...line('cut', 60, 40, 60, 60), ...line('cut', 60, 60, 40, 60), ...line('cut', 40, 60, 40, 40)];
    const m = refusal(dxfFile(entities), 'disconnected-sheet');
    expect(m.where?.line).toBeGreaterThan(0);
  });
});

const svg = (body: string, attrs = 'width="100mm" height="100mm" viewBox="0 0 100 100"') =>
  `<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" ${attrs}>\n<g id="outline"><rect x="0" y="0" width="100" height="100" stroke="black" fill="none"/></g>\n${body}\n</svg>\n`;

describe('SVG refusals name the element', () => {
  it('text that is not XML: its line and column', () => {
    const m = refusal(loadPatternText('<svg xmlns="http://www.w3.org/2000/svg">\n<g>\n<line/>\n</svg>', 'x.svg'), 'not-xml');
    // the parser stops where the closing tag's scan began: at the end of line 3, before </svg> on line 4
    expect([3, 4]).toContain(m.where?.line);
    expect(m.text).toMatch(/at line [34], column \d+: .*"g" != "svg"/);
  });
  it('XML that is not SVG', () => {
    refusal(loadPatternText('<?xml version="1.0"?><drawing/>', 'x.svg'), 'not-svg');
  });
  it('a viewBox that is not four numbers', () => {
    refusal(loadPatternText(svg('', 'width="10mm" viewBox="0 0 ten 10"'), 'x.svg'), 'svg-bad-viewbox');
  });
  it('a path with a curve: its id and which command', () => {
    const m = refusal(loadPatternText(svg('<g id="valley"><path id="crease-7" d="M 0 0 L 50 50 C 60 60 70 70 100 100"/></g>'), 'x.svg'), 'svg-curve');
    expect(m.where?.field).toBe('#crease-7');
    expect(m.where?.line).toBe(4);
    expect(m.text).toMatch(/<path id="crease-7"> .* has a curve \(command C, the 3rd command/);
  });
  it('a circle, an ellipse and a rounded rect, without ids: tag and line', () => {
    const r = loadPatternText(svg('<g id="valley">\n<circle cx="5" cy="5" r="2"/>\n<ellipse cx="5" cy="5" rx="2" ry="1"/>\n<rect x="1" y="1" width="5" height="5" rx="1"/>\n</g>'), 'x.svg');
    expect(r.pattern).toBeUndefined();
    const lines = r.messages.filter((m) => m.severity === 'error').map((m) => [m.code, m.where?.field, m.where?.line]);
    expect(lines).toEqual([['svg-curve', '<circle>', 5], ['svg-curve', '<ellipse>', 6], ['svg-bad-element', '<rect>', 7]]);
  });
  it('a transform, a length or points that cannot be read; a <use> of nothing; a <use> loop', () => {
    refusal(loadPatternText(svg('<g id="valley" transform="turn(30)"><line x1="0" y1="0" x2="100" y2="100"/></g>'), 'x.svg'), 'svg-bad-transform');
    const m = refusal(loadPatternText(svg('<g id="valley"><line id="l" x1="0" y1="0" x2="1ft" y2="100"/></g>'), 'x.svg'), 'svg-bad-element');
    expect(m.text).toMatch(/x2="1ft", which is not a length/);
    refusal(loadPatternText(svg('<polyline id="p" points="0,0 10,x"/>'), 'x.svg'), 'svg-bad-element');
    refusal(loadPatternText(svg('<use id="u" href="#missing"/>'), 'x.svg'), 'svg-bad-use');
    refusal(loadPatternText(svg('<g id="a"><use id="u" href="#a"/></g>'), 'x.svg'), 'svg-use-loop');
  });
  it('groups nested deeper than any drawing needs are refused, not followed', () => {
    const deep = '<g>'.repeat(600) + '<line x1="0" y1="0" x2="100" y2="100"/>' + '</g>'.repeat(600);
    refusal(loadPatternText(svg(deep), 'x.svg'), 'svg-too-deep');
  });
  it('lines of different assignments on top of each other: both elements named', () => {
    const m = refusal(loadPatternText(svg('<g id="mountain"><line id="m1" x1="0" y1="0" x2="100" y2="100"/></g><g id="valley"><line id="v1" x1="0" y1="0" x2="100" y2="100"/></g>'), 'x.svg'), 'overlap-conflict');
    expect(m.text).toMatch(/<line id="m1">.*\(M\) and <line id="v1">.*\(V\)/);
    expect(m.where?.field).toBe('#v1');
  });
  it('a dangling crease: the pattern check, pointed at the element', () => {
    const m = refusal(loadPatternText(svg('<g id="valley"><line id="v1" x1="0" y1="0" x2="100" y2="100"/><line id="stub" x1="0" y1="100" x2="30" y2="70"/></g>'), 'x.svg'), 'dangling-crease');
    expect(m.where?.field).toBe('#stub');
    expect(m.text).toMatch(/Drawn as <line id="stub">/);
  });
});

describe('options and odd drawings', () => {
  it('a colour that is not a colour, and a negative snap', () => {
    refusal(dxfFile([...square(), ...line('0', 0, 0, 100, 100)], { strokes: [{ colour: 'reddish', assignment: 'M' }] }), 'bad-colour');
    refusal(dxfFile([...square(), ...line('0', 0, 0, 100, 100)], { snap: -1 }), 'bad-snap');
  });
  it('a drawing with no straight lines, and one whose lines are all one point', () => {
    refusal(dxfFile([]), 'drawing-empty');
    refusal(dxfFile([...line('valley', 5, 5, 5, 5)]), 'drawing-empty');
  });
  it('never throws on random damage to a drawing', () => {
    const base = svg('<g id="valley"><line x1="0" y1="0" x2="100" y2="100"/></g>');
    const dbase = dxf([...header, [0, 'SECTION'], [2, 'ENTITIES'], ...square(), ...line('valley', 0, 0, 100, 100), [0, 'ENDSEC'], [0, 'EOF']]);
    let seed = 7;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (const [text, name] of [[base, 'x.svg'], [dbase, 'x.dxf']] as const) {
      for (let k = 0; k < 150; k++) {
        const chars = text.split('');
        for (let j = 0; j < 3; j++) chars.splice(Math.floor(rand() * chars.length), Math.floor(rand() * 4), String.fromCharCode(32 + Math.floor(rand() * 90)));
        const r = loadPatternText(chars.join(''), name);
        expect(Array.isArray(r.messages)).toBe(true);
        if (!r.pattern) expect(r.messages.some((m) => m.severity === 'error')).toBe(true);
        expect(r.messages.some((m) => m.code === 'internal-error')).toBe(false);
      }
    }
  });
});
