// Closed-form closure of one vertex when at most three of its fold angles are unknown.
//
// With the known rotations moved to the right by conjugation (K R(u, ρ) Kᵀ = R(Ku, ρ)), the closure
// R(u₁,ρ₁)·…·R(uₙ,ρₙ) = I becomes a product of at most three rotations about known axes equal to a known
// rotation T. These are the subproblems of rotation geometry (common practice in robot kinematics; e.g. Paden
// and Kahan's subproblems as presented in R. M. Murray, Z. Li, S. S. Sastry, "A Mathematical Introduction to
// Robotic Manipulation", CRC 1994, §3.2, from memory):
//  - one unknown:   R(a, x) = T, so T must be a rotation about a;
//  - two unknowns:  R(a, x)·R(b, y) = T; applied to b, R(a, x)·b = T·b fixes x (a rotation about a taking
//    one vector to another), then y; a consistent state is unique unless a ∥ b;
//  - three unknowns (a spherical RRR closure): R(a, x)·R(b, y)·R(c, z) = T; applied to c and dotted with b,
//    b·c = b·R(a, −x)·T·c, i.e. A cos x + B sin x = C: at most two roots, then y and z as above. For a
//    degree-4 vertex with one known fold angle this is the spherical four-bar's input–output equation.
// A vanishing equation (A = B = C = 0) is a continuum of states: reported as a family, never as a sample.

const TWO_PI = 2 * Math.PI;

export type VertexClosureKind =
  /** `count` closed states (0: none with these known values) */
  | 'states'
  /** the known values leave a continuum of closed states at this vertex */
  | 'family'
  /** more than three unknowns: the vertex alone does not determine them */
  | 'open';

export interface VertexClosure {
  kind: VertexClosureKind;
  count: number;
  /** closed-form states that failed the closure check after polishing (numerical trouble; a root may be lost) */
  dropped: number;
}

/** Consistency tolerance (radians) for known values checked against the closure, and the state acceptance bound. */
export const VERTEX_TOLERANCE = 1e-7;

// scratch (the solver is single-threaded per worker; every call fills what it reads)
const M = new Float64Array(9);
const N = new Float64Array(9);
const P = new Float64Array(9);
const T = new Float64Array(9);
const K1 = new Float64Array(9);
const K2 = new Float64Array(9);
const K3 = new Float64Array(9);
const vA = new Float64Array(3);
const vB = new Float64Array(3);
const vC = new Float64Array(3);
const vW = new Float64Array(3);
const vQ = new Float64Array(3);
const phi = new Float64Array(3);

/** out = R(u, ρ) for the in-plane unit axis (x, y, 0). */
function planeRotation(out: Float64Array, x: number, y: number, rho: number): void {
  const c = Math.cos(rho), s = Math.sin(rho), t = 1 - c;
  out[0] = t * x * x + c; out[1] = t * x * y; out[2] = s * y;
  out[3] = t * x * y; out[4] = t * y * y + c; out[5] = -s * x;
  out[6] = -s * y; out[7] = s * x; out[8] = c;
}

/** out = R(a, ρ) for a unit axis a in space. */
function rotation(out: Float64Array, a: Float64Array, rho: number): void {
  const x = a[0], y = a[1], z = a[2];
  const c = Math.cos(rho), s = Math.sin(rho), t = 1 - c;
  out[0] = t * x * x + c; out[1] = t * x * y - s * z; out[2] = t * x * z + s * y;
  out[3] = t * x * y + s * z; out[4] = t * y * y + c; out[5] = t * y * z - s * x;
  out[6] = t * x * z - s * y; out[7] = t * y * z + s * x; out[8] = t * z * z + c;
}

function mul(out: Float64Array, a: Float64Array, b: Float64Array): void {
  const a0 = a[0], a1 = a[1], a2 = a[2], a3 = a[3], a4 = a[4], a5 = a[5], a6 = a[6], a7 = a[7], a8 = a[8];
  const b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3], b4 = b[4], b5 = b[5], b6 = b[6], b7 = b[7], b8 = b[8];
  out[0] = a0 * b0 + a1 * b3 + a2 * b6; out[1] = a0 * b1 + a1 * b4 + a2 * b7; out[2] = a0 * b2 + a1 * b5 + a2 * b8;
  out[3] = a3 * b0 + a4 * b3 + a5 * b6; out[4] = a3 * b1 + a4 * b4 + a5 * b7; out[5] = a3 * b2 + a4 * b5 + a5 * b8;
  out[6] = a6 * b0 + a7 * b3 + a8 * b6; out[7] = a6 * b1 + a7 * b4 + a8 * b7; out[8] = a6 * b2 + a7 * b5 + a8 * b8;
}

