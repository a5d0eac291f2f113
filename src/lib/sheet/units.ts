/**
 * Physical quantities at the edges of the product. Sheet documents may write a quantity as a
 * plain number (already SI: m, rad, s, m/s, rad/s, 1/s) or as a string with a unit ("12 mm",
 * "30 deg", "0.5 rad/s", "20 mm/s"). Everything inside the core is SI.
 */
import { create, createUnitDependencies, unitDependencies, type Unit } from 'mathjs';

/** A private mathjs instance so that the extra units below never leak into other users of mathjs. */
const math = create({ unitDependencies, createUnitDependencies });
// Motor data sheets give speeds in revolutions per minute; 1 rpm = 2 pi rad / 60 s.
math.createUnit('rpm', `${(2 * Math.PI) / 60} rad/s`);

export type QuantityKind = 'length' | 'angle' | 'time' | 'speed' | 'angularSpeed' | 'rate' | 'any';

/** A quantity as written in a sheet document: a number in SI units or a string with a unit. */
export type QuantityInput = number | string;

export type QuantityResult = { ok: true; value: number } | { ok: false; message: string };

interface KindInfo {
  /** SI unit in which plain numbers are read and in which the core works. */
  si: string;
  /** Noun used in messages ("expected a length"). */
  noun: string;
  /** Example of a unit string for messages. */
  example: string;
}

export const QUANTITY_KINDS: Record<Exclude<QuantityKind, 'any'>, KindInfo> = {
  length: { si: 'm', noun: 'a length', example: '12 mm' },
  angle: { si: 'rad', noun: 'an angle', example: '30 deg' },
  time: { si: 's', noun: 'a time', example: '5 ms' },
  speed: { si: 'm/s', noun: 'a speed', example: '20 mm/s' },
  angularSpeed: { si: 'rad/s', noun: 'an angular speed', example: '0.5 rad/s' },
  rate: { si: 's^-1', noun: 'a rate', example: '2 /s' },
};

const referenceUnits = new Map<string, Unit>(
  Object.entries(QUANTITY_KINDS).map(([kind, info]) => [kind, math.unit(info.si)]),
);

function nounOf(kind: QuantityKind): string {
  return kind === 'any' ? 'a quantity' : QUANTITY_KINDS[kind].noun;
}

function readUnit(text: string, kind: QuantityKind): { ok: true; unit: Unit } | { ok: false; message: string } {
  let parsed: Unit;
  try {
    parsed = math.unit(text.trim());
  } catch (error) {
    const reason = error instanceof Error ? error.message : String(error);
    return { ok: false, message: `expected ${nounOf(kind)}, could not read "${text}" (${reason})` };
  }
  if (parsed.units.length === 0) {
    const example = kind === 'any' ? '12 mm' : QUANTITY_KINDS[kind].example;
    return {
      ok: false,
      message: `expected ${nounOf(kind)}, got "${text}" without a unit; write a plain number for SI or a string such as "${example}"`,
    };
  }
  if (parsed.value === null || !Number.isFinite(parsed.toSI().toNumber())) {
    return { ok: false, message: `expected ${nounOf(kind)} with a finite value, got "${text}"` };
  }
  return { ok: true, unit: parsed };
}

/** Converts a sheet quantity (SI number or unit string) to its SI value (m, rad, s, m/s, rad/s or 1/s by kind). */
export function parseQuantity(input: QuantityInput, kind: QuantityKind): QuantityResult {
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) return { ok: false, message: `expected ${nounOf(kind)}, got ${input}` };
    return { ok: true, value: input };
  }
  const read = readUnit(input, kind);
  if (!read.ok) return read;
  if (kind === 'any') return { ok: true, value: read.unit.toSI().toNumber() };
  const reference = referenceUnits.get(kind);
  if (!reference || !read.unit.equalBase(reference)) {
    return { ok: false, message: `expected ${nounOf(kind)}, got ${input.trim()}` };
  }
  return { ok: true, value: read.unit.toNumber(QUANTITY_KINDS[kind].si) };
}

/** SI value of a sheet quantity (units by kind); throws a RangeError with the parse message when it is not one. */
export function toSI(input: QuantityInput, kind: QuantityKind): number {
  const result = parseQuantity(input, kind);
  if (!result.ok) throw new RangeError(result.message);
  return result.value;
}

/** Value of an SI quantity of the given kind expressed in displayUnit (e.g. 0.012 m in "mm" is 12). */
export function fromSI(valueSI: number, kind: Exclude<QuantityKind, 'any'>, displayUnit: string): number {
  const { si, noun } = QUANTITY_KINDS[kind];
  const target = readUnit(`1 ${displayUnit}`, kind);
  if (!target.ok) throw new RangeError(target.message);
  const reference = referenceUnits.get(kind);
  if (!reference || !target.unit.equalBase(reference)) {
    throw new RangeError(`cannot show ${noun} in ${displayUnit}`);
  }
  return math.unit(valueSI, si).toNumber(displayUnit);
}

/** Text of an SI quantity in displayUnit with the given significant digits, e.g. "12 mm" for 0.012 m. */
export function formatQuantity(
  valueSI: number,
  kind: Exclude<QuantityKind, 'any'>,
  displayUnit: string,
  significantDigits = 4,
): string {
  const shown = Number(fromSI(valueSI, kind, displayUnit).toPrecision(significantDigits));
  return `${Object.is(shown, -0) ? 0 : shown} ${displayUnit}`;
}
