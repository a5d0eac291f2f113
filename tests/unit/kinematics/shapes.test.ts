import { describe, expect, it } from 'vitest';
import {
  boxShape, capsuleShape, closestSurfacePoint, cylinderShape, ellipsoidShape, shapeFromInput,
  signedDistance, sphereShape, support, type ConvexShape,
} from '../../../src/lib/kinematics/shapes';

const clamp = (v: number, lo: number, hi: number) => Math.min(Math.max(v, lo), hi);

// Brute-force check: the smallest distance from p to a dense sampling of the ellipsoid surface
// x = (a cos u sin v, b sin u sin v, c cos v), an independent reference for Eberly's method.
function bruteEllipsoidDistance(e: number[], p: number[]): number {
  let best = Infinity;
  let bu = 0, bv = 0;
  const steps = 400;
  for (let i = 0; i <= steps; i++) {
    for (let j = 0; j <= steps; j++) {
      const u = (2 * Math.PI * i) / steps, v = (Math.PI * j) / steps;
      const d = Math.hypot(e[0] * Math.cos(u) * Math.sin(v) - p[0], e[1] * Math.sin(u) * Math.sin(v) - p[1], e[2] * Math.cos(v) - p[2]);
      if (d < best) { best = d; bu = u; bv = v; }
    }
  }
  // Refine locally with shrinking pattern search.
  let h = (2 * Math.PI) / steps;
  while (h > 1e-12) {
    let moved = false;
    for (const [du, dv] of [[h, 0], [-h, 0], [0, h], [0, -h]]) {
      const u = bu + du, v = bv + dv;
      const d = Math.hypot(e[0] * Math.cos(u) * Math.sin(v) - p[0], e[1] * Math.sin(u) * Math.sin(v) - p[1], e[2] * Math.cos(v) - p[2]);
      if (d < best) { best = d; bu = u; bv = v; moved = true; }
    }
    if (!moved) h /= 2;
  }
  return best;
}

describe('shapeFromInput', () => {
  it('unpacks every sheet shape kind', () => {
    expect(shapeFromInput({ kind: 'sphere', radius: 0.04 })).toMatchObject({ kind: 'sphere', radius: 0.04 });
    const box = shapeFromInput({ kind: 'box', halfExtents: [0.1, 0.2, 0.3], filletRadius: 0.01 });
    expect(box.radius).toBe(0.01);
    expect(box.extents).toBeNear([0.1, 0.2, 0.3], { digits: 12 });
    expect(shapeFromInput({ kind: 'cylinder', radius: 0.03, halfLength: 0.05 })).toMatchObject({ radius: 0.03, halfLength: 0.05 });
    expect(shapeFromInput({ kind: 'capsule', radius: 0.03, halfLength: 0.05 }).kind).toBe('capsule');
    expect(shapeFromInput({ kind: 'ellipsoid', semiAxes: [0.3, 0.2, 0.1] }).extents).toBeNear([0.3, 0.2, 0.1], { digits: 12 });
  });
});

