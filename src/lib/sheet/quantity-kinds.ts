/**
 * The kinds of quantity a sheet field holds, with the SI unit each is read in: a leaf module the
 * browser may import without the expression reader (units.ts, which brings mathjs).
 */

export type QuantityKind = 'length' | 'angle' | 'time' | 'speed' | 'angularSpeed' | 'acceleration' | 'angularAcceleration' | 'rate' | 'any';

export interface KindInfo {
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
  acceleration: { si: 'm/s^2', noun: 'an acceleration', example: '2 m/s^2' },
  angularAcceleration: { si: 'rad/s^2', noun: 'an angular acceleration', example: '5 rad/s^2' },
  rate: { si: 's^-1', noun: 'a rate', example: '2 /s' },
};
