// 3 × 3 rotation kernels over Float64Array, row-major. Output arguments first, so hot loops allocate nothing.

export type Mat3 = Float64Array;
export type Vec3 = Float64Array;

export function mat3(): Mat3 {
  return new Float64Array(9);
}

export function vec3(x = 0, y = 0, z = 0): Vec3 {
  const v = new Float64Array(3);
  v[0] = x;
  v[1] = y;
  v[2] = z;
  return v;
}

export function setIdentity(out: Mat3): Mat3 {
  out.fill(0);
  out[0] = 1;
  out[4] = 1;
  out[8] = 1;
  return out;
}

/** Rotation by `angle` about the unit axis (x, y, z), right-hand rule (Rodrigues' formula). */
export function axisAngleRotation(out: Mat3, x: number, y: number, z: number, angle: number): Mat3 {
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  const t = 1 - c;
  out[0] = t * x * x + c;
  out[1] = t * x * y - s * z;
  out[2] = t * x * z + s * y;
  out[3] = t * x * y + s * z;
  out[4] = t * y * y + c;
  out[5] = t * y * z - s * x;
  out[6] = t * x * z - s * y;
  out[7] = t * y * z + s * x;
  out[8] = t * z * z + c;
  return out;
}

/** out = a · b (out may alias neither a nor b). */
export function multiplyMat3(out: Mat3, a: Mat3, b: Mat3): Mat3 {
  const a0 = a[0], a1 = a[1], a2 = a[2], a3 = a[3], a4 = a[4], a5 = a[5], a6 = a[6], a7 = a[7], a8 = a[8];
  const b0 = b[0], b1 = b[1], b2 = b[2], b3 = b[3], b4 = b[4], b5 = b[5], b6 = b[6], b7 = b[7], b8 = b[8];
  out[0] = a0 * b0 + a1 * b3 + a2 * b6;
  out[1] = a0 * b1 + a1 * b4 + a2 * b7;
  out[2] = a0 * b2 + a1 * b5 + a2 * b8;
  out[3] = a3 * b0 + a4 * b3 + a5 * b6;
  out[4] = a3 * b1 + a4 * b4 + a5 * b7;
  out[5] = a3 * b2 + a4 * b5 + a5 * b8;
  out[6] = a6 * b0 + a7 * b3 + a8 * b6;
  out[7] = a6 * b1 + a7 * b4 + a8 * b7;
  out[8] = a6 * b2 + a7 * b5 + a8 * b8;
  return out;
}

/** out = m · v */
export function transformVec3(out: Vec3, m: Mat3, x: number, y: number, z: number): Vec3 {
  out[0] = m[0] * x + m[1] * y + m[2] * z;
  out[1] = m[3] * x + m[4] * y + m[5] * z;
  out[2] = m[6] * x + m[7] * y + m[8] * z;
  return out;
}

/**
 * Rotation vector (log map) of a rotation matrix: axis × angle, angle in [0, π].
 * Accurate near 0 (series) and near π (from the symmetric part), where the skew part alone vanishes.
 */
export function rotationVector(out: Vec3, m: Mat3): Vec3 {
  const trace = m[0] + m[4] + m[8];
  const cosA = Math.min(1, Math.max(-1, (trace - 1) / 2));
  const sx = m[7] - m[5];
  const sy = m[2] - m[6];
  const sz = m[3] - m[1];
  const sinA2 = Math.hypot(sx, sy, sz); // = 2 sin(angle)
  const angle = Math.atan2(sinA2 / 2, cosA);
  if (angle < 1e-6) {
    // angle / (2 sin angle) ≈ 1/2 + angle²/12
    const f = 0.5 + (angle * angle) / 12;
    out[0] = sx * f;
    out[1] = sy * f;
    out[2] = sz * f;
    return out;
  }
  if (angle < Math.PI - 1e-3) {
    const f = angle / sinA2;
    out[0] = sx * f;
    out[1] = sy * f;
    out[2] = sz * f;
    return out;
  }
  // Near π: axis from the diagonal of (m + mᵀ)/2 = cos·I + (1 − cos)·a aᵀ, sign from the skew part.
  const t = 1 - cosA;
  let ax = Math.sqrt(Math.max(0, (m[0] - cosA) / t));
  let ay = Math.sqrt(Math.max(0, (m[4] - cosA) / t));
  let az = Math.sqrt(Math.max(0, (m[8] - cosA) / t));
  // fix relative signs from the off-diagonal symmetric terms, using the largest component as reference
  if (ax >= ay && ax >= az) {
    ay = Math.sign(m[1] + m[3] || 1) * ay;
    az = Math.sign(m[2] + m[6] || 1) * az;
    if (sx < 0) { ax = -ax; ay = -ay; az = -az; }
  } else if (ay >= az) {
    ax = Math.sign(m[1] + m[3] || 1) * ax;
    az = Math.sign(m[5] + m[7] || 1) * az;
    if (sy < 0) { ax = -ax; ay = -ay; az = -az; }
  } else {
    ax = Math.sign(m[2] + m[6] || 1) * ax;
    ay = Math.sign(m[5] + m[7] || 1) * ay;
    if (sz < 0) { ax = -ax; ay = -ay; az = -az; }
  }
  const n = Math.hypot(ax, ay, az) || 1;
  out[0] = (ax / n) * angle;
  out[1] = (ay / n) * angle;
  out[2] = (az / n) * angle;
  return out;
}

/**
 * Inverse of the left Jacobian of SO(3) at rotation vector φ: log(exp(δ)·exp(φ)) ≈ φ + J⁻¹(φ)·δ.
 * J⁻¹ = I − ½[φ]× + (1/θ² − (1 + cos θ)/(2θ sin θ))[φ]×².
 */
export function inverseLeftJacobian(out: Mat3, phi: Vec3): Mat3 {
  const x = phi[0], y = phi[1], z = phi[2];
  const th2 = x * x + y * y + z * z;
  const th = Math.sqrt(th2);
  // coefficient of [φ]×²; series for small θ: 1/12 + θ²/720
  const k = th < 1e-4 ? 1 / 12 + th2 / 720 : 1 / th2 - (1 + Math.cos(th)) / (2 * th * Math.sin(th));
  // [φ]×² = φφᵀ − θ² I
  out[0] = 1 + k * (x * x - th2);
  out[1] = 0.5 * z + k * x * y;
  out[2] = -0.5 * y + k * x * z;
  out[3] = -0.5 * z + k * x * y;
  out[4] = 1 + k * (y * y - th2);
  out[5] = 0.5 * x + k * y * z;
  out[6] = 0.5 * y + k * x * z;
  out[7] = -0.5 * x + k * y * z;
  out[8] = 1 + k * (z * z - th2);
  return out;
}

/** Wrap an angle to [−π, π]; ±π are kept as they are (a crease folded flat one way or the other). */
export function wrapAngle(a: number): number {
  if (a >= -Math.PI && a <= Math.PI) return a;
  // a hair past ±π is the same side of folded flat, not the other side
  if (a > Math.PI && a < Math.PI + 1e-9) return Math.PI;
  if (a < -Math.PI && a > -Math.PI - 1e-9) return -Math.PI;
  let r = a % (2 * Math.PI);
  if (r < -Math.PI) r += 2 * Math.PI;
  else if (r > Math.PI) r -= 2 * Math.PI;
  return r;
}

export const DEG = Math.PI / 180;
