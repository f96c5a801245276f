// Property tests (fast-check): whatever text arrives, the readers answer with a pattern or with error
// messages, never a throw; valid random patterns build with the planar facts they must satisfy; whatever
// option values arrive, the command line answers with a result or a usage error naming the option.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../cli/main';
import { nodeIo } from '../cli/io';
import { parseProject, writeProject, type LoadResult, type Project } from '../solver/formats/project';
import { loadPatternText } from '../solver/formats/load';
import { parseFold, writeFold } from '../solver/formats/fold';
import { firstJsonError } from '../solver/formats/limits';
import { buildPattern } from '../solver/model/pattern';
import { singleVertex } from '../solver/model/generators';
import { SAMPLES_DIR } from '../scripts/make-samples';
import type { Assignment, Message, Pattern, PatternSource } from '../solver/types';

const SEVERITIES = new Set(['error', 'warning', 'info']);
const CODE = /^[a-z]+(-[a-z0-9]+)*$/;

function wellFormedMessages(ms: Message[]): void {
  expect(Array.isArray(ms)).toBe(true);
  for (const m of ms) {
    expect(SEVERITIES.has(m.severity)).toBe(true);
    expect(m.code).toMatch(CODE);
    expect(m.code).not.toBe('internal-error');
    expect(typeof m.text).toBe('string');
    expect(m.text.length).toBeGreaterThan(5);
  }
}

/** A pattern that built must hold together: panels, sides, and 2π around every interior vertex. */
function consistent(p: Pattern): void {
  for (const c of p.creases) {
    expect(c.leftPanel).toBeLessThan(p.panels.length);
    expect(c.rightPanel).toBeLessThan(p.panels.length);
    if (c.assignment !== 'B') expect(c.leftPanel >= 0 && c.rightPanel >= 0).toBe(true);
  }
  for (const iv of p.interiorVertices) {
    const sum = iv.sectors.reduce((s, x) => s + x, 0);
    expect(Math.abs(sum - 2 * Math.PI)).toBeLessThan(1e-9);
    for (const s of iv.sectors) expect(s).toBeGreaterThan(0);
  }
  expect(p.basePanel >= 0 && p.basePanel < p.panels.length).toBe(true);
}

function answered(r: LoadResult): void {
  wellFormedMessages(r.messages);
  if (r.pattern) consistent(r.pattern);
  else expect(r.messages.some((m) => m.severity === 'error')).toBe(true);
}

const fileNames = fc.constantFrom(undefined, 'a.fold', 'a.hingeplan.json', 'A.FOLD');

describe('any input is answered with a pattern or messages, never a throw', () => {
  it('random JSON values', () => {
    fc.assert(
      fc.property(fc.jsonValue({ maxDepth: 4 }), fileNames, (v, name) => {
        answered(loadPatternText(JSON.stringify(v) ?? 'null', name));
      }),
      { numRuns: 400 },
    );
  });

  it('random objects shaped like our formats, with random values in the known fields', () => {
    const anyValue = fc.oneof(fc.jsonValue({ maxDepth: 3 }), fc.constant(undefined));
    const project = fc.record({
      format: fc.oneof(fc.constant('hingeplan-project'), anyValue),
      version: fc.oneof(fc.constant(1), anyValue),
      name: fc.oneof(fc.string(), anyValue),
      vertices: fc.oneof(fc.array(fc.tuple(fc.double(), fc.double()), { maxLength: 8 }), anyValue),
      creases: fc.oneof(
        fc.array(
          fc.record({
            vertices: fc.tuple(fc.integer({ min: -1, max: 9 }), fc.integer({ min: -1, max: 9 })),
            assignment: fc.constantFrom('M', 'V', 'U', 'F', 'B', 'x'),
            label: fc.option(fc.string({ maxLength: 3 }), { nil: undefined }),
          }),
          { maxLength: 10 },
        ),
        anyValue,
      ),
      drives: fc.oneof(fc.array(fc.record({ crease: fc.string({ maxLength: 3 }), angle: fc.double() }), { maxLength: 3 }), anyValue),
    });
    fc.assert(
      fc.property(project, fileNames, (o, name) => {
        answered(loadPatternText(JSON.stringify(o), name));
      }),
      { numRuns: 400 },
    );
  });

  it('random text', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 200 }), fileNames, (t, name) => {
        const r = loadPatternText(t, name);
        answered(r);
        const nj = r.messages.find((m) => m.code === 'not-json');
        if (nj) expect(nj.where!.line!).toBeGreaterThanOrEqual(1);
      }),
      { numRuns: 300 },
    );
  });

  it('the JSON syntax-error finder agrees with JSON.parse (RFC 8259) on random JSON-like text', () => {
    const piece = fc.constantFrom('{', '}', '[', ']', ',', ':', '"a"', '"\\n"', '"\\q"', '1', '-0', '1e5', '01', 'true', 'nul', ' ', '\n', '.', '"');
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 14 }), (parts) => {
        const t = parts.join('');
        let valid = true;
        try {
          JSON.parse(t);
        } catch {
          valid = false;
        }
        expect(firstJsonError(t) === undefined).toBe(valid);
      }),
      { numRuns: 1000 },
    );
  });
});

