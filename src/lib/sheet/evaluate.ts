/**
 * The one evaluation pipeline of a sheet document: parse (units, expressions, defaults) → solve
 * with the kinematics core → JSON-ready result → stored summary → derivation when asked. The
 * compute worker, the sheet service, file import and export, the comparison, the report and the
 * compute command all call it, so a sheet reads and solves the same way everywhere.
 */
import {
  createFingerCompiler, sheetCurvature, solveAccelerations, solveSheet, toPlainResult,
  type ContactCurvature, type FingerAcceleration, type FingerCompiler, type PlainFingerResult, type PlainSheetResult, type SheetResult,
} from '../kinematics';
import { fail, succeed, type DomainError, type Result } from '../result';
import { commandedRates } from './commanded';
import { deriveSheet, type DerivationEntry } from './derivation';
import { knownSheetGraspQuality, sheetGraspQuality } from './grasp-quality-cache';
import { formatIssuePath, parseSheet, type SheetIssue, type SheetReader } from './schema';
import type { SheetSummary } from './summary';
import type { FingerInput, SheetDocument, SolverSettings } from './types';

/** A document that read and solved: the SI document, the JSON-ready result and its stored summary. */
export interface SheetEvaluation {
  doc: SheetDocument;
  result: PlainSheetResult;
  summary: SheetSummary;
  /**
   * Present only when asked for with `graspQualityLater` and these contacts were not seen before: `result` then has no
   * grasp quality, and this computes it and gives the complete result (or the error when one of its numbers is not finite).
   */
  graspQualityLater?: () => Result<PlainSheetResult, EvaluationError>;
}

/** An evaluation with the derivation of every reported number. */
export interface DerivedSheetEvaluation extends SheetEvaluation {
  derivation: DerivationEntry[];
}

/**
 * Why a document has no results: it does not read as a sheet (stage "document", every located
 * issue), or the core failed on it (stage "solve", one issue at the document's root).
 */
export interface EvaluationError extends DomainError {
  kind: 'invalid';
  stage: 'document' | 'solve';
  issues: SheetIssue[];
}

export interface EvaluateOptions {
  /** Also build the derivation (KaTeX formulas with the numbers put in); off by default, it is large. */
  derive?: boolean;
  /**
   * Leave a grasp quality that is not cached for later (see SheetEvaluation.graspQualityLater), so that the rest shows at
   * once: it is the one costly part (milliseconds), and any move of a contact asks for it anew. Ignored with derive.
   */
  graspQualityLater?: boolean;
  /** Reads the document (parseSheet when absent): the compute worker's edit reader (createEditReader) reads an edit by its changed field. */
  read?: SheetReader;
  /** What the evaluations of one editor's documents keep of each finger (see createFingerMemory); nothing when absent. */
  fingers?: FingerMemory;
}

/** What an evaluation keeps of one finger: valid for a later document while its finger input, object and solver settings are the same objects. */
interface KeptFinger {
  object: SheetDocument['object'];
  solver: SolverSettings;
  curvature: ContactCurvature;
  acceleration: FingerAcceleration;
  plain: PlainFingerResult;
}

/**
 * What the evaluations of one editor's documents (each an edit of the one before, sharing the parts the edit left alone)
 * keep of each finger: its compiled chain while its input is the same object (createFingerCompiler), and its curvature,
 * acceleration and checked plain result while its input, the object and the solver settings are the same objects, since
 * those are all they are computed from. The solve, the warnings, the grasp and everything else are computed anew.
 * The plain results share the fingers kept, so nobody may change them.
 */
export interface FingerMemory {
  compile: FingerCompiler;
  kept: WeakMap<Readonly<FingerInput>, KeptFinger>;
}

/** An empty FingerMemory for one editor's documents. */
export function createFingerMemory(): FingerMemory {
  return { compile: createFingerCompiler(), kept: new WeakMap() };
}

/** The fingers of `doc` that `memory` kept for this object and these solver settings, by index (undefined for the others). */
function keptFingers(memory: FingerMemory | undefined, doc: SheetDocument): (KeptFinger | undefined)[] {
  if (memory === undefined) return [];
  return doc.hand.fingers.map((input) => {
    const kept = memory.kept.get(input);
    return kept !== undefined && kept.object === doc.object && kept.solver === doc.solver ? kept : undefined;
  });
}

/** Keeps the fingers of an evaluation that passed the check and were not kept already (see FingerMemory). */
function keepFingers(memory: FingerMemory, doc: SheetDocument, solved: SheetResult, curvatures: readonly ContactCurvature[], result: PlainSheetResult, kept: readonly (KeptFinger | undefined)[]): void {
  doc.hand.fingers.forEach((input, i) => {
    if (kept[i] !== undefined) return;
    memory.kept.set(input, { object: doc.object, solver: doc.solver, curvature: curvatures[i], acceleration: solved.fingers[i].acceleration!, plain: result.fingers[i] });
  });
}

