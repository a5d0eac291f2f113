/**
 * Lengths a hand plausibly has. A bare number in a length field is read as metres, so "85" typed
 * for a roller radius of 85 mm reads as 85 m: valid, but no fingertip is that large. These ranges
 * raise an input note (never an error) beside the field; content/docs/units.md states them.
 * A leaf module the browser may import.
 */
import { DEFAULT_DISPLAY_UNITS, type DisplayUnits } from './display-units';
import { formatShownNumber, formatShownQuantity } from './outputs';

export interface PlausibleRange {
  /** What the field is, in a note's words. */
  what: string;
  /** Smallest plausible magnitude in m (a positive value below it is noted); 0 for none. */
  min: number;
  /** Largest plausible magnitude in m. */
  max: number;
}

/** The plausible lengths by kind of length field (metres). */
export const PLAUSIBLE_LENGTHS = {
  /** Roller radius and half width: fingertip rollers run from a few millimetres to about a palm's width. */
  roller: { what: 'a roller radius or half width', min: 0.001, max: 0.1 },
  /** Object radius, half length, half extents and semi-axes: what a hand can hold. */
  object: { what: 'an object held in a hand', min: 0.001, max: 0.5 },
  /** Any other length of the sheet (positions, joint points, tolerances): within reach of the palm. */
  hand: { what: 'a hand (within reach of the palm)', min: 0, max: 1 },
} as const satisfies Record<string, PlausibleRange>;

export type PlausibleLengthKind = keyof typeof PLAUSIBLE_LENGTHS;

/**
 * An input note when a length (m) lies outside the plausible range of its field, or null. When
 * the text was a bare number the note says it was read as metres and names the reading in millimetres.
 */
export function lengthNote(valueSI: number, kind: PlausibleLengthKind, bareNumber: boolean, units: DisplayUnits = DEFAULT_DISPLAY_UNITS): string | null {
  const range = PLAUSIBLE_LENGTHS[kind];
  const magnitude = Math.abs(valueSI);
  const tooLarge = magnitude > range.max;
  const tooSmall = magnitude > 0 && magnitude < range.min;
  if (!tooLarge && !tooSmall) return null;
  const shown = (x: number) => formatShownQuantity(x, 'm', units);
  const expected = range.min > 0 ? `${shown(range.min)} to ${shown(range.max)}` : `at most ${shown(range.max)}`;
  const reading = bareNumber ? ` A bare number is read as metres: did you mean ${formatShownNumber(valueSI, 6)} mm?` : '';
  return `${shown(valueSI)} is implausible for ${range.what} (expected ${expected}).${tooLarge ? reading : ''}`;
}
