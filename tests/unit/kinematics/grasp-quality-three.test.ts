import { describe, expect, it } from 'vitest';
import {
  computeGraspQuality, contactWrenches, FORCE_CLOSURE_TOLERANCE, forceCones, nearestSumFacet, threePointContacts, unionFaceQuality, type GraspQualityInput,
} from '../../../src/lib/kinematics/grasp-quality';
import { createRandom, nextUniform, type RandomSource } from '../../../src/lib/kinematics/random';
import { threeContactQualities } from '../../../src/lib/kinematics/three-contact-quality';
import { directions, rayDistance } from './wrench-routes';

/** A unit vector from three uniform numbers (direction of a Gaussian-free cube sample, rejected outside the ball). */
function randomUnit(random: RandomSource): number[] {
  for (;;) {
    const v = [0, 1, 2].map(() => 2 * nextUniform(random) - 1);
    const length = Math.hypot(...v);
    if (length > 0.1 && length <= 1) return v.map((x) => x / length);
  }
}

/** Three contacts with the given points and inward-facing outward normals (normalised here), friction per contact and cone edges, about `origin`. */
function layout(points: number[][], normals: number[][], friction: number[], coneEdges: number, origin = [0, 0, 0]): GraspQualityInput {
  return {
    origin, points: points.flat(), normals: normals.flatMap((n) => n.map((x) => x / Math.hypot(...n))), friction, contactCount: 3, coneEdges, torsionalFriction: 0,
  };
}

/** Contacts on a sphere of `radius` roughly a third of a turn apart (jittered azimuths and elevations), their normals tilted off the radius by up to `tilt`. */
function onSphere(random: RandomSource, radius: number, tilt: number): GraspQualityInput {
  const points: number[][] = [], normals: number[][] = [];
  const start = 2 * Math.PI * nextUniform(random);
  for (let i = 0; i < 3; i++) {
    const azimuth = start + (2 * Math.PI * i) / 3 + 0.8 * (nextUniform(random) - 0.5), elevation = 1.2 * (nextUniform(random) - 0.5);
    const n = [Math.cos(elevation) * Math.cos(azimuth), Math.cos(elevation) * Math.sin(azimuth), Math.sin(elevation)];
    points.push(n.map((x) => radius * x));
    const off = randomUnit(random);
    normals.push(n.map((x, j) => x + tilt * off[j]));
  }
  const friction = [0, 1, 2].map(() => 0.15 + nextUniform(random));
  const origin = [0, 1, 2].map(() => 0.2 * radius * (2 * nextUniform(random) - 1));
  return layout(points, normals, friction, 3 + Math.floor(8 * nextUniform(random)), origin);
}

/** Degenerate layouts, built by hand: symmetric, shared normals, coplanar, collinear, antipodal, nearly frictionless. */
function degenerate(random: RandomSource, kind: number): GraspQualityInput {
  const r = 0.03, mu = 0.3 + nextUniform(random), m = 3 + (kind % 6);
  const around = (angles: number[], z: number) => angles.map((a) => [r * Math.cos(a), r * Math.sin(a), z]);
  switch (kind % 7) {
    case 0: {
      // Three contacts 120 degrees apart at one height, normals through the centre (a symmetric three-finger grasp).
      const points = around([0, (2 * Math.PI) / 3, (4 * Math.PI) / 3], -0.2 * r * nextUniform(random));
      return layout(points, points, [mu, mu, mu], m);
    }
    case 1:
      // Two fingers side by side on one face, one opposite: two contacts share a normal.
      return layout([[r, 0.01, 0], [r, -0.01, 0], [-r, 0, 0.002]], [[1, 0, 0], [1, 0, 0], [-1, 0, 0]], [mu, mu, mu], m);
    case 2: {
      // Coplanar contacts with normals in their plane.
      const points = around([0, 2.0 + nextUniform(random), 4.1], 0);
      return layout(points, points, [mu, 0.5, mu], m);
    }
    case 3:
      // Contacts on one line (the twist about it is free: not force closure).
      return layout([[-0.02, 0, 0.01], [0, 0, 0.01], [0.02, 0, 0.01]], [[-1, 0.2, 0.5], [0, -1, -0.4], [1, 0.5, 0.3]], [mu, mu, mu], m);
    case 4:
      // An antipodal pair and a third contact on the equator between them.
      return layout([[r, 0, 0], [-r, 0, 0], [0, r, 0]], [[1, 0, 0], [-1, 0, 0], [0, 1, 0]], [mu, mu, mu], m);
    case 5:
      // Nearly frictionless contacts: each cone almost a line.
      return layout(around([0, 2.1, 4.2], 0.001), around([0, 2.1, 4.2], 0.001), [1e-4, 1e-4, 1e-4], m);
    default: {
      // All three on one side of the object: not force closure.
      const points = around([0, 0.4, 0.8], 0);
      return layout(points, points, [mu, mu, mu], m);
    }
  }
}

