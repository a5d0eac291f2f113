/**
 * The results of a solved sheet as the compute command writes them in JSON: the result with its object orientation
 * as a named scalar-first quaternion (as documents write it), the commanded rates, and a legend of the frames,
 * reference point and conventions every vector follows.
 */
import type { PlainSheetResult } from '../kinematics';
import { commandedRates, type CommandedRates } from './commanded';
import type { QuaternionInput, SheetDocument } from './types';

/** What every number of an exported result is expressed in. */
export const RESULT_CONVENTIONS = {
  units: 'SI: m, rad, s',
  frame: 'every vector in the palm (world) frame',
  twist: 'object.linearVelocity is the velocity of the object origin, object.angularVelocity the angular velocity; both palm frame',
  quaternion: 'w, x, y, z (scalar first)',
} as const;

export type ExportedResult = Omit<PlainSheetResult, 'object' | 'commanded'> & {
  object: Omit<PlainSheetResult['object'], 'orientation'> & { orientation: QuaternionInput };
  commanded: CommandedRates;
  conventions: typeof RESULT_CONVENTIONS;
};

/** The core's [x, y, z, w] quaternion as named parts, scalar first. */
export function namedQuaternion(q: ArrayLike<number>, offset = 0): QuaternionInput {
  return { w: q[offset + 3]!, x: q[offset]!, y: q[offset + 1]!, z: q[offset + 2]! };
}

/** A solved result as exported: named quaternion, commanded rates (computed when the result has none, as a sweep's), conventions. */
export function exportedResult(doc: SheetDocument, result: PlainSheetResult): ExportedResult {
  return {
    ...result,
    object: { ...result.object, orientation: namedQuaternion(result.object.orientation) },
    commanded: result.commanded ?? commandedRates(doc, result),
    conventions: RESULT_CONVENTIONS,
  };
}
