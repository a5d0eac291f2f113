import { describe, expect, it } from 'vitest';
import { computeContact, createObject, distanceToAxis, objectPointVelocity, updateObjectRotation } from '../../../src/lib/kinematics/contact';
import { createFinger, forwardKinematics } from '../../../src/lib/kinematics/hand';
import { fromAxisAngle, rotate } from '../../../src/lib/kinematics/quat';
import type { FingerInput, SheetDocument } from '../../../src/lib/sheet/types';

type ObjectInput = SheetDocument['object'];

function object(shape: ObjectInput['shape'], position: [number, number, number] = [0, 0, 0], orientation = { w: 1, x: 0, y: 0, z: 0 }, linear: [number, number, number] = [0, 0, 0], angular: [number, number, number] = [0, 0, 0]) {
  return createObject({ shape, pose: { position, orientation }, twist: { linear, angular } });
}

function sphereFinger(center: [number, number, number], radius: number, rollAxis: [number, number, number] = [0, 0, 1]): FingerInput {
  return {
    name: 'f',
    joints: [
      { name: 'base', role: 'base', axis: [0, 1, 0], point: [center[0] + 0.05, center[1], center[2] - 0.05], angle: 0 },
      { name: 'pivot', role: 'pivot', axis: [1, 0, 0], point: center, angle: 0 },
      { name: 'roll', role: 'roll', axis: rollAxis, point: center, angle: 0 },
    ],
    roller: { kind: 'sphere', radius, center },
  };
}

function cylinderFinger(center: [number, number, number], axis: [number, number, number], radius: number, halfWidth: number): FingerInput {
  return {
    name: 'c',
    joints: [{ name: 'roll', role: 'roll', axis, point: center, angle: 0 }],
    roller: { kind: 'cylinder', radius, halfWidth, center, axis },
  };
}

describe('objectPointVelocity', () => {
  it('wheel: v = omega x r and |v| = omega r (rigid-body kinematics, common practice)', () => {
    const v = objectPointVelocity([0, 0, 0], [0, 0, 4], [1, 1, 0], [1.5, 1, 0]);
    expect(v).toBeNear([0, 2, 0], { digits: 12 });
    expect(Math.hypot(v[0], v[1], v[2])).toBeCloseTo(4 * 0.5, 14);
  });
  it('adds the origin velocity (Murray, Li & Sastry 1994, ch. 2, eq. 2.55: v_q = v + omega x (q - p))', () => {
    expect(objectPointVelocity([0.1, -0.2, 0.3], [1, 2, 3], [0, 0, 0], [0.4, 0.5, 0.6])).toBeNear([0.1 + (2 * 0.6 - 3 * 0.5), -0.2 + (3 * 0.4 - 1 * 0.6), 0.3 + (1 * 0.5 - 2 * 0.4)], { digits: 12 });
  });
});

describe('distanceToAxis', () => {
  it('is |w x (y - r)| for a unit axis (point-line distance, common practice)', () => {
    expect(distanceToAxis([0, 0, 1], [1, 1, 5], 0, [4, 5, -2])).toBeCloseTo(5, 14);
  });
});

describe('updateObjectRotation', () => {
  it('refreshes the matrix after the orientation changes in place', () => {
    const o = object({ kind: 'sphere', radius: 1 });
    o.orientation.set(fromAxisAngle([0, 0, 1], Math.PI / 2));
    updateObjectRotation(o);
    expect([o.rotation[0], o.rotation[1], o.rotation[3]]).toBeNear([0, -1, 1], { digits: 12 });
  });
});

