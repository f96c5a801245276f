// File formats: the project file and its schema, FOLD import/export, drives from files and the command
// line, and the folded-shape exports (OBJ, STL, JSON). Malformed files are refused with a code and the
// place in the file, never a throw.
import { describe, expect, it } from 'vitest';
import Ajv2020Module from 'ajv/dist/2020.js';
import { Matrix4, Vector3 } from 'three';
import schema from '../schema/project.schema.json' with { type: 'json' };
import {
  jsonPath,
  loadPatternText,
  MAX_TEXT_BYTES,
  MAX_VERTICES,
  parseProject,
  writeProject,
  type Project,
} from '../solver/formats/project';
import { parseFold, writeFold } from '../solver/formats/fold';
import { firstJsonError, lineColumn, utf8Length } from '../solver/formats/limits';
import { shapeToJSON, shapeToOBJ, shapeToSTL, triangulatePanel } from '../solver/formats/shape-export';
import { CAUTIONS } from '../solver/formats/cautions';
import { parseSetOption, resolveDrives } from '../solver/model/drives';
import { buildPattern } from '../solver/model/pattern';
import { miura, singleVertex, waterbomb } from '../solver/model/generators';
import type { Message, Pattern, Shape } from '../solver/types';

const Ajv = ((Ajv2020Module as unknown as { default?: unknown }).default ?? Ajv2020Module) as new (o: object) => {
  validateSchema(s: object): boolean;
  errors?: unknown;
};

// tests edit arbitrary JSON documents in place
// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Json = Record<string, any>;

const code = (ms: Message[], c: string) => ms.find((m) => m.code === c);
function refusedWith(r: { project?: unknown; messages: Message[] }, c: string): Message {
  expect(r.project, JSON.stringify(r.messages)).toBeUndefined();
  const m = code(r.messages, c);
  expect(m, `expected ${c} among ${r.messages.map((x) => `${x.code}: ${x.text}`).join(' | ')}`).toBeDefined();
  expect(m!.severity).toBe('error');
  return m!;
}

function coupon(): Project {
  const p = singleVertex({ sectorsDeg: [60, 100, 120, 80], radius: 50 }).project!;
  p.units = 'mm';
  p.notes = 'a test coupon';
  p.source.limits[1] = { min: (-170 * Math.PI) / 180, max: 0 };
  p.source.basePanel = 2;
  p.foldAngles = p.source.edges.map((_, k) => (k < 4 ? ((k + 1) * Math.PI) / 12 : 0));
  return p;
}

/** Replace one part of a valid project file's JSON and return the text. */
function editedProject(edit: (o: Json) => void): string {
  const o = JSON.parse(writeProject(coupon()));
  edit(o);
  return JSON.stringify(o, null, 2);
}

