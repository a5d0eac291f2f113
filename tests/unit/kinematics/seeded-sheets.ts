/** Arbitraries (fast-check) for seeded hands and poses: object shapes of hand size and bounded vector components. */
import fc from 'fast-check';
import type { ObjectShape } from '../../../src/lib/sheet/types';

const mm = (lo: number, hi: number) => fc.double({ min: lo / 1000, max: hi / 1000, noNaN: true, noDefaultInfinity: true });

/** Spheres, filleted boxes, cylinders and ellipsoids of 10 to 35 mm, the sizes the hand templates grasp. */
export const shapeArbitrary: fc.Arbitrary<ObjectShape> = fc.oneof(
  mm(15, 35).map((radius): ObjectShape => ({ kind: 'sphere', radius })),
  fc.tuple(mm(15, 30), mm(15, 30), mm(15, 30), mm(0, 4)).map(([a, b, c, f]): ObjectShape => ({ kind: 'box', halfExtents: [a, b, c], filletRadius: f })),
  fc.tuple(mm(10, 25), mm(10, 35)).map(([radius, halfLength]): ObjectShape => ({ kind: 'cylinder', radius, halfLength })),
  fc.tuple(mm(18, 35), mm(18, 35), mm(18, 35)).map(([a, b, c]): ObjectShape => ({ kind: 'ellipsoid', semiAxes: [a, b, c] })),
);

/** A number in [-limit, limit]. */
export const component = (limit: number) => fc.double({ min: -limit, max: limit, noNaN: true });

/** Three numbers in [-limit, limit]. */
export const vector = (limit: number) => fc.tuple(component(limit), component(limit), component(limit));
