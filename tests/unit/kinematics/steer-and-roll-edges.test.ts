import { describe, expect, it } from 'vitest';
import { createObject } from '../../../src/lib/kinematics/contact';
import { solveSheet } from '../../../src/lib/kinematics/scene';
import type { Vec3Like } from '../../../src/lib/kinematics/vec3';
import { ball, solveFinger } from './single-finger';
import { threeFingerFinger, threeFingerSheet } from './three-finger-sheet';

/**
 * Finger 0 of the test hand with its pivot and roll axes replaced (both still through the roller centre, so
 * turning the pivot leaves the contact where it is) and its pivot set to the given angle.
 */
function tiltedFinger(pivotAxis: Vec3Like, rollAxis: Vec3Like, pivotAngle = 0) {
  const input = threeFingerFinger(0);
  input.joints[1] = { ...input.joints[1], axis: [pivotAxis[0], pivotAxis[1], pivotAxis[2]], angle: pivotAngle };
  input.joints[2] = { ...input.joints[2], axis: [rollAxis[0], rollAxis[1], rollAxis[2]] };
  return input;
}

/**
 * Slip left with the pivot held at the given angle, from vectors: the roll direction d = w_roll x (y - r_roll)
 * at that angle (after forward kinematics), the remainder u, and the best roll rate u . d / |d|^2.
 */
function slipWithPivotAt(pivotAxis: Vec3Like, rollAxis: Vec3Like, velocity: [number, number, number], angle: number): number {
  const { finger, contact, steer } = solveFinger(tiltedFinger(pivotAxis, rollAxis, angle), ball(0.04, velocity));
  const w = finger.axes.subarray(3 * finger.rollIndex), r = finger.points.subarray(3 * finger.rollIndex), y = contact.rollerPoint, u = steer.remainder;
  const e = [y[0] - r[0], y[1] - r[1], y[2] - r[2]];
  const d = [w[1] * e[2] - w[2] * e[1], w[2] * e[0] - w[0] * e[2], w[0] * e[1] - w[1] * e[0]];
  const dd = d[0] * d[0] + d[1] * d[1] + d[2] * d[2], du = d[0] * u[0] + d[1] * u[1] + d[2] * u[2];
  return Math.sqrt(Math.max(0, u[0] * u[0] + u[1] * u[1] + u[2] * u[2] - (du * du) / dd));
}

describe('steer-and-roll at the edges', () => {
  describe('when no pivot angle aligns the roll direction, the pivot angle that leaves the least slip', () => {
    // Both axes tilted so that the pivot cone misses the needed direction and |d| changes as the pivot turns.
    const pivotAxis: Vec3Like = [-0.14, -0.41, 0.87];
    const rollAxis: Vec3Like = [0.11, 0.46, 0.76];
    const velocity: [number, number, number] = [-0.018, -0.009, 0.0024];

    it('leaves no more slip than any of 3600 pivot angles (brute-force scan through the public solve)', () => {
      const { steer } = solveFinger(tiltedFinger(pivotAxis, rollAxis), ball(0.04, velocity));
      expect(steer.aligned).toBe(false);
      let least = Number.POSITIVE_INFINITY, leastAngle = 0;
      for (let i = 0; i < 3600; i++) {
        const angle = -Math.PI + (2 * Math.PI * i) / 3600;
        const slip = slipWithPivotAt(pivotAxis, rollAxis, velocity, angle);
        if (slip < least) {
          least = slip;
          leastAngle = angle;
        }
      }
      // Brute-force scan: the sampled optimum is at most as good as the true one, and the solve must reach it.
      expect(steer.residualNorm).toBeLessThanOrEqual(least * (1 + 1e-9));
      // Brute-force scan: within one sample spacing of the sampled optimum (mod 2 pi).
      const gap = Math.atan2(Math.sin(steer.pivotAngle - leastAngle), Math.cos(steer.pivotAngle - leastAngle));
      expect(Math.abs(gap)).toBeLessThan((2 * Math.PI) / 3600);
      // Vectors at the chosen angle: the reported residual is the slip left there.
      expect(steer.residualNorm).toBeCloseTo(slipWithPivotAt(pivotAxis, rollAxis, velocity, steer.pivotAngle), 12);
    });

    it('STEER_CANNOT_ALIGN carries the slip that remains (m/s), not 0 and not an angle', () => {
      const doc = threeFingerSheet();
      doc.hand.fingers[0] = tiltedFinger(pivotAxis, rollAxis);
      doc.object.twist = { linear: velocity, angular: [0, 0, 0] };
      const result = solveSheet(doc);
      const warning = result.warnings.find((w) => w.code === 'STEER_CANNOT_ALIGN' && w.finger === 0);
      // Vectors at the chosen angle (as in the scan above): the value is the slip left there.
      const slip = slipWithPivotAt(pivotAxis, rollAxis, velocity, result.fingers[0].steer.pivotAngle);
      expect(slip).toBeGreaterThan(1e-3);
      expect(warning?.value).toBeCloseTo(slip, 12);
    });
  });

  describe('when every pivot angle satisfies the steering equation (contact on the roll axis), a stated choice', () => {
    /** The 40 mm ball of the test hand moved by offset (m), with a twist that needs rolling. */
    const ballAt = (offset: [number, number, number]) =>
      createObject({ shape: { kind: 'sphere', radius: 0.04 }, pose: { position: offset, orientation: { w: 1, x: 0, y: 0, z: 0 } }, twist: { linear: [0.01, 0.02, 0.02], angular: [0, 0, 0] } });
    // Hand derivation: roll axis along the pivot axis (the contact normal x) through the roller centre, contact
    // at centre - rho x on that axis, so d(delta) = w_roll x (y - r_roll) = x x (-rho x) = 0 at every angle.
    const rollOnPivot = () => {
      const input = threeFingerFinger(0);
      input.joints[2] = { ...input.joints[2], axis: [1, 0, 0] };
      return input;
    };
    // Hand derivation: roll axis vertical through the contact point itself; the pivot (x through the centre)
    // passes the contact, so every pivot angle keeps the contact on the turned roll axis and d = 0 again.
    const rollThroughContact = () => {
      const input = threeFingerFinger(0);
      input.joints[2] = { ...input.joints[2], point: [0.04, 0, 0] };
      return input;
    };

    for (const [name, fixture] of [['roll axis along the pivot axis', rollOnPivot], ['roll axis through the contact', rollThroughContact]] as const) {
      it(`${name}: keeps the current pivot angle and rolls at 0, whichever way the object moves by 1e-15 or 1e-9 m`, () => {
        const reference = solveFinger(fixture(), ballAt([0, 0, 0])).steer;
        // Stated rule: the smallest pivot change (none) and no roll rate, since no angle lets the roller supply anything.
        expect(reference.pivotChange).toBe(0);
        expect(reference.rollRate).toBe(0);
        for (const size of [1e-15, -1e-15, 1e-9, -1e-9]) {
          for (const axis of [0, 1, 2]) {
            const offset: [number, number, number] = [0, 0, 0];
            offset[axis] = size;
            const { steer } = solveFinger(fixture(), ballAt(offset));
            expect(steer.pivotChange, `offset ${offset}`).toBe(0);
            expect(Math.sign(steer.rollRate), `offset ${offset}`).toBe(0);
          }
        }
      });
    }
  });
});