describe('project file', () => {
  it('the schema is a valid JSON Schema draft 2020-12 document (checked by ajv, a reference validator from the npm registry)', () => {
    const ajv = new Ajv({ strict: true });
    expect(ajv.validateSchema(schema as object)).toBe(true);
  });

  it('round-trips a project exactly: coordinates, assignments, labels, limits, faces, base panel, drives, units, notes, start state', () => {
    const p = coupon();
    p.source.faces = buildPattern(p.source).pattern!.panels.map((q) => q.vertices.slice().reverse());
    const text = writeProject(p);
    const r = parseProject(text);
    expect(r.messages).toEqual([]);
    const q = r.project!;
    expect(q.source.vertices).toEqual(p.source.vertices);
    expect(q.source.edges).toEqual(p.source.edges);
    expect(q.source.assignments).toEqual(p.source.assignments);
    expect(q.source.labels).toEqual(p.source.labels);
    expect(q.source.faces).toEqual(p.source.faces);
    expect(q.source.basePanel).toBe(2);
    expect(q.source.limits[1]!.min).toBeCloseTo(p.source.limits[1]!.min!, 14);
    expect(q.source.limits[1]!.max).toBe(0);
    expect(q.source.limits[0]).toBeUndefined();
    expect(q.drives.map(({ crease, angleDeg }) => ({ crease, angleDeg }))).toEqual(p.drives);
    expect(q.units).toBe('mm');
    expect(q.notes).toBe('a test coupon');
    q.foldAngles!.forEach((a, k) => expect(a).toBeCloseTo(p.foldAngles![k], 14));
    // writing what was read gives the same text: stable key order, degrees cleaned of conversion noise
    expect(writeProject(q)).toBe(text);
    expect(text).toContain('"min":-170');
    expect(text.indexOf('"format"')).toBeLessThan(text.indexOf('"version"'));
  });

  it('names panels: read, written, kept through FOLD, shown on the pattern; a name for a missing panel or a repeated one is refused by name', () => {
    const p = coupon();
    p.source.panelNames = ['hinge plate', undefined, 'base'];
    const text = writeProject(p);
    expect(text).toContain('"panelNames": {"0":"hinge plate","2":"base"}');
    const q = parseProject(text).project!;
    expect(q.source.panelNames).toEqual(['hinge plate', undefined, 'base']);
    const pattern = buildPattern(q.source).pattern!;
    expect(pattern.panels.map((x) => x.name)).toEqual(['hinge plate', undefined, 'base', undefined]);
    // FOLD: a namespaced per-face list, null for an unnamed panel
    const fold = writeFold(q);
    expect(JSON.parse(fold)['hingeplan:faces_name']).toEqual(['hinge plate', null, 'base']);
    expect(parseFold(fold).project!.source.panelNames).toEqual(['hinge plate', undefined, 'base']);
    // the schema refuses a key that is not a panel index
    expect(parseProject(text.replace('"2":"base"', '"two":"base"')).messages.some((m) => m.severity === 'error' && m.where?.field?.startsWith('panelNames'))).toBe(true);
    const built = buildPattern({ ...q.source, panelNames: ['a', 'a', undefined, undefined, 'ghost'] });
    expect(code(built.messages, 'duplicate-panel-name')!.text).toBe('Panels 0 and 1 are both named "a"; panel 1 is known by its index.');
    expect(code(built.messages, 'panel-name-unknown')!.text).toContain('Panel 4 is named "ghost", but the pattern has 4 panels');
    expect(built.pattern!.panels[1].name).toBeUndefined();
  });

  it('not-json: names the line and column of a syntax error (JSON per RFC 8259)', () => {
    const m = refusedWith(parseProject('{\n  "format": "hingeplan-project",\n  "version": 1,\n  "name": oops\n}'), 'not-json');
    expect(m.where).toEqual({ line: 4 });
    expect(m.text).toContain('line 4, column 11');
    const t = refusedWith(parseProject('{"format": "hingeplan-project", "vertices": [[0, 0]'), 'not-json');
    expect(t.text).toContain('ends too early');
    expect(refusedWith(parseProject('{"a": 1,}'), 'not-json').text).toContain('column 9');
    expect(refusedWith(parseProject(''), 'not-json').where).toEqual({ line: 1 });
  });

  it('the syntax-error finder agrees with JSON.parse on which texts are JSON', () => {
    const texts = ['1', ' "a\\u00e9" ', '[1, 2.5e-3, -0, true, false, null, {"a": [{}]}]', '[1,]', '{"a" 1}', '01', '"\\x"', '"a\n"', '[1] [2]', '{"a":1', '-', '1.', '.5', 'tru', '{}', '[]'];
    for (const t of texts) {
      let valid = true;
      try {
        JSON.parse(t);
      } catch {
        valid = false;
      }
      expect(firstJsonError(t) === undefined, t).toBe(valid);
    }
    expect(lineColumn('ab\ncd\nef', 7)).toEqual({ line: 3, column: 2 });
  });

  it('wrong-format and unsupported-version', () => {
    expect(refusedWith(parseProject('{"name": "x"}'), 'wrong-format').where).toEqual({ field: 'format' });
    expect(refusedWith(parseProject('{"vertices_coords": []}'), 'wrong-format').text).toContain('FOLD');
    expect(refusedWith(parseProject('{"format": "something-else", "version": 1}'), 'wrong-format').text).toContain('something-else');
    expect(refusedWith(parseProject(editedProject((o) => (o.version = 2))), 'unsupported-version').text).toContain('newer');
    expect(refusedWith(parseProject(editedProject((o) => (o.version = '1'))), 'unsupported-version').where).toEqual({ field: 'version' });
    expect(refusedWith(parseProject(editedProject((o) => delete o.version)), 'unsupported-version')).toBeDefined();
    expect(refusedWith(parseProject('[1, 2]'), 'not-a-project').text).toContain('array');
  });

  it('file-too-large, too-many-vertices, too-deeply-nested: refused before any other work', () => {
    const huge = ' '.repeat(MAX_TEXT_BYTES + 1);
    expect(refusedWith(parseProject(huge), 'file-too-large').text).toContain('32 MiB');
    expect(utf8Length('aé€😀')).toBe(1 + 2 + 3 + 4); // UTF-8 byte counts per RFC 3629
    const many = `{"format": "hingeplan-project", "version": 1, "name": "x", "vertices": [${'[0,0],'.repeat(MAX_VERTICES)}[0,0]], "creases": []}`;
    expect(refusedWith(parseProject(many), 'too-many-vertices').where).toEqual({ field: 'vertices' });
    expect(refusedWith(parseProject('['.repeat(600) + ']'.repeat(600)), 'too-deeply-nested')).toBeDefined();
  });

  it('turns schema violations into messages naming the JSON path', () => {
    const cases: [string, (o: Json) => void, string, object][] = [
      ['bad-assignment', (o) => (o.creases[3].assignment = 'Q'), 'creases[3].assignment', { crease: 3 }],
      ['unknown-field', (o) => (o.creases[2].lable = 'x'), 'creases[2]', { crease: 2 }],
      ['missing-field', (o) => delete o.creases[5].vertices, 'creases[5].vertices', { crease: 5 }],
      ['wrong-type', (o) => (o.vertices[1][0] = '3'), 'vertices[1][0]', { vertex: 1 }],
      ['wrong-type', (o) => (o.creases[0].vertices[1] = 1.5), 'creases[0].vertices[1]', { crease: 0 }],
      ['wrong-length', (o) => (o.vertices[4] = [1, 2, 3]), 'vertices[4]', { vertex: 4 }],
      ['limit-out-of-range', (o) => (o.creases[1].limits.min = -200), 'creases[1].limits.min', { crease: 1 }],
      ['bad-label', (o) => (o.creases[0].label = ''), 'creases[0].label', { crease: 0 }],
      ['wrong-type', (o) => (o.drives[0].angle = 'forty'), 'drives[0].angle', {}],
      ['missing-field', (o) => delete o.name, 'name', {}],
      ['unknown-field', (o) => (o.colour = 'red'), '(top level)', {}],
      ['fold-angle-out-of-range', (o) => (o.foldAngles[2] = 181), 'foldAngles[2]', {}],
      ['wrong-type', (o) => (o.basePanel = -1.5), 'basePanel', {}],
    ];
    for (const [c, edit, field, where] of cases) {
      const m = refusedWith(parseProject(editedProject(edit)), c);
      expect(m.where).toMatchObject({ field, ...where });
      if (field !== '(top level)') expect(m.text).toContain(field);
    }
    // a number too large for a double parses to Infinity: reported as not finite, at its place
    const inf = writeProject(coupon()).replace('[50,0]', '[50,1e999]');
    expect(refusedWith(parseProject(inf), 'vertex-not-finite').where).toMatchObject({ field: 'vertices[1][1]', vertex: 1 });
    expect(refusedWith(parseProject(editedProject((o) => o.foldAngles.pop())), 'wrong-length').where).toEqual({ field: 'foldAngles' });
    expect(jsonPath('/a~1b/3/c')).toBe('a/b[3].c');
  });

  it('loadPatternText: builds the pattern, resolves the drives and points pattern problems at the file’s fields', () => {
    const ok = loadPatternText(writeProject(coupon()), 'coupon.hingeplan.json');
    expect(ok.format).toBe('project');
    expect(ok.messages).toEqual([]);
    expect(ok.pattern!.interiorVertices.length).toBe(1);
    expect(ok.drives).toEqual([{ crease: 0, value: Math.PI / 4 }]);

    const crossing = loadPatternText(
      editedProject((o) => {
        o.creases.push({ vertices: [1, 3], assignment: 'M', label: 'stray' });
        o.foldAngles.push(0);
      }),
    );
    expect(crossing.pattern).toBeUndefined();
    expect(code(crossing.messages, 'creases-cross')!.where).toMatchObject({ field: expect.stringMatching(/^creases\[\d+\]$/) });

    const badDrive = loadPatternText(editedProject((o) => (o.drives = [{ crease: 'nope', angle: 10 }])));
    expect(badDrive.pattern).toBeDefined();
    expect(badDrive.drives).toEqual([]);
    const m = code(badDrive.messages, 'unknown-crease')!;
    expect(m.where).toEqual({ field: 'drives[0]' });
    expect(m.text).toContain('c0, c1, c2, c3');
  });

  it('loadPatternText tells FOLD from a project by extension or by a vertices_coords key', () => {
    const fold = writeFold(coupon());
    expect(loadPatternText(fold).format).toBe('fold');
    expect(loadPatternText(fold, 'a.FOLD').format).toBe('fold');
    expect(loadPatternText(writeProject(coupon()), 'mislabelled.fold').format).toBe('project');
    expect(loadPatternText('{"vertices": []}', 'x.json').messages[0].code).toBe('wrong-format');
    expect(loadPatternText('{"edges_vertices": []}', 'x.fold').messages[0]).toMatchObject({ code: 'missing-field', where: { field: 'vertices_coords' } });
  });
});

