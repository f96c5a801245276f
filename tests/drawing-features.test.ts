// What CAD and drawing programs put in files beyond plain lines: DXF blocks (scaled, rotated, arrayed, layer 0
// taking the inserting layer), the entity's own coordinate system (extrusion −z mirrors x), colours by layer;
// SVG units (CSS: 96 px per inch), <use>, nested <svg>, <style> classes, hidden layers. Lengths and units are
// checked against the DXF reference's $INSUNITS codes and CSS Values and Units (common practice).
import { describe, expect, it } from 'vitest';
import { loadPatternText } from '../solver/formats/load';
import { decodeDxf } from '../solver/formats/dxf-text';
import type { Pattern } from '../solver/types';

const dxf = (groups: [number, string | number][]) => groups.map(([c, v]) => `${String(c).padStart(3)}\n${v}`).join('\n') + '\n';
const section = (name: string, body: [number, string | number][]): [number, string | number][] => [[0, 'SECTION'], [2, name], ...body, [0, 'ENDSEC']];

/** Creases (not the rim) as sorted "x1,y1 x2,y2 A" strings, rounded to 1e-6. */
function creases(p: Pattern): string[] {
  const f = (x: number) => (Math.round(x * 1e6) / 1e6 + 0).toString();
  return p.creases
    .filter((c) => c.assignment !== 'B')
    .map((c) => `${c.vertices.map((v) => `${f(p.vertices[v][0])},${f(p.vertices[v][1])}`).sort().join(' ')} ${c.assignment}`)
    .sort();
}

