import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix as MlMatrix, SingularValueDecomposition, determinant } from 'ml-matrix';
import { columnPairSingularValues, jacobianSingularValues, largestEigenvalue3, largestGramEigenvalue, symmetricEigen3Packed } from '../../../src/lib/kinematics/eigen3';
import { matrixFromRows } from '../../../src/lib/kinematics/linalg';
import { createRandom, nextGaussian } from '../../../src/lib/kinematics/random';

describe('symmetricEigen3Packed', () => {
  const cases = [
    [4, 1, 2, 0.5, -0.3, 0.8],
    [1e-3, 2e-3, 5e-4, 1e-4, 0, -2e-4],
    [2, 2, 2, 0, 0, 0],
    [1, 1, 3, 0, 0, 0],
    [1, 1, 1, 1, 1, 1],
    [0, 0, 0, 0, 0, 0],
  ];
  it('entries packed as [a00, a11, a22, a01, a02, a12] give the eigenvalues of ml-matrix and vectors with A v = lambda v', () => {
    for (const [a00, a11, a22, a01, a02, a12] of cases) {
      const values = new Float64Array(3), vectors = new Float64Array(9);
      symmetricEigen3Packed([a00, a11, a22, a01, a02, a12], values, vectors);
      const reference = new EigenvalueDecomposition(new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]])).realEigenvalues.sort((x, y) => y - x);
      const scale = Math.max(1e-300, Math.abs(reference[0]), Math.abs(reference[2]));
      for (let i = 0; i < 3; i++) expect(Math.abs(values[i] - reference[i]) / scale).toBeLessThan(1e-14);
      // A v = lambda v for every column (definition of an eigenvector).
      const a = [[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]];
      for (let c = 0; c < 3; c++) {
        for (let r = 0; r < 3; r++) {
          const av = a[r][0] * vectors[c] + a[r][1] * vectors[3 + c] + a[r][2] * vectors[6 + c];
          expect(Math.abs(av - values[c] * vectors[3 * r + c]) / scale).toBeLessThan(1e-13);
        }
      }
    }
  });

  it('eigenvalues match ml-matrix EigenvalueDecomposition, also when two coincide', () => {
    for (const [a00, a11, a22, a01, a02, a12] of cases) {
      const ours = symmetricEigen3Packed([a00, a11, a22, a01, a02, a12], new Float64Array(3));
      const reference = new EigenvalueDecomposition(new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]])).realEigenvalues.sort((x, y) => y - x);
      const scale = Math.max(1e-300, Math.abs(reference[0]));
      for (let i = 0; i < 3; i++) expect(Math.abs(ours[i] - reference[i]) / scale).toBeLessThan(1e-14);
    }
  });
  it('eigenvectors satisfy A v = lambda v with orthonormal columns', () => {
    for (const [a00, a11, a22, a01, a02, a12] of cases) {
      const values = new Float64Array(3), vectors = new Float64Array(9);
      symmetricEigen3Packed([a00, a11, a22, a01, a02, a12], values, vectors);
      const a = new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]]);
      const v = new MlMatrix([0, 1, 2].map((r) => Array.from(vectors.subarray(3 * r, 3 * r + 3))));
      const residual = a.mmul(v).sub(v.mmul(MlMatrix.diag(Array.from(values))));
      expect(residual.norm()).toBeLessThan(1e-14 * Math.max(1, a.norm()));
      expect(v.transpose().mmul(v).sub(MlMatrix.eye(3)).norm()).toBeLessThan(1e-14);
    }
  });
  it('gives the same eigenvalues, bit for bit, with and without vectors on seeded random matrices (the grasp asks for vectors only when rank is lost)', () => {
    const random = createRandom(47);
    for (let i = 0; i < 200; i++) {
      const entries = Array.from({ length: 6 }, () => nextGaussian(random));
      const withVectors = symmetricEigen3Packed(entries, new Float64Array(3), new Float64Array(9));
      expect(Array.from(symmetricEigen3Packed(entries, new Float64Array(3)))).toEqual(Array.from(withVectors));
    }
  });
});

