import { describe, expect, it } from 'vitest';
import { computeGraspQuality } from '../../../src/lib/kinematics/index';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';

const sphere = { kind: 'sphere', radius: 0.03 } as const;

/** The tri-radial template on a 30 mm sphere as a raw document, with edits applied. */
function rawSheet(edit: (doc: Record<string, any>) => void = () => {}): Record<string, any> {
  const doc = structuredClone(createSheetFromTemplate('tri-radial', sphere)) as Record<string, any>;
  edit(doc);
  return doc;
}

function issuesOf(doc: unknown) {
  const parsed = parseSheet(doc);
  return parsed.ok ? [] : parsed.issues;
}

describe('grasp-quality inputs in the sheet document', () => {
  it('reads every existing sheet without them, and keeps the stated values', () => {
    const plain = parseSheet(rawSheet());
    expect(plain.ok && plain.doc.graspQuality).toBeUndefined();
    const stated = parseSheet(rawSheet((d) => {
      d.hand.fingers[0].friction = 0.8;
      d.graspQuality = { coneEdges: 12, torsionalFriction: '2 mm', torqueLength: '40 mm' };
    }));
    expect(stated.ok).toBe(true);
    if (!stated.ok) return;
    expect(stated.doc.hand.fingers[0].friction).toBe(0.8);
    expect(stated.doc.graspQuality).toEqual({ coneEdges: 12, torsionalFriction: 0.002, torqueLength: 0.04 });
    expect(parseSheet(rawSheet((d) => { d.graspQuality = {}; }))).toMatchObject({ ok: true, doc: { graspQuality: { coneEdges: 8, torsionalFriction: 0 } } });
  });

  it.each([
    ['a negative friction coefficient', (d: Record<string, any>) => { d.hand.fingers[1].friction = -0.1; }, 'hand.fingers[1].friction', 'must not be negative'],
    ['a friction coefficient past 5', (d: Record<string, any>) => { d.hand.fingers[1].friction = 7; }, 'hand.fingers[1].friction', 'must be at most 5'],
    ['a friction coefficient with a unit', (d: Record<string, any>) => { d.hand.fingers[0].friction = '0.5 mm'; }, 'hand.fingers[0].friction', 'expected a friction coefficient'],
    ['two cone edges', (d: Record<string, any>) => { d.graspQuality = { coneEdges: 2 }; }, 'graspQuality.coneEdges', 'at least 3 cone edges'],
    ['1e308 cone edges', (d: Record<string, any>) => { d.graspQuality = { coneEdges: 1e308 }; }, 'graspQuality.coneEdges', 'at most 32 cone edges'],
    ['33 cone edges', (d: Record<string, any>) => { d.graspQuality = { coneEdges: 33 }; }, 'graspQuality.coneEdges', 'at most 32 cone edges'],
    ['a fractional number of edges', (d: Record<string, any>) => { d.graspQuality = { coneEdges: 7.5 }; }, 'graspQuality.coneEdges', 'whole number'],
    ['a zero torque length', (d: Record<string, any>) => { d.graspQuality = { torqueLength: 0 }; }, 'graspQuality.torqueLength', 'greater than 0'],
    ['a torque length of 20 m', (d: Record<string, any>) => { d.graspQuality = { torqueLength: '20 m' }; }, 'graspQuality.torqueLength', 'at most 10 m'],
    ['a torsional friction as an angle', (d: Record<string, any>) => { d.graspQuality = { torsionalFriction: '3 deg' }; }, 'graspQuality.torsionalFriction', 'length'],
    ['32 edges on each of 4 fingers (128 generators, past 96)', (d: Record<string, any>) => {
      d.hand.fingers.push({ ...structuredClone(d.hand.fingers[0]), name: 'fourth' });
      d.graspQuality = { coneEdges: 32 };
    }, 'graspQuality.coneEdges', 'use at most 24 cone edges'],
    ['an unknown field', (d: Record<string, any>) => { d.graspQuality = { edges: 8 }; }, 'graspQuality.edges', 'unknown field'],
  ])('refuses %s with a located message', (_, edit, path, message) => {
    const issues = issuesOf(rawSheet(edit));
    expect(issues.find((issue) => issue.path === path)?.message).toContain(message);
  });
});

