import { describe, expect, it } from 'vitest';
import { Matrix as MlMatrix, SingularValueDecomposition } from 'ml-matrix';
import { ball, solveFinger } from './single-finger';
import { threeFingerFinger } from './three-finger-sheet';

describe('solveSteerAndRoll', () => {
  // Finger 0 of the test hand: normal n = x, base column (0.05, 0, 0.06), pivot along x through the
  // centre, roll about z through the centre, rho = 0.012. Worked by hand: base rate = n.v / n.j_b;
  // remainder u; roll direction d(delta) = (0, -rho cos delta, -rho sin delta) must be parallel to u.
  const v: [number, number, number] = [0.01, 0.02, 0.02];

  it('base rate n . v / n . (w_b x (y - r_b)), remainder, pivot angle atan(u_z / u_y) and roll rate -|u| / rho', () => {
    const { steer } = solveFinger(threeFingerFinger(0), ball(0.04, v));
    expect(steer.available).toBe(true);
    expect(steer.normalGain).toBeCloseTo(0.05, 15);
    expect(steer.baseRates).toBeNear([0.01 / 0.05], { digits: 14 });
    expect(steer.remainder).toBeNear([0, 0.02, 0.02 - 0.2 * 0.06], { digits: 14 });
    expect(steer.pivotChange).toBeCloseTo(Math.atan2(0.008, 0.02), 12);
    expect(steer.rollDistance).toBeCloseTo(0.012, 14);
    // Wheel fact |v| = omega r (common practice): the roll rate times the distance to the roll axis is |u|.
    expect(steer.rollRate).toBeCloseTo(-Math.hypot(0.02, 0.008) / 0.012, 12);
    expect(steer.aligned).toBe(true);
    expect(steer.residualNorm).toBeLessThan(1e-15);
    expect(steer.rates).toBeNear([0.2, 0, steer.rollRate], { digits: 14 });
  });

  it('of the two pivot solutions takes the one nearer the current angle', () => {
    const input = threeFingerFinger(0);
    input.joints[1] = { ...input.joints[1], angle: 2.9 };
    const { steer } = solveFinger(input, ball(0.04, v));
    // Roll axis now (0, -sin 2.9, cos 2.9); the alternative alignment lies pi away.
    const target = Math.atan2(0.008, 0.02);
    const candidates = [target - 2.9, target + Math.PI - 2.9].map((d) => Math.atan2(Math.sin(d), Math.cos(d)));
    const nearest = Math.abs(candidates[0]) < Math.abs(candidates[1]) ? candidates[0] : candidates[1];
    expect(steer.pivotChange).toBeCloseTo(nearest, 12);
    expect(steer.pivotAngle).toBeCloseTo(2.9 + nearest, 12);
    expect(steer.residualNorm).toBeLessThan(1e-15);
  });

  it('conditioning before and after steering, and the difference from the full rates', () => {
    const { steer, full } = solveFinger(threeFingerFinger(0), ball(0.04, v));
    expect(steer.conditionBefore).toBe(full.conditionNumber);
    expect(steer.singularValuesAfter[0]).toBeGreaterThan(0);
    const difference = [0, 1, 2].map((k) => steer.rates[k] - full.rates[k]);
    expect(steer.rateDifference).toBeNear(difference, { digits: 15 });
    expect(steer.rateDifferenceNorm).toBeCloseTo(Math.hypot(...difference), 15);
  });

  it('judges the drive columns after steering: base and the steered roll column, sigma_2 / sigma_1 as by ml-matrix SVD', () => {
    const { steer } = solveFinger(threeFingerFinger(0), ball(0.04, v));
    // Pivot through the contact: its column is zero and steering acts by turning the roll direction.
    expect(steer.pivotDrives).toBe(false);
    expect(steer.driveColumnCount).toBe(2);
    // Worked by hand: base column (0.05, 0, 0.06); roll column after steering rho u / |u|, u = (0, 0.02, 0.008)
    // (its sign, set by the roll axis, changes no singular value).
    const u = Math.hypot(0.02, 0.008);
    const rollColumn = [0, (0.012 * 0.02) / u, (0.012 * 0.008) / u];
    const reference = new SingularValueDecomposition(new MlMatrix([[0.05, rollColumn[0]], [0, rollColumn[1]], [0.06, rollColumn[2]]])).diagonal;
    expect(steer.driveSingularValues[0]).toBeCloseTo(reference[0], 14);
    expect(steer.driveSingularValues[1]).toBeCloseTo(reference[1], 14);
    expect(steer.driveRatio).toBeCloseTo(reference[1] / reference[0], 12);
  });

  it('counts the pivot as a drive column when its axis misses the contact by axisDistance or more', () => {
    const input = threeFingerFinger(0);
    // Pivot axis moved 4 mm along z: the contact now lies 4 mm from it, so turning the pivot moves the contact.
    input.joints[1] = { ...input.joints[1], point: [0.052, 0, 0.004] };
    const { steer, contact } = solveFinger(input, ball(0.04, v));
    expect(contact.pivotAxisDistance).toBeCloseTo(0.004, 12);
    expect(steer.pivotDrives).toBe(true);
    expect(steer.driveColumnCount).toBe(3);
    const a = steer.jacobianAfter.data;
    const reference = new SingularValueDecomposition(new MlMatrix([[a[0], a[1], a[2]], [a[3], a[4], a[5]], [a[6], a[7], a[8]]])).diagonal;
    expect(steer.driveRatio).toBeCloseTo(reference[1] / reference[0], 12);
  });

  it('reports misalignment when the pivot cone misses the needed direction', () => {
    const input = threeFingerFinger(0);
    const tilt = 0.3;
    input.joints[1] = { ...input.joints[1], axis: [0, 0, 1] };
    input.joints[2] = { ...input.joints[2], axis: [0, Math.cos(tilt), Math.sin(tilt)] };
    const { steer } = solveFinger(input, ball(0.04, [0.01, 0.001, 0.02]));
    expect(steer.aligned).toBe(false);
    expect(steer.misalignment).toBeGreaterThan(0.1);
    expect(steer.residualNorm).toBeGreaterThan(1e-4);
  });

  it('is unavailable without a base, pivot and roll joint', () => {
    const input = threeFingerFinger(0);
    input.joints[1] = { ...input.joints[1], role: 'other' };
    const { steer } = solveFinger(input, ball(0.04, v));
    expect(steer.available).toBe(false);
    expect(steer.rates[2]).toBe(0);
  });
});
