/**
 * A sheet compiled for repeated solving: typed arrays for the object pose and twist and for every
 * finger's joint angles, which run loops overwrite between solves, and scratch space so that
 * solveScene(scene, out) allocates nothing.
 */
import type { CommandedRates } from '../sheet/commanded';
import type { FingerInput, SheetDocument, SolverSettings } from '../sheet/types';
import type { FingerAcceleration } from './acceleration';
import { keepLatest, mapPacked } from './hidden-classes';
import { computeContact, createContact, createContactWorkspace, createObject, updateObjectRotation, type Contact, type ContactWorkspace, type RigidObject } from './contact';
import type { ContactCurvature } from './curvature';
import { computeGrasp, createGraspResult, createGraspWorkspace, type GraspResult, type GraspWorkspace } from './grasp';
import { computeGraspQuality, type GraspQuality, type GraspQualityInput } from './grasp-quality';
import { createFinger, forwardKinematics, type Finger } from './hand';
import { conditionFull, createFullSolution, createFullSolveWorkspace, solveFull, solveFullRates, type FullSolution } from './full-solution';
import { matrixToRows, numericalRank, type LinalgWorkspace, type Matrix } from './linalg';
import { createSteerAndRoll, createSteerWorkspace, solveSteerAndRoll, type SteerAndRoll, type SteerWorkspace } from './steer-and-roll';
import { isSteeredFinger, solveSteeredFinger } from './steered-finger';
import {
  checkFinger, checkGrasp, clearWarnings, createWarningList, finishWarnings, judgedBasis, judgedRankRatio, SEVERITY_LEVELS,
  type JudgedBasis, type SheetWarning, type WarningList, type WarningSeverity,
} from './warnings';
import type { Vec3Like } from './vec3';

/** A compiled sheet. Mutate object and finger angles in place, then call solveScene. */
export interface Scene {
  document: SheetDocument;
  object: RigidObject;
  fingers: Finger[];
  settings: SolverSettings;
  workspace: SceneWorkspace;
}

/** Scratch owned by a scene. */
export interface SceneWorkspace {
  contact: ContactWorkspace;
  full: LinalgWorkspace;
  steer: SteerWorkspace;
  grasp: GraspWorkspace;
  contactPoints: Float64Array;
  contactNormals: Float64Array;
}

/** Everything computed for one finger (world frame, SI). */
export interface FingerResult {
  name: string;
  jointNames: string[];
  /** Joint angles used, rad; current joint axes (unit) and axis points (m), 3 per joint. */
  jointAngles: Float64Array;
  jointAxes: Float64Array;
  jointPoints: Float64Array;
  /** Roller centre, m, and roller axis (unit; zero for a sphere roller without a roll joint). */
  rollerCenter: Float64Array;
  rollerAxis: Float64Array;
  contact: Contact;
  full: FullSolution;
  steer: SteerAndRoll;
  /** Jacobian that rank loss and slip are judged on: 'steered' (drive columns after steering) when steer-and-roll is available, else 'full'. */
  rankBasis: JudgedBasis;
  /** sigma_min / sigma_max of that Jacobian, compared with the singular-ratio setting (dimensionless). */
  rankRatio: number;
  /** Acceleration feed-forward, filled once per evaluation by solveAccelerations; solveScene, runs and sweeps leave it absent. */
  acceleration?: FingerAcceleration;
  /** Numerical rank of the steered drive columns (steer.driveSingularValues above full.rankTolerance), 0 to 3; 0 without steer-and-roll. */
  driveRank: number;
}

/** The result of solving a sheet once. */
export interface SheetResult {
  /** Object state used: origin (m), orientation [x, y, z, w], origin velocity (m/s), angular velocity (rad/s). */
  object: { position: Float64Array; orientation: Float64Array; linearVelocity: Float64Array; angularVelocity: Float64Array };
  fingers: FingerResult[];
  grasp: GraspResult;
  /** Grasp quality under friction; set once per evaluation from computeSheetGraspQuality, absent from solveScene's results (runs and sweeps). */
  graspQuality?: GraspQuality;
  /** Raised warnings, in finger order, then the grasp warning. */
  warnings: SheetWarning[];
  worstSeverity: WarningSeverity | 'none';
  /** Pool behind `warnings`; reused by the next solve into this result. */
  warningList: WarningList;
}

/** Compiles a finger input for a scene (palm frame, SI): createFinger, or a compiler that hands out fingers compiled before (createFingerCompiler). */
export type FingerCompiler = (input: Readonly<FingerInput>) => Finger;

