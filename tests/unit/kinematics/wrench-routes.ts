/**
 * Independent routes for the grasp-quality tests: ray distances through a wrench set by linear
 * programs (yalps), every point of a small Minkowski sum for a hull, and a fixed spread of unit
 * directions.
 */
import { expect } from 'vitest';
import { solve, type Coefficients } from 'yalps';
import type { GraspQualityInput } from '../../../src/lib/kinematics/grasp-quality';

/**
 * Independent route: the linear program "largest t with t u in the wrench set" (solved by yalps),
 * the ray distance along u. Along the nearest facet's normal it equals that facet's distance,
 * and along any direction it is at least the inscribed ball's radius Q (Ferrari & Canny 1992:
 * Q is the radius of the largest origin-centred ball inside the set).
 */
export function rayDistance(perContact: number[][][], u: readonly number[], form: 'sum' | 'max'): number {
  const constraints: Record<string, { equal: number } | { max: number }> = {};
  for (let j = 0; j < 6; j++) constraints[`w${j}`] = { equal: 0 };
  const variables: Record<string, Coefficients> = {};
  perContact.forEach((generators, i) => {
    if (form === 'max') constraints[`budget${i}`] = { max: 1 };
    generators.forEach((w, k) => {
      const coefficients: Record<string, number> = form === 'sum' ? { budget: 1 } : { [`budget${i}`]: 1 };
      for (let j = 0; j < 6; j++) coefficients[`w${j}`] = w[j];
      variables[`l${i}_${k}`] = coefficients;
    });
  });
  // The sum form is the hull of the generators themselves: the weights add up to exactly 1.
  if (form === 'sum') constraints.budget = { equal: 1 };
  const along: Record<string, number> = { t: 1 };
  for (let j = 0; j < 6; j++) along[`w${j}`] = -u[j];
  variables.t = along;
  const solution = solve({ direction: 'maximize', objective: 't', constraints, variables });
  expect(solution.status).toBe('optimal');
  return solution.result;
}

/** Unit 6-vectors from a fixed linear congruential sequence (any spread of directions will do). */
export function directions(count: number, seed = 12345): number[][] {
  let state = seed;
  const next = () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648 - 0.5;
  };
  return Array.from({ length: count }, () => {
    const v = Array.from({ length: 6 }, next);
    const length = Math.hypot(...v);
    return v.map((x) => x / length);
  });
}

/** Every point of the Minkowski sum of conv{0, generators} over the contacts: the independent hull route, for small sums. */
export function minkowskiOf(perContact: number[][][]): number[][] {
  let sums: number[][] = [[0, 0, 0, 0, 0, 0]];
  for (const generators of perContact) sums = sums.flatMap((s) => [s, ...generators.map((g) => s.map((x, j) => x + g[j]))]);
  return sums;
}

const radius = 0.03;
/** Contacts on a 30 mm sphere at the given azimuths and elevations (rad), outward normals through the centre. */
export function onSphere(placements: number[][], friction: number, coneEdges: number, torsionalFriction = 0): GraspQualityInput {
  const points: number[] = [], normals: number[] = [];
  for (const [azimuth, elevation] of placements) {
    const n = [Math.cos(elevation) * Math.cos(azimuth), Math.cos(elevation) * Math.sin(azimuth), Math.sin(elevation)];
    normals.push(...n);
    points.push(...n.map((c) => radius * c));
  }
  return {
    origin: [0.002, -0.001, 0.001], points, normals, friction: placements.map(() => friction),
    contactCount: placements.length, coneEdges, torsionalFriction,
  };
}
