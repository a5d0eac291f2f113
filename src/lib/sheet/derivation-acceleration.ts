/**
 * Derivations of the acceleration feed-forward of each finger: the object point's acceleration,
 * J_dot q_dot, the rolling term (or why the material-point model is used instead), the joint
 * accelerations and what is left, then the steer-and-roll feed-forward (pivot rate, base and roll
 * accelerations) or why it is not defined, as KaTeX with the numbers put in. Only results of a sheet
 * evaluation carry an acceleration; a finger without one gets no entries.
 */
import { sheetCurvature, type ContactWander, type FingerResult, type SheetResult } from '../kinematics';
import { column, formatLatexNumber, matrix, type DerivationEntry } from './derivation';
import { STEER_FEEDFORWARD_REASONS } from './outputs';
import type { SheetDocument } from './types';

function list(v: ArrayLike<number>, count = v.length): number[] {
  return Array.from({ length: count }, (_, i) => v[i]);
}

/** Why a contact has no contact-point motion, in words, from its wander status. */
const NO_MOTION: Record<Exclude<ContactWander['status'], 'defined'>, string> = {
  singular: 'a line contact: the contact point is not determined along the line',
  undefined: 'a surface has no curvature at the contact (a sharp edge or rim)',
  'not-touching': 'the roller does not touch the object',
};

/** The rolling-term entry of finger i: its formula with the numbers put in, or the reason it is left out. */
function rollingTermEntry(doc: SheetDocument, result: SheetResult, i: number, f: FingerResult, id: string): DerivationEntry {
  const acc = f.acceleration!;
  const wander = sheetCurvature(doc, result)[i].wander;
  const term = acc.rollingTerm;
  if (acc.model === 'material-points' || wander.status !== 'defined') {
    const reason = wander.status === 'defined' ? 'no contact curvature was given' : NO_MOTION[wander.status];
    return {
      id: `${id}.rollingTerm`,
      label: `${f.name}: rolling term left out, material-point model (${reason})`,
      latex: `\\text{material points: } J \\ddot\\theta + \\dot J \\dot\\theta = a(x),\\; \\text{contact-point motion: ${wander.status}} \\;\\Rightarrow\\; \\omega_o \\times u_o - \\omega_f \\times u_f \\text{ left out} = ${column(term)}`,
      value: list(term),
      unit: 'm/s^2',
    };
  }
  const n = f.jointAngles.length;
  const omegaF = [0, 1, 2].map((c) => Array.from({ length: n }, (_, k) => f.full.rates[k] * f.jointAxes[3 * k + c]).reduce((a, b) => a + b, 0));
  const spin = acc.rows === 4 ? `,\\; \\text{spin row } \\dot n \\cdot (\\omega_o - \\omega_f) = ${formatLatexNumber(acc.spinRollingTerm)},\\; \\dot n = \\omega_o \\times n + L_o u_o` : '';
  return {
    id: `${id}.rollingTerm`,
    label: `${f.name}: rolling term, rolling-contact model (the contact moves over both surfaces)`,
    latex: `\\omega_o \\times u_o - \\omega_f \\times u_f,\\; \\omega_o = ${column(result.object.angularVelocity)},\\; \\omega_f = \\sum_k \\dot\\theta_k \\omega_k = ${column(omegaF)},\\; u_o = ${column(wander.objectVelocity!)},\\; u_f = ${column(wander.rollerVelocity!)} \\;\\Rightarrow\\; ${column(term)}${spin}`,
    value: list(term),
    unit: 'm/s^2',
  };
}

