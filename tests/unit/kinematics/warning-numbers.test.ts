import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { solveSheet, WARNING_CATALOGUE, type SheetResult, type WarningCode } from '../../../src/lib/kinematics';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';
import type { ObjectShape, SheetDocument } from '../../../src/lib/sheet/types';

// Tri-radial fingers on a ball: base (index 0), pivot (index 1, along the inward normal through the roller centre), roll (index 2).
const ball: ObjectShape = { kind: 'sphere', radius: 0.03 };
const sheet = () => createSheetFromTemplate('tri-radial', ball);
const unit = (v: number[]) => {
  const length = Math.hypot(...v);
  return [v[0] / length, v[1] / length, v[2] / length] as [number, number, number];
};
/** A pivot tilted 50 degrees toward the roll axis sweeps the roll direction over a cone that misses the needed direction. */
function pivotCone(): SheetDocument {
  const doc = sheet();
  const [, pivot, roll] = doc.hand.fingers[0].joints;
  const tilt = (50 * Math.PI) / 180;
  pivot.axis = unit(pivot.axis.map((c, i) => Math.cos(tilt) * c + Math.sin(tilt) * roll.axis[i]));
  doc.object.twist = { linear: [0, 0, 0], angular: [0.4, 0, 0] };
  return doc;
}

/**
 * Slip tolerance as the warnings reference states it: the larger of the minimum tangential speed and 0.1 % of the
 * contact speed |v_o(x)|, with v_o(x) = v + w x (x - p) (rigid-body velocity field, common practice).
 */
function slipToleranceAt(doc: SheetDocument, result: SheetResult, finger: number): number {
  const x = result.fingers[finger].contact.objectPoint, p = doc.object.pose.position;
  const { linear: v, angular: w } = doc.object.twist;
  const r = [x[0] - p[0], x[1] - p[1], x[2] - p[2]];
  const vo = [v[0] + w[1] * r[2] - w[2] * r[1], v[1] + w[2] * r[0] - w[0] * r[2], v[2] + w[0] * r[1] - w[1] * r[0]];
  return Math.max(doc.solver.minTangentialSpeed, 1e-3 * Math.hypot(vo[0], vo[1], vo[2]));
}

type Side = 'below' | 'above' | 'outside';
interface Case {
  doc: () => SheetDocument;
  /** Which way the value crosses its threshold. */
  side: Side;
  /** The limit from the sheet's own inputs, as content/docs/warnings.md states it. */
  threshold: (doc: SheetDocument, result: SheetResult) => number;
}

