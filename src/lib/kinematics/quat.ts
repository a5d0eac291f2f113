/**
 * Rotation quaternions stored [x, y, z, w] (vector part first, as gl-matrix does); sheet
 * documents write them {w, x, y, z}. Rotations are active: rotate(q, v) turns v by q.
 */
import type { QuaternionInput } from '../sheet/types';
import type { Vec3, Vec3Like } from './vec3';

/** Anything indexable as four numbers [x, y, z, w]. */
export type QuatLike = ArrayLike<number>;

/** A writable quaternion [x, y, z, w]. */
export type Quat = number[] | Float64Array;

/** A writable 3x3 matrix, row-major, nine entries. */
export type Mat3 = number[] | Float64Array;

/** Identity rotation [0, 0, 0, 1] (dimensionless). */
export function identity<T extends Quat = number[]>(out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  o[0] = 0;
  o[1] = 0;
  o[2] = 0;
  o[3] = 1;
  return o;
}

/** Copy of q (dimensionless). */
export function copy<T extends Quat = number[]>(q: QuatLike, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  o[0] = q[0];
  o[1] = q[1];
  o[2] = q[2];
  o[3] = q[3];
  return o;
}

/** Hamilton product a b: the rotation b followed by a (dimensionless). */
export function multiply<T extends Quat = number[]>(a: QuatLike, b: QuatLike, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  const ax = a[0], ay = a[1], az = a[2], aw = a[3];
  const bx = b[0], by = b[1], bz = b[2], bw = b[3];
  o[0] = aw * bx + ax * bw + ay * bz - az * by;
  o[1] = aw * by - ax * bz + ay * bw + az * bx;
  o[2] = aw * bz + ax * by - ay * bx + az * bw;
  o[3] = aw * bw - ax * bx - ay * by - az * bz;
  return o;
}

/** Conjugate of q, the inverse rotation for a unit quaternion (dimensionless). */
export function conjugate<T extends Quat = number[]>(q: QuatLike, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  o[0] = -q[0];
  o[1] = -q[1];
  o[2] = -q[2];
  o[3] = q[3];
  return o;
}

/** Length of q as a four-vector (dimensionless). */
export function length(q: QuatLike): number {
  return Math.sqrt(q[0] * q[0] + q[1] * q[1] + q[2] * q[2] + q[3] * q[3]);
}

/** Unit quaternion along q; the zero quaternion becomes the identity (dimensionless). */
export function normalize<T extends Quat = number[]>(q: QuatLike, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  const l = length(q);
  if (l === 0) return identity(o);
  const inverse = 1 / l;
  o[0] = q[0] * inverse;
  o[1] = q[1] * inverse;
  o[2] = q[2] * inverse;
  o[3] = q[3] * inverse;
  return o;
}

/** Rotation by angle (rad) about the unit axis (any frame). */
export function fromAxisAngle<T extends Quat = number[]>(axis: Vec3Like, angle: number, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  const half = 0.5 * angle;
  const s = Math.sin(half);
  o[0] = axis[0] * s;
  o[1] = axis[1] * s;
  o[2] = axis[2] * s;
  o[3] = Math.cos(half);
  return o;
}

/** Angle of the unit quaternion q in [0, pi] (rad), writing its unit axis into axisOut (x axis for the identity). */
export function toAxisAngle(q: QuatLike, axisOut: Vec3): number {
  const x = q[0], y = q[1], z = q[2], w = q[3];
  const s = Math.sqrt(x * x + y * y + z * z);
  if (s === 0) {
    axisOut[0] = 1;
    axisOut[1] = 0;
    axisOut[2] = 0;
    return 0;
  }
  // q and -q are one rotation; taking the w >= 0 representative keeps the angle in [0, pi].
  const sign = w < 0 ? -1 : 1;
  const inverse = sign / s;
  axisOut[0] = x * inverse;
  axisOut[1] = y * inverse;
  axisOut[2] = z * inverse;
  return 2 * Math.atan2(s, sign * w);
}

/** v turned by the unit quaternion q (unit and frame of v). */
export function rotate<T extends Vec3 = number[]>(q: QuatLike, v: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const qx = q[0], qy = q[1], qz = q[2], qw = q[3];
  const vx = v[0], vy = v[1], vz = v[2];
  // v' = v + 2 w (u x v) + 2 u x (u x v), with t = 2 (u x v).
  const tx = 2 * (qy * vz - qz * vy);
  const ty = 2 * (qz * vx - qx * vz);
  const tz = 2 * (qx * vy - qy * vx);
  o[0] = vx + qw * tx + (qy * tz - qz * ty);
  o[1] = vy + qw * ty + (qz * tx - qx * tz);
  o[2] = vz + qw * tz + (qx * ty - qy * tx);
  return o;
}

/** v turned by the inverse of the unit quaternion q (unit of v; world to body frame when q is the body's orientation). */
export function rotateInverse<T extends Vec3 = number[]>(q: QuatLike, v: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const qx = -q[0], qy = -q[1], qz = -q[2], qw = q[3];
  const vx = v[0], vy = v[1], vz = v[2];
  const tx = 2 * (qy * vz - qz * vy);
  const ty = 2 * (qz * vx - qx * vz);
  const tz = 2 * (qx * vy - qy * vx);
  o[0] = vx + qw * tx + (qy * tz - qz * ty);
  o[1] = vy + qw * ty + (qz * tx - qx * tz);
  o[2] = vz + qw * tz + (qx * ty - qy * tx);
  return o;
}