describe('closestSurfacePoint', () => {
  it('sphere: centre + r (p - c)/|p - c|, signed distance |p - c| - r (Ericson 2005, sec. 5.1, sphere case)', () => {
    const s = sphereShape(0.5);
    for (const p of [[1, 2, 2], [0.1, -0.2, 0.05]]) {
      const len = Math.hypot(p[0], p[1], p[2]);
      const q = closestSurfacePoint(s, p);
      expect(q.point).toBeNear(p.map((c) => (0.5 * c) / len), { digits: 12 });
      expect(q.normal).toBeNear(p.map((c) => c / len), { digits: 12 });
      expect(q.signedDistance).toBeCloseTo(len - 0.5, 12);
    }
  });

  it('box outside: clamp each coordinate to the extents (Ericson 2005, sec. 5.1.3, ClosestPtPointAABB)', () => {
    const e = [0.1, 0.2, 0.3];
    const box = boxShape(e);
    for (const p of [[0.5, 0.05, -0.1], [0.4, -0.5, 0.6], [-0.05, 0.3, 0.1]]) {
      const expected = p.map((c, i) => clamp(c, -e[i], e[i]));
      const q = closestSurfacePoint(box, p);
      expect(q.point).toBeNear(expected, { digits: 12 });
      expect(q.signedDistance).toBeCloseTo(Math.hypot(p[0] - expected[0], p[1] - expected[1], p[2] - expected[2]), 12);
    }
  });

  it('box inside: nearest face, negative distance to it (Ericson 2005, sec. 5.1.3, interior case)', () => {
    const q = closestSurfacePoint(boxShape([0.1, 0.2, 0.3]), [0.05, 0.02, -0.01]);
    expect(q.point).toBeNear([0.1, 0.02, -0.01], { digits: 12 });
    expect(q.normal).toBeNear([1, 0, 0], { digits: 12 });
    expect(q.signedDistance).toBeCloseTo(-0.05, 12);
  });

  it('rounded box = core box grown by the fillet: distance to core minus fillet (Minkowski sum, Ericson 2005, sec. 2.4 and 5.1.3)', () => {
    const e = [0.1, 0.2, 0.3], f = 0.02;
    const box = boxShape(e, f);
    const p = [0.3, 0.35, 0.05];
    const core = p.map((c, i) => clamp(c, -(e[i] - f), e[i] - f));
    const dCore = Math.hypot(p[0] - core[0], p[1] - core[1], p[2] - core[2]);
    const q = closestSurfacePoint(box, p);
    expect(q.signedDistance).toBeCloseTo(dCore - f, 12);
    expect(q.point).toBeNear(core.map((c, i) => c + (f * (p[i] - c)) / dCore), { digits: 12 });
    // On a flat face the fillet does not matter.
    expect(signedDistance(box, [0.15, 0, 0])).toBeCloseTo(0.05, 12);
  });

  it('capsule: closest point on the core segment, then out by the radius (Ericson 2005, sec. 5.1.2, ClosestPtPointSegment)', () => {
    const cap = capsuleShape(0.02, 0.05);
    for (const p of [[0.1, 0, 0.2], [0.03, -0.04, 0.01], [0, 0.005, -0.02]]) {
      const s = [0, 0, clamp(p[2], -0.05, 0.05)];
      const d = Math.hypot(p[0] - s[0], p[1] - s[1], p[2] - s[2]);
      const q = closestSurfacePoint(cap, p);
      expect(q.signedDistance).toBeCloseTo(d - 0.02, 12);
      expect(q.normal).toBeNear(p.map((c, i) => (c - s[i]) / d), { digits: 12 });
    }
  });

  it('cylinder: side, cap, rim and interior cases (radial and axial clamps, common practice)', () => {
    const cyl = cylinderShape(0.03, 0.05);
    let q = closestSurfacePoint(cyl, [0.06, 0.08, 0.01]);
    expect(q.point).toBeNear([0.018, 0.024, 0.01], { digits: 12 });
    expect(q.signedDistance).toBeCloseTo(0.07, 12);
    q = closestSurfacePoint(cyl, [0.01, 0, 0.09]);
    expect(q.point).toBeNear([0.01, 0, 0.05], { digits: 12 });
    expect(q.normal).toBeNear([0, 0, 1], { digits: 12 });
    expect(q.signedDistance).toBeCloseTo(0.04, 12);
    q = closestSurfacePoint(cyl, [0.06, 0, -0.09]);
    expect(q.point).toBeNear([0.03, 0, -0.05], { digits: 12 });
    expect(q.signedDistance).toBeCloseTo(0.05, 12);
    q = closestSurfacePoint(cyl, [0.025, 0, 0.0]);
    expect(q.point).toBeNear([0.03, 0, 0], { digits: 12 });
    expect(q.signedDistance).toBeCloseTo(-0.005, 12);
    q = closestSurfacePoint(cyl, [0, 0.001, 0.049]);
    expect(q.normal).toBeNear([0, 0, 1], { digits: 12 });
    expect(q.signedDistance).toBeCloseTo(-0.001, 12);
  });

  it('ellipsoid with equal semi-axes agrees with the sphere', () => {
    const p = [0.3, -0.2, 0.5];
    const a = closestSurfacePoint(ellipsoidShape([0.25, 0.25, 0.25]), p);
    const b = closestSurfacePoint(sphereShape(0.25), p);
    expect(a.point).toBeNear(b.point, { digits: 12 });
    expect(a.signedDistance).toBeCloseTo(b.signedDistance, 12);
  });

  it('ellipsoid: Eberly optimality p - x parallel to the gradient x / e^2, x on the surface, distance matches brute force', () => {
    const e = [0.3, 0.2, 0.1];
    const shape = ellipsoidShape(e);
    const points = [[0.5, 0.4, 0.3], [-0.2, 0.05, -0.3], [0.1, 0.05, 0.02], [0.01, -0.02, 0.005], [0.35, 0, 0], [0.1, 0, 0], [0, 0, 0], [-0.02, 0.15, 0]];
    for (const p of points) {
      const q = closestSurfacePoint(shape, p);
      const x = q.point;
      expect((x[0] / e[0]) ** 2 + (x[1] / e[1]) ** 2 + (x[2] / e[2]) ** 2).toBeCloseTo(1, 12);
      const g = [x[0] / e[0] ** 2, x[1] / e[1] ** 2, x[2] / e[2] ** 2];
      const r = [p[0] - x[0], p[1] - x[1], p[2] - x[2]];
      const c = [r[1] * g[2] - r[2] * g[1], r[2] * g[0] - r[0] * g[2], r[0] * g[1] - r[1] * g[0]];
      expect(Math.hypot(c[0], c[1], c[2])).toBeLessThan(1e-10);
      expect(Math.abs(q.signedDistance)).toBeCloseTo(bruteEllipsoidDistance(e, p), 9);
      const inside = (p[0] / e[0]) ** 2 + (p[1] / e[1]) ** 2 + (p[2] / e[2]) ** 2 < 1;
      expect(q.signedDistance < 0).toBe(inside);
    }
  });

  it('ellipsoid: inside point on the major axis goes to x0 = e0^2 y0 / (e0^2 - e2^2) (Eberly, sec. 3, the y2 = 0 case)', () => {
    const q = closestSurfacePoint(ellipsoidShape([0.3, 0.2, 0.1]), [0.1, 0, 0]);
    expect(Math.abs(q.point[0])).toBeCloseTo((0.09 * 0.1) / (0.09 - 0.01), 12);
    expect(q.point[1]).toBeCloseTo(0, 12);
    expect(Math.abs(q.point[2])).toBeCloseTo(0.1 * Math.sqrt(1 - ((0.3 * 0.1) / 0.08) ** 2), 12);
  });

  it('leaves the query point untouched', () => {
    const p = [0.5, 0.4, 0.3];
    closestSurfacePoint(ellipsoidShape([0.3, 0.2, 0.1]), p);
    expect(p).toEqual([0.5, 0.4, 0.3]);
  });
});

