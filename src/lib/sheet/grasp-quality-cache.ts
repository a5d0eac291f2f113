/**
 * The grasp quality of a solved sheet, computed once per distinct set of contacts. It is by far the
 * largest part of an evaluation (a face search over the contacts' wrench hull), and most edits
 * (speeds, limits, run settings, notes) and every save of an unchanged hand leave the contacts as
 * they were. The key holds every number the computation reads, so a hit is the same result.
 */
import { computeGraspQuality, sheetGraspQualityInput, type GraspQuality, type GraspQualityInput, type SheetResult } from '../kinematics';
import type { SheetDocument } from './types';
import { BoundedCache } from './bounded-cache';

/** Distinct contact sets remembered: a few hundred bytes each. */
const CAPACITY = 256;
const qualities = new BoundedCache<string, GraspQuality>(CAPACITY);

/** The key's numbers, reused between calls (grown when a key needs more). */
let keyNumbers = new Float64Array(64);

/**
 * Every number of the input bit for bit, four UTF-16 code units per number (-0 apart from 0): String() of each number
 * took about a tenth of a warmed edit's recompute in Chromium. The lists' lengths follow from the contact count, and the
 * torque length is preceded by whether it is given.
 */
function keyOf(input: Readonly<GraspQualityInput>): string {
  const length = 9 + input.points.length + input.normals.length + input.friction.length;
  if (keyNumbers.length < length) keyNumbers = new Float64Array(2 * length);
  const numbers = keyNumbers;
  numbers[0] = input.contactCount;
  numbers[1] = input.coneEdges;
  numbers[2] = input.torsionalFriction;
  numbers[3] = input.torqueLength === undefined ? 0 : 1;
  numbers[4] = input.torqueLength ?? 0;
  numbers[5] = input.origin[0];
  numbers[6] = input.origin[1];
  numbers[7] = input.origin[2];
  let at = 8;
  for (const list of [input.points, input.normals, input.friction]) for (let i = 0; i < list.length; i++) numbers[at++] = list[i];
  return String.fromCharCode.apply(null, new Uint16Array(numbers.buffer, 0, 4 * at) as unknown as number[]);
}

/** A copy, so that no caller can change what the next one gets. */
const copyOf = (quality: GraspQuality): GraspQuality => ({ ...quality, weakestWrench: new Float64Array(quality.weakestWrench) });

/** The grasp quality of the solved sheet's contacts when these exact contacts were seen, else undefined (nothing is computed). */
export function knownSheetGraspQuality(doc: SheetDocument, result: SheetResult): GraspQuality | undefined {
  const quality = qualities.get(keyOf(sheetGraspQualityInput(doc, result)));
  return quality === undefined ? undefined : copyOf(quality);
}

/** Grasp quality of the solved sheet's contacts (as computeSheetGraspQuality), from the cache when these exact contacts were seen. */
export function sheetGraspQuality(doc: SheetDocument, result: SheetResult): GraspQuality {
  const input = sheetGraspQualityInput(doc, result);
  const key = keyOf(input);
  let quality = qualities.get(key);
  if (quality === undefined) {
    quality = computeGraspQuality(input);
    qualities.set(key, quality);
  }
  return copyOf(quality);
}
