import { describe, expect, it } from 'vitest';
import { shapeFromInput, signedDistance } from '../../../src/lib/kinematics';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { HAND_TEMPLATES, createSheetFromTemplate, getHandTemplate, objectHeightFor } from '../../../src/lib/sheet/templates';
import type { ObjectShape, Vec3Tuple } from '../../../src/lib/sheet/types';

const shapes: ObjectShape[] = [
  { kind: 'sphere', radius: 0.03 },
  { kind: 'box', halfExtents: [0.025, 0.02, 0.03], filletRadius: 0.004 },
  { kind: 'cylinder', radius: 0.012, halfLength: 0.035 },
  { kind: 'capsule', radius: 0.01, halfLength: 0.02 },
  { kind: 'ellipsoid', semiAxes: [0.03, 0.022, 0.04] },
];

const sub = (a: ArrayLike<number>, b: ArrayLike<number>): Vec3Tuple => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
const dot = (a: ArrayLike<number>, b: ArrayLike<number>) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const cross = (a: ArrayLike<number>, b: ArrayLike<number>): Vec3Tuple => [
  a[1] * b[2] - a[2] * b[1],
  a[2] * b[0] - a[0] * b[2],
  a[0] * b[1] - a[1] * b[0],
];
const norm = (a: ArrayLike<number>) => Math.sqrt(dot(a, a));
/** Distance from point q to the line through p along unit u (m). */
const lineDistance = (u: ArrayLike<number>, p: ArrayLike<number>, q: ArrayLike<number>) => norm(cross(u, sub(q, p)));

describe('HAND_TEMPLATES', () => {
  it('offers two-, three-, four- and five-finger hands', () => {
    expect(HAND_TEMPLATES.map((t) => t.fingers.length).sort()).toEqual([2, 3, 4, 5]);
  });

  it('keeps palm radii within 40-70 mm and roller radii within 8-20 mm (common practice for palm-sized grippers)', () => {
    for (const template of HAND_TEMPLATES) {
      for (const finger of template.fingers) {
        expect(finger.palmRadius).toBeGreaterThanOrEqual(0.04);
        expect(finger.palmRadius).toBeLessThanOrEqual(0.07);
        expect(finger.roller.radius).toBeGreaterThanOrEqual(0.008);
        expect(finger.roller.radius).toBeLessThanOrEqual(0.02);
      }
    }
  });
});

describe('getHandTemplate', () => {
  it('finds templates by id and names the known ids otherwise', () => {
    expect(getHandTemplate('tri-radial').fingers).toHaveLength(3);
    expect(() => getHandTemplate('nope')).toThrow(/known: duo-opposed, tri-radial, quad-cross, penta-fan/);
  });
});

describe('objectHeightFor', () => {
  it('raises a tall object so that it clears the palm by 15 mm', () => {
    const template = getHandTemplate('duo-opposed');
    expect(objectHeightFor(template, { kind: 'sphere', radius: 0.01 })).toBe(template.graspHeight);
    expect(objectHeightFor(template, { kind: 'capsule', radius: 0.02, halfLength: 0.07 })).toBeCloseTo(0.09 + 0.015, 12);
  });
});

describe('createSheetFromTemplate', () => {
  const cases = HAND_TEMPLATES.flatMap((t) => shapes.map((s) => [t.id, s.kind, s] as const));

  it.each(cases)('%s on a %s gives a sheet that parses back to itself', (id, _kind, shape) => {
    const doc = createSheetFromTemplate(id, shape);
    const parsed = parseSheet(JSON.parse(JSON.stringify(doc)));
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.doc.hand.fingers.length).toBe(getHandTemplate(id).fingers.length);
    parsed.doc.hand.fingers.forEach((finger, i) => {
      finger.joints.forEach((joint, k) => {
        const original = doc.hand.fingers[i].joints[k];
        expect(joint.axis).toBeNear(original.axis, { digits: 11 });
      });
    });
  });

  it.each(cases)('%s on a %s: every roller starts touching the object, with base -> pivot -> roll joints', (id, _kind, shape) => {
    const doc = createSheetFromTemplate(id, shape);
    const body = shapeFromInput(shape);
    const centre = doc.object.pose.position;
    expect(centre[0]).toBe(0);
    expect(centre[1]).toBe(0);
    for (const finger of doc.hand.fingers) {
      expect(finger.joints.map((j) => j.role)).toEqual(['base', 'pivot', 'roll']);
      const [base, pivot, roll] = finger.joints;
      const c = finger.roller.center;
      // A roller touches a convex body when its centre lies one roller radius outside the surface.
      expect(signedDistance(body, sub(c, centre))).toBeCloseTo(finger.roller.radius, 8);
      // Pivot and roll axes pass through the roller centre and are perpendicular to each other.
      expect(lineDistance(pivot.axis, pivot.point, c)).toBeLessThan(1e-9);
      expect(lineDistance(roll.axis, roll.point, c)).toBeLessThan(1e-9);
      expect(Math.abs(dot(pivot.axis, roll.axis))).toBeLessThan(1e-9);
      // The base presses toward the object: its motion at the contact has a normal component.
      const y: Vec3Tuple = [c[0] + finger.roller.radius * pivot.axis[0], c[1] + finger.roller.radius * pivot.axis[1], c[2] + finger.roller.radius * pivot.axis[2]];
      const baseVelocity = cross(base.axis, sub(y, base.point));
      expect(Math.abs(dot(baseVelocity, pivot.axis))).toBeGreaterThan(0.03);
      expect(base.limits && base.limits.min < 0 && base.limits.max > 0).toBe(true);
      expect(roll.limits).toBeUndefined();
      for (const joint of finger.joints) expect(joint.rateLimit).toBeGreaterThan(0);
    }
  });

  it('places ball rollers on a sphere at distance R + rho from its centre (tangent spheres)', () => {
    const R = 0.03;
    const doc = createSheetFromTemplate('penta-fan', { kind: 'sphere', radius: R });
    for (const finger of doc.hand.fingers) {
      expect(norm(sub(finger.roller.center, doc.object.pose.position))).toBeCloseTo(R + finger.roller.radius, 8);
    }
  });

  it('places rollers on an ellipsoid where the contact lies on the surface and the pivot axis is the surface normal', () => {
    const axes: Vec3Tuple = [0.03, 0.022, 0.04];
    const doc = createSheetFromTemplate('tri-radial', { kind: 'ellipsoid', semiAxes: axes });
    for (const finger of doc.hand.fingers) {
      const inward = finger.joints[1].axis;
      const rho = finger.roller.radius;
      const x = sub(sub(finger.roller.center, doc.object.pose.position), inward.map((v) => -rho * v));
      // Implicit surface sum (x_i / a_i)^2 = 1 with normal along its gradient (x_i / a_i^2): any calculus text.
      expect(x.reduce((s, xi, i) => s + (xi / axes[i]) ** 2, 0)).toBeCloseTo(1, 7);
      const gradient = x.map((xi, i) => xi / axes[i] ** 2);
      expect(norm(cross(gradient, inward)) / norm(gradient)).toBeLessThan(1e-6);
      expect(dot(gradient, inward)).toBeLessThan(0);
    }
  });

  it('starts with a slow spin about z toward a 45 degree turn', () => {
    const doc = createSheetFromTemplate('duo-opposed', shapes[0]);
    expect(doc.object.twist).toEqual({ linear: [0, 0, 0], angular: [0, 0, 0.2] });
    const q = doc.motion.target.orientation;
    expect(2 * Math.atan2(q.z, q.w)).toBeCloseTo(Math.PI / 4, 14);
  });
});
