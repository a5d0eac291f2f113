/**
 * Acceleration feed-forward at one contact (world frame, SI). The velocity solve makes the roller's
 * material point at y move with the object's material point at x, J(q) q_dot = v_o(x), at every
 * instant, for the contact points of that instant. Differentiating it along the contact as it moves
 * over both surfaces (u_o = c_dot - v_o(x) over the object, u_f = c_dot - v_f(y) over the roller,
 * from Montana's contact equations in curvature.ts) gives, with r = x - p,
 * J q_ddot + J_dot q_dot = a_x + omega_o x u_o - omega_f x u_f, a_x = a_o + alpha x r + omega x (omega x r)
 * (rigid-body acceleration, Craig 2005, ch. 6; J_dot q_dot, Siciliano et al. 2009, sec. 3.1): the
 * rate of a rigid body's velocity field at a moving point is its acceleration there plus omega times
 * the point's velocity relative to the body. Without slip u_o = u_f = u and the rolling term is
 * (omega_o - omega_f) x u. Where the contact point's motion is not defined (a line contact, a sharp
 * edge, no touch) the two material points' accelerations are matched and the model says so.
 */
import type { FingerInput, ObjectAcceleration, SolverSettings } from '../sheet/types';
import { applyShapeOperator, type ContactCurvature } from './curvature';
import { createLinalgWorkspace, dampedLeastSquares, type LinalgWorkspace } from './linalg';
import type { FingerResult, SheetResult } from './scene';
import { createSteerAcceleration, solveSteerAcceleration, type SteerAcceleration } from './steer-acceleration';
import { cross } from './vec3';

/**
 * How the roller is made to follow the object: 'rolling-contact' matches the contact as it moves over
 * both surfaces (exact for sustained rolling); 'material-points' matches the accelerations of the two
 * points touching at this instant, used where the contact point's motion is not defined.
 */
export type AccelerationModel = 'rolling-contact' | 'material-points';

/** Acceleration feed-forward of one finger from its full-solution joint rates (world frame, SI). */
export interface FingerAcceleration {
  /** The contact model the joint accelerations follow. */
  model: AccelerationModel;
  /** Acceleration of the object's material point at x, a_o + alpha x r + omega x (omega x r), m/s^2. */
  objectPoint: Float64Array;
  /** Its centripetal part omega x (omega x r), m/s^2. */
  centripetal: Float64Array;
  /** J_dot q_dot: acceleration of the roller's material point at y at the current joint rates with no joint acceleration, m/s^2. */
  jacobianRate: Float64Array;
  /** Angular acceleration of the last link at no joint acceleration, sum_k omega_k_dot q_dot_k, rad/s^2. */
  linkAngularRate: Float64Array;
  /** omega_o x u_o - omega_f x u_f: the rolling term, m/s^2; zero for the material-point model. */
  rollingTerm: Float64Array;
  /** n_dot . (omega_o - omega_f), rad/s^2: the turn of the normal in the soft-finger row; zero without that row or for the material-point model. */
  spinRollingTerm: number;
  /** Rows solved: 3, or 4 with the soft-finger row. */
  rows: number;
  /** Right-hand side a_x + rolling term - J_dot q_dot (m/s^2), then for a soft finger n . (alpha - sum_k omega_k_dot q_dot_k) + n_dot . (omega_o - omega_f) (rad/s^2). */
  target: Float64Array;
  /** Joint accelerations q_ddot, rad/s^2, in the joint order of the sheet. */
  jointAccelerations: Float64Array;
  /** J q_ddot + J_dot q_dot: the roller material point's acceleration, m/s^2. */
  achieved: Float64Array;
  /** Norm of a_x + rolling term - achieved, m/s^2: the acceleration the joints cannot follow. */
  residualNorm: number;
  /** Feed-forward of the steer-and-roll solution: pivot rate, base and roll accelerations, or why they are not defined. */
  steer: SteerAcceleration;
}

/** Acceleration of the object's material point at x: a + alpha x r + omega x (omega x r), r = x - p (world frame, m/s^2); centripetalOut gets omega x (omega x r). */
export function objectPointAcceleration(
  linear: ArrayLike<number>, angular: ArrayLike<number>, angularVelocity: ArrayLike<number>, origin: ArrayLike<number>, x: ArrayLike<number>,
  out: Float64Array = new Float64Array(3), centripetalOut: Float64Array = new Float64Array(3),
): Float64Array {
  const rx = x[0] - origin[0], ry = x[1] - origin[1], rz = x[2] - origin[2];
  const wx = angularVelocity[0], wy = angularVelocity[1], wz = angularVelocity[2];
  const vx = wy * rz - wz * ry, vy = wz * rx - wx * rz, vz = wx * ry - wy * rx;
  centripetalOut[0] = wy * vz - wz * vy;
  centripetalOut[1] = wz * vx - wx * vz;
  centripetalOut[2] = wx * vy - wy * vx;
  const ax = angular[0], ay = angular[1], az = angular[2];
  out[0] = linear[0] + ay * rz - az * ry + centripetalOut[0];
  out[1] = linear[1] + az * rx - ax * rz + centripetalOut[1];
  out[2] = linear[2] + ax * ry - ay * rx + centripetalOut[2];
  return out;
}

