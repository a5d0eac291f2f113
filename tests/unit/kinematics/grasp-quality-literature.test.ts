/**
 * Grasp quality against worked examples from the literature.
 *
 * Published verdicts reproduced here:
 * - V.-D. Nguyen, "Constructing force-closure grasps in 3D" (IEEE ICRA 1987; IJRR 1988, "Constructing
 *   force-closure grasps"; venues from memory): two soft-finger contacts are force closure exactly
 *   when the segment joining them points strictly inside both friction cones. The paper's abstract
 *   states that non-marginal equilibrium grasps with at least two soft-finger contacts are force
 *   closure; the "only if" half is from memory.
 * - A spatial grasp by frictionless point contacts needs at least seven of them (Lakshminarayana
 *   1978; Markenscoff, Ni & Papadimitriou, "The geometry of grasping", IJRR 1990; from memory): the
 *   origin of six-dimensional wrench space is inside the hull of d + 1 = 7 points at the least.
 *
 * No numeric value of the Ferrari-Canny quality for a 3-D grasp was found in a published worked
 * example, so the quality values are derived here in closed form, by the method of Ferrari & Canny
 * ("Planning optimal grasps", IEEE ICRA 1992: Q is the radius of the largest origin-centred ball in
 * the wrench set) with the polar-body identity of convex geometry (common practice: the inradius of a
 * convex body K about an interior origin is 1 / the circumradius of its polar {u : h_K(u) <= 1}).
 * The derivations are written out beside each check; the code under test is used only through the
 * public entry computeGraspQuality.
 */
import { describe, expect, it } from 'vitest';
import { computeGraspQuality, type GraspQualityInput } from '../../../src/lib/kinematics/index';

/** Radius of the grasped sphere, m (a parcel-handling roller test ball). */
const R = 0.04;

/** Two soft-finger contacts on the sphere at ±R x, normals ±x, the same friction mu at both. */
function antipodalSoftPair(mu: number, torsionalFriction: number, coneEdges: number): GraspQualityInput {
  return {
    origin: [0, 0, 0], points: [R, 0, 0, -R, 0, 0], normals: [1, 0, 0, -1, 0, 0], friction: [mu, mu],
    contactCount: 2, coneEdges, torsionalFriction,
  };
}

/**
 * Closed form for the antipodal soft pair with torque length L = R, derived from Ferrari & Canny's
 * definition. With g = gamma / R and k = mu cos(pi / m), write u = (a, b, v) with a the x-force and b
 * the x-torque parts. The generators are (-x + mu t, mu x × t) and (x + mu t', -mu x × t') for the cone
 * edges t, t' in the yz-plane, and (∓x, ±g x) for the twists. The support of the union's hull is
 * h(u) = max(|a| + g|b|, -a + mu M(p), a + mu M(q)) with p, q the two combinations of the yz parts of
 * v that the two contacts see (free to choose independently, |p|² + |q|² = 2|v|²) and M the support of
 * the m-gon of edge directions. The polar body {h <= 1} reaches farthest where p and q point at
 * vertices of the polar m-gon, |p| = (1 + a) / k, |q| = (1 - a) / k, and |b| = (1 - |a|) / g, so its
 * circumradius squared is max over |a| <= 1 of a² + (1 - |a|)² / g² + (1 + a²) / k², convex in |a|:
 * the largest is at |a| = 0 (a twist about the line of the contacts) or |a| = 1 (a push along it).
 * Q_L1 = 1 / sqrt(max(1/g² + 1/k², 1 + 2/k²)).
 * For Q_Linf the support is the sum of the two contacts' positive parts; the same steps give
 * Q_Linf = 1 / sqrt(max(1/4 + 1/(4g²) + 1/(4k²), 1 + 1/(2k²))).
 * The m-gon enters only through k: the linearised cone acts as the round cone with friction scaled
 * by cos(pi / m) (common practice for an inscribed pyramid), whatever way its edges are turned.
 */
