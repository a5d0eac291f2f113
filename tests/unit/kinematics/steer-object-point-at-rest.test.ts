import { describe, expect, it } from 'vitest';
import { createObject } from '../../../src/lib/kinematics/contact';
import { settings, solveFinger } from './single-finger';
import { threeFingerFinger } from './three-finger-sheet';

/**
 * Finger 0 of the test hand touches the 40 mm ball at x = (0.04, 0, 0), n = x, roller radius 12 mm about z through
 * (0.052, 0, 0): the roll direction d = z x (y - r_roll) = z x (-0.012, 0, 0) = (0, -0.012, 0) does not vanish.
 * The ball turns at 0.5 rad/s about the vertical through the contact point: v_o(x) = v + w x x with v = -w x x =
 * (0, -0.02, 0), so the object point at the contact is at rest (rigid-body velocity field, common practice) and
 * every pivot angle meets the rolling constraint with the roll joint at rest.
 */
const angular: [number, number, number] = [0, 0, 0.5];
const linearAtRest: [number, number, number] = [0, -0.02, 0];

function ballMovedBy(offset: [number, number, number], linearOffset: [number, number, number] = [0, 0, 0]) {
  return createObject({
    shape: { kind: 'sphere', radius: 0.04 },
    pose: { position: offset, orientation: { w: 1, x: 0, y: 0, z: 0 } },
    twist: { linear: [linearAtRest[0] + linearOffset[0], linearAtRest[1] + linearOffset[1], linearAtRest[2] + linearOffset[2]], angular },
  });
}

function fingerWithPivotAt(angle: number) {
  const input = threeFingerFinger(0);
  input.joints[1] = { ...input.joints[1], angle };
  return input;
}

describe('steer-and-roll when every pivot angle satisfies the rolling constraint but the roll direction does not vanish', () => {
  it('the fixture: the object point at the contact is at rest and the roll direction is 12 mm long (worked by hand above)', () => {
    const { contact, steer } = solveFinger(fingerWithPivotAt(0), ballMovedBy([0, 0, 0]));
    expect(Math.hypot(...contact.objectVelocity)).toBeLessThan(1e-15);
    expect(contact.rollAxisDistance).toBeCloseTo(0.012, 12);
    expect(steer.pivotChange).toBe(0);
    expect(steer.rollRate).toBe(0);
  });

  for (const pivotAngle of [0, 0.3]) {
    it(`pivot at ${pivotAngle} rad: keeps the current angle and rolls at 0 when the object moves by 1e-9 m or its velocity by 1e-9 m/s`, () => {
      for (const size of [1e-9, -1e-9]) {
        for (const axis of [0, 1, 2]) {
          const offset: [number, number, number] = [0, 0, 0];
          offset[axis] = size;
          // Stated rule (as for the contact on the roll axis): the smallest pivot change, none, and no roll rate.
          for (const object of [ballMovedBy(offset), ballMovedBy([0, 0, 0], offset)]) {
            const { steer } = solveFinger(fingerWithPivotAt(pivotAngle), object);
            expect(steer.pivotChange, `offset ${offset}`).toBe(0);
            expect(steer.pivotAngle, `offset ${offset}`).toBe(pivotAngle);
            expect(steer.rollRate, `offset ${offset}`).toBe(0);
            // What is left is the perturbation itself, far below the slip tolerance of the settings.
            expect(steer.residualNorm).toBeLessThan(settings.minTangentialSpeed);
          }
        }
      }
    });
  }

  it('steers again once the velocity at the contact reaches the minimum tangential speed (here 2e-5 m/s along z: pivot a quarter turn)', () => {
    // u = (0, 0, 2e-5) m/s; d(delta) = (0, -rho cos delta, -rho sin delta) is parallel to it at delta = +-pi/2 (worked by hand).
    const { steer } = solveFinger(fingerWithPivotAt(0), ballMovedBy([0, 0, 0], [0, 0, 2e-5]));
    expect(Math.abs(steer.pivotChange)).toBeCloseTo(Math.PI / 2, 10);
    // Wheel fact |v| = omega r (common practice).
    expect(Math.abs(steer.rollRate)).toBeCloseTo(2e-5 / 0.012, 12);
  });
});
