import { describe, expect, it } from 'vitest';
import {
  CholeskyDecomposition,
  Matrix as MlMatrix,
  SingularValueDecomposition,
  pseudoInverse as mlPseudoInverse,
  solve as mlSolve,
} from 'ml-matrix';
import {
  conditionNumber,
  createLinalgWorkspace,
  createMatrix,
  dampedLeastSquares,
  defaultRankTolerance,
  matrixFromRows,
  matrixToRows,
  singularValues,
  svd,
} from '../../../src/lib/kinematics/linalg';
import { createRandom, nextGaussian, nextUniform, type RandomSource } from '../../../src/lib/kinematics/random';

// Reference library: ml-matrix (independent SVD, pseudo-inverse, QR least-squares solve).
// Random inputs: Gaussian entries from the seeded generator in random.ts, so every run sees the same cases.
const CASES = 40;
const SHAPES: Array<[number, number]> = [
  [3, 3],
  [3, 4],
  [3, 5],
  [4, 3],
  [2, 6],
  [6, 6],
  [6, 12],
  [6, 40],
  [40, 6],
];

function randomRows(random: RandomSource, m: number, n: number): number[][] {
  return Array.from({ length: m }, () => Array.from({ length: n }, () => nextGaussian(random)));
}
function randomVector(random: RandomSource, n: number): number[] {
  return Array.from({ length: n }, () => nextGaussian(random));
}
/** Product of an m x r and an r x n Gaussian matrix: rank r almost surely. */
function randomLowRank(random: RandomSource, m: number, n: number, r: number): number[][] {
  return new MlMatrix(randomRows(random, m, r)).mmul(new MlMatrix(randomRows(random, r, n))).to2DArray();
}
function forEachCase(seed: number, count: number, check: (random: RandomSource, index: number) => void): void {
  const random = createRandom(seed);
  for (let i = 0; i < count; i++) check(random, i);
}

function mlSingularValues(rows: number[][]): number[] {
  return new SingularValueDecomposition(rows, { autoTranspose: true }).diagonal;
}

const ws = createLinalgWorkspace(6, 40);

describe('singularValues', () => {
  it('matches the worked 2 x 2 SVD in Golub & Van Loan, Matrix Computations (4th ed., Sec. 2.4.1): sigma = 3, 1 (value from memory)', () => {
    const a = matrixFromRows([
      [0.96, 1.72],
      [2.28, 0.96],
    ]);
    expect(singularValues(a, new Float64Array(2), ws)).toBeNear([3, 1], { abs: 1e-14 });
  });

  it('matches Strang, Introduction to Linear Algebra (Ch. 7): [[3,0],[4,5]] has sigma = 3 sqrt5, sqrt5 (value from memory)', () => {
    const a = matrixFromRows([
      [3, 0],
      [4, 5],
    ]);
    expect(singularValues(a, new Float64Array(2), ws)).toBeNear([3 * Math.sqrt(5), Math.sqrt(5)], { abs: 1e-13 });
  });

  it('matches the common 2 x 3 textbook-style example [[3,2,2],[2,3,-2]]: sigma = 5, 3 (eigenvalues 25, 9 of A A^T; value from memory)', () => {
    const a = matrixFromRows([
      [3, 2, 2],
      [2, 3, -2],
    ]);
    expect(singularValues(a, new Float64Array(2), ws)).toBeNear([5, 3], { abs: 1e-14 });
  });

  it('returns exact zeros for the zero matrix and sigma = 2, 0 for the rank-one all-ones 2 x 2', () => {
    expect(singularValues(createMatrix(3, 5), new Float64Array(3), ws)).toBeNear([0, 0, 0], { abs: 0 });
    expect(singularValues(matrixFromRows([[1, 1], [1, 1]]), new Float64Array(2), ws)).toBeNear([2, 0], { abs: 1e-15 });
  });

  for (const [m, n] of SHAPES) {
    it(`agrees with ml-matrix SVD on seeded random ${m} x ${n} matrices`, () => {
      forEachCase(m * 100 + n, CASES, (random) => {
          const rows = randomRows(random, m, n);
          const expected = mlSingularValues(rows);
          const actual = singularValues(matrixFromRows(rows), new Float64Array(Math.min(m, n)), ws);
          expect(actual).toBeNear(expected, { abs: 1e-12 * Math.max(1, expected[0]!) });
      });
    });
  }

  it('keeps full relative accuracy for matrices scaled from 1e-200 to 1e200 (singular values scale linearly)', () => {
    forEachCase(5, 10, (random) => {
      const rows = randomRows(random, 3, 5);
      const base = mlSingularValues(rows);
      for (const factor of [1e-200, 1e-90, 1e-30, 1e30, 1e90, 1e200]) {
        const scaled = singularValues(matrixFromRows(rows.map((r) => r.map((x) => x * factor))), new Float64Array(3), ws);
        expect(Array.from(scaled, (x) => x / factor)).toBeNear(base, { abs: 1e-12 * base[0]! });
      }
    });
    expect(singularValues(matrixFromRows([[0, 0, 0], [0, -5e-324, 0]]), new Float64Array(2), ws)).toBeNear([5e-324, 0], { abs: 0 });
  });

  it('leaves the input matrix untouched', () => {
    const a = matrixFromRows([
      [1, 2, 3, 4],
      [5, 6, 7, 8],
      [9, 10, 11, 13],
    ]);
    const before = Float64Array.from(a.data);
    singularValues(a, new Float64Array(3), ws);
    expect(a.data).toEqual(before);
  });

  it('rejects a matrix larger than the workspace', () => {
    expect(() => singularValues(createMatrix(7, 7), new Float64Array(7), ws)).toThrow(RangeError);
  });
});