// Revolute joints, axes and points packed 3 per joint: the axis of joint k turns with the joints
// before it, w_k_dot = W_k x w_k with W_k = sum_{j<k} q_dot_j w_j; its point moves with them,
// r_k_dot = sum_{j<k} q_dot_j w_j x (r_k - r_j); and y moves with the last link, y_dot = J q_dot.
/** J_dot q_dot = sum_k q_dot_k [w_k_dot x (y - r_k) + w_k x (y_dot - r_k_dot)] for the last link's material point y (world frame, m/s^2); angularOut gets sum_k q_dot_k w_k_dot (rad/s^2). */
export function jacobianRateTimesRates(
  axes: ArrayLike<number>, points: ArrayLike<number>, jointCount: number, y: ArrayLike<number>, rates: ArrayLike<number>,
  out: Float64Array = new Float64Array(3), angularOut: Float64Array = new Float64Array(3),
): Float64Array {
  const axis = (k: number) => [axes[3 * k], axes[3 * k + 1], axes[3 * k + 2]];
  const from = (k: number, to: ArrayLike<number>) => [to[0] - points[3 * k], to[1] - points[3 * k + 1], to[2] - points[3 * k + 2]];
  const term = new Float64Array(3);
  const yDot = new Float64Array(3);
  for (let k = 0; k < jointCount; k++) {
    cross(axis(k), from(k, y), term);
    for (let c = 0; c < 3; c++) yDot[c] += rates[k] * term[c];
  }
  const linkAngularVelocity = new Float64Array(3), axisRate = new Float64Array(3), pointRate = new Float64Array(3);
  out.fill(0);
  angularOut.fill(0);
  for (let k = 0; k < jointCount; k++) {
    const w = axis(k), r = [points[3 * k], points[3 * k + 1], points[3 * k + 2]];
    cross(linkAngularVelocity, w, axisRate);
    pointRate.fill(0);
    for (let j = 0; j < k; j++) {
      cross(axis(j), from(j, r), term);
      for (let c = 0; c < 3; c++) pointRate[c] += rates[j] * term[c];
    }
    cross(axisRate, from(k, y), term);
    for (let c = 0; c < 3; c++) out[c] += rates[k] * term[c];
    cross(w, [yDot[0] - pointRate[0], yDot[1] - pointRate[1], yDot[2] - pointRate[2]], term);
    for (let c = 0; c < 3; c++) {
      out[c] += rates[k] * term[c];
      angularOut[c] += rates[k] * axisRate[c];
      linkAngularVelocity[c] += rates[k] * w[c];
    }
  }
  return out;
}

/** Rolling term omega_o x u_o - omega_f x u_f (world frame, m/s^2) from the object's and last link's angular velocities (rad/s) and the contact point's velocities over the object and over the roller (m/s). */
export function rollingTerm(
  objectAngularVelocity: ArrayLike<number>, linkAngularVelocity: ArrayLike<number>, overObject: ArrayLike<number>, overRoller: ArrayLike<number>,
  out: Float64Array = new Float64Array(3),
): Float64Array {
  const o = objectAngularVelocity, f = linkAngularVelocity, uo = overObject, uf = overRoller;
  out[0] = o[1] * uo[2] - o[2] * uo[1] - (f[1] * uf[2] - f[2] * uf[1]);
  out[1] = o[2] * uo[0] - o[0] * uo[2] - (f[2] * uf[0] - f[0] * uf[2]);
  out[2] = o[0] * uo[1] - o[1] * uo[0] - (f[0] * uf[1] - f[1] * uf[0]);
  return out;
}

/** New, zeroed acceleration feed-forward for a finger of n joints and the given base joint count. */
export function createFingerAcceleration(jointCount: number, baseJointCount = 0): FingerAcceleration {
  return {
    model: 'material-points',
    objectPoint: new Float64Array(3),
    centripetal: new Float64Array(3),
    jacobianRate: new Float64Array(3),
    linkAngularRate: new Float64Array(3),
    rollingTerm: new Float64Array(3),
    spinRollingTerm: 0,
    rows: 3,
    target: new Float64Array(4),
    jointAccelerations: new Float64Array(jointCount),
    achieved: new Float64Array(3),
    residualNorm: 0,
    steer: createSteerAcceleration(baseJointCount),
  };
}

/** omega_f = sum_k q_dot_k w_k of the last link at the full solution's rates (world frame, rad/s). */
function linkAngularVelocity(finger: Readonly<FingerResult>): Float64Array {
  const w = new Float64Array(3), axes = finger.jointAxes, rates = finger.full.rates;
  for (let k = 0; k < finger.jointAngles.length; k++) for (let c = 0; c < 3; c++) w[c] += rates[k] * axes[3 * k + c];
  return w;
}