/** Appends the acceleration entries of finger i (m/s^2 and rad/s^2, palm frame) to entries. */
export function accelerationEntries(doc: SheetDocument, result: SheetResult, i: number, f: FingerResult, entries: DerivationEntry[]): void {
  const acc = f.acceleration;
  if (!acc) return;
  const id = `finger.${i}.acceleration`;
  const n = f.jointAngles.length;
  const c = f.contact, full = f.full;
  const p = result.object.position, w = result.object.angularVelocity;
  const given = doc.object.acceleration ?? { linear: [0, 0, 0], angular: [0, 0, 0] };
  entries.push({
    id: `${id}.objectPoint`,
    label: `${f.name}: acceleration of the object's material point at the contact`,
    latex: `a(x) = a_o + \\alpha \\times r + \\omega \\times (\\omega \\times r),\\; r = x - p = ${column(c.objectPoint)} - ${column(p)},\\; a_o = ${column(given.linear)},\\; \\alpha = ${column(given.angular)},\\; \\omega = ${column(w)} \\;\\Rightarrow\\; \\omega \\times (\\omega \\times r) = ${column(acc.centripetal)},\\; a(x) = ${column(acc.objectPoint)}`,
    value: list(acc.objectPoint),
    unit: 'm/s^2',
  });
  entries.push({
    id: `${id}.jacobianRate`,
    label: `${f.name}: acceleration of the roller's material point at the current joint rates (J̇ q̇)`,
    latex: `\\dot J \\dot\\theta = \\sum_k \\dot\\theta_k \\left[\\dot\\omega_k \\times (y - r_k) + \\omega_k \\times (\\dot y - \\dot r_k)\\right],\\; \\dot\\omega_k = \\Big(\\sum_{j<k} \\dot\\theta_j \\omega_j\\Big) \\times \\omega_k,\\; \\dot r_k = \\sum_{j<k} \\dot\\theta_j\\, \\omega_j \\times (r_k - r_j),\\; \\dot y = J \\dot\\theta,\\; \\dot\\theta = ${column(full.rates, 0, n)},\\; y = ${column(c.rollerPoint)} \\;\\Rightarrow\\; \\dot J \\dot\\theta = ${column(acc.jacobianRate)}`,
    value: list(acc.jacobianRate),
    unit: 'm/s^2',
  });
  entries.push(rollingTermEntry(doc, result, i, f, id));
  const softRow = acc.rows === 4
    ? `,\\; \\text{spin row } n \\cdot \\Big(\\alpha - \\sum_k \\dot\\theta_k \\dot\\omega_k\\Big) + \\dot n \\cdot (\\omega_o - \\omega_f) = ${formatLatexNumber(acc.target[3])}`
    : '';
  entries.push({
    id: `${id}.jointAccelerations`,
    label: `${f.name}: joint accelerations, damped least squares`,
    latex: `\\ddot\\theta = J^T (J J^T + \\lambda^2 I)^{-1} \\big(a(x) + \\omega_o \\times u_o - \\omega_f \\times u_f - \\dot J \\dot\\theta\\big), \\quad J = ${matrix(full.jacobian.data, acc.rows, n)},\\; a(x) + \\omega_o \\times u_o - \\omega_f \\times u_f - \\dot J \\dot\\theta = ${column(acc.target, 0, 3)}${softRow},\\; \\lambda = ${formatLatexNumber(doc.solver.damping)} \\;\\Rightarrow\\; \\ddot\\theta = ${column(acc.jointAccelerations, 0, n)}`,
    value: list(acc.jointAccelerations),
    unit: 'rad/s^2',
  });
  entries.push({
    id: `${id}.residual`,
    label: `${f.name}: acceleration the joints cannot follow`,
    latex: `\\lVert a(x) + \\omega_o \\times u_o - \\omega_f \\times u_f - (J \\ddot\\theta + \\dot J \\dot\\theta) \\rVert = \\left\\lVert ${column([0, 1, 2].map((c) => acc.objectPoint[c] + acc.rollingTerm[c]))} - ${column(acc.achieved)} \\right\\rVert = ${formatLatexNumber(acc.residualNorm)}`,
    value: acc.residualNorm,
    unit: 'm/s^2',
  });
  steerEntries(result, f, id, entries);
}