/** Compiles a sheet document into a reusable scene (world frame, SI), each finger by `compileFinger`. */
export function createScene(doc: SheetDocument, compileFinger: FingerCompiler = createFinger): Scene {
  const fingers = mapPacked(doc.hand.fingers, compileFinger);
  const maxJoints = fingers.reduce((m, f) => Math.max(m, f.jointCount), 1);
  const count = Math.max(1, fingers.length);
  return keepLatest('scene', {
    document: doc,
    object: createObject(doc.object),
    fingers,
    settings: solverSettings(doc.solver),
    workspace: {
      contact: createContactWorkspace(),
      full: createFullSolveWorkspace(maxJoints),
      steer: createSteerWorkspace(maxJoints),
      grasp: createGraspWorkspace(),
      contactPoints: new Float64Array(3 * count),
      contactNormals: new Float64Array(3 * count),
    },
  });
}

/** A copy of the sheet's solver settings with every field in one order, so that every scene's settings share one hidden class (an object spread does not ensure it). */
function solverSettings(solver: SolverSettings): SolverSettings {
  return {
    damping: solver.damping,
    singularRatio: solver.singularRatio,
    axisDistance: solver.axisDistance,
    minTangentialSpeed: solver.minTangentialSpeed,
    contactTolerance: solver.contactTolerance,
    softFinger: solver.softFinger,
  };
}

/** Empty result shaped for the scene, to pass as `out` to solveScene. */
export function createResult(scene: Scene): SheetResult {
  const warningList = createWarningList();
  return keepLatest('result', {
    object: { position: new Float64Array(3), orientation: new Float64Array(4), linearVelocity: new Float64Array(3), angularVelocity: new Float64Array(3) },
    fingers: mapPacked(scene.fingers, (f) => ({
      name: f.name,
      jointNames: f.jointNames.slice(),
      jointAngles: new Float64Array(f.jointCount),
      jointAxes: new Float64Array(3 * f.jointCount),
      jointPoints: new Float64Array(3 * f.jointCount),
      rollerCenter: new Float64Array(3),
      rollerAxis: new Float64Array(3),
      contact: createContact(),
      full: createFullSolution(f.jointCount),
      steer: createSteerAndRoll(f),
      rankBasis: 'full' as JudgedBasis,
      rankRatio: 0,
      driveRank: 0,
    })),
    grasp: createGraspResult(Math.max(1, scene.fingers.length)),
    warnings: warningList.items,
    worstSeverity: 'none',
    warningList,
  });
}

/**
 * What a solve computes: 'report' every output; 'run' what a run records and its warnings need, leaving out the contact's
 * roller-frame point, latitude and longitude, the joint snapshot, the drive columns' rank, the singular values and condition number
 * after steering and the steer-and-roll rates' difference from the full rates, and for fingers judged after steering
 * the full Jacobian's singular values, rank, condition number and manipulability (steer.conditionBefore then copies a stale
 * value); those keep their previous values.
 */
export type SolveDetail = 'report' | 'run';

/** Solves every finger's contact, full and steer-and-roll rates, the grasp and the warnings at the scene's current state (world frame, SI). */
export function solveScene(scene: Scene, out: SheetResult = createResult(scene), detail: SolveDetail = 'report'): SheetResult {
  const { object, fingers, settings, workspace } = scene;
  updateObjectRotation(object);
  copyInto(object.position, out.object.position);
  copyInto(object.orientation, out.object.orientation);
  copyInto(object.linearVelocity, out.object.linearVelocity);
  copyInto(object.angularVelocity, out.object.angularVelocity);
  const list = out.warningList;
  clearWarnings(list);
  const points = workspace.contactPoints, normals = workspace.contactNormals;
  const count = fingers.length;
  // Stage by stage over all fingers rather than finger by finger: each stage's compiled code then
  // stays in the instruction cache for every finger, which measurably speeds up the whole solve.
  const report = detail === 'report';
  for (let i = 0; i < count; i++) forwardKinematics(fingers[i]);
  for (let i = 0; i < count; i++) computeContact(object, fingers[i], settings, out.fingers[i].contact, workspace.contact, report);
  // The usual finger (base, pivot, roll; point contact) takes one kernel for both solutions; any other the two stages.
  for (let i = 0; i < count; i++) {
    const r = out.fingers[i];
    if (isSteeredFinger(fingers[i], r.steer, settings)) solveSteeredFinger(fingers[i], r.contact, settings, r.full, r.steer, workspace.full, workspace.steer, report);
    else if (report) solveFull(fingers[i], r.contact, object.angularVelocity, settings, r.full, workspace.full);
    else solveFullRates(fingers[i], r.contact, object.angularVelocity, settings, r.full, workspace.full);
  }
  for (let i = 0; i < count; i++) {
    const r = out.fingers[i];
    if (!isSteeredFinger(fingers[i], r.steer, settings)) {
      solveSteerAndRoll(fingers[i], r.contact, r.full, settings, r.steer, workspace.steer, report);
      // A run needs the full Jacobian's conditioning only where the warnings judge rank on it.
      if (!report && !r.steer.available) conditionFull(r.full);
    }
    r.rankBasis = judgedBasis(r.steer);
    r.rankRatio = judgedRankRatio(r.full, r.steer);
    if (report) r.driveRank = r.steer.available ? numericalRank(r.steer.driveSingularValues, 3, r.full.rankTolerance) : 0;
  }
  for (let i = 0; i < count; i++) {
    const r = out.fingers[i];
    if (report) snapshotJoints(fingers[i], r);
    const x = r.contact.objectPoint, n = r.contact.normal;
    points[3 * i] = x[0]; points[3 * i + 1] = x[1]; points[3 * i + 2] = x[2];
    normals[3 * i] = n[0]; normals[3 * i + 1] = n[1]; normals[3 * i + 2] = n[2];
  }
  for (let i = 0; i < count; i++) {
    const r = out.fingers[i];
    checkFinger(list, i, fingers[i], r.contact, r.full, r.steer, settings);
  }
  computeGrasp(object.position, points, normals, count, settings, out.grasp, workspace.grasp);
  checkGrasp(list, out.grasp);
  out.warnings = finishWarnings(list);
  out.worstSeverity = SEVERITY_LEVELS[list.worstRank];
  return out;
}

