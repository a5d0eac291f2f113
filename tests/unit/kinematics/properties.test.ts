/**
 * Properties of the whole sheet solve on random scenes built from the hand templates.
 *
 * References:
 * - Rigid-body velocity of a material point, v(x) = v + w x (x - p): Lynch & Park, Modern Robotics
 *   (2017), ch. 3 (twists); the velocity of a point on a revolute joint's link, w x (y - q), and the
 *   space-form product of exponentials: same book, sec. 4.1 and 5.1 (section numbers from memory).
 * - Rotations and quaternion products: gl-matrix 3.4 used as an independent reference.
 * - Scaling: with every length scaled by s, J scales by s (columns w x (y - r)); damped least
 *   squares x = (J^T J + l^2 I)^-1 J^T v (Nakamura & Hanafusa 1986; Wampler 1986) is then unchanged
 *   when l and v scale by s too, and scales by 1/s when v is kept (algebra of the formula).
 */
import fc from 'fast-check';
import { mat3, quat, vec3 } from 'gl-matrix';
import { describe, expect, it } from 'vitest';
import {
  WARNING_CATALOGUE,
  createResult,
  createScene,
  setJointAngles,
  solveScene,
  solveSheet,
  type FingerResult,
  type SheetResult,
  type WarningCode,
} from '../../../src/lib/kinematics/index';
import { HAND_TEMPLATES, createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { ObjectShape, SheetDocument, Vec3Tuple } from '../../../src/lib/sheet/types';

// Double precision for every gl-matrix object created in this file.
const v3 = (x = 0, y = 0, z = 0) => [x, y, z] as unknown as vec3;
const q4 = () => [0, 0, 0, 1] as unknown as quat;
const m3 = () => [1, 0, 0, 0, 1, 0, 0, 0, 1] as unknown as mat3;

const mm = (lo: number, hi: number) => fc.double({ min: lo / 1000, max: hi / 1000, noNaN: true });

const shapeArbitrary: fc.Arbitrary<ObjectShape> = fc.oneof(
  mm(15, 35).map((radius): ObjectShape => ({ kind: 'sphere', radius })),
  fc
    .tuple(mm(15, 30), mm(15, 30), mm(15, 30), fc.double({ min: 0, max: 0.8, noNaN: true }))
    .map(([a, b, c, f]): ObjectShape => ({ kind: 'box', halfExtents: [a, b, c], filletRadius: f * 0.005 })),
  fc.tuple(mm(10, 25), mm(10, 35)).map(([radius, halfLength]): ObjectShape => ({ kind: 'cylinder', radius, halfLength })),
  fc.tuple(mm(6, 15), mm(0, 25)).map(([radius, halfLength]): ObjectShape => ({ kind: 'capsule', radius, halfLength })),
  fc.tuple(mm(18, 35), mm(18, 35), mm(18, 35)).map(([a, b, c]): ObjectShape => ({ kind: 'ellipsoid', semiAxes: [a, b, c] })),
);

const component = (limit: number) => fc.double({ min: -limit, max: limit, noNaN: true });
const vectorArbitrary = (limit: number) => fc.tuple(component(limit), component(limit), component(limit));

const strictlyConvexShapeArbitrary = shapeArbitrary.filter((shape) => shape.kind === 'sphere' || shape.kind === 'ellipsoid');
const ballRollerTemplates = HAND_TEMPLATES.filter((t) => t.fingers.every((f) => f.roller.kind === 'sphere')).map((t) => t.id);
const wheelRollerTemplates = HAND_TEMPLATES.filter((t) => t.fingers.some((f) => f.roller.kind === 'cylinder')).map((t) => t.id);

/**
 * A sheet from a random template and shape with a random object twist (m/s, rad/s). A wheel roller
 * lying against a flat face or a straight side touches it along a segment, where the contact point
 * is not unique; wheel-roller hands are therefore only paired with strictly convex objects.
 */
const sheetArbitrary = fc
  .record({
    pair: fc.oneof(
      fc.tuple(fc.constantFrom(...ballRollerTemplates), shapeArbitrary),
      fc.tuple(fc.constantFrom(...wheelRollerTemplates), strictlyConvexShapeArbitrary),
    ),
    linear: vectorArbitrary(0.02),
    angular: vectorArbitrary(0.6),
  })
  .map(({ pair: [template, shape], linear, angular }) => {
    const doc = createSheetFromTemplate(template, shape);
    doc.object.twist = { linear, angular };
    return doc;
  });

const unitQuaternionArbitrary = fc
  .tuple(component(1), component(1), component(1), component(1))
  .filter((q) => Math.hypot(...q) > 0.1)
  .map((q) => quat.normalize(q4(), q as unknown as quat));

const norm3 = (a: ArrayLike<number>) => Math.hypot(a[0], a[1], a[2]);

/** Velocity of the object's material point at x (world frame, m/s): v + w x (x - p). */
function objectPointVelocity(doc: SheetDocument, position: ArrayLike<number>, x: ArrayLike<number>): vec3 {
  const lever = vec3.subtract(v3(), x as vec3, position as vec3);
  const out = vec3.cross(v3(), doc.object.twist.angular as unknown as vec3, lever);
  return vec3.add(out, out, doc.object.twist.linear as unknown as vec3);
}

/**
 * J theta_dot at the roller contact point y, with the current joint axes and points recomputed by the
 * space-form product of exponentials from the home axes and points of the sheet (gl-matrix rotations).
 */
function contactVelocityFromRates(finger: SheetDocument['hand']['fingers'][number], angles: ArrayLike<number>, rates: ArrayLike<number>, y: ArrayLike<number>): vec3 {
  const rotation = m3();
  const translation = v3();
  const total = v3();
  finger.joints.forEach((joint, k) => {
    const axis = vec3.transformMat3(v3(), joint.axis as unknown as vec3, rotation);
    const point = vec3.add(v3(), vec3.transformMat3(v3(), joint.point as unknown as vec3, rotation), translation);
    const lever = vec3.subtract(v3(), y as vec3, point);
    vec3.scaleAndAdd(total, total, vec3.cross(v3(), axis, lever), rates[k]);
    // Compose the rigid motion of this joint: rotate by angle about the line (axis through point).
    const q = quat.setAxisAngle(q4(), axis, angles[k]);
    const jointRotation = mat3.fromQuat(m3(), q);
    const shift = vec3.subtract(v3(), point, vec3.transformMat3(v3(), point, jointRotation));
    mat3.multiply(rotation, jointRotation, rotation);
    vec3.add(translation, vec3.transformMat3(v3(), translation, jointRotation), shift);
  });
  return total;
}

/** Solves the sheet, turns every pivot to its steer-and-roll angle and solves again. */
function solveSteered(doc: SheetDocument): SheetResult {
  const scene = createScene(doc);
  const result = solveScene(scene, createResult(scene));
  result.fingers.forEach((finger, i) => {
    const pivot = scene.fingers[i].pivotIndex;
    if (pivot < 0 || !finger.steer.available || !Number.isFinite(finger.steer.pivotAngle)) return;
    const angles = Array.from(finger.jointAngles);
    angles[pivot] = finger.steer.pivotAngle;
    setJointAngles(scene, i, angles);
  });
  return solveScene(scene, createResult(scene));
}

describe('joint rates reproduce the object velocity at every contact when the residual is zero', () => {
  it('J theta_dot equals v_o(x) within the reported residual, and exactly once each pivot is steered (damping 0)', () => {
    let exactChecks = 0;
    fc.assert(
      fc.property(sheetArbitrary, (input) => {
        const doc = structuredClone(input);
        doc.solver.damping = 0;
        const result = solveSteered(doc);
        result.fingers.forEach((finger, i) => {
          const vo = objectPointVelocity(doc, result.object.position, finger.contact.objectPoint);
          const achieved = contactVelocityFromRates(doc.hand.fingers[i], finger.jointAngles, finger.full.rates, finger.contact.rollerPoint);
          const mismatch = norm3(vec3.subtract(v3(), achieved, vo));
          const scale = norm3(vo) + 1e-6;
          // The reported residual is what is really left over: zero residual means exact reproduction.
          expect(Math.abs(mismatch - finger.full.residualNorm)).toBeLessThan(1e-9 * scale);
          // Steered to the pivot angle steer-and-roll asks for, base and roll span the needed velocity.
          if (finger.steer.aligned && Math.abs(finger.steer.normalGain) > doc.solver.axisDistance) {
            expect(mismatch).toBeLessThan(1e-9 * scale);
            exactChecks++;
          }
        });
      }),
      { numRuns: 150, seed: 20240611 },
    );
    // The exact branch must not be vacuous. fast-check favours tiny doubles, and remainders below the minimum
    // tangential speed are left unsteered (every pivot angle meets the constraint), so they are not counted here.
    expect(exactChecks).toBeGreaterThan(200);
  });
});

function rotateVector(q: quat, v: ArrayLike<number>): Vec3Tuple {
  const out = vec3.transformQuat(v3(), v as vec3, q);
  return [out[0], out[1], out[2]];
}

/** The whole scene (object pose and twist, joint axes and points, roller geometry, target) turned by q about the palm origin. */
function rotateScene(doc: SheetDocument, q: quat): SheetDocument {
  const turned = structuredClone(doc);
  const turnPose = (pose: SheetDocument['object']['pose']) => {
    const o = pose.orientation;
    const composed = quat.multiply(q4(), q, [o.x, o.y, o.z, o.w] as unknown as quat);
    return { position: rotateVector(q, pose.position), orientation: { w: composed[3], x: composed[0], y: composed[1], z: composed[2] } };
  };
  turned.object.pose = turnPose(doc.object.pose);
  turned.motion.target = turnPose(doc.motion.target);
  turned.object.twist = { linear: rotateVector(q, doc.object.twist.linear), angular: rotateVector(q, doc.object.twist.angular) };
  for (const finger of turned.hand.fingers) {
    for (const joint of finger.joints) {
      joint.axis = rotateVector(q, joint.axis);
      joint.point = rotateVector(q, joint.point);
    }
    finger.roller.center = rotateVector(q, finger.roller.center);
    if (finger.roller.kind === 'cylinder') finger.roller.axis = rotateVector(q, finger.roller.axis);
  }
  return turned;
}

/** Precision of the computed contact point (closest points by GJK or by iteration), m. */
const CONTACT_PRECISION = 1e-8;

/**
 * Joint rates of two solves of the same finger agree. The template fingers' pivot column is zero by
 * design, so the damped solve divides the residual r by lambda^2 along that direction; a contact
 * point moved by eps changes the rates by up to about eps |r| / lambda^2 (first-order perturbation of
 * regularised least squares, Bjorck, Numerical Methods for Least Squares Problems, 1996, ch. 2; from memory).
 */
function expectSameRates(a: FingerResult, b: FingerResult, bExpected: ArrayLike<number>, damping: readonly number[]) {
  const noise = Math.max(...[a, b].map((f, i) => (CONTACT_PRECISION * f.full.residualNorm) / damping[i] ** 2));
  expect(a.full.rates).toBeNear(bExpected, { abs: 1e-6 + noise, rel: 1e-6 });
}

describe('rotating the whole scene leaves the joint rates unchanged', () => {
  it('full and steer-and-roll rates agree after a random rotation of everything about the palm origin', () => {
    fc.assert(
      fc.property(sheetArbitrary, unitQuaternionArbitrary, (doc, q) => {
        const before = solveSheet(doc);
        const after = solveSheet(rotateScene(doc, q));
        const damping = [doc.solver.damping, doc.solver.damping];
        before.fingers.forEach((finger, i) => {
          const turned = after.fingers[i];
          expect(Math.abs(turned.contact.gap - finger.contact.gap)).toBeLessThan(CONTACT_PRECISION);
          expectSameRates(turned, finger, finger.full.rates, damping);
          // Steer and roll: the minimum-norm base rates are unique; the two pivot solutions can tie at +-90 degrees
          // and then differ in the sign of the roll rate, so its magnitude is compared.
          const baseRateSize = Math.hypot(...finger.steer.baseRates);
          const steerScale = 1e-6 * (1 + baseRateSize + Math.abs(finger.steer.rollRate));
          finger.steer.baseRates.forEach((rate, j) => expect(Math.abs(turned.steer.baseRates[j] - rate)).toBeLessThan(steerScale));
          if (finger.steer.remainderNorm > 10 * doc.solver.minTangentialSpeed) {
            expect(Math.abs(Math.abs(turned.steer.rollRate) - Math.abs(finger.steer.rollRate))).toBeLessThan(steerScale);
          }
        });
        expect(after.grasp.rank).toBe(before.grasp.rank);
      }),
      { numRuns: 120, seed: 7 },
    );
  });
});

/** Every length of the scene times s: shape, poses, joint points, rollers, length-valued solver settings. */
function scaleScene(doc: SheetDocument, s: number, scaleLinearVelocity: boolean): SheetDocument {
  const scaled = structuredClone(doc);
  const times = (v: Vec3Tuple): Vec3Tuple => [v[0] * s, v[1] * s, v[2] * s];
  const shape = scaled.object.shape;
  switch (shape.kind) {
    case 'sphere':
      shape.radius *= s;
      break;
    case 'box':
      shape.halfExtents = times(shape.halfExtents);
      shape.filletRadius *= s;
      break;
    case 'cylinder':
    case 'capsule':
      shape.radius *= s;
      shape.halfLength *= s;
      break;
    case 'ellipsoid':
      shape.semiAxes = times(shape.semiAxes);
      break;
  }
  scaled.object.pose.position = times(doc.object.pose.position);
  scaled.motion.target.position = times(doc.motion.target.position);
  if (scaleLinearVelocity) scaled.object.twist.linear = times(doc.object.twist.linear);
  for (const finger of scaled.hand.fingers) {
    for (const joint of finger.joints) joint.point = times(joint.point);
    finger.roller.center = times(finger.roller.center);
    finger.roller.radius *= s;
    if (finger.roller.kind === 'cylinder') finger.roller.halfWidth *= s;
  }
  scaled.solver = {
    ...doc.solver,
    damping: doc.solver.damping * s,
    axisDistance: doc.solver.axisDistance * s,
    contactTolerance: doc.solver.contactTolerance * s,
    minTangentialSpeed: doc.solver.minTangentialSpeed * s,
  };
  return scaled;
}

describe('scaling every length by s', () => {
  const scaleArbitrary = fc.double({ min: 0.2, max: 5, noNaN: true });

  it('leaves the joint rates unchanged when linear velocities scale by s too (angular velocity kept)', () => {
    fc.assert(
      fc.property(sheetArbitrary, scaleArbitrary, (doc, s) => {
        const before = solveSheet(doc);
        const after = solveSheet(scaleScene(doc, s, true));
        const damping = [doc.solver.damping * s, doc.solver.damping];
        before.fingers.forEach((finger, i) => {
          expect(Math.abs(after.fingers[i].contact.gap - s * finger.contact.gap)).toBeLessThan(CONTACT_PRECISION * Math.max(1, s));
          expectSameRates(after.fingers[i], finger, finger.full.rates, damping);
        });
      }),
      { numRuns: 120, seed: 11 },
    );
  });

  it('divides the joint rates by s for a pure translation whose velocity is kept', () => {
    fc.assert(
      fc.property(sheetArbitrary, scaleArbitrary, (input, s) => {
        const doc = structuredClone(input);
        doc.object.twist.angular = [0, 0, 0];
        const before = solveSheet(doc);
        const after = solveSheet(scaleScene(doc, s, false));
        const damping = [doc.solver.damping * s, doc.solver.damping];
        before.fingers.forEach((finger, i) => {
          const expected = Array.from(finger.full.rates, (rate) => rate / s);
          expectSameRates(after.fingers[i], finger, expected, damping);
        });
      }),
      { numRuns: 120, seed: 13 },
    );
  });
});

/** Unit vector of a (unitless). */
const unit = (a: ArrayLike<number>): Vec3Tuple => {
  const n = norm3(a);
  return [a[0] / n, a[1] / n, a[2] / n];
};

const ball: ObjectShape = { kind: 'sphere', radius: 0.03 };

/**
 * One constructed sheet per warning code. Tri-radial fingers on a ball: base (index 0), pivot
 * (index 1, axis = inward normal through the roller centre), roll (index 2).
 */
const provokers: Record<WarningCode, () => SheetDocument> = {
  CONTACT_NEAR_ROLL_AXIS: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    const finger = doc.hand.fingers[0];
    finger.joints[2].axis = finger.joints[1].axis;
    return doc;
  },
  // By design the pivot axis runs along the contact normal through the roller centre.
  CONTACT_NEAR_PIVOT_AXIS: () => createSheetFromTemplate('tri-radial', ball),
  TANGENTIAL_SPEED_NEAR_ZERO: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    doc.object.twist = { linear: [0, 0, 0], angular: [0, 0, 0] };
    return doc;
  },
  // Roll axis along the pivot axis, the contact normal: the contact sits on the roll axis whatever the
  // steering, so the drive columns after steering (base, roll) span one direction only.
  JACOBIAN_NEAR_RANK_LOSS: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    const finger = doc.hand.fingers[0];
    finger.joints[2].axis = finger.joints[1].axis;
    return doc;
  },
  NORMAL_VELOCITY_UNREACHABLE: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    const finger = doc.hand.fingers[0];
    finger.joints[0].axis = finger.joints[1].axis;
    const inward = finger.joints[1].axis;
    doc.object.twist = { linear: [0.01 * inward[0], 0.01 * inward[1], 0.01 * inward[2]], angular: [0, 0, 0] };
    return doc;
  },
  JOINT_LIMIT_EXCEEDED: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    const pivot = doc.hand.fingers[0].joints[1];
    pivot.angle = (pivot.limits?.max ?? 0) + 0.2;
    return doc;
  },
  RATE_LIMIT_EXCEEDED: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    doc.hand.fingers[0].joints[2].rateLimit = 0.01;
    return doc;
  },
  CONTACT_LOST: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    doc.object.pose.position = [0, -0.002, doc.object.pose.position[2]];
    return doc;
  },
  CONTACT_PENETRATING: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    doc.object.pose.position = [0, 0.002, doc.object.pose.position[2]];
    return doc;
  },
  GRASP_RANK_DEFICIENT: () => createSheetFromTemplate('duo-opposed', ball),
  PIVOT_MISSES_ROLLER_CENTRE: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    const pivot = doc.hand.fingers[0].joints[1];
    pivot.point = [pivot.point[0] + 0.004, pivot.point[1], pivot.point[2]];
    return doc;
  },
  STEER_CANNOT_ALIGN: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    const [, pivot, roll] = doc.hand.fingers[0].joints;
    // A pivot tilted 50 degrees toward the roll axis sweeps the roll direction over a cone only.
    pivot.axis = unit(pivot.axis.map((c, i) => Math.cos((50 * Math.PI) / 180) * c + Math.sin((50 * Math.PI) / 180) * roll.axis[i]));
    doc.object.twist = { linear: [0, 0, 0], angular: [0.4, 0, 0] };
    return doc;
  },
  SLIP_REQUIRED: () => {
    const doc = createSheetFromTemplate('tri-radial', ball);
    const [, pivot, roll] = doc.hand.fingers[0].joints;
    // The pivot cone of STEER_CANNOT_ALIGN: the misalignment left after steering has to slip.
    pivot.axis = unit(pivot.axis.map((c, i) => Math.cos((50 * Math.PI) / 180) * c + Math.sin((50 * Math.PI) / 180) * roll.axis[i]));
    doc.object.twist = { linear: [0, 0, 0], angular: [0.4, 0, 0] };
    return doc;
  },
};

describe('every warning code can be provoked by a constructed case', () => {
  it('has a constructed case for each catalogue code', () => {
    expect(Object.keys(provokers).sort()).toEqual(Object.keys(WARNING_CATALOGUE).sort());
  });

  it.each(Object.keys(provokers) as WarningCode[])('%s', (code) => {
    const result = solveSheet(provokers[code]());
    expect(result.warnings.map((w) => w.code)).toContain(code);
  });

  it('raises no contact, limit or alignment warning for an untouched template sheet', () => {
    const codes = new Set(solveSheet(createSheetFromTemplate('tri-radial', ball)).warnings.map((w) => w.code));
    for (const code of ['CONTACT_LOST', 'CONTACT_PENETRATING', 'JOINT_LIMIT_EXCEEDED', 'RATE_LIMIT_EXCEEDED', 'PIVOT_MISSES_ROLLER_CENTRE', 'STEER_CANNOT_ALIGN', 'CONTACT_NEAR_ROLL_AXIS', 'JACOBIAN_NEAR_RANK_LOSS', 'SLIP_REQUIRED'] as const) {
      expect(codes.has(code)).toBe(false);
    }
  });
});
