/**
 * One number (or text) of a solved sheet, addressed as a worked example addresses it: an output
 * id of the catalogue (outputs.ts) with the finger's name and, for outputs with several values, a
 * joint name, x, y or z, or an index. Shared by the examples' quoted numbers (on the server) and
 * their calculators (in the browser), so both read a result the same way.
 */
import type { PlainSheetResult } from '../kinematics';
import { displayUnit, findOutput } from '../sheet/outputs';

export interface OutputAddress {
  of: string;
  finger?: string;
  part?: string;
}

export interface ReadOutput {
  value: number | string;
  /** SI unit of a number ('' for counts, ratios and text). */
  unit: string;
  /** The unit the editor shows it in under the default display units. */
  shownUnit: string;
}

/** Contact numbers the catalogue leaves to the warnings, read per finger (m). */
const CONTACT_DISTANCES: Readonly<Record<string, 'rollAxisDistance' | 'pivotAxisDistance'>> = {
  'contact.rollAxisDistance': 'rollAxisDistance',
  'contact.pivotAxisDistance': 'pivotAxisDistance',
};

const AXES = ['x', 'y', 'z'];

/** The addressed output of `result`; throws naming the address when it does not exist (a programming or content error). */
export function readOutput(result: PlainSheetResult, address: OutputAddress): ReadOutput {
  const where = `${address.of}${address.finger ? ` of finger "${address.finger}"` : ''}${address.part ? ` (${address.part})` : ''}`;
  const fingerIndex = () => {
    const index = result.fingers.findIndex((f) => f.name === address.finger);
    if (index < 0) throw new Error(`${where}: the sheet has no finger "${address.finger}"`);
    return index;
  };
  const distance = CONTACT_DISTANCES[address.of];
  if (distance) return { value: result.fingers[fingerIndex()]!.contact[distance], unit: 'm', shownUnit: 'mm' };
  const definition = findOutput(address.of);
  const finger = definition.scope === 'grasp' ? -1 : fingerIndex();
  const read = definition.read(result, finger);
  const shownUnit = displayUnit(definition);
  if (typeof read === 'string' || typeof read === 'number') return { value: read, unit: definition.unit, shownUnit };
  const part = address.part ?? '';
  const joint = result.fingers[finger]?.jointNames.indexOf(part) ?? -1;
  const index =
    joint >= 0
      ? definition.parts === 'base-joints' ? result.fingers[finger]!.steer.baseJoints.indexOf(joint) : joint
      : AXES.includes(part) ? AXES.indexOf(part) : Number.parseInt(part, 10);
  const value = read[index];
  if (value === undefined) throw new Error(`${where}: no such part`);
  return { value, unit: definition.unit, shownUnit };
}