describe('DXF beyond plain lines', () => {
  it('blocks: inserted scaled, rotated and in an array; entities on layer 0 take the inserting layer; the outline mirrored by its extrusion', () => {
    const text = dxf([
      ...section('HEADER', [[9, '$INSUNITS'], [70, 5]]),
      ...section('TABLES', [[0, 'TABLE'], [2, 'LAYER'], [0, 'LAYER'], [2, 'valley'], [70, 0], [62, 5], [0, 'LAYER'], [2, 'hidden-notes'], [70, 0], [62, -3], [0, 'ENDTAB']]),
      ...section('BLOCKS', [[0, 'BLOCK'], [2, 'unit-crease'], [10, 0], [20, 0], [0, 'LINE'], [8, '0'], [10, 0], [20, 0], [11, 1], [21, 0], [0, 'ENDBLK']]),
      ...section('ENTITIES', [
        // the outline drawn with extrusion (0, 0, −1): its own x axis points the other way (arbitrary-axis rule)
        [0, 'LWPOLYLINE'], [8, 'cut'], [90, 4], [70, 1], [10, 0], [20, 0], [10, -90], [20, 0], [10, -90], [20, 90], [10, 0], [20, 90], [210, 0], [220, 0], [230, -1],
        // two horizontal valleys by one INSERT: scale 90 along x, an array of 1 column × 2 rows 30 apart
        [0, 'INSERT'], [8, 'valley'], [2, 'unit-crease'], [10, 0], [20, 30], [41, 90], [42, 1], [70, 1], [71, 2], [44, 0], [45, 30],
        // one vertical mountain: rotated 90°, scaled 90
        [0, 'INSERT'], [8, 'mountain'], [2, 'UNIT-CREASE'], [10, 45], [20, 0], [41, 90], [42, 90], [50, 90],
        // a line on a layer that is off, and one in paper space: not read
        [0, 'LINE'], [8, 'hidden-notes'], [10, 0], [20, 0], [11, 90], [21, 90],
        [0, 'LINE'], [8, 'valley'], [67, 1], [10, 0], [20, 90], [11, 90], [21, 0],
      ]),
      [0, 'EOF'],
    ]);
    const r = loadPatternText(text, 'blocks.dxf');
    expect(r.messages.filter((m) => m.severity === 'error')).toEqual([]);
    expect(r.project!.units).toBe('cm'); // $INSUNITS 5 = centimetres (DXF reference)
    const p = r.pattern!;
    // the outline at x ∈ [0, 90]: mirrored from [−90, 0]
    expect(Math.min(...p.vertices.map((v) => v[0]))).toBe(0);
    expect(Math.max(...p.vertices.map((v) => v[0]))).toBe(90);
    expect(creases(p)).toEqual(['0,30 45,30 V', '0,60 45,60 V', '45,0 45,30 M', '45,30 45,60 M', '45,30 90,30 V', '45,60 45,90 M', '45,60 90,60 V'].sort());
    expect(r.messages.filter((m) => m.code === 'crossing-becomes-vertex')).toHaveLength(2);
    const notRead = r.messages.filter((m) => m.code === 'dxf-not-read').map((m) => m.text);
    expect(notRead.some((t) => /on layer "hidden-notes", which is off/.test(t))).toBe(true);
    expect(notRead.some((t) => /in paper space/.test(t))).toBe(true);
  });

  it('colours by layer and by entity, for --stroke; a true colour (group 420) matches its RGB', () => {
    const text = dxf([
      ...section('TABLES', [[0, 'TABLE'], [2, 'LAYER'], [0, 'LAYER'], [2, 'lines'], [70, 0], [62, 1], [0, 'ENDTAB']]),
      ...section('ENTITIES', [
        [0, 'LWPOLYLINE'], [8, 'outline'], [90, 4], [70, 1], [10, 0], [20, 0], [10, 100], [20, 0], [10, 100], [20, 100], [10, 0], [20, 100],
        [0, 'LINE'], [8, 'lines'], [10, 0], [20, 0], [11, 100], [21, 100], // colour by layer: 1, red
        [0, 'LINE'], [8, 'lines'], [62, 5], [420, 0x00aa44], [10, 100], [20, 0], [11, 0], [21, 100], // a true colour wins
      ]),
      [0, 'EOF'],
    ]);
    const r = loadPatternText(text, 'colours.dxf', { strokes: [{ colour: 'red', assignment: 'M' }, { colour: '#00aa44', assignment: 'V' }] });
    expect(r.messages.filter((m) => m.severity === 'error')).toEqual([]);
    const a = r.pattern!.creases.filter((c) => c.assignment !== 'B').map((c) => c.assignment).sort();
    expect(a).toEqual(['M', 'M', 'V', 'V']);
    expect(r.messages.some((m) => m.code === 'dxf-units-missing')).toBe(true);
    expect(r.project!.units).toBeUndefined();
  });
});

describe('crease labels from texts on a label layer', () => {
  const text = (layer: string, x: number, y: number, label: string): [number, string | number][] => [[0, 'TEXT'], [8, layer], [10, x], [20, y], [40, 2], [1, label]];
  const sheet = (texts: [number, string | number][]) =>
    loadPatternText(dxf(section('ENTITIES', [
      [0, 'LWPOLYLINE'], [8, 'outline'], [90, 4], [70, 1], [10, 0], [20, 0], [10, 100], [20, 0], [10, 100], [20, 100], [10, 0], [20, 100],
      [0, 'LINE'], [8, 'valley'], [10, 0], [20, 50], [11, 100], [21, 50],
      [0, 'LINE'], [8, 'mountain'], [10, 50], [20, 0], [11, 50], [21, 50],
      ...texts,
    ])), 'labels.dxf');
  it('a text at the middle of a crease names it; texts elsewhere, twice or off the label layer are reported', () => {
    const r = sheet([
      ...text('crease labels', 25, 50, 'hinge-A'), // the middle of the valley's left piece
      ...text('crease labels', 50, 25, 'drive'), // the middle of the mountain
      ...text('crease labels', 25, 50.4, 'again'), // a second label on the same crease
      ...text('crease labels', 80, 80, 'nowhere'), // in a panel, far from any middle
      ...text('crease labels', 75, 50, 'drive'), // a label already taken
      ...text('notes', 10, 10, 'a note'), // not on a label layer
    ]);
    expect(r.messages.filter((m) => m.severity === 'error')).toEqual([]);
    const labels = new Map(r.pattern!.creases.map((c) => [c.label, c]));
    expect(labels.get('hinge-A')!.assignment).toBe('V');
    expect(labels.get('drive')!.assignment).toBe('M');
    const codes = r.messages.map((m) => m.code);
    for (const c of ['label-twice', 'label-unmatched', 'label-duplicate', 'texts-ignored', 'labels-read']) expect(codes, c).toContain(c);
    expect(r.messages.find((m) => m.code === 'label-unmatched')!.where?.line).toBeGreaterThan(0);
  });
});

