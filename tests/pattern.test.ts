// buildPattern: the derived panels, sides and interior vertices of valid patterns, and every class of
// malformed input refused with its code and the vertex/crease at fault, never a throw.
import { describe, expect, it } from 'vitest';
import { buildPattern, findCrease, MESSAGES_PER_CODE } from '../solver/model/pattern';
import type { Assignment, HingeLimit, Message, PatternSource } from '../solver/types';

type E = [number, number, Assignment?, string?];

function source(vertices: [number, number][], edges: E[], more: Partial<PatternSource> = {}): PatternSource {
  return {
    name: 'test',
    vertices,
    edges: edges.map((e) => [e[0], e[1]]),
    assignments: edges.map((e) => e[2] ?? 'B'),
    labels: edges.map((e) => e[3]),
    limits: edges.map(() => undefined),
    ...more,
  };
}

// A 10 × 10 square with a plus of creases through the centre vertex 4: four square panels.
const PLUS_V: [number, number][] = [
  [0, 0],
  [10, 0],
  [10, 10],
  [0, 10],
  [5, 5],
  [5, 0],
  [10, 5],
  [5, 10],
  [0, 5],
];
const PLUS_E: E[] = [
  [0, 5],
  [5, 1],
  [1, 6],
  [6, 2],
  [2, 7],
  [7, 3],
  [3, 8],
  [8, 0],
  [4, 5, 'M', 'south'],
  [4, 6, 'V', 'east'],
  [4, 7, 'M', 'north'],
  [4, 8, 'M', 'west'],
];
const plus = (edges: E[] = PLUS_E, vertices = PLUS_V, more: Partial<PatternSource> = {}) => source(vertices, edges, more);

const errors = (ms: Message[]) => ms.filter((m) => m.severity === 'error');
function refused(src: PatternSource, code: string): Message {
  const r = buildPattern(src);
  expect(r.pattern, `expected ${code}, got ${JSON.stringify(r.messages)}`).toBeUndefined();
  const m = r.messages.find((x) => x.code === code);
  expect(m, `expected ${code} among ${r.messages.map((x) => x.code).join(', ')}`).toBeDefined();
  expect(m!.severity).toBe('error');
  expect(m!.text.length).toBeGreaterThan(10);
  return m!;
}

