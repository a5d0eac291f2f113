import { describe, expect, it } from 'vitest';
import { countCombinations, forEachFaceNormal, type ContactFaces, type FaceNormalVisitor } from '../../../src/lib/kinematics/wrench-faces';

/** A segment from the origin to `end` in 3-D, with its faces: each end point and the segment itself (first point the reference). */
function segment(end: readonly number[]): ContactFaces {
  return { vertices: new Float64Array([0, 0, 0, ...end]), faces: [[0], [1], [0, 1]] };
}

/** Records every visited normal with the reaches reported along it. */
class Recorder implements FaceNormalVisitor {
  readonly visits: { normal: number[]; farthest: number[] }[] = [];

  visit(normal: Float64Array, farthest: Float64Array): void {
    this.visits.push({ normal: Array.from(normal), farthest: Array.from(farthest) });
  }
}

const dot = (a: readonly number[], b: ArrayLike<number>) => a.reduce((sum, x, j) => sum + x * b[j], 0);
const cross = (a: readonly number[], b: readonly number[]) => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
const unit = (v: readonly number[]) => v.map((x) => x / Math.hypot(...v));

/** Largest u . x over a contact's points, by brute force. */
function reach(contact: ContactFaces, u: readonly number[]): number {
  let most = -Infinity;
  for (let at = 0; at < contact.vertices.length; at += 3) most = Math.max(most, dot(u, contact.vertices.subarray(at, at + 3)));
  return most;
}

describe('forEachFaceNormal', () => {
  // A parallelepiped is the Minkowski sum of three segments (a zonotope); its facets are spanned by two of
  // the segments, so their normals are the unit cross products of each pair (G. M. Ziegler, Graduate Texts in Mathematics 152,
  // 1995, sec. 7.3 on zonotopes), and a sum's support is the sum of its summands' supports (common practice).
  const ends = [[0.02, 0, 0.001], [0.004, 0.03, -0.002], [-0.003, 0.005, 0.025]];
  const contacts = ends.map(segment);

  it('visits both normals of every facet of a parallelepiped, the sum of three segments', () => {
    const recorder = new Recorder();
    forEachFaceNormal(contacts, 3, 1e-12, recorder);
    const facetNormals = [[0, 1], [0, 2], [1, 2]].flatMap(([a, b]) => {
      const n = unit(cross(ends[a], ends[b]));
      return [n, n.map((x) => -x)];
    });
    for (const expected of facetNormals) {
      const found = recorder.visits.filter(({ normal }) => dot(expected, normal) > 1 - 1e-12);
      expect(found.length, `normal ${expected.join(', ')}`).toBeGreaterThan(0);
    }
  });

  it('reports each contact\'s reach along every visited normal, and every normal has unit length', () => {
    const recorder = new Recorder();
    forEachFaceNormal(contacts, 3, 1e-12, recorder);
    expect(recorder.visits.length).toBeGreaterThan(0);
    for (const { normal, farthest } of recorder.visits) {
      expect(Math.hypot(...normal)).toBeNear(1, { abs: 1e-14 });
      expect(farthest).toBeNear(contacts.map((contact) => reach(contact, normal)), { abs: 1e-15 });
    }
  });

  it('counts the ways to pick at most one face per segment with two rows in all', () => {
    // Each segment has one face of one row (itself) and two of none (its ends): the segment from two of the three
    // (C(3, 2) = 3 ways), and from the third nothing or one of its ends (3 ways), by hand.
    expect(countCombinations(contacts, 2)).toBe(9);
  });
});
