/**
 * A twist written about another point than the object origin, or in the object's own frame, read into the form the
 * solve takes: the velocity of the object origin and the angular velocity, both in the palm frame. A rigid body's
 * points move as v(q) = v(p) + ω × (q − p), so the origin o moves at v(o) = v(p) + ω × (o − p); an object-frame
 * vector u reads R u in the palm frame, and an object-frame point s sits at o + R s. A twist written about a finger's
 * contact takes the contact point the solve finds, so it is converted only once the contacts are known.
 */
import { quat, solveSheet, vec3 } from '../kinematics';
import { formatInputValue } from './number-format';
import type { Pose, SheetDocument, Twist, TwistEntry, Vec3Tuple } from './types';

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

/**
 * The twist written about the contact of the finger `entry.contact`, moved to the object origin (palm frame, m/s and rad/s) once the
 * contacts of the sheet's pose are found; `about` becomes that contact point in the entry's frame. A message when no finger has that
 * name or its roller does not touch the object.
 */
export function twistAboutContact(doc: Readonly<SheetDocument>, entry: Readonly<TwistEntry> & { contact: string }): { ok: true; twist: Twist } | { ok: false; message: string } {
  const fingers = doc.hand.fingers;
  const index = fingers.findIndex((finger) => finger.name === entry.contact);
  if (index < 0) {
    return { ok: false, message: `no finger is named "${entry.contact}"; the twist can be written about the contact of ${fingers.map((f) => `"${f.name}"`).join(', ')}` };
  }
  // The contacts depend on the pose and the joint angles only, so a solve with the twist as written finds them.
  const contact = solveSheet(doc as SheetDocument).fingers[index]!.contact;
  if (contact.state === 'separated') {
    return {
      ok: false,
      message: `finger "${entry.contact}" has no contact: its roller is ${contact.gap.toPrecision(4)} m from the object (contact tolerance ${doc.solver.contactTolerance} m)`,
    };
  }
  const about = tuple(entry.frame === 'object' ? contact.objectPointLocal : contact.objectPoint);
  return { ok: true, twist: twistAboutOrigin({ ...entry, about }, doc.object.pose) };
}

/**
 * Labels of a twist's two vectors as its document writes them: the point the velocity is of and the frame of both,
 * e.g. 'velocity of the contact of finger "north" (object frame)'.
 */
export function twistEntryLabels(written: unknown): { linear: string; angular: string } {
  const twist = written !== null && typeof written === 'object' ? (written as { frame?: unknown; about?: unknown }) : {};
  const inObject = twist.frame === 'object';
  const frame = inObject ? 'object frame' : 'palm frame';
  const about = twist.about;
  const contact = about !== null && typeof about === 'object' && !Array.isArray(about) ? (about as { contact?: unknown }).contact : undefined;
  const point = about === undefined
    ? 'the object origin'
    : typeof contact === 'string'
      ? `the contact of finger "${contact}"`
      : `the point ${formatInputValue(about)}${inObject ? ' from the object origin' : ''}`;
  return { linear: `velocity of ${point} (${frame})`, angular: `angular velocity (${frame})` };
}