// ---------------------------------------------------------------------------------------------------
// Random mutations of valid files

const sampleTexts: [string, string][] = ['hinge-coupon', 'two-motor-rig', 'gripper-cell'].flatMap((stem): [string, string][] => [
  [`${stem}.hingeplan.json`, readFileSync(join(SAMPLES_DIR, `${stem}.hingeplan.json`), 'utf8')],
  [`${stem}.fold`, readFileSync(join(SAMPLES_DIR, `${stem}.fold`), 'utf8')],
]);

type Mutation =
  | { kind: 'replace' | 'delete' | 'duplicate' | 'swap'; path: number[]; value: unknown }
  | { kind: 'truncate' | 'insert' | 'cut'; pos: number; text: string };

/** Follow `path` (each step picks a key or index modulo the size) into a JSON value; returns parent and key. */
function locate(root: unknown, path: number[]): { parent: Record<string, unknown> | unknown[]; key: string | number } | undefined {
  let node = root;
  let found: { parent: Record<string, unknown> | unknown[]; key: string | number } | undefined;
  for (const step of path) {
    if (Array.isArray(node) && node.length > 0) {
      const k = step % node.length;
      found = { parent: node, key: k };
      node = node[k];
    } else if (node !== null && typeof node === 'object') {
      const keys = Object.keys(node);
      if (keys.length === 0) break;
      const k = keys[step % keys.length];
      found = { parent: node as Record<string, unknown>, key: k };
      node = (node as Record<string, unknown>)[k];
    } else break;
  }
  return found;
}

function mutate(text: string, m: Mutation): string {
  if ('pos' in m) {
    const p = m.pos % (text.length + 1);
    if (m.kind === 'truncate') return text.slice(0, p);
    if (m.kind === 'insert') return text.slice(0, p) + m.text + text.slice(p);
    return text.slice(0, p) + text.slice(p + 1 + (m.pos % 7));
  }
  const root = JSON.parse(text);
  const at = locate(root, m.path);
  if (!at) return JSON.stringify(m.value);
  const { parent, key } = at;
  if (Array.isArray(parent)) {
    const k = key as number;
    if (m.kind === 'replace') parent[k] = m.value;
    else if (m.kind === 'delete') parent.splice(k, 1);
    else if (m.kind === 'duplicate') parent.splice(k, 0, structuredClone(parent[k]));
    else {
      const other = (k + 1) % parent.length;
      [parent[k], parent[other]] = [parent[other], parent[k]];
    }
  } else {
    const k = key as string;
    if (m.kind === 'replace') parent[k] = m.value;
    else if (m.kind === 'delete') delete parent[k];
    else if (m.kind === 'duplicate') parent[`${k}_copy`] = structuredClone(parent[k]);
    else parent[k] = Array.isArray(parent[k]) ? (parent[k] as unknown[]).slice().reverse() : parent[k];
  }
  return JSON.stringify(root);
}

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({
    kind: fc.constantFrom('replace' as const, 'delete' as const, 'duplicate' as const, 'swap' as const),
    path: fc.array(fc.nat(1000), { minLength: 1, maxLength: 4 }),
    value: fc.oneof(
      fc.jsonValue({ maxDepth: 2 }),
      fc.constantFrom(-1, 0, 1, 3, 1e308, -180, 181, 'M', 'B', 'x', null, [], [0, 0], [1, 1, 1], '1e999'),
    ),
  }),
  fc.record({
    kind: fc.constantFrom('truncate' as const, 'insert' as const, 'cut' as const),
    pos: fc.nat(100_000),
    text: fc.constantFrom(',', '}', '"', 'x', '[', '1', '\u0000', '\\', ' '),
  }),
);