function relative(a: number, b: number): number {
  return a === b ? 0 : Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b));
}

describe('three point contacts: the force-cone route against the face search', () => {
  const random = createRandom(0x3c0e);
  const cases = [
    ...Array.from({ length: 220 }, () => onSphere(random, 0.02 + 0.03 * nextUniform(random), 0.6 * nextUniform(random))),
    ...Array.from({ length: 42 }, (_, kind) => degenerate(random, kind)),
  ];

  it('gives the same force-closure decision, Q_L1 and Q_Linf (1e-12 relative) on 262 seeded layouts, degenerate ones included', () => {
    let routeTaken = 0, closures = 0;
    for (const input of cases) {
      expect(threePointContacts(input)).toBe(true);
      const quality = computeGraspQuality(input);
      const perContact = contactWrenches(input, quality.torqueLength);
      const scale = Math.max(...perContact.flat().map((w) => Math.hypot(...w)));
      // The face search: facets from the contacts' face lattices (Ziegler 1995, sec. 7.1; the Cayley trick of Huber, Rambau & Santos 2000).
      const union = unionFaceQuality(input, perContact);
      const faceClosure = union !== null && union.distance > FORCE_CLOSURE_TOLERANCE * scale;
      expect(quality.forceClosure).toBe(faceClosure);
      const route = threeContactQualities(forceCones(input, quality.torqueLength, perContact), perContact, scale, FORCE_CLOSURE_TOLERANCE);
      if (!faceClosure) {
        expect(route).toBeNull();
        continue;
      }
      closures++;
      if (route !== null) routeTaken++;
      expect(relative(quality.sumQuality, union!.distance)).toBeLessThanOrEqual(1e-12);
      const sum = nearestSumFacet(input, perContact);
      expect(relative(quality.maxQuality!, sum.distance!)).toBeLessThanOrEqual(1e-12);
      // The weakest wrench is a nearest facet's normal: the union's support along it is Q_L1 (Ferrari & Canny 1992).
      const u = Array.from(quality.weakestWrench, (x) => -x);
      const support = Math.max(...perContact.flat().map((w) => w.reduce((s, x, j) => s + x * u[j], 0)));
      expect(relative(support, quality.sumQuality)).toBeLessThanOrEqual(1e-12);
    }
    // Most force-closure layouts take the route (the others hand over to the face search and are checked above all the same).
    expect(closures).toBeGreaterThan(150);
    expect(routeTaken).toBeGreaterThan(0.8 * closures);
  });

  it('agrees with the face search on symmetric layouts: three places of a 2-, 3-, 4- and 6-fold ring at one height, cones of 3 to 12 edges', () => {
    const layouts: GraspQualityInput[] = [];
    for (const fold of [2, 3, 4, 6]) {
      // Places 0, 1 and 2 of the ring (2-fold: two opposite contacts and one on the mirror line between them).
      const azimuths = fold === 2 ? [0, Math.PI, Math.PI / 2] : [0, 1, 2].map((k) => (2 * Math.PI * k) / fold);
      for (const elevation of [-0.4, -0.26, 0, 0.3]) {
        for (const coneEdges of [3, 4, 6, 8, 12]) {
          for (const mu of [0.3, 0.5, 1]) {
            const points = azimuths.map((a) => [0.03 * Math.cos(elevation) * Math.cos(a), 0.03 * Math.cos(elevation) * Math.sin(a), 0.03 * Math.sin(elevation)]);
            layouts.push(layout(points, points, [mu, mu, mu], coneEdges));
          }
        }
      }
    }
    let closures = 0;
    for (const input of layouts) {
      const quality = computeGraspQuality(input);
      const perContact = contactWrenches(input, quality.torqueLength);
      const scale = Math.max(...perContact.flat().map((w) => Math.hypot(...w)));
      // The face search (Ziegler 1995, sec. 7.1; Huber, Rambau & Santos 2000) decides closure and both qualities independently of the route taken.
      const union = unionFaceQuality(input, perContact);
      const faceClosure = union !== null && union.distance > FORCE_CLOSURE_TOLERANCE * scale;
      expect(quality.forceClosure).toBe(faceClosure);
      if (!faceClosure) continue;
      closures++;
      expect(relative(quality.sumQuality, union!.distance)).toBeLessThanOrEqual(1e-12);
      expect(relative(quality.maxQuality!, nearestSumFacet(input, perContact).distance!)).toBeLessThanOrEqual(1e-12);
    }
    // Most of these grasps hold: contacts spread round the ring with friction 0.3 to 1 (Ferrari & Canny 1992).
    expect(closures).toBeGreaterThan(layouts.length / 2);
  });

  it('gives each layout the same qualities whatever was computed before it (the searches reuse their scratch)', () => {
    const random = createRandom(0x5eed);
    const inputs = [
      ...Array.from({ length: 12 }, () => onSphere(random, 0.03, 0.4 * nextUniform(random))),
      ...Array.from({ length: 7 }, (_, kind) => degenerate(random, kind)),
    ];
    const first = inputs.map((input) => computeGraspQuality(input));
    // The same layouts again in reverse order, each after a different predecessor: equal to the bit.
    for (let k = inputs.length - 1; k >= 0; k--) {
      const again = computeGraspQuality(inputs[k]);
      expect(again.sumQuality).toBe(first[k].sumQuality);
      expect(again.maxQuality).toBe(first[k].maxQuality);
      expect(Array.from(again.weakestWrench)).toEqual(Array.from(first[k].weakestWrench));
    }
  });

  it('hands contacts on one line to the face search, which finds no force closure', () => {
    // On one line the map from twists to contact velocities loses the twist about the line (Murray, Li & Sastry 1994, ch. 5, from memory: force closure needs wrenches spanning every direction).
    const collinear = degenerate(createRandom(1), 3);
    const perContact = contactWrenches(collinear, 0.03);
    expect(threeContactQualities(forceCones(collinear, 0.03, perContact), perContact, 1, FORCE_CLOSURE_TOLERANCE)).toBeNull();
    expect(computeGraspQuality(collinear).forceClosure).toBe(false);
  });

  it('reaches the Minkowski sum\'s facet along its normal by a linear program, and no direction tried comes closer', () => {
    const input = onSphere(createRandom(77), 0.03, 0.3);
    const quality = computeGraspQuality(input);
    expect(quality.forceClosure).toBe(true);
    const perContact = contactWrenches(input, quality.torqueLength);
    const scale = Math.max(...perContact.flat().map((w) => Math.hypot(...w)));
    const route = threeContactQualities(forceCones(input, quality.torqueLength, perContact), perContact, scale, FORCE_CLOSURE_TOLERANCE)!;
    expect(route).not.toBeNull();
    // Ferrari & Canny 1992, Q_Linf with one normal-force budget per contact; linear program solved by yalps.
    expect(rayDistance(perContact, Array.from(route.max.normal), 'max')).toBeNear(quality.maxQuality!, { abs: 1e-7 });
    expect(rayDistance(perContact, Array.from(route.sum.normal), 'sum')).toBeNear(quality.sumQuality, { abs: 1e-7 });
    for (const direction of directions(40, 2024)) expect(rayDistance(perContact, direction, 'max')).toBeGreaterThan(quality.maxQuality! - 1e-7);
  });
});
