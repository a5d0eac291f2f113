/**
 * Eigenvalues of symmetric 3 x 3 matrices and the singular values of 3-row Jacobians that follow
 * from them, in closed or unrolled form: the per-solve kernels of the contact and grasp solutions,
 * beside the general routines of linalg.ts. Row-major; units those of the entries.
 */
import type { Matrix } from './linalg';

const JACOBI_SWEEPS = 16;
const NEGLIGIBLE = 1e-16;

/**
 * Eigenvalues (descending, into values) and optionally unit eigenvectors (columns of the
 * row-major 3 x 3 vectors) of the symmetric matrix [[a00, a01, a02], [a01, a11, a12],
 * [a02, a12, a22]] packed as entries = [a00, a11, a22, a01, a02, a12], by cyclic Jacobi rotations
 * (Golub & Van Loan, "Matrix Computations", 4th ed., sec. 8.5.2-8.5.3), which keep every
 * eigenvalue accurate to rounding relative to the largest, also when two coincide; units of the
 * entries. The entries come packed because arrays cross the call unboxed, where six computed
 * numbers passed to a function too large to inline would each be boxed on the heap.
 */
export function symmetricEigen3Packed(entries: ArrayLike<number>, values: Float64Array, vectors: Float64Array | null = null): Float64Array {
  let a00 = entries[0], a11 = entries[1], a22 = entries[2], a01 = entries[3], a02 = entries[4], a12 = entries[5];
  let v00 = 1, v01 = 0, v02 = 0, v10 = 0, v11 = 1, v12 = 0, v20 = 0, v21 = 0, v22 = 1;
  // Without vectors the rotations skip their accumulation, which leaves the eigenvalues as they are.
  const track = vectors !== null;
  for (let sweep = 0; sweep < JACOBI_SWEEPS; sweep++) {
    // Off-diagonal entries at rounding level of the matrix scale shift the eigenvalues by less than rounding.
    const limit = NEGLIGIBLE * (Math.abs(a00) + Math.abs(a11) + Math.abs(a22) + Math.abs(a01) + Math.abs(a02) + Math.abs(a12));
    const skip01 = Math.abs(a01) <= limit;
    if (skip01 && Math.abs(a02) <= limit && Math.abs(a12) <= limit) break;
    // Each rotation zeroes one off-diagonal pair (p, q); c, s from Rutishauser's stable formulas.
    if (!skip01) {
      const theta = (a11 - a00) / (2 * a01);
      const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1), s = t * c;
      a00 -= t * a01; a11 += t * a01; a01 = 0;
      const x = a02, y = a12;
      a02 = c * x - s * y; a12 = s * x + c * y;
      if (track) {
        let p = v00, q = v01; v00 = c * p - s * q; v01 = s * p + c * q;
        p = v10; q = v11; v10 = c * p - s * q; v11 = s * p + c * q;
        p = v20; q = v21; v20 = c * p - s * q; v21 = s * p + c * q;
      }
    }
    if (Math.abs(a02) > limit) {
      const theta = (a22 - a00) / (2 * a02);
      const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1), s = t * c;
      a00 -= t * a02; a22 += t * a02; a02 = 0;
      const x = a01, y = a12;
      a01 = c * x - s * y; a12 = s * x + c * y;
      if (track) {
        let p = v00, q = v02; v00 = c * p - s * q; v02 = s * p + c * q;
        p = v10; q = v12; v10 = c * p - s * q; v12 = s * p + c * q;
        p = v20; q = v22; v20 = c * p - s * q; v22 = s * p + c * q;
      }
    }
    if (Math.abs(a12) > limit) {
      const theta = (a22 - a11) / (2 * a12);
      const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1), s = t * c;
      a11 -= t * a12; a22 += t * a12; a12 = 0;
      const x = a01, y = a02;
      a01 = c * x - s * y; a02 = s * x + c * y;
      if (track) {
        let p = v01, q = v02; v01 = c * p - s * q; v02 = s * p + c * q;
        p = v11; q = v12; v11 = c * p - s * q; v12 = s * p + c * q;
        p = v21; q = v22; v21 = c * p - s * q; v22 = s * p + c * q;
      }
    }
  }
  values[0] = a00; values[1] = a11; values[2] = a22;
  if (vectors !== null) {
    vectors[0] = v00; vectors[1] = v01; vectors[2] = v02;
    vectors[3] = v10; vectors[4] = v11; vectors[5] = v12;
    vectors[6] = v20; vectors[7] = v21; vectors[8] = v22;
  }
  // Sorting network on three entries, moving eigenvector columns along.
  if (values[0] < values[1]) swapPair(values, vectors, 0, 1);
  if (values[1] < values[2]) swapPair(values, vectors, 1, 2);
  if (values[0] < values[1]) swapPair(values, vectors, 0, 1);
  return values;
}