function transpose(out: Float64Array, a: Float64Array): void {
  const a1 = a[1], a2 = a[2], a5 = a[5];
  out[0] = a[0]; out[4] = a[4]; out[8] = a[8];
  out[1] = a[3]; out[3] = a1; out[2] = a[6]; out[6] = a2; out[5] = a[7]; out[7] = a5;
}

function apply(out: Float64Array, m: Float64Array, v: Float64Array): void {
  const x = v[0], y = v[1], z = v[2];
  out[0] = m[0] * x + m[1] * y + m[2] * z;
  out[1] = m[3] * x + m[4] * y + m[5] * z;
  out[2] = m[6] * x + m[7] * y + m[8] * z;
}

function dot(a: Float64Array, b: Float64Array): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/** Rotation angle of the rotation vector of m (radians, ≥ 0), with the vector in phi. */
function logAngle(m: Float64Array): number {
  const trace = m[0] + m[4] + m[8];
  const cosA = Math.min(1, Math.max(-1, (trace - 1) / 2));
  const sx = m[7] - m[5], sy = m[2] - m[6], sz = m[3] - m[1];
  const angle = Math.atan2(Math.hypot(sx, sy, sz) / 2, cosA);
  if (angle < Math.PI - 1e-3) {
    const s2 = Math.hypot(sx, sy, sz);
    const f = angle < 1e-6 ? 0.5 + (angle * angle) / 12 : angle / s2;
    phi[0] = sx * f; phi[1] = sy * f; phi[2] = sz * f;
    return angle;
  }
  // near π: the axis from the symmetric part, its sign from the skew part (as solver/math/rotation.ts)
  const t = 1 - cosA;
  let ax = Math.sqrt(Math.max(0, (m[0] - cosA) / t));
  let ay = Math.sqrt(Math.max(0, (m[4] - cosA) / t));
  let az = Math.sqrt(Math.max(0, (m[8] - cosA) / t));
  if (ax >= ay && ax >= az) {
    ay = Math.sign(m[1] + m[3] || 1) * ay; az = Math.sign(m[2] + m[6] || 1) * az;
    if (sx < 0) { ax = -ax; ay = -ay; az = -az; }
  } else if (ay >= az) {
    ax = Math.sign(m[1] + m[3] || 1) * ax; az = Math.sign(m[5] + m[7] || 1) * az;
    if (sy < 0) { ax = -ax; ay = -ay; az = -az; }
  } else {
    ax = Math.sign(m[2] + m[6] || 1) * ax; ay = Math.sign(m[5] + m[7] || 1) * ay;
    if (sz < 0) { ax = -ax; ay = -ay; az = -az; }
  }
  const n = Math.hypot(ax, ay, az) || 1;
  phi[0] = (ax / n) * angle; phi[1] = (ay / n) * angle; phi[2] = (az / n) * angle;
  return angle;
}

function wrap(a: number): number {
  let r = a % TWO_PI;
  if (r > Math.PI) r -= TWO_PI;
  else if (r <= -Math.PI) r += TWO_PI;
  return r;
}

/** Signed angle about the unit axis e taking p to q (both projected off e); NaN when either lies on the axis. */
function angleAbout(e: Float64Array, p: Float64Array, q: Float64Array): number {
  const ep = dot(e, p), eq = dot(e, q);
  const px = p[0] - ep * e[0], py = p[1] - ep * e[1], pz = p[2] - ep * e[2];
  const qx = q[0] - eq * e[0], qy = q[1] - eq * e[1], qz = q[2] - eq * e[2];
  if (Math.hypot(px, py, pz) < 1e-12 || Math.hypot(qx, qy, qz) < 1e-12) return NaN;
  const cx = py * qz - pz * qy, cy = pz * qx - px * qz, cz = px * qy - py * qx;
  return Math.atan2(e[0] * cx + e[1] * cy + e[2] * cz, px * qx + py * qy + pz * qz);
}

