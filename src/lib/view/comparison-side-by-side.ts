/**
 * Two comparisons of the same log side by side (typically of two revisions): per joint the RMS,
 * largest residual and share within tolerance, per contact the same of the slip, and the verdicts;
 * each pair says whether it differs as shown (four significant digits, what the reader sees) by
 * more than a thousandth of the tolerance (below that it is rounding in the re-solve, not a
 * change of behaviour) and whether the right-hand one is better or worse (a smaller residual or
 * slip, a larger share within tolerance is better).
 */
import type { LogComparison } from '../logs/compare';

/** A number as the comparison tables show it: four significant digits, a dash for none. */
export function formatValue(value: number | null): string {
  return value === null || !Number.isFinite(value) ? '—' : Number(value.toPrecision(4)).toString();
}

export type Change = 'same' | 'better' | 'worse' | 'only-left' | 'only-right';

export interface MetricPair {
  left: number | null;
  right: number | null;
  change: Change;
}

/** One joint's or contact's statistics on both sides: residual (rad/s) or slip (mm/s) RMS and maximum, and the share of samples within tolerance (0 to 1). */
export interface StatisticsPair {
  name: string;
  rms: MetricPair;
  max: MetricPair;
  within: MetricPair;
}

export interface SideOfComparison {
  revision: number;
  result: LogComparison;
}

export interface SideBySide {
  left: { revision: number; withinTolerance: boolean };
  right: { revision: number; withinTolerance: boolean };
  verdict: Change;
  joints: StatisticsPair[];
  contacts: StatisticsPair[];
}

type Statistics = { rms: number | null; max: number | null; within: number | null };

/** Differences below this share of the tolerance are taken as rounding. */
export const NOISE_SHARE = 1e-3;

/** How the right value stands against the left; `higherIsBetter` for shares within tolerance; differences up to `noise` count as none. */
function pair(left: number | null, right: number | null, higherIsBetter: boolean, noise = 0): MetricPair {
  let change: Change;
  if (left === null && right === null) change = 'same';
  else if (right === null) change = 'only-left';
  else if (left === null) change = 'only-right';
  else if (formatValue(left) === formatValue(right) || Math.abs(right - left) <= noise) change = 'same';
  else change = (right > left) === higherIsBetter ? 'better' : 'worse';
  return { left, right, change };
}

/** Pairs entries by name: the left's order, then names only the right has; `tolerance` in the statistics' unit. */
function pairByName(left: Map<string, Statistics>, right: Map<string, Statistics>, tolerance: number): StatisticsPair[] {
  const noise = tolerance * NOISE_SHARE;
  const names = [...left.keys(), ...[...right.keys()].filter((name) => !left.has(name))];
  const none: Statistics = { rms: null, max: null, within: null };
  return names.map((name) => {
    const a = left.get(name) ?? none, b = right.get(name) ?? none;
    return { name, rms: pair(a.rms, b.rms, false, noise), max: pair(a.max, b.max, false, noise), within: pair(a.within, b.within, true) };
  });
}

const jointStatistics = (result: LogComparison) =>
  new Map(result.joints.map((j): [string, Statistics] => [j.joint, { rms: j.rms, max: j.max, within: j.withinFraction }]));

/** Slip statistics in mm/s; a contact not judged has none. */
const contactStatistics = (result: LogComparison) =>
  new Map(result.contacts.map((c): [string, Statistics] => [c.finger, c.computed ? { rms: c.rms * 1000, max: c.max * 1000, within: c.withinFraction } : { rms: null, max: null, within: null }]));

/** The two comparisons side by side, left against right. */
export function sideBySide(left: SideOfComparison, right: SideOfComparison): SideBySide {
  const a = left.result.verdict.withinTolerance, b = right.result.verdict.withinTolerance;
  return {
    left: { revision: left.revision, withinTolerance: a },
    right: { revision: right.revision, withinTolerance: b },
    verdict: a === b ? 'same' : b ? 'better' : 'worse',
    joints: pairByName(jointStatistics(left.result), jointStatistics(right.result), Math.min(left.result.tolerances.rate, right.result.tolerances.rate)),
    contacts: pairByName(contactStatistics(left.result), contactStatistics(right.result), 1000 * Math.min(left.result.tolerances.slip, right.result.tolerances.slip)),
  };
}

/** Whether anything of the two differs as shown. */
export function anyDifference(view: SideBySide): boolean {
  return view.verdict !== 'same' || [...view.joints, ...view.contacts].some((p) => [p.rms, p.max, p.within].some((m) => m.change !== 'same'));
}