/** Appends the steer-and-roll feed-forward entries of finger i (rad/s and rad/s^2, palm frame) to entries: each step with its formula, or why it is not defined. */
function steerEntries(result: SheetResult, f: FingerResult, id: string, entries: DerivationEntry[]): void {
  const s = f.acceleration!.steer, steer = f.steer;
  if (s.status !== 'defined') {
    entries.push({
      id: `${id}.steer`,
      label: `${f.name}: steer-and-roll feed-forward not defined (${STEER_FEEDFORWARD_REASONS[s.status]})`,
      latex: `\\text{steer-and-roll feed-forward: ${s.status}} \\;\\Rightarrow\\; \\dot\\psi,\\ \\dot b,\\ \\dot\\rho \\text{ not defined}`,
      value: Number.NaN,
      unit: 'rad/s',
    });
    return;
  }
  const n = f.jointAngles.length, jn = steer.jacobianAfter.data;
  const d = [0, 1, 2].map((row) => jn[row * n + s.rollJoint]);
  const c = f.contact, w = result.object.angularVelocity;
  entries.push({
    id: `${id}.steer.contactMotion`,
    label: `${f.name}: steer-and-roll, motion of the contact at the steer-and-roll rates with the pivot rate (steered posture)`,
    latex: `u_o = ${column(s.overObject)},\\; \\dot c = v_o(x) + u_o = ${column(c.objectVelocity)} + u_o = ${column(s.contactVelocity)},\\; \\dot n = \\omega_o \\times n + L_o u_o = ${column(s.normalRate)},\\; \\tfrac{d}{dt} v_o(x) = a(x) + \\omega_o \\times u_o,\\; \\omega_o = ${column(w)} \\;\\Rightarrow\\; ${column(s.objectVelocityRate)}`,
    value: list(s.contactVelocity),
    unit: 'm/s',
  });
  entries.push({
    id: `${id}.steer.pivotRate`,
    label: `${f.name}: steer-and-roll pivot rate that keeps the roll direction in the plane of n and the remainder`,
    latex: `f = (n \\times u) \\cdot d = 0,\\; \\dot f = (\\dot n \\times u + n \\times \\dot u) \\cdot d + (n \\times u) \\cdot \\dot d = \\dot f_0 + \\dot\\psi\\, \\tfrac{\\partial \\dot f}{\\partial \\dot\\psi},\\; u = ${column(steer.remainder)},\\; d = ${column(d)},\\; \\dot f_0 = ${formatLatexNumber(s.alignmentRate)},\\; \\tfrac{\\partial \\dot f}{\\partial \\dot\\psi} = ${formatLatexNumber(s.alignmentGain)} \\;\\Rightarrow\\; \\dot\\psi = -\\dot f_0 \\big/ \\tfrac{\\partial \\dot f}{\\partial \\dot\\psi} = ${formatLatexNumber(s.pivotRate)}`,
    value: s.pivotRate,
    unit: 'rad/s',
  });
  const count = steer.baseJoints.length;
  const normalSpeed = c.normal[0] * c.objectVelocity[0] + c.normal[1] * c.objectVelocity[1] + c.normal[2] * c.objectVelocity[2];
  const normalSpeedRate = [0, 1, 2].reduce((sum, k) => sum + s.normalRate[k] * c.objectVelocity[k] + c.normal[k] * s.objectVelocityRate[k], 0);
  entries.push({
    id: `${id}.steer.baseAccelerations`,
    label: `${f.name}: steer-and-roll base accelerations, the rate of the minimum-norm base rates`,
    latex: `\\dot b_k = \\frac{\\dot a_k s + a_k \\dot s}{\\lvert a\\rvert^2} - \\frac{2 a_k s\\, (a \\cdot \\dot a)}{\\lvert a\\rvert^4},\\; a = ${column(steer.normalGains, 0, count)},\\; \\dot a_k = \\dot n \\cdot (\\omega_k \\times (y - r_k)) + n \\cdot \\tfrac{d}{dt}(\\omega_k \\times (y - r_k)) = ${column(s.normalGainRates, 0, count)},\\; s = n \\cdot v_o = ${formatLatexNumber(normalSpeed)},\\; \\dot s = \\dot n \\cdot v_o + n \\cdot \\tfrac{d}{dt} v_o = ${formatLatexNumber(normalSpeedRate)} \\;\\Rightarrow\\; \\dot b = ${column(s.baseAccelerations, 0, count)}`,
    value: list(s.baseAccelerations),
    unit: 'rad/s^2',
  });
  entries.push({
    id: `${id}.steer.rollAcceleration`,
    label: `${f.name}: steer-and-roll roll acceleration`,
    latex: `\\dot\\rho = \\frac{\\dot u \\cdot d + u \\cdot \\dot d - 2 \\rho\\, d \\cdot \\dot d}{\\lvert d\\rvert^2},\\; \\dot u = \\tfrac{d}{dt} v_o - \\sum_k \\big(\\dot b_k\\, \\omega_k \\times (y - r_k) + b_k \\tfrac{d}{dt}(\\omega_k \\times (y - r_k))\\big) = ${column(s.remainderRate)},\\; \\dot d = ${column(s.rollDirectionRate)},\\; \\rho = ${formatLatexNumber(steer.rollRate)} \\;\\Rightarrow\\; \\dot\\rho = ${formatLatexNumber(s.rollAcceleration)}`,
    value: s.rollAcceleration,
    unit: 'rad/s^2',
  });
}