/** Compiles and solves a sheet in one call (world frame, SI), each finger by `compileFinger`. */
export function solveSheet(doc: SheetDocument, compileFinger: FingerCompiler = createFinger): SheetResult {
  return solveScene(createScene(doc, compileFinger));
}

/**
 * A finger compiler for the one-off solves of one editor's documents (solveSheet), which share the finger inputs an edit
 * left alone: the same input object gives the finger compiled from it before. A solve changes nothing in a finger but
 * what forwardKinematics computes from its angles, so such a finger is the one createFinger would give; a scene whose
 * joint angles are changed (a run) must compile its own.
 */
export function createFingerCompiler(): FingerCompiler {
  const compiled = new WeakMap<Readonly<FingerInput>, Finger>();
  return (input) => {
    let finger = compiled.get(input);
    if (finger === undefined) {
      finger = createFinger(input);
      compiled.set(input, finger);
    }
    return finger;
  };
}

/** Friction coefficient of a finger that states none (dimensionless): rubber on cardboard, about 0.5 (common practice). */
export const DEFAULT_FRICTION = 0.5;
/** Cone edges when the sheet states no grasp-quality settings. */
export const DEFAULT_CONE_EDGES = 8;

/** What the grasp quality of a solved sheet is computed from: its touching (or penetrating) contacts, their friction and the settings (world frame, SI). */
export function sheetGraspQualityInput(doc: SheetDocument, result: SheetResult): GraspQualityInput {
  const points: number[] = [], normals: number[] = [], friction: number[] = [];
  result.fingers.forEach((f, i) => {
    if (f.contact.state === 'separated') return;
    points.push(...f.contact.objectPoint);
    normals.push(...f.contact.normal);
    friction.push(doc.hand.fingers[i].friction ?? DEFAULT_FRICTION);
  });
  const settings = doc.graspQuality;
  return {
    origin: result.object.position,
    points,
    normals,
    friction,
    contactCount: friction.length,
    coneEdges: settings?.coneEdges ?? DEFAULT_CONE_EDGES,
    torsionalFriction: doc.solver.softFinger ? (settings?.torsionalFriction ?? 0) : 0,
    torqueLength: settings?.torqueLength,
  };
}

/** Grasp quality under friction of the touching (or penetrating) contacts of a solved sheet, once per evaluation, never per tick (world frame, SI). */
export function computeSheetGraspQuality(doc: SheetDocument, result: SheetResult): GraspQuality {
  return computeGraspQuality(sheetGraspQualityInput(doc, result));
}

/** Sets the object pose: origin (m) and orientation quaternion [x, y, z, w] (world frame). */
export function setObjectPose(scene: Scene, position: Vec3Like, orientation: ArrayLike<number>): void {
  const o = scene.object;
  o.position[0] = position[0]; o.position[1] = position[1]; o.position[2] = position[2];
  o.orientation[0] = orientation[0]; o.orientation[1] = orientation[1]; o.orientation[2] = orientation[2]; o.orientation[3] = orientation[3];
}