// The Jacobian is the velocity solve's: 3 rows, or 4 with the soft-finger row n . w_k = n . omega_o,
// whose derivative n . sum_k w_k q_ddot_k = n . (alpha - sum_k q_dot_k w_k_dot) + n_dot . (omega_o - omega_f)
// has the turn of the normal n_dot = omega_o x n + L_o u_o as the contact moves over the object.
/** Joint accelerations q_ddot = J^T (J J^T + lambda^2 I)^-1 (a_x + rolling term - J_dot q_dot) of one solved finger at its full-solution rates, object origin p and angular velocity, with the rolling term where its contact curvature gives the contact point's motion (world frame, rad/s^2). */
export function solveFingerAcceleration(
  finger: Readonly<FingerResult>, origin: ArrayLike<number>, angularVelocity: ArrayLike<number>, acceleration: Readonly<ObjectAcceleration>,
  curvature: Readonly<ContactCurvature> | undefined, damping: number, out: FingerAcceleration = createFingerAcceleration(finger.jointAngles.length),
  ws: LinalgWorkspace = createLinalgWorkspace(4, Math.max(4, finger.jointAngles.length)),
): FingerAcceleration {
  const jacobian = finger.full.jacobian, n = jacobian.cols, d = jacobian.data;
  const contact = finger.contact, rates = finger.full.rates, target = out.target;
  objectPointAcceleration(acceleration.linear, acceleration.angular, angularVelocity, origin, contact.objectPoint, out.objectPoint, out.centripetal);
  jacobianRateTimesRates(finger.jointAxes, finger.jointPoints, n, contact.rollerPoint, rates, out.jacobianRate, out.linkAngularRate);
  const normal = contact.normal, alpha = acceleration.angular, link = out.linkAngularRate;
  const wander = curvature?.wander;
  out.rollingTerm.fill(0);
  out.spinRollingTerm = 0;
  out.model = 'material-points';
  if (curvature && wander?.status === 'defined' && wander.objectVelocity && wander.rollerVelocity) {
    const omegaF = linkAngularVelocity(finger);
    rollingTerm(angularVelocity, omegaF, wander.objectVelocity, wander.rollerVelocity, out.rollingTerm);
    if (jacobian.rows === 4) {
      const turn = cross(angularVelocity, normal), over = applyShapeOperator(curvature.object, wander.objectVelocity);
      for (let c = 0; c < 3; c++) out.spinRollingTerm += (turn[c] + over[c]) * (angularVelocity[c] - omegaF[c]);
    }
    out.model = 'rolling-contact';
  }
  for (let c = 0; c < 3; c++) target[c] = out.objectPoint[c] + out.rollingTerm[c] - out.jacobianRate[c];
  target[3] = jacobian.rows === 4
    ? normal[0] * (alpha[0] - link[0]) + normal[1] * (alpha[1] - link[1]) + normal[2] * (alpha[2] - link[2]) + out.spinRollingTerm
    : 0;
  out.rows = jacobian.rows;
  dampedLeastSquares(jacobian, target, damping, out.jointAccelerations, ws);
  let residual = 0;
  for (let i = 0; i < 3; i++) {
    let sum = out.jacobianRate[i];
    for (let k = 0; k < n; k++) sum += d[i * n + k] * out.jointAccelerations[k];
    out.achieved[i] = sum;
    residual += (out.objectPoint[i] + out.rollingTerm[i] - sum) ** 2;
  }
  out.residualNorm = Math.sqrt(residual);
  return out;
}

const ZERO_ACCELERATION: Readonly<ObjectAcceleration> = { linear: [0, 0, 0], angular: [0, 0, 0] };

/**
 * Fills every finger's acceleration feed-forward of a solved sheet and of its steer-and-roll solution, once per evaluation, from the
 * object's acceleration (zero when absent), each contact's curvature from sheetCurvature and the hand's finger inputs; a finger
 * with an entry in `known` takes it as it is (an earlier evaluation's, from the same finger input, object and solver settings)
 * (world frame, SI).
 */
export function solveAccelerations(
  result: SheetResult, acceleration: Readonly<ObjectAcceleration> | undefined, settings: Readonly<SolverSettings>, curvatures: readonly Readonly<ContactCurvature>[],
  fingers: readonly Readonly<Pick<FingerInput, 'joints' | 'roller'>>[], known: readonly (FingerAcceleration | undefined)[] = [],
): SheetResult {
  const maxJoints = result.fingers.reduce((m, f) => Math.max(m, f.jointAngles.length), 4);
  let ws: LinalgWorkspace | undefined;
  result.fingers.forEach((finger, i) => {
    const knownAcceleration = known[i];
    if (knownAcceleration !== undefined) {
      finger.acceleration = knownAcceleration;
      return;
    }
    ws ??= createLinalgWorkspace(4, maxJoints);
    finger.acceleration = solveFingerAcceleration(
      finger, result.object.position, result.object.angularVelocity, acceleration ?? ZERO_ACCELERATION, curvatures[i], settings.damping,
      createFingerAcceleration(finger.jointAngles.length, finger.steer.baseJoints.length), ws,
    );
    solveSteerAcceleration(finger, fingers[i], result.object.angularVelocity, finger.acceleration.objectPoint, curvatures[i], settings, finger.acceleration.steer);
  });
  return result;
}