function swapPair(values: Float64Array, vectors: Float64Array | null, i: number, k: number): void {
  const t = values[i];
  values[i] = values[k];
  values[k] = t;
  if (vectors === null) return;
  for (let row = 0; row < 9; row += 3) {
    const x = vectors[row + i];
    vectors[row + i] = vectors[row + k];
    vectors[row + k] = x;
  }
}

/**
 * Largest eigenvalue of the symmetric 3 x 3 matrix [[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]]
 * by the trigonometric closed form (Smith 1961, "Eigenvalues of a 3x3 real symmetric matrix",
 * Comm. ACM 4(4), p. 168): accurate to rounding unless the two largest eigenvalues nearly
 * coincide, where the relative error grows to about 1e-8 (units of the entries).
 */
export function largestEigenvalue3(a00: number, a11: number, a22: number, a01: number, a02: number, a12: number): number {
  const p1 = a01 * a01 + a02 * a02 + a12 * a12;
  const q = (a00 + a11 + a22) / 3;
  const b00 = a00 - q, b11 = a11 - q, b22 = a22 - q;
  const p2 = b00 * b00 + b11 * b11 + b22 * b22 + 2 * p1;
  if (p2 === 0) return q;
  const p = Math.sqrt(p2 / 6);
  const det = b00 * (b11 * b22 - a12 * a12) - a01 * (a01 * b22 - a12 * a02) + a02 * (a01 * a12 - b11 * a02);
  let r = det / (2 * p * p * p);
  r = r < -1 ? -1 : r > 1 ? 1 : r;
  return q + 2 * p * Math.cos(Math.acos(r) / 3);
}

/** Newton steps largestGramEigenvalue takes before it hands over to largestEigenvalue3. */
const GRAM_NEWTON_STEPS = 4;
/** Newton step, relative to the iterate, below which largestGramEigenvalue stops: the root then lies within twice the step. */
const GRAM_NEWTON_TOLERANCE = 1e-15;

/**
 * Largest eigenvalue of the symmetric positive semidefinite 3 x 3 matrix [[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]]
 * given also the sum of its principal 2 x 2 minors and its determinant (units of the entries, their squares and cubes): the
 * largest root of the characteristic polynomial t^3 - trace t^2 + minors t - determinant by Newton's method. The start is
 * the larger root of t^2 - trace t + minors: the answer itself when the determinant vanishes (as for a finger whose pivot axis
 * passes through the contact), else at least the middle eigenvalue and at most the largest, so that where the slope there
 * is positive the first step lands at or above the root (the polynomial is convex beyond its last turning point); from above,
 * the steps fall monotonically onto the largest root of a polynomial with only real roots (Stoer & Bulirsch, "Introduction to
 * Numerical Analysis", sec. 5.5), quadratically once the two largest eigenvalues stand apart: one or two steps for the usual
 * contact Jacobian. A step to the root is never shorter than the distance to it below, nor than a third of it above, so a
 * step below GRAM_NEWTON_TOLERANCE of the iterate leaves at most twice that. Where the slope is not positive or the steps
 * do not shrink that far within GRAM_NEWTON_STEPS (the two largest eigenvalues close together), largestEigenvalue3. In V8
 * the Math.acos and Math.cos calls of that closed form cost about a tenth of a whole three-finger solve (npm run bench).
 */
export function largestGramEigenvalue(a00: number, a11: number, a22: number, a01: number, a02: number, a12: number, minors: number, determinant: number): number {
  const trace = a00 + a11 + a22;
  const discriminant = trace * trace - 4 * minors;
  let t = 0.5 * (trace + Math.sqrt(discriminant > 0 ? discriminant : 0));
  for (let i = 0; i < GRAM_NEWTON_STEPS; i++) {
    const slope = (3 * t - 2 * trace) * t + minors;
    if (!(slope > 0)) break;
    const step = (((t - trace) * t + minors) * t - determinant) / slope;
    t -= step;
    if (Math.abs(step) <= GRAM_NEWTON_TOLERANCE * t) return t;
  }
  return largestEigenvalue3(a00, a11, a22, a01, a02, a12);
}

/**
 * Singular values of a 3 x n Jacobian, descending and padded with zeros, into out (returned; their
 * product is sqrt(det(J J^T))). The largest comes from the largest eigenvalue of J J^T (largestGramEigenvalue). The other two come from
 * sums of squared minors of J itself (Cauchy-Binet): E2 = sum of squared 2 x 2 minors
 * = s1^2 s2^2 + s1^2 s3^2 + s2^2 s3^2 and P = sqrt(sum of squared 3 x 3 minors) = s1 s2 s3, so
 * s2^2 and s3^2 are the roots of t^2 - (E2 - P^2 / s1^2) / s1^2 t + P^2 / s1^2; this keeps small
 * singular values accurate relative to themselves, where sqrt of a small eigenvalue of J J^T
 * would lose half the digits.
 */
