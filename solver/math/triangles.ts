// Exact tests between two triangles in space: do they cross (and along which segment), are they coplanar,
// how far apart are they (and where). A triangle is nine numbers (three corners x, y, z) at an offset in a
// Float64Array. Module-level scratch keeps the hot loops free of allocation; nothing here is re-entrant.
//
// The crossing test follows the interval method of T. Möller, "A fast triangle-triangle intersection test",
// J. Graphics Tools 2(2), 1997 (each triangle cut by the other's plane; the two cuts overlap on the planes'
// common line). The distance uses the closest-point routines of C. Ericson, "Real-Time Collision Detection",
// Morgan Kaufmann 2005, §5.1.5 (point–triangle) and §5.1.9 (segment–segment): two disjoint triangles are
// closest between an edge of one and an edge of the other, or a corner of one and the face of the other.

export const DISJOINT = 0;
export const CROSSING = 1;
export const COPLANAR = 2;

const nA = new Float64Array(3);
const nB = new Float64Array(3);
const dA = new Float64Array(3);
const dB = new Float64Array(3);
const segA = new Float64Array(8);
const segB = new Float64Array(8);

/** Unit normal of triangle T into n; returns its length before normalizing (twice the area). */
export function triangleNormal(T: Float64Array, t: number, n: Float64Array): number {
  const ux = T[t + 3] - T[t], uy = T[t + 4] - T[t + 1], uz = T[t + 5] - T[t + 2];
  const vx = T[t + 6] - T[t], vy = T[t + 7] - T[t + 1], vz = T[t + 8] - T[t + 2];
  const x = uy * vz - uz * vy, y = uz * vx - ux * vz, z = ux * vy - uy * vx;
  const len = Math.hypot(x, y, z);
  if (len > 0) { n[0] = x / len; n[1] = y / len; n[2] = z / len; } else { n[0] = 0; n[1] = 0; n[2] = 0; }
  return len;
}

/** Signed distances of U's corners to T's plane (unit normal n through T's first corner); |d| < tol → 0. */
function sideDistances(n: Float64Array, T: Float64Array, t: number, U: Float64Array, u: number, tol: number, d: Float64Array): number {
  const off = n[0] * T[t] + n[1] * T[t + 1] + n[2] * T[t + 2];
  let pos = 0, neg = 0;
  for (let k = 0; k < 3; k++) {
    let v = n[0] * U[u + 3 * k] + n[1] * U[u + 3 * k + 1] + n[2] * U[u + 3 * k + 2] - off;
    if (Math.abs(v) < tol) v = 0;
    d[k] = v;
    if (v > 0) pos++;
    else if (v < 0) neg++;
  }
  // 3: all on one side (disjoint); 0: all in the plane; else the plane cuts the triangle
  return pos === 3 || neg === 3 ? 3 : pos === 0 && neg === 0 ? 0 : 1;
}

/**
 * The segment where U meets the other triangle's plane (signed distances d), as parameters along the unit
 * direction D: seg[0] = min t, seg[1] = max t, seg[2..4] the point at min, seg[5..7] the point at max.
 */
function planeCut(U: Float64Array, u: number, d: Float64Array, D: Float64Array, seg: Float64Array): void {
  seg[0] = Infinity;
  seg[1] = -Infinity;
  const take = (x: number, y: number, z: number) => {
    const t = D[0] * x + D[1] * y + D[2] * z;
    if (t < seg[0]) { seg[0] = t; seg[2] = x; seg[3] = y; seg[4] = z; }
    if (t > seg[1]) { seg[1] = t; seg[5] = x; seg[6] = y; seg[7] = z; }
  };
  for (let k = 0; k < 3; k++) {
    const i = u + 3 * k;
    if (d[k] === 0) take(U[i], U[i + 1], U[i + 2]);
    const m = (k + 1) % 3;
    if (d[k] * d[m] < 0) {
      const j = u + 3 * m;
      const f = d[k] / (d[k] - d[m]);
      take(U[i] + f * (U[j] - U[i]), U[i + 1] + f * (U[j + 1] - U[i + 1]), U[i + 2] + f * (U[j + 2] - U[i + 2]));
    }
  }
}

/**
 * Do triangles T (A at a) and U (B at b) meet? DISJOINT, CROSSING (out[0..5] = the two ends of the segment
 * they share; a single point gives equal ends) or COPLANAR (both lie in one plane within tol, which the
 * caller settles in that plane). `tol` is a length: plane distances below it are zero and overlaps of the two
 * cuts down to −tol count as meeting.
 */
