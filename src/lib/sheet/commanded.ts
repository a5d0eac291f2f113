/**
 * The joint rates a sheet commands, finger by finger, from a solved result: the chosen solution where the finger can
 * follow it (steer-and-roll needs a base, a pivot and a roll joint), else the full solution. A steered pivot is not
 * driven at a rate of its own: it turns from its current angle to the steered angle within one time step of the run,
 * so its commanded rate is that change over the step. A leaf module the browser may import.
 */
import type { PlainSheetResult } from '../kinematics';
import { commandedSolutionOf } from './sheet-constants';
import type { CommandedSolution, SheetDocument } from './types';

/** A steered pivot: the angle it turns to, the change from its current angle (rad) and the rate that change needs over the time step (rad/s). */
export interface CommandedPivot {
  joint: string;
  currentAngle: number;
  targetAngle: number;
  change: number;
  rate: number;
}

export interface CommandedFinger {
  finger: string;
  /** The solution this finger follows: the sheet's choice, or 'full' for a finger steer-and-roll does not apply to. */
  solution: CommandedSolution;
  /** Every joint with its commanded rate, rad/s, in the sheet's joint order. */
  joints: { name: string; rate: number }[];
  /** Present when the finger follows steer-and-roll. */
  pivot?: CommandedPivot;
}

/** What the controller is sent: the sheet's choice, the time step a steered pivot's change is spread over (s), and per finger its rates. */
export interface CommandedRates {
  solution: CommandedSolution;
  timeStep: number;
  fingers: CommandedFinger[];
}

/** Which solution each finger follows under the sheet's choice. */
function followedSolution(chosen: CommandedSolution, steerAvailable: boolean): CommandedSolution {
  return chosen === 'steer-and-roll' && steerAvailable ? 'steer-and-roll' : 'full';
}

/** The commanded rates of every finger of a solved result (rad/s), for the document's choice and its run's time step. */
export function commandedRates(doc: Pick<SheetDocument, 'commanded' | 'hand' | 'motion'>, result: PlainSheetResult): CommandedRates {
  const chosen = commandedSolutionOf(doc);
  const timeStep = doc.motion.run.dt;
  const fingers = result.fingers.map((f, i): CommandedFinger => {
    const solution = followedSolution(chosen, f.steer.available);
    if (solution === 'full') return { finger: f.name, solution, joints: f.jointNames.map((name, k) => ({ name, rate: f.full.rates[k]! })) };
    const pivotIndex = doc.hand.fingers[i]!.joints.findIndex((joint) => joint.role === 'pivot');
    const change = f.steer.pivotChange;
    const rate = change / timeStep;
    return {
      finger: f.name,
      solution,
      joints: f.jointNames.map((name, k) => ({ name, rate: k === pivotIndex ? rate : f.steer.rates[k]! })),
      pivot: { joint: f.jointNames[pivotIndex]!, currentAngle: f.jointAngles[pivotIndex]!, targetAngle: f.steer.pivotAngle, change, rate },
    };
  });
  return { solution: chosen, timeStep, fingers };
}

/** JSON pointer of the run's time step: the solve does not read it, but a steered pivot's commanded rate does. */
export const TIME_STEP_PATH = '/motion/run/dt';

/**
 * The commanded rates at one value of a sweep of `path` (rad/s): a swept time step is the step each steered pivot's
 * change is spread over; any other swept input leaves the sheet's time step.
 */
export function sweptCommandedRates(
  doc: Pick<SheetDocument, 'commanded' | 'hand' | 'motion'>, result: PlainSheetResult, path: string, value: number,
): CommandedRates {
  if (path !== TIME_STEP_PATH) return commandedRates(doc, result);
  return commandedRates({ ...doc, motion: { ...doc.motion, run: { ...doc.motion.run, dt: value } } }, result);
}

/** Words for a solution, as labels and exports say which one they follow. */
export const SOLUTION_NAMES: Record<CommandedSolution, string> = {
  'steer-and-roll': 'steer-and-roll',
  full: 'full solution',
};

/**
 * Which rates a chart, table or export follows, in words: the sheet's choice, and the fingers that take the full
 * solution under a choice of steer-and-roll, e.g. 'steer-and-roll (finger "thumb": full solution, no pivot and roll)'.
 */
export function describeCommanded(chosen: CommandedSolution, fingers: readonly { finger: string; solution: CommandedSolution }[]): string {
  const others = fingers.filter((f) => f.solution !== chosen).map((f) => `"${f.finger}"`);
  if (others.length === 0) return SOLUTION_NAMES[chosen];
  return `${SOLUTION_NAMES[chosen]} (${others.length === 1 ? 'finger' : 'fingers'} ${others.join(', ')}: full solution, no base, pivot and roll joints)`;
}
