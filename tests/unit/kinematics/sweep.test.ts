import { describe, expect, it } from 'vitest';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { SheetDocument } from '../../../src/lib/sheet/types';
import { solveSheet, toPlainResult } from '../../../src/lib/kinematics/scene';
import { sweepSheet, sweepValues } from '../../../src/lib/kinematics/sweep';

// References: rigid-body velocity v(x) = v + w x (x - p) is linear in the twist (Lynch & Park, "Modern Robotics",
// Sec. 3.3), and damped least squares x = J^T (J J^T + l^2 I)^{-1} b is linear in b for a fixed J (Buss 2004),
// so joint rates scale with the object's angular speed; the gap |c - x| - rho of a ball roller falls one for one
// as rho grows with the centre held (the contact-geometry definition in the design's computation section).

function sheet(): SheetDocument {
  return createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
}

describe('sweepValues', () => {
  it('spaces steps values evenly from from to to, both ends included', () => {
    const v = sweepValues({ path: '/x', from: 0.01, to: 0.02, steps: 11 });
    expect(v.length).toBe(11);
    expect(v[0]).toBe(0.01);
    expect(v[10]).toBe(0.02);
    for (let i = 1; i < 11; i++) expect(v[i]! - v[i - 1]!).toBeCloseTo(0.001, 15);
    expect(Array.from(sweepValues({ path: '/x', from: 3, to: 1, steps: 3 }))).toEqual([3, 2, 1]);
  });
});

describe('sweepSheet', () => {
  it('gives joint rates proportional to the swept angular speed (rigid-body velocity and DLS are linear)', () => {
    const r = sweepSheet(sheet(), { path: '/object/twist/angular/2', from: 0, to: 0.4, steps: 5 });
    expect(r.values).toBeNear([0, 0.1, 0.2, 0.3, 0.4], { digits: 15 });
    const last = r.results[4]!;
    r.results.forEach((result, i) => {
      const ratio = r.values[i]! / 0.4;
      result.fingers.forEach((finger, f) => {
        expect(finger.full.rates).toBeNear(Array.from(last.fingers[f]!.full.rates, (rate) => ratio * rate), { digits: 12 });
        expect(finger.contact.objectVelocity).toBeNear(Array.from(last.fingers[f]!.contact.objectVelocity, (v) => ratio * v), { digits: 14 });
      });
    });
    expect(last.fingers.some((f) => f.full.rates.some((x) => Math.abs(x) > 1e-3))).toBe(true);
  });

  it('lowers the gap one for one as a ball roller grows about a fixed centre', () => {
    const r = sweepSheet(sheet(), { path: '/hand/fingers/0/roller/radius', from: 0.011, to: 0.013, steps: 3 });
    const gaps = r.results.map((result) => result.fingers[0]!.contact.gap);
    expect(gaps[0]! - gaps[1]!).toBeCloseTo(0.001, 12);
    expect(gaps[1]! - gaps[2]!).toBeCloseTo(0.001, 12);
    // The other fingers do not see the change.
    expect(r.results[0]!.fingers[1]!.contact.gap).toBeCloseTo(r.results[2]!.fingers[1]!.contact.gap, 15);
  });

  it('keeps the warnings and worst severity of each value, as copies', () => {
    const doc = sheet();
    const r = sweepSheet(doc, { path: '/solver/singularRatio', from: 1e-9, to: 0.999999, steps: 2 });
    expect(r.results[1]!.warnings.some((w) => w.code === 'JACOBIAN_NEAR_RANK_LOSS')).toBe(true);
    expect(r.worstSeverity[1]).toBe('singular');
    expect(r.results[0]!.warnings).not.toBe(r.results[1]!.warnings);
    expect(r.results[0]!.warnings.filter((w) => w.code === 'JACOBIAN_NEAR_RANK_LOSS').length).toBeLessThan(
      r.results[1]!.warnings.filter((w) => w.code === 'JACOBIAN_NEAR_RANK_LOSS').length,
    );
  });

  it("uses the sheet's own sweep settings by default and reports progress", () => {
    const doc = sheet();
    doc.sweep = { path: '/object/pose/position/2', from: 0.089, to: 0.091, steps: 4 };
    const calls: number[] = [];
    const r = sweepSheet(doc, undefined, { onProgress: (done, total) => calls.push(done / total) });
    expect(r.results.length).toBe(4);
    expect(r.path).toBe('/object/pose/position/2');
    expect(calls).toEqual([0.25, 0.5, 0.75, 1]);
    expect(r.results.map((x) => x.object.position[2])).toEqual(Array.from(r.values));
  });

  it('rejects paths that are missing, not numbers or not JSON pointers, and a sheet without a sweep', () => {
    const doc = sheet();
    expect(() => sweepSheet(doc, { path: '/hand/fingers/9/roller/radius', from: 0, to: 1, steps: 2 })).toThrow(/does not exist/);
    expect(() => sweepSheet(doc, { path: '/hand/name', from: 0, to: 1, steps: 2 })).toThrow(/not point at a number/);
    expect(() => sweepSheet(doc, { path: 'hand/name', from: 0, to: 1, steps: 2 })).toThrow(/JSON pointer/);
    expect(() => sweepSheet(doc)).toThrow(/no sweep/);
  });

  it('unescapes ~1 and ~0 in pointer tokens (RFC 6901, Sec. 4)', () => {
    const doc = sheet() as SheetDocument & { object: { shape: Record<string, unknown> } };
    expect(() => sweepSheet(doc, { path: '/object/shape/a~1b', from: 0, to: 1, steps: 2 })).toThrow(/no "a\/b"/);
    expect(() => sweepSheet(doc, { path: '/object/shape/a~0b', from: 0, to: 1, steps: 2 })).toThrow(/no "a~b"/);
  });

  it('gives the same outputs as compiling and solving a copy of the sheet per value, for state and geometry inputs alike', () => {
    for (const path of ['/object/pose/orientation/z', '/hand/fingers/1/joints/0/angle', '/solver/damping', '/hand/fingers/2/roller/radius']) {
      const doc = sheet();
      const r = sweepSheet(doc, { path, from: 0.001, to: 0.012, steps: 3 });
      r.values.forEach((value, i) => {
        const copy = structuredClone(doc);
        const tokens = path.slice(1).split('/');
        const holder = tokens.slice(0, -1).reduce<Record<string, unknown>>((node, token) => node[token] as Record<string, unknown>, copy as unknown as Record<string, unknown>);
        holder[tokens[tokens.length - 1]!] = value;
        expect(r.results[i]).toEqual(toPlainResult(solveSheet(copy)));
      });
    }
  });

  it('leaves the document untouched', () => {
    const doc = sheet();
    const before = JSON.stringify(doc);
    sweepSheet(doc, { path: '/object/shape/radius', from: 0.029, to: 0.031, steps: 3 });
    expect(JSON.stringify(doc)).toBe(before);
  });
});
