/**
 * The units a sheet shows its numbers in: one choice per sheet (stored in the document as `display`),
 * read by the results, the derivation, the comparison and the report. Inside the core and in every
 * export the numbers stay SI; only what a person reads follows this choice. A leaf module the browser may import.
 */

export const LENGTH_UNITS = ['mm', 'm'] as const;
export const ANGLE_UNITS = ['deg', 'rad'] as const;
export const ANGULAR_SPEED_UNITS = ['rad/s', 'rpm'] as const;

export interface DisplayUnits {
  length: (typeof LENGTH_UNITS)[number];
  angle: (typeof ANGLE_UNITS)[number];
  angularSpeed: (typeof ANGULAR_SPEED_UNITS)[number];
}

/** The look every sheet had before the choice existed: lengths in mm, angles in degrees, joint rates in rad/s. */
export const DEFAULT_DISPLAY_UNITS: Readonly<DisplayUnits> = { length: 'mm', angle: 'deg', angularSpeed: 'rad/s' };

/** The choices offered for each part, with the words a picker shows. */
export const DISPLAY_UNIT_CHOICES = {
  length: { label: 'lengths', units: LENGTH_UNITS },
  angle: { label: 'angles', units: ANGLE_UNITS },
  angularSpeed: { label: 'joint rates', units: ANGULAR_SPEED_UNITS },
} as const;

const isOneOf = <T extends string>(list: readonly T[], value: unknown): value is T => typeof value === 'string' && (list as readonly string[]).includes(value);

/**
 * The display units of a document as written (also one that does not read as a sheet): each part
 * that names a known unit, the default for the rest, so a page never fails on a bad choice (the sheet reader reports it).
 */
export function displayUnitsOf(document: unknown): DisplayUnits {
  const written = document !== null && typeof document === 'object' ? (document as { display?: unknown }).display : undefined;
  const part = written !== null && typeof written === 'object' ? (written as Record<string, unknown>) : {};
  return {
    length: isOneOf(LENGTH_UNITS, part.length) ? part.length : DEFAULT_DISPLAY_UNITS.length,
    angle: isOneOf(ANGLE_UNITS, part.angle) ? part.angle : DEFAULT_DISPLAY_UNITS.angle,
    angularSpeed: isOneOf(ANGULAR_SPEED_UNITS, part.angularSpeed) ? part.angularSpeed : DEFAULT_DISPLAY_UNITS.angularSpeed,
  };
}

/**
 * The unit an SI unit is shown in under the choice: lengths, speeds (length per second), angles and
 * angular speeds follow it; every other unit (accelerations, m/rad, 1/m, ratios) is shown as `fallback`.
 */
export function shownUnit(siUnit: string, units: DisplayUnits, fallback = siUnit): string {
  switch (siUnit) {
    case 'm':
      return units.length;
    case 'm/s':
      return `${units.length}/s`;
    case 'rad':
      return units.angle;
    case 'rad/s':
      return units.angularSpeed;
    default:
      return fallback;
  }
}

/**
 * How many of each shown unit make one of its SI unit, for the pairs shownUnit can give. A table
 * rather than mathjs, so pages that only show numbers load no expression reader; the unit tests
 * hold every entry against mathjs' own conversion.
 */
export const DISPLAY_FACTORS: Readonly<Record<string, number>> = {
  'm mm': 1000,
  'm/s mm/s': 1000,
  'rad deg': 180 / Math.PI,
  'rad/s rpm': 60 / (2 * Math.PI),
};

/** How many `unit` make one `siUnit` (1 when they are the same); only for the pairs the display choice gives. */
export function displayFactor(siUnit: string, unit: string): number {
  if (unit === siUnit) return 1;
  const factor = DISPLAY_FACTORS[`${siUnit} ${unit}`];
  if (factor === undefined) throw new RangeError(`no display factor from ${siUnit} to ${unit}`);
  return factor;
}

/** An SI value in the unit the choice shows it in; other units unchanged. */
export function toShown(valueSI: number, siUnit: string, units: DisplayUnits): number {
  return valueSI * displayFactor(siUnit, shownUnit(siUnit, units));
}