describe('svd', () => {
  it('reproduces the Golub & Van Loan (Sec. 2.4.1) factors U = [.6 -.8; .8 .6], V = [.8 .6; .6 -.8] up to column signs (value from memory)', () => {
    const f = svd(matrixFromRows([[0.96, 1.72], [2.28, 0.96]]), svdBuffers(2, 2), ws);
    const u = matrixToRows(f.u);
    const v = matrixToRows(f.v);
    const expectedU = [[0.6, -0.8], [0.8, 0.6]];
    const expectedV = [[0.8, 0.6], [0.6, -0.8]];
    for (let c = 0; c < 2; c++) {
      const sign = Math.sign(u[0]![c]!) * Math.sign(expectedU[0]![c]!);
      for (let r = 0; r < 2; r++) {
        expect(u[r]![c]! * sign).toBeCloseTo(expectedU[r]![c]!, 14);
        expect(v[r]![c]! * sign).toBeCloseTo(expectedV[r]![c]!, 14);
      }
    }
  });

  for (const [m, n] of SHAPES) {
    it(`gives U diag(s) V^T = A with orthonormal U, V and ml-matrix's singular values on random ${m} x ${n}`, () => {
      forEachCase(m * 100 + n + 1, CASES, (random) => checkFactorization(randomRows(random, m, n), m, n));
    });
  }

  it('keeps U and V orthonormal for rank-deficient inputs (rank 2 in 3 x 5 and 5 x 3, zero rows)', () => {
    forEachCase(11, CASES, (random) => checkFactorization(randomLowRank(random, 3, 5, 2), 3, 5));
    forEachCase(12, CASES, (random) => checkFactorization(randomLowRank(random, 5, 3, 2), 5, 3));
    checkFactorization([[1, 2, 3, 4], [0, 0, 0, 0], [2, 4, 6, 8]], 3, 4);
    checkFactorization([[0, 0], [0, 0], [0, 0]], 3, 2);
  });

  it('with a zero column (a joint axis through the contact): smallest singular value 0, the rest as ml-matrix, factors orthonormal', () => {
    // Base, pivot and roll columns of a finger whose pivot passes through the contact (m/rad).
    const contactJacobian = [[0.05, 0, 0], [0, 0, -0.012], [0.06, 0, 0]];
    checkFactorization(contactJacobian, 3, 3);
    expect(svd(matrixFromRows(contactJacobian), svdBuffers(3, 3), ws).s[2]).toBe(0);
    forEachCase(13, CASES, (random) => {
      const rows = randomRows(random, 3, 3).map((row) => [row[0]!, 0, row[2]!]);
      checkFactorization(rows, 3, 3);
      const s = singularValues(matrixFromRows(rows), new Float64Array(3), ws);
      expect(s[2]).toBeLessThanOrEqual(Number.EPSILON * Math.hypot(...rows.flat()));
      checkFactorization(randomRows(random, 5, 4).map((row) => [row[0]!, row[1]!, 0, row[3]!]), 5, 4);
    });
  });
});

function svdBuffers(m: number, n: number) {
  const k = Math.min(m, n);
  return { s: new Float64Array(k), u: createMatrix(m, k), v: createMatrix(n, k) };
}

