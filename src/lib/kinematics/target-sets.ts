/**
 * Target rotations for a test matrix: axes spread evenly over the sphere by the Fibonacci lattice
 * (Á. González, "Measurement of areas on a sphere using Fibonacci and latitude-longitude lattices",
 * Math. Geosci. 42, 2010), each turned by one angle, and uniformly random rotations by Shoemake's
 * subgroup algorithm (K. Shoemake, "Uniform random rotations", Graphics Gems III, 1992, pp. 124-132)
 * drawn from the seeded generator of random.ts. Quaternions are [x, y, z, w].
 */
import { createRandom, nextUniform } from './random';

/** The golden angle pi (3 - sqrt 5), rad: successive lattice points turn by it about the pole. */
const GOLDEN_ANGLE = Math.PI * (3 - Math.sqrt(5));

/** count unit axes of the Fibonacci lattice, z_i = 1 - (2i + 1)/count, longitude i times the golden angle (palm frame, unitless), 3 per axis. */
export function fibonacciAxes(count: number): Float64Array {
  const out = new Float64Array(3 * count);
  for (let i = 0; i < count; i++) {
    const z = 1 - (2 * i + 1) / count;
    const ring = Math.sqrt(Math.max(0, 1 - z * z));
    const longitude = i * GOLDEN_ANGLE;
    out[3 * i] = ring * Math.cos(longitude);
    out[3 * i + 1] = ring * Math.sin(longitude);
    out[3 * i + 2] = z;
  }
  return out;
}

/** count rotations by angle (rad) about the Fibonacci lattice's axes (palm frame), 4 per rotation [x, y, z, w]. */
export function spreadAxisRotations(count: number, angle: number): Float64Array {
  const axes = fibonacciAxes(count);
  const out = new Float64Array(4 * count);
  const s = Math.sin(angle / 2);
  const c = Math.cos(angle / 2);
  for (let i = 0; i < count; i++) {
    out[4 * i] = s * axes[3 * i]!;
    out[4 * i + 1] = s * axes[3 * i + 1]!;
    out[4 * i + 2] = s * axes[3 * i + 2]!;
    out[4 * i + 3] = c;
  }
  return out;
}

/** count rotations uniform over SO(3) (Haar measure) from the seeded generator, 4 per rotation [x, y, z, w]; same seed, same rotations. */
export function randomRotations(count: number, seed: number): Float64Array {
  const random = createRandom(seed);
  const out = new Float64Array(4 * count);
  for (let i = 0; i < count; i++) {
    const u1 = nextUniform(random);
    const u2 = 2 * Math.PI * nextUniform(random);
    const u3 = 2 * Math.PI * nextUniform(random);
    const r1 = Math.sqrt(1 - u1);
    const r2 = Math.sqrt(u1);
    out[4 * i] = r1 * Math.sin(u2);
    out[4 * i + 1] = r1 * Math.cos(u2);
    out[4 * i + 2] = r2 * Math.sin(u3);
    out[4 * i + 3] = r2 * Math.cos(u3);
  }
  return out;
}
