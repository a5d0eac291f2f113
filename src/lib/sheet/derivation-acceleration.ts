/**
 * Derivations of the acceleration feed-forward of each finger: the object point's acceleration,
 * J_dot q_dot, the rolling term (or why the material-point model is used instead), the joint
 * accelerations and what is left, as KaTeX with the numbers put in. Only results of a sheet
 * evaluation carry an acceleration; a finger without one gets no entries.
 */
import { sheetCurvature, type ContactWander, type FingerResult, type SheetResult } from '../kinematics';
import { column, formatLatexNumber, matrix, type DerivationEntry } from './derivation';
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
}
