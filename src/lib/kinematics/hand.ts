/**
 * Finger forward kinematics by the product of exponentials (Murray, Li & Sastry 1994, ch. 2,
 * sec. 2.3 and 3.2; Lynch & Park 2017, "Modern Robotics", ch. 4): with revolute joint k of home
 * axis w_k through home point r_k, g(theta) = exp(xi_1 theta_1) ... exp(xi_n theta_n) g(0), and
 * the current axis of joint k is the home axis moved by the joints before it.
 */
import type { FingerInput, JointRole } from '../sheet/types';
import { mapPacked } from './hidden-classes';
import { cross, perpendicular, type Vec3Like } from './vec3';

export type RollerKind = 'sphere' | 'cylinder';

/** One finger: home geometry, mutable joint angles, and the results of forwardKinematics (world frame). */
export interface Finger {
  name: string;
  jointCount: number;
  jointNames: string[];
  roles: JointRole[];
  /** Index of the first joint with that role, -1 when the finger has none. */
  baseIndex: number;
  pivotIndex: number;
  rollIndex: number;
  /** Home axes and points, 3 per joint, palm frame (unit, m). */
  homeAxes: Float64Array;
  homePoints: Float64Array;
  /** Current joint angles, rad; write here, then call forwardKinematics. */
  angles: Float64Array;
  /** Joint limits, rad (-Infinity / Infinity when absent), and rate limits, rad/s (Infinity when absent). */
  lowerLimits: Float64Array;
  upperLimits: Float64Array;
  rateLimits: Float64Array;
  rollerKind: RollerKind;
  /** Roller radius, m. */
  rollerRadius: number;
  /** Half width of a cylindrical roller along its axis, m (0 for a sphere). */
  rollerHalfWidth: number;
  /** Roller centre and (cylinder) axis at home, palm frame. */
  homeRollerCenter: Float64Array;
  homeRollerAxis: Float64Array;
  /** Directions of longitude 0 and pi/2 on the roller, perpendicular to its axis (roller frame, unit; zero without an axis). */
  rollerMeridian: Float64Array;
  rollerQuarterMeridian: Float64Array;
  /** Current joint axes (unit) and axis points (m), 3 per joint, world frame. */
  axes: Float64Array;
  points: Float64Array;
  /** Current roller centre (m) and roller axis (unit; the roll joint's axis for a sphere, zero without one), world frame. */
  rollerCenter: Float64Array;
  rollerAxis: Float64Array;
  /** Rotation of the last link from home, row-major (roller frame to world). */
  rollerRotation: Float64Array;
  /** Translation of the last link from home, m (roller frame origin offset, world frame). */
  chainTranslation: Float64Array;
  /** Joint angles the current axes, points and roller pose were computed at, rad (NaN before the first forwardKinematics). */
  kinematicsAngles: Float64Array;
}

function firstIndexOf(roles: JointRole[], role: JointRole): number {
  return roles.indexOf(role);
}