describe('DXF text encodings', () => {
  // a file before AutoCAD 2007 is in the Windows code page its header names ($DWGCODEPAGE), e.g. 1252 or 1251
  const bytes = (latin1: string) => Uint8Array.from(latin1, (ch) => ch.charCodeAt(0));
  it('UTF-8 when the bytes are UTF-8; else the code page of $DWGCODEPAGE; else Windows-1252', () => {
    expect(decodeDxf(new TextEncoder().encode('  8\nTäler\n'))).toEqual({ text: '  8\nTäler\n', encoding: 'utf-8' });
    expect(decodeDxf(bytes('  8\nT\xe4ler\n'))).toEqual({ text: '  8\nTäler\n', encoding: 'windows-1252' });
    const cyrillic = decodeDxf(bytes('  9\n$DWGCODEPAGE\n  3\nANSI_1251\n  8\n\xc4\xee\xeb\xe8\xed\xe0\n'));
    expect(cyrillic.encoding).toBe('windows-1251');
    expect(cyrillic.text).toContain('Долина');
  });
});

describe('SVG beyond plain lines', () => {
  it('a size in px is converted to mm at 96 px per inch (CSS Values and Units 3)', () => {
    const r = loadPatternText(
      '<svg xmlns="http://www.w3.org/2000/svg" width="384" height="384" viewBox="0 0 384 384"><g id="outline"><rect width="384" height="384" stroke="#000" fill="none"/></g><g id="valley"><line x1="0" y1="0" x2="384" y2="384" stroke="#000"/></g></svg>',
      'px.svg',
    );
    expect(r.project!.units).toBe('mm');
    // 384 px = 4 in = 101.6 mm
    expect(Math.max(...r.pattern!.vertices.map((v) => v[0]))).toBeCloseTo(101.6, 10);
    expect(r.messages.some((m) => m.code === 'svg-units-px')).toBe(true);
  });

  it('a group is named by its label (any namespace), its data-name or its id; --layer takes any of them', () => {
    const body = (g: string) =>
      `<svg xmlns="http://www.w3.org/2000/svg" xmlns:ed="http://example.org/editor" width="10mm" height="10mm" viewBox="0 0 10 10"><g id="rim"><rect width="10" height="10" stroke="#000" fill="none"/></g>${g}<line x1="0" y1="0" x2="10" y2="10" stroke="#000"/></g></svg>`;
    const assignment = (g: string, layers?: { name: string; assignment: 'M' | 'V' }[]) =>
      loadPatternText(body(g), 'g.svg', layers ? { layers } : {}).pattern!.creases.find((c) => c.assignment !== 'B')!.assignment;
    expect(assignment('<g id="layer1" ed:label="Valley folds">')).toBe('V');
    expect(assignment('<g id="Mountain_1_" data-name="fold set 1">')).toBe('M');
    expect(assignment('<g id="layer1" ed:label="set A">', [{ name: 'layer1', assignment: 'M' }])).toBe('M');
    expect(assignment('<g id="layer1" data-name="set A">', [{ name: 'set a', assignment: 'V' }])).toBe('V');
  });

  it('says which layer or group gave its lines which assignment, and how (the app lists them to be set)', () => {
    const svg = (g: string) =>
      `<svg xmlns="http://www.w3.org/2000/svg" width="10mm" height="10mm" viewBox="0 0 10 10"><g id="rim"><rect width="10" height="10" stroke="#000" fill="none"/></g>${g}<line x1="0" y1="0" x2="10" y2="10" stroke="#000"/><line x1="0" y1="10" x2="5" y2="5" stroke="#000"/></g></svg>`;
    const plain = loadPatternText(svg('<g id="set A">'), 'g.svg');
    expect(plain.layers).toEqual([
      { name: 'rim', assignment: 'B', how: 'name', lines: 4 },
      { name: 'set A', assignment: 'U', how: 'none', lines: 2 },
    ]);
    expect(plain.messages.find((m) => m.code === 'layer-unassigned')?.text).toMatch(/"set A".*--layer "set A=M".*Layers dialog\./);
    const mapped = loadPatternText(svg('<g id="set A">'), 'g.svg', { layers: [{ name: 'SET a', assignment: 'M' }] });
    expect(mapped.layers).toContainEqual({ name: 'set A', assignment: 'M', how: 'layer', lines: 2 });
    expect(mapped.messages.some((m) => m.code === 'layer-unassigned')).toBe(false);
    // the colours the lines are drawn in, and what a --stroke mapping made of them
    expect(plain.colours).toEqual([{ colour: '#000000', text: '#000000', lines: 6 }]);
    const stroked = loadPatternText(svg('<g id="set A">'), 'g.svg', { strokes: [{ colour: 'black', assignment: 'V' }] });
    expect(stroked.colours).toEqual([{ colour: '#000000', text: '#000000', lines: 6, assignment: 'V' }]);
  });

  it('inches are kept; a viewBox scales user units to the width', () => {
    const r = loadPatternText(
      '<svg xmlns="http://www.w3.org/2000/svg" width="4in" height="2in" viewBox="0 0 400 200"><g id="border"><polygon points="0,0 400,0 400,200 0,200" stroke="black" fill="none"/></g><g id="Mountain"><line x1="200" y1="0" x2="200" y2="200" stroke="black"/></g></svg>',
      'in.svg',
    );
    expect(r.project!.units).toBe('in');
    expect(creases(r.pattern!)).toEqual(['2,0 2,2 M']);
  });

  it('<use> of a line, a nested <svg>, classes from <style>; hidden groups are not read', () => {
    const r = loadPatternText(
      `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" width="100mm" height="100mm" viewBox="0 0 100 100">
        <style>.crease { stroke: #c00000 } line.soft { stroke: #0000c0 }</style>
        <defs><line id="half" x1="0" y1="0" x2="50" y2="0" class="crease"/></defs>
        <g id="outline" stroke="black" fill="none"><rect width="100" height="100"/></g>
        <g id="creases-a"><use xlink:href="#half" y="50"/><use href="#half" x="50" y="50"/></g>
        <g id="creases-b"><svg x="50" y="0" width="10" height="100" viewBox="0 0 10 100"><line x1="0" y1="0" x2="0" y2="50" class="soft"/></svg></g>
        <g id="construction" style="display:none"><line x1="0" y1="0" x2="100" y2="100" stroke="black"/></g>
      </svg>`,
      'use.svg',
      { strokes: [{ colour: '#c00000', assignment: 'V' }, { colour: 'rgb(0, 0, 192)', assignment: 'M' }], snap: 1e-6 },
    );
    expect(r.messages.filter((m) => m.severity === 'error'), JSON.stringify(r.messages)).toEqual([]);
    // the two halves of the horizontal line (drawn by two <use>) are one valley; the vertical half from the
    // nested <svg> ends on it (y flipped: from the top edge down to the middle)
    expect(creases(r.pattern!)).toEqual(['0,50 50,50 V', '100,50 50,50 V', '50,100 50,50 M'].sort());
    expect(r.messages.some((m) => m.code === 'svg-not-read' && /display: none/.test(m.text))).toBe(true);
  });
});
