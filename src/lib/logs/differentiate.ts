/**
 * The object twist a logged motion implies, by finite differences of logged poses. The filter:
 * a central difference over the samples before and after (second-order accurate for evenly spaced
 * samples), a one-sided difference to the neighbour at the ends of the log and beside a gap (first
 * order). Orientation differences go through the rotation vector of q_b conj(q_a), so q and -q
 * read as the same attitude and no derivative of quaternion components is taken.
 */
import { quat } from '../kinematics';

const relative = new Float64Array(4);
const conjugated = new Float64Array(4);
const axis = new Float64Array(3);

/** Twist [v (m/s); w (rad/s)], world frame, from pose a at time ta to pose b at time tb (s): (p_b - p_a) / dt and log(q_b conj(q_a)) / dt. */
export function twistBetween(
  positionA: ArrayLike<number>,
  orientationA: ArrayLike<number>,
  ta: number,
  positionB: ArrayLike<number>,
  orientationB: ArrayLike<number>,
  tb: number,
  out: Float64Array,
): Float64Array {
  const dt = tb - ta;
  out[0] = (positionB[0]! - positionA[0]!) / dt;
  out[1] = (positionB[1]! - positionA[1]!) / dt;
  out[2] = (positionB[2]! - positionA[2]!) / dt;
  quat.multiply(orientationB, quat.conjugate(orientationA, conjugated), relative);
  const angle = quat.toAxisAngle(relative, axis) / dt;
  out[3] = axis[0]! * angle;
  out[4] = axis[1]! * angle;
  out[5] = axis[2]! * angle;
  return out;
}
