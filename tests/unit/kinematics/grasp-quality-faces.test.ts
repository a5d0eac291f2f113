import { describe, expect, it } from 'vitest';
import {
  computeGraspQuality, contactWrenches, MAX_FACE_COMBINATIONS, nearestFacet, nearestSumFacet, type GraspQualityInput,
} from '../../../src/lib/kinematics/grasp-quality';
import { directions, minkowskiOf, onSphere, rayDistance } from './wrench-routes';


const tilted = [[0, 0.2], [2.1, -0.1], [4.2, 0.3]];

describe('Q_Linf from the contacts\' face lattices', () => {
  it('is computed for three point contacts with 8 cone edges, and the linear program agrees along its facet normal and bounds it along every other direction', () => {
    const input = onSphere(tilted, 0.5, 8);
    const quality = computeGraspQuality(input);
    expect(quality.forceClosure).toBe(true);
    expect(quality.maxQuality).not.toBeNull();
    const perContact = contactWrenches(input, quality.torqueLength);
    const facet = nearestSumFacet(input, perContact);
    // Three point contacts take the force-cone route; the face search reaches the same facet by another computation.
    expect(facet.distance).toBeNear(quality.maxQuality!, { rel: 1e-12 });
    // Ferrari & Canny 1992 with the LP solved by yalps: ray length along the nearest facet's normal equals its distance.
    expect(rayDistance(perContact, facet.normal!, 'max')).toBeCloseTo(quality.maxQuality!, 7);
    for (const direction of directions(40, 777)) expect(rayDistance(perContact, direction, 'max')).toBeGreaterThanOrEqual(quality.maxQuality! - 1e-7);
  });

  it('equals the distance to the nearest facet of the hull of all the sum\'s points, where that hull is small enough to build', () => {
    const cases: GraspQualityInput[] = [
      onSphere(tilted, 0.6, 4),
      onSphere([[0, 0.1], [1.9, 0.4], [4.0, -0.3]], 0.35, 4),
      // Two soft fingers on an antipodal pair: (4 edges + 2 twists + 1)^2 = 49 points.
      onSphere([[0, 0], [Math.PI, 0]], 0.5, 4, 0.004),
      onSphere([[0, 0.3], [Math.PI + 0.2, -0.3]], 0.7, 5, 0.006),
    ];
    for (const input of cases) {
      const quality = computeGraspQuality(input);
      expect(quality.forceClosure).toBe(true);
      const perContact = contactWrenches(input, quality.torqueLength);
      // The hull (beneath-beyond after a 1e-7 joggle) moves each distance by about the joggle.
      expect(quality.maxQuality).toBeCloseTo(nearestFacet(minkowskiOf(perContact)).distance, 6);
    }
  });

  it('Q_L1 from the union\'s faces equals the distance to the nearest facet of the hull of the union, for point contacts and soft fingers', () => {
    const cases = [onSphere(tilted, 0.5, 8), onSphere(tilted, 0.3, 6, 0.003), onSphere([[0, 0], [Math.PI, 0.1]], 0.6, 4, 0.005)];
    for (const input of cases) {
      const quality = computeGraspQuality(input);
      const union = contactWrenches(input, quality.torqueLength).flat();
      expect(quality.sumQuality).toBeCloseTo(nearestFacet(union).distance, 6);
    }
  });

  it('lies between Q_L1 and k Q_L1 for k contacts', () => {
    // W_L1 = conv(U G_i) lies in W_Linf = P_1 + ... + P_k because 0 lies in every P_i, so any g in G_i
    // is g + 0 + ... + 0; and with force closure 0 lies in W_L1, so each P_i = conv({0} U G_i) lies in
    // W_L1 and a sum of k points of W_L1 lies in k W_L1. Inscribed radii follow the inclusions.
    const cases = [
      onSphere(tilted, 0.5, 8), onSphere(tilted, 0.9, 3), onSphere([[0.3, 0], [2.0, 0.5], [3.5, -0.4], [5.0, 0.1]], 0.4, 4),
      onSphere(tilted, 0.4, 5, 0.002), onSphere([[0, 0], [Math.PI, 0]], 0.5, 6, 0.003),
    ];
    for (const input of cases) {
      const quality = computeGraspQuality(input);
      expect(quality.forceClosure).toBe(true);
      expect(quality.maxQuality).toBeGreaterThanOrEqual(quality.sumQuality - 1e-9);
      expect(quality.maxQuality).toBeLessThanOrEqual(input.contactCount * quality.sumQuality + 1e-9);
    }
  });

  it('says not computed past the work cap, with the number of face combinations it would take', () => {
    const five = onSphere([[0, 0.2], [1.3, -0.2], [2.5, 0.3], [3.8, -0.1], [5.0, 0.25]], 0.5, 8);
    const quality = computeGraspQuality(five);
    expect(quality.forceClosure).toBe(true);
    expect(quality.maxQuality).toBeNull();
    // Counted by hand: each contact's P_i (pyramid over an 8-gon) has 16 edges, 9 two-faces and one
    // three-face; the face dimensions must add up to 5 over the five contacts, so the count is the sum
    // over (n1, n2, n3) with n1 + 2 n2 + 3 n3 = 5 of 5! / (n0! n1! n2! n3!) 16^n1 9^n2.
    const factorial = (n: number): number => (n <= 1 ? 1 : n * factorial(n - 1));
    let count = 0;
    for (let n3 = 0; 3 * n3 <= 5; n3++) {
      for (let n2 = 0; 3 * n3 + 2 * n2 <= 5; n2++) {
        const n1 = 5 - 3 * n3 - 2 * n2, n0 = 5 - n1 - n2 - n3;
        if (n0 < 0) continue;
        count += (factorial(5) / (factorial(n0) * factorial(n1) * factorial(n2) * factorial(n3))) * 16 ** n1 * 9 ** n2;
      }
    }
    expect(quality.maxQualityCombinations).toBe(count);
    expect(count).toBeGreaterThan(MAX_FACE_COMBINATIONS);
  });
});

