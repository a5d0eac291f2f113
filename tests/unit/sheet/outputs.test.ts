import { readFileSync } from 'node:fs';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { format as referenceFormat } from 'mathjs';
import { describe, expect, it } from 'vitest';
import ResultsSection from '../../../src/components/sheet/ResultsSection';
import { compareOutputs } from '../../../src/lib/server/compare';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { displayValue, findOutput, formatShownNumber, listOutputs, OUTPUTS } from '../../../src/lib/sheet/outputs';
import { FINGER_COLUMNS, fingerRows, rateColumns, resultsCsv } from '../../../src/lib/sheet/results-csv';

const evaluated = evaluateSheet(JSON.parse(readFileSync(new URL('../../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url), 'utf8')));
if (!evaluated.ok) throw new Error(evaluated.error.message);
const { doc, result } = evaluated.value;
const first = result.fingers[0];

describe('the output catalogue', () => {
  it('declares every output once, each with an SI unit, a display unit, a frame and a scope', () => {
    expect(new Set(OUTPUTS.map((o) => o.id)).size).toBe(OUTPUTS.length);
    for (const o of OUTPUTS) {
      expect(['finger', 'joint', 'grasp']).toContain(o.scope);
      expect(['palm', null]).toContain(o.frame);
      expect(typeof o.unit).toBe('string');
      expect(typeof o.display.unit).toBe('string');
      if (o.parts === 'xyz') expect(o.frame, o.id).not.toBeNull();
    }
    expect(() => findOutput('nothing')).toThrow(/no output "nothing"/);
  });

  it('converts to display units: m to mm, rad to degrees, unitless as they are', () => {
    expect(displayValue(findOutput('contact.gap'), 0.0012346)).toBe('1.235');
    expect(displayValue(findOutput('steer.pivotAngle'), Math.PI / 2)).toBe('90');
    expect(displayValue(findOutput('contact.normal'), [0, -0.00001, 1])).toBe('(0, -1e-5, 1)');
    expect(displayValue(findOutput('contact.state'), 'touching')).toBe('touching');
    expect(displayValue(findOutput('full.rates'), [Number.NaN, Infinity, -Infinity])).toBe('(—, ∞, −∞)');
  });
});

describe('formatShownNumber', () => {
  it('writes exponent form from 1e6 up and below 1e-4, plain digits between, with the significant digits asked for', () => {
    expect(formatShownNumber(-8226000)).toBe('-8.226e6');
    expect(formatShownNumber(0.000001432)).toBe('1.432e-6');
    expect(formatShownNumber(123456)).toBe('123500');
    expect(formatShownNumber(0.0001)).toBe('0.0001');
    expect(formatShownNumber(-0)).toBe('0');
    // Reference: mathjs format with the same bounds (auto notation: exponential when the exponent is below lowerExp or from upperExp up),
    // written without the exponent's plus sign.
    for (const x of [-8226000, 0.000001432, 999999.7, 1e6, 2.5e21, -3e-7, 0.000099999, 0.00015, 99999.97, -12345.6, 1.23456, 0]) {
      for (const digits of [3, 4, 6]) {
        expect(formatShownNumber(x, digits), `${x} to ${digits} digits`).toBe(referenceFormat(x, { precision: digits, lowerExp: -4, upperExp: 6 }).replace('e+', 'e'));
      }
    }
  });
});

describe('the surfaces that read the catalogue', () => {
  it('writes the CSV columns: the finger, its outputs in SI, its warnings, then one rate column per joint and one base-rate column per base joint', () => {
    expect(FINGER_COLUMNS).toEqual([
      'finger', 'contact_state', 'gap_m', 'normal_speed_m_s', 'tangential_speed_m_s', 'commanded_solution', 'pivot_target_angle_rad', 'pivot_change_rad',
      'pivot_rate_rad_s', 'residual_m_s', 'sigma1_m_rad', 'sigma2_m_rad',
      'sigma3_m_rad', 'condition_number', 'manipulability', 'steer_pivot_angle_rad', 'steer_roll_rate_rad_s',
      'steer_residual_m_s', 'steer_feedforward', 'steer_pivot_rate_rad_s', 'steer_roll_acceleration_rad_s2', 'object_kappa1_1_m', 'object_kappa2_1_m', 'roller_kappa1_1_m', 'roller_kappa2_1_m', 'relative_kappa1_1_m',
      'relative_kappa2_1_m', 'wander_status', 'wander_roller_m_s', 'wander_object_m_s', 'warnings',
    ]);
    expect(rateColumns(3)).toEqual([
      'commanded_rate1_rad_s', 'commanded_rate2_rad_s', 'commanded_rate3_rad_s', 'full_rate1_rad_s', 'full_rate2_rad_s', 'full_rate3_rad_s', 'steer_base_rate1_rad_s', 'steer_base_rate2_rad_s', 'steer_base_rate3_rad_s',
      'steer_base_acceleration1_rad_s2', 'steer_base_acceleration2_rad_s2', 'steer_base_acceleration3_rad_s2',
    ]);
    const codes = result.warnings.filter((w) => w.finger === 0).map((w) => w.code).join(' ');
    const commanded = result.commanded!.fingers[0]!;
    expect(fingerRows(result, 4, ['x'])[0]).toEqual([
      'x', first.name, first.contact.state, first.contact.gap, first.contact.normalSpeed, first.contact.tangentialSpeed,
      commanded.solution, commanded.pivot!.targetAngle, commanded.pivot!.change, commanded.pivot!.rate, first.full.residualNorm,
      ...first.full.singularValues, first.full.conditionNumber, first.full.manipulability, first.steer.pivotAngle,
      first.steer.rollRate, first.steer.residualNorm, first.acceleration!.steer.status, first.acceleration!.steer.pivotRate,
      first.acceleration!.steer.rollAcceleration, ...first.curvature!.object.principalCurvatures!, ...first.curvature!.roller.principalCurvatures!,
      ...first.curvature!.relative.principalCurvatures!, first.curvature!.wander.status, first.curvature!.wander.rollerSpeed,
      first.curvature!.wander.objectSpeed, codes, ...Array.from({ length: 4 }, (_, k) => commanded.joints[k]?.rate ?? ''),
      ...Array.from({ length: 4 }, (_, k) => first.full.rates[k] ?? ''),
      ...Array.from({ length: 4 }, (_, k) => first.steer.baseRates[k] ?? ''),
      ...Array.from({ length: 4 }, (_, k) => first.acceleration!.steer.baseAccelerations[k] ?? ''),
    ]);
    expect(resultsCsv(doc, result).split('\n')).toHaveLength(result.fingers.length + 1);
  });

  it('lists a finger for the report and the comparison with the same quantities and SI units as before', () => {
    const rows = listOutputs(result).filter((row) => row.group === first.name);
    const xyz = (name: string) => ['x', 'y', 'z'].map((c) => `${name} · ${c}`);
    expect(rows.map((row) => row.quantity)).toEqual([
      'contact state', 'gap', ...xyz('contact point (palm frame)'), ...xyz('contact normal (palm frame)'), 'normal speed', 'tangential speed',
      'commanded solution', ...first.jointNames.map((joint) => `commanded joint rate · ${joint}`), 'steered pivot: target angle',
      'steered pivot: change from the current angle', 'steered pivot: rate of that change over one time step',
      ...first.jointNames.map((joint) => `joint rate (full) · ${joint}`), 'slip residual (full)', 'singular value · σ1', 'singular value · σ2',
      'singular value · σ3', 'condition number', 'manipulability',
      ...first.steer.baseJoints.map((k) => `base rate (steer-and-roll, minimum norm) · ${first.jointNames[k]}`), 'pivot angle (steer-and-roll)',
      'roll rate (steer-and-roll)', 'slip residual (steer-and-roll)', ...xyz('object acceleration at the contact (palm frame)'), 'feed-forward contact model',
      'acceleration residual (full)',
      ...first.jointNames.map((joint) => `joint acceleration (full) · ${joint}`),
      'steer-and-roll feed-forward', 'pivot rate (steer-and-roll)', 'roll acceleration (steer-and-roll)',
      ...first.steer.baseJoints.map((k) => `base acceleration (steer-and-roll, minimum norm) · ${first.jointNames[k]}`),
      'object principal curvature · κ1', 'object principal curvature · κ2',
      'roller principal curvature · κ1', 'roller principal curvature · κ2', 'relative curvature · κ1', 'relative curvature · κ2',
      'contact-point motion', 'contact-point speed over the roller', 'contact-point speed over the object',
    ]);
    expect(rows.find((row) => row.quantity === 'gap')).toEqual({ group: first.name, quantity: 'gap', unit: 'm', value: first.contact.gap });
    expect(rows.find((row) => row.quantity === 'singular value · σ2')?.unit).toBe('m/rad');
    expect(listOutputs(result).filter((row) => row.group === 'grasp')).toEqual([
      { group: 'grasp', quantity: 'grasp map rank', unit: '', value: result.grasp.rank },
      { group: 'grasp', quantity: 'undrivable object directions', unit: '', value: result.grasp.undrivableCount },
      { group: 'grasp', quantity: 'force closure (with friction)', unit: '', value: result.graspQuality!.forceClosure ? 'yes' : 'no' },
      { group: 'grasp', quantity: 'grasp quality Q_L1 (Ferrari-Canny, sum of normal forces)', unit: '', value: result.graspQuality!.sumQuality },
      {
        group: 'grasp', quantity: 'grasp quality Q_Linf (Ferrari-Canny, largest normal force)', unit: '',
        value: result.graspQuality!.maxQuality ?? 'not computed: too many contact wrench combinations',
      },
      { group: 'grasp', quantity: 'weakest external wrench', unit: '', value: result.graspQuality!.weakestWords },
    ]);
    expect(compareOutputs(result, result).map((row) => [row.group, row.quantity, row.unit])).toEqual(
      listOutputs(result).map((row) => [row.group, row.quantity, row.unit]),
    );
  });

  it('labels the editor results table as before, with display units', () => {
    const html = renderToStaticMarkup(createElement(ResultsSection, { result, stale: false }));
    const labels = [...html.matchAll(/<th scope="row"[^>]*>([^<]*)<\/th>/g)].map((m) => m[1]);
    const perContact = (defined: boolean, steered: boolean) => [
      'contact point x (palm frame)', 'normal n (palm frame)', 'gap', 'normal velocity', 'tangential velocity (palm frame)', 'tangential speed',
      'commanded rates follow', ...(steered ? ['pivot target angle', 'pivot change', 'pivot rate over the time step'] : []), 'steer: base rate', 'steer: pivot angle',
      'steer: roll rate', 'steer − full, |Δ rates|', 'condition before / after steering', 'full: slip residual',
      'contact model', 'object acceleration a(x) (palm frame)', 'of which centripetal (palm frame)', 'J̇ q̇ (palm frame)', 'rolling term (palm frame)',
      'acceleration residual', 'steer: feed-forward',
      ...(defined ? ['steer: pivot rate', 'steer: base acceleration', 'steer: roll acceleration'] : []), 'object', 'roller', 'relative',
    ];
    expect(labels).toEqual([...result.fingers.flatMap((f, i) => perContact(f.acceleration!.steer.status === 'defined', result.commanded!.fingers[i]!.pivot !== undefined)), 'contacts', 'rank of the contact map', 'undrivable directions',
      'force closure', 'quality Q_L1', 'quality Q_Linf', 'weakest direction',
    ]);
    expect(html).toContain('<th class="py-1 text-right font-normal">angle</th><th class="py-1 text-right font-normal">commanded</th><th class="py-1 text-right font-normal">full</th>');
    expect(html).toContain(`data-result="0.commanded.rates.1">${displayValue(findOutput('commanded.rates'), result.commanded!.fingers[0]!.joints[1]!.rate)}</td>`);
    expect(html).toContain('data-testid="commanded-solution" data-solution="steer-and-roll"');
    expect(html).toContain(`data-result="0.contact.gap">${displayValue(findOutput('contact.gap'), first.contact.gap)}</td><td class="result-unit">mm</td>`);
    expect(html).toContain(`data-result="0.full.rates.0">${displayValue(findOutput('full.rates'), first.full.rates[0])}</td>`);
    expect(html).toContain('data-result="grasp.rank">');
  });
});
