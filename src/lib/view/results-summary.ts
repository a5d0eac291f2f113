/**
 * What the side column's summary shows of a solved sheet: per finger, the joint rates a controller
 * would be sent and the worst warning that finger raised.
 */
import { SEVERITY_LEVELS, WARNING_CATALOGUE, type PlainSheetResult, type WarningSeverity } from '../kinematics';
import { commandedRates } from '../sheet/commanded';
import type { CommandedSolution, JointRole, SheetDocument } from '../sheet/types';

export interface SummaryJoint {
  name: string;
  role: JointRole;
  /** Commanded joint rate, rad/s. */
  rate: number;
}

export interface SummaryWarning {
  severity: WarningSeverity;
  title: string;
  /** Warnings this finger (or the grasp) raised, of any severity. */
  count: number;
}

export interface SummaryFinger {
  name: string;
  /** The solution whose rates are commanded: the sheet's choice where the finger can follow it (sheet/commanded.ts). */
  solution: CommandedSolution;
  joints: SummaryJoint[];
  /** Steered pivot's target angle, rad, under steer-and-roll (its rate is the change over the run's time step); null otherwise. */
  pivotAngle: number | null;
  worst: SummaryWarning | null;
}

/** The worst of the warnings that `belongs` picks, with their number; null when none. */
function worstOf(result: PlainSheetResult, belongs: (finger: number | undefined) => boolean): SummaryWarning | null {
  const raised = result.warnings.filter((w) => belongs(w.finger));
  if (raised.length === 0) return null;
  const worst = raised.reduce((a, b) => (SEVERITY_LEVELS.indexOf(b.severity) > SEVERITY_LEVELS.indexOf(a.severity) ? b : a));
  return { severity: worst.severity, title: WARNING_CATALOGUE[worst.code].title, count: raised.length };
}

/** Per finger the commanded rates and worst warning, and the grasp's own worst warning. */
export function summariseResults(result: PlainSheetResult, document: Pick<SheetDocument, 'commanded' | 'hand' | 'motion'>): { fingers: SummaryFinger[]; grasp: SummaryWarning | null } {
  // The same rates the results table's "commanded" column and the exports carry.
  const commanded = result.commanded ?? commandedRates(document, result);
  const fingers = commanded.fingers.map((f, i): SummaryFinger => {
    const roles = document.hand.fingers[i]?.joints.map((j) => j.role) ?? [];
    return {
      name: f.finger,
      solution: f.solution,
      joints: f.joints.map((joint, k) => ({ name: joint.name, role: roles[k] ?? 'other', rate: joint.rate })),
      pivotAngle: f.pivot ? f.pivot.targetAngle : null,
      worst: worstOf(result, (finger) => finger === i),
    };
  });
  return { fingers, grasp: worstOf(result, (finger) => finger === undefined) };
}
