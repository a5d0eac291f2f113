import { describe, expect, it } from 'vitest';
import { Matrix as MlMatrix, SingularValueDecomposition } from 'ml-matrix';
import { computeGrasp, createGraspResult } from '../../../src/lib/kinematics/grasp';

// Reference: the contact map built here row by row from its definition, [I, -[x_i - p]x] per contact
// (Murray, Li & Sastry 1994, ch. 5, sec. 2), with ml-matrix's SVD for rank and singular values.
function contactMap(points: number[][], origin: number[], normals: number[][] = [], soft = false): MlMatrix {
  const rows: number[][] = [];
  points.forEach((x, i) => {
    const [rx, ry, rz] = [x[0] - origin[0], x[1] - origin[1], x[2] - origin[2]];
    rows.push([1, 0, 0, 0, rz, -ry], [0, 1, 0, -rz, 0, rx], [0, 0, 1, ry, -rx, 0]);
    if (soft) rows.push([0, 0, 0, ...normals[i]]);
  });
  return new MlMatrix(rows);
}

function solve(points: number[][], origin: number[], normals: number[][] = points.map(() => [0, 0, 1]), soft = false) {
  return computeGrasp(origin, points.flat(), normals.flat(), points.length, { softFinger: soft, singularRatio: 1e-6 }, createGraspResult(points.length));
}

function referenceRank(a: MlMatrix): number {
  const s = new SingularValueDecomposition(a, { autoTranspose: true }).diagonal;
  return s.filter((x) => x > 1e-9 * s[0]).length;
}

describe('computeGrasp', () => {
  const origin = [0.01, -0.02, 0.1];
  const triangle = [[0.05, 0, 0.1], [-0.025, 0.04, 0.12], [-0.02, -0.045, 0.09]];

  it('builds the contact map rows [I, -[x - p]x] about the object origin', () => {
    const g = solve(triangle, origin);
    expect(g.contactMap.rows).toBe(9);
    const reference = contactMap(triangle, origin).to1DArray();
    expect(g.contactMap.data.subarray(0, reference.length)).toBeNear(reference, { digits: 15 });
  });

  it('three non-collinear point contacts drive every twist: rank 6 (ml-matrix SVD agrees)', () => {
    const g = solve(triangle, origin);
    expect(referenceRank(contactMap(triangle, origin))).toBe(6);
    expect(g.rank).toBe(6);
    expect(g.undrivableCount).toBe(0);
  });

  it('singular values equal those of the map referred to the contact centroid (ml-matrix SVD)', () => {
    const g = solve(triangle, origin);
    const centroid = [0, 1, 2].map((k) => (triangle[0][k] + triangle[1][k] + triangle[2][k]) / 3);
    const reference = new SingularValueDecomposition(contactMap(triangle, centroid)).diagonal;
    expect(g.singularValues).toBeNear(reference, { digits: 14 });
  });

  it('two contacts: rank 5, the free twist turns about the line through them (ml-matrix SVD agrees on the rank)', () => {
    const pair = triangle.slice(0, 2);
    const g = solve(pair, origin);
    expect(referenceRank(contactMap(pair, origin))).toBe(5);
    expect(g.rank).toBe(5);
    expect(g.undrivableCount).toBe(1);
    const t = Array.from(g.undrivable.subarray(0, 6));
    // The twist moves neither contact: A t = 0.
    const moved = contactMap(pair, origin).mmul(MlMatrix.columnVector(t)).to1DArray();
    for (const m of moved) expect(Math.abs(m)).toBeLessThan(1e-14);
    // Its rotation axis is the line through the contacts.
    const line = [0, 1, 2].map((k) => pair[1][k] - pair[0][k]);
    const w = t.slice(3);
    const cross = [w[1] * line[2] - w[2] * line[1], w[2] * line[0] - w[0] * line[2], w[0] * line[1] - w[1] * line[0]];
    expect(Math.hypot(...cross)).toBeLessThan(1e-14);
    expect(Math.hypot(...t)).toBeCloseTo(1, 14);
  });

  it('one point contact: rank 3, the three rotations about the contact point are free', () => {
    const g = solve([triangle[0]], origin);
    expect(g.rank).toBe(3);
    const a = contactMap([triangle[0]], origin);
    for (let c = 0; c < 3; c++) {
      const moved = a.mmul(MlMatrix.columnVector(Array.from(g.undrivable.subarray(6 * c, 6 * c + 6)))).to1DArray();
      for (const m of moved) expect(Math.abs(m)).toBeLessThan(1e-15);
    }
  });

  it('soft finger: one contact adds the spin about its normal, rank 4 (ml-matrix SVD agrees)', () => {
    const normals = [[0, 0.6, 0.8]];
    const g = solve([triangle[0]], origin, normals, true);
    expect(referenceRank(contactMap([triangle[0]], origin, normals, true))).toBe(4);
    expect(g.rank).toBe(4);
    expect(g.contactMap.rows).toBe(4);
    const a = contactMap([triangle[0]], origin, normals, true);
    for (let c = 0; c < 2; c++) {
      const moved = a.mmul(MlMatrix.columnVector(Array.from(g.undrivable.subarray(6 * c, 6 * c + 6)))).to1DArray();
      for (const m of moved) expect(Math.abs(m)).toBeLessThan(1e-15);
    }
  });

  it('three collinear contacts: rank 5, like two', () => {
    const line = [[0, 0, 0], [0.01, 0.02, 0.03], [0.03, 0.06, 0.09]];
    expect(solve(line, origin).rank).toBe(5);
    expect(referenceRank(contactMap(line, origin))).toBe(5);
  });

  it('no contacts: rank 0, every twist free', () => {
    const g = computeGrasp(origin, [], [], 0, { softFinger: false, singularRatio: 1e-6 }, createGraspResult(1));
    expect(g.rank).toBe(0);
    expect(g.undrivableCount).toBe(6);
  });
});
