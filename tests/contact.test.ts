// Panel contact: what counts, where the first contact of a path lies, and agreement with an independent
// library on random placements.
import { describe, expect, it } from 'vitest';
import { Line3, Vector3 } from 'three';
import { ExtendedTriangle } from 'three-mesh-bvh';
import type { Assignment, Pattern, Shape } from '../solver/types';
import { buildPattern } from '../solver/model/pattern';
import { singleVertex } from '../solver/model/generators';
import { sweep } from '../solver/paths/sweep';
import { ContactChecker } from '../solver/outputs/contact';
import { StatesBetween, refineFirstContact, CONTACT_REFINEMENT } from '../solver/outputs/contact-path';
import { miuraSheet } from './support/references';
import { mulberry32 } from '../solver/math/random';

const DEG = Math.PI / 180;

/** A sheet from its outline: rim edges around `rim` (vertex indices in order) and the given creases. */
function sheet(name: string, vertices: [number, number][], rim: number[], creases: [number, number, string][]): Pattern {
  const edges: [number, number][] = [];
  const assignments: Assignment[] = [];
  const labels: (string | undefined)[] = [];
  rim.forEach((v, k) => { edges.push([v, rim[(k + 1) % rim.length]]); assignments.push('B'); labels.push(undefined); });
  for (const [a, b, label] of creases) { edges.push([a, b]); assignments.push('V'); labels.push(label); }
  const { pattern, messages } = buildPattern({ name, vertices, edges, assignments, labels, limits: [] });
  if (!pattern) throw new Error(messages.map((m) => m.text).join('; '));
  return pattern;
}

/** Panel whose flat centroid is nearest (x, y). */
function panelAt(pattern: Pattern, x: number, y: number): number {
  let best = 0;
  pattern.panels.forEach((p, i) => { if (Math.hypot(p.centroid[0] - x, p.centroid[1] - y) < Math.hypot(pattern.panels[best].centroid[0] - x, pattern.panels[best].centroid[1] - y)) best = i; });
  return best;
}

/**
 * Three panels in a row: A = [−a, 0] × [0, w], B = [0, b] × [0, w] (held), C = [b, b + c] × [0, w], hinged by
 * valley creases c1 (x = 0) and c2 (x = b).
 */
function strip(a: number, b: number, c: number, w: number) {
  const p = sheet('strip', [[-a, 0], [0, 0], [b, 0], [b + c, 0], [b + c, w], [b, w], [0, w], [-a, w]], [0, 1, 2, 3, 4, 5, 6, 7], [[1, 6, 'c1'], [2, 5, 'c2']]);
  const B = panelAt(p, b / 2, w / 2);
  const pattern: Pattern = { ...p, basePanel: B };
  return { pattern, A: panelAt(p, -a / 2, w / 2), B, C: panelAt(p, b + c / 2, w / 2), c1: p.labelIndex.get('c1')!, c2: p.labelIndex.get('c2')! };
}

/**
 * First contact of the strip folding onto itself, from plane geometry (common practice; the cross-section is
 * the same at every y). B is the segment [0, b] of the x axis; C, folded by φ about x = b, runs from (b, 0)
 * along (cos φ, sin φ) for c; A, folded by θ about x = 0, runs from the origin along (−cos θ, sin θ) for a.
 * As θ grows, A either sweeps over C's tip T (when |T| ≤ a: at the θ where A points at T), or A's tip meets
 * C where the circle of radius a crosses C (law of cosines); the first of the two. With a clearance d > 0
 * and A sweeping towards T, the gap to T closes at θ* − asin(d / |T|).
 */
function firstContactAngle(a: number, b: number, c: number, phi: number, clearance = 0): number {
  const tx = b + c * Math.cos(phi), ty = c * Math.sin(phi);
  const candidates: number[] = [];
  const r = Math.hypot(tx, ty);
  if (r <= a) candidates.push(Math.atan2(ty, -tx) - (clearance > 0 ? Math.asin(clearance / r) : 0));
  // |(b, 0) + s (cos φ, sin φ)| = a  →  s² + 2 b s cos φ + b² − a² = 0
  const disc = b * b * Math.cos(phi) ** 2 - b * b + a * a;
  if (disc >= 0 && clearance === 0) {
    const s = -b * Math.cos(phi) + Math.sqrt(disc);
    if (s >= 0 && s <= c) candidates.push(Math.atan2(s * Math.sin(phi), -(b + s * Math.cos(phi))));
  }
  return Math.min(...candidates);
}

