import { readFileSync } from 'node:fs';
import katex from 'katex';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { createFingerAcceleration, sweepSheet } from '../../../src/lib/kinematics';
import ResultsSection from '../../../src/components/sheet/ResultsSection';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { displayValue, findOutput } from '../../../src/lib/sheet/outputs';
import { resultsCsv } from '../../../src/lib/sheet/results-csv';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { threeFingerSheet } from '../kinematics/three-finger-sheet';

const exampleText = readFileSync(new URL('../../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url), 'utf8');
const example = () => JSON.parse(exampleText) as Record<string, unknown> & { object: Record<string, unknown> };

function issuesOf(input: unknown) {
  const parsed = parseSheet(input);
  return parsed.ok ? [] : parsed.issues;
}

describe('the object acceleration input', () => {
  it('reads units: 500 mm/s^2 = 0.5 m/s^2 and 90 deg/s^2 = pi/2 rad/s^2 (SI definitions, common practice), a missing part as zero', () => {
    const doc = example();
    doc.object.acceleration = { linear: ['500 mm/s^2', 0, '-1 m/s^2'], angular: [0, '90 deg/s^2', 2] };
    const parsed = parseSheet(doc);
    if (!parsed.ok) throw new Error(parsed.issues[0].message);
    expect(parsed.doc.object.acceleration?.linear).toBeNear([0.5, 0, -1], { abs: 1e-15 });
    expect(parsed.doc.object.acceleration?.angular).toBeNear([0, Math.PI / 2, 2], { abs: 1e-15 });
    doc.object.acceleration = { angular: [0, 0, 1] };
    const angularOnly = parseSheet(doc);
    expect(angularOnly.ok && angularOnly.doc.object.acceleration).toEqual({ linear: [0, 0, 0], angular: [0, 0, 1] });
  });

  it('leaves a sheet without an acceleration as it was written', () => {
    const parsed = parseSheet(example());
    expect(parsed.ok && 'acceleration' in parsed.doc.object).toBe(false);
  });

  it('refuses a wrong unit, a value out of range and an unknown field, each at its place', () => {
    const doc = example();
    doc.object.acceleration = { linear: ['2 m/s', 0, 0], angular: [0, 0, 2e6], spin: 1 };
    expect(issuesOf(doc)).toEqual([
      { path: 'object.acceleration.linear[0]', message: 'expected an acceleration, got 2 m/s' },
      { path: 'object.acceleration.angular[2]', message: 'must lie between -1000000 rad/s^2 and 1000000 rad/s^2' },
      { path: 'object.acceleration.spin', message: 'unknown field "spin"' },
    ]);
    doc.object.acceleration = { linear: [1e4 + 1, 0, 0] };
    expect(issuesOf(doc)).toEqual([{ path: 'object.acceleration.linear[0]', message: 'must lie between -10000 m/s^2 and 10000 m/s^2' }]);
  });
});

describe('the feed-forward in an evaluation', () => {
  const sheet = { ...threeFingerSheet(), object: { ...threeFingerSheet().object, acceleration: { linear: [0.2, 0, -0.1], angular: [0, 0, 3] } } };
  const evaluated = evaluateSheet(sheet, { derive: true });
  if (!evaluated.ok) throw new Error(evaluated.error.message);
  const { result, derivation } = evaluated.value;

  it('reaches every finger of the plain result, with the object point acceleration a_o + alpha x r + omega x (omega x r)', () => {
    for (const f of result.fingers) {
      const x = f.contact.objectPoint, w = result.object.angularVelocity;
      // Worked by hand for alpha and omega along z: alpha x r = 3 (-x_y, x_x, 0), omega x (omega x r) = -|w|^2 (x_x, x_y, 0) (Craig, ch. 6).
      const expected = [0.2 - 3 * x[1] - w[2] ** 2 * x[0], 3 * x[0] - w[2] ** 2 * x[1], -0.1];
      expect(f.acceleration?.objectPoint).toBeNear(expected, { abs: 1e-15, rel: 1e-12 });
      expect(f.acceleration?.jointAccelerations).toHaveLength(f.jointNames.length);
    }
  });

  it('derives the object point, J_dot q_dot, the joint accelerations and the residual of every finger, in KaTeX', () => {
    for (const [i, f] of result.fingers.entries()) {
      const entries = derivation.filter((e) => e.id.startsWith(`finger.${i}.acceleration.`));
      const steer = f.acceleration!.steer.status === 'defined' ? ['contactMotion', 'pivotRate', 'baseAccelerations', 'rollAcceleration'] : ['steer'];
      expect(entries.map((e) => e.id.split('.').pop())).toEqual(['objectPoint', 'jacobianRate', 'rollingTerm', 'jointAccelerations', 'residual', ...steer]);
      expect(entries[2].label).toContain('rolling-contact model');
      expect(entries[2].value).toEqual(f.acceleration?.rollingTerm);
      expect(entries[3].value).toEqual(f.acceleration?.jointAccelerations);
      expect(entries[3].unit).toBe('rad/s^2');
      for (const e of entries) expect(() => katex.renderToString(e.latex, { throwOnError: true }), e.id).not.toThrow();
    }
  });

  it('shows "—" for results that carry no feed-forward (sweeps and runs solve velocities only)', () => {
    const sweep = sweepSheet(threeFingerSheet(), { path: '/object/twist/angular/2', from: 0, to: 1, steps: 2 });
    const output = findOutput('acceleration.jointAccelerations');
    expect(displayValue(output, output.read(sweep.results[0], 0))).toBe('(—, —, —)');
  });
});

/** The three-finger sheet with the object a box and the first finger's cylindrical roller lying flat on its top face, axis along y: a line contact. */
function lineContactSheet() {
  const base = threeFingerSheet();
  const center: [number, number, number] = [0.01, 0, 0.03 + 0.012];
  const flat = {
    name: 'flat',
    joints: [
      { name: 'base', role: 'base' as const, axis: [1, 0, 0] as [number, number, number], point: [0.01, -0.03, 0.1] as [number, number, number], angle: 0 },
      { name: 'pivot', role: 'pivot' as const, axis: [0, 0, 1] as [number, number, number], point: center, angle: 0 },
      { name: 'roll', role: 'roll' as const, axis: [0, 1, 0] as [number, number, number], point: center, angle: 0 },
    ],
    roller: { kind: 'cylinder' as const, radius: 0.012, halfWidth: 0.006, center, axis: [0, 1, 0] as [number, number, number] },
  };
  return {
    ...base,
    object: { ...base.object, shape: { kind: 'box' as const, halfExtents: [0.05, 0.04, 0.03] as [number, number, number], filletRadius: 0.002 } },
    hand: { ...base.hand, fingers: [flat] },
  };
}

describe('the contact model of the feed-forward', () => {
  it('is the rolling contact for ball rollers on a ball, and the material points, labelled with the reason, for a line contact', () => {
    // A cylinder lying on a plane conforms along a line: its relative curvature has a zero eigenvalue (Johnson 1985,
    // "Contact Mechanics", sec. 4.1, from memory), so the contact point's motion along the line is not determined.
    const rolling = evaluateSheet(threeFingerSheet());
    if (!rolling.ok) throw new Error(rolling.error.message);
    expect(rolling.value.result.fingers.map((f) => f.acceleration?.model)).toEqual(['rolling-contact', 'rolling-contact', 'rolling-contact']);
    const line = evaluateSheet(lineContactSheet(), { derive: true });
    if (!line.ok) throw new Error(line.error.message);
    const f = line.value.result.fingers[0];
    expect(f.curvature?.wander.status).toBe('singular');
    expect(f.acceleration?.model).toBe('material-points');
    expect(f.acceleration?.rollingTerm).toEqual([0, 0, 0]);
    const entry = line.value.derivation.find((e) => e.id === 'finger.0.acceleration.rollingTerm');
    expect(entry?.label).toBe('flat: rolling term left out, material-point model (a line contact: the contact point is not determined along the line)');
    expect(() => katex.renderToString(entry!.latex, { throwOnError: true })).not.toThrow();
    const output = findOutput('acceleration.model');
    expect(displayValue(output, output.read(line.value.result, 0))).toBe('material-points');
    const html = renderToStaticMarkup(createElement(ResultsSection, { result: line.value.result, stale: false }));
    expect(html).toContain('material points, rolling term left out: a line contact, the contact point is not determined along it');
  });
});

describe('the steer-and-roll feed-forward in an evaluation', () => {
  const pegText = readFileSync(new URL('../../../content/sheets/line4-peg-tilt.json', import.meta.url), 'utf8');

  it('reports a finger where it is not defined by its reason: empty numbers in the JSON, CSV and results, the reason in words', () => {
    // The peg sheet's object point at the first contact is at rest at this instant: no remainder, so no direction to steer by.
    const evaluated = evaluateSheet(JSON.parse(pegText), { derive: true });
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const { result, derivation, doc } = evaluated.value;
    const steer = result.fingers[0].acceleration!.steer;
    expect(steer.status).toBe('at-rest');
    expect(JSON.parse(JSON.stringify(result)).fingers[0].acceleration.steer.pivotRate).toBeNull();
    const html = renderToStaticMarkup(createElement(ResultsSection, { result, stale: false }));
    expect(html).toContain('steer-and-roll feed-forward not defined: the remainder the roller supplies is below the minimum tangential speed');
    const header = resultsCsv(doc, result).split('\n')[0].split(',');
    const row = resultsCsv(doc, result).split('\n')[1].split(',');
    expect(row[header.indexOf('steer_feedforward')]).toBe('at-rest');
    expect(row[header.indexOf('steer_pivot_rate_rad_s')]).toBe('');
    expect(derivation.find((e) => e.id === 'finger.0.acceleration.steer')?.label).toContain('not defined');
  });

  it('shows the pivot rate, base and roll accelerations of a steered finger in the results and the joint table', () => {
    const sheet = { ...threeFingerSheet(), object: { ...threeFingerSheet().object, acceleration: { linear: [0.2, 0, -0.1], angular: [0, 0, 3] } } };
    const evaluated = evaluateSheet(sheet);
    if (!evaluated.ok) throw new Error(evaluated.error.message);
    const { result } = evaluated.value;
    const steer = result.fingers[0].acceleration!.steer;
    expect(steer.status).toBe('defined');
    const html = renderToStaticMarkup(createElement(ResultsSection, { result, stale: false }));
    expect(html).toContain(`data-result="0.acceleration.steer.pivotRate">${displayValue(findOutput('acceleration.steer.pivotRate'), steer.pivotRate)}</td>`);
    expect(html).toContain(`data-result="0.acceleration.steer.rollAcceleration">${displayValue(findOutput('acceleration.steer.rollAcceleration'), steer.rollAcceleration)}</td>`);
    const joints = findOutput('acceleration.steer.jointAccelerations').read(result, 0) as number[];
    expect(joints[0]).toBe(steer.baseAccelerations[0]);
    expect(joints[1]).toBeNaN();
    expect(joints[2]).toBe(steer.rollAcceleration);
  });
});

describe('the reference page content/docs/acceleration.md', () => {
  const text = readFileSync(new URL('../../../content/docs/acceleration.md', import.meta.url), 'utf8');

  it('has front matter and explains every field of a finger acceleration', () => {
    expect(text).toMatch(/^---\ntitle: .+\nsummary: .+\norder: \d+\n---\n/);
    const missing = Object.keys(createFingerAcceleration(3)).filter((key) => !text.includes(`\`acceleration.${key}\``));
    expect(missing).toEqual([]);
  });
});