/** The stored summary of a solved sheet: finger count, worst warning severity, the sorted distinct warning codes and how many were raised. */
function summarize(doc: SheetDocument, result: SheetResult): SheetSummary {
  return {
    fingers: doc.hand.fingers.length,
    worst: result.worstSeverity,
    warningCodes: [...new Set(result.warnings.map((w) => w.code))].sort(),
    warningCount: result.warnings.length,
  };
}

/**
 * Outputs where +Infinity is a meaning, not an overflow: the condition number of a Jacobian that
 * lost rank. Every other output must be a finite number.
 */
const UNBOUNDED_OUTPUTS: ReadonlySet<string> = new Set(['conditionNumber', 'conditionBefore', 'conditionAfter']);

/**
 * Outputs where NaN means "not defined for this finger's build", not a failed solve: the contact's
 * latitude, longitude and distance to the roll axis without a roll joint, its distances to the
 * pivot axis without a pivot joint. JSON writes them as null and the results show "—".
 */
const UNDEFINED_BY_BUILD: ReadonlySet<string> = new Set(['latitude', 'longitude', 'rollAxisDistance', 'pivotAxisDistance', 'pivotCenterDistance']);

/**
 * Whether a NaN at this path of the plain result means "not defined" (see UNDEFINED_BY_BUILD; every steering number of a finger
 * steer-and-roll does not apply to; every number of a steer-and-roll feed-forward whose status says why it is not defined).
 */
function undefinedByBuild(result: PlainSheetResult, path: readonly (string | number)[], key: string): boolean {
  if (UNDEFINED_BY_BUILD.has(key)) return true;
  if (path[0] !== 'fingers' || typeof path[1] !== 'number') return false;
  const finger = result.fingers[path[1]];
  if (path[2] === 'acceleration' && path[3] === 'steer') return finger?.acceleration?.steer.status !== 'defined';
  return path[2] === 'steer' && !finger?.steer.available;
}

/** Outputs with one entry per joint of the finger, so a bad entry names its joint. */
const PER_JOINT_OUTPUTS: ReadonlySet<string> = new Set(['rates', 'jointAngles', 'jointAccelerations']);

/**
 * Path (keys and indices) of the first number in a plain result that must not be reported, or undefined when all are.
 * Walks the result depth first in key order on one path stack (a copy is made only for the number found): it visits
 * every number of every evaluation, so it allocates nothing per node.
 */
function firstNonFinite(result: PlainSheetResult, value: unknown, path: (string | number)[], key: string | undefined): { path: (string | number)[]; value: number } | undefined {
  if (typeof value === 'number') {
    if (Number.isFinite(value)) return undefined;
    const allowed = key !== undefined
      && ((value === Infinity && UNBOUNDED_OUTPUTS.has(key)) || (Number.isNaN(value) && undefinedByBuild(result, path, key)));
    return allowed ? undefined : { path: [...path], value };
  }
  if (value === null || typeof value !== 'object') return undefined;
  // A finite number is passed over where it is read, without a call or a step on the path: most of the result is.
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const item: unknown = value[i];
      if (typeof item === 'number' && Number.isFinite(item)) continue;
      path.push(i);
      const found = firstNonFinite(result, item, path, key);
      path.pop();
      if (found) return found;
    }
    return undefined;
  }
  // for...in rather than Object.keys: no array of names per object (a plain result has no inherited enumerable keys).
  for (const name in value) {
    const item = (value as Record<string, unknown>)[name];
    if (typeof item === 'number' && Number.isFinite(item)) continue;
    path.push(name);
    const found = firstNonFinite(result, item, path, name);
    path.pop();
    if (found) return found;
  }
  return undefined;
}

/**
 * firstNonFinite over a whole plain result, in the same order, passing over the fingers kept from an earlier evaluation
 * (checked then, and nothing in a finger's check looks outside the finger).
 */
function firstNonFiniteOfResult(result: PlainSheetResult, kept: readonly (KeptFinger | undefined)[]): { path: (string | number)[]; value: number } | undefined {
  const path: (string | number)[] = [];
  for (const name in result) {
    if (name !== 'fingers') {
      const found = firstNonFinite(result, (result as unknown as Record<string, unknown>)[name], [name], name);
      if (found) return found;
      continue;
    }
    for (let i = 0; i < result.fingers.length; i++) {
      if (kept[i] !== undefined) continue;
      path.push(name, i);
      const found = firstNonFinite(result, result.fingers[i], path, name);
      path.length = 0;
      if (found) return found;
    }
  }
  return undefined;
}