describe('deriving a valid pattern', () => {
  const r = buildPattern(plus());
  const p = r.pattern!;

  it('builds without messages', () => {
    expect(r.messages).toEqual([]);
    expect(p).toBeDefined();
  });

  it('finds the panels: Euler’s formula V − E + F = 2 for a connected plane graph (common practice), F counting the outside', () => {
    expect(p.panels.length).toBe(PLUS_E.length - PLUS_V.length + 1);
    expect(p.panels.length).toBe(4);
  });

  it('gives every panel counter-clockwise with its area and centroid (shoelace formula, common practice)', () => {
    for (const panel of p.panels) {
      expect(panel.area).toBeCloseTo(25, 12);
      let twice = 0;
      panel.vertices.forEach((v, k) => {
        const [x0, y0] = p.vertices[v];
        const [x1, y1] = p.vertices[panel.vertices[(k + 1) % panel.vertices.length]];
        twice += x0 * y1 - x1 * y0;
      });
      expect(twice / 2).toBeCloseTo(25, 12); // positive: counter-clockwise
      panel.creases.forEach((c, k) => {
        const [a, b] = p.creases[c].vertices;
        const pair = [panel.vertices[k], panel.vertices[(k + 1) % panel.vertices.length]].sort();
        expect([a, b].sort()).toEqual(pair);
      });
      const [cx, cy] = panel.centroid;
      expect([2.5, 7.5]).toContain(+cx.toFixed(12));
      expect([2.5, 7.5]).toContain(+cy.toFixed(12));
    }
    const total = p.panels.reduce((s, q) => s + q.area, 0);
    expect(total).toBeCloseTo(100, 12);
  });

  it('puts each crease’s left panel on its left (the sign of the cross product, common practice)', () => {
    for (const c of p.creases) {
      const [a, b] = c.vertices.map((v) => p.vertices[v]);
      for (const [panel, sign] of [
        [c.leftPanel, 1],
        [c.rightPanel, -1],
      ] as const) {
        if (panel < 0) continue;
        const [cx, cy] = p.panels[panel].centroid;
        const cross = (b[0] - a[0]) * (cy - a[1]) - (b[1] - a[1]) * (cx - a[0]);
        expect(Math.sign(cross)).toBe(sign);
      }
      if (c.assignment === 'B') expect((c.leftPanel < 0) !== (c.rightPanel < 0)).toBe(true);
      else expect(c.leftPanel >= 0 && c.rightPanel >= 0).toBe(true);
    }
  });

  it('orders the interior vertex’s creases ccw with sectors summing to 2π (a planar-geometry fact)', () => {
    expect(p.interiorVertices.length).toBe(1);
    const iv = p.interiorVertices[0];
    expect(iv.vertex).toBe(4);
    expect(iv.creases.map((c) => p.creases[c].label)).toEqual(['east', 'north', 'west', 'south']); // from +x
    for (let k = 1; k < iv.directions.length; k++) expect(iv.directions[k]).toBeGreaterThan(iv.directions[k - 1]);
    expect(iv.directions[iv.directions.length - 1] - iv.directions[0]).toBeLessThan(2 * Math.PI);
    for (const s of iv.sectors) expect(s).toBeCloseTo(Math.PI / 2, 14);
    expect(Math.abs(iv.defect)).toBeLessThan(1e-14);
  });

  it('labels, finds creases by label then index, and sizes the sheet by its bounding-box diagonal', () => {
    expect(p.creases[0].label).toBe('0');
    expect(p.labelIndex.get('east')).toBe(9);
    expect(findCrease(p, 'east')).toBe(9);
    expect(findCrease(p, '3')).toBe(3);
    expect(findCrease(p, ' 3 ')).toBe(3);
    expect(findCrease(p, '12')).toBeUndefined();
    expect(findCrease(p, 'nope')).toBeUndefined();
    expect(p.size).toBeCloseTo(Math.hypot(10, 10), 14);
    expect(p.creases[9].length).toBeCloseTo(5, 14);
  });

  it('picks the base panel nearest the sheet’s centre, ties going to the lowest index', () => {
    expect(p.basePanel).toBe(0);
    // an off-centre cross: the panel holding the centre is the big one
    const v = PLUS_V.map(([x, y]) => [x === 5 ? 3 : x, y === 5 ? 3 : y] as [number, number]);
    const q = buildPattern(plus(PLUS_E, v)).pattern!;
    const big = q.panels.findIndex((panel) => panel.area > 40);
    expect(q.basePanel).toBe(big);
    expect(buildPattern(plus(PLUS_E, PLUS_V, { basePanel: 2 })).pattern!.basePanel).toBe(2);
  });

  it('keeps hinge limits, in radians, on the creases', () => {
    const src = plus();
    src.limits[9] = { min: 0, max: 2 };
    expect(buildPattern(src).pattern!.creases[9].limit).toEqual({ min: 0, max: 2 });
  });

  it('accepts the file’s faces in any start and direction, numbering panels in the file’s order', () => {
    const faces = [
      [8, 3, 7, 4], // the top-left panel, clockwise in the file
      [5, 1, 6, 4],
      [4, 6, 2, 7],
      [0, 5, 4, 8],
    ];
    const r2 = buildPattern(plus(PLUS_E, PLUS_V, { faces }));
    expect(r2.messages).toEqual([]);
    const q = r2.pattern!;
    expect(q.panels[0].vertices).toEqual([8, 4, 7, 3]);
    expect(q.panels[1].vertices).toEqual([5, 1, 6, 4]);
    expect(q.panels[3].centroid[0]).toBeCloseTo(2.5, 12);
    expect(q.panels[3].centroid[1]).toBeCloseTo(2.5, 12);
    for (const c of q.creases) {
      if (c.leftPanel >= 0) expect(q.panels[c.leftPanel].creases).toContain(c.index);
      if (c.rightPanel >= 0) expect(q.panels[c.rightPanel].creases).toContain(c.index);
    }
  });

  it('reads a crease on the rim marked M as boundary, with a warning naming it', () => {
    const edges = PLUS_E.map((e, k) => (k === 2 ? ([e[0], e[1], 'M', 'rimside'] as E) : e));
    const r2 = buildPattern(plus(edges));
    expect(r2.pattern).toBeDefined();
    const m = r2.messages.find((x) => x.code === 'edge-on-rim-not-boundary')!;
    expect(m.severity).toBe('warning');
    expect(m.where).toMatchObject({ crease: 2, creaseLabel: 'rimside' });
    expect(m.text).toContain('rimside');
    expect(r2.pattern!.creases[2].assignment).toBe('B');
  });

  it('a vertex on a rim crease marked V is not interior (its creases count as boundary once read as B)', () => {
    // all rim edges unassigned, as a FOLD file without assignments gives them
    const edges = PLUS_E.map((e) => [e[0], e[1], e[2] ?? 'U', e[3]] as E);
    const r2 = buildPattern(plus(edges));
    expect(r2.pattern!.interiorVertices.map((v) => v.vertex)).toEqual([4]);
    expect(r2.messages.filter((m) => m.code === 'edge-on-rim-not-boundary').length).toBe(8);
  });
});