/** Finger compiled from its sheet input, with forward kinematics already run (palm frame, SI). */
export function createFinger(input: FingerInput): Finger {
  const n = input.joints.length;
  const roles = mapPacked(input.joints, (j) => j.role);
  // The arrays of 3 per joint and the rotation are over 64 bytes, which V8 keeps outside its heap, each a separate
  // allocation that cost about a microsecond and more garbage collection: they share one buffer instead.
  const chains = new ArrayBuffer(8 * (12 * n + 9));
  const chain = (index: number, length: number) => new Float64Array(chains, 8 * 3 * n * index, length);
  const finger: Finger = {
    name: input.name,
    jointCount: n,
    jointNames: mapPacked(input.joints, (j) => j.name),
    roles,
    baseIndex: firstIndexOf(roles, 'base'),
    pivotIndex: firstIndexOf(roles, 'pivot'),
    rollIndex: firstIndexOf(roles, 'roll'),
    homeAxes: chain(0, 3 * n),
    homePoints: chain(1, 3 * n),
    angles: new Float64Array(n),
    lowerLimits: new Float64Array(n),
    upperLimits: new Float64Array(n),
    rateLimits: new Float64Array(n),
    rollerKind: input.roller.kind,
    rollerRadius: input.roller.radius,
    rollerHalfWidth: input.roller.kind === 'cylinder' ? input.roller.halfWidth : 0,
    homeRollerCenter: Float64Array.from(input.roller.center),
    homeRollerAxis: new Float64Array(3),
    rollerMeridian: new Float64Array(3),
    rollerQuarterMeridian: new Float64Array(3),
    axes: chain(2, 3 * n),
    points: chain(3, 3 * n),
    rollerCenter: new Float64Array(3),
    rollerAxis: new Float64Array(3),
    rollerRotation: chain(4, 9),
    chainTranslation: new Float64Array(3),
    kinematicsAngles: new Float64Array(n).fill(Number.NaN),
  };
  input.joints.forEach((joint, k) => {
    const a = joint.axis;
    const length = Math.hypot(a[0], a[1], a[2]);
    for (let c = 0; c < 3; c++) {
      finger.homeAxes[3 * k + c] = a[c] / length;
      finger.homePoints[3 * k + c] = joint.point[c];
    }
    finger.angles[k] = joint.angle;
    finger.lowerLimits[k] = joint.limits?.min ?? Number.NEGATIVE_INFINITY;
    finger.upperLimits[k] = joint.limits?.max ?? Number.POSITIVE_INFINITY;
    finger.rateLimits[k] = joint.rateLimit ?? Number.POSITIVE_INFINITY;
  });
  if (input.roller.kind === 'cylinder') {
    const a = input.roller.axis;
    const length = Math.hypot(a[0], a[1], a[2]);
    for (let c = 0; c < 3; c++) finger.homeRollerAxis[c] = a[c] / length;
  } else if (finger.rollIndex >= 0) {
    finger.homeRollerAxis.set(finger.homeAxes.subarray(3 * finger.rollIndex, 3 * finger.rollIndex + 3));
  }
  const axis = finger.homeRollerAxis;
  if (axis[0] !== 0 || axis[1] !== 0 || axis[2] !== 0) {
    const m = perpendicular(axis, finger.rollerMeridian);
    cross(axis, m, finger.rollerQuarterMeridian);
  }
  return forwardKinematics(finger);
}

/**
 * Exponential of the revolute twist with unit axis w through point r by angle theta (rad):
 * rotation (Rodrigues' formula, row-major) and translation (I - R) r (m); axis and point are read at offset.
 */
export function jointExponential(axis: Vec3Like, point: Vec3Like, angle: number, rotationOut: Float64Array, translationOut: Float64Array, offset = 0): void {
  const x = axis[offset], y = axis[offset + 1], z = axis[offset + 2];
  const s = Math.sin(angle), v = 1 - Math.cos(angle);
  const r = rotationOut;
  r[0] = 1 - v * (y * y + z * z);
  r[1] = v * x * y - s * z;
  r[2] = v * x * z + s * y;
  r[3] = v * x * y + s * z;
  r[4] = 1 - v * (x * x + z * z);
  r[5] = v * y * z - s * x;
  r[6] = v * x * z - s * y;
  r[7] = v * y * z + s * x;
  r[8] = 1 - v * (x * x + y * y);
  const px = point[offset], py = point[offset + 1], pz = point[offset + 2];
  translationOut[0] = px - (r[0] * px + r[1] * py + r[2] * pz);
  translationOut[1] = py - (r[3] * px + r[4] * py + r[5] * pz);
  translationOut[2] = pz - (r[6] * px + r[7] * py + r[8] * pz);
}

/**
 * Runs the product of exponentials at finger.angles, updating the current axes, points, roller centre and axis (world frame);
 * at the angles of the previous call it keeps that call's results, which are those it would compute again (sweeps of the object
 * and repeated solves of one posture meet this).
 */