describe('random mutations of valid files are refused with messages or accepted, never a throw', () => {
  it('one to three mutations of each sample file', () => {
    fc.assert(
      fc.property(fc.constantFrom(...sampleTexts), fc.array(mutation, { minLength: 1, maxLength: 3 }), ([name, text], ms) => {
        let t = text;
        for (const m of ms) {
          try {
            t = mutate(t, m);
          } catch {
            // a structural mutation of text that an earlier mutation broke: keep the broken text
          }
        }
        answered(loadPatternText(t, name));
        answered(loadPatternText(t));
      }),
      { numRuns: 500 },
    );
  });

  it('the number 1e999 (Infinity once parsed) anywhere in a coordinate', () => {
    for (const [name, text] of sampleTexts) {
      const t = text.replace(/\[(-?[\d.e-]+),(-?[\d.e-]+)\]/, '[1e999,$2]');
      const r = loadPatternText(t, name);
      expect(r.pattern).toBeUndefined();
      expect(r.messages.some((m) => m.code === 'vertex-not-finite')).toBe(true);
    }
  });
});

// ---------------------------------------------------------------------------------------------------
// Random valid patterns

/** A perturbed n × n grid on the unit-spaced square [0, n]², one diagonal per cell, rim fixed. */
function grid(n: number, jitter: number[], diag: boolean[], mv: boolean[]): PatternSource {
  const vertices: [number, number][] = [];
  const id = (i: number, j: number) => j * (n + 1) + i;
  let k = 0;
  for (let j = 0; j <= n; j++) {
    for (let i = 0; i <= n; i++) {
      const inner = i > 0 && i < n && j > 0 && j < n;
      const dx = inner ? jitter[k++ % jitter.length] : 0;
      const dy = inner ? jitter[k++ % jitter.length] : 0;
      vertices.push([i + dx, j + dy]);
    }
  }
  const edges: [number, number][] = [];
  const assignments: Assignment[] = [];
  let e = 0;
  const fold = (): Assignment => (mv[e++ % mv.length] ? 'M' : 'V');
  for (let j = 0; j <= n; j++)
    for (let i = 0; i < n; i++) {
      edges.push([id(i, j), id(i + 1, j)]);
      assignments.push(j === 0 || j === n ? 'B' : fold());
    }
  for (let i = 0; i <= n; i++)
    for (let j = 0; j < n; j++) {
      edges.push([id(i, j), id(i, j + 1)]);
      assignments.push(i === 0 || i === n ? 'B' : fold());
    }
  let c = 0;
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) {
      edges.push(diag[c++ % diag.length] ? [id(i, j), id(i + 1, j + 1)] : [id(i + 1, j), id(i, j + 1)]);
      assignments.push(fold());
    }
  return { name: `grid ${n}`, vertices, edges, assignments, labels: edges.map(() => undefined), limits: edges.map(() => undefined) };
}

const gridArb = fc
  .record({
    n: fc.integer({ min: 1, max: 7 }),
    // jitter below 0.25 keeps every cell convex, so the diagonals stay inside their cells
    jitter: fc.array(fc.double({ min: -0.24, max: 0.24, noNaN: true }), { minLength: 1, maxLength: 40 }),
    diag: fc.array(fc.boolean(), { minLength: 1, maxLength: 20 }),
    mv: fc.array(fc.boolean(), { minLength: 1, maxLength: 20 }),
  })
  .map(({ n, jitter, diag, mv }) => grid(n, jitter, diag, mv));

