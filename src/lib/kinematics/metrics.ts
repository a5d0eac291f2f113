/**
 * Distances between two rotations given as unit quaternions [x, y, z, w], numbered as in
 * D. Q. Huynh, "Metrics for 3D Rotations: Comparison and Analysis", J. Math. Imaging Vis. 35 (2009).
 * Phi1 (Euclidean distance between Euler-angle triples) is left out: its value depends on the
 * Euler convention chosen and on how angle wrap-around is handled, so one number would mislead.
 * All of them assume unit quaternions; the relative angle theta below is that of R1 R2^T.
 */
import type { QuatLike } from './quat';

/** One row of the metric table, in the order rotationDistances writes them. */
export interface RotationMetric {
  readonly key: 'phi2' | 'phi3' | 'phi4' | 'phi5' | 'phi6';
  readonly name: string;
  readonly formula: string;
  readonly unit: 'rad' | '1';
  readonly max: number;
}

export const ROTATION_METRICS: readonly RotationMetric[] = [
  { key: 'phi2', name: 'Quaternion difference norm', formula: 'min(|q1 - q2|, |q1 + q2|)', unit: '1', max: Math.SQRT2 },
  { key: 'phi3', name: 'Inner-product angle', formula: 'arccos |q1 . q2|', unit: 'rad', max: Math.PI / 2 },
  { key: 'phi4', name: 'Inner-product distance', formula: '1 - |q1 . q2|', unit: '1', max: 1 },
  { key: 'phi5', name: 'Rotation-matrix deviation', formula: '||I - R1 R2^T||_F', unit: '1', max: 2 * Math.SQRT2 },
  { key: 'phi6', name: 'Geodesic angle', formula: '||log(R1 R2^T)||', unit: 'rad', max: Math.PI },
];

function absDot(a: QuatLike, b: QuatLike): number {
  return Math.abs(a[0] * b[0] + a[1] * b[1] + a[2] * b[2] + a[3] * b[3]);
}

/** |vector part| of a conj(b): sin(theta/2) of the relative rotation, computed without cancellation. */
function halfAngleSine(a: QuatLike, b: QuatLike): number {
  const ax = a[0], ay = a[1], az = a[2], aw = a[3];
  const bx = b[0], by = b[1], bz = b[2], bw = b[3];
  const x = bw * ax - aw * bx - (ay * bz - az * by);
  const y = bw * ay - aw * by - (az * bx - ax * bz);
  const z = bw * az - aw * bz - (ax * by - ay * bx);
  return Math.sqrt(x * x + y * y + z * z);
}

/** Huynh Phi2 = min(|q1 - q2|, |q1 + q2|), in [0, sqrt 2] (dimensionless). */
export function quaternionDifferenceNorm(q1: QuatLike, q2: QuatLike): number {
  let minus = 0;
  let plus = 0;
  // d * d rather than d ** 2: the same value (pow returns x * x for exponent 2) without a call to pow on every run tick.
  for (let i = 0; i < 4; i++) {
    const difference = q1[i] - q2[i], sum = q1[i] + q2[i];
    minus += difference * difference;
    plus += sum * sum;
  }
  return Math.sqrt(Math.min(minus, plus));
}

/** Huynh Phi3 = arccos|q1 . q2| in [0, pi/2] (rad), as atan2(sin, cos) of the half angle so small values stay accurate. */
export function quaternionInnerProductAngle(q1: QuatLike, q2: QuatLike): number {
  return Math.atan2(halfAngleSine(q1, q2), absDot(q1, q2));
}

/** Huynh Phi4 = 1 - |q1 . q2|, in [0, 1] (dimensionless; not a metric, the triangle inequality fails). */
export function quaternionInnerProductDistance(q1: QuatLike, q2: QuatLike): number {
  return Math.max(0, 1 - absDot(q1, q2));
}

/** Huynh Phi5 = ||I - R1 R2^T||_F = 2 sqrt2 sin(theta/2) for relative angle theta, in [0, 2 sqrt 2] (dimensionless). */
export function rotationMatrixDeviation(q1: QuatLike, q2: QuatLike): number {
  return 2 * Math.SQRT2 * halfAngleSine(q1, q2);
}

/** Huynh Phi6 = ||log(R1 R2^T)||, the angle of the relative rotation, in [0, pi] (rad). */
export function geodesicAngle(q1: QuatLike, q2: QuatLike): number {
  return 2 * Math.atan2(halfAngleSine(q1, q2), absDot(q1, q2));
}

/** All of Phi2..Phi6 into out[0..5) in ROTATION_METRICS order (units as listed there). */
export function rotationDistances<T extends Float64Array | number[]>(q1: QuatLike, q2: QuatLike, out: T): T {
  const sine = halfAngleSine(q1, q2);
  const cosine = absDot(q1, q2);
  const half = Math.atan2(sine, cosine);
  out[0] = quaternionDifferenceNorm(q1, q2);
  out[1] = half;
  out[2] = Math.max(0, 1 - cosine);
  out[3] = 2 * Math.SQRT2 * sine;
  out[4] = 2 * half;
  return out;
}
