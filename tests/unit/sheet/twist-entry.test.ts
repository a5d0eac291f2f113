import { matrix, multiply } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { twistAboutOrigin, twistEntryLabels } from '../../../src/lib/sheet/twist-entry';
import type { Pose, Vec3Tuple } from '../../../src/lib/sheet/types';
import { threeFingerSheet } from '../kinematics/three-finger-sheet';

/** The skew matrix [p] with [p] x = p × x. */
const skew = (p: Vec3Tuple) => [[0, -p[2], p[1]], [p[2], 0, -p[0]], [-p[1], p[0], 0]];

/** Rotation matrix of a unit quaternion {w, x, y, z} (common practice; e.g. Lynch & Park, Modern Robotics, 2017, Appendix B.3). */
function rotationMatrix({ w, x, y, z }: Pose['orientation']): number[][] {
  return [
    [1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y)],
    [2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x)],
    [2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y)],
  ];
}

/**
 * The twist change of reference frame of Lynch & Park, Modern Robotics (2017), §3.3.2, eq. (3.83)-(3.84):
 * V_a = [Ad_T_ab] V_b with [Ad_T] = [[R, 0], [[p] R, R]] for T_ab = (R, p), twists written (ω, v).
 * Frame {a}: at the object origin with palm axes; frame {b}: at the entered point, with palm axes (palm entry) or
 * object axes (object entry); p is b's origin seen from a.
 */
function adjointTwist(R: number[][], p: Vec3Tuple, omegaB: Vec3Tuple, vB: Vec3Tuple): { omega: number[]; v: number[] } {
  const pR = multiply(matrix(skew(p)), matrix(R)).toArray() as number[][];
  const ad = [
    [...R[0]!, 0, 0, 0], [...R[1]!, 0, 0, 0], [...R[2]!, 0, 0, 0],
    [...pR[0]!, ...R[0]!], [...pR[1]!, ...R[1]!], [...pR[2]!, ...R[2]!],
  ];
  const out = multiply(matrix(ad), [...omegaB, ...vB]).toArray() as number[];
  return { omega: out.slice(0, 3), v: out.slice(3) };
}

const h = Math.SQRT1_2;
const pose: Pose = { position: [0.01, -0.02, 0.05], orientation: { w: h, x: 0, y: 0, z: h } };

describe('twistAboutOrigin', () => {
  it('moves a palm-frame twist about a point to the object origin as the adjoint does (Modern Robotics eq. 3.83)', () => {
    const about: Vec3Tuple = [0.03, 0.01, 0.05], linear: Vec3Tuple = [0.002, -0.001, 0.004], angular: Vec3Tuple = [0.5, -1.5, 2];
    const expected = adjointTwist([[1, 0, 0], [0, 1, 0], [0, 0, 1]], [about[0] - pose.position[0], about[1] - pose.position[1], about[2] - pose.position[2]], angular, linear);
    const twist = twistAboutOrigin({ frame: 'palm', about, linear, angular }, pose);
    expect(twist.linear).toBeNear(expected.v, { abs: 1e-15 });
    expect(twist.angular).toBeNear(expected.omega, { abs: 1e-15 });
  });

  it('turns an object-frame twist about an object-frame point into the palm frame as the adjoint does (Modern Robotics eq. 3.83)', () => {
    const R = rotationMatrix(pose.orientation);
    const about: Vec3Tuple = [0.02, 0, -0.01], linear: Vec3Tuple = [0.001, 0.003, 0], angular: Vec3Tuple = [0, 0.7, -0.2];
    // b's origin seen from a (palm axes): R s.
    const p = (multiply(matrix(R), about).toArray() as number[]) as Vec3Tuple;
    const expected = adjointTwist(R, p, angular, linear);
    const twist = twistAboutOrigin({ frame: 'object', about, linear, angular }, pose);
    expect(twist.linear).toBeNear(expected.v, { abs: 1e-15 });
    expect(twist.angular).toBeNear(expected.omega, { abs: 1e-15 });
  });

  it('keeps the velocity of a pure rotation about the entered point at zero there: v(p) = 0 gives v(o) = ω × (o − p) (rigid-body velocity field, common practice)', () => {
    const about: Vec3Tuple = [0.01, 0.02, 0.05];
    const twist = twistAboutOrigin({ frame: 'palm', about, linear: [0, 0, 0], angular: [0, 0, 1] }, pose);
    // ω = e_z, o − p = (0, −0.04, 0): e_z × (0, −0.04, 0) = (0.04, 0, 0).
    expect(twist.linear).toBeNear([0.04, 0, 0], { abs: 1e-15 });
  });
});

