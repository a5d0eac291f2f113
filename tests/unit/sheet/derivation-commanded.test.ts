import { describe, expect, it } from 'vitest';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { threeFingerSheet } from '../kinematics/three-finger-sheet';

function derivation(written: unknown) {
  const evaluated = evaluateSheet(written, { derive: true });
  if (!evaluated.ok) throw new Error(evaluated.error.message);
  return evaluated.value;
}

describe('the derivation of what the sheet commands', () => {
  it('shows each steered pivot rate as its change over the time step, with the numbers that give it', () => {
    const doc = threeFingerSheet();
    doc.hand.fingers[0]!.joints[1]!.angle = 0.3;
    const { derivation: entries, result } = derivation(JSON.parse(JSON.stringify(doc)));
    const entry = entries.find((e) => e.id === 'finger.0.commanded.pivot.rate')!;
    expect(entry.value).toBe(result.commanded!.fingers[0]!.pivot!.rate);
    expect(entry.latex).toContain('\\frac{\\theta^{*} - \\theta}{\\Delta t}');
    expect(entry.latex).toContain('- 0.3}{0.01}');
  });

  it('leaves out the pivot rates under "full" and the twist conversion for a twist written as before', () => {
    const { derivation: entries } = derivation(JSON.parse(JSON.stringify({ ...threeFingerSheet(), commanded: 'full' })));
    expect(entries.some((e) => e.id.includes('commanded'))).toBe(false);
    expect(entries.some((e) => e.id === 'object.twist')).toBe(false);
  });

  it('shows the twist written about a point in the object frame converted to the origin: v = v_q + ω × (p − q)', () => {
    const written = JSON.parse(JSON.stringify(threeFingerSheet()));
    written.object.pose.orientation = { axis: [0, 0, 1], angle: '90 deg' };
    written.object.twist = { linear: [0, 0, 0], angular: [0, 0, 1], frame: 'object', about: ['10 mm', 0, 0] };
    const { derivation: entries, doc } = derivation(written);
    const entry = entries.find((e) => e.id === 'object.twist')!;
    // Turned by 90° about z the point (10 mm, 0, 0) sits at q = (0, 10 mm, 0); a spin of 1 rad/s about z through q moves the
    // origin at ω × (p − q) = e_z × (0, −0.01, 0) = (0.01, 0, 0) m/s (rigid-body velocity field, common practice).
    expect(doc.object.twist.linear).toBeNear([0.01, 0, 0], { abs: 1e-15 });
    expect(entry.value).toBeNear([0.01, 0, 0, 0, 0, 1], { abs: 1e-15 });
    expect(entry.latex).toContain('v = v_q + \\omega \\times (p - q)');
    expect(entry.label).toContain('object frame');
  });
});