export function intersectTriangles(A: Float64Array, a: number, B: Float64Array, b: number, tol: number, out: Float64Array): number {
  if (triangleNormal(B, b, nB) === 0 || triangleNormal(A, a, nA) === 0) return DISJOINT;
  const sA = sideDistances(nB, B, b, A, a, tol, dA);
  if (sA === 3) return DISJOINT;
  const sB = sideDistances(nA, A, a, B, b, tol, dB);
  if (sB === 3) return DISJOINT;
  if (sA === 0 || sB === 0) return COPLANAR;
  const Dx = nA[1] * nB[2] - nA[2] * nB[1], Dy = nA[2] * nB[0] - nA[0] * nB[2], Dz = nA[0] * nB[1] - nA[1] * nB[0];
  const len = Math.hypot(Dx, Dy, Dz);
  if (len < 1e-12) return COPLANAR;
  const D = scratchD;
  D[0] = Dx / len; D[1] = Dy / len; D[2] = Dz / len;
  planeCut(A, a, dA, D, segA);
  planeCut(B, b, dB, D, segB);
  if (!(segA[0] <= segA[1]) || !(segB[0] <= segB[1])) return DISJOINT;
  const lo = Math.max(segA[0], segB[0]);
  const hi = Math.min(segA[1], segB[1]);
  if (hi < lo - tol) return DISJOINT;
  const from = segA[0] >= segB[0] ? segA : segB;
  const to = segA[1] <= segB[1] ? segA : segB;
  if (hi >= lo) {
    out[0] = from[2]; out[1] = from[3]; out[2] = from[4];
    out[3] = to[5]; out[4] = to[6]; out[5] = to[7];
  } else {
    // touching within tol: one point halfway
    for (let k = 0; k < 3; k++) out[k] = out[k + 3] = (from[2 + k] + to[5 + k]) / 2;
  }
  return CROSSING;
}
const scratchD = new Float64Array(3);

/**
 * Do two triangles in one plane overlap with positive area? P and Q are 2D triangles (six numbers at an
 * offset). Separating axes (the six edge normals): they overlap when every axis shows an overlap above tol.
 */
export function overlap2D(P: Float64Array, p: number, Q: Float64Array, q: number, tol: number): boolean {
  for (let side = 0; side < 2; side++) {
    const T = side === 0 ? P : Q, t = side === 0 ? p : q;
    for (let k = 0; k < 3; k++) {
      const m = (k + 1) % 3;
      let ax = -(T[t + 2 * m + 1] - T[t + 2 * k + 1]), ay = T[t + 2 * m] - T[t + 2 * k];
      const l = Math.hypot(ax, ay);
      if (l === 0) return false;
      ax /= l; ay /= l;
      let p0 = Infinity, p1 = -Infinity, q0 = Infinity, q1 = -Infinity;
      for (let i = 0; i < 3; i++) {
        const s = ax * P[p + 2 * i] + ay * P[p + 2 * i + 1];
        if (s < p0) p0 = s;
        if (s > p1) p1 = s;
        const r = ax * Q[q + 2 * i] + ay * Q[q + 2 * i + 1];
        if (r < q0) q0 = r;
        if (r > q1) q1 = r;
      }
      if (Math.min(p1, q1) - Math.max(p0, q0) <= tol) return false;
    }
  }
  return true;
}

const cp = new Float64Array(6);

/**
 * Closest points of segments P0P1 and Q0Q1 (Ericson §5.1.9) into out[o..o+5]; returns the squared distance.
 */
export function closestSegmentSegment(
  p0x: number, p0y: number, p0z: number, p1x: number, p1y: number, p1z: number,
  q0x: number, q0y: number, q0z: number, q1x: number, q1y: number, q1z: number,
  out: Float64Array, o: number,
): number {
  const d1x = p1x - p0x, d1y = p1y - p0y, d1z = p1z - p0z;
  const d2x = q1x - q0x, d2y = q1y - q0y, d2z = q1z - q0z;
  const rx = p0x - q0x, ry = p0y - q0y, rz = p0z - q0z;
  const a = d1x * d1x + d1y * d1y + d1z * d1z;
  const e = d2x * d2x + d2y * d2y + d2z * d2z;
  const f = d2x * rx + d2y * ry + d2z * rz;
  let s: number, t: number;
  if (a <= 1e-300 && e <= 1e-300) { s = 0; t = 0; }
  else if (a <= 1e-300) { s = 0; t = clamp01(f / e); }
  else {
    const c = d1x * rx + d1y * ry + d1z * rz;
    if (e <= 1e-300) { t = 0; s = clamp01(-c / a); }
    else {
      const b = d1x * d2x + d1y * d2y + d1z * d2z;
      const denom = a * e - b * b;
      s = denom > 0 ? clamp01((b * f - c * e) / denom) : 0;
      t = (b * s + f) / e;
      if (t < 0) { t = 0; s = clamp01(-c / a); }
      else if (t > 1) { t = 1; s = clamp01((b - c) / a); }
    }
  }
  const cx = p0x + d1x * s, cy = p0y + d1y * s, cz = p0z + d1z * s;
  const kx = q0x + d2x * t, ky = q0y + d2y * t, kz = q0z + d2z * t;
  out[o] = cx; out[o + 1] = cy; out[o + 2] = cz;
  out[o + 3] = kx; out[o + 4] = ky; out[o + 5] = kz;
  return (cx - kx) ** 2 + (cy - ky) ** 2 + (cz - kz) ** 2;
}

function clamp01(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}