function firstContactOnPath(pattern: Pattern, drive: number, holds: { crease: number; value: number }[], clearance = 0) {
  const path = sweep(pattern, { drive, from: 1 * DEG, to: 179 * DEG, step: DEG, holds });
  expect(path.status).toBe('complete');
  const checker = new ContactChecker(pattern, { clearance });
  const states = new StatesBetween(pattern, drive, holds);
  for (let k = 0; k < path.samples.length; k++) {
    const s = path.samples[k];
    const report = checker.checkAngles(s.angles);
    if (report.contacts.length) {
      expect(k).toBeGreaterThan(0);
      const prev = path.samples[k - 1];
      return refineFirstContact(checker, states, { drive: prev.drive, angles: prev.angles }, { drive: s.drive, angles: s.angles, report });
    }
  }
  return undefined;
}

describe('first contact of a strip folding onto itself (plane geometry)', () => {
  const cases: [number, number, number, number][] = [
    // a, b, c, φ (deg): A sweeps over C's tip
    [60, 40, 50, 120],
    // A's tip lands on C's face
    [45, 40, 80, 115],
    [50, 30, 30, 150],
  ];
  for (const [a, b, c, phiDeg] of cases) {
    it(`a ${a}, b ${b}, c ${c}, c2 held at ${phiDeg}°`, () => {
      const s = strip(a, b, c, 20);
      const phi = phiDeg * DEG;
      const expected = firstContactAngle(a, b, c, phi);
      const found = firstContactOnPath(s.pattern, s.c1, [{ crease: s.c2, value: phi }]);
      expect(found).toBeDefined();
      expect(found!.contact.panels).toEqual([Math.min(s.A, s.C), Math.max(s.A, s.C)]);
      // the reported drive is the first state in contact, within 0.01° after the true angle
      expect(found!.drive).toBeGreaterThanOrEqual(expected - 1e-9);
      expect(found!.drive - expected).toBeLessThanOrEqual(CONTACT_REFINEMENT);
      expect(found!.before).toBeLessThan(expected + 1e-9);
    });
  }

  it('with a clearance the contact comes earlier, where the gap to the tip equals the clearance', () => {
    const [a, b, c, phiDeg, d] = [60, 40, 50, 120, 3];
    const s = strip(a, b, c, 20);
    const expected = firstContactAngle(a, b, c, phiDeg * DEG, d);
    const found = firstContactOnPath(s.pattern, s.c1, [{ crease: s.c2, value: phiDeg * DEG }], d);
    expect(found!.drive).toBeGreaterThanOrEqual(expected - 1e-9);
    expect(found!.drive - expected).toBeLessThanOrEqual(CONTACT_REFINEMENT);
    expect(found!.contact.distance).toBeLessThan(d);
    expect(found!.contact.distance).toBeGreaterThan(d - 0.01);
  });

  it('an L-shaped panel: its notch lets the other flap pass where its convex hull would not', () => {
    // A is an L: a thin arm (width 8) along the crease and a long arm (length 60) along the top rim; C is
    // hinged on the lower part of x = b only, so it never shares a y range with A's long arm
    const [b, c, w] = [40, 50, 20];
    const p = sheet('notch', [
      [-8, 0], [0, 0], [b, 0], [b + c, 0], [b + c, 10], [b, 10], [b, w], [0, w], [-60, w], [-60, 14], [-8, 14],
    ], [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10], [[1, 7, 'c1'], [2, 5, 'c2']]);
    const pattern = { ...p, basePanel: panelAt(p, b / 2, w / 2) };
    const holds = [{ crease: p.labelIndex.get('c2')!, value: 120 * DEG }];
    expect(firstContactOnPath(pattern, p.labelIndex.get('c1')!, holds)).toBeUndefined();
    // the same flap against a full rectangle of A's hull meets it (at about 109° by the plane geometry above)
    const full = strip(60, b, c, w);
    expect(firstContactOnPath(full.pattern, full.c1, [{ crease: full.c2, value: 120 * DEG }])).toBeDefined();
  });
});