describe('largestEigenvalue3', () => {
  it('matches ml-matrix EigenvalueDecomposition (to 1e-8 where the two largest coincide)', () => {
    const cases: [number[], number][] = [[[4, 1, 2, 0.5, -0.3, 0.8], 1e-14], [[1e-3, 2e-3, 5e-4, 1e-4, 0, -2e-4], 1e-14], [[3, 3, 1, 0, 0, 0], 1e-8], [[2, 2, 2, 0, 0, 0], 1e-14]];
    for (const [[a00, a11, a22, a01, a02, a12], tolerance] of cases) {
      const reference = Math.max(...new EigenvalueDecomposition(new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]])).realEigenvalues);
      expect(Math.abs(largestEigenvalue3(a00, a11, a22, a01, a02, a12) - reference) / reference).toBeLessThan(tolerance);
    }
  });
});

describe('largestGramEigenvalue', () => {
  /** J J^T packed as [g00, g11, g22, g01, g02, g12], with the sums of squared 2 x 2 and 3 x 3 minors of J (Cauchy-Binet). */
  function gramOf(rows: number[][]): { gram: number[]; minors: number; determinant: number } {
    const j = new MlMatrix(rows);
    const g = j.mmul(j.transpose());
    const minors = g.get(0, 0) * g.get(1, 1) - g.get(0, 1) ** 2 + g.get(0, 0) * g.get(2, 2) - g.get(0, 2) ** 2 + g.get(1, 1) * g.get(2, 2) - g.get(1, 2) ** 2;
    return { gram: [g.get(0, 0), g.get(1, 1), g.get(2, 2), g.get(0, 1), g.get(0, 2), g.get(1, 2)], minors, determinant: determinant(g) };
  }
  const largestOf = (gram: number[]) => {
    const [a00, a11, a22, a01, a02, a12] = gram;
    return Math.max(...new EigenvalueDecomposition(new MlMatrix([[a00, a01, a02], [a01, a11, a12], [a02, a12, a22]])).realEigenvalues);
  };

  it('matches ml-matrix EigenvalueDecomposition and the trigonometric closed form (Smith 1961) on seeded contact-like Jacobians', () => {
    const random = createRandom(53);
    // Column scales as in a finger: a long lever, a shorter one, and one from nearly nothing (a pivot through the contact) to comparable.
    for (const [second, third] of [[0.2, 1e-9], [0.2, 0.05], [0.5, 0.3], [0.9, 0.6], [1, 1]]) {
      for (let trial = 0; trial < 50; trial++) {
        const scales = [1, second, third];
        const rows = Array.from({ length: 3 }, () => scales.map((scale) => 0.08 * scale * nextGaussian(random)));
        const { gram, minors, determinant: det } = gramOf(rows);
        const [a00, a11, a22, a01, a02, a12] = gram;
        const ours = largestGramEigenvalue(a00, a11, a22, a01, a02, a12, minors, det);
        expect(Math.abs(ours - largestOf(gram)) / ours).toBeLessThan(1e-13);
        expect(Math.abs(ours - largestEigenvalue3(a00, a11, a22, a01, a02, a12)) / ours).toBeLessThan(1e-13);
      }
    }
  });

  it('gives the exact largest eigenvalue of diagonal Gram matrices, with two or three equal ones handed to the closed form', () => {
    // diag(9, 4, 0): minors 36, determinant 0; diag(4, 4, 1) and diag(2, 2, 2) have a repeated largest eigenvalue.
    expect(largestGramEigenvalue(9, 4, 0, 0, 0, 0, 36, 0)).toBe(9);
    expect(Math.abs(largestGramEigenvalue(4, 4, 1, 0, 0, 0, 24, 16) - 4) / 4).toBeLessThan(1e-8);
    expect(Math.abs(largestGramEigenvalue(2, 2, 2, 0, 0, 0, 12, 8) - 2) / 2).toBeLessThan(1e-14);
    expect(largestGramEigenvalue(0, 0, 0, 0, 0, 0, 0, 0)).toBe(0);
  });
});