function checkFactorization(rows: number[][], m: number, n: number): void {
  const k = Math.min(m, n);
  const f = svd(matrixFromRows(rows), svdBuffers(m, n), ws);
  expect([f.u.rows, f.u.cols, f.v.rows, f.v.cols]).toEqual([m, k, n, k]);
  const u = new MlMatrix(matrixToRows(f.u));
  const v = new MlMatrix(matrixToRows(f.v));
  const scale = Math.max(1, f.s[0]!);
  const rebuilt = u.mmul(MlMatrix.diag(Array.from(f.s))).mmul(v.transpose()).to2DArray();
  expect(rebuilt).toBeNear(rows, { abs: 1e-12 * scale });
  const identity = MlMatrix.eye(k).to2DArray();
  expect(u.transpose().mmul(u).to2DArray()).toBeNear(identity, { abs: 1e-12 });
  expect(v.transpose().mmul(v).to2DArray()).toBeNear(identity, { abs: 1e-12 });
  for (let i = 1; i < k; i++) expect(f.s[i - 1]!).toBeGreaterThanOrEqual(f.s[i]!);
  expect(f.s).toBeNear(mlSingularValues(rows), { abs: 1e-12 * scale });
}

describe('singular values above defaultRankTolerance', () => {
  it('number rank r for random (m x r)(r x n) products, agreeing with ml-matrix SVD.rank', () => {
    for (const [m, n, r] of [
      [3, 5, 2],
      [6, 40, 4],
      [5, 3, 1],
      [6, 6, 5],
    ] as const) {
      forEachCase(m * 100 + n + r, 20, (random) => {
          const rows = randomLowRank(random, m, n, r);
          const s = singularValues(matrixFromRows(rows), new Float64Array(Math.min(m, n)), ws);
          const tolerance = defaultRankTolerance(m, n, s[0]!);
          const ours = s.filter((sigma) => sigma > tolerance).length;
          expect(ours).toBe(r);
          expect(ours).toBe(new SingularValueDecomposition(rows, { autoTranspose: true }).rank);
      });
    }
  });
});

describe('defaultRankTolerance', () => {
  it('is max(m, n) * eps * sigma_max, the LAPACK/NumPy matrix_rank rule (common practice)', () => {
    expect(defaultRankTolerance(3, 5, 2)).toBe(5 * Number.EPSILON * 2);
  });
});

describe('conditionNumber', () => {
  it('is sigma_max / sigma_min, agreeing with ml-matrix SVD.condition on random 3 x 5', () => {
    forEachCase(21, CASES, (random) => {
      const rows = randomRows(random, 3, 5);
      const s = singularValues(matrixFromRows(rows), new Float64Array(3), ws);
      const expected = new SingularValueDecomposition(rows, { autoTranspose: true }).condition;
      expect(Math.abs(conditionNumber(s) - expected)).toBeLessThanOrEqual(1e-8 * expected);
    });
  });

  it('is 3 for the Golub & Van Loan example (sigma = 3, 1), Infinity at rank loss, NaN for the zero matrix', () => {
    expect(conditionNumber([3, 1])).toBe(3);
    expect(conditionNumber([2, 0])).toBe(Number.POSITIVE_INFINITY);
    expect(conditionNumber([0, 0])).toBeNaN();
    expect(conditionNumber([4, 2, 0], 2)).toBe(2);
  });
});

