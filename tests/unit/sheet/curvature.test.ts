import { readdirSync, readFileSync } from 'node:fs';
import katex from 'katex';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import ResultsSection from '../../../src/components/sheet/ResultsSection';
import { SINGULAR_CURVATURE_RATIO, type PlainSheetResult } from '../../../src/lib/kinematics';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { displayValue, findOutput } from '../../../src/lib/sheet/outputs';
import { resultsCsv } from '../../../src/lib/sheet/results-csv';
import { threeFingerSheet } from '../kinematics/three-finger-sheet';

const sheetsDir = new URL('../../../content/sheets/', import.meta.url);
const exampleNames = readdirSync(sheetsDir).filter((name) => name.endsWith('.json'));
const example = (name: string) => JSON.parse(readFileSync(new URL(name, sheetsDir), 'utf8'));

function evaluated(input: unknown) {
  const e = evaluateSheet(input, { derive: true });
  if (!e.ok) throw new Error(e.error.message);
  return e.value;
}

/** Every key path under a value, dot-separated, stopping at arrays and nulls. */
function keyPaths(value: unknown, prefix: string): string[] {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return [prefix];
  return Object.entries(value).flatMap(([key, item]) => keyPaths(item, `${prefix}.${key}`));
}

describe('curvature in the evaluation of every example sheet', () => {
  it.each(exampleNames)('%s: each finger has its curvature, and each curvature derivation renders and matches the result', (name) => {
    const { result, derivation } = evaluated(example(name));
    result.fingers.forEach((finger, i) => {
      const c = finger.curvature!;
      expect(c, finger.name).toBeDefined();
      const byId = new Map(derivation.map((entry) => [entry.id, entry]));
      expect(byId.get(`finger.${i}.curvature.object`)?.value).toEqual(c.object.principalCurvatures ?? []);
      expect(byId.get(`finger.${i}.curvature.roller`)?.value).toEqual(c.roller.principalCurvatures ?? []);
      expect(byId.get(`finger.${i}.curvature.relative`)?.value).toEqual(c.relative.principalCurvatures ?? []);
      if (c.wander.status === 'defined') expect(byId.get(`finger.${i}.curvature.wander.roller`)?.value).toEqual(c.wander.rollerVelocity);
    });
    for (const entry of derivation.filter((e) => e.id.includes('.curvature.'))) {
      expect(() => katex.renderToString(entry.latex, { throwOnError: true }), entry.id).not.toThrow();
    }
  });
});

describe('curvature of the example contacts, worked by hand', () => {
  it('a ball on cylindrical rollers: relative curvature 1/r + 1/rho around the roller and 1/r along it (Johnson 1985, "Contact Mechanics", sec. 4.1)', () => {
    const input = example('line4-gauge-ball-off-centre.json');
    const { doc, result } = evaluated(input);
    if (doc.object.shape.kind !== 'sphere') throw new Error('the gauge ball sheet holds a ball');
    const r = doc.object.shape.radius;
    let checked = 0;
    result.fingers.forEach((finger, i) => {
      const rho = doc.hand.fingers[i].roller.radius;
      if (finger.curvature?.roller.region !== 'side') return;
      expect(finger.curvature.relative.principalCurvatures).toBeNear([1 / r + 1 / rho, 1 / r], { rel: 1e-12 });
      checked++;
    });
    expect(checked).toBeGreaterThan(0);
  });

  it('a cylindrical roller lying on a flat face of the filleted cube is a line contact: no contact-point velocity, shown as such', () => {
    const { doc, result } = evaluated(example('line4-filleted-cube-tumble.json'));
    const line = result.fingers.findIndex((f) => f.curvature?.object.region === 'face' && f.curvature.roller.region === 'side');
    expect(line).toBeGreaterThanOrEqual(0);
    const c = result.fingers[line].curvature!;
    expect(c.relative.status).toBe('singular');
    expect(c.relative.principalCurvatures![1]).toBeLessThanOrEqual(SINGULAR_CURVATURE_RATIO * c.relative.principalCurvatures![0]);
    expect(c.wander).toMatchObject({ status: 'singular', rollerSpeed: null, objectSpeed: null });
    const speed = findOutput('curvature.wander.rollerSpeed');
    expect(displayValue(speed, speed.read(result, line))).toBe('—');
    const html = renderToStaticMarkup(createElement(ResultsSection, { result, stale: false }));
    expect(html).toContain('line contact');
    const row = resultsCsv(doc, result).split('\n')[line + 1];
    expect(row).toContain(',singular,,,');
  });

  it('a ball roller against a sharp edge of a box: no curvature there, said so, and the sheet still evaluates to finite numbers', () => {
    // A 40 mm-diagonal box turned 45 degrees about z puts a vertical edge where the first roller touches (x = 0.04 m).
    const half = 0.04 / Math.SQRT2;
    const doc = threeFingerSheet();
    doc.object.shape = { kind: 'box', halfExtents: [half, half, 0.03], filletRadius: 0 };
    doc.object.pose.orientation = { w: Math.cos(Math.PI / 8), x: 0, y: 0, z: Math.sin(Math.PI / 8) };
    const { result, derivation } = evaluated(doc);
    const c = result.fingers[0].curvature!;
    expect(c.object).toEqual({ region: 'sharp-edge', principalCurvatures: null, principalDirections: null });
    expect(c.relative.status).toBe('undefined');
    expect(c.wander.status).toBe('undefined');
    const relative = findOutput('curvature.relative');
    expect(displayValue(relative, relative.read(result, 0))).toBe('(—, —)');
    for (const entry of derivation.filter((e) => e.id.startsWith('finger.0.curvature.'))) {
      expect(() => katex.renderToString(entry.latex, { throwOnError: true }), entry.id).not.toThrow();
    }
  });

  it('reads as not computed for a result without curvature (a sweep record)', () => {
    const { result } = evaluated(example('line4-peg-tilt.json'));
    const bare: PlainSheetResult = { ...result, fingers: result.fingers.map(({ curvature: _, ...finger }) => finger) };
    const status = findOutput('curvature.wander.status');
    expect(status.read(bare, 0)).toBe('not computed');
    expect(findOutput('curvature.object').read(bare, 0)).toEqual([Number.NaN, Number.NaN]);
  });
});

describe('content/docs/curvature.md', () => {
  const text = readFileSync(new URL('../../../content/docs/curvature.md', import.meta.url), 'utf8');

  it('has YAML front matter with a title and an order', () => {
    expect(/^---\ntitle: (.+)\nsummary: (.+)\norder: (\d+)\n---\n/.test(text)).toBe(true);
  });

  it('names every field of a contact curvature, the singular ratio and the CSV columns', () => {
    const { result } = evaluated(example('line4-egg-part-seam.json'));
    const fields = keyPaths(result.fingers[0].curvature, 'curvature');
    expect(fields.length).toBeGreaterThan(10);
    expect(fields.filter((field) => !text.includes(`\`${field}\``))).toEqual([]);
    expect(text).toContain(`10^-${-Math.log10(SINGULAR_CURVATURE_RATIO)}`);
    for (const column of ['object_kappa1_1_m', 'relative_kappa2_1_m', 'wander_status', 'wander_roller_m_s', 'wander_object_m_s']) expect(text).toContain(`\`${column}\``);
  });
});