describe('FOLD files', () => {
  // Field names, the assignment letters and the degree/valley-positive fold angle follow the FOLD
  // specification 1.1 (E. Demaine, J. Ku, R. Lang; from memory); "C" (cut) is from its later 1.2.
  const square = {
    file_spec: 1.1,
    file_creator: 'someone else',
    file_author: 'a person',
    frame_title: 'square with a diagonal',
    frame_classes: ['creasePattern'],
    frame_attributes: ['2D'],
    frame_unit: 'mm',
    vertices_coords: [
      [0, 0],
      [1, 0],
      [1, 1],
      [0, 1],
    ],
    edges_vertices: [
      [0, 1],
      [1, 2],
      [2, 3],
      [3, 0],
      [0, 2],
    ],
    edges_assignment: ['B', 'B', 'B', 'B', 'V'],
    edges_foldAngle: [0, 0, 0, 0, 90],
    faces_vertices: [
      [0, 2, 1],
      [0, 3, 2],
    ],
    faces_edges: [
      [4, 1, 0],
      [3, 2, 4],
    ],
    'acme:stiffness': { units: 'N/m', values: [1, 2, [3, { deep: true }]] },
    file_frames: [{ frame_title: 'folded', vertices_coords: [[0, 0, 0]] }],
  };

  it('reads a FOLD crease pattern: name, units, assignments, faces; fold angles become a start state, not drives', () => {
    const r = parseFold(JSON.stringify(square));
    expect(r.messages.map((m) => m.code)).toEqual(['fold-frames-ignored']);
    const p = r.project!;
    expect(p.source.name).toBe('square with a diagonal');
    expect(p.units).toBe('mm');
    expect(p.source.assignments).toEqual(['B', 'B', 'B', 'B', 'V']);
    expect(p.drives).toEqual([]);
    expect(p.foldAngles![4]).toBeCloseTo(Math.PI / 2, 15);
    const built = buildPattern(p.source);
    expect(built.messages).toEqual([]);
    expect(built.pattern!.panels.map((q) => q.vertices)).toEqual([
      [0, 1, 2],
      [0, 2, 3],
    ]);
  });

  it('round-trips losslessly: coordinates, assignments, labels, limits, drives and every unknown field', () => {
    const r = parseFold(JSON.stringify(square));
    const p = r.project!;
    p.source.labels[4] = 'diag';
    p.source.limits[4] = { min: 0, max: Math.PI / 2 };
    p.drives = [{ crease: 'diag', angleDeg: 45 }];
    const text = writeFold(p);
    const back = JSON.parse(text);
    for (const k of ['file_author', 'frame_title', 'frame_classes', 'frame_attributes', 'faces_edges', 'acme:stiffness', 'file_frames']) {
      expect(back[k], k).toEqual((square as Record<string, unknown>)[k]);
    }
    expect(back.file_spec).toBe(1.1);
    expect(back.file_creator).toBe('Hingeplan');
    expect(back.vertices_coords).toEqual(square.vertices_coords);
    expect(back.edges_vertices).toEqual(square.edges_vertices);
    expect(back.edges_assignment).toEqual(square.edges_assignment);
    expect(back.edges_foldAngle).toEqual(square.edges_foldAngle);
    expect(back['hingeplan:edges_label']).toEqual([null, null, null, null, 'diag']);
    expect(back['hingeplan:edges_limits'][4]).toEqual({ min: 0, max: 90 });
    const again = parseFold(text);
    expect(again.messages.map((m) => m.code)).toEqual(['fold-frames-ignored']);
    expect(again.project!.source.labels).toEqual(p.source.labels);
    expect(again.project!.drives.map((d) => d.angleDeg)).toEqual([45]);
    expect(writeFold(again.project!)).toBe(text);
  });

  it('writes solved fold angles (radians in, degrees out, valley positive) when given', () => {
    const p = parseFold(JSON.stringify(square)).project!;
    const text = writeFold(p, { foldAngles: Float64Array.from([0, 0, 0, 0, -Math.PI / 3]) });
    expect(JSON.parse(text).edges_foldAngle).toEqual([0, 0, 0, 0, -60]);
    expect(JSON.parse(text)['hingeplan:cautions']).toBe(CAUTIONS);
    expect(parseFold(text).project!.fold!.extra).not.toHaveProperty('hingeplan:cautions');
  });

  it('accepts 3D coordinates with one common z and writes them back the same; refuses a folded state', () => {
    const lifted = { ...square, vertices_coords: square.vertices_coords.map(([x, y]) => [x, y, 2.5]) };
    const r = parseFold(JSON.stringify(lifted));
    expect(r.project!.source.vertices[2]).toEqual([1, 1]);
    expect(JSON.parse(writeFold(r.project!)).vertices_coords).toEqual(lifted.vertices_coords);
    const folded = { ...square, vertices_coords: [[0, 0, 0], [1, 0, 0], [1, 1, 0.3], [0, 1, 0]] };
    const m = refusedWith(parseFold(JSON.stringify(folded)), 'fold-not-flat');
    expect(m.where).toEqual({ field: 'vertices_coords[2]' });
    expect(m.text).toContain('flat crease pattern');
  });

  it('reads lowercase assignments and C (cut) as boundary, with messages', () => {
    const r = parseFold(JSON.stringify({ ...square, edges_assignment: ['b', 'C', 'B', 'b', 'v'] }));
    expect(r.project!.source.assignments).toEqual(['B', 'B', 'B', 'B', 'V']);
    expect(code(r.messages, 'cut-read-as-boundary')!.severity).toBe('warning');
    expect(code(r.messages, 'assignment-lowercase')).toBeDefined();
  });

  it('without edges_assignment: every edge unassigned, the rim found from the geometry', () => {
    const { edges_assignment: _drop, ...rest } = square;
    void _drop;
    const loaded = loadPatternText(JSON.stringify(rest), 'sq.fold');
    expect(loaded.pattern).toBeDefined();
    expect(loaded.pattern!.creases.map((c) => c.assignment)).toEqual(['B', 'B', 'B', 'B', 'U']);
    expect(code(loaded.messages, 'no-assignments')).toBeDefined();
    expect(code(loaded.messages, 'edge-on-rim-not-boundary')!.where).toMatchObject({ field: 'edges_vertices[0]', crease: 0 });
  });

  it('refuses malformed FOLD with the field at fault', () => {
    const cases: [Record<string, unknown>, string, string][] = [
      [{ ...square, vertices_coords: undefined }, 'missing-field', 'vertices_coords'],
      [{ ...square, vertices_coords: [[0, 0], [1, 'x'], [1, 1], [0, 1]] }, 'wrong-type', 'vertices_coords[1]'],
      [{ ...square, edges_vertices: [[0, 1], [1, 2], [2, 3], [3], [0, 2]] }, 'wrong-type', 'edges_vertices[3]'],
      [{ ...square, edges_assignment: ['B', 'B'] }, 'wrong-length', 'edges_assignment'],
      [{ ...square, edges_assignment: ['B', 'B', 'B', 'B', 'X'] }, 'bad-assignment', 'edges_assignment[4]'],
      [{ ...square, faces_vertices: 'none' }, 'wrong-type', 'faces_vertices'],
      [{ ...square, 'hingeplan:edges_label': [null, null, null, null, 5] }, 'bad-label', 'hingeplan:edges_label[4]'],
      [{ ...square, 'hingeplan:drives': [{ crease: 4 }] }, 'drive-malformed', 'hingeplan:drives[0]'],
    ];
    for (const [obj, c, field] of cases) expect(refusedWith(parseFold(JSON.stringify(obj)), c).where).toMatchObject({ field });
    expect(refusedWith(parseFold('"just text"'), 'not-a-fold')).toBeDefined();
    // out-of-range fold angles only lose the start state
    const r = parseFold(JSON.stringify({ ...square, edges_foldAngle: [0, 0, 0, 0, 270] }));
    expect(r.project!.foldAngles).toBeUndefined();
    expect(code(r.messages, 'bad-fold-angle')!.where).toEqual({ field: 'edges_foldAngle[4]' });
    // faces that disagree with the edges are refused once the pattern is built
    const wrongFaces = loadPatternText(JSON.stringify({ ...square, faces_vertices: [[0, 1, 2, 3]] }), 'x.fold');
    expect(code(wrongFaces.messages, 'face-mismatch')!.where).toMatchObject({ field: 'faces_vertices[0]', panel: 0 });
  });

  it('names the pattern from file_title, then frame_title, then the file name', () => {
    const { frame_title: _t, ...noTitle } = square;
    void _t;
    expect(parseFold(JSON.stringify({ ...square, file_title: 'T' })).project!.source.name).toBe('T');
    expect(parseFold(JSON.stringify(noTitle), '/some/dir/shade.fold').project!.source.name).toBe('shade');
  });

  it('keeps our own units in a namespaced key when frame_unit cannot say them', () => {
    const p = coupon();
    p.units = 'thou';
    const back = JSON.parse(writeFold(p));
    expect(back.frame_unit).toBeUndefined();
    expect(back['hingeplan:units']).toBe('thou');
    expect(parseFold(JSON.stringify(back)).project!.units).toBe('thou');
  });
});

