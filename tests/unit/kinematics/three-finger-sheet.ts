import type { FingerInput, SheetDocument } from '../../../src/lib/sheet/types';

/**
 * A made-up three-finger hand around a 40 mm ball (numbers invented for tests): each finger has a
 * base joint about the local tangent below the ball, a pivot along the contact normal through
 * the roller centre, and a roll joint about the vertical through the roller centre.
 */
export function threeFingerFinger(index: number, angleOffset = 0): FingerInput {
  const a = (2 * Math.PI * index) / 3 + angleOffset;
  const er: [number, number, number] = [Math.cos(a), Math.sin(a), 0];
  const et: [number, number, number] = [-Math.sin(a), Math.cos(a), 0];
  const center: [number, number, number] = [0.052 * er[0], 0.052 * er[1], 0];
  return {
    name: `finger ${index + 1}`,
    joints: [
      { name: 'base', role: 'base', axis: et, point: [0.1 * er[0], 0.1 * er[1], -0.05], angle: 0 },
      { name: 'pivot', role: 'pivot', axis: er, point: center, angle: 0 },
      { name: 'roll', role: 'roll', axis: [0, 0, 1], point: center, angle: 0 },
    ],
    roller: { kind: 'sphere', radius: 0.012, center },
  };
}

export function threeFingerSheet(overrides: Partial<SheetDocument> = {}): SheetDocument {
  return {
    format: 'slipless.sheet',
    version: 1,
    title: 'three-finger test hand',
    description: '',
    tags: [],
    object: {
      shape: { kind: 'sphere', radius: 0.04 },
      pose: { position: [0, 0, 0], orientation: { w: 1, x: 0, y: 0, z: 0 } },
      twist: { linear: [0.01, 0, 0.02], angular: [0, 0, 0.5] },
    },
    hand: { name: 'test hand', fingers: [0, 1, 2].map((i) => threeFingerFinger(i)) },
    motion: {
      target: { position: [0, 0, 0.01], orientation: { w: 1, x: 0, y: 0, z: 0 } },
      run: { gain: 2, dt: 0.01, maxTicks: 100, positionTolerance: 1e-4, angleTolerance: 1e-3, stopOnSingular: false },
    },
    solver: { damping: 1e-4, singularRatio: 1e-3, axisDistance: 1e-3, minTangentialSpeed: 1e-5, contactTolerance: 2e-4, softFinger: false },
    ...overrides,
  };
}