describe('refusing malformed patterns, naming the place', () => {
  it('vertex-not-finite: NaN or infinite coordinates', () => {
    const v = PLUS_V.slice();
    v[6] = [NaN, 5];
    expect(refused(plus(PLUS_E, v), 'vertex-not-finite').where).toEqual({ vertex: 6 });
    v[6] = [10, Infinity];
    const m = refused(plus(PLUS_E, v), 'vertex-not-finite');
    expect(m.where).toEqual({ vertex: 6 });
    expect(m.text).toContain('Vertex 6');
  });

  it('vertex-malformed: not a pair of numbers', () => {
    const v = PLUS_V.slice() as unknown[];
    v[2] = ['10', 10];
    expect(refused(plus(PLUS_E, v as [number, number][]), 'vertex-malformed').where).toEqual({ vertex: 2 });
  });

  it('crease-missing-vertex: an index that is out of range, negative or not whole', () => {
    for (const bad of [99, -1, 1.5]) {
      const edges = PLUS_E.slice();
      edges[10] = [4, bad, 'M', 'north'];
      const m = refused(plus(edges), 'crease-missing-vertex');
      expect(m.where).toEqual({ crease: 10, creaseLabel: 'north' });
      expect(m.text).toContain('north');
      expect(m.text).toContain(String(bad));
    }
  });

  it('duplicate-vertex: two vertices within 1e-9 of the sheet size', () => {
    const v = [...PLUS_V, [10 + 1e-9, 10] as [number, number]];
    const edges: E[] = [...PLUS_E.slice(0, 4), [6, 9], [9, 7], ...PLUS_E.slice(5)];
    const m = refused(plus(edges, v), 'duplicate-vertex');
    expect(m.where).toEqual({ vertex: 9 });
    expect(m.text).toContain('vertex 2');
  });

  it('zero-length-crease: a crease from a vertex to itself', () => {
    const m = refused(plus([...PLUS_E, [4, 4, 'M', 'loop']]), 'zero-length-crease');
    expect(m.where).toEqual({ crease: 12, creaseLabel: 'loop' });
  });

  it('duplicate-crease: the same vertex pair twice, either way round', () => {
    const m = refused(plus([...PLUS_E, [6, 4, 'V', 'again']]), 'duplicate-crease');
    expect(m.where).toEqual({ crease: 12, creaseLabel: 'again' });
    expect(m.text).toContain('east');
  });

  it('creases-cross: two diagonals without a vertex where they cross', () => {
    const v: [number, number][] = [
      [0, 0],
      [10, 0],
      [10, 10],
      [0, 10],
    ];
    const m = refused(
      source(v, [
        [0, 1],
        [1, 2],
        [2, 3],
        [3, 0],
        [0, 2, 'V', 'diag-a'],
        [1, 3, 'M', 'diag-b'],
      ]),
      'creases-cross',
    );
    expect(m.where).toMatchObject({ crease: 4, creaseLabel: 'diag-a' });
    expect(m.text).toContain('diag-b');
    expect(m.text).toContain('(5, 5)');
  });

  it('creases-cross: a crease running through a vertex it does not stop at', () => {
    // 5 → 7 runs straight through the centre vertex 4
    const m = refused(plus([...PLUS_E, [5, 7, 'V', 'through']]), 'creases-cross');
    expect(m.where).toMatchObject({ crease: 12, creaseLabel: 'through', vertex: 4 });
  });

  it('creases-overlap: two creases along the same line', () => {
    const v = [...PLUS_V, [7, 5] as [number, number]];
    const m = refused(plus([...PLUS_E, [4, 9, 'V', 'short']], v), 'creases-overlap');
    expect(m.where?.vertex).toBe(4);
    expect(m.text).toMatch(/east|short/);
  });

  it('dangling-crease: a crease ending inside a panel, naming its loose vertex', () => {
    const v = [...PLUS_V, [7, 2] as [number, number]];
    const m = refused(plus([...PLUS_E, [4, 9, 'V', 'spur']], v), 'dangling-crease');
    expect(m.where).toEqual({ crease: 12, creaseLabel: 'spur', vertex: 9 });
    expect(m.text).toContain('inside a panel');
  });

  it('dangling-crease: a crease sticking out of the sheet', () => {
    const v = [...PLUS_V, [12, -2] as [number, number]];
    const m = refused(plus([...PLUS_E, [1, 9, 'B', 'tail']], v), 'dangling-crease');
    expect(m.where).toEqual({ crease: 12, creaseLabel: 'tail', vertex: 9 });
    expect(m.text).toContain('sticks out');
  });

  it('disconnected-sheet: a second piece not joined to the first', () => {
    const v = [...PLUS_V, [20, 0], [25, 0], [20, 5]] as [number, number][];
    const m = refused(plus([...PLUS_E, [9, 10], [10, 11], [11, 9]], v), 'disconnected-sheet');
    expect(m.where).toEqual({ vertex: 9 });
    expect(m.text).toContain('9, 10, 11');
  });

  it('hole-unsupported: a square hole joined to the rim by creases', () => {
    const v: [number, number][] = [
      [0, 0],
      [30, 0],
      [30, 30],
      [0, 30],
      [10, 10],
      [20, 10],
      [20, 20],
      [10, 20],
    ];
    const m = refused(
      source(v, [
        [0, 1],
        [1, 2],
        [2, 3],
        [3, 0],
        [4, 5],
        [5, 6],
        [6, 7],
        [7, 4],
        [0, 4, 'M'],
        [1, 5, 'V'],
        [2, 6, 'M'],
        [3, 7, 'V'],
      ]),
      'hole-unsupported',
    );
    expect(m.where).toMatchObject({ hole: 0 });
    for (const k of [4, 5, 6, 7]) expect(m.text).toContain(String(k));
    expect(m.text).toContain('closure around holes is not supported yet');
  });

  it('cut-unsupported: a boundary edge with panels on both sides', () => {
    const edges = PLUS_E.slice();
    edges[9] = [4, 6, 'B', 'slit'];
    const m = refused(plus(edges), 'cut-unsupported');
    expect(m.where).toEqual({ crease: 9, creaseLabel: 'slit' });
  });

  it('bad-assignment: an unknown letter or none', () => {
    const src = plus();
    (src.assignments as string[])[9] = 'X';
    expect(refused(src, 'bad-assignment').where).toEqual({ crease: 9, creaseLabel: 'east' });
    src.assignments.length = 5;
    expect(refused(src, 'bad-assignment').where?.crease).toBe(5);
  });

  it('limit-order, limit-out-of-range and limit-not-finite', () => {
    const withLimit = (l: HingeLimit) => {
      const src = plus();
      src.limits[10] = l;
      return src;
    };
    const m = refused(withLimit({ min: 1, max: 0.5 }), 'limit-order');
    expect(m.where).toEqual({ crease: 10, creaseLabel: 'north' });
    expect(m.text).toContain('57.2958°');
    expect(refused(withLimit({ max: 4 }), 'limit-out-of-range').where?.crease).toBe(10);
    expect(refused(withLimit({ min: -Math.PI - 0.01 }), 'limit-out-of-range').where?.crease).toBe(10);
    expect(refused(withLimit({ min: NaN }), 'limit-not-finite').where?.crease).toBe(10);
    expect(buildPattern(withLimit({ min: -Math.PI, max: Math.PI })).pattern).toBeDefined();
  });

  it('duplicate-label: the same label twice, or a label that is another crease’s index', () => {
    const edges = PLUS_E.slice();
    edges[10] = [4, 7, 'M', 'east'];
    const m = refused(plus(edges), 'duplicate-label');
    expect(m.where).toEqual({ crease: 10, creaseLabel: 'east' });
    edges[10] = [4, 7, 'M', '3'];
    expect(refused(plus(edges), 'duplicate-label').text).toContain('by its index');
  });

  it('bad-label: an empty label', () => {
    const edges = PLUS_E.slice();
    edges[10] = [4, 7, 'M', ' '];
    expect(refused(plus(edges), 'bad-label').where).toEqual({ crease: 10 });
  });

  it('empty-pattern and degenerate-sheet', () => {
    refused(source([], []), 'empty-pattern');
    refused(
      source(
        [
          [1, 1],
          [1, 1],
        ],
        [[0, 1]],
      ),
      'degenerate-sheet',
    );
  });

  it('faces that do not match the creases: face-mismatch, face-missing, face-not-a-cycle, face-missing-vertex, duplicate-face', () => {
    const good = [
      [0, 5, 4, 8],
      [5, 1, 6, 4],
      [4, 6, 2, 7],
      [8, 4, 7, 3],
    ];
    const withFaces = (faces: number[][]) => plus(PLUS_E, PLUS_V, { faces });
    expect(refused(withFaces(good.slice(0, 3)), 'face-missing').text).toContain('8');
    expect(refused(withFaces([...good.slice(0, 3), [0, 1, 2, 3]]), 'face-not-a-cycle').where).toMatchObject({ panel: 3, vertex: 0 });
    expect(refused(withFaces([...good.slice(0, 3), [8, 4, 7, 3, 99]]), 'face-missing-vertex').where?.panel).toBe(3);
    expect(refused(withFaces([...good, good[0].slice().reverse()]), 'duplicate-face').where?.panel).toBe(4);
    // a cycle of creases that is not a panel: the outer rim
    expect(refused(withFaces([...good.slice(0, 3), [0, 5, 1, 6, 2, 7, 3, 8]]), 'face-mismatch').where?.panel).toBe(3);
  });

  it('bad-base-panel: warns and falls back to the centre panel', () => {
    const r = buildPattern(plus(PLUS_E, PLUS_V, { basePanel: 7 }));
    expect(r.pattern!.basePanel).toBe(0);
    expect(r.messages[0]).toMatchObject({ severity: 'warning', code: 'bad-base-panel' });
  });

  it('unused-vertex: a vertex no crease uses is ignored with a warning', () => {
    const r = buildPattern(plus(PLUS_E, [...PLUS_V, [3, 3]]));
    expect(r.pattern).toBeDefined();
    expect(r.messages).toMatchObject([{ severity: 'warning', code: 'unused-vertex', where: { vertex: 9 } }]);
  });

  it('keeps the message list short: the first few of a code, then one count', () => {
    const src = plus();
    src.assignments = src.assignments.map(() => 'Q' as Assignment);
    const r = buildPattern(src);
    const bad = r.messages.filter((m) => m.code === 'bad-assignment');
    expect(bad.length).toBe(Math.min(12, MESSAGES_PER_CODE) + (12 > MESSAGES_PER_CODE ? 1 : 0));
    const many = source(
      PLUS_V,
      Array.from({ length: 50 }, (_, k) => [0, 100 + k] as E),
    );
    const r2 = buildPattern(many);
    const missing = r2.messages.filter((m) => m.code === 'crease-missing-vertex');
    expect(missing.length).toBe(MESSAGES_PER_CODE + 1);
    expect(missing[MESSAGES_PER_CODE].text).toContain('30 more');
  });

  it('never throws on input of the wrong shape', () => {
    const junk: unknown[] = [
      null,
      undefined,
      42,
      'text',
      {},
      { vertices: 5, edges: [] },
      { vertices: [[0, 0]], edges: 'x' },
      { vertices: [[0, 0], null], edges: [[0, 1]], assignments: null, labels: 7, limits: 'no' },
      { vertices: [[0, 0], [1, 0], [0, 1]], edges: [[0, 1], [1, 2], [2, 0]], assignments: ['B', 'B', 'B'], labels: [1, {}, []], limits: [5, null, { min: 'a' }] },
      { ...plus(), faces: 'nope' },
      { ...plus(), faces: [null, [1], ['a', 'b', 'c']] },
    ];
    for (const j of junk) {
      const r = buildPattern(j as PatternSource);
      expect(r.pattern).toBeUndefined();
      expect(errors(r.messages).length).toBeGreaterThan(0);
      expect(r.messages.every((m) => /^[a-z]+(-[a-z0-9]+)*$/.test(m.code))).toBe(true);
      expect(r.messages.some((m) => m.code === 'internal-error')).toBe(false);
    }
  });
});

