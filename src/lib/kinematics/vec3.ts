/**
 * Three-vectors on plain arrays or Float64Array views. Every function that produces a vector
 * takes an optional trailing `out` so hot loops can reuse storage; `out` may alias an input.
 */

/** Anything indexable as three numbers. */
export type Vec3Like = ArrayLike<number>;

/** A writable three-vector. */
export type Vec3 = number[] | Float64Array;

/** Default absolute and relative tolerance of `equals`. */
export const EPSILON = 1e-12;

/** New vector (x, y, z) as a plain array (any unit). */
export function vec3(x = 0, y = 0, z = 0): number[] {
  return [x, y, z];
}

/** Sets out to (x, y, z) (any unit). */
export function set<T extends Vec3>(x: number, y: number, z: number, out: T): T {
  out[0] = x;
  out[1] = y;
  out[2] = z;
  return out;
}

/** Copy of a (any unit). */
export function copy<T extends Vec3 = number[]>(a: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  o[0] = a[0];
  o[1] = a[1];
  o[2] = a[2];
  return o;
}

/** a + b (same unit as the inputs). */
export function add<T extends Vec3 = number[]>(a: Vec3Like, b: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  o[0] = a[0] + b[0];
  o[1] = a[1] + b[1];
  o[2] = a[2] + b[2];
  return o;
}

/** a - b (same unit as the inputs). */
export function sub<T extends Vec3 = number[]>(a: Vec3Like, b: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  o[0] = a[0] - b[0];
  o[1] = a[1] - b[1];
  o[2] = a[2] - b[2];
  return o;
}

/** s a (unit of a times unit of s). */
export function scale<T extends Vec3 = number[]>(a: Vec3Like, s: number, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  o[0] = a[0] * s;
  o[1] = a[1] * s;
  o[2] = a[2] * s;
  return o;
}

/** a + s b (unit of a). */
export function scaleAndAdd<T extends Vec3 = number[]>(a: Vec3Like, b: Vec3Like, s: number, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  o[0] = a[0] + b[0] * s;
  o[1] = a[1] + b[1] * s;
  o[2] = a[2] + b[2] * s;
  return o;
}

/** -a (unit of a). */
export function negate<T extends Vec3 = number[]>(a: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  o[0] = -a[0];
  o[1] = -a[1];
  o[2] = -a[2];
  return o;
}

/** (1 - t) a + t b for t in [0, 1] (unit of the inputs). */
export function lerp<T extends Vec3 = number[]>(a: Vec3Like, b: Vec3Like, t: number, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  o[0] = a[0] + (b[0] - a[0]) * t;
  o[1] = a[1] + (b[1] - a[1]) * t;
  o[2] = a[2] + (b[2] - a[2]) * t;
  return o;
}

/** Dot product a . b (product of the input units). */
export function dot(a: Vec3Like, b: Vec3Like): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

/** Cross product a x b, right-handed (product of the input units). */
export function cross<T extends Vec3 = number[]>(a: Vec3Like, b: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const ax = a[0], ay = a[1], az = a[2];
  const bx = b[0], by = b[1], bz = b[2];
  o[0] = ay * bz - az * by;
  o[1] = az * bx - ax * bz;
  o[2] = ax * by - ay * bx;
  return o;
}

/** Euclidean length |a| (unit of a). */
export function norm(a: Vec3Like): number {
  return Math.sqrt(a[0] * a[0] + a[1] * a[1] + a[2] * a[2]);
}

/** Squared length |a|^2 (unit of a, squared). */
export function normSquared(a: Vec3Like): number {
  return a[0] * a[0] + a[1] * a[1] + a[2] * a[2];
}

/** Unit vector along a (dimensionless); the zero vector stays zero. */
export function normalize<T extends Vec3 = number[]>(a: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const length = norm(a);
  const inverse = length > 0 ? 1 / length : 0;
  o[0] = a[0] * inverse;
  o[1] = a[1] * inverse;
  o[2] = a[2] * inverse;
  return o;
}

/** Distance |a - b| between two points (unit of the inputs). */
export function distance(a: Vec3Like, b: Vec3Like): number {
  const dx = a[0] - b[0], dy = a[1] - b[1], dz = a[2] - b[2];
  return Math.sqrt(dx * dx + dy * dy + dz * dz);
}

/** Squared distance |a - b|^2 (unit of the inputs, squared). */
export function distanceSquared(a: Vec3Like, b: Vec3Like): number {
  const dx = a[0] - b[0], dy = a[1] - b[1], dz = a[2] - b[2];
  return dx * dx + dy * dy + dz * dz;
}

/** Unit vector perpendicular to the nonzero vector a (dimensionless). */
export function perpendicular<T extends Vec3 = number[]>(a: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const ax = Math.abs(a[0]), ay = Math.abs(a[1]), az = Math.abs(a[2]);
  // Crossing with the axis least aligned with a keeps the result well conditioned.
  let x: number, y: number, z: number;
  if (ax <= ay && ax <= az) {
    x = 0; y = a[2]; z = -a[1];
  } else if (ay <= az) {
    x = -a[2]; y = 0; z = a[0];
  } else {
    x = a[1]; y = -a[0]; z = 0;
  }
  const inverse = 1 / Math.sqrt(x * x + y * y + z * z);
  o[0] = x * inverse;
  o[1] = y * inverse;
  o[2] = z * inverse;
  return o;
}

/** Component of a along the unit vector n, as a vector (unit of a). */
export function project<T extends Vec3 = number[]>(a: Vec3Like, n: Vec3Like, out?: T): T {
  return scale(n, dot(a, n), out);
}

/** Component of a perpendicular to the unit vector n (unit of a). */
export function reject<T extends Vec3 = number[]>(a: Vec3Like, n: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  const s = dot(a, n);
  o[0] = a[0] - n[0] * s;
  o[1] = a[1] - n[1] * s;
  o[2] = a[2] - n[2] * s;
  return o;
}

/** True when every component of a and b agrees within tolerance, absolute near zero and relative elsewhere. */
export function equals(a: Vec3Like, b: Vec3Like, tolerance = EPSILON): boolean {
  for (let i = 0; i < 3; i++) {
    const limit = tolerance * Math.max(1, Math.abs(a[i]), Math.abs(b[i]));
    if (!(Math.abs(a[i] - b[i]) <= limit)) return false;
  }
  return true;
}