describe('what counts as a contact', () => {
  it('the flat sheet is never a contact, with or without a clearance', () => {
    const { pattern } = miuraSheet(4, 4, 40, 30, 70);
    const flat = new Float64Array(pattern.creases.length);
    for (const clearance of [0, 2, 10]) {
      const r = new ContactChecker(pattern, { clearance }).checkAngles(flat);
      expect(r.contacts, `clearance ${clearance}`).toEqual([]);
      expect(r.stacked).toEqual([]);
    }
  });

  it('a Miura sheet folds from 1° to 179° without contact (rigid-foldable, Schenk & Guest, PNAS 110(9), 2013) and is stacked when flat', () => {
    const { pattern, drive, sign } = miuraSheet(4, 4, 40, 30, 70);
    const path = sweep(pattern, { drive, from: sign * DEG, to: sign * 180 * DEG, step: DEG });
    const checker = new ContactChecker(pattern);
    for (const s of path.samples.slice(0, -1)) expect(checker.checkAngles(s.angles).contacts).toEqual([]);
    const last = path.samples[path.samples.length - 1];
    expect(Math.abs(last.drive)).toBeCloseTo(Math.PI, 12);
    const folded = checker.checkAngles(last.angles);
    expect(folded.contacts).toEqual([]);
    expect(folded.stacked.length).toBeGreaterThan(pattern.panels.length);
    // with a clearance the stacked panels are closer than it: every stacked pair is a contact
    const thick = new ContactChecker(pattern, { clearance: 1 }).checkAngles(last.angles);
    const touching = new Set(thick.contacts.map((c) => c.panels.join(',')));
    for (const pair of folded.stacked) expect(touching.has(pair.join(','))).toBe(true);
  });

  it('strip flaps folded flat onto the middle panel and onto each other are stacked, not in contact', () => {
    const s = strip(30, 40, 25, 20);
    const angles = new Float64Array(s.pattern.creases.length);
    angles[s.c1] = Math.PI;
    angles[s.c2] = Math.PI;
    const pair: [number, number] = [Math.min(s.A, s.C), Math.max(s.A, s.C)];
    const r = new ContactChecker(s.pattern).checkAngles(angles);
    // A covers [0, 30] and C covers [15, 40] of B, both in B's plane: they overlap; A–B and B–C share creases
    expect(r.stacked).toEqual([pair]);
    expect(r.contacts).toEqual([]);
    const withClearance = new ContactChecker(s.pattern, { clearance: 0.5 }).checkAngles(angles);
    expect(withClearance.contacts.map((c) => c.panels)).toEqual([pair]);
  });

  it('panels sharing only a vertex: touching there is not a contact; folded flat they are stacked', () => {
    const g = singleVertex({ sectorsDeg: [60, 100, 120, 80] });
    const { pattern } = buildPattern(g.project!.source);
    const drive = pattern!.labelIndex.get('c0')!;
    const path = sweep(pattern!, { drive, from: DEG, to: 180 * DEG, step: DEG });
    const checker = new ContactChecker(pattern!);
    const thick = new ContactChecker(pattern!, { clearance: 2 });
    expect(thick.checkAngles(new Float64Array(pattern!.creases.length)).contacts).toEqual([]);
    for (const s of path.samples.slice(0, -1)) expect(checker.checkAngles(s.angles).contacts).toEqual([]);
    const last = path.samples[path.samples.length - 1];
    const folded = checker.checkAngles(last.angles);
    // flat-folded, all four sectors lie on each other: the two pairs of opposite panels (sharing only the
    // vertex) are stacked
    expect(folded.stacked.length).toBeGreaterThanOrEqual(2);
    expect(folded.contacts).toEqual([]);
    expect(thick.checkAngles(last.angles).contacts.length).toBeGreaterThanOrEqual(2);
  });
});

// ---------------------------------------------------------------------------------------------------
// Random rigid placements against three-mesh-bvh (npm): each panel's triangles from a fan of its convex
// outline, independently of the checker's triangulation.

interface Reference {
  intersectsTriangle(other: Reference, target?: Line3 | null, suppressLog?: boolean): boolean;
  distanceToTriangle(other: Reference): number;
}


/** A rotation (random unit quaternion) about the point (cx, cy, cz), plus a shift, as a 3×4 transform. */
function randomPlacement(rand: () => number, cx: number, cy: number, cz: number, shift: number): Float64Array {
  let [w, x, y, z] = [rand() - 0.5, rand() - 0.5, rand() - 0.5, rand() - 0.5];
  const n = Math.hypot(w, x, y, z);
  [w, x, y, z] = [w / n, x / n, y / n, z / n];
  const R = [
    1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y),
    2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x),
    2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y),
  ];
  const t = [0, 1, 2].map((i) => [cx, cy, cz][i] - (R[3 * i] * cx + R[3 * i + 1] * cy + R[3 * i + 2] * cz) + (rand() - 0.5) * shift);
  return Float64Array.from([R[0], R[1], R[2], t[0], R[3], R[4], R[5], t[1], R[6], R[7], R[8], t[2]]);
}

