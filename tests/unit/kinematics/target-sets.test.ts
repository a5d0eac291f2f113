import { describe, expect, it } from 'vitest';
import { geodesicAngle } from '../../../src/lib/kinematics/metrics';
import { fibonacciAxes, randomRotations, spreadAxisRotations } from '../../../src/lib/kinematics/target-sets';

const IDENTITY = [0, 0, 0, 1];

function norms(values: Float64Array, width: number): number[] {
  return Array.from({ length: values.length / width }, (_, i) => Math.hypot(...values.subarray(width * i, width * i + width)));
}

describe('fibonacciAxes', () => {
  it('gives unit axes whose mean is near zero, as points spread evenly over a sphere must (González 2010, Sec. 2)', () => {
    const n = 200;
    const axes = fibonacciAxes(n);
    expect(norms(axes, 3)).toBeNear(new Array(n).fill(1), { abs: 1e-14 });
    const mean = [0, 1, 2].map((k) => Array.from({ length: n }, (_, i) => axes[3 * i + k]!).reduce((a, b) => a + b, 0) / n);
    // z_i = 1 - (2i + 1)/n sums to zero exactly; x and y turn by the golden angle and nearly cancel.
    expect(Math.hypot(...mean)).toBeLessThan(0.01);
  });

  it('puts one point in each of n equal-height bands of z, so each covers the same area (Archimedes hat-box theorem: area of a zone = 2 pi r h)', () => {
    const n = 50;
    const axes = fibonacciAxes(n);
    const bands = new Set<number>();
    for (let i = 0; i < n; i++) bands.add(Math.floor(((1 - axes[3 * i + 2]!) / 2) * n));
    expect(bands.size).toBe(n);
  });

  it('keeps neighbours apart: the closest pair of 100 lattice points is at least 0.6 of the mean spacing sqrt(4 pi / n) (González 2010 reports near-uniform cells)', () => {
    const n = 100;
    const axes = fibonacciAxes(n);
    let closest = Infinity;
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        closest = Math.min(closest, Math.hypot(axes[3 * i]! - axes[3 * j]!, axes[3 * i + 1]! - axes[3 * j + 1]!, axes[3 * i + 2]! - axes[3 * j + 2]!));
      }
    }
    expect(closest).toBeGreaterThan(0.6 * Math.sqrt((4 * Math.PI) / n));
  });
});

describe('spreadAxisRotations', () => {
  it('turns every rotation by the chosen angle: q = (sin(a/2) axis, cos(a/2)) has geodesic angle a (Huynh 2009, Phi6)', () => {
    const angle = (75 * Math.PI) / 180;
    const rotations = spreadAxisRotations(24, angle);
    for (let i = 0; i < 24; i++) expect(geodesicAngle(rotations.subarray(4 * i, 4 * i + 4), IDENTITY)).toBeNear(angle, { abs: 1e-12 });
    expect(norms(rotations, 4)).toBeNear(new Array(24).fill(1), { abs: 1e-14 });
  });
});

describe('randomRotations', () => {
  const n = 20_000;
  const rotations = randomRotations(n, 11);

  it('gives unit quaternions, the same for the same seed and others for another seed', () => {
    expect(norms(rotations, 4)).toBeNear(new Array(n).fill(1), { abs: 1e-12 });
    expect(randomRotations(5, 11)).toEqual(rotations.subarray(0, 20));
    expect(randomRotations(5, 12)).not.toEqual(rotations.subarray(0, 20));
  });

  it('has mean |w| = 4/(3 pi) of uniform unit quaternions (Shoemake 1992)', () => {
    // Uniform on the 3-sphere, one coordinate w has density (2/pi) sqrt(1 - w^2) on [-1, 1] (the 2-sphere
    // slice at w has area 4 pi (1 - w^2) and the arc element is dw / sqrt(1 - w^2); normalising gives 2/pi),
    // so E|w| = 2 * (2/pi) * integral_0^1 w sqrt(1 - w^2) dw = (4/pi) * (1/3) = 4 / (3 pi) ~ 0.4244.
    // Standard deviation of |w| is sqrt(1/4 - 0.180) ~ 0.26, so the standard error at n = 20000 is ~0.0019.
    let sum = 0;
    for (let i = 0; i < n; i++) sum += Math.abs(rotations[4 * i + 3]!);
    expect(sum / n).toBeNear(4 / (3 * Math.PI), { abs: 0.008 });
  });

  it('has second moments E[q q^T] = I/4, the same in every direction (isotropy of the uniform measure on the 3-sphere)', () => {
    const moments = new Array(16).fill(0);
    for (let i = 0; i < n; i++) for (let a = 0; a < 4; a++) for (let b = 0; b < 4; b++) moments[4 * a + b] += (rotations[4 * i + a]! * rotations[4 * i + b]!) / n;
    const quarterIdentity = Array.from({ length: 16 }, (_, k) => (k % 5 === 0 ? 0.25 : 0));
    expect(moments).toBeNear(quarterIdentity, { abs: 0.01 });
  });

  it('has mean rotation angle pi/2 + 2/pi, the Haar measure on SO(3) (Miles, Biometrika 52, 1965: angle density (1 - cos t)/pi)', () => {
    // E[t] = (1/pi) integral_0^pi t (1 - cos t) dt = (1/pi) (pi^2/2 - [t sin t + cos t]_0^pi) = (1/pi)(pi^2/2 + 2) = pi/2 + 2/pi ~ 2.2074.
    // The angle's standard deviation is about 0.7, so the standard error at n = 20000 is ~0.005.
    let sum = 0;
    for (let i = 0; i < n; i++) sum += geodesicAngle(rotations.subarray(4 * i, 4 * i + 4), IDENTITY);
    expect(sum / n).toBeNear(Math.PI / 2 + 2 / Math.PI, { abs: 0.02 });
  });
});
