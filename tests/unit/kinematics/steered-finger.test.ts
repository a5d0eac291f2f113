/**
 * The one-pass kernel of the base, pivot and roll finger (solveSteeredFinger) against the stage functions it
 * stands in for: solveFull (or solveFullRates in a run) and then solveSteerAndRoll, on seeded hands and poses.
 * It keeps their operation order, so every number must come out the same to the bit (+0 and -0 told apart).
 * The stage functions themselves are held against outside references (gl-matrix, mathjs, ml-matrix and the
 * textbook formulas named there) in solve-reference.test.ts, full-solution.test.ts and steer-and-roll.test.ts.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { computeContact, createContact, createContactWorkspace } from '../../../src/lib/kinematics/contact';
import { createFullSolution, createFullSolveWorkspace, solveFull, solveFullRates } from '../../../src/lib/kinematics/full-solution';
import { forwardKinematics } from '../../../src/lib/kinematics/hand';
import { createScene } from '../../../src/lib/kinematics/scene';
import { createSteerAndRoll, createSteerWorkspace, solveSteerAndRoll } from '../../../src/lib/kinematics/steer-and-roll';
import { isSteeredFinger, solveSteeredFinger } from '../../../src/lib/kinematics/steered-finger';
import { HAND_TEMPLATES, createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { SheetDocument } from '../../../src/lib/sheet/types';
import { component, shapeArbitrary, vector } from './seeded-sheets';

/**
 * Every template (ball and wheel rollers) on any shape, with joint angles within 0.6 rad of the template's; twists
 * that are random, purely rotational or zero (the pivot then stays, the unturned branch); undamped solves in a quarter
 * of the cases, where a contact on the pivot axis leaves the normal equations singular and the general SVD route runs.
 */
const sheetArbitrary = fc
  .record({
    template: fc.constantFrom(...HAND_TEMPLATES.map((t) => t.id)),
    shape: shapeArbitrary,
    linear: vector(0.02),
    angular: vector(0.6),
    twist: fc.constantFrom('random', 'rotation', 'rest'),
    angles: fc.array(component(0.6), { minLength: 15, maxLength: 15 }),
    undamped: fc.integer({ min: 0, max: 3 }),
  })
  .map(({ template, shape, linear, angular, twist, angles, undamped }) => {
    const doc = createSheetFromTemplate(template, shape);
    doc.object.twist = twist === 'rest' ? { linear: [0, 0, 0], angular: [0, 0, 0] } : { linear: twist === 'random' ? linear : [0, 0, 0], angular };
    let a = 0;
    for (const finger of doc.hand.fingers) for (const joint of finger.joints) joint.angle += angles[a++ % angles.length];
    if (undamped === 0) doc.solver.damping = 0;
    return doc;
  });

/** 64 hands and poses, the same on every run. */
const CASES: SheetDocument[] = fc.sample(sheetArbitrary, { numRuns: 64, seed: 20261203 });

describe('solveSteeredFinger', () => {
  it('writes what solveFull and solveSteerAndRoll write, to the bit, in reports and in runs', () => {
    const seen = { fingers: 0, turned: 0, unturned: 0, pivotDrives: 0, pivotThroughContact: 0, undampedNearRankLoss: 0 };
    for (const doc of CASES) {
      const scene = createScene(doc);
      const contactWorkspace = createContactWorkspace();
      for (const finger of scene.fingers) {
        forwardKinematics(finger);
        const contact = computeContact(scene.object, finger, scene.settings, createContact(), contactWorkspace);
        for (const report of [true, false]) {
          const fusedFull = createFullSolution(finger.jointCount), fusedSteer = createSteerAndRoll(finger);
          expect(isSteeredFinger(finger, fusedSteer, scene.settings)).toBe(true);
          solveSteeredFinger(finger, contact, scene.settings, fusedFull, fusedSteer, createFullSolveWorkspace(3), createSteerWorkspace(3), report);
          const stagedFull = createFullSolution(finger.jointCount), stagedSteer = createSteerAndRoll(finger);
          if (report) solveFull(finger, contact, scene.object.angularVelocity, scene.settings, stagedFull, createFullSolveWorkspace(3));
          else solveFullRates(finger, contact, scene.object.angularVelocity, scene.settings, stagedFull, createFullSolveWorkspace(3));
          solveSteerAndRoll(finger, contact, stagedFull, scene.settings, stagedSteer, createSteerWorkspace(3), report);
          expect(fusedFull).toStrictEqual(stagedFull);
          expect(fusedSteer).toStrictEqual(stagedSteer);
        }
        seen.fingers++;
        const steer = createSteerAndRoll(finger);
        const full = solveFull(finger, contact, scene.object.angularVelocity, scene.settings, createFullSolution(3), createFullSolveWorkspace(3));
        solveSteerAndRoll(finger, contact, full, scene.settings, steer, createSteerWorkspace(3));
        if (steer.pivotChange !== 0) seen.turned++;
        else seen.unturned++;
        if (steer.pivotDrives) seen.pivotDrives++;
        else seen.pivotThroughContact++;
        // sigma_3 / sigma_1 below 1e-4 puts the last Cholesky pivot of J J^T below 1e-8 of the largest, where the SVD route takes over.
        if (scene.settings.damping === 0 && full.singularValues[2] < 1e-4 * full.singularValues[0]) seen.undampedNearRankLoss++;
      }
    }
    // Each branch of the kernel must have run: turned and unturned pivots, pivots that drive and pivots through the contact, undamped solves near rank loss.
    expect(seen.fingers).toBeGreaterThanOrEqual(2 * CASES.length);
    for (const count of Object.values(seen)) expect(count).toBeGreaterThan(0);
  });

  it('is not taken for a soft finger, whose spin row the damped solve needs', () => {
    const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
    const scene = createScene({ ...doc, solver: { ...doc.solver, softFinger: true } });
    const finger = scene.fingers[0];
    expect(isSteeredFinger(finger, createSteerAndRoll(finger), scene.settings)).toBe(false);
    expect(isSteeredFinger(finger, createSteerAndRoll(finger), { ...scene.settings, softFinger: false })).toBe(true);
  });
});