/** Closest point of triangle T to the point (px, py, pz) (Ericson §5.1.5, by Voronoi regions) into out[o..o+2]. */
export function closestPointTriangle(px: number, py: number, pz: number, T: Float64Array, t: number, out: Float64Array, o: number): void {
  const ax = T[t], ay = T[t + 1], az = T[t + 2];
  const abx = T[t + 3] - ax, aby = T[t + 4] - ay, abz = T[t + 5] - az;
  const acx = T[t + 6] - ax, acy = T[t + 7] - ay, acz = T[t + 8] - az;
  const apx = px - ax, apy = py - ay, apz = pz - az;
  const d1 = abx * apx + aby * apy + abz * apz, d2 = acx * apx + acy * apy + acz * apz;
  const put = (x: number, y: number, z: number) => { out[o] = x; out[o + 1] = y; out[o + 2] = z; };
  if (d1 <= 0 && d2 <= 0) return put(ax, ay, az);
  const bpx = px - T[t + 3], bpy = py - T[t + 4], bpz = pz - T[t + 5];
  const d3 = abx * bpx + aby * bpy + abz * bpz, d4 = acx * bpx + acy * bpy + acz * bpz;
  if (d3 >= 0 && d4 <= d3) return put(T[t + 3], T[t + 4], T[t + 5]);
  const vc = d1 * d4 - d3 * d2;
  if (vc <= 0 && d1 >= 0 && d3 <= 0) {
    const v = d1 / (d1 - d3);
    return put(ax + v * abx, ay + v * aby, az + v * abz);
  }
  const cpx = px - T[t + 6], cpy = py - T[t + 7], cpz = pz - T[t + 8];
  const d5 = abx * cpx + aby * cpy + abz * cpz, d6 = acx * cpx + acy * cpy + acz * cpz;
  if (d6 >= 0 && d5 <= d6) return put(T[t + 6], T[t + 7], T[t + 8]);
  const vb = d5 * d2 - d1 * d6;
  if (vb <= 0 && d2 >= 0 && d6 <= 0) {
    const w = d2 / (d2 - d6);
    return put(ax + w * acx, ay + w * acy, az + w * acz);
  }
  const va = d3 * d6 - d5 * d4;
  if (va <= 0 && d4 - d3 >= 0 && d5 - d6 >= 0) {
    const w = (d4 - d3) / (d4 - d3 + (d5 - d6));
    const bx = T[t + 3], by = T[t + 4], bz = T[t + 5];
    return put(bx + w * (T[t + 6] - bx), by + w * (T[t + 7] - by), bz + w * (T[t + 8] - bz));
  }
  const denom = 1 / (va + vb + vc);
  const v = vb * denom, w = vc * denom;
  put(ax + abx * v + acx * w, ay + aby * v + acy * w, az + abz * v + acz * w);
}

const seg = new Float64Array(6);

/**
 * Distance between triangles T (A at a) and U (B at b); the closest points go to out[0..2] (on T) and
 * out[3..5] (on U). Crossing triangles are 0 apart, with both points at the middle of the shared segment.
 */
export function triangleDistance(A: Float64Array, a: number, B: Float64Array, b: number, tol: number, out: Float64Array): number {
  const r = intersectTriangles(A, a, B, b, tol, seg);
  if (r === CROSSING) {
    for (let k = 0; k < 3; k++) out[k] = out[k + 3] = (seg[k] + seg[k + 3]) / 2;
    return 0;
  }
  // coplanar or disjoint: the closest pair is edge–edge or corner–face (in one plane this also finds 0 when
  // the triangles overlap, through a pair of crossing edges or a corner inside the other)
  let best = Infinity;
  for (let i = 0; i < 3; i++) {
    const i0 = a + 3 * i, i1 = a + 3 * ((i + 1) % 3);
    for (let j = 0; j < 3; j++) {
      const j0 = b + 3 * j, j1 = b + 3 * ((j + 1) % 3);
      const d = closestSegmentSegment(A[i0], A[i0 + 1], A[i0 + 2], A[i1], A[i1 + 1], A[i1 + 2], B[j0], B[j0 + 1], B[j0 + 2], B[j1], B[j1 + 1], B[j1 + 2], cp, 0);
      if (d < best) { best = d; out.set(cp); }
    }
  }
  for (let side = 0; side < 2; side++) {
    const S = side === 0 ? A : B, s = side === 0 ? a : b;
    const T = side === 0 ? B : A, t = side === 0 ? b : a;
    for (let k = 0; k < 3; k++) {
      const x = S[s + 3 * k], y = S[s + 3 * k + 1], z = S[s + 3 * k + 2];
      closestPointTriangle(x, y, z, T, t, cp, 0);
      const d = (x - cp[0]) ** 2 + (y - cp[1]) ** 2 + (z - cp[2]) ** 2;
      if (d < best) {
        best = d;
        const on = side === 0 ? 0 : 3, other = side === 0 ? 3 : 0;
        out[on] = x; out[on + 1] = y; out[on + 2] = z;
        out[other] = cp[0]; out[other + 1] = cp[1]; out[other + 2] = cp[2];
      }
    }
  }
  return Math.sqrt(best);
}
