import { describe, expect, it } from 'vitest';
import { erf } from 'mathjs';
import { createRandom, fillGaussian, nextGaussian, nextUint32, nextUniform } from '../../../src/lib/kinematics/random';

describe('nextUint32', () => {
  it('matches the xoshiro128** reference C implementation (v1.1) from state {1, 2, 3, 4}, as listed in the rand_xoshiro crate tests', () => {
    const random = createRandom(0);
    random.state.set([1, 2, 3, 4]);
    const outputs = Array.from({ length: 10 }, () => nextUint32(random));
    expect(outputs).toEqual([
      11520, 0, 5927040, 70819200, 2031721883, 1637235492, 1287239034, 3734860849, 3729100597, 4258142804,
    ]);
  });
});

describe('createRandom', () => {
  it('repeats the sequence for the same seed and differs for neighbouring seeds', () => {
    const draw = (seed: number) => {
      const r = createRandom(seed);
      return Array.from({ length: 8 }, () => nextUint32(r));
    };
    expect(draw(42)).toEqual(draw(42));
    expect(draw(42)).not.toEqual(draw(43));
    expect(draw(0)).not.toEqual(draw(1));
  });

  it('never starts from the all-zero state, which xoshiro cannot leave (Blackman & Vigna 2021, Sec. 3)', () => {
    for (let seed = -5; seed < 50; seed++) {
      const s = createRandom(seed).state;
      expect(s[0]! | s[1]! | s[2]! | s[3]!).not.toBe(0);
    }
  });
});

describe('nextUniform', () => {
  it('lies in [0, 1) and passes a chi-square goodness-of-fit test on 20 bins (critical value 43.82 at 19 dof, p = 0.001; value from memory)', () => {
    const random = createRandom(7);
    const bins = new Array<number>(20).fill(0);
    const n = 100_000;
    let outside = 0;
    for (let i = 0; i < n; i++) {
      const u = nextUniform(random);
      if (!(u >= 0 && u < 1)) outside++;
      else bins[Math.floor(u * 20)]!++;
    }
    expect(outside).toBe(0);
    const expected = n / 20;
    const chiSquare = bins.reduce((sum, count) => sum + (count - expected) ** 2 / expected, 0);
    expect(chiSquare).toBeLessThan(43.82);
  });
});

describe('nextGaussian', () => {
  it('has mean 0 and variance 1 within sampling error (4 standard errors) over 200,000 samples', () => {
    const random = createRandom(123);
    const n = 200_000;
    let sum = 0;
    let sumSquares = 0;
    for (let i = 0; i < n; i++) {
      const x = nextGaussian(random);
      sum += x;
      sumSquares += x * x;
    }
    const mean = sum / n;
    const variance = sumSquares / n - mean * mean;
    expect(Math.abs(mean)).toBeLessThan(4 / Math.sqrt(n));
    // Variance of the sample variance of a normal is 2 sigma^4 / n.
    expect(Math.abs(variance - 1)).toBeLessThan(4 * Math.sqrt(2 / n));
  });

  it('passes a Kolmogorov-Smirnov test against the normal CDF 0.5 (1 + erf(x / sqrt 2)) from mathjs (critical value 1.63 / sqrt n at alpha = 0.01; value from memory)', () => {
    const random = createRandom(99);
    const n = 20_000;
    const samples = Array.from({ length: n }, () => nextGaussian(random)).sort((a, b) => a - b);
    let d = 0;
    samples.forEach((x, i) => {
      const cdf = 0.5 * (1 + erf(x / Math.SQRT2));
      d = Math.max(d, Math.abs(cdf - i / n), Math.abs(cdf - (i + 1) / n));
    });
    expect(d).toBeLessThan(1.63 / Math.sqrt(n));
  });
});

describe('fillGaussian', () => {
  it('scales by the standard deviation and matches nextGaussian on a same-seeded source', () => {
    const a = createRandom(5);
    const b = createRandom(5);
    const out = fillGaussian(a, 0.01, new Float64Array(6));
    expect(out).toBeNear(Array.from({ length: 6 }, () => 0.01 * nextGaussian(b)), { digits: 15 });
  });
});
