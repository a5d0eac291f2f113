import { describe, expect, it } from 'vitest';
import { solveSheet } from '../../../src/lib/kinematics/scene';
import {
  clearWarnings, createWarningList, finishWarnings, formatWarning, raiseWarning, SEVERITY_LEVELS, slipTolerance, WARNING_CATALOGUE,
  WARNING_CODES, type WarningCode,
} from '../../../src/lib/kinematics/warnings';
import type { SheetDocument } from '../../../src/lib/sheet/types';
import { threeFingerFinger, threeFingerSheet } from './three-finger-sheet';

// Each case below is built so one condition holds; the expected codes follow from the geometry
// written beside it, not from running the solver first.

function codes(doc: SheetDocument, finger?: number): WarningCode[] {
  return solveSheet(doc).warnings.filter((w) => finger === undefined || w.finger === finger).map((w) => w.code);
}

/**
 * The test hand with each pivot tilted 45 degrees up from the contact normal, still through the
 * roller centre, and the roll axis along the tangent: the contact then sits rho / sqrt 2 from the
 * pivot axis, so the three Jacobian columns (base ~ 0.05 e_r + 0.048 z, pivot -rho e_t / sqrt 2,
 * roll rho z) span all three directions.
 */
function healthyHand(): SheetDocument {
  const doc = threeFingerSheet();
  doc.hand.fingers = [0, 1, 2].map((i) => {
    const f = threeFingerFinger(i);
    const c = f.roller.center;
    const er = [c[0] / 0.052, c[1] / 0.052, 0];
    f.joints[1] = { ...f.joints[1], axis: [er[0] * Math.SQRT1_2, er[1] * Math.SQRT1_2, Math.SQRT1_2] };
    f.joints[2] = { ...f.joints[2], axis: [-er[1], er[0], 0] };
    return f;
  });
  return doc;
}

describe('WARNING_CATALOGUE', () => {
  it('gives every code a severity, title, message, explanation and unit', () => {
    for (const [code, info] of Object.entries(WARNING_CATALOGUE)) {
      expect(['note', 'caution', 'singular']).toContain(info.severity);
      for (const text of [info.title, info.message, info.explanation, info.unit]) expect(text.length, code).toBeGreaterThan(0);
    }
  });
});

describe('raiseWarning', () => {
  it('reuses pooled objects across clears and trims the list', () => {
    const list = createWarningList();
    const first = raiseWarning(list, 'CONTACT_LOST', 0, undefined, 0.01, 0.001);
    raiseWarning(list, 'SLIP_REQUIRED', 1, undefined, 0.2, 0.1);
    expect(finishWarnings(list).length).toBe(2);
    clearWarnings(list);
    const again = raiseWarning(list, 'GRASP_RANK_DEFICIENT', undefined, undefined, 5, 6);
    expect(again).toBe(first);
    expect(again).toMatchObject({ code: 'GRASP_RANK_DEFICIENT', severity: 'caution', finger: undefined, value: 5, threshold: 6 });
    expect(finishWarnings(list)).toEqual([again]);
  });
  it('keeps the code bit mask and the worst severity rank of what was raised, and clears both', () => {
    const list = createWarningList();
    raiseWarning(list, 'CONTACT_NEAR_PIVOT_AXIS', 0, 1, 0, 0.001);
    raiseWarning(list, 'SLIP_REQUIRED', 1, undefined, 0.2, 0.1);
    raiseWarning(list, 'SLIP_REQUIRED', 2, undefined, 0.3, 0.1);
    expect(WARNING_CODES.filter((_, bit) => (list.mask & (1 << bit)) !== 0)).toEqual(['CONTACT_NEAR_PIVOT_AXIS', 'SLIP_REQUIRED']);
    expect(list.worstRank).toBe(Math.max(...finishWarnings(list).map((w) => SEVERITY_LEVELS.indexOf(w.severity))));
    expect(SEVERITY_LEVELS[list.worstRank]).toBe('caution');
    clearWarnings(list);
    expect([list.mask, list.worstRank]).toEqual([0, 0]);
  });
});

describe('worst severity of a warning list', () => {
  it('orders note < caution < singular', () => {
    const list = createWarningList();
    expect(SEVERITY_LEVELS[list.worstRank]).toBe('none');
    raiseWarning(list, 'CONTACT_NEAR_PIVOT_AXIS', 0, 1, 0, 0.001);
    expect(SEVERITY_LEVELS[list.worstRank]).toBe('note');
    raiseWarning(list, 'JACOBIAN_NEAR_RANK_LOSS', 0, undefined, 0, 0.001);
    raiseWarning(list, 'CONTACT_LOST', 0, undefined, 1, 0.001);
    expect(SEVERITY_LEVELS[list.worstRank]).toBe('singular');
  });
});

describe('formatWarning', () => {
  it('names the finger and joint and gives value and threshold with the unit', () => {
    const list = createWarningList();
    const w = raiseWarning(list, 'RATE_LIMIT_EXCEEDED', 0, 2, 12.3456, 10);
    expect(formatWarning(w, ['index'])).toBe(`finger 'index', joint 2: ${WARNING_CATALOGUE.RATE_LIMIT_EXCEEDED.message} (value 12.35 rad/s, threshold 10 rad/s)`);
  });
});

