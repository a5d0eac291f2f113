/**
 * Seeded pseudo-random numbers for reproducible sensor noise: xoshiro128** (Blackman & Vigna,
 * "Scrambled linear pseudorandom number generators", ACM TOMS 47(4), 2021), its 128-bit state
 * filled SplitMix-style as the authors advise (a Weyl sequence through the MurmurHash3 32-bit
 * finalizer, so nearby seeds give unrelated states, never all zero), and standard normal
 * samples by the Box-Muller transform (Box & Muller, Ann. Math. Statist. 29, 1958).
 */

export interface RandomSource {
  readonly state: Uint32Array;
  /** Second Box-Muller sample kept for the next call. */
  spare: number;
  hasSpare: boolean;
}

function murmurFinalize32(x: number): number {
  let z = x;
  z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
  z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
  return (z ^ (z >>> 16)) >>> 0;
}

/** Generator seeded by any number (its low 32 bits after truncation are used); same seed, same sequence. */
export function createRandom(seed: number): RandomSource {
  const state = new Uint32Array(4);
  let x = Math.trunc(seed) | 0;
  for (let i = 0; i < 4; i++) {
    x = (x + 0x9e3779b9) | 0;
    state[i] = murmurFinalize32(x);
  }
  if ((state[0]! | state[1]! | state[2]! | state[3]!) === 0) state[0] = 1;
  return { state, spare: 0, hasSpare: false };
}

/** Next 32-bit unsigned integer in [0, 2^32). */
export function nextUint32(random: RandomSource): number {
  const s = random.state;
  const s0 = s[0]!;
  const s1 = s[1]!;
  const s2 = s[2]!;
  const s3 = s[3]!;
  const times5 = Math.imul(s1, 5);
  const rotated = (times5 << 7) | (times5 >>> 25);
  const result = Math.imul(rotated, 9) >>> 0;
  const t = s1 << 9;
  const n2 = s2 ^ s0;
  const n3 = s3 ^ s1;
  s[1] = s1 ^ n2;
  s[0] = s0 ^ n3;
  s[2] = n2 ^ t;
  s[3] = (n3 << 11) | (n3 >>> 21);
  return result;
}

/** Uniform sample in [0, 1) with 32 random bits (dimensionless). */
export function nextUniform(random: RandomSource): number {
  return nextUint32(random) / 4294967296;
}

/** Standard normal sample, mean 0 and standard deviation 1 (dimensionless). */
export function nextGaussian(random: RandomSource): number {
  if (random.hasSpare) {
    random.hasSpare = false;
    return random.spare;
  }
  // 1 - u lies in (0, 1], so the logarithm is finite.
  const radius = Math.sqrt(-2 * Math.log(1 - nextUniform(random)));
  const angle = 2 * Math.PI * nextUniform(random);
  random.spare = radius * Math.sin(angle);
  random.hasSpare = true;
  return radius * Math.cos(angle);
}

/** Fills out with independent normal samples of the given standard deviation (caller's units). */
export function fillGaussian(random: RandomSource, standardDeviation: number, out: Float64Array): Float64Array {
  for (let i = 0; i < out.length; i++) out[i] = standardDeviation * nextGaussian(random);
  return out;
}
