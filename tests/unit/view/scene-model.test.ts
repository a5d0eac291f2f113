import { describe, expect, it } from 'vitest';
import { solveSheet, toPlainResult } from '../../../src/lib/kinematics';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { Vec3Tuple } from '../../../src/lib/sheet/types';
import { arrowEnd, buildSceneModel, rollerSupport, type ViewRoller } from '../../../src/lib/view/scene-model';

const dot = (a: ArrayLike<number>, b: ArrayLike<number>) => a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
const norm = (a: ArrayLike<number>) => Math.sqrt(dot(a, a));

describe('rollerSupport', () => {
  const wheel: ViewRoller = { finger: 'f', kind: 'cylinder', center: [1, 2, 3], axis: [0, 0, 1], radius: 0.5, halfWidth: 0.25 };

  it('gives a wheel rim point at the far face, worked by hand', () => {
    expect(rollerSupport(wheel, [1, 0, 1])).toEqual([1.5, 2, 3.25]);
    expect(rollerSupport(wheel, [0, -2, -1])).toEqual([1, 1.5, 2.75]);
  });

  it('gives the ball surface point along the direction', () => {
    const ball: ViewRoller = { ...wheel, kind: 'sphere', halfWidth: 0 };
    const p = rollerSupport(ball, [0, 3, 4]);
    expect(p).toBeNear([1, 2.3, 3.4], { digits: 14 });
  });
});

describe('buildSceneModel', () => {
  const doc = createSheetFromTemplate('quad-cross', { kind: 'box', halfExtents: [0.03, 0.03, 0.02], filletRadius: 0.002 });
  const result = toPlainResult(solveSheet(doc));
  const model = buildSceneModel(doc, result);

  it('places each roller at its solved centre and axis with the document radius and width', () => {
    expect(model.rollers).toHaveLength(4);
    model.rollers.forEach((roller, i) => {
      expect(roller.center).toEqual(result.fingers[i]!.rollerCenter);
      expect(roller.axis).toEqual(result.fingers[i]!.rollerAxis);
      expect(roller.radius).toBe(0.01);
      expect(roller.halfWidth).toBe(0.006);
    });
  });

  it('draws one contact per finger with a unit normal and the object velocity there', () => {
    expect(model.contacts).toHaveLength(4);
    model.contacts.forEach((c, i) => {
      expect(norm(c.normal)).toBeCloseTo(1, 12);
      expect(c.velocity).toEqual(result.fingers[i]!.contact.objectVelocity);
      expect(c.point).toEqual(result.fingers[i]!.contact.objectPoint);
    });
  });

  it('gives roll directions perpendicular to the roll axis and to the roller radius at the contact', () => {
    model.contacts.forEach((c, i) => {
      const rollAxis = result.fingers[i]!.jointAxes.slice(6, 9);
      const radius = result.fingers[i]!.contact.rollerPoint.map((y, k) => y - result.fingers[i]!.jointPoints[6 + k]!);
      expect(c.rollDirection).not.toBeNull();
      expect(norm(c.rollDirection!)).toBeCloseTo(1, 12);
      expect(dot(c.rollDirection!, rollAxis)).toBeCloseTo(0, 12);
      expect(dot(c.rollDirection!, radius)).toBeCloseTo(0, 12);
    });
  });

  it('scales velocity arrows so the fastest contact gets the unit length', () => {
    const longest = Math.max(...model.contacts.map((c) => norm(c.velocity) * model.arrows.lengthPerSpeed));
    expect(longest).toBeCloseTo(model.arrows.unitLength, 12);
    expect(model.arrows.maxSpeed).toBeGreaterThan(0);
  });

  it('bounds every roller and chain point', () => {
    const inside = (p: Vec3Tuple) => norm(p.map((v, k) => v - model.bounds.center[k]!)) <= model.bounds.radius + 1e-12;
    model.chains.flat().forEach((p) => expect(inside(p)).toBe(true));
    model.rollers.forEach((r) => expect(inside(rollerSupport(r, [0, 0, 1]))).toBe(true));
  });

  it('shows the home configuration without contacts before anything is solved', () => {
    const home = buildSceneModel(doc, null);
    expect(home.contacts).toEqual([]);
    home.rollers.forEach((roller, i) => expect(roller.center).toEqual(doc.hand.fingers[i]!.roller.center));
    expect(home.chains[0]).toEqual([...doc.hand.fingers[0]!.joints.map((j) => j.point), doc.hand.fingers[0]!.roller.center]);
    expect(home.object.orientation).toEqual([0, 0, 0, 1]);
  });

  it('ends arrows at start + length * direction', () => {
    expect(arrowEnd([1, 1, 1], [0, 0.5, 0], 4)).toEqual([1, 3, 1]);
  });
});