export function forwardKinematics(finger: Finger): Finger {
  if (anglesUnchanged(finger.angles, finger.kinematicsAngles, finger.jointCount)) return finger;
  const homeAxes = finger.homeAxes, homePoints = finger.homePoints;
  const axes = finger.axes, points = finger.points, angles = finger.angles;
  // Chain so far g = (R, t), kept in locals: R row-major r0..r8.
  let r0 = 1, r1 = 0, r2 = 0, r3 = 0, r4 = 1, r5 = 0, r6 = 0, r7 = 0, r8 = 1;
  let t0 = 0, t1 = 0, t2 = 0;
  for (let k = 0, o = 0; k < finger.jointCount; k++, o += 3) {
    // Current axis and point: joint k's home twist carried by the chain of joints before it.
    const ax = homeAxes[o], ay = homeAxes[o + 1], az = homeAxes[o + 2];
    const px = homePoints[o], py = homePoints[o + 1], pz = homePoints[o + 2];
    const x = r0 * ax + r1 * ay + r2 * az, y = r3 * ax + r4 * ay + r5 * az, z = r6 * ax + r7 * ay + r8 * az;
    const qx = r0 * px + r1 * py + r2 * pz + t0, qy = r3 * px + r4 * py + r5 * pz + t1, qz = r6 * px + r7 * py + r8 * pz + t2;
    axes[o] = x; axes[o + 1] = y; axes[o + 2] = z;
    points[o] = qx; points[o + 1] = qy; points[o + 2] = qz;
    // exp(xi_1 th_1) ... exp(xi_k th_k) = exp(xi'_k th_k) g with xi'_k the current twist; exp(xi'_k th_k)
    // is the rotation E about the current axis (Rodrigues) with translation (I - E) q.
    const s = Math.sin(angles[k]), v = 1 - Math.cos(angles[k]);
    const e0 = 1 - v * (y * y + z * z), e1 = v * x * y - s * z, e2 = v * x * z + s * y;
    const e3 = v * x * y + s * z, e4 = 1 - v * (x * x + z * z), e5 = v * y * z - s * x;
    const e6 = v * x * z - s * y, e7 = v * y * z + s * x, e8 = 1 - v * (x * x + y * y);
    let c0 = r0, c1 = r3, c2 = r6;
    r0 = e0 * c0 + e1 * c1 + e2 * c2; r3 = e3 * c0 + e4 * c1 + e5 * c2; r6 = e6 * c0 + e7 * c1 + e8 * c2;
    c0 = r1; c1 = r4; c2 = r7;
    r1 = e0 * c0 + e1 * c1 + e2 * c2; r4 = e3 * c0 + e4 * c1 + e5 * c2; r7 = e6 * c0 + e7 * c1 + e8 * c2;
    c0 = r2; c1 = r5; c2 = r8;
    r2 = e0 * c0 + e1 * c1 + e2 * c2; r5 = e3 * c0 + e4 * c1 + e5 * c2; r8 = e6 * c0 + e7 * c1 + e8 * c2;
    // New translation E t + (I - E) q = E (t - q) + q.
    const dx = t0 - qx, dy = t1 - qy, dz = t2 - qz;
    t0 = e0 * dx + e1 * dy + e2 * dz + qx;
    t1 = e3 * dx + e4 * dy + e5 * dz + qy;
    t2 = e6 * dx + e7 * dy + e8 * dz + qz;
  }
  const R = finger.rollerRotation, t = finger.chainTranslation;
  R[0] = r0; R[1] = r1; R[2] = r2; R[3] = r3; R[4] = r4; R[5] = r5; R[6] = r6; R[7] = r7; R[8] = r8;
  t[0] = t0; t[1] = t1; t[2] = t2;
  const c = finger.homeRollerCenter, a = finger.homeRollerAxis;
  const center = finger.rollerCenter, axis = finger.rollerAxis;
  center[0] = r0 * c[0] + r1 * c[1] + r2 * c[2] + t0;
  center[1] = r3 * c[0] + r4 * c[1] + r5 * c[2] + t1;
  center[2] = r6 * c[0] + r7 * c[1] + r8 * c[2] + t2;
  axis[0] = r0 * a[0] + r1 * a[1] + r2 * a[2];
  axis[1] = r3 * a[0] + r4 * a[1] + r5 * a[2];
  axis[2] = r6 * a[0] + r7 * a[1] + r8 * a[2];
  const solved = finger.kinematicsAngles;
  for (let k = 0; k < finger.jointCount; k++) solved[k] = angles[k];
  return finger;
}

/** Whether the joint angles (rad) equal those of the last forwardKinematics bit for bit: -0 differs from 0 (its sine keeps the sign), NaN from everything. */
function anglesUnchanged(angles: Float64Array, solved: Float64Array, jointCount: number): boolean {
  for (let k = 0; k < jointCount; k++) {
    const angle = angles[k];
    if (angle !== solved[k] || (angle === 0 && 1 / angle !== 1 / solved[k])) return false;
  }
  return true;
}