/** The angle z with R(e, z) = m for a rotation m about the unit axis e (any vector off the axis is carried). */
function angleOfRotationAbout(e: Float64Array, m: Float64Array): number {
  // a vector perpendicular to e
  const ax = Math.abs(e[0]), ay = Math.abs(e[1]), az = Math.abs(e[2]);
  if (ax <= ay && ax <= az) { vQ[0] = 0; vQ[1] = -e[2]; vQ[2] = e[1]; }
  else if (ay <= az) { vQ[0] = e[2]; vQ[1] = 0; vQ[2] = -e[0]; }
  else { vQ[0] = -e[1]; vQ[1] = e[0]; vQ[2] = 0; }
  const n = Math.hypot(vQ[0], vQ[1], vQ[2]);
  vQ[0] /= n; vQ[1] /= n; vQ[2] /= n;
  const x = vQ[0], y = vQ[1], z = vQ[2];
  const mx = m[0] * x + m[1] * y + m[2] * z, my = m[3] * x + m[4] * y + m[5] * z, mz = m[6] * x + m[7] * y + m[8] * z;
  const cx = y * mz - z * my, cy = z * mx - x * mz, cz = x * my - y * mx;
  return Math.atan2(e[0] * cx + e[1] * cy + e[2] * cz, x * mx + y * my + z * mz);
}

/** Product of the known rotations of slots from (inclusive) to `to` (exclusive), cyclic, into out. */
function knownProduct(out: Float64Array, ux: ArrayLike<number>, uy: ArrayLike<number>, n: number, angles: ArrayLike<number>, from: number, to: number): void {
  out.fill(0); out[0] = 1; out[4] = 1; out[8] = 1;
  for (let k = from % n; k !== to % n; k = (k + 1) % n) {
    planeRotation(P, ux[k], uy[k], angles[k]);
    mul(N, out, P);
    out.set(N);
  }
}

/** Closure residual norm of a full state of the vertex (radians), with the folded directions into w (3·n) when given. */
export function vertexResidual(ux: ArrayLike<number>, uy: ArrayLike<number>, n: number, state: ArrayLike<number>, o = 0, w?: Float64Array): number {
  M.fill(0); M[0] = 1; M[4] = 1; M[8] = 1;
  for (let k = 0; k < n; k++) {
    if (w) {
      w[3 * k] = M[0] * ux[k] + M[1] * uy[k];
      w[3 * k + 1] = M[3] * ux[k] + M[4] * uy[k];
      w[3 * k + 2] = M[6] * ux[k] + M[7] * uy[k];
    }
    planeRotation(P, ux[k], uy[k], state[o + k]);
    mul(N, M, P);
    M.set(N);
  }
  return logAngle(M);
}

const wScratch = new Float64Array(3 * 64);

/**
 * Transversality of the unknown slots at a closed state: the smallest singular value of their folded directions
 * (unit columns) for one or two unknowns, |det| for three. 0 when they are dependent: the state is then not
 * fixed to first order by this vertex.
 */
function transversality(w: Float64Array, slots: number[]): number {
  if (slots.length === 0) return Infinity;
  if (slots.length === 1) return 1;
  const i = 3 * slots[0], j = 3 * slots[1];
  if (slots.length === 2) {
    const c = w[i] * w[j] + w[i + 1] * w[j + 1] + w[i + 2] * w[j + 2];
    return Math.sqrt(Math.max(0, 1 - Math.abs(c)));
  }
  const k = 3 * slots[2];
  return Math.abs(
    w[i] * (w[j + 1] * w[k + 2] - w[j + 2] * w[k + 1]) -
      w[j] * (w[i + 1] * w[k + 2] - w[i + 2] * w[k + 1]) +
      w[k] * (w[i + 1] * w[j + 2] - w[i + 2] * w[j + 1]),
  );
}

/**
 * One or two Gauss–Newton steps on the unknown slots of a state (cleans the closed form's rounding); returns
 * the residual, with the folded directions of the state returned left in w.
 */
