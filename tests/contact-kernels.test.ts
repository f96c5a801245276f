// The triangle kernels of the contact check against an independent general-purpose library:
// three-mesh-bvh's ExtendedTriangle (npm, separating-axis triangle–triangle intersection and closest points),
// on seeded random triangles. Cases within a hair of touching are left out: there the two answers may
// differ by rounding, and the contact check settles them with its own tolerance.
import { describe, expect, it } from 'vitest';
import { Line3, Vector3 } from 'three';
import { ExtendedTriangle } from 'three-mesh-bvh';
import { COPLANAR, CROSSING, DISJOINT, intersectTriangles, overlap2D, triangleDistance } from '../solver/math/triangles';
import { mulberry32 } from '../solver/math/random';


// the package's typings list fewer parameters than its code takes (the output points, a quiet flag)
interface Reference {
  intersectsTriangle(other: Reference, target?: Line3 | null, suppressLog?: boolean): boolean;
  distanceToTriangle(other: Reference, target1?: Vector3, target2?: Vector3): number;
  closestPointToPoint(point: Vector3, target: Vector3): Vector3;
}
const reference = (t: Float64Array, o: number) =>
  new ExtendedTriangle(new Vector3(t[o], t[o + 1], t[o + 2]), new Vector3(t[o + 3], t[o + 4], t[o + 5]), new Vector3(t[o + 6], t[o + 7], t[o + 8])) as unknown as Reference;

function randomPair(rand: () => number, spread: number): Float64Array {
  const t = new Float64Array(18);
  const cx = (rand() - 0.5) * spread, cy = (rand() - 0.5) * spread, cz = (rand() - 0.5) * spread;
  for (let i = 0; i < 18; i++) t[i] = (rand() - 0.5) * 2 + (i >= 9 ? [cx, cy, cz][i % 3] : 0);
  return t;
}

describe('triangle kernels against three-mesh-bvh', () => {
  it('crossing or disjoint, and the shared segment, on 4000 random pairs', () => {
    const rand = mulberry32(7);
    const out = new Float64Array(6);
    let crossings = 0, checked = 0;
    for (let k = 0; k < 4000; k++) {
      const t = randomPair(rand, 1.5);
      const A = reference(t, 0), B = reference(t, 9);
      const d = A.distanceToTriangle(B);
      const line = new Line3();
      const theirs = A.intersectsTriangle(B, line, true);
      if (d > 0 && d < 1e-6) continue;
      const ours = intersectTriangles(t, 0, t, 9, 1e-12, out);
      checked++;
      expect(ours === CROSSING, `pair ${k}`).toBe(theirs);
      if (ours === CROSSING) {
        crossings++;
        const a = new Vector3(out[0], out[1], out[2]), b = new Vector3(out[3], out[4], out[5]);
        const same = Math.min(a.distanceTo(line.start) + b.distanceTo(line.end), a.distanceTo(line.end) + b.distanceTo(line.start));
        expect(same, `segment of pair ${k}`).toBeLessThan(1e-9);
      }
    }
    expect(checked).toBeGreaterThan(3500);
    expect(crossings).toBeGreaterThan(300);
  });

  it('distance and closest points on 4000 random pairs', () => {
    const rand = mulberry32(11);
    const out = new Float64Array(6);
    for (let k = 0; k < 4000; k++) {
      const t = randomPair(rand, 6);
      const A = reference(t, 0), B = reference(t, 9);
      const p = new Vector3(), q = new Vector3();
      const theirs = A.distanceToTriangle(B, p, q);
      const ours = triangleDistance(t, 0, t, 9, 1e-12, out);
      expect(Math.abs(ours - theirs), `pair ${k}`).toBeLessThan(1e-9);
      // our closest points lie on the triangles and are that far apart
      const a = new Vector3(out[0], out[1], out[2]), b = new Vector3(out[3], out[4], out[5]);
      expect(Math.abs(a.distanceTo(b) - ours)).toBeLessThan(1e-9);
      const onA = new Vector3(), onB = new Vector3();
      A.closestPointToPoint(a, onA);
      B.closestPointToPoint(b, onB);
      expect(a.distanceTo(onA)).toBeLessThan(1e-9);
      expect(b.distanceTo(onB)).toBeLessThan(1e-9);
    }
  });

  it('coplanar triangles: overlap with area, side by side, and apart', () => {
    const rand = mulberry32(3);
    const out = new Float64Array(6);
    let overlaps = 0, apart = 0;
    for (let k = 0; k < 2000; k++) {
      const t2 = new Float64Array(12).map(() => (rand() - 0.5) * 2);
      for (let i = 6; i < 12; i += 2) t2[i] += 1.2;
      const t3 = new Float64Array(18);
      for (let i = 0; i < 6; i++) { t3[3 * i] = t2[2 * i]; t3[3 * i + 1] = t2[2 * i + 1]; t3[3 * i + 2] = 0; }
      expect(intersectTriangles(t3, 0, t3, 9, 1e-12, out)).toBe(COPLANAR);
      const A = reference(t3, 0), B = reference(t3, 9);
      const d = A.distanceToTriangle(B);
      const ours = overlap2D(t2, 0, t2, 6, 1e-9);
      if (d > 1e-6) { expect(ours, `pair ${k}`).toBe(false); apart++; }
      else if (ours) {
        // overlapping with area: some corner of one lies inside the other, or two edges cross
        expect(A.intersectsTriangle(B, null, true)).toBe(true);
        overlaps++;
      }
    }
    expect(overlaps).toBeGreaterThan(200);
    expect(apart).toBeGreaterThan(200);
    // two triangles sharing only an edge, and only a corner: touching, no overlap with area
    const edge = Float64Array.from([0, 0, 1, 0, 0, 1, 1, 0, 1, 1, 0, 1]);
    expect(overlap2D(edge, 0, edge, 6, 1e-9)).toBe(false);
    const corner = Float64Array.from([0, 0, 1, 0, 0, 1, 0, 0, -1, 0, 0, -1]);
    expect(overlap2D(corner, 0, corner, 6, 1e-9)).toBe(false);
  });

  it('parallel planes apart are disjoint; a triangle poking through another crosses it', () => {
    const out = new Float64Array(6);
    const apart = Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1, 1, 0, 1, 0, 1, 1]);
    expect(intersectTriangles(apart, 0, apart, 9, 1e-12, out)).toBe(DISJOINT);
    // the vertical triangle through (0.25, 0.25) crosses the unit right triangle in z = 0 along x = y from 0.1 to 0.4
    const poke = Float64Array.from([0, 0, 0, 1, 0, 0, 0, 1, 0, 0.1, 0.1, -1, 0.4, 0.4, -1, 0.25, 0.25, 1]);
    expect(intersectTriangles(poke, 0, poke, 9, 1e-12, out)).toBe(CROSSING);
    const ends = [[out[0], out[1], out[2]], [out[3], out[4], out[5]]].sort((a, b) => a[0] - b[0]);
    // by hand: the vertical triangle meets z = 0 halfway up its two slanted sides, at (0.175, 0.175) and (0.325, 0.325)
    expect(ends[0][0]).toBeCloseTo(0.175, 12);
    expect(ends[1][0]).toBeCloseTo(0.325, 12);
    expect(triangleDistance(poke, 0, poke, 9, 1e-12, out)).toBe(0);
  });
});