function antipodalSoftPairQuality(mu: number, torsionalFriction: number, coneEdges: number): { sum: number; max: number; torsionLimited: boolean } {
  const g = torsionalFriction / R;
  const k = mu * Math.cos(Math.PI / coneEdges);
  const twistSquared = 1 / g ** 2 + 1 / k ** 2, pushSquared = 1 + 2 / k ** 2;
  return {
    sum: 1 / Math.sqrt(Math.max(twistSquared, pushSquared)),
    max: 1 / Math.sqrt(Math.max(0.25 + 1 / (4 * g ** 2) + 1 / (4 * k ** 2), 1 + 1 / (2 * k ** 2))),
    torsionLimited: twistSquared > pushSquared,
  };
}

/** A fixed spread of rotation matrices (row-major 3 × 3) from unit quaternions of a linear congruential sequence. */
function rotations(count: number): number[][] {
  let state = 2024;
  const next = () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648 - 0.5;
  };
  const result: number[][] = [];
  while (result.length < count) {
    const q = [next(), next(), next(), next()];
    const norm = Math.hypot(...q);
    if (norm < 0.1 || norm > 0.5) continue;
    const [w, x, y, z] = q.map((c) => c / norm);
    result.push([
      1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y),
      2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x),
      2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y),
    ]);
  }
  return result;
}

function rotate(m: readonly number[], v: readonly number[]): number[] {
  return [0, 1, 2].map((r) => m[3 * r] * v[0] + m[3 * r + 1] * v[1] + m[3 * r + 2] * v[2]);
}

/**
 * Two soft-finger contacts on the sphere at azimuths ±psi in the xy-plane (normals through the
 * centre), the whole pair turned by `rotation`. The chord between them runs along y, at the angle
 * theta from each inward normal with tan(theta) = cot(psi).
 */
function softPairOnSphere(psi: number, mu: number, coneEdges: number, rotation: readonly number[]): GraspQualityInput {
  const normals = [[Math.cos(psi), Math.sin(psi), 0], [Math.cos(psi), -Math.sin(psi), 0]].map((n) => rotate(rotation, n));
  return {
    origin: [0, 0, 0], points: normals.flatMap((n) => n.map((c) => R * c)), normals: normals.flat(), friction: [mu, mu],
    contactCount: 2, coneEdges, torsionalFriction: 0.2 * R,
  };
}

describe('two soft fingers on a sphere (Nguyen 1988 force-closure criterion)', () => {
  const psi = Math.PI / 3;
  // The chord's angle from each inward normal: tan(theta) = cot(psi) = 1/sqrt(3) for contacts 120 degrees apart.
  const tanTheta = 1 / Math.tan(psi);
  const turns = rotations(60);

  it.each([4, 6, 8])('with %i cone edges: force closure in every orientation once mu cos(pi/m) exceeds tan(theta), in none below tan(theta)', (m) => {
    // Nguyen 1988: closure iff the chord is strictly inside both cones; the m-edge pyramid inscribed in the cone of
    // friction mu contains every direction within mu cos(pi/m) of the normal and none beyond mu (common practice).
    const inside = tanTheta / Math.cos(Math.PI / m) * 1.05;
    const outside = tanTheta * 0.95;
    for (const turn of turns) {
      expect(computeGraspQuality(softPairOnSphere(psi, inside, m, turn)).forceClosure).toBe(true);
      const open = computeGraspQuality(softPairOnSphere(psi, outside, m, turn));
      expect(open.forceClosure).toBe(false);
      expect(open.sumQuality).toBe(0);
    }
  });

  it('between tan(theta) and tan(theta) / cos(pi/m) the verdict turns on how the pyramid edges meet the chord', () => {
    // Between the inscribed pyramid's flats (radius mu cos(pi/4)) and its edges (radius mu) the chord is inside
    // when it passes near an edge and outside near a flat: both verdicts must occur over the orientations.
    const mu = tanTheta * 1.25;
    const verdicts = new Set(turns.map((turn) => computeGraspQuality(softPairOnSphere(psi, mu, 4, turn)).forceClosure));
    expect(verdicts).toEqual(new Set([true, false]));
  });
});

