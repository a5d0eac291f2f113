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

/** The number's exact text: String() writes the shortest text that reads back to the same double, and -0 apart from 0. */
const exact = (value: number | undefined): string => (value === undefined ? 'u' : Object.is(value, -0) ? '-0' : String(value));

function keyOf(input: Readonly<GraspQualityInput>): string {
  const parts = [input.contactCount, input.coneEdges, input.torsionalFriction, input.torqueLength, input.origin[0], input.origin[1], input.origin[2]].map(exact);
  for (const list of [input.points, input.normals, input.friction]) {
    parts.push('|');
    for (let i = 0; i < list.length; i++) parts.push(exact(list[i]));
  }
  return parts.join(' ');
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