describe('the twist as a sheet writes it', () => {
  it('reads a twist about a point and in the object frame into the origin velocity in the palm frame, keeping what was entered', () => {
    const doc = threeFingerSheet();
    const written = JSON.parse(JSON.stringify(doc));
    written.object.pose = { position: pose.position, orientation: pose.orientation };
    written.object.twist = { linear: ['1 mm/s', 0, 0], angular: [0, 0, '1 rad/s'], frame: 'object', about: ['20 mm', 0, 0] };
    const parsed = parseSheet(written);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const expected = twistAboutOrigin({ frame: 'object', about: [0.02, 0, 0], linear: [0.001, 0, 0], angular: [0, 0, 1] }, parsed.doc.object.pose);
    expect(parsed.doc.object.twist.linear).toBeNear(expected.linear, { abs: 1e-15 });
    expect(parsed.doc.object.twist.entered).toEqual({ frame: 'object', about: [0.02, 0, 0], linear: [0.001, 0, 0], angular: [0, 0, 1] });
  });

  it('leaves a twist written as before untouched and without an entry', () => {
    const parsed = parseSheet(JSON.parse(JSON.stringify(threeFingerSheet())));
    expect(parsed.ok && parsed.doc.object.twist.entered).toBe(undefined);
  });

  it('names the field of a frame it does not know', () => {
    const written = JSON.parse(JSON.stringify(threeFingerSheet()));
    written.object.twist.frame = 'tool';
    const parsed = parseSheet(written);
    expect(parsed.ok ? [] : parsed.issues.map((issue) => issue.path)).toContain('object.twist.frame');
  });
});

