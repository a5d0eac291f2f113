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
 * steer-and-roll solution (SteerAndRoll: base rates shared over the base joints by the minimum-norm rule, pivot change and angle, roll rate,
 * conditioning before and after steering, the drive columns' singular values and ratio after
 * steering, residual and the difference from the full rates), and which Jacobian rank loss and
 * slip are judged on (rankBasis 'steered' when steer-and-roll is available, else 'full', with
 * rankRatio);
 * then the grasp (GraspResult: contact map, rank, undrivable object twists), once per evaluation
 * from computeSheetGraspQuality(doc, result) the grasp quality under friction (GraspQuality: force closure, Ferrari-Canny Q_L1 and Q_Linf,
 * the weakest external wrench and its words), and the warnings,
 * whose catalogue is WARNING_CATALOGUE. toPlainResult turns a result into JSON-ready arrays.
 * solveAccelerations(result, doc.object.acceleration, doc.solver, sheetCurvature(doc, result), doc.hand.fingers) adds
 * each finger's acceleration feed-forward (FingerAcceleration: object point acceleration, J_dot q_dot,
 * rolling term, joint accelerations, and the contact model used) and of its steer-and-roll solution
 * (SteerAcceleration: pivot rate, base and roll accelerations, or why they are not defined) once per
 * evaluation; solveScene never computes it.
 *
 * Runs and sweeps:
 *
 *     const record = runSheet(doc);              // closed-loop run toward motion.target (runScene for a compiled scene)
 *     record.orientationError                    // per tick, one value per ROTATION_METRICS entry, in its order
 *     warningsAt(record, tick);                  // warning codes raised at that tick
 *     toPlainRunRecord(record);                  // JSON-ready copy
 *     sweepSheet(doc, { path, from, to, steps }); // SweepRecord: one plain result per value of one input
 *     spreadAxisRotations(n, angle), randomRotations(n, seed)  // target sets of a test matrix, [x, y, z, w] each
 *
 * Once per evaluation (never per tick): sheetCurvature(doc, result) gives each contact's principal
 * curvatures of object and roller, their relative curvature and how fast the contact point moves
 * over both surfaces (Montana's contact equations), as plain arrays.
 *
 * Also here: the shape queries and the vec3 and quat helpers that drawing and templates use, and
 * the dense linear algebra behind the solves (matrices, damped least squares, Jacobi singular
 * values, with their workspace) for callers with their own Jacobians. The scene, contact, GJK
 * and solve workspaces, the per-solve kernels and the warning bookkeeping stay inside the core;
 * code outside src/lib/kinematics imports only this file.
 */
export * as vec3 from './vec3';
export type { Vec3, Vec3Like } from './vec3';
export * as quat from './quat';
export type { QuatLike, Quat, Mat3 } from './quat';
export { closestSurfacePoint, shapeFromInput, signedDistance, support } from './shapes';
export type { ConvexShape, ShapeKind, SurfaceQuery } from './shapes';
export { createLinalgWorkspace, createMatrix, dampedLeastSquares, matrixFromRows, matrixToRows, singularValues } from './linalg';
export type { LinalgWorkspace, Matrix } from './linalg';
export type { Contact, ContactState } from './contact';
export type { FullSolution } from './full-solution';
export { steeredColumns } from './steer-and-roll';
export type { SteerAndRoll } from './steer-and-roll';
export type { GraspResult } from './grasp';
export { SEVERITY_LEVELS, WARNING_CATALOGUE, WARNING_CODES } from './warnings';
export type { JudgedBasis, SheetWarning, WarningCode, WarningInfo, WarningSeverity } from './warnings';
export { computeGraspQuality, describeWrench, FORCE_CLOSURE_TOLERANCE, MAX_FACE_COMBINATIONS } from './grasp-quality';
export type { GraspQuality, GraspQualityInput } from './grasp-quality';
export {
  computeSheetGraspQuality, sheetGraspQualityInput, createFingerCompiler, createResult, createScene, DEFAULT_CONE_EDGES, DEFAULT_FRICTION, setJointAngles, setObjectPose, setObjectTwist, solveScene, solveSheet, toPlainResult,
} from './scene';
export type { FingerCompiler, FingerResult, PlainFingerResult, PlainSheetResult, Scene, SheetResult } from './scene';
export { createFingerAcceleration, jacobianRateTimesRates, objectPointAcceleration, rollingTerm, solveAccelerations, solveFingerAcceleration } from './acceleration';
export type { AccelerationModel, FingerAcceleration } from './acceleration';
export { solveSteerAcceleration } from './steer-acceleration';
export type { SteerAcceleration, SteerAccelerationStatus } from './steer-acceleration';
export { runScene, runSheet, SOLUTION_KINDS, toPlainRunRecord, warningsAt } from './run';
export type { RunOptions, RunRecord, RunStopReason } from './run';
export { createRandom, nextGaussian } from './random';
export type { RandomSource } from './random';
export { sweepSheet, sweepValues } from './sweep';
export type { SweepOptions, SweepRecord } from './sweep';
export { ROTATION_METRICS, rotationDistances } from './metrics';
export { fibonacciAxes, randomRotations, spreadAxisRotations } from './target-sets';
export type { RotationMetric } from './metrics';
export { sheetCurvature, SINGULAR_CURVATURE_RATIO } from './curvature';
export type { ContactCurvature, ContactWander, RelativeCurvature, SurfaceCurvature, SurfaceRegion } from './curvature';
