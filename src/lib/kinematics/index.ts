/**
 * Contact kinematics of a hand with actively driven rolling fingertips: the public API.
 *
 * Conventions: SI units (m, rad, s); every vector in the palm (world) frame unless its name says
 * otherwise (`...Local` = object frame for object points, roller frame for roller points);
 * quaternions internally [x, y, z, w], in sheets {w, x, y, z}; matrices row-major.
 *
 * One-off use:
 *
 *     const result = solveSheet(doc);          // SheetDocument from the sheet schema
 *     result.fingers[0].full.rates             // joint rates, rad/s (Float64Array, joint order of the sheet)
 *     result.warnings                          // SheetWarning[] {code, severity, finger?, joint?, message, value, threshold}
 *
 * Repeated use (runs, sweeps, benchmarks) without allocation:
 *
 *     const scene = createScene(doc);          // compiles the sheet; owns all scratch space
 *     const out = createResult(scene);         // reusable result
 *     setObjectPose(scene, p, q);              // or write scene.object.position / .orientation ([x,y,z,w]) directly
 *     setObjectTwist(scene, v, w);             // or scene.object.linearVelocity / .angularVelocity
 *     setJointAngles(scene, i, angles);        // or scene.fingers[i].angles
 *     solveScene(scene, out);                  // fills out in place and returns it
 *
 * scene.settings is a copy of doc.solver and may be changed between solves. A SheetResult holds
 * the object state used (result.object), then per finger (FingerResult): the joint angles used, current joint axes and points, roller centre
 * and axis, the contact (Contact: object point x, normal n, gap and state, roller point y with
 * latitude/longitude on the roller, object velocity at x split into normal and tangential parts,
 * distances to the roll and pivot axes), the full damped least-squares solution (FullSolution:
 * Jacobian, rates, residual, singular values, condition number, manipulability) and the
 * steer-and-roll solution (SteerAndRoll: base rate, pivot change and angle, roll rate,
 * conditioning before and after steering, the drive columns' singular values and ratio after
 * steering, residual and the difference from the full rates), and which Jacobian rank loss and
 * slip are judged on (rankBasis 'steered' when steer-and-roll is available, else 'full', with
 * rankRatio);
 * then the grasp (GraspResult: contact map, rank, undrivable object twists) and the warnings,
 * whose catalogue is WARNING_CATALOGUE. toPlainResult turns a result into JSON-ready arrays.
 */
export * as vec3 from './vec3';
export type { Vec3, Vec3Like } from './vec3';
export * as quat from './quat';
export type { QuatLike, Quat, Mat3 } from './quat';
export {
  boxShape, capsuleShape, closestSurfacePoint, createSurfaceQuery, cylinderShape, ellipsoidShape, shapeFromInput,
  signedDistance, sphereShape, support,
} from './shapes';
export type { ConvexShape, ShapeKind, SurfaceQuery } from './shapes';
export { createGjkResult, createGjkWorkspace, gjkDistance, posedShape, supportPosed } from './gjk';
export type { GjkResult, GjkWorkspace, PosedShape } from './gjk';
export { createFinger, forwardKinematics, jointExponential } from './hand';
export type { Finger, RollerKind } from './hand';
export {
  computeContact, createContact, createContactWorkspace, createObject, distanceToAxis, objectPointVelocity, updateObjectRotation,
} from './contact';
export type { Contact, ContactState, ContactWorkspace, RigidObject } from './contact';
export {
  contactJacobian, createFullSolution, createSolveWorkspace, createSteerAndRoll, jacobianSingularValues, largestEigenvalue3,
  solveFull, solveSteerAndRoll, symmetricEigen3, symmetricEigen3Packed,
} from './solve';
export type { FullSolution, SolveWorkspace, SteerAndRoll } from './solve';
export {
  checkFinger, checkGrasp, clearWarnings, createWarningList, finishWarnings, formatWarning, judgedBasis, judgedRankRatio, judgedSlip, raiseWarning,
  slipTolerance, SLIP_RELATIVE_TOLERANCE, WARNING_CATALOGUE,
} from './warnings';
export type { JudgedBasis, SheetWarning, WarningCode, WarningInfo, WarningList, WarningSeverity } from './warnings';
export { computeGrasp, createGraspResult, createGraspWorkspace } from './grasp';
export type { GraspResult, GraspWorkspace } from './grasp';
export {
  createResult, createScene, setJointAngles, setObjectPose, setObjectTwist, solveScene, solveSheet, toPlainResult,
} from './scene';
export type { FingerResult, PlainSheetResult, Scene, SceneWorkspace, SheetResult } from './scene';
export { ROTATION_METRICS } from './metrics';
export { runSheet, toPlainRunRecord, warningsAt } from './run';
export type { RunRecord } from './run';
export { sweepSheet } from './sweep';
export type { SweepRecord } from './sweep';
