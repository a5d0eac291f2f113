/**
 * The sheet format's names and defaults that editors and exports read: a leaf module the browser
 * may import without the sheet reader (schema.ts, which brings zod and the expression reader).
 */
import type { CommandedSolution, RunSettings, SheetDocument, SolverSettings } from './types';

export const SHEET_FORMAT = 'slipless.sheet';
export const SHEET_VERSION = 1;

/** Which solution's joint rates are commanded; absent from a document means the first, what runs followed before the choice existed. */
export const COMMANDED_SOLUTIONS = ['steer-and-roll', 'full'] as const satisfies readonly CommandedSolution[];
export const DEFAULT_COMMANDED: CommandedSolution = 'steer-and-roll';

/** The commanded solution of a parsed document, the default when it names none. */
export function commandedSolutionOf(doc: Pick<SheetDocument, 'commanded'>): CommandedSolution {
  return doc.commanded ?? DEFAULT_COMMANDED;
}

export const DEFAULT_SOLVER: SolverSettings = {
  damping: 1e-4,
  singularRatio: 1e-3,
  axisDistance: 1e-3,
  minTangentialSpeed: 1e-5,
  contactTolerance: 2e-4,
  softFinger: false,
};

export const DEFAULT_RUN: Omit<RunSettings, 'noise'> = {
  gain: 2,
  dt: 0.005,
  maxTicks: 2000,
  positionTolerance: 1e-4,
  angleTolerance: 1e-3,
  stopOnSingular: true,
};

export const ROTATION_METRIC_KEYS = ['phi2', 'phi3', 'phi4', 'phi5', 'phi6'] as const;