export function jacobianSingularValues(j: Matrix, out: Float64Array): Float64Array {
  const n = j.cols, d = j.data;
  let g00: number, g11: number, g22: number, g01: number, g02: number, g12: number;
  let e2 = 0, e3 = 0;
  if (n === 3) {
    // The usual finger, unrolled (about 4 % of a whole three-finger solve by npm run bench): with rows a, b, c the 2 x 2 minors
    // are the entries of a x b, a x c and b x c, and the 3 x 3 minor is a . (b x c).
    const ax = d[0], ay = d[1], az = d[2], bx = d[3], by = d[4], bz = d[5], cx = d[6], cy = d[7], cz = d[8];
    g00 = ax * ax + ay * ay + az * az; g11 = bx * bx + by * by + bz * bz; g22 = cx * cx + cy * cy + cz * cz;
    g01 = ax * bx + ay * by + az * bz; g02 = ax * cx + ay * cy + az * cz; g12 = bx * cx + by * cy + bz * cz;
    const abx = ay * bz - az * by, aby = az * bx - ax * bz, abz = ax * by - ay * bx;
    const acx = ay * cz - az * cy, acy = az * cx - ax * cz, acz = ax * cy - ay * cx;
    const bcx = by * cz - bz * cy, bcy = bz * cx - bx * cz, bcz = bx * cy - by * cx;
    e2 = abx * abx + aby * aby + abz * abz + acx * acx + acy * acy + acz * acz + bcx * bcx + bcy * bcy + bcz * bcz;
    const det = ax * bcx + ay * bcy + az * bcz;
    e3 = det * det;
  } else {
    g00 = 0; g11 = 0; g22 = 0; g01 = 0; g02 = 0; g12 = 0;
    for (let k = 0; k < n; k++) {
      const x = d[k], y = d[n + k], z = d[2 * n + k];
      g00 += x * x; g11 += y * y; g22 += z * z;
      g01 += x * y; g02 += x * z; g12 += y * z;
    }
    for (let a = 0; a < n; a++) {
      for (let b = a + 1; b < n; b++) {
        const m01 = d[a] * d[n + b] - d[b] * d[n + a];
        const m02 = d[a] * d[2 * n + b] - d[b] * d[2 * n + a];
        const m12 = d[n + a] * d[2 * n + b] - d[n + b] * d[2 * n + a];
        e2 += m01 * m01 + m02 * m02 + m12 * m12;
        for (let c = b + 1; c < n; c++) {
          const m = d[c] * m12 - d[n + c] * m02 + d[2 * n + c] * m01;
          e3 += m * m;
        }
      }
    }
  }
  const largest = largestGramEigenvalue(g00, g11, g22, g01, g02, g12, e2, e3);
  const s1Squared = largest > 0 ? largest : 0;
  out[0] = Math.sqrt(s1Squared);
  if (s1Squared === 0) {
    out[1] = 0;
    out[2] = 0;
    return out;
  }
  // One reciprocal rather than two dependent divisions: this chain of roots and quotients sets the cost of the call.
  const inverse = 1 / s1Squared;
  const product = e3 * inverse;
  const sum = Math.max(0, (e2 - product) * inverse);
  const discriminant = Math.max(0, sum * sum - 4 * product);
  const larger = 0.5 * (sum + Math.sqrt(discriminant));
  out[1] = Math.sqrt(larger);
  out[2] = larger > 0 ? Math.sqrt(product / larger) : 0;
  return out;
}

/**
 * Singular values of the 3 x 2 matrix [c1 c2] of columns i and k of the 3 x n row-major d into out, padded with a zero: sigma_1^2 is
 * the larger eigenvalue (a + b) / 2 + sqrt(((a - b) / 2)^2 + g^2) of the Gram matrix [[a, g], [g, b]], and
 * sigma_1 sigma_2 = |c1 x c2| (Lagrange's identity), which keeps sigma_2 accurate relative to itself (units of d).
 */
export function columnPairSingularValues(d: Float64Array, n: number, i: number, k: number, out: Float64Array): Float64Array {
  const x1 = d[i], y1 = d[n + i], z1 = d[2 * n + i], x2 = d[k], y2 = d[n + k], z2 = d[2 * n + k];
  const a = x1 * x1 + y1 * y1 + z1 * z1, b = x2 * x2 + y2 * y2 + z2 * z2, g = x1 * x2 + y1 * y2 + z1 * z2;
  const half = 0.5 * (a - b);
  const largest = 0.5 * (a + b) + Math.sqrt(half * half + g * g);
  const cx = y1 * z2 - z1 * y2, cy = z1 * x2 - x1 * z2, cz = x1 * y2 - y1 * x2;
  const s1 = Math.sqrt(largest);
  out[0] = s1;
  out[1] = s1 > 0 ? Math.sqrt(cx * cx + cy * cy + cz * cz) / s1 : 0;
  out[2] = 0;
  return out;
}
