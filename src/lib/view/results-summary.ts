/**
 * What the side column's summary shows of a solved sheet: per finger, the joint rates a controller
 * would be sent and the worst warning that finger raised.
 */
import { SEVERITY_LEVELS, WARNING_CATALOGUE, type PlainSheetResult, type WarningSeverity } from '../kinematics';
import type { JointRole, SheetDocument } from '../sheet/types';

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
  /** The solution whose rates are commanded: steer-and-roll where the finger has it, as runs use. */
  solution: 'steer-and-roll' | 'full';
  joints: SummaryJoint[];
  /** Steered pivot angle, rad, under steer-and-roll (its rate is not what turns it); null otherwise. */
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
export function summariseResults(result: PlainSheetResult, document: Pick<SheetDocument, 'hand'>): { fingers: SummaryFinger[]; grasp: SummaryWarning | null } {
  const fingers = result.fingers.map((f, i): SummaryFinger => {
    const steered = f.steer.available;
    const rates = steered ? f.steer.rates : f.full.rates;
    const roles = document.hand.fingers[i]?.joints.map((j) => j.role) ?? [];
    return {
      name: f.name,
      solution: steered ? 'steer-and-roll' : 'full',
      joints: f.jointNames.map((name, k) => ({ name, role: roles[k] ?? 'other', rate: rates[k] ?? Number.NaN })),
      pivotAngle: steered && roles.includes('pivot') ? f.steer.pivotAngle : null,
      worst: worstOf(result, (finger) => finger === i),
    };
  });
  return { fingers, grasp: worstOf(result, (finger) => finger === undefined) };
}