/** The finger and joint an output path belongs to, in words, e.g. ` (finger "left", joint "left-roll")`. */
function describeOwner(doc: SheetDocument, path: readonly (string | number)[]): string {
  if (path[0] !== 'fingers' || typeof path[1] !== 'number') return '';
  const finger = doc.hand.fingers[path[1]];
  if (!finger) return '';
  const perJoint = path.findIndex((segment) => typeof segment === 'string' && PER_JOINT_OUTPUTS.has(segment));
  const joint = perJoint >= 0 && typeof path[perJoint + 1] === 'number' ? finger.joints[path[perJoint + 1] as number] : undefined;
  return joint ? ` (finger "${finger.name}", joint "${joint.name}")` : ` (finger "${finger.name}")`;
}

/** The error for a number of the result that must not be reported. */
function notFiniteError(doc: SheetDocument, bad: { path: (string | number)[]; value: number }): EvaluationError {
  const message = `the result is not a finite number: ${formatIssuePath(bad.path)} is ${bad.value}${describeOwner(doc, bad.path)}; an input is too large or too small for the solve to keep its digits`;
  return { kind: 'invalid', stage: 'solve', message, issues: [{ path: formatIssuePath([]), message }] };
}

/** The result completed with its grasp quality (as evaluateSheet without graspQualityLater gives it), or the error when one of its numbers is not finite. */
function withGraspQuality(doc: SheetDocument, solved: SheetResult, result: PlainSheetResult): Result<PlainSheetResult, EvaluationError> {
  const quality = sheetGraspQuality(doc, solved);
  const complete: PlainSheetResult = { ...result, graspQuality: { ...quality, weakestWrench: Array.from(quality.weakestWrench) } as unknown as PlainSheetResult['graspQuality'] };
  const bad = firstNonFinite(complete, complete.graspQuality, ['graspQuality'], 'graspQuality');
  return bad ? fail(notFiniteError(doc, bad)) : succeed(complete);
}

/** Reads, solves and summarises a sheet document as written, and derives it when asked; never throws for a bad document. */
export function evaluateSheet(input: unknown, options: EvaluateOptions & { derive: true }): Result<DerivedSheetEvaluation, EvaluationError>;
export function evaluateSheet(input: unknown, options?: EvaluateOptions): Result<SheetEvaluation, EvaluationError>;
export function evaluateSheet(input: unknown, options: EvaluateOptions = {}): Result<SheetEvaluation | DerivedSheetEvaluation, EvaluationError> {
  const parsed = (options.read ?? parseSheet)(input);
  if (!parsed.ok) {
    return fail({ kind: 'invalid', stage: 'document', message: parsed.issues[0]?.message ?? 'Invalid sheet document.', issues: parsed.issues });
  }
  const doc = parsed.doc;
  try {
    const memory = options.fingers;
    const kept = keptFingers(memory, doc);
    const solved = solveSheet(doc, memory?.compile);
    // The feed-forward's rolling term needs each contact's motion over the surfaces, so the curvature comes first.
    const curvatures = sheetCurvature(doc, solved, kept.map((finger) => finger?.curvature));
    solveAccelerations(solved, doc.object.acceleration, doc.solver, curvatures, doc.hand.fingers, kept.map((finger) => finger?.acceleration));
    const quality = options.graspQualityLater && !options.derive ? knownSheetGraspQuality(doc, solved) : sheetGraspQuality(doc, solved);
    if (quality) solved.graspQuality = quality;
    const result = toPlainResult(solved, kept.map((finger) => finger?.plain));
    curvatures.forEach((curvature, i) => { if (kept[i] === undefined) result.fingers[i].curvature = curvature; });
    result.commanded = commandedRates(doc, result);
    const bad = firstNonFiniteOfResult(result, kept);
    if (bad) return fail(notFiniteError(doc, bad));
    if (memory) keepFingers(memory, doc, solved, curvatures, result, kept);
    const evaluation: SheetEvaluation = { doc, result, summary: summarize(doc, solved) };
    if (!quality) evaluation.graspQualityLater = () => withGraspQuality(doc, solved, result);
    return succeed(options.derive ? { ...evaluation, derivation: deriveSheet(doc, solved) } : evaluation);
  } catch (error) {
    const message = `the sheet could not be solved: ${error instanceof Error ? error.message : String(error)}`;
    return fail({ kind: 'invalid', stage: 'solve', message, issues: [{ path: formatIssuePath([]), message }] });
  }
}
