import { describe, expect, it } from 'vitest';
import { gjkDistance, posedShape, supportPosed, createGjkWorkspace } from '../../../src/lib/kinematics/gjk';
import { boxShape, capsuleShape, cylinderShape, ellipsoidShape, sphereShape, signedDistance } from '../../../src/lib/kinematics/shapes';
import { fromAxisAngle, toMatrix3 } from '../../../src/lib/kinematics/quat';

describe('supportPosed', () => {
  it('rotates the direction into the shape frame and the point back out', () => {
    const rotation = toMatrix3(fromAxisAngle([0, 0, 1], Math.PI / 2));
    const s = posedShape(boxShape([0.1, 0.2, 0.3]), [1, 2, 3], rotation);
    const out = new Float64Array(3);
    supportPosed(s, [1, 1, 1], out, 0, createGjkWorkspace());
    // A quarter turn about z maps the box's x extent onto world y (right-hand rule).
    expect(out).toBeNear([1 + 0.2, 2 + 0.1, 3 + 0.3], { digits: 14 });
  });
});

describe('gjkDistance', () => {
  it('sphere-sphere: |c1 - c2| - r1 - r2 along the centre line (elementary geometry, common practice)', () => {
    const a = posedShape(sphereShape(0.3), [0, 0, 0]);
    const b = posedShape(sphereShape(0.2), [1, 2, 2]);
    const r = gjkDistance(a, b);
    expect(r.intersecting).toBe(false);
    expect(r.distance).toBeCloseTo(3 - 0.5, 9);
    expect(r.pointA).toBeNear([0.1, 0.2, 0.2], { digits: 9 });
    expect(r.pointB).toBeNear([1 - 0.2 / 3, 2 - 0.4 / 3, 2 - 0.4 / 3], { digits: 9 });
  });

  it('box-sphere: distance to the clamped centre minus the radius (Ericson 2005, sec. 5.1.3 and 5.2.5)', () => {
    const e = [0.1, 0.2, 0.3];
    const c = [0.5, 0.6, -0.1];
    const rotation = toMatrix3(fromAxisAngle([0.6, 0, 0.8], 0.7));
    const a = posedShape(boxShape(e), [0, 0, 0]);
    const b = posedShape(sphereShape(0.05), c, rotation);
    const q = c.map((v, i) => Math.min(Math.max(v, -e[i]), e[i]));
    const expected = Math.hypot(c[0] - q[0], c[1] - q[1], c[2] - q[2]) - 0.05;
    const r = gjkDistance(a, b);
    expect(r.distance).toBeCloseTo(expected, 9);
    expect(r.pointA).toBeNear(q, { digits: 9 });
  });

  it('cylinder lying on a wide flat box: height of the axis above the face minus the radius', () => {
    const slab = posedShape(boxShape([1, 1, 0.1]), [0, 0, 0]);
    // Cylinder axis turned from z onto x, centre 0.25 above the origin: gap = 0.25 - 0.1 - 0.04.
    const rotation = toMatrix3(fromAxisAngle([0, 1, 0], Math.PI / 2));
    const roller = posedShape(cylinderShape(0.04, 0.2), [0.1, -0.2, 0.25], rotation);
    const r = gjkDistance(slab, roller);
    expect(r.distance).toBeCloseTo(0.11, 9);
    expect(r.pointA[2]).toBeCloseTo(0.1, 9);
    expect(r.pointB[2]).toBeCloseTo(0.21, 9);
    // Points on curved surfaces converge as the square root of the distance tolerance, hence 7 digits.
    expect(r.pointB[1]).toBeCloseTo(-0.2, 7);
  });

  it('tilted cylinder touches the face with its rim: height minus (r cos t + h sin t) (elementary geometry)', () => {
    const slab = posedShape(boxShape([1, 1, 0.1]), [0, 0, 0]);
    const tilt = 0.3;
    const rotation = toMatrix3(fromAxisAngle([0, 1, 0], Math.PI / 2 + tilt));
    const roller = posedShape(cylinderShape(0.04, 0.2), [0, 0, 0.5], rotation);
    const r = gjkDistance(slab, roller);
    expect(r.distance).toBeCloseTo(0.5 - 0.1 - (0.04 * Math.cos(tilt) + 0.2 * Math.sin(tilt)), 9);
  });

  it('agrees with the closed-form signed distance for a point (ball of radius 0) outside each shape', () => {
    const shapes = [boxShape([0.1, 0.2, 0.3], 0.03), cylinderShape(0.1, 0.2), capsuleShape(0.05, 0.2), ellipsoidShape([0.3, 0.2, 0.1])];
    for (const s of shapes) {
      for (const p of [[0.5, 0.1, 0.2], [-0.2, 0.4, -0.5], [0.05, 0.02, 0.6]]) {
        const r = gjkDistance(posedShape(s), posedShape(sphereShape(0), p));
        expect(r.distance).toBeCloseTo(signedDistance(s, p), 7);
      }
    }
  });

  it('reports overlap of intersecting shapes', () => {
    const r = gjkDistance(posedShape(sphereShape(0.3)), posedShape(boxShape([0.1, 0.1, 0.1]), [0.3, 0, 0]));
    expect(r.intersecting).toBe(true);
    expect(r.distance).toBe(0);
  });

  it('capsule-capsule, parallel: axis separation minus both radii (Ericson 2005, sec. 4.5.1 capsule test)', () => {
    const r = gjkDistance(posedShape(capsuleShape(0.02, 0.1)), posedShape(capsuleShape(0.03, 0.1), [0.2, 0, 0.05]));
    expect(r.distance).toBeCloseTo(0.15, 9);
  });
});