describe('two antipodal soft fingers: Q_L1 and Q_Linf in closed form', () => {
  it.each([
    // [mu, gamma / R, m]: small torsion (the twist about the contact line is resisted worst), then large (the push along it).
    [0.5, 0.1, 8], [0.3, 0.05, 4], [0.8, 0.2, 6], [0.5, 1, 8], [0.3, 2, 4], [1, 1.5, 12],
  ])('mu %f, gamma/R %f, %i edges', (mu, gammaOverR, m) => {
    const gamma = gammaOverR * R;
    const expected = antipodalSoftPairQuality(mu, gamma, m);
    const quality = computeGraspQuality(antipodalSoftPair(mu, gamma, m));
    expect(quality.torqueLength).toBeCloseTo(R, 15);
    expect(quality.forceClosure).toBe(true);
    expect(quality.sumQuality).toBeNear(expected.sum, { rel: 1e-6 });
    expect(quality.maxQuality).not.toBeNull();
    expect(quality.maxQuality!).toBeNear(expected.max, { rel: 1e-6 });
    const w = quality.weakestWrench;
    if (expected.torsionLimited) {
      // At |a| = 0 the farthest polar point has no push along x; its twist about x is b / |u| = Q / g.
      expect(w[0]).toBeNear(0, { abs: 1e-7 });
      expect(Math.abs(w[3])).toBeNear(expected.sum / gammaOverR, { rel: 1e-6 });
    } else {
      // At |a| = 1 the push along x is 1 / |u| = Q, with no twist about x.
      expect(Math.abs(w[0])).toBeNear(expected.sum, { rel: 1e-6 });
      expect(w[3]).toBeNear(0, { abs: 1e-7 });
    }
  });

  it('the linearised cone costs exactly the factor cos(pi/m) on the friction, not on the quality', () => {
    // With no torsion limit in play (gamma large), Q_L1 = k / sqrt(2 + k²) with k = mu cos(pi/m): four edges
    // of friction mu give the quality of a round cone of friction mu cos(pi/4) = 0.7071 mu.
    const mu = 0.6;
    const square = computeGraspQuality(antipodalSoftPair(mu, 3 * R, 4)).sumQuality;
    const k = mu * Math.cos(Math.PI / 4);
    expect(square).toBeNear(k / Math.sqrt(2 + k * k), { rel: 1e-6 });
    // More edges approach the round cone from below.
    const fine = computeGraspQuality(antipodalSoftPair(mu, 3 * R, 32)).sumQuality;
    expect(fine).toBeGreaterThan(square);
    expect(fine).toBeLessThan(mu / Math.sqrt(2 + mu * mu));
  });

  it('without torsion the pair is not force closure (Murray, Li & Sastry 1994, ch. 5; the twist about the line is free)', () => {
    const quality = computeGraspQuality(antipodalSoftPair(0.5, 0, 8));
    expect(quality.forceClosure).toBe(false);
  });
});

/**
 * Twelve frictionless contacts on a cube of half-size a, two on each face at ±b along one tangent:
 * on the faces ±x at (±a, ±b, 0), ±y at (0, ±a, ±b), ±z at (±b, 0, ±a). A frictionless contact pushes
 * -n, so the face ±x gives the wrenches (∓x, ±(b/L) z) with both signs of the torque, and likewise
 * (∓y, ±(b/L) x) and (∓z, ±(b/L) y). With beta = b / L the twelve wrenches are the corners of three
 * rectangles [-1, 1] × [-beta, beta] lying in the mutually orthogonal planes (f_x, tau_z),
 * (f_y, tau_x), (f_z, tau_y).
 *
 * Q_L1: the hull of point sets in orthogonal subspaces is their free sum, whose facets each join one
 * facet of every part, at distance 1 / sqrt(sum 1 / d_j²) (common practice of convex geometry); each
 * rectangle's nearest side is at min(1, beta), so Q_L1 = min(1, beta) / sqrt(3).
 * Q_Linf: each contact adds the segment [0, w], and the four of one rectangle give the support
 * 2 max(|u_f|, beta |u_tau|) in its plane; the sum over the three planes on the unit sphere is least with
 * the whole of u in one plane and |u_f| = beta |u_tau|: Q_Linf = 2 beta / sqrt(1 + beta²).
 */
