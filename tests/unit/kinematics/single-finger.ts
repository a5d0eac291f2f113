import type { FingerInput, SheetDocument, SolverSettings } from '../../../src/lib/sheet/types';
import { computeContact, createObject } from '../../../src/lib/kinematics/contact';
import { createFullSolution, createFullSolveWorkspace, solveFull } from '../../../src/lib/kinematics/full-solution';
import { createFinger } from '../../../src/lib/kinematics/hand';
import { createSteerAndRoll, createSteerWorkspace, solveSteerAndRoll } from '../../../src/lib/kinematics/steer-and-roll';

/** Solver settings of the single-finger tests. */
export const settings: SolverSettings = { damping: 1e-4, singularRatio: 1e-3, axisDistance: 1e-3, minTangentialSpeed: 1e-5, contactTolerance: 2e-4, softFinger: false };

/** A ball object of the given radius (m) at the origin with the given twist (m/s, rad/s). */
export function ball(radius: number, linear: [number, number, number], angular: [number, number, number] = [0, 0, 0]) {
  const object: SheetDocument['object'] = { shape: { kind: 'sphere', radius }, pose: { position: [0, 0, 0], orientation: { w: 1, x: 0, y: 0, z: 0 } }, twist: { linear, angular } };
  return createObject(object);
}

/** Contact, full and steer-and-roll solutions of one finger against an object. */
export function solveFinger(input: FingerInput, o: ReturnType<typeof ball>, s: SolverSettings = settings) {
  const finger = createFinger(input);
  const contact = computeContact(o, finger, s);
  const full = solveFull(finger, contact, o.angularVelocity, s, createFullSolution(finger.jointCount), createFullSolveWorkspace(finger.jointCount));
  const steer = solveSteerAndRoll(finger, contact, full, s, createSteerAndRoll(finger), createSteerWorkspace(finger.jointCount));
  return { finger, contact, full, steer };
}