describe('signedDistance', () => {
  it('is negative inside and positive outside for every kind', () => {
    const shapes: ConvexShape[] = [sphereShape(0.1), boxShape([0.1, 0.1, 0.1], 0.02), cylinderShape(0.1, 0.1), capsuleShape(0.1, 0.1), ellipsoidShape([0.1, 0.12, 0.14])];
    for (const s of shapes) {
      expect(signedDistance(s, [0.01, 0.02, -0.01])).toBeLessThan(0);
      expect(signedDistance(s, [0.5, 0.2, -0.3])).toBeGreaterThan(0);
    }
  });
});

describe('support', () => {
  // Support of a convex set maximises d . x over it (Ericson 2005, sec. 9.5 on GJK); check against sampled surface points.
  it('maximises d . x over surface samples for every kind', () => {
    const shapes: ConvexShape[] = [sphereShape(0.1), boxShape([0.1, 0.2, 0.3], 0.02), cylinderShape(0.1, 0.2), capsuleShape(0.05, 0.2), ellipsoidShape([0.3, 0.2, 0.1])];
    const dirs = [[1, 2, 3], [-1, 0.5, -0.2], [0, 0, 1], [0.3, -0.9, 0]];
    for (const s of shapes) {
      for (const d of dirs) {
        const x = support(s, d);
        const best = d[0] * x[0] + d[1] * x[1] + d[2] * x[2];
        // The support point must lie on the surface.
        expect(Math.abs(signedDistance(s, x))).toBeLessThan(1e-12);
        for (let i = 0; i < 2000; i++) {
          const u = Math.sin(i * 12.9898) * 43758.5453;
          const v = Math.sin(i * 78.233) * 12345.6789;
          const dir = [Math.cos(u) * Math.sin(v), Math.sin(u) * Math.sin(v), Math.cos(v)];
          const y = closestSurfacePoint(s, dir.map((c) => c * 10)).point;
          expect(d[0] * y[0] + d[1] * y[1] + d[2] * y[2]).toBeLessThanOrEqual(best + 1e-12);
        }
      }
    }
  });
  it('box corner for a diagonal direction is the outer corner when unfilleted (Ericson 2005, sec. 9.5)', () => {
    expect(support(boxShape([0.1, 0.2, 0.3]), [1, -1, 1])).toBeNear([0.1, -0.2, 0.3], { digits: 12 });
  });
});