describe('slipTolerance', () => {
  it('is the larger of the minimum tangential speed and 0.1 % of the contact speed', () => {
    const settings = threeFingerSheet().solver;
    expect(slipTolerance(0.001, settings)).toBe(settings.minTangentialSpeed);
    expect(slipTolerance(1, settings)).toBeCloseTo(1e-3, 15);
  });
});

describe('checkFinger and checkGrasp, one constructed case per code', () => {
  it('the healthy hand raises nothing', () => {
    expect(codes(healthyHand())).toEqual([]);
  });

  it('CONTACT_LOST: ball shrunk by 1 mm leaves a 1 mm gap, above the 0.2 mm tolerance', () => {
    const doc = healthyHand();
    doc.object.shape = { kind: 'sphere', radius: 0.039 };
    expect(codes(doc, 0)).toContain('CONTACT_LOST');
  });

  it('CONTACT_PENETRATING: ball grown by 1 mm overlaps every roller by 1 mm', () => {
    const doc = healthyHand();
    doc.object.shape = { kind: 'sphere', radius: 0.041 };
    expect(codes(doc, 0)).toContain('CONTACT_PENETRATING');
  });

  it('CONTACT_NEAR_ROLL_AXIS: roll axis along the contact normal passes through the contact', () => {
    const doc = healthyHand();
    doc.hand.fingers[0].joints[2] = { ...doc.hand.fingers[0].joints[2], axis: [1, 0, 0] };
    expect(codes(doc, 0)).toContain('CONTACT_NEAR_ROLL_AXIS');
    expect(codes(healthyHand(), 0)).not.toContain('CONTACT_NEAR_ROLL_AXIS');
  });

  it('CONTACT_NEAR_PIVOT_AXIS: pivot along the normal through the roller centre', () => {
    expect(codes(threeFingerSheet(), 0)).toContain('CONTACT_NEAR_PIVOT_AXIS');
    expect(codes(healthyHand(), 0)).not.toContain('CONTACT_NEAR_PIVOT_AXIS');
  });

  it('PIVOT_MISSES_ROLLER_CENTRE: pivot axis moved 4 mm sideways from the roller centre', () => {
    const doc = healthyHand();
    doc.hand.fingers[0].joints[1] = { ...doc.hand.fingers[0].joints[1], point: [0.052, 0.004, 0] };
    const w = solveSheet(doc).warnings.find((x) => x.code === 'PIVOT_MISSES_ROLLER_CENTRE');
    expect(w?.finger).toBe(0);
    expect(w?.value).toBeCloseTo(0.004, 12);
  });

  it('TANGENTIAL_SPEED_NEAR_ZERO: the object does not move', () => {
    const doc = healthyHand();
    doc.object.twist = { linear: [0, 0, 0], angular: [0, 0, 0] };
    expect(codes(doc, 0)).toContain('TANGENTIAL_SPEED_NEAR_ZERO');
  });

  it('STEER_CANNOT_ALIGN: pivot about z, roll axis tilted 0.3 rad, remainder nearly vertical', () => {
    const doc = threeFingerSheet();
    const f = doc.hand.fingers[0];
    f.joints[1] = { ...f.joints[1], axis: [0, 0, 1] };
    f.joints[2] = { ...f.joints[2], axis: [0, Math.cos(0.3), Math.sin(0.3)] };
    doc.object.twist = { linear: [0.01, 0.001, 0.02], angular: [0, 0, 0] };
    expect(codes(doc, 0)).toContain('STEER_CANNOT_ALIGN');
  });

  it('JACOBIAN_NEAR_RANK_LOSS after steering: roll axis along the normal x puts the contact on it, so no steering gives a roll column', () => {
    const doc = threeFingerSheet();
    doc.hand.fingers[0].joints[2] = { ...doc.hand.fingers[0].joints[2], axis: [1, 0, 0] };
    const result = solveSheet(doc);
    const w = result.warnings.find((x) => x.code === 'JACOBIAN_NEAR_RANK_LOSS' && x.finger === 0);
    expect(result.fingers[0].rankBasis).toBe('steered');
    expect(w?.value).toBeLessThan(1e-12);
    expect(w?.message).toContain('after steering');
  });

  it('JACOBIAN_NEAR_RANK_LOSS on the full Jacobian: without a pivot role the joint through the contact leaves a zero column', () => {
    const doc = threeFingerSheet();
    doc.hand.fingers[0].joints[1] = { ...doc.hand.fingers[0].joints[1], role: 'other' };
    const result = solveSheet(doc);
    const w = result.warnings.find((x) => x.code === 'JACOBIAN_NEAR_RANK_LOSS' && x.finger === 0);
    expect(result.fingers[0].rankBasis).toBe('full');
    expect(w?.value).toBe(0);
    expect(w?.message).toContain('full Jacobian');
  });

  it('regression: the usual design (pivot along the normal through the roller centre) is not rank-deficient once steered', () => {
    // Drive columns after steering: base (0.05, 0, 0.06) and roll rho u / |u|, rho = 0.012 (worked by hand),
    // so sigma_2 / sigma_1 is about rho / |J_b| = 0.15, far above 1e-3.
    const result = solveSheet(threeFingerSheet());
    expect(result.warnings.map((w) => w.code)).not.toContain('JACOBIAN_NEAR_RANK_LOSS');
    expect(result.fingers[0].rankRatio).toBeGreaterThan(0.1);
    expect(result.fingers[0].full.singularRatio).toBeLessThan(1e-12);
  });

  it('NORMAL_VELOCITY_UNREACHABLE: no base joint while the surface approaches the roller', () => {
    const doc = healthyHand();
    doc.hand.fingers[0].joints[0] = { ...doc.hand.fingers[0].joints[0], role: 'other' };
    expect(codes(doc, 0)).toContain('NORMAL_VELOCITY_UNREACHABLE');
  });

  it('JOINT_LIMIT_EXCEEDED: base at 0 rad with limits [0.1, 0.2] rad', () => {
    const doc = healthyHand();
    doc.hand.fingers[0].joints[0] = { ...doc.hand.fingers[0].joints[0], limits: { min: 0.1, max: 0.2 } };
    const w = solveSheet(doc).warnings.find((x) => x.code === 'JOINT_LIMIT_EXCEEDED');
    expect(w).toMatchObject({ finger: 0, joint: 0, value: 0, threshold: 0.1 });
  });

  it('RATE_LIMIT_EXCEEDED: roll rate of about |u| / rho = 1.8 rad/s against a 0.1 rad/s limit', () => {
    const doc = healthyHand();
    doc.hand.fingers[0].joints[2] = { ...doc.hand.fingers[0].joints[2], rateLimit: 0.1 };
    expect(codes(doc, 0)).toContain('RATE_LIMIT_EXCEEDED');
  });

  it('SLIP_REQUIRED on the steer-and-roll residual: the pivot cone misses the needed roll direction', () => {
    const doc = threeFingerSheet();
    const f = doc.hand.fingers[0];
    f.joints[1] = { ...f.joints[1], axis: [0, 0, 1] };
    f.joints[2] = { ...f.joints[2], axis: [0, Math.cos(0.3), Math.sin(0.3)] };
    doc.object.twist = { linear: [0.01, 0.001, 0.02], angular: [0, 0, 0] };
    const w = solveSheet(doc).warnings.find((x) => x.code === 'SLIP_REQUIRED' && x.finger === 0);
    expect(w?.message).toContain('steer-and-roll residual');
  });

  it('SLIP_REQUIRED on the full residual: without steering v_o has 5.1 mm/s off the plane of base (0.05, 0, 0.06) and roll (0, -rho, 0)', () => {
    const doc = threeFingerSheet();
    doc.hand.fingers[0].joints[1] = { ...doc.hand.fingers[0].joints[1], role: 'other' };
    const w = solveSheet(doc).warnings.find((x) => x.code === 'SLIP_REQUIRED' && x.finger === 0);
    // v_o = (0.01, 0.02, 0.02); the plane's normal is (0.06, 0, -0.05) / |.|, worked by hand.
    expect(w?.value).toBeCloseTo(Math.abs(0.01 * 0.06 - 0.02 * 0.05) / Math.hypot(0.06, 0.05), 6);
    expect(w?.message).toContain('full damped least-squares residual');
  });

  it('regression: steering removes the slip the unsteered full solution would report for the usual design', () => {
    const result = solveSheet(threeFingerSheet());
    expect(result.warnings.map((w) => w.code)).not.toContain('SLIP_REQUIRED');
    expect(result.fingers[0].full.residualNorm).toBeGreaterThan(1e-3);
  });

  it('GRASP_RANK_DEFICIENT: two contacts leave the rotation about the line through them free (Murray, Li & Sastry 1994, ch. 5)', () => {
    const doc = healthyHand();
    doc.hand.fingers = doc.hand.fingers.slice(0, 2);
    const result = solveSheet(doc);
    const w = result.warnings.find((x) => x.code === 'GRASP_RANK_DEFICIENT');
    expect(w).toMatchObject({ finger: undefined, value: 5, threshold: 6 });
  });

  it('covers every catalogue code', () => {
    const tested: WarningCode[] = [
      'CONTACT_LOST', 'CONTACT_PENETRATING', 'CONTACT_NEAR_ROLL_AXIS', 'CONTACT_NEAR_PIVOT_AXIS', 'PIVOT_MISSES_ROLLER_CENTRE',
      'TANGENTIAL_SPEED_NEAR_ZERO', 'STEER_CANNOT_ALIGN', 'JACOBIAN_NEAR_RANK_LOSS', 'NORMAL_VELOCITY_UNREACHABLE',
      'JOINT_LIMIT_EXCEEDED', 'RATE_LIMIT_EXCEEDED', 'SLIP_REQUIRED', 'GRASP_RANK_DEFICIENT',
    ];
    expect([...tested].sort()).toEqual(Object.keys(WARNING_CATALOGUE).sort());
  });
});
