import { matrix, multiply } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { twistAboutOrigin } from '../../../src/lib/sheet/twist-entry';
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
