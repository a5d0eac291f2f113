import { describe, expect, it } from 'vitest';
import {
  computeGraspQuality, contactWrenches, MAX_FACE_COMBINATIONS, nearestFacet, nearestSumFacet, type GraspQualityInput,
} from '../../../src/lib/kinematics/grasp-quality';
import { directions, minkowskiOf, onSphere, rayDistance } from './wrench-routes';


/** Contacts at given points with given outward normals (normalised here), about the origin. */
function contactsAt(points: number[][], normals: number[][], friction: number, coneEdges: number, torsionalFriction = 0): GraspQualityInput {
  return {
    origin: [0, 0, 0],
    points: points.flat(),
    normals: normals.flatMap((n) => n.map((c) => c / Math.hypot(...n))),
    friction: points.map(() => friction),
    contactCount: points.length, coneEdges, torsionalFriction,
  };
}

const tilted = [[0, 0.2], [2.1, -0.1], [4.2, 0.3]];

describe('Q_Linf for three soft fingers with 8 cone edges', () => {
  const input = onSphere(tilted, 0.5, 8, 0.003);
  const quality = computeGraspQuality(input);
  const perContact = contactWrenches(input, quality.torqueLength);

  it('is computed: the face combinations it takes are within the work cap', () => {
    expect(quality.forceClosure).toBe(true);
    expect(quality.maxQualityCombinations).toBeGreaterThan(100_000);
    expect(quality.maxQualityCombinations).toBeLessThanOrEqual(MAX_FACE_COMBINATIONS);
    expect(quality.maxQuality).not.toBeNull();
  });

  it('is the radius of the largest ball in the Minkowski sum: the linear program reaches the facet along its normal, and a ball 1e-6 smaller fits along every direction tried', () => {
    const facet = nearestSumFacet(input, perContact);
    const q = quality.maxQuality!;
    expect(facet.distance).toBe(q);
    // Ferrari & Canny 1992, Q_Linf with one normal-force budget per contact; linear program solved by yalps.
    // Along the nearest facet's normal the ray leaves the sum at the facet: Q (1 + 1e-6) u lies outside it.
    const along = rayDistance(perContact, facet.normal!, 'max');
    expect(along).toBeLessThan(q * (1 + 1e-6));
    expect(along).toBeGreaterThan(q * (1 - 1e-6));
    // Every other ray reaches at least Q: Q (1 - 1e-6) v lies inside the sum for each direction v tried.
    for (const direction of directions(60, 4242)) expect(rayDistance(perContact, direction, 'max')).toBeGreaterThan(q * (1 - 1e-6));
    // Directions near the facet normal are the ones that come closest to the ball.
    for (const nudge of directions(20, 99)) {
      const near = facet.normal!.map((x, j) => x + 0.05 * nudge[j]);
      const length = Math.hypot(...near);
      expect(rayDistance(perContact, near.map((x) => x / length), 'max')).toBeGreaterThan(q * (1 - 1e-6));
    }
  });

  it('lies between Q_L1 and 3 Q_L1', () => {
    // The inclusions W_L1 in W_Linf in k W_L1 (see grasp-quality-faces.test.ts) hold for soft fingers alike.
    expect(quality.maxQuality!).toBeGreaterThanOrEqual(quality.sumQuality - 1e-9);
    expect(quality.maxQuality!).toBeLessThanOrEqual(3 * quality.sumQuality + 1e-9);
  });
});

describe('degenerate contact layouts: the face enumeration finds the nearest facet of the hull of all the sum\'s points', () => {
  /** Q_Linf against the hull of every point of the Minkowski sum, Q_L1 against the hull of the union (beneath-beyond after a 1e-7 joggle, so 6 digits). */
  function agreesWithHulls(input: GraspQualityInput): void {
    const quality = computeGraspQuality(input);
    expect(quality.forceClosure).toBe(true);
    const perContact = contactWrenches(input, quality.torqueLength);
    const sum = minkowskiOf(perContact);
    expect(sum.length).toBeLessThanOrEqual(511);
    expect(quality.maxQuality).toBeCloseTo(nearestFacet(sum).distance, 6);
    expect(quality.sumQuality).toBeCloseTo(nearestFacet(perContact.flat()).distance, 6);
  }

  it('four coplanar contacts on the rim of a disc, normals in its plane', () => {
    const angles = [0, 1.4, 3.0, 4.6];
    agreesWithHulls(contactsAt(
      angles.map((a) => [0.03 * Math.cos(a), 0.03 * Math.sin(a), 0]), angles.map((a) => [Math.cos(a), Math.sin(a), 0]), 0.6, 3,
    ));
  });

  it('two soft fingers pinching a box across two parallel faces', () => {
    agreesWithHulls(contactsAt([[0.02, 0.004, 0.003], [-0.02, -0.002, 0.001]], [[1, 0, 0], [-1, 0, 0]], 0.5, 6, 0.004));
  });

  const onOneLine = [[-0.02, 0, 0.01], [0, 0, 0.01], [0.02, 0, 0.01]];

  it('three soft fingers on one line, their normals leaning along it', () => {
    agreesWithHulls(contactsAt(onOneLine, [[-1, 0.2, 0.5], [0, -1, -0.4], [1, 0.5, 0.3]], 0.8, 3, 0.01));
  });

  it('three soft fingers on one line with normals at right angles to it cannot resist a twist about the line', () => {
    // Forces through points of a line have no moment about it, and each spin is about a normal at right
    // angles to it (Murray, Li & Sastry 1994, ch. 5, from memory: force closure needs wrenches spanning every direction).
    const quality = computeGraspQuality(contactsAt(onOneLine, [[0, 1, 0], [0, -0.5, 0.9], [0, -0.5, -0.9]], 0.8, 3, 0.01));
    expect(quality.forceClosure).toBe(false);
    expect(quality.maxQuality).toBe(0);
  });

  it('three contacts of which two share one normal, two fingers side by side on a box face', () => {
    agreesWithHulls(contactsAt([[0.02, 0.01, 0], [0.02, -0.01, 0], [-0.02, 0, 0]], [[1, 0, 0], [1, 0, 0], [-1, 0, 0]], 0.5, 4));
  });

  it('three soft fingers with 4 cone edges on a sphere', () => {
    agreesWithHulls(onSphere(tilted, 0.4, 4, 0.003));
  });
});