describe('closed form derived by hand: twelve frictionless contacts on a cube', () => {
  it('gives Q_L1 = c / sqrt(3) and Q_Linf = 2c / sqrt(1 + c^2), the weakest wrench a twist about a cube diagonal', () => {
    // Derived by hand for this test. A cube of half-width a, centred on the origin; on each face two
    // frictionless contacts offset by +-b from the face centre: along y on the x faces, along z on the
    // y faces, along x on the z faces. A contact on face +x at (a, s b, 0) pushes f = (-1, 0, 0) with
    // torque r x f = (0, 0, s b); the others alike. So the twelve unit wrenches are
    // (+-e_k, +-c e_tau(k)) with c = b / L and tau = (x -> z, y -> x, z -> y), all four sign pairs:
    // each lies in one of three mutually orthogonal planes (force k, torque tau(k)), four per plane at
    // the corners of the rectangle [-1, 1] x [-c, c].
    // Q_L1: the hull of the union is the free sum of the three rectangles, whose facets are
    // a_1 . z_1 + a_2 . z_2 + a_3 . z_3 <= 1 with each a_k a facet functional of its rectangle,
    // (+-1, 0) or (0, +-1 / c); distance 1 / |a|, smallest with |a_k| = 1 / c in every plane (c < 1):
    // Q_L1 = c / sqrt(3), on the facet whose normal has only torque, equal in all three axes.
    // Q_Linf: the sum of the segments [0, w] splits by plane; in one plane [0, v] + [0, -v] = [-v, v],
    // so the plane's part is [-v1, v1] + [-v2, v2], v1,2 = (1, +-c): the rhombus with corners (+-2, 0),
    // (0, +-2c), whose edges lie 2c / sqrt(1 + c^2) from the origin. The sum is the product of the three
    // rhombi, and a product's inscribed radius is the smallest of its factors'.
    const a = 0.04, b = 0.015;
    const points: number[] = [], normals: number[] = [];
    for (const s of [1, -1]) {
      for (const offset of [b, -b]) {
        points.push(s * a, offset, 0, 0, s * a, offset, offset, 0, s * a);
        normals.push(s, 0, 0, 0, s, 0, 0, 0, s);
      }
    }
    const input: GraspQualityInput = {
      origin: [0, 0, 0], points, normals, friction: new Array(12).fill(0), contactCount: 12, coneEdges: 8, torsionalFriction: 0,
    };
    const quality = computeGraspQuality(input);
    const L = Math.hypot(a, b);
    expect(quality.torqueLength).toBeCloseTo(L, 15);
    const c = b / L;
    expect(quality.forceClosure).toBe(true);
    expect(quality.sumQuality).toBeCloseTo(c / Math.sqrt(3), 9);
    expect(quality.maxQuality).toBeCloseTo((2 * c) / Math.sqrt(1 + c * c), 9);
    const [fx, fy, fz, tx, ty, tz] = quality.weakestWrench;
    expect(Math.hypot(fx, fy, fz)).toBeCloseTo(0, 9);
    for (const t of [tx, ty, tz]) expect(Math.abs(t)).toBeCloseTo(1 / Math.sqrt(3), 9);
  });
});