function fan(pattern: Pattern, p: number, T: Float64Array): Reference[] {
  const vs = pattern.panels[p].vertices.map((v) => {
    const [x, y] = pattern.vertices[v];
    return new Vector3(T[0] * x + T[1] * y + T[3], T[4] * x + T[5] * y + T[7], T[8] * x + T[9] * y + T[11]);
  });
  const out: Reference[] = [];
  for (let k = 1; k + 1 < vs.length; k++) out.push(new ExtendedTriangle(vs[0], vs[k], vs[k + 1]) as unknown as Reference);
  return out;
}

function shapeOf(transforms: Float64Array[]): Shape {
  return { vertices: [], panelTransforms: transforms, maxMismatch: 0, basePanel: 0 };
}

describe('contact check against three-mesh-bvh on random placements', () => {
  it('two panels sharing nothing: crossing, and distance against a clearance', () => {
    const s = strip(30, 20, 30, 20);
    const rand = mulberry32(5);
    const checker = new ContactChecker(s.pattern);
    const thick = new ContactChecker(s.pattern, { clearance: 4 });
    let hits = 0, misses = 0, near = 0;
    for (let k = 0; k < 1000; k++) {
      const transforms = s.pattern.panels.map(() => randomPlacement(rand, 0, 0, 0, 0));
      // A and C around the same spot, B far away
      transforms[s.A] = randomPlacement(rand, -15, 10, 0, 10);
      transforms[s.C] = randomPlacement(rand, 35, 10, 0, 10);
      transforms[s.C][3] -= 50;
      transforms[s.B][3] += 1000;
      const a = fan(s.pattern, s.A, transforms[s.A]), c = fan(s.pattern, s.C, transforms[s.C]);
      const d = Math.min(...a.flatMap((x) => c.map((y) => x.distanceToTriangle(y))));
      const ours = checker.check(shapeOf(transforms));
      const oursThick = thick.check(shapeOf(transforms));
      if (d > 1e-6) expect(ours.contacts, `placement ${k}`).toEqual([]);
      if (d === 0) { expect(ours.contacts.length, `placement ${k}`).toBe(1); hits++; } else misses++;
      if (Math.abs(d - 4) > 1e-6) {
        expect(oursThick.contacts.length, `placement ${k}`).toBe(d < 4 ? 1 : 0);
        if (d < 4) { expect(oursThick.contacts[0].distance).toBeCloseTo(d, 9); near++; }
      }
    }
    expect(hits).toBeGreaterThan(50);
    expect(misses).toBeGreaterThan(50);
    expect(near).toBeGreaterThan(hits);
  });

  it('panels sharing only a vertex: a crossing away from the vertex is a contact, touching at it is not', () => {
    const g = singleVertex({ sectorsDeg: [60, 100, 120, 80] });
    const pattern = buildPattern(g.project!.source).pattern!;
    const checker = new ContactChecker(pattern);
    const rand = mulberry32(9);
    // the rim has extra corners, so a sector may be several panels; take the two panels at the vertex that are
    // opposite each other (they share the vertex and no crease)
    const centre = pattern.vertices.findIndex(([x, y]) => x === 0 && y === 0);
    const atVertex = pattern.panels.map((p, i) => (p.vertices.includes(centre) ? i : -1)).filter((i) => i >= 0);
    let crossings = 0, clear = 0;
    for (let k = 0; k < 400; k++) {
      const transforms = pattern.panels.map(() => randomPlacement(rand, 0, 0, 0, 0));
      const shape = shapeOf(transforms);
      const report = checker.check(shape);
      const found = new Set(report.contacts.map((c) => c.panels.join(',')));
      for (let i = 0; i < atVertex.length; i++) for (let j = i + 1; j < atVertex.length; j++) {
        const p = atVertex[i], q = atVertex[j];
        const adjacent = pattern.creases.some((c) => (c.leftPanel === p && c.rightPanel === q) || (c.leftPanel === q && c.rightPanel === p));
        if (adjacent) continue;
        // reference: some pair of fan triangles meets along a segment reaching away from the vertex (origin)
        let away = 0;
        for (const x of fan(pattern, p, transforms[p])) for (const y of fan(pattern, q, transforms[q])) {
          const line = new Line3();
          if (x.intersectsTriangle(y, line, true)) away = Math.max(away, line.start.length(), line.end.length());
        }
        if (away > 1e-9 && away < 1e-3) continue;
        const key = `${Math.min(p, q)},${Math.max(p, q)}`;
        expect(found.has(key), `placement ${k}, panels ${key}, reaches ${away}`).toBe(away >= 1e-3);
        if (away >= 1e-3) crossings++; else clear++;
      }
    }
    expect(crossings).toBeGreaterThan(30);
    expect(clear).toBeGreaterThan(30);
  });
});