function polish(ux: ArrayLike<number>, uy: ArrayLike<number>, n: number, state: Float64Array, o: number, slots: number[], w: Float64Array): number {
  let r = vertexResidual(ux, uy, n, state, o, w);
  for (let it = 0; it < 3 && r > 1e-15 && r < 1e-3; it++) {
    // residual φ ≈ Σ w_k δ_k near closure: least squares over the unknown slots
    const m = slots.length;
    const g = [0, 0, 0], G = [0, 0, 0, 0, 0, 0, 0, 0, 0];
    const p0 = phi[0], p1 = phi[1], p2 = phi[2];
    for (let a = 0; a < m; a++) {
      const pa = 3 * slots[a];
      g[a] = -(w[pa] * p0 + w[pa + 1] * p1 + w[pa + 2] * p2);
      for (let b = 0; b < m; b++) {
        const pb = 3 * slots[b];
        G[3 * a + b] = w[pa] * w[pb] + w[pa + 1] * w[pb + 1] + w[pa + 2] * w[pb + 2];
      }
    }
    const x = solveSmallSym(G, g, m);
    if (!x) break;
    const before = Float64Array.from(slots, (s) => state[o + s]);
    for (let a = 0; a < m; a++) state[o + slots[a]] += x[a];
    const r2 = vertexResidual(ux, uy, n, state, o, w);
    if (!(r2 < r)) { slots.forEach((s, a) => (state[o + s] = before[a])); vertexResidual(ux, uy, n, state, o, w); break; }
    r = r2;
  }
  // wrapping by whole turns leaves every rotation, the residual and the folded directions as they are
  for (const s of slots) state[o + s] = wrap(state[o + s]);
  return r;
}

function solveSmallSym(G: number[], g: number[], m: number): number[] | undefined {
  if (m === 1) return G[0] > 1e-300 ? [g[0] / G[0]] : undefined;
  if (m === 2) {
    const det = G[0] * G[4] - G[1] * G[3];
    if (Math.abs(det) < 1e-300) return undefined;
    return [(g[0] * G[4] - G[1] * g[1]) / det, (G[0] * g[1] - G[3] * g[0]) / det];
  }
  const [a, b, c, d, e, f, h, i, j] = G;
  const A = e * j - f * i, B = -(d * j - f * h), C = d * i - e * h;
  const det = a * A + b * B + c * C;
  if (Math.abs(det) < 1e-300) return undefined;
  return [
    (A * g[0] + (c * i - b * j) * g[1] + (b * f - c * e) * g[2]) / det,
    (B * g[0] + (a * j - c * h) * g[1] + (c * d - a * f) * g[2]) / det,
    (C * g[0] + (b * h - a * i) * g[1] + (a * e - b * d) * g[2]) / det,
  ];
}

/**
 * Closed states of a vertex whose creases run counter-clockwise along the in-plane unit directions
 * (ux[k], uy[k]), k < n, given the fold angles of the slots marked in `known` (angles[k], radians).
 * State s is written to out[s·n … s·n + n − 1] (known slots copied, unknown ones wrapped to (−π, π]), and its
 * transversality (see above) to pivot[s]. `tolerance` bounds how far known values may be from closing.
 */