describe('drives', () => {
  const vertex = buildPattern(singleVertex({ sectorsDeg: [90, 90, 90, 90], assignments: ['M', 'V', 'F', 'M'] }).project!.source).pattern!;

  it('resolves labels and indices to crease indices and radians', () => {
    const r = resolveDrives(vertex, [
      { crease: 'c1', angleDeg: 30 },
      { crease: '0', angleDeg: -180 },
    ]);
    expect(r.messages).toEqual([]);
    expect(r.drives).toEqual([
      { crease: 1, value: Math.PI / 6 },
      { crease: 0, value: -Math.PI },
    ]);
  });

  it('refuses unknown creases, the rim, flat creases, out-of-range angles and a crease driven twice', () => {
    const r = resolveDrives(vertex, [
      { crease: 'zz', angleDeg: 10 },
      { crease: 'rim0', angleDeg: 10 },
      { crease: 'c2', angleDeg: 10 },
      { crease: 'c1', angleDeg: 181 },
      { crease: 'c1', angleDeg: NaN },
      { crease: 'c3', angleDeg: -10, field: '--set' },
      { crease: '3', angleDeg: -20 },
    ]);
    expect(r.drives).toEqual([{ crease: 3, value: (-10 * Math.PI) / 180 }]);
    expect(r.messages.map((m) => m.code)).toEqual(['unknown-crease', 'drive-on-boundary', 'drive-on-flat', 'drive-out-of-range', 'drive-out-of-range', 'duplicate-drive']);
    expect(r.messages[0].text).toContain('c0, c1, c3');
    expect(r.messages[0].text).not.toContain('c2'); // a flat crease cannot be driven, so it is not offered
    expect(r.messages[1].where).toEqual({ field: 'drives[1]', crease: 4, creaseLabel: 'rim0' });
    expect(r.messages[5].where).toMatchObject({ field: 'drives[6]', crease: 3 });
  });

  it('checks hinge limits and warns when a drive goes against the mountain/valley assignment', () => {
    const src = singleVertex({ sectorsDeg: [90, 90, 90, 90], assignments: ['M', 'V', 'M', 'M'] }).project!.source;
    src.limits[1] = { min: 0, max: Math.PI / 2 };
    const p = buildPattern(src).pattern!;
    const r = resolveDrives(p, [
      { crease: 'c1', angleDeg: 100 },
      { crease: 'c0', angleDeg: 20 },
    ]);
    expect(r.messages.map((m) => [m.severity, m.code])).toEqual([
      ['error', 'drive-outside-limit'],
      ['warning', 'drive-against-assignment'],
    ]);
    expect(r.messages[0].text).toContain('0° … 90°');
  });

  it('parses --set options and refuses malformed ones with bad-set-option', () => {
    expect(parseSetOption('z3=45').drive).toEqual({ crease: 'z3', angleDeg: 45, field: '--set' });
    expect(parseSetOption(' z3 = -30.5 ').drive?.angleDeg).toBe(-30.5);
    expect(parseSetOption('12=90deg').drive).toMatchObject({ crease: '12', angleDeg: 90 });
    expect(parseSetOption('c0=45°').drive?.angleDeg).toBe(45);
    expect(parseSetOption('c0=1e1').drive?.angleDeg).toBe(10);
    for (const bad of ['z3', '=45', 'z3=', 'z3=abc', 'z3=4 5', 'z3=0x10', 'z3=Infinity']) {
      const r = parseSetOption(bad);
      expect(r.drive, bad).toBeUndefined();
      expect(r.messages[0]).toMatchObject({ severity: 'error', code: 'bad-set-option', where: { field: '--set' } });
      expect(r.messages[0].text).toContain('CREASE=DEGREES');
    }
  });
});

