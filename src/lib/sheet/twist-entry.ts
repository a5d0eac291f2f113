/**
 * A twist written about another point than the object origin, or in the object's own frame, read into the form the
 * solve takes: the velocity of the object origin and the angular velocity, both in the palm frame. A rigid body's
 * points move as v(q) = v(p) + ω × (q − p), so the origin o moves at v(o) = v(p) + ω × (o − p); an object-frame
 * vector u reads R u in the palm frame, and an object-frame point s sits at o + R s.
 */
import { quat, vec3 } from '../kinematics';
import type { Pose, Twist, TwistEntry, Vec3Tuple } from './types';

const tuple = (v: ArrayLike<number>): Vec3Tuple => [v[0]!, v[1]!, v[2]!];

/** The entered twist's point, linear and angular velocity expressed in the palm frame (m, m/s, rad/s). */
export function entryInPalm(entry: Readonly<TwistEntry>, pose: Readonly<Pose>): { about: Vec3Tuple; linear: Vec3Tuple; angular: Vec3Tuple } {
  if (entry.frame === 'palm') return { about: tuple(entry.about), linear: tuple(entry.linear), angular: tuple(entry.angular) };
  const q = quat.fromSheet(pose.orientation);
  return {
    about: tuple(vec3.add(pose.position, quat.rotate(q, entry.about))),
    linear: tuple(quat.rotate(q, entry.linear)),
    angular: tuple(quat.rotate(q, entry.angular)),
  };
}

/** The object origin's velocity and the angular velocity (palm frame, m/s and rad/s) of a twist entered about a point or in the object frame. */
export function twistAboutOrigin(entry: Readonly<TwistEntry>, pose: Readonly<Pose>): Twist {
  const palm = entryInPalm(entry, pose);
  const lever = vec3.sub(pose.position, palm.about);
  return { linear: tuple(vec3.add(palm.linear, vec3.cross(palm.angular, lever))), angular: palm.angular, entered: entry };
}