/** Sets the object twist: origin velocity (m/s) and angular velocity (rad/s), world frame. */
export function setObjectTwist(scene: Scene, linear: Vec3Like, angular: Vec3Like): void {
  const o = scene.object;
  o.linearVelocity[0] = linear[0]; o.linearVelocity[1] = linear[1]; o.linearVelocity[2] = linear[2];
  o.angularVelocity[0] = angular[0]; o.angularVelocity[1] = angular[1]; o.angularVelocity[2] = angular[2];
}

/** Sets one finger's joint angles (rad). */
export function setJointAngles(scene: Scene, fingerIndex: number, angles: ArrayLike<number>): void {
  const finger = scene.fingers[fingerIndex];
  for (let k = 0; k < finger.jointCount; k++) finger.angles[k] = angles[k];
}

type Plain<T> = T extends Float64Array
  ? number[]
  : T extends WarningList
    ? never
    : T extends { data: Float64Array; rows: number; cols: number }
      ? number[][]
      : T extends (infer U)[]
        ? Plain<U>[]
        : T extends object
          ? { [K in keyof T as T[K] extends WarningList ? never : K]: Plain<T[K]> }
          : T;

/**
 * SheetResult with typed arrays as plain arrays and matrices as rows (JSON-ready). The evaluation
 * pipeline adds each finger's contact curvature (sheetCurvature) and the commanded rates (sheet/commanded.ts); runs and sweeps leave them out.
 */
export type PlainSheetResult = Omit<Plain<SheetResult>, 'fingers'> & { fingers: PlainFingerResult[]; commanded?: CommandedRates };

/** FingerResult JSON-ready, with the contact curvature the evaluation pipeline adds. */
export type PlainFingerResult = Plain<FingerResult> & { curvature?: ContactCurvature };

/**
 * JSON-ready copy of a result: Float64Arrays become arrays, matrices become arrays of rows, non-finite numbers stay as they are;
 * a finger with an entry in `converted` takes it as it is (an earlier evaluation's copy of the same finger's result).
 */
export function toPlainResult(result: SheetResult, converted: readonly (PlainFingerResult | undefined)[] = []): PlainSheetResult {
  const plain: Record<string, unknown> = {};
  for (const key in result) {
    if (key === 'warningList') continue;
    plain[key] = key === 'fingers'
      ? mapPacked(result.fingers, (finger, i) => converted[i] ?? toPlain(finger))
      : toPlain(result[key as keyof SheetResult]);
  }
  return plain as PlainSheetResult;
}

/** Runs once per evaluation over every number of the result: plain loops, since Array.from and Object.entries allocate per element. */
function toPlain(value: unknown): unknown {
  if (value instanceof Float64Array) {
    const out = new Array<number>(value.length);
    for (let i = 0; i < value.length; i++) out[i] = value[i];
    return out;
  }
  if (Array.isArray(value)) {
    const out = new Array<unknown>(value.length);
    for (let i = 0; i < value.length; i++) out[i] = toPlain(value[i]);
    return out;
  }
  if (value !== null && typeof value === 'object') {
    const record = value as Record<string, unknown>;
    if (record.data instanceof Float64Array && typeof record.rows === 'number' && typeof record.cols === 'number') return matrixToRows(record as unknown as Matrix);
    const out: Record<string, unknown> = {};
    // for...in rather than Object.keys: no array of names per object (a result has no inherited enumerable keys).
    for (const key in record) {
      if (key === 'warningList') continue;
      out[key] = toPlain(record[key]);
    }
    return out;
  }
  return value;
}

/** Element-wise copy without TypedArray.prototype.set, whose call overhead dominates for a few elements. */
function copyInto(from: Float64Array, to: Float64Array): void {
  for (let i = 0, n = from.length; i < n; i++) to[i] = from[i];
}

/** Copies the joint angles, axes and points and the roller centre and axis that a solve used into the finger's result, in one pass over the joints. */
function snapshotJoints(finger: Finger, r: FingerResult): void {
  const angles = finger.angles, axes = finger.axes, points = finger.points;
  const toAngles = r.jointAngles, toAxes = r.jointAxes, toPoints = r.jointPoints;
  for (let k = 0, o = 0; k < finger.jointCount; k++, o += 3) {
    toAngles[k] = angles[k];
    toAxes[o] = axes[o]; toAxes[o + 1] = axes[o + 1]; toAxes[o + 2] = axes[o + 2];
    toPoints[o] = points[o]; toPoints[o + 1] = points[o + 1]; toPoints[o + 2] = points[o + 2];
  }
  const c = finger.rollerCenter, a = finger.rollerAxis, toCenter = r.rollerCenter, toAxis = r.rollerAxis;
  toCenter[0] = c[0]; toCenter[1] = c[1]; toCenter[2] = c[2];
  toAxis[0] = a[0]; toAxis[1] = a[1]; toAxis[2] = a[2];
}