describe('random valid patterns build with the facts of plane geometry', () => {
  it('perturbed grids: sector sums 2π, Euler’s formula, panel areas adding up to the sheet (common practice)', () => {
    fc.assert(
      fc.property(gridArb, (src) => {
        const r = buildPattern(src);
        expect(r.messages).toEqual([]);
        const p = r.pattern!;
        consistent(p);
        const n = Math.round(Math.sqrt(src.vertices.length)) - 1;
        expect(p.panels.length).toBe(src.edges.length - src.vertices.length + 1); // V − E + F = 2
        expect(p.panels.length).toBe(2 * n * n);
        expect(p.interiorVertices.length).toBe((n - 1) * (n - 1));
        const area = p.panels.reduce((s, q) => s + q.area, 0);
        expect(area).toBeCloseTo(n * n, 9);
        for (const iv of p.interiorVertices) expect(Math.abs(iv.defect)).toBeLessThan(1e-12);
      }),
      { numRuns: 200 },
    );
  });

  it('random single vertices: the derived sectors are the generated ones and sum to 2π', () => {
    const weights = fc.array(fc.double({ min: 0.2, max: 1, noNaN: true }), { minLength: 3, maxLength: 10 });
    fc.assert(
      fc.property(weights, (w) => {
        const total = w.reduce((s, x) => s + x, 0);
        const sectors = w.map((x) => (x / total) * 360);
        sectors[sectors.length - 1] = 360 - sectors.slice(0, -1).reduce((s, x) => s + x, 0);
        const g = singleVertex({ sectorsDeg: sectors });
        expect(g.messages).toEqual([]);
        const r = buildPattern(g.project!.source);
        expect(r.messages).toEqual([]);
        const iv = r.pattern!.interiorVertices;
        expect(iv.length).toBe(1);
        iv[0].sectors.forEach((s, k) => expect((s * 180) / Math.PI).toBeCloseTo(sectors[k], 9));
        expect(Math.abs(iv[0].sectors.reduce((s, x) => s + x, 0) - 2 * Math.PI)).toBeLessThan(1e-12);
      }),
      { numRuns: 200 },
    );
  });

  it('random grids survive project and FOLD round trips unchanged', () => {
    fc.assert(
      fc.property(gridArb, (src) => {
        const project: Project = { source: src, drives: [] };
        const viaProject = parseProject(writeProject(project)).project!;
        const viaFold = parseFold(writeFold(project)).project!;
        for (const q of [viaProject, viaFold]) {
          expect(q.source.vertices).toEqual(src.vertices);
          expect(q.source.edges).toEqual(src.edges);
          expect(q.source.assignments).toEqual(src.assignments);
        }
      }),
      { numRuns: 100 },
    );
  });

  it('a crease added across a random grid cell’s far corners is always caught as a crossing', () => {
    fc.assert(
      fc.property(gridArb.filter((s) => s.vertices.length >= 16), fc.nat(), (src, pick) => {
        const n = Math.round(Math.sqrt(src.vertices.length)) - 1;
        const i = pick % (n - 1);
        const j = Math.floor(pick / (n - 1)) % n;
        const id = (a: number, b: number) => b * (n + 1) + a;
        // from (i, j) to (i + 2, j + 1): passes through the shared side of two cells
        src.edges.push([id(i, j), id(i + 2, j + 1)]);
        src.assignments.push('M');
        src.labels.push('extra');
        src.limits.push(undefined);
        const r = buildPattern(src);
        expect(r.pattern).toBeUndefined();
        expect(r.messages.some((m) => m.code === 'creases-cross' || m.code === 'creases-overlap')).toBe(true);
      }),
      { numRuns: 200 },
    );
  });
});

// ---------------------------------------------------------------------------------------------------
// Random option values on the command line (in-process, on a small pattern): every value is answered with a
// result or with exit status 2 and a message naming the option, never a crash, a trace or NaN, and never an
// unbounded run (oversized requests are refused before any work; a run still going after 300 ms is stopped
// by a simulated Ctrl-C, which must then end in exit status 130).

