import { describe, expect, it } from 'vitest';
import { formatVariableValue, kindOfValue, parseQuantity, parseVariables } from '../../../src/lib/sheet/units';
import { parseSheet } from '../../../src/lib/sheet/schema';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';

// Conversion factors from NIST Special Publication 811 (2008), Appendix B.8/B.9: 1 in = 0.0254 m
// exactly, 1 ft = 0.3048 m exactly, 1 degree = 1.745329E-02 rad (pi/180), 1 revolution per
// minute = 1.047198E-01 rad/s (2 pi/60), 1 minute = 60 s exactly.

describe('parseVariables', () => {
  it('reads one "name = expression" per line, later lines using earlier names', () => {
    const parsed = parseVariables(['# roller geometry', 'rollerRadius = 14 mm', '', 'gap = rollerRadius / 7  # clearance', 'spin = 2*pi rad/s', 'ratio = 0.5'].join('\n'));
    expect(parsed.issues).toEqual([]);
    expect(formatVariableValue(parsed.values.get('rollerRadius')!)).toBe('0.014 m');
    expect(formatVariableValue(parsed.values.get('gap')!)).toBe('0.002 m');
    expect(formatVariableValue(parsed.values.get('spin')!)).toBe('6.28319 rad/s');
    expect(parsed.values.get('ratio')).toBe(0.5);
    expect(parsed.lines.get('gap')).toBe(4);
    expect(kindOfValue(parsed.values.get('spin')!)).toBe('angularSpeed');
    expect(kindOfValue(0.5)).toBeNull();
  });

  it('locates every problem at its line (and column where the parser knows it)', () => {
    const parsed = parseVariables(['a = 14 mm', 'width = 3 furlongz', 'c 12 mm', 'a = 2 mm', 'mm = 3', 'd = (2 mm', 'e2 = a + 3 deg', 'f ='].join('\n'));
    expect(parsed.issues.map((i) => [i.line, i.message])).toEqual([
      [2, 'unknown name "furlongz" (not a unit, function or variable)'],
      [3, 'expected "name = value", for example "rollerRadius = 14 mm"'],
      [4, '"a" is already defined on line 1'],
      [5, '"mm" is already a unit, constant or function; choose another name'],
      [6, expect.stringContaining('Parenthesis ) expected')],
      [7, 'cannot add or subtract quantities of different dimensions'],
      [8, '"f" has no value after "="'],
    ]);
    expect(parsed.issues.find((i) => i.line === 6)?.column).toBe(10);
    expect([...parsed.values.keys()]).toEqual(['a']);
  });
});

describe('parseQuantity with expressions and variables', () => {
  const { values } = parseVariables('rollerRadius = 14 mm\nspeed = 20 mm/s\nturn = 1 in');

  it.each([
    ['rollerRadius + 2 mm', 'length', 0.016],
    ['2 * rollerRadius', 'length', 0.028],
    ['turn + 1 ft', 'length', 0.0254 + 0.3048],
    ['2*pi rad/s', 'angularSpeed', 2 * Math.PI],
    ['10 rpm', 'angularSpeed', (10 * 2 * Math.PI) / 60],
    ['speed / rollerRadius * 1 rad', 'angularSpeed', 0.02 / 0.014],
    ['asin(0.5) * 1 rad', 'angle', Math.PI / 6],
    ['45 deg + (pi/4) rad', 'angle', Math.PI / 2],
    ['90 deg / 2 min', 'angularSpeed', Math.PI / 2 / 120],
  ] as const)('%s (%s)', (text, kind, expected) => {
    const result = parseQuantity(text, kind, values);
    expect(result.ok).toBe(true);
    if (result.ok) expect(result.value).toBeCloseTo(expected, 14);
  });

  it('flags a wrong dimension, naming the value the expression gave', () => {
    expect(parseQuantity('rollerRadius * 2 rad', 'length', values)).toEqual({
      ok: false,
      message: 'expected a length, got rollerRadius * 2 rad = 0.028 m rad',
    });
    expect(parseQuantity('speed', 'angularSpeed', values)).toMatchObject({ ok: false, message: expect.stringContaining('expected an angular speed') });
  });

  it('rejects unknown names, assignments and bare numbers', () => {
    expect(parseQuantity('rollerRadius + 2 mm', 'length')).toMatchObject({ ok: false, message: expect.stringContaining('unknown name "rollerRadius"') });
    expect(parseQuantity('x = 2 mm', 'length', values)).toMatchObject({ ok: false, message: expect.stringContaining('not an assignment') });
    expect(parseQuantity('2*pi', 'angle', values)).toMatchObject({ ok: false, message: expect.stringContaining('without a unit') });
  });
});

describe('parseSheet with variables and notes', () => {
  function sheetWith(variables: string, radius: string) {
    const doc = JSON.parse(JSON.stringify(createSheetFromTemplate('duo-opposed', { kind: 'sphere', radius: 0.03 })));
    doc.variables = variables;
    doc.notes = 'Radius check: $r = 14\\,\\mathrm{mm}$';
    doc.hand.fingers[0].roller.radius = radius;
    return doc;
  }

  it('uses the variables in any quantity field and keeps the text and notes', () => {
    const result = parseSheet(sheetWith('rollerRadius = 14 mm', 'rollerRadius + 2 mm'));
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.doc.hand.fingers[0].roller.radius).toBeCloseTo(0.016, 15);
    expect(result.doc.variables).toBe('rollerRadius = 14 mm');
    expect(result.doc.notes).toContain('$r = 14');
  });

  it('locates a field error at the field and a variables error at its line', () => {
    const result = parseSheet(sheetWith('rollerRadius = 14 mm\nbad = 3 +', 'rollerRadius * 1 rad'));
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.issues[0]).toMatchObject({ path: 'variables', line: 2, message: expect.stringMatching(/^line 2: /) });
    expect(result.issues[1]).toEqual({
      path: 'hand.fingers[0].roller.radius',
      message: 'expected a length, got rollerRadius * 1 rad = 0.014 m rad',
    });
  });

  it('does not let the variables of one sheet leak into the next parse', () => {
    expect(parseSheet(sheetWith('rollerRadius = 14 mm', 'rollerRadius')).ok).toBe(true);
    const next = sheetWith('', 'rollerRadius');
    delete next.variables;
    const result = parseSheet(next);
    expect(result.ok).toBe(false);
  });
});