describe('grasp quality through the evaluation pipeline', () => {
  it('reports the quality of the touching contacts once per evaluation, the same as the core from the contacts, and derives it', () => {
    const evaluated = evaluateSheet(rawSheet((d) => { d.hand.fingers[2].friction = 0.9; }), { derive: true });
    expect(evaluated.ok).toBe(true);
    if (!evaluated.ok) return;
    const { result, derivation } = evaluated.value;
    const touching = result.fingers.filter((f) => f.contact.state !== 'separated');
    expect(result.graspQuality?.contactCount).toBe(touching.length);
    const p = result.object.position;
    // The default torque length is the largest contact distance from the object origin (Ferrari & Canny 1992 leave L to the user; our stated default).
    const farthest = Math.max(...touching.map((f) => Math.hypot(...f.contact.objectPoint.map((x, j) => x - p[j]))));
    expect(result.graspQuality?.torqueLength).toBeCloseTo(farthest, 12);
    const direct = computeGraspQuality({
      origin: p, points: touching.flatMap((f) => f.contact.objectPoint), normals: touching.flatMap((f) => f.contact.normal),
      friction: result.fingers.map((_, i) => (i === 2 ? 0.9 : 0.5)).filter((_, i) => result.fingers[i].contact.state !== 'separated'),
      contactCount: touching.length, coneEdges: 8, torsionalFriction: 0,
    });
    expect(result.graspQuality?.sumQuality).toBe(direct.sumQuality);
    const entry = derivation.find((e) => e.id === 'graspQuality.sumQuality');
    expect(entry?.value).toBe(result.graspQuality?.sumQuality);
    expect(derivation.find((e) => e.id === 'graspQuality.weakestWrench')?.label).toContain(result.graspQuality!.weakestWords);
    expect(derivation.find((e) => e.id === 'graspQuality.torqueLength')?.latex).toContain('\\max_i');
  });

  it('computes Q_Linf for the default three-finger sheet with 8 cone edges and derives it', () => {
    const evaluated = evaluateSheet(rawSheet(), { derive: true });
    expect(evaluated.ok).toBe(true);
    if (!evaluated.ok) return;
    const { result, derivation } = evaluated.value;
    const quality = result.graspQuality!;
    expect(quality.coneEdges).toBe(8);
    expect(quality.forceClosure).toBe(true);
    // Ferrari & Canny 1992: the hull of the union lies in the Minkowski sum, which lies in k times it (k contacts).
    expect(quality.maxQuality).toBeGreaterThanOrEqual(quality.sumQuality);
    expect(quality.maxQuality).toBeLessThanOrEqual(quality.contactCount * quality.sumQuality);
    const entry = derivation.find((e) => e.id === 'graspQuality.maxQuality');
    expect(entry?.value).toBe(quality.maxQuality);
    expect(entry?.latex).toContain(`${quality.maxQualityCombinations} face combinations`);
  });

  it('uses the torsional friction only for soft fingers', () => {
    const soft = (softFinger: boolean) => evaluateSheet(rawSheet((d) => {
      d.solver = { softFinger };
      d.graspQuality = { torsionalFriction: '3 mm' };
    }));
    const point = soft(false), withSpin = soft(true);
    expect(point.ok && withSpin.ok).toBe(true);
    if (!point.ok || !withSpin.ok) return;
    // Adding generators to a convex hull can only enlarge it (common practice): the soft finger's quality is at least the point contact's.
    expect(withSpin.value.result.graspQuality!.sumQuality).toBeGreaterThanOrEqual(point.value.result.graspQuality!.sumQuality - 1e-6);
  });
});