const optionValue = fc.oneof(
  fc.constantFrom('0', '-0', '1', '-1', '0.5', '1e-300', '1e-12', '1e-9', '1e9', '1e300', '1e999', '-1e999', 'NaN', 'Infinity', '', ' ', 'abc', '0x10', '1,5', '5°', '--', '=', '17', '18', '2'),
  fc.double({ noNaN: false }).map(String),
  fc.integer({ min: -10, max: 2_000_000_000 }).map(String),
  fc.string({ maxLength: 6 }),
);

describe('random option values: exit 2 naming the option, or a result; never a crash', () => {
  const dir = mkdtempSync(join(tmpdir(), 'hingeplan-fuzz-'));
  const coupon = join(dir, 'coupon.hingeplan.json');
  writeFileSync(coupon, readFileSync(join(SAMPLES_DIR, 'hinge-coupon.hingeplan.json')));
  const rig = join(dir, 'rig.hingeplan.json');
  writeFileSync(rig, readFileSync(join(SAMPLES_DIR, 'two-motor-rig.hingeplan.json')));

  /** One command line with one option set to a random value (the others sensible). */
  const commandLines = fc.oneof(
    fc.record({ option: fc.constantFrom('--time', '--dt', '--rows', '--accel', '--accel-time', '--jerk-time', '--max-rate', '--max-accel', '--from', '--to', '--digits'), value: optionValue, profile: fc.constantFrom('constant', 'trapezoid', 's-curve') })
      .map(({ option, value, profile }) => {
        const base: Record<string, string> = { '--drive': 'c0', '--from': '0', '--to': '90', '--time': '4', '--profile': profile, '--rows': '5' };
        if (option === '--dt') delete base['--rows'];
        base[option] = value;
        return { option, args: ['schedule', coupon, ...Object.entries(base).flat()] };
      }),
    fc.record({ option: fc.constantFrom('--step', '--from', '--to', '--digits', '--condition-every', '--branch', '--solution'), value: optionValue, command: fc.constantFrom('sweep', 'table') })
      .map(({ option, value, command }) => {
        const base: Record<string, string> = { '--drive': 'c0', '--from': '0', '--to': '90', '--step': '10' };
        base[option] = value;
        return { option, args: [command, coupon, ...Object.entries(base).flat(), ...(command === 'sweep' ? ['--csv'] : [])] };
      }),
    fc.record({ a: optionValue, b: optionValue, c: optionValue })
      .map(({ a, b, c }) => ({ option: '--range', args: ['grid', rig, '--range', `c0=${a}:${b}:${c}`, '--range', 'c2=-30:0:15'] })),
    fc.record({ value: optionValue })
      .map(({ value }) => ({ option: '--set', args: ['solve', coupon, '--set', `c0=${value}`, '--json'] })),
  );

  it('schedule, sweep, table, grid and solve', async () => {
    await fc.assert(
      fc.asyncProperty(commandLines, async ({ option, args }) => {
        let out = '', err = '';
        let handler: (() => void) | undefined;
        const timer = setTimeout(() => handler?.(), 300);
        const code = await main(args, {
          ...nodeIo(),
          stdout: (t) => { out += t; },
          stderr: (t) => { err += t; },
          progress: () => {},
          stderrIsTTY: false,
          onInterrupt: (h) => { handler = h; return () => {}; },
          interrupts: () => 0,
        });
        clearTimeout(timer);
        expect([0, 2, 3, 4, 130], `${args.join(' ')}\n${err}`).toContain(code);
        expect(err, args.join(' ')).not.toMatch(/internal error|\n\s+at |NaN°/);
        if (code === 2) expect(err, args.join(' ')).toContain(option === '--set' ? 'c0' : option.replace(/^--/, ''));
        if (code === 0 && !args.includes('solve')) expect(out.length).toBeGreaterThan(0);
      }),
      { numRuns: 300 },
    );
  }, 120_000);
});
