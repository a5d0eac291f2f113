/**
 * The message protocol of a worked example's calculator worker: the compute worker's evaluation
 * (evaluate.ts, without the derivation the calculator never shows) with the chosen outputs, the
 * warnings and the drawing prepared in the worker, so the page thread holds neither the unit
 * library nor the output catalogue and the example page stays light.
 */
import { readOutput, type OutputAddress } from '../lib/examples/read-output';
import { evaluateSheet } from '../lib/sheet/evaluate';
import { formatShownNumber } from '../lib/sheet/outputs';
import type { SheetIssue } from '../lib/sheet/schema';
import { unitFactor } from '../lib/sheet/units';
import { describeWarning, type WarningNote } from '../lib/sheet/warning-notes';
import { buildSceneModel, type SceneModel } from '../lib/view/scene-model';

export interface CalculatorOutput extends OutputAddress {
  label: string;
  /** The unit to show (mathjs conversion from SI); the editor's display unit when absent. */
  unit?: string;
}

export interface ExampleRequest {
  type: 'compute';
  id: number;
  document: unknown;
  outputs: CalculatorOutput[];
}

export type ExampleReply =
  | { type: 'computed'; id: number; ok: true; outputs: string[]; warnings: WarningNote[]; scene: SceneModel }
  | { type: 'computed'; id: number; ok: false; issues: SheetIssue[] }
  | { type: 'refused'; message: string };

/** One output of a result as text in its unit, or "—" when the sheet has no such output. */
function outputText(result: Parameters<typeof readOutput>[0], output: CalculatorOutput): string {
  try {
    const read = readOutput(result, output);
    if (typeof read.value === 'string') return read.value;
    const unit = output.unit ?? read.shownUnit;
    const plain = read.unit === '' || read.unit === '1' || unit === read.unit;
    const number = formatShownNumber(plain ? read.value : read.value * unitFactor(read.unit, unit), 4);
    return unit === '' || unit === '1' ? number : `${number} ${unit}`;
  } catch {
    return '—';
  }
}

/** Answers one message: solves the sheet and prepares what the calculator shows, or reports where the document is wrong. */
export function computeExample(message: unknown): ExampleReply {
  const request = message as Partial<ExampleRequest> | null;
  if (request?.type !== 'compute' || typeof request.id !== 'number' || !Array.isArray(request.outputs)) {
    return { type: 'refused', message: 'expected {type: "compute", id, document, outputs}' };
  }
  const evaluated = evaluateSheet(request.document);
  if (!evaluated.ok) return { type: 'computed', id: request.id, ok: false, issues: evaluated.error.issues };
  const { doc, result } = evaluated.value;
  return {
    type: 'computed',
    id: request.id,
    ok: true,
    outputs: request.outputs.map((output) => outputText(result, output)),
    warnings: result.warnings.map((w) => describeWarning(w, result.fingers)),
    scene: buildSceneModel(doc, result),
  };
}