// A perturbed n × n grid with one diagonal per cell: 2n(n + 1) + n² creases.
function perturbedGrid(n: number, seed = 7): PatternSource {
  let s = seed >>> 0;
  const rand = () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
  const vertices: [number, number][] = [];
  const id = (i: number, j: number) => j * (n + 1) + i;
  for (let j = 0; j <= n; j++) {
    for (let i = 0; i <= n; i++) {
      const inner = i > 0 && i < n && j > 0 && j < n;
      vertices.push([i + (inner ? (rand() - 0.5) * 0.4 : 0), j + (inner ? (rand() - 0.5) * 0.4 : 0)]);
    }
  }
  const edges: E[] = [];
  const mv = (): Assignment => (rand() < 0.5 ? 'M' : 'V');
  for (let j = 0; j <= n; j++) for (let i = 0; i < n; i++) edges.push([id(i, j), id(i + 1, j), j === 0 || j === n ? 'B' : mv()]);
  for (let i = 0; i <= n; i++) for (let j = 0; j < n; j++) edges.push([id(i, j), id(i, j + 1), i === 0 || i === n ? 'B' : mv()]);
  for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) edges.push(rand() < 0.5 ? [id(i, j), id(i + 1, j + 1), mv()] : [id(i + 1, j), id(i, j + 1), mv()]);
  return source(vertices, edges);
}