export function closeVertex(
  ux: ArrayLike<number>,
  uy: ArrayLike<number>,
  n: number,
  known: ArrayLike<number | boolean>,
  angles: ArrayLike<number>,
  out: Float64Array,
  pivot: Float64Array,
  tolerance = VERTEX_TOLERANCE,
): VertexClosure {
  const unknown: number[] = [];
  for (let k = 0; k < n; k++) if (!known[k]) unknown.push(k);
  if (unknown.length > 3) return { kind: 'open', count: 0, dropped: 0 };
  const candidates: number[][] = [];
  let family = false;
  if (unknown.length === 0) {
    candidates.push([]);
  } else if (unknown.length === 1) {
    const i = unknown[0];
    // R(u_i, x)·K = I with K the known rotations after i (cyclic): R(u_i, x) = Kᵀ
    knownProduct(K1, ux, uy, n, angles, i + 1, i + n);
    transpose(T, K1);
    logAngle(T);
    const x = phi[0] * ux[i] + phi[1] * uy[i];
    candidates.push([x]);
  } else if (unknown.length === 2) {
    const r = twoUnknowns(ux, uy, n, angles, unknown[0], unknown[1], tolerance);
    if (r === 'family') family = true;
    else if (r) candidates.push(r);
  } else {
    const r = threeUnknowns(ux, uy, n, angles, unknown, tolerance);
    if (r === 'family') family = true;
    else candidates.push(...r);
  }
  if (family) return { kind: 'family', count: 0, dropped: 0 };
  let count = 0, dropped = 0;
  for (const values of candidates) {
    const o = count * n;
    for (let k = 0; k < n; k++) out[o + k] = angles[k];
    unknown.forEach((s, a) => (out[o + s] = wrap(values[a])));
    const w = n <= 64 ? wScratch : new Float64Array(3 * n);
    const res = unknown.length ? polish(ux, uy, n, out, o, unknown, w) : vertexResidual(ux, uy, n, out, o, w);
    // with fewer than three unknowns, known values that do not close are a conflict; a real root of the
    // three-unknown closed form always closes, so one that does not is numerical trouble (counted)
    if (res > tolerance) {
      if (unknown.length === 3) dropped++;
      continue;
    }
    // two roots that coincide (a double root) are one state
    let twin = false;
    for (let s = 0; s < count && !twin; s++) {
      let same = true;
      for (const k of unknown) if (Math.abs(wrap(out[s * n + k] - out[o + k])) > 1e-9) { same = false; break; }
      twin = same;
    }
    if (twin) continue;
    pivot[count] = transversality(w, unknown);
    count++;
  }
  return { kind: 'states', count, dropped };
}

/** R(u_i, x)·K1·R(u_j, y)·K2 = I: the state (x, y), undefined when there is none, 'family' when a ∥ b. */
function twoUnknowns(ux: ArrayLike<number>, uy: ArrayLike<number>, n: number, angles: ArrayLike<number>, i: number, j: number, tol: number): number[] | undefined | 'family' {
  // both orders; take the one whose axes are further from parallel
  let best: { first: number; second: number; sin: number } | undefined;
  for (const [first, second] of [[i, j], [j, i]]) {
    knownProduct(K1, ux, uy, n, angles, first + 1, second);
    vB[0] = K1[0] * ux[second] + K1[1] * uy[second]; vB[1] = K1[3] * ux[second] + K1[4] * uy[second]; vB[2] = K1[6] * ux[second] + K1[7] * uy[second];
    const cx = uy[first] * vB[2], cy = -ux[first] * vB[2], cz = ux[first] * vB[1] - uy[first] * vB[0];
    const s = Math.hypot(cx, cy, cz);
    if (!best || s > best.sin) best = { first, second, sin: s };
  }
  const { first, second } = best!;
  knownProduct(K1, ux, uy, n, angles, first + 1, second);
  knownProduct(K2, ux, uy, n, angles, second + 1, first + n);
  mul(N, K1, K2);
  transpose(T, N); // R(a, x)·R(b, y) = T
  vA[0] = ux[first]; vA[1] = uy[first]; vA[2] = 0;
  vB[0] = K1[0] * ux[second] + K1[1] * uy[second]; vB[1] = K1[3] * ux[second] + K1[4] * uy[second]; vB[2] = K1[6] * ux[second] + K1[7] * uy[second];
  if (best!.sin < 1e-9) {
    // R(a, x)·R(±a, y) = R(a, x ± y): only x ± y is fixed, when T is a rotation about a
    const ang = logAngle(T);
    const along = phi[0] * vA[0] + phi[1] * vA[1] + phi[2] * vA[2];
    return Math.abs(Math.abs(along) - ang) < tol ? 'family' : undefined;
  }
  apply(vW, T, vB);
  if (Math.abs(dot(vA, vB) - dot(vA, vW)) > tol) return undefined;
  const x = angleAbout(vA, vB, vW);
  if (Number.isNaN(x)) return undefined;
  rotation(M, vA, -x);
  mul(N, M, T); // = R(b, y)
  const y = angleOfRotationAbout(vB, N);
  return first === i ? [x, y] : [y, x];
}