describe('the twist written about a finger\'s contact', () => {
  const offset: Vec3Tuple = [0.0001, -0.00005, 0.00008];
  const turned: Pose = { position: offset, orientation: { w: h, x: 0, y: 0, z: h } };

  function writtenAboutContact(finger: string, frame: 'palm' | 'object') {
    const written = JSON.parse(JSON.stringify(threeFingerSheet()));
    written.object.pose = turned;
    written.object.twist = { linear: ['2 mm/s', 0, '-1 mm/s'], angular: [0.3, 0, '0.5 rad/s'], frame, about: { contact: finger } };
    return written;
  }

  /** Contact point on a ball: the surface point toward the roller centre, x = p + r (c − p)/|c − p| (sphere geometry, common practice). */
  function ballContact(center: Vec3Tuple): Vec3Tuple {
    const d = [0, 1, 2].map((k) => center[k]! - offset[k]!);
    const n = Math.hypot(d[0]!, d[1]!, d[2]!);
    return [0, 1, 2].map((k) => offset[k]! + (0.04 * d[k]!) / n) as Vec3Tuple;
  }

  it('converts a palm-frame twist about the contact of the named finger as the adjoint does (Modern Robotics eq. 3.83)', () => {
    const parsed = parseSheet(writtenAboutContact('finger 2', 'palm'));
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const x = ballContact(parsed.doc.hand.fingers[1]!.roller.center);
    const expected = adjointTwist([[1, 0, 0], [0, 1, 0], [0, 0, 1]], [x[0] - offset[0], x[1] - offset[1], x[2] - offset[2]], [0.3, 0, 0.5], [0.002, 0, -0.001]);
    expect(parsed.doc.object.twist.linear).toBeNear(expected.v, { abs: 1e-12 });
    expect(parsed.doc.object.twist.angular).toBeNear(expected.omega, { abs: 1e-15 });
    expect(parsed.doc.object.twist.entered?.contact).toBe('finger 2');
    expect(parsed.doc.object.twist.entered?.about).toBeNear(x, { abs: 1e-12 });
  });

  it('converts an object-frame twist about a contact with the object\'s rotation (Modern Robotics eq. 3.83)', () => {
    const parsed = parseSheet(writtenAboutContact('finger 3', 'object'));
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const x = ballContact(parsed.doc.hand.fingers[2]!.roller.center);
    const R = rotationMatrix(turned.orientation);
    const expected = adjointTwist(R, [x[0] - offset[0], x[1] - offset[1], x[2] - offset[2]], [0.3, 0, 0.5], [0.002, 0, -0.001]);
    expect(parsed.doc.object.twist.linear).toBeNear(expected.v, { abs: 1e-12 });
    expect(parsed.doc.object.twist.angular).toBeNear(expected.omega, { abs: 1e-15 });
    // The point is kept in the frame it was written in: R^T (x − p).
    const local = multiply(matrix(R).toArray() as number[][], parsed.doc.object.twist.entered!.about).valueOf() as number[];
    expect(local).toBeNear([x[0] - offset[0], x[1] - offset[1], x[2] - offset[2]], { abs: 1e-12 });
  });

  it('shows the conversion with the finger named in the derivation', () => {
    const evaluation = evaluateSheet(writtenAboutContact('finger 2', 'palm'), { derive: true });
    expect(evaluation.ok).toBe(true);
    if (!evaluation.ok) return;
    const entry = evaluation.value.derivation.find((e) => e.id === 'object.twist');
    expect(entry?.label).toContain('the contact of finger "finger 2"');
    expect(entry?.value).toEqual([...evaluation.value.doc.object.twist.linear, ...evaluation.value.doc.object.twist.angular]);
  });

  it('names the field when no finger has that name', () => {
    const parsed = parseSheet(writtenAboutContact('thumb', 'palm'));
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.issues).toEqual([{ path: 'object.twist.about.contact', message: expect.stringContaining('no finger is named "thumb"') }]);
  });

  it('names the field when the named finger does not touch the object', () => {
    const written = writtenAboutContact('finger 1', 'palm');
    // 10 mm further out than a touching roller: the gap is far past the 0.2 mm contact tolerance.
    written.hand.fingers[0].roller.center = [0.062, 0, 0];
    const parsed = parseSheet(written);
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.issues).toEqual([{ path: 'object.twist.about.contact', message: expect.stringContaining('finger "finger 1" has no contact') }]);
  });

  it('names the point of a contact written wrongly', () => {
    const written = writtenAboutContact('finger 1', 'palm');
    written.object.twist.about = { finger: 'finger 1' };
    const parsed = parseSheet(written);
    expect(parsed.ok ? [] : parsed.issues.map((issue) => issue.path)).toContain('object.twist.about');
  });
});

describe('twistEntryLabels', () => {
  it('names the point and the frame of a twist as written', () => {
    expect(twistEntryLabels({ linear: [0, 0, 0], angular: [0, 0, 1] })).toEqual({ linear: 'velocity of the object origin (palm frame)', angular: 'angular velocity (palm frame)' });
    expect(twistEntryLabels({ linear: [0, 0, 0], angular: [0, 0, 1], frame: 'object', about: { contact: 'north' } }).linear).toBe('velocity of the contact of finger "north" (object frame)');
    expect(twistEntryLabels({ linear: [0, 0, 0], angular: [0, 0, 1], frame: 'object', about: ['5 mm', 0, 0] }).linear).toBe('velocity of the point ["5 mm", 0, 0] from the object origin (object frame)');
  });
});