function frictionlessCube(a: number, b: number, torqueLength: number, faces = 6): GraspQualityInput {
  const points: number[] = [], normals: number[] = [];
  const layout: [number[], (s: number) => number[]][] = [
    [[1, 0, 0], (s) => [a, s * b, 0]], [[-1, 0, 0], (s) => [-a, s * b, 0]],
    [[0, 1, 0], (s) => [0, a, s * b]], [[0, -1, 0], (s) => [0, -a, s * b]],
    [[0, 0, 1], (s) => [s * b, 0, a]], [[0, 0, -1], (s) => [s * b, 0, -a]],
  ];
  for (const [n, at] of layout.slice(0, faces)) for (const s of [1, -1]) { normals.push(...n); points.push(...at(s)); }
  const contactCount = points.length / 3;
  return { origin: [0, 0, 0], points, normals, friction: new Array(contactCount).fill(0), contactCount, coneEdges: 8, torsionalFriction: 0, torqueLength };
}

describe('frictionless contacts on a cube', () => {
  const a = 0.05, b = 0.02;

  it('twelve contacts: Q_L1 = beta / sqrt(3), Q_Linf = 2 beta / sqrt(1 + beta²), weakest a twist about a cube diagonal', () => {
    const L = a;
    const beta = b / L;
    const quality = computeGraspQuality(frictionlessCube(a, b, L));
    expect(quality.forceClosure).toBe(true);
    expect(quality.sumQuality).toBeNear(beta / Math.sqrt(3), { rel: 1e-5 });
    expect(quality.maxQuality!).toBeNear((2 * beta) / Math.sqrt(1 + beta * beta), { rel: 1e-5 });
    // The nearest facet joins the torque sides of the three rectangles: a twist of equal parts about x, y and z.
    const w = Array.from(quality.weakestWrench);
    expect(w.slice(0, 3)).toBeNear([0, 0, 0], { abs: 1e-5 });
    expect(w.slice(3).map(Math.abs)).toBeNear([1, 1, 1].map((c) => c / Math.sqrt(3)), { abs: 1e-5 });
    expect(quality.weakestWords).toMatch(/^a twist about \(/);
  });

  it('twelve contacts with a short torque length: the torques count for more and the pushes set Q_L1 = 1 / sqrt(3)', () => {
    const L = b / 2;
    const beta = b / L;
    const quality = computeGraspQuality(frictionlessCube(a, b, L));
    expect(quality.sumQuality).toBeNear(1 / Math.sqrt(3), { rel: 1e-5 });
    expect(quality.maxQuality!).toBeNear((2 * beta) / Math.sqrt(1 + beta * beta), { rel: 1e-5 });
    const w = Array.from(quality.weakestWrench);
    expect(w.slice(3)).toBeNear([0, 0, 0], { abs: 1e-5 });
    expect(w.slice(0, 3).map(Math.abs)).toBeNear([1, 1, 1].map((c) => c / Math.sqrt(3)), { abs: 1e-5 });
  });

  it('six frictionless contacts are never force closure, and eight with no contact on the z faces are not either', () => {
    // Seven frictionless contacts at the least for a spatial grasp (Markenscoff, Ni & Papadimitriou 1990, from memory);
    // seven or more are not enough when no contact pushes along z.
    expect(computeGraspQuality(frictionlessCube(a, b, a, 4)).forceClosure).toBe(false);
    // Any six: one contact per face, each offset along its tangent, still leaves a wrench unresisted.
    const one = frictionlessCube(a, b, a);
    const keep = [0, 2, 4, 6, 8, 10];
    const six: GraspQualityInput = {
      ...one, contactCount: 6, friction: new Array(6).fill(0),
      points: keep.flatMap((i) => Array.from(one.points).slice(3 * i, 3 * i + 3)),
      normals: keep.flatMap((i) => Array.from(one.normals).slice(3 * i, 3 * i + 3)),
    };
    expect(computeGraspQuality(six).forceClosure).toBe(false);
  });
});