describe('jacobianSingularValues', () => {
  it('matches ml-matrix SVD, with product sqrt(det(J J^T)) (Yoshikawa 1985)', () => {
    const rows = [[0.05, 0.01, 0.003, -0.02], [0.002, 0.03, -0.012, 0.01], [0.06, 0.004, 0.02, 0.001]];
    const ours = new Float64Array(3);
    expect(jacobianSingularValues(matrixFromRows(rows), ours)).toBe(ours);
    const product = ours[0] * ours[1] * ours[2];
    const m = new MlMatrix(rows);
    const reference = new SingularValueDecomposition(m, { autoTranspose: true }).diagonal;
    expect(ours).toBeNear(reference, { digits: 14 });
    expect(product).toBeCloseTo(Math.sqrt(determinant(m.mmul(m.transpose()))), 16);
  });
  it('keeps the smallest singular value accurate near rank loss (ml-matrix SVD as reference)', () => {
    const rows = [[0.05, 0, 1e-9], [0, 0.012, 0], [0.06, 0, 0]];
    const ours = new Float64Array(3);
    jacobianSingularValues(matrixFromRows(rows), ours);
    const reference = new SingularValueDecomposition(new MlMatrix(rows), { autoTranspose: true }).diagonal;
    expect(ours[2] / reference[2]).toBeCloseTo(1, 10);
    expect(ours).toBeNear(reference, { digits: 14 });
  });
  it('takes the unrolled route for square 3 x 3 Jacobians and still matches ml-matrix SVD, including a 3 x 4 with the same first columns', () => {
    // Seeded pseudo-random entries (a linear congruential generator) so the check is repeatable; the 3 x 4 case uses the general route.
    let state = 12345;
    const next = () => ((state = (state * 1103515245 + 12345) % 2147483648) / 2147483648 - 0.5) * 0.1;
    for (let trial = 0; trial < 20; trial++) {
      const rows = Array.from({ length: 3 }, () => [next(), next(), next()]);
      const ours = jacobianSingularValues(matrixFromRows(rows), new Float64Array(3));
      expect(ours).toBeNear(new SingularValueDecomposition(new MlMatrix(rows), { autoTranspose: true }).diagonal, { digits: 14 });
      const wide = rows.map((row) => [...row, 0]);
      expect(jacobianSingularValues(matrixFromRows(wide), new Float64Array(3))).toBeNear(ours, { digits: 15 });
    }
  });
  it('pads with zeros when there are fewer than three joints', () => {
    const ours = new Float64Array(3);
    jacobianSingularValues(matrixFromRows([[3], [4], [0]]), ours);
    expect(ours).toBeNear([5, 0, 0], { digits: 12 });
  });

  it("gives the manipulability sqrt(det(J J^T)) as the product of the singular values, by ml-matrix's determinant and SVD, on random 3 x 5 (Yoshikawa 1985, Int. J. Robotics Research 4(2))", () => {
    const random = createRandom(31);
    for (let trial = 0; trial < 40; trial++) {
      const rows = Array.from({ length: 3 }, () => Array.from({ length: 5 }, () => nextGaussian(random)));
      const s = jacobianSingularValues(matrixFromRows(rows), new Float64Array(3));
      const ours = s[0] * s[1] * s[2];
      const j = new MlMatrix(rows);
      const expected = Math.sqrt(Math.max(0, determinant(j.mmul(j.transpose()))));
      const product = new SingularValueDecomposition(rows, { autoTranspose: true }).diagonal.reduce((p, sigma) => p * sigma, 1);
      expect(Math.abs(ours - expected)).toBeLessThanOrEqual(1e-10 * Math.max(1, expected));
      expect(Math.abs(ours - product)).toBeLessThanOrEqual(1e-10 * Math.max(1, product));
    }
  });

  it('gives sigma = 5, 3 for [[3,2,2],[2,3,-2]] (manipulability 15 of the two rows), and a vanishing product at rank loss and for fewer than three joints', () => {
    const s = jacobianSingularValues(matrixFromRows([[3, 2, 2], [2, 3, -2], [0, 0, 0]]), new Float64Array(3));
    expect(s[0] * s[1]).toBeCloseTo(15, 12);
    expect(s[2]).toBe(0);
    const deficient = jacobianSingularValues(matrixFromRows([[1, 2, 3], [2, 4, 6], [0, 0, 0]]), new Float64Array(3));
    expect(deficient[0] * deficient[1]).toBeLessThan(1e-7);
    const tall = jacobianSingularValues(matrixFromRows([[1, 0], [0, 1], [1, 1]]), new Float64Array(3));
    expect(tall[0] * tall[1] * tall[2]).toBe(0);
  });
});

describe('columnPairSingularValues', () => {
  it('matches ml-matrix SVD of the two chosen columns of a 3 x n Jacobian, padded with a zero', () => {
    const rows = [[0.05, 0.01, 0.003, -0.02], [0.002, 0.03, -0.012, 0.01], [0.06, 0.004, 0.02, 0.001]];
    const ours = new Float64Array(3);
    expect(columnPairSingularValues(matrixFromRows(rows).data, 4, 0, 2, ours)).toBe(ours);
    const reference = new SingularValueDecomposition(rows.map((row) => [row[0], row[2]])).diagonal;
    expect(ours).toBeNear([...reference, 0], { digits: 14 });
  });
});