describe('large patterns', () => {
  const big = perturbedGrid(65); // 2·65·66 + 65² = 12,805 creases

  // how long this takes is a benchmark figure (npm run bench), not a test: the machines are shared
  it('checks and derives a 13,000-crease sheet', () => {
    expect(big.edges.length).toBeGreaterThan(12_800);
    const r = buildPattern(big);
    expect(r.messages).toEqual([]);
    expect(r.pattern!.panels.length).toBe(2 * 65 * 65);
    expect(r.pattern!.interiorVertices.length).toBe(64 * 64);
  });

  it('finds the one crossing among 13,000 creases', () => {
    const src = perturbedGrid(65);
    // a crease joining two cells' far corners across a grid line
    const n = 65;
    const id = (i: number, j: number) => j * (n + 1) + i;
    src.edges.push([id(10, 10), id(12, 11)]);
    src.assignments.push('M');
    src.labels.push('stray');
    src.limits.push(undefined);
    const r = buildPattern(src);
    expect(r.pattern).toBeUndefined();
    const m = r.messages.find((x) => x.code === 'creases-cross')!;
    expect(m).toBeDefined();
    expect(r.messages.every((x) => x.code === 'creases-cross')).toBe(true);
    expect(JSON.stringify(r.messages)).toContain('stray');
  });

  it('finds a duplicate vertex among 4,000 with the hash grid', () => {
    const src = perturbedGrid(65);
    const [x, y] = src.vertices[500];
    src.vertices.push([x, y + 1e-12]);
    src.edges.push([500, src.vertices.length - 1]);
    src.assignments.push('M');
    src.labels.push(undefined);
    src.limits.push(undefined);
    const r = buildPattern(src);
    expect(r.messages.find((m) => m.code === 'duplicate-vertex')?.where).toEqual({ vertex: src.vertices.length - 1 });
  });
});