describe('computeContact', () => {
  it('sphere roller on a ball: n along the centre line, gap = |c - p| - R - rho, y = c - rho n, x = p + R n', () => {
    const p: [number, number, number] = [0.01, -0.02, 0.03];
    const c: [number, number, number] = [0.01 + 0.03, -0.02 + 0.04, 0.03];
    const contact = computeContact(object({ kind: 'sphere', radius: 0.04 }, p), createFinger(sphereFinger(c, 0.008)), { contactTolerance: 1e-4 });
    expect(contact.gap).toBeCloseTo(0.05 - 0.04 - 0.008, 14);
    expect(contact.normal).toBeNear([0.6, 0.8, 0], { digits: 12 });
    expect(contact.objectPoint).toBeNear([p[0] + 0.04 * 0.6, p[1] + 0.04 * 0.8, p[2]], { digits: 12 });
    expect(contact.rollerPoint).toBeNear([c[0] - 0.008 * 0.6, c[1] - 0.008 * 0.8, c[2]], { digits: 12 });
    expect(contact.objectPointLocal).toBeNear([0.04 * 0.6, 0.04 * 0.8, 0], { digits: 12 });
    expect(contact.state).toBe('separated');
  });

  it('rotated box: contact found in the object frame and mapped back to the world frame', () => {
    const q = fromAxisAngle([0, 0, 1], Math.PI / 4);
    const p: [number, number, number] = [0.1, 0.2, 0];
    const o = object({ kind: 'box', halfExtents: [0.03, 0.02, 0.05], filletRadius: 0 }, p, { w: q[3], x: q[0], y: q[1], z: q[2] });
    // Roller centre 0.01 + 0.005 out from the +x face along the rotated x axis.
    const ex = rotate(q, [1, 0, 0]);
    const c: [number, number, number] = [p[0] + 0.045 * ex[0], p[1] + 0.045 * ex[1], 0.01];
    const contact = computeContact(o, createFinger(sphereFinger(c, 0.01)), { contactTolerance: 1e-4 });
    expect(contact.gap).toBeCloseTo(0.005, 12);
    expect(contact.normal).toBeNear(ex, { digits: 12 });
    expect(contact.normalLocal).toBeNear([1, 0, 0], { digits: 12 });
    expect(contact.objectPointLocal).toBeNear([0.03, 0, 0.01], { digits: 12 });
  });

  it('penetrating sphere roller: negative gap and state', () => {
    const contact = computeContact(object({ kind: 'sphere', radius: 0.04 }), createFinger(sphereFinger([0.045, 0, 0], 0.01)), { contactTolerance: 1e-4 });
    expect(contact.gap).toBeCloseTo(-0.005, 14);
    expect(contact.state).toBe('penetrating');
  });

  it('object velocity at the contact split into normal and tangential parts', () => {
    const o = object({ kind: 'sphere', radius: 0.04 }, [0, 0, 0], undefined, [0.01, 0, 0.02], [0, 0, 0.5]);
    const contact = computeContact(o, createFinger(sphereFinger([0.05, 0, 0], 0.01)), { contactTolerance: 1e-4 });
    expect(contact.objectVelocity).toBeNear([0.01, 0.5 * 0.04, 0.02], { digits: 12 });
    expect(contact.normalSpeed).toBeCloseTo(0.01, 14);
    expect(contact.tangentialVelocity).toBeNear([0, 0.02, 0.02], { digits: 12 });
    expect(contact.tangentialSpeed).toBeCloseTo(Math.hypot(0.02, 0.02), 14);
  });

  it('roller point in the roller frame and its latitude / longitude about the roll axis', () => {
    const finger = createFinger(sphereFinger([0.05, 0, 0], 0.01));
    finger.angles[2] = Math.PI / 2;
    forwardKinematics(finger);
    const contact = computeContact(object({ kind: 'sphere', radius: 0.04 }), finger, { contactTolerance: 1e-4 });
    // A quarter turn of the roll joint (about z) carries the world direction -x back to -y in the roller frame.
    expect(contact.rollerPointLocal).toBeNear([0, 0.01, 0], { digits: 12 });
    expect(contact.latitude).toBeCloseTo(0, 14);
    // Longitude measured from the meridian finger.rollerMeridian towards rollerQuarterMeridian.
    const u = [0, 1, 0];
    const m = finger.rollerMeridian, q = finger.rollerQuarterMeridian;
    expect(contact.longitude).toBeCloseTo(Math.atan2(u[0] * q[0] + u[1] * q[1] + u[2] * q[2], u[0] * m[0] + u[1] * m[1] + u[2] * m[2]), 14);
    // A contact on the roll axis sits at a pole: latitude -pi/2 (roller below the ball, axis up).
    const polar = computeContact(object({ kind: 'sphere', radius: 0.04 }), createFinger(sphereFinger([0, 0, 0.05], 0.01)), { contactTolerance: 1e-4 });
    expect(polar.latitude).toBeCloseTo(-Math.PI / 2, 7);
    expect(polar.rollAxisDistance).toBeCloseTo(0, 14);
  });

  it('cylinder roller lying on a box face: gap = height of the axis - face - radius (line contact, middle chosen)', () => {
    const contact = computeContact(object({ kind: 'box', halfExtents: [0.1, 0.1, 0.02], filletRadius: 0 }), createFinger(cylinderFinger([0.01, 0.02, 0.035], [1, 0, 0], 0.01, 0.005)), { contactTolerance: 1e-4 });
    expect(contact.gap).toBeCloseTo(0.035 - 0.02 - 0.01, 14);
    expect(contact.normal).toBeNear([0, 0, 1], { digits: 12 });
    expect(contact.rollerPoint).toBeNear([0.01, 0.02, 0.025], { digits: 12 });
  });

  it('cylinder roller across a ball: gap = distance from the ball centre to the axis line - R - rho', () => {
    // Axis through (0.02, 0.05, 0.01) along (1, 1, 0)/sqrt 2; its nearest point to the origin lies 0.0495 from the centre, inside the 0.06 half width.
    const axis: [number, number, number] = [Math.SQRT1_2, Math.SQRT1_2, 0];
    const c: [number, number, number] = [0.02, 0.05, 0.01];
    const along = c[0] * axis[0] + c[1] * axis[1];
    const foot = [c[0] - along * axis[0], c[1] - along * axis[1], c[2]];
    const d = Math.hypot(foot[0], foot[1], foot[2]);
    const contact = computeContact(object({ kind: 'sphere', radius: 0.02 }), createFinger(cylinderFinger(c, axis, 0.002, 0.06)), { contactTolerance: 1e-4 });
    expect(contact.gap).toBeCloseTo(d - 0.02 - 0.002, 13);
    expect(contact.gap).toBeGreaterThan(0);
    expect(contact.normal).toBeNear(foot.map((v) => v / d), { digits: 12 });
    expect(contact.rollerPoint).toBeNear(foot.map((v) => v * (1 - 0.002 / d)), { digits: 12 });
  });

  it('cylinder roller overlapping a ball on its curved face reports the penetration exactly', () => {
    const contact = computeContact(object({ kind: 'sphere', radius: 0.02 }), createFinger(cylinderFinger([0, 0, 0.025], [1, 0, 0], 0.01, 0.01)), { contactTolerance: 1e-4 });
    expect(contact.gap).toBeCloseTo(-0.005, 14);
    expect(contact.state).toBe('penetrating');
  });

  it('cylinder roller tipped onto its rim against a box face: the rim point is lowest (elementary geometry)', () => {
    const tilt = 0.4;
    const axis: [number, number, number] = [Math.cos(tilt), 0, Math.sin(tilt)];
    const contact = computeContact(object({ kind: 'box', halfExtents: [0.1, 0.1, 0.02], filletRadius: 0 }), createFinger(cylinderFinger([0, 0, 0.05], axis, 0.01, 0.01)), { contactTolerance: 1e-4 });
    const lowest = 0.05 - (0.01 * Math.cos(tilt) + 0.01 * Math.sin(tilt));
    expect(contact.gap).toBeCloseTo(lowest - 0.02, 9);
    expect(contact.normal).toBeNear([0, 0, 1], { digits: 9 });
  });
});