/** The spherical RRR closure: up to two states (values in the order of `slots`), or 'family'. */
function threeUnknowns(ux: ArrayLike<number>, uy: ArrayLike<number>, n: number, angles: ArrayLike<number>, slots: number[], _tol: number): number[][] | 'family' {
  // cyclic orders (s, t, r) of the three unknowns; take the one where b and c are furthest from parallel
  const [p, q, r] = slots;
  let bestOrder = [p, q, r], bestSin = -1;
  for (const order of [[p, q, r], [q, r, p], [r, p, q]]) {
    const [s, t, u] = order;
    knownProduct(K1, ux, uy, n, angles, s + 1, t);
    knownProduct(K2, ux, uy, n, angles, t + 1, u);
    mul(K3, K1, K2);
    const bx = K1[0] * ux[t] + K1[1] * uy[t], by = K1[3] * ux[t] + K1[4] * uy[t], bz = K1[6] * ux[t] + K1[7] * uy[t];
    const cx = K3[0] * ux[u] + K3[1] * uy[u], cy = K3[3] * ux[u] + K3[4] * uy[u], cz = K3[6] * ux[u] + K3[7] * uy[u];
    const sn = Math.hypot(by * cz - bz * cy, bz * cx - bx * cz, bx * cy - by * cx);
    if (sn > bestSin) { bestSin = sn; bestOrder = order; }
  }
  const [s, t, u] = bestOrder;
  knownProduct(K1, ux, uy, n, angles, s + 1, t);
  knownProduct(K2, ux, uy, n, angles, t + 1, u);
  knownProduct(K3, ux, uy, n, angles, u + 1, s + n);
  // b = K1 u_t, c = K1 K2 u_u, T = (K1 K2 K3)ᵀ
  vA[0] = ux[s]; vA[1] = uy[s]; vA[2] = 0;
  vB[0] = K1[0] * ux[t] + K1[1] * uy[t]; vB[1] = K1[3] * ux[t] + K1[4] * uy[t]; vB[2] = K1[6] * ux[t] + K1[7] * uy[t];
  mul(M, K1, K2);
  vC[0] = M[0] * ux[u] + M[1] * uy[u]; vC[1] = M[3] * ux[u] + M[4] * uy[u]; vC[2] = M[6] * ux[u] + M[7] * uy[u];
  mul(N, M, K3);
  transpose(T, N);
  apply(vW, T, vC);
  // b·c = b·R(a, −x)·w, R(a, −x)w = w cos x − (a × w) sin x + a (a·w)(1 − cos x)
  const ab = dot(vA, vB), aw = dot(vA, vW), bw = dot(vB, vW), bc = dot(vB, vC);
  const axw0 = vA[1] * vW[2] - vA[2] * vW[1], axw1 = vA[2] * vW[0] - vA[0] * vW[2], axw2 = vA[0] * vW[1] - vA[1] * vW[0];
  const A = bw - ab * aw;
  const B = -(vB[0] * axw0 + vB[1] * axw1 + vB[2] * axw2);
  const C = bc - ab * aw;
  const R = Math.hypot(A, B);
  if (R < 1e-12) return Math.abs(C) < 1e-9 ? 'family' : [];
  let cd = C / R;
  if (cd > 1 + 1e-9 || cd < -1 - 1e-9) return [];
  cd = Math.max(-1, Math.min(1, cd));
  const phase = Math.atan2(B, A);
  const delta = Math.acos(cd);
  const xs = delta < 1e-12 || delta > Math.PI - 1e-12 ? [phase + delta] : [phase + delta, phase - delta];
  if (bestSin < 1e-12) return 'family';
  const outStates: number[][] = [];
  for (const x of xs) {
    rotation(M, vA, -x);
    apply(vQ, M, vW);
    const q = Float64Array.from(vQ);
    const y = angleAbout(vB, vC, q);
    if (Number.isNaN(y)) continue;
    rotation(P, vB, -y);
    mul(N, P, M);
    mul(K1, N, T); // = R(c, z)
    const z = angleOfRotationAbout(vC, K1);
    const values = [0, 0, 0];
    values[slots.indexOf(s)] = x;
    values[slots.indexOf(t)] = y;
    values[slots.indexOf(u)] = z;
    outStates.push(values);
  }
  return outStates;
}
