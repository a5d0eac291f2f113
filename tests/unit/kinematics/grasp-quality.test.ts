import { describe, expect, it } from 'vitest';
import { computeGraspQuality, contactWrenches, nearestFacet, type GraspQualityInput } from '../../../src/lib/kinematics/grasp-quality';
import { directions, minkowskiOf, rayDistance } from './wrench-routes';

const radius = 0.03;
/** Three contacts on a 30 mm sphere, 120 degrees apart around z and tilted off the equator (outward normals through the centre). */
function threeOnSphere(friction: number, coneEdges: number): GraspQualityInput {
  const points: number[] = [], normals: number[] = [];
  for (const [azimuth, elevation] of [[0, 0.2], [2.1, -0.1], [4.2, 0.3]]) {
    const n = [Math.cos(elevation) * Math.cos(azimuth), Math.cos(elevation) * Math.sin(azimuth), Math.sin(elevation)];
    normals.push(...n);
    points.push(...n.map((c) => radius * c));
  }
  return { origin: [0, 0, 0], points, normals, friction: [friction, friction, friction], contactCount: 3, coneEdges, torsionalFriction: 0 };
}

function antipodal(torsionalFriction: number): GraspQualityInput {
  return {
    origin: [0, 0, 0], points: [radius, 0, 0, -radius, 0, 0], normals: [1, 0, 0, -1, 0, 0], friction: [0.5, 0.5],
    contactCount: 2, coneEdges: 8, torsionalFriction,
  };
}

describe('contactWrenches', () => {
  it('puts every cone edge on the cone with unit normal push, and its torque is (x - p) x f over L', () => {
    const input = threeOnSphere(0.4, 6);
    const perContact = contactWrenches(input, 0.05);
    perContact.forEach((edges, i) => {
      const n = Array.from(input.normals).slice(3 * i, 3 * i + 3);
      const r = Array.from(input.points).slice(3 * i, 3 * i + 3);
      expect(edges).toHaveLength(6);
      for (const w of edges) {
        const f = w.slice(0, 3);
        // Coulomb cone edge (Murray, Li & Sastry 1994, ch. 5, sec. 2): normal component 1 into the object, tangential mu.
        const normalPart = -(f[0] * n[0] + f[1] * n[1] + f[2] * n[2]);
        expect(normalPart).toBeCloseTo(1, 12);
        expect(Math.hypot(f[0] + normalPart * n[0], f[1] + normalPart * n[1], f[2] + normalPart * n[2])).toBeCloseTo(0.4, 12);
        const torque = [r[1] * f[2] - r[2] * f[1], r[2] * f[0] - r[0] * f[2], r[0] * f[1] - r[1] * f[0]].map((c) => c / 0.05);
        expect(w.slice(3)).toBeNear(torque, { abs: 1e-12 });
      }
    });
  });
});

describe('computeGraspQuality', () => {
  it('two antipodal point contacts with friction are not force closure: the twist about the line between them is free', () => {
    // Murray, Li & Sastry 1994, ch. 5, sec. 4 (from memory): two point contacts with friction cannot resist a moment about the line joining them.
    const quality = computeGraspQuality(antipodal(0));
    expect(quality.forceClosure).toBe(false);
    expect(quality.sumQuality).toBe(0);
    expect(Math.abs(quality.weakestWrench[3])).toBeCloseTo(1, 9);
    expect(quality.weakestWords).toMatch(/^a twist about [+−]x is not resisted at all$/);
  });

  it('two antipodal soft-finger contacts are force closure, and the twist about the line is what they resist worst', () => {
    // Murray, Li & Sastry 1994, ch. 5, sec. 4 (from memory): two soft-finger contacts on an antipodal pair inside the friction cones give force closure (Nguyen 1988 antipodal criterion).
    const quality = computeGraspQuality(antipodal(0.002));
    expect(quality.forceClosure).toBe(true);
    expect(quality.sumQuality).toBeGreaterThan(0);
    expect(quality.weakestWords).toMatch(/^a twist about [+−]x/);
    // Torsion alone bounds the quality: a pure twist about x is reached only through the spin gamma / L per unit normal force.
    expect(quality.sumQuality).toBeLessThanOrEqual(0.002 / radius + 1e-6);
  });

  it('three contacts with friction on a sphere are force closure; Q_L1 equals the linear program along the weakest direction and bounds every other', () => {
    const input = threeOnSphere(0.5, 8);
    const quality = computeGraspQuality(input);
    expect(quality.forceClosure).toBe(true);
    const perContact = contactWrenches(input, quality.torqueLength);
    const u = Array.from(quality.weakestWrench, (x) => -x);
    expect(rayDistance(perContact, u, 'sum')).toBeCloseTo(quality.sumQuality, 5);
    for (const direction of directions(40)) expect(rayDistance(perContact, direction, 'sum')).toBeGreaterThanOrEqual(quality.sumQuality - 1e-5);
  });

  it('Q_Linf is the inscribed radius of the Minkowski sum, checked by the linear program with one force budget per contact', () => {
    const input = threeOnSphere(0.6, 4);
    const quality = computeGraspQuality(input);
    const perContact = contactWrenches(input, quality.torqueLength);
    const maxQuality = quality.maxQuality!;
    expect(maxQuality).toBeGreaterThan(quality.sumQuality);
    const minkowski = nearestFacet(minkowskiOf(perContact));
    expect(rayDistance(perContact, minkowski.normal, 'max')).toBeCloseTo(maxQuality, 5);
    for (const direction of directions(40)) expect(rayDistance(perContact, direction, 'max')).toBeGreaterThanOrEqual(maxQuality - 1e-5);
  });

  it('more friction never lowers the quality, and frictionless contacts on a sphere cannot resist any twist', () => {
    const low = computeGraspQuality(threeOnSphere(0.3, 8)).sumQuality;
    const high = computeGraspQuality(threeOnSphere(0.8, 8)).sumQuality;
    expect(high).toBeGreaterThan(low);
    // Normals through the centre carry no moment about it (Ferrari & Canny 1992; common practice): no force closure without friction.
    expect(computeGraspQuality(threeOnSphere(0, 8)).forceClosure).toBe(false);
  });
});