/** Rotation matrix of the unit quaternion q, row-major nine entries (dimensionless). */
export function toMatrix3<T extends Mat3 = number[]>(q: QuatLike, out?: T): T {
  const o = out ?? ([0, 0, 0, 0, 0, 0, 0, 0, 0] as T);
  const x = q[0], y = q[1], z = q[2], w = q[3];
  const x2 = x + x, y2 = y + y, z2 = z + z;
  const xx = x * x2, yy = y * y2, zz = z * z2;
  const xy = x * y2, xz = x * z2, yz = y * z2;
  const wx = w * x2, wy = w * y2, wz = w * z2;
  o[0] = 1 - yy - zz;
  o[1] = xy - wz;
  o[2] = xz + wy;
  o[3] = xy + wz;
  o[4] = 1 - xx - zz;
  o[5] = yz - wx;
  o[6] = xz - wy;
  o[7] = yz + wx;
  o[8] = 1 - xx - yy;
  return o;
}

/** Unit quaternion of the rotation matrix m, row-major nine entries, with w >= 0 (dimensionless). */
export function fromMatrix3<T extends Quat = number[]>(m: ArrayLike<number>, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  const m00 = m[0], m01 = m[1], m02 = m[2];
  const m10 = m[3], m11 = m[4], m12 = m[5];
  const m20 = m[6], m21 = m[7], m22 = m[8];
  const trace = m00 + m11 + m22;
  let x: number, y: number, z: number, w: number;
  // Shepperd's choice: divide by the largest of the four candidate diagonals for accuracy.
  if (trace > 0) {
    const s = 2 * Math.sqrt(trace + 1);
    w = 0.25 * s;
    x = (m21 - m12) / s;
    y = (m02 - m20) / s;
    z = (m10 - m01) / s;
  } else if (m00 > m11 && m00 > m22) {
    const s = 2 * Math.sqrt(1 + m00 - m11 - m22);
    w = (m21 - m12) / s;
    x = 0.25 * s;
    y = (m01 + m10) / s;
    z = (m02 + m20) / s;
  } else if (m11 > m22) {
    const s = 2 * Math.sqrt(1 + m11 - m00 - m22);
    w = (m02 - m20) / s;
    x = (m01 + m10) / s;
    y = 0.25 * s;
    z = (m12 + m21) / s;
  } else {
    const s = 2 * Math.sqrt(1 + m22 - m00 - m11);
    w = (m10 - m01) / s;
    x = (m02 + m20) / s;
    y = (m12 + m21) / s;
    z = 0.25 * s;
  }
  const sign = w < 0 ? -1 : 1;
  const inverse = sign / Math.sqrt(x * x + y * y + z * z + w * w);
  o[0] = x * inverse;
  o[1] = y * inverse;
  o[2] = z * inverse;
  o[3] = w * inverse;
  return o;
}

/** Spherical linear interpolation from a (t = 0) to b (t = 1) along the shorter arc (dimensionless). */
export function slerp<T extends Quat = number[]>(a: QuatLike, b: QuatLike, t: number, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  let bx = b[0], by = b[1], bz = b[2], bw = b[3];
  let cosine = a[0] * bx + a[1] * by + a[2] * bz + a[3] * bw;
  if (cosine < 0) {
    cosine = -cosine;
    bx = -bx; by = -by; bz = -bz; bw = -bw;
  }
  let wa: number, wb: number;
  // Near-equal rotations: sin(omega) vanishes, and linear interpolation is exact to second order.
  if (cosine > 1 - 1e-9) {
    wa = 1 - t;
    wb = t;
  } else {
    const omega = Math.acos(cosine);
    const inverseSine = 1 / Math.sin(omega);
    wa = Math.sin((1 - t) * omega) * inverseSine;
    wb = Math.sin(t * omega) * inverseSine;
  }
  o[0] = wa * a[0] + wb * bx;
  o[1] = wa * a[1] + wb * by;
  o[2] = wa * a[2] + wb * bz;
  o[3] = wa * a[3] + wb * bw;
  return normalize(o, o);
}

/** Internal [x, y, z, w] quaternion of a sheet's {w, x, y, z} orientation, normalised (dimensionless). */
export function fromSheet<T extends Quat = number[]>(q: QuaternionInput, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  o[0] = q.x;
  o[1] = q.y;
  o[2] = q.z;
  o[3] = q.w;
  return normalize(o, o);
}

/** Sheet form {w, x, y, z} of the internal quaternion q (dimensionless). */
export function toSheet(q: QuatLike): QuaternionInput {
  return { w: q[3], x: q[0], y: q[1], z: q[2] };
}

/** True when a and b are the same rotation within tolerance per component (q and -q count as equal). */
export function equals(a: QuatLike, b: QuatLike, tolerance = 1e-12): boolean {
  const sign = a[0] * b[0] + a[1] * b[1] + a[2] * b[2] + a[3] * b[3] < 0 ? -1 : 1;
  for (let i = 0; i < 4; i++) {
    if (!(Math.abs(a[i] - sign * b[i]) <= tolerance)) return false;
  }
  return true;
}
