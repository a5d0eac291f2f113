/**
 * Derivations of what the sheet commands: the twist converted from the point and frame it was written in to the
 * object origin in the palm frame, and each steered pivot's rate as its change over the run's time step.
 */
import { quat, type SheetResult } from '../kinematics';
import { commandedSolutionOf } from './schema';
import { entryInPalm } from './twist-entry';
import { column, formatLatexNumber, matrix, type DerivationEntry } from './derivation';
import type { SheetDocument } from './types';

/** The rotation matrix of the object's orientation, row by row (dimensionless). */
function rotationRows(doc: SheetDocument): number[] {
  const q = quat.fromSheet(doc.object.pose.orientation);
  return [0, 1, 2].flatMap((row) => [0, 1, 2].map((col) => quat.rotate(q, [col === 0 ? 1 : 0, col === 1 ? 1 : 0, col === 2 ? 1 : 0])[row]!));
}

/** The twist conversion, when the sheet wrote the twist about another point or in the object frame. */
export function twistEntries(doc: SheetDocument, entries: DerivationEntry[]): void {
  const entry = doc.object.twist.entered;
  if (!entry) return;
  const pose = doc.object.pose;
  const palm = entryInPalm(entry, pose);
  const { linear, angular } = doc.object.twist;
  const turned = entry.frame === 'object'
    ? `R = ${matrix(rotationRows(doc), 3, 3)},\\; q = p + R\\,s = ${column(pose.position)} + R ${column(entry.about)} = ${column(palm.about)},\\; v_q = R ${column(entry.linear)} = ${column(palm.linear)},\\; \\omega = R ${column(entry.angular)} = ${column(palm.angular)};\\;`
    : `q = ${column(palm.about)},\\; v_q = ${column(palm.linear)},\\; \\omega = ${column(palm.angular)};\\;`;
  entries.push({
    id: 'object.twist',
    label: `Object twist written about ${entry.contact === undefined ? 'a point' : `the contact of finger "${entry.contact}" (the point q the solve found there)`}${entry.frame === 'object' ? ' in the object frame' : ''}, converted to the object origin in the palm frame`,
    latex: `${turned} v = v_q + \\omega \\times (p - q) = ${column(palm.linear)} + ${column(angular)} \\times \\left(${column(pose.position)} - ${column(palm.about)}\\right) = ${column(linear)}`,
    value: [...linear, ...angular],
    unit: 'm/s, rad/s',
  });
}

/** Each steered pivot's commanded rate: its change to the steered angle over one time step of the run. */
export function commandedEntries(doc: SheetDocument, result: SheetResult, entries: DerivationEntry[]): void {
  if (commandedSolutionOf(doc) !== 'steer-and-roll') return;
  const dt = doc.motion.run.dt;
  result.fingers.forEach((f, i) => {
    if (!f.steer.available) return;
    const pivot = doc.hand.fingers[i]!.joints.findIndex((joint) => joint.role === 'pivot');
    const change = f.steer.pivotChange;
    entries.push({
      id: `finger.${i}.commanded.pivot.rate`,
      label: `${f.name}: commanded rate of the steered pivot ${f.jointNames[pivot]} (its change over one time step)`,
      latex: `\\dot\\theta_{\\text{pivot}} = \\frac{\\theta^{*} - \\theta}{\\Delta t} = \\frac{${formatLatexNumber(f.steer.pivotAngle)} - ${formatLatexNumber(f.jointAngles[pivot]!)}}{${formatLatexNumber(dt)}} = \\frac{${formatLatexNumber(change)}}{${formatLatexNumber(dt)}} = ${formatLatexNumber(change / dt)}`,
      value: change / dt,
      unit: 'rad/s',
    });
  });
}
