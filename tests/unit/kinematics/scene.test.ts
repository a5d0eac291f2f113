import { describe, expect, it } from 'vitest';
import {
  createResult, createScene, setJointAngles, setObjectPose, setObjectTwist, solveScene, solveSheet, toPlainResult,
} from '../../../src/lib/kinematics/scene';
import { fromAxisAngle } from '../../../src/lib/kinematics/quat';
import { threeFingerSheet } from './three-finger-sheet';

describe('createScene', () => {
  it('compiles the object and fingers and copies the solver settings', () => {
    const doc = threeFingerSheet();
    const scene = createScene(doc);
    expect(scene.fingers).toHaveLength(3);
    expect(Array.from(scene.object.position)).toEqual([0, 0, 0]);
    expect(scene.settings).toEqual(doc.solver);
    expect(scene.settings).not.toBe(doc.solver);
  });
});

describe('solveScene', () => {
  it('fills one result per finger, the grasp and the warnings', () => {
    const r = solveScene(createScene(threeFingerSheet()));
    expect(r.fingers.map((f) => f.name)).toEqual(['finger 1', 'finger 2', 'finger 3']);
    expect(r.grasp.contactCount).toBe(3);
    // Each contact sits on its pivot axis by design (a note); judged after steering nothing is singular.
    expect(r.worstSeverity).toBe('note');
    expect(r.warnings.map((w) => w.code)).toEqual(['CONTACT_NEAR_PIVOT_AXIS', 'CONTACT_NEAR_PIVOT_AXIS', 'CONTACT_NEAR_PIVOT_AXIS']);
    expect(r.fingers.map((f) => f.rankBasis)).toEqual(['steered', 'steered', 'steered']);
  });

  it('reuses `out` and gives the same numbers as a fresh solve', () => {
    const scene = createScene(threeFingerSheet());
    const out = createResult(scene);
    const first = solveScene(scene, out);
    expect(first).toBe(out);
    const rates = Array.from(out.fingers[2].full.rates);
    solveScene(scene, out);
    expect(Array.from(out.fingers[2].full.rates)).toEqual(rates);
    expect(toPlainResult(out)).toEqual(toPlainResult(solveSheet(threeFingerSheet())));
  });

  it('follows in-place changes of pose, twist and joint angles', () => {
    const scene = createScene(threeFingerSheet());
    const out = createResult(scene);
    setObjectTwist(scene, [0, 0, 0], [0, 0, 1]);
    solveScene(scene, out);
    // A spin about z moves the contact on the +x ball surface at omega r = 0.04 m/s along +y (common practice).
    expect(Array.from(out.fingers[0].contact.objectVelocity).map((v) => +v.toFixed(15))).toEqual([0, 0.04, 0]);
    setObjectPose(scene, [0, 0, 0.001], fromAxisAngle([0, 0, 1], 0.1));
    solveScene(scene, out);
    expect(out.object.position[2]).toBe(0.001);
    expect(out.fingers[0].contact.gap).toBeGreaterThan(0);
    setJointAngles(scene, 0, [0.1, 0, 0]);
    solveScene(scene, out);
    expect(out.fingers[0].jointAngles[0]).toBe(0.1);
  });
});

describe('toPlainResult', () => {
  it('turns typed arrays into arrays and matrices into rows, and survives JSON', () => {
    const plain = toPlainResult(solveSheet(threeFingerSheet()));
    expect(Array.isArray(plain.fingers[0].full.rates)).toBe(true);
    expect(plain.fingers[0].full.jacobian).toHaveLength(3);
    expect(plain.fingers[0].full.jacobian[0]).toHaveLength(3);
    expect('warningList' in plain).toBe(false);
    const round = JSON.parse(JSON.stringify(plain));
    expect(round.fingers[1].contact.objectPoint).toEqual(plain.fingers[1].contact.objectPoint);
  });

  it('takes a finger converted before as it is and converts the others', () => {
    const solved = solveSheet(threeFingerSheet());
    const whole = toPlainResult(solved);
    const converted = toPlainResult(solved).fingers[1];
    const plain = toPlainResult(solved, [undefined, converted]);
    expect(plain.fingers[1]).toBe(converted);
    expect(plain).toStrictEqual(whole);
    expect(Object.keys(plain)).toEqual(Object.keys(whole));
  });
});