/** One constructed sheet per code; the threshold each must carry, from the inputs, not from the solver. */
const cases: Record<WarningCode, Case> = {
  CONTACT_NEAR_ROLL_AXIS: {
    doc: () => {
      const doc = sheet();
      doc.hand.fingers[0].joints[2].axis = doc.hand.fingers[0].joints[1].axis;
      return doc;
    },
    side: 'below', threshold: (doc) => doc.solver.axisDistance,
  },
  CONTACT_NEAR_PIVOT_AXIS: { doc: sheet, side: 'below', threshold: (doc) => doc.solver.axisDistance },
  TANGENTIAL_SPEED_NEAR_ZERO: {
    doc: () => {
      const doc = sheet();
      doc.object.twist = { linear: [0, 0, 0], angular: [0, 0, 0] };
      return doc;
    },
    side: 'below', threshold: (doc) => doc.solver.minTangentialSpeed,
  },
  JACOBIAN_NEAR_RANK_LOSS: {
    doc: () => {
      const doc = sheet();
      doc.hand.fingers[0].joints[2].axis = doc.hand.fingers[0].joints[1].axis;
      return doc;
    },
    side: 'below', threshold: (doc) => doc.solver.singularRatio,
  },
  NORMAL_VELOCITY_UNREACHABLE: {
    doc: () => {
      const doc = sheet();
      const finger = doc.hand.fingers[0];
      finger.joints[0].axis = finger.joints[1].axis;
      const inward = finger.joints[1].axis;
      doc.object.twist = { linear: [0.01 * inward[0], 0.01 * inward[1], 0.01 * inward[2]], angular: [0, 0, 0] };
      return doc;
    },
    side: 'below', threshold: (doc) => doc.solver.axisDistance,
  },
  JOINT_LIMIT_EXCEEDED: {
    doc: () => {
      const doc = sheet();
      const pivot = doc.hand.fingers[0].joints[1];
      pivot.angle = (pivot.limits?.max ?? 0) + 0.2;
      return doc;
    },
    side: 'outside', threshold: (doc) => doc.hand.fingers[0].joints[1].limits?.max ?? Number.NaN,
  },
  RATE_LIMIT_EXCEEDED: {
    doc: () => {
      const doc = sheet();
      doc.hand.fingers[0].joints[2].rateLimit = 0.01;
      return doc;
    },
    side: 'above', threshold: () => 0.01,
  },
  CONTACT_LOST: {
    doc: () => {
      const doc = sheet();
      doc.object.pose.position = [0, -0.002, doc.object.pose.position[2]];
      return doc;
    },
    side: 'above', threshold: (doc) => doc.solver.contactTolerance,
  },
  CONTACT_PENETRATING: {
    doc: () => {
      const doc = sheet();
      doc.object.pose.position = [0, 0.002, doc.object.pose.position[2]];
      return doc;
    },
    side: 'below', threshold: (doc) => -doc.solver.contactTolerance,
  },
  // Two opposed contacts leave the rotation about the line through them free (Murray, Li & Sastry 1994, ch. 5).
  GRASP_RANK_DEFICIENT: { doc: () => createSheetFromTemplate('duo-opposed', ball), side: 'below', threshold: () => 6 },
  PIVOT_MISSES_ROLLER_CENTRE: {
    doc: () => {
      const doc = sheet();
      const pivot = doc.hand.fingers[0].joints[1];
      pivot.point = [pivot.point[0] + 0.004, pivot.point[1], pivot.point[2]];
      return doc;
    },
    side: 'above', threshold: (doc) => doc.solver.axisDistance,
  },
  STEER_CANNOT_ALIGN: { doc: pivotCone, side: 'above', threshold: (doc, result) => slipToleranceAt(doc, result, 0) },
  SLIP_REQUIRED: { doc: pivotCone, side: 'above', threshold: (doc, result) => slipToleranceAt(doc, result, 0) },
};

describe('every raised warning carries the numbers that explain it', () => {
  it('has a constructed sheet for every catalogue code', () => {
    expect(Object.keys(cases).sort()).toEqual(Object.keys(WARNING_CATALOGUE).sort());
  });

  it.each(Object.keys(cases) as WarningCode[])('%s: finite value and threshold, not both 0, the threshold its stated limit, crossed', (code) => {
    const { doc: build, side, threshold } = cases[code];
    const doc = build();
    const result = solveSheet(doc);
    const warning = result.warnings.find((w) => w.code === code);
    expect(warning, code).toBeDefined();
    const { value, threshold: limit } = warning!;
    expect(Number.isFinite(value)).toBe(true);
    expect(Number.isFinite(limit)).toBe(true);
    expect(value === 0 && limit === 0).toBe(false);
    expect(limit).toBeCloseTo(threshold(doc, result), 15);
    if (side === 'below') expect(value).toBeLessThan(limit);
    else if (side === 'above') expect(value).toBeGreaterThan(limit);
    else expect(value).not.toBe(limit);
  });
});

describe('the catalogue and the reference say what value and threshold are, code by code', () => {
  const reference = readFileSync(new URL('../../../content/docs/warnings.md', import.meta.url), 'utf8');
  it.each(Object.keys(WARNING_CATALOGUE) as WarningCode[])('%s', (code) => {
    const info = WARNING_CATALOGUE[code];
    expect(info.valueMeaning.length).toBeGreaterThan(10);
    expect(info.thresholdMeaning.length).toBeGreaterThan(0);
    const section = reference.split(`\n## ${code}\n`)[1]?.split('\n## ')[0] ?? '';
    expect(section).toContain(`Value: ${info.valueMeaning}`);
    expect(section).toContain(`Threshold: ${info.thresholdMeaning}`);
  });
});