describe('dampedLeastSquares', () => {
  const randomLambda = (random: RandomSource) => 1e-3 + nextUniform(random);

  for (const [m, n] of SHAPES) {
    it(`equals the augmented least-squares solution of [J; lambda I] x = [b; 0] by ml-matrix QR on random ${m} x ${n} (Buss 2004, "Introduction to Inverse Kinematics", eq. for DLS)`, () => {
      forEachCase(m * 100 + n + 3, 30, (random) => {
          const rows = randomRows(random, m, n);
          const b = randomVector(random, m);
          const lambda = randomLambda(random);
          const augmented = new MlMatrix([...rows, ...MlMatrix.eye(n).mul(lambda).to2DArray()]);
          const rhs = MlMatrix.columnVector([...b, ...new Array<number>(n).fill(0)]);
          const expected = mlSolve(augmented, rhs).getColumn(0);
          const ours = dampedLeastSquares(matrixFromRows(rows), b, lambda, new Float64Array(n), ws);
          const scale = Math.max(1, ...expected.map(Math.abs));
          expect(ours).toBeNear(expected, { abs: 1e-8 * scale });
      });
    });
  }

  it('equals J^T (J J^T + lambda^2 I)^{-1} b computed with ml-matrix Cholesky on random 3 x 4', () => {
    forEachCase(51, CASES, (random) => {
        const rows = randomRows(random, 3, 4);
        const b = randomVector(random, 3);
        const lambda = randomLambda(random);
        const j = new MlMatrix(rows);
        const g = j.mmul(j.transpose()).add(MlMatrix.eye(3).mul(lambda * lambda));
        const y = new CholeskyDecomposition(g).solve(MlMatrix.columnVector(b));
        const expected = j.transpose().mmul(y).getColumn(0);
        expect(dampedLeastSquares(matrixFromRows(rows), b, lambda, new Float64Array(4), ws)).toBeNear(expected, { abs: 1e-9 });
    });
  });

  it('with lambda = 0 equals the pseudo-inverse solution J^+ b by ml-matrix, full rank and rank-deficient', () => {
    forEachCase(61, CASES, (random, index) => {
        const rows = index % 2 === 0 ? randomRows(random, 3, 5) : randomLowRank(random, 3, 5, 2);
        const b = randomVector(random, 3);
        const expected = mlPseudoInverse(rows).mmul(MlMatrix.columnVector(b)).getColumn(0);
        const ours = dampedLeastSquares(matrixFromRows(rows), b, 0, new Float64Array(5), ws);
        const scale = Math.max(1, ...expected.map(Math.abs));
        expect(ours).toBeNear(expected, { abs: 1e-7 * scale });
    });
  });

  it('on near rank loss equals sum sigma / (sigma^2 + lambda^2) (u.b) v from the ml-matrix SVD (Buss 2004, DLS via SVD)', () => {
    forEachCase(62, CASES, (random, index) => {
      const rows = randomLowRank(random, 3, 5, 2);
      rows[0]![0]! += index * 1e-9;
      const b = randomVector(random, 3);
      const lambda = [1e-4, 1e-3, 0.05][index % 3]!;
      const ref = new SingularValueDecomposition(rows, { autoTranspose: true });
      const u = ref.leftSingularVectors;
      const v = ref.rightSingularVectors;
      const expected = new Array<number>(5).fill(0);
      ref.diagonal.forEach((sigma, i) => {
        const ub = u.getColumn(i).reduce((sum, x, r) => sum + x * b[r]!, 0);
        const coef = (sigma * ub) / (sigma * sigma + lambda * lambda);
        for (let j = 0; j < 5; j++) expected[j]! += coef * v.get(j, i);
      });
      const ours = dampedLeastSquares(matrixFromRows(rows), b, lambda, new Float64Array(5), ws);
      // x moves by about |dJ| / lambda^2 under a perturbation dJ of J, so both SVDs' rounding is scaled alike.
      expect(ours).toBeNear(expected, { abs: (1e-13 / (lambda * lambda)) * Math.max(1, ...expected.map(Math.abs)) });
    });
  });

  it('leaves J and b untouched', () => {
    const j = matrixFromRows([[1, 2, 3], [4, 5, 6]]);
    const before = Float64Array.from(j.data);
    const b = Float64Array.of(1, -1);
    dampedLeastSquares(j, b, 0.1, new Float64Array(3), ws);
    expect(j.data).toEqual(before);
    expect(Array.from(b)).toEqual([1, -1]);
  });
});

describe('matrixFromRows', () => {
  it('round-trips through matrixToRows and rejects ragged rows', () => {
    expect(matrixToRows(matrixFromRows([[1, 2], [3, 4], [5, 6]]))).toEqual([[1, 2], [3, 4], [5, 6]]);
    expect(() => matrixFromRows([[1, 2], [3]])).toThrow(RangeError);
  });
});

describe('createMatrix', () => {
  it('is zero-filled with the given shape', () => {
    const a = createMatrix(2, 3);
    expect([a.rows, a.cols, a.data.length, Math.max(...a.data)]).toEqual([2, 3, 6, 0]);
  });
});

describe('createLinalgWorkspace', () => {
  it('accepts either dimension order', () => {
    const w = createLinalgWorkspace(40, 6);
    expect([w.maxSmall, w.maxLarge]).toEqual([6, 40]);
    expect(() => singularValues(createMatrix(40, 6), new Float64Array(6), w)).not.toThrow();
  });
});