describe('folded-shape exports', () => {
  // Two 1 × 1 panels joined by the crease x = 1; the right panel turned 60° about it.
  const src = {
    name: 'two panels',
    vertices: [
      [0, 0],
      [1, 0],
      [2, 0],
      [2, 1],
      [1, 1],
      [0, 1],
    ] as [number, number][],
    edges: [
      [0, 1],
      [1, 2],
      [2, 3],
      [3, 4],
      [4, 5],
      [5, 0],
      [1, 4],
    ] as [number, number][],
    assignments: ['B', 'B', 'B', 'B', 'B', 'B', 'V'] as const,
    labels: [],
    limits: [],
  };
  const pattern: Pattern = buildPattern({ ...src, assignments: [...src.assignments] }).pattern!;
  const left = pattern.panels.findIndex((p) => p.vertices.includes(0));
  const right = 1 - left;
  // reference transform from three.js (an independent library from the npm registry)
  const turn = new Matrix4()
    .makeTranslation(1, 0, 0)
    .multiply(new Matrix4().makeRotationAxis(new Vector3(0, 1, 0), -Math.PI / 3))
    .multiply(new Matrix4().makeTranslation(-1, 0, 0));
  const e = turn.elements; // column-major
  const T = Float64Array.from([e[0], e[4], e[8], e[12], e[1], e[5], e[9], e[13], e[2], e[6], e[10], e[14]]);
  const I = Float64Array.from([1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0]);
  const transforms: Float64Array[] = [];
  transforms[left] = I;
  transforms[right] = T;
  const placed = (v: number, M: Matrix4) => new Vector3(pattern.vertices[v][0], pattern.vertices[v][1], 0).applyMatrix4(M);
  const shape: Shape = {
    vertices: pattern.vertices.map((_, v) => {
      const p = v === 2 || v === 3 ? placed(v, turn) : placed(v, new Matrix4());
      return [p.x, p.y, p.z];
    }),
    panelTransforms: transforms,
    maxMismatch: 0,
    basePanel: left,
  };

  it('CAUTIONS is one line saying it is a kinematic model to verify on hardware', () => {
    expect(CAUTIONS).not.toMatch(/\n/);
    expect(CAUTIONS).toMatch(/kinematic model only/);
    expect(CAUTIONS).toMatch(/verify on hardware/);
    expect(CAUTIONS).toMatch(/safety standards/);
  });

  it('OBJ: cautions in a comment, one object per panel, 1-based face indices (Wavefront OBJ format)', () => {
    const obj = shapeToOBJ(pattern, shape);
    const lines = obj.trim().split('\n');
    expect(lines.filter((l) => l.startsWith('#')).join('\n')).toContain(CAUTIONS);
    const vs = lines.filter((l) => l.startsWith('v ')).map((l) => l.split(' ').slice(1).map(Number));
    expect(vs.length).toBe(8);
    const faces = lines.filter((l) => l.startsWith('f ')).map((l) => l.split(' ').slice(1).map(Number));
    expect(faces.length).toBe(2);
    for (const f of faces) for (const k of f) expect(k >= 1 && k <= vs.length).toBe(true);
    // the right panel's far corner, placed by three.js
    const ref = placed(2, turn);
    expect(vs.some((v) => Math.hypot(v[0] - ref.x, v[1] - ref.y, v[2] - ref.z) < 1e-8)).toBe(true);
    expect(ref.z).not.toBeCloseTo(0, 3);
  });

  it('STL: solid/facet/outer loop structure, right-hand normals of unit length (ASCII STL as in the StereoLithography Interface Specification, 3D Systems 1989; from memory)', () => {
    const stl = shapeToSTL(pattern, shape);
    const lines = stl.trim().split('\n').map((l) => l.trim());
    expect(lines[0]).toBe('solid two_panels');
    expect(lines[lines.length - 1]).toBe('endsolid two_panels');
    const facets = lines.filter((l) => l.startsWith('facet normal'));
    expect(facets.length).toBe(4); // two quadrilaterals, two triangles each
    const normalRight = new Vector3(0, 0, 1).transformDirection(turn);
    const seen = new Set<string>();
    facets.forEach((l) => {
      const n = l.split(' ').slice(2).map(Number);
      expect(Math.hypot(n[0], n[1], n[2])).toBeCloseTo(1, 8);
      const isUp = Math.abs(n[2] - 1) < 1e-8;
      const isTurned = Math.hypot(n[0] - normalRight.x, n[1] - normalRight.y, n[2] - normalRight.z) < 1e-8;
      expect(isUp || isTurned).toBe(true);
      seen.add(isUp ? 'up' : 'turned');
    });
    expect(seen.size).toBe(2);
    expect(lines.filter((l) => l.startsWith('vertex')).length).toBe(12);
  });

  it('JSON: vertices, maxMismatch, panels with transforms, cautions and the caller’s extra fields', () => {
    const doc = shapeToJSON(pattern, shape, { solution: 1, status: 'solved' });
    const back = JSON.parse(JSON.stringify(doc));
    expect(back.vertices).toEqual(shape.vertices);
    expect(back.maxMismatch).toBe(0);
    expect(back.cautions).toBe(CAUTIONS);
    expect(back.panels[right].transform).toEqual(Array.from(T));
    expect(back.panels[right].folded.length).toBe(4);
    expect(back.solution).toBe(1);
    expect(back.status).toBe('solved');
    expect(back.creases[6]).toMatchObject({ index: 6, assignment: 'V' });
  });

  it('triangulates a concave panel into triangles covering its area (ear clipping; area by the shoelace formula)', () => {
    const L = buildPattern({
      name: 'L',
      vertices: [
        [0, 0],
        [2, 0],
        [2, 1],
        [1, 1],
        [1, 2],
        [0, 2],
      ],
      edges: [
        [0, 1],
        [1, 2],
        [2, 3],
        [3, 4],
        [4, 5],
        [5, 0],
      ],
      assignments: ['B', 'B', 'B', 'B', 'B', 'B'],
      labels: [],
      limits: [],
    }).pattern!;
    const vs = L.panels[0].vertices;
    const tris = triangulatePanel(L, vs);
    expect(tris.length).toBe(4);
    let area = 0;
    for (const [a, b, c] of tris) {
      const [ax, ay] = L.vertices[vs[a]];
      const [bx, by] = L.vertices[vs[b]];
      const [cx, cy] = L.vertices[vs[c]];
      const t = ((bx - ax) * (cy - ay) - (by - ay) * (cx - ax)) / 2;
      expect(t).toBeGreaterThan(0);
      area += t;
    }
    expect(area).toBeCloseTo(3, 12);
  });

  it('leaves out a panel without a usable transform and says so', () => {
    const broken: Shape = { ...shape, panelTransforms: [I, Float64Array.from([NaN, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0])] };
    const obj = shapeToOBJ(pattern, broken);
    expect(obj).toMatch(/left out: 1/);
    expect(obj.split('\n').filter((l) => l.startsWith('f ')).length).toBe(1);
  });
});

describe('generated projects in both formats', () => {
  it('a Miura sheet, a waterbomb base and a single vertex survive project → FOLD → project', () => {
    for (const p of [miura({ rows: 2, cols: 3, a: 40, b: 30, alphaDeg: 70 }).project!, waterbomb({ size: 80 }).project!, coupon()]) {
      const viaFold = parseFold(writeFold(p)).project!;
      const viaProject = parseProject(writeProject(viaFold)).project!;
      expect(viaProject.source.vertices).toEqual(p.source.vertices);
      expect(viaProject.source.edges).toEqual(p.source.edges);
      expect(viaProject.source.assignments).toEqual(p.source.assignments);
      expect(viaProject.source.labels).toEqual(p.source.labels);
      expect(viaProject.drives.map((d) => [d.crease, d.angleDeg])).toEqual(p.drives.map((d) => [d.crease, d.angleDeg]));
    }
  });
});
