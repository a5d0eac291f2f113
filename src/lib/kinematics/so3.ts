/**
 * Exponential and logarithm maps between rotation vectors and unit quaternions, pose errors as
 * twists, and pose integration (Lynch & Park, "Modern Robotics", Sec. 3.2.3; Murray, Li & Sastry,
 * "A Mathematical Introduction to Robotic Manipulation", Sec. 2.2). A rotation vector is
 * axis * angle (rad); world-frame rotation vectors compose on the left: q' = exp(w) q.
 */
import { conjugate, multiply, normalize, type Quat, type QuatLike } from './quat';
import type { Vec3, Vec3Like } from './vec3';

/** Below this angle (rad) the series of sin(x)/x are used; their next terms are under 1e-17 there. */
const SMALL_ANGLE = 1e-4;

// Module-level scratch keeps the per-tick functions free of allocation (single-threaded use per module instance).
const scratchA = new Float64Array(4);
const scratchB = new Float64Array(4);
const scratchC = new Float64Array(3);

/** Unit quaternion exp(r) of the rotation vector r = axis * angle (rad, any frame). */
export function expMap<T extends Quat = number[]>(r: Vec3Like, out?: T): T {
  const o = out ?? ([0, 0, 0, 0] as T);
  const x = r[0], y = r[1], z = r[2];
  const angleSquared = x * x + y * y + z * z;
  const angle = Math.sqrt(angleSquared);
  // sin(angle/2)/angle, with its Taylor series 1/2 - angle^2/48 near zero.
  const factor = angle < SMALL_ANGLE ? 0.5 - angleSquared / 48 : Math.sin(0.5 * angle) / angle;
  o[0] = x * factor;
  o[1] = y * factor;
  o[2] = z * factor;
  o[3] = Math.cos(0.5 * angle);
  return o;
}

/** Rotation vector log(q) = axis * angle with angle in [0, pi] (rad): the shorter way for q and -q alike. */
export function logMap<T extends Vec3 = number[]>(q: QuatLike, out?: T): T {
  const o = out ?? ([0, 0, 0] as T);
  let x = q[0], y = q[1], z = q[2], w = q[3];
  if (w < 0) {
    x = -x; y = -y; z = -z; w = -w;
  }
  const sineSquared = x * x + y * y + z * z;
  const sine = Math.sqrt(sineSquared);
  // angle / sin(angle/2) = 2 atan2(s, w) / s; near identity its series 2/w (1 - s^2/(3 w^2)) avoids 0/0.
  const factor = sine < SMALL_ANGLE ? (2 / w) * (1 - sineSquared / (3 * w * w)) : (2 * Math.atan2(sine, w)) / sine;
  o[0] = x * factor;
  o[1] = y * factor;
  o[2] = z * factor;
  return o;
}

/** Pose error twist [dp; dr] into out: dp = target - position (m) and dr = log(q_target conj(q)) (rad), world frame. */
export function poseError<T extends Float64Array | number[]>(
  position: Vec3Like,
  orientation: QuatLike,
  targetPosition: Vec3Like,
  targetOrientation: QuatLike,
  out: T,
): T {
  out[0] = targetPosition[0] - position[0];
  out[1] = targetPosition[1] - position[1];
  out[2] = targetPosition[2] - position[2];
  multiply(targetOrientation, conjugate(orientation, scratchA), scratchB);
  logMap(scratchB, scratchC);
  out[3] = scratchC[0];
  out[4] = scratchC[1];
  out[5] = scratchC[2];
  return out;
}

/** Pose after dt (s) at origin velocity v (m/s) and angular velocity w (rad/s), world frame: p + v dt, exp(w dt) q; outputs may alias inputs. */
export function integratePose(
  position: Vec3Like,
  orientation: QuatLike,
  linear: Vec3Like,
  angular: Vec3Like,
  dt: number,
  outPosition: Vec3,
  outOrientation: Quat,
): void {
  outPosition[0] = position[0] + linear[0] * dt;
  outPosition[1] = position[1] + linear[1] * dt;
  outPosition[2] = position[2] + linear[2] * dt;
  scratchC[0] = angular[0] * dt;
  scratchC[1] = angular[1] * dt;
  scratchC[2] = angular[2] * dt;
  multiply(expMap(scratchC, scratchA), orientation, scratchB);
  // Renormalising each step keeps rounding from drifting the quaternion off the unit sphere over long runs.
  normalize(scratchB, outOrientation);
}
