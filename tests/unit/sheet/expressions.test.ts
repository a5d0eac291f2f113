import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { evaluateSheet } from '../../../src/lib/sheet/evaluate';
import { largestSheet } from '../../../src/lib/sheet/largest-sheet';
import {
  formatVariableValue,
  kindOfValue,
  MAX_EXPRESSION_LENGTH,
  MAX_EXPRESSION_NESTING,
  MAX_EXPRESSION_NODES,
  MAX_SHEET_OPERATIONS,
  MAX_UNIT_TERMS,
  parseQuantity,
  parseVariables,
} from '../../../src/lib/sheet/units';
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

const exampleDir = new URL('../../../content/sheets/', import.meta.url);
const examples = readdirSync(exampleDir)
  .filter((file) => file.endsWith('.json'))
  .sort()
  .map((file) => JSON.parse(readFileSync(new URL(file, exampleDir), 'utf8')) as Record<string, unknown>);

/** Everything the server derives from a document: the parsed SI document, its summary and every result, as JSON text. */
function resultsOf(document: unknown): string {
  const checked = evaluateSheet(document);
  if (!checked.ok) throw new Error(checked.error.issues.map((i) => `${i.path}: ${i.message}`).join('; '));
  return JSON.stringify({ doc: checked.value.doc, summary: checked.value.summary, result: checked.value.result });
}

/** An example sheet whose roller radius is `radius` and whose variables are `variables`. */
function exampleWith(variables: string, radius: string): Record<string, unknown> {
  const doc = structuredClone(examples[0]) as { variables?: string; hand: { fingers: { roller: { radius: unknown } }[] } };
  doc.variables = variables;
  doc.hand.fingers[0].roller.radius = radius;
  return doc as unknown as Record<string, unknown>;
}

const HOSTILE = [
  'createUnit("mm", "1 m", {override: true})',
  'createUnit("furlong", "201.168 m")',
  'createUnit({deg: {definition: "1 rad", override: true}})',
  'import({pi: 3}, {override: true})',
  'import({mm: 1}, {override: true})',
  'evaluate("createUnit(\\"mm\\", \\"1 m\\", {override: true})")',
  'evaluate("1 mm")',
  'parse("1 mm")',
  'parse("1 mm").compile().evaluate()',
  'compile("1 mm")',
  'simplify("x")',
  'config({predictable: false})',
  'config({number: "BigNumber"})',
  'config()',
  'f(x) = x',
  'g(x) = createUnit("mm", "1 m", {override: true}); 1 mm',
  'a = 1 mm',
  'pi = 3',
  '1 mm; 2 mm',
  '[1, 2] mm',
  'matrix([1, 2])',
  '{a: 1}',
  'x.y',
  'mm.value',
  'sqrt.name',
  'pi[1]',
  '(1 mm)["value"]',
  '"a"',
  '"1 mm"',
  'true ? 1 mm : 2 mm',
  '1 mm == 1 mm',
  '1:3',
  'sqrt',
  'unit("mm")',
  'Unit',
  'typed("f", {})',
  'pi()',
  'rollerRadius(2)',
  '1 mm to m',
  'null',
  'true',
  'undefined',
  '2 mm!',
  'reviver',
  'chain(1)',
];

describe('expression sandbox', () => {
  const baseline = examples.map((doc) => resultsOf(doc));
  const withVariables = exampleWith('rollerRadius = 14 mm\nspin = 2*pi rad/s', 'rollerRadius + hypot(3, 4) mm');
  const variablesBaseline = resultsOf(withVariables);

  it.each(HOSTILE)('refuses %s in a quantity field and in the variables, and every sheet reads as before', (hostile) => {
    const inField = evaluateSheet(exampleWith('rollerRadius = 14 mm', hostile));
    expect(inField.ok).toBe(false);
    if (!inField.ok) expect(inField.error.issues[0]).toMatchObject({ path: 'hand.fingers[0].roller.radius', message: expect.any(String) });
    const inVariables = evaluateSheet(exampleWith(`x = ${hostile}\nrollerRadius = 14 mm`, 'rollerRadius'));
    expect(inVariables.ok).toBe(false);
    if (!inVariables.ok) expect(inVariables.error.issues[0]).toMatchObject({ path: 'variables', line: 1 });

    expect(examples.map((doc) => resultsOf(doc))).toEqual(baseline);
    expect(resultsOf(withVariables)).toBe(variablesBaseline);
    expect(parseQuantity('12 mm', 'length')).toEqual({ ok: true, value: 0.012 });
    expect(parseQuantity('2 pi rad', 'angle')).toEqual({ ok: true, value: 2 * Math.PI });
    expect(parseQuantity('1 furlong', 'length').ok).toBe(false);
  });

  it('names what is not allowed', () => {
    const message = (text: string) => {
      const result = parseQuantity(text, 'length', new Map([['rollerRadius', 0.5]]));
      return result.ok ? '' : result.message;
    };
    expect(message('createUnit("mm", "1 m")')).toContain('the function createUnit is not allowed');
    expect(message('createUnit("mm", "1 m")')).toContain('sqrt');
    expect(message('evaluate("1 mm")')).toContain('the function evaluate is not allowed');
    expect(message('x.y')).toContain('property access');
    expect(message('pi[1]')).toContain('indexing');
    expect(message('[1, 2] mm')).toContain('lists');
    expect(message('{a: 1}')).toContain('objects');
    expect(message('"a"')).toContain('text in quotes');
    expect(message('true ? 1 mm : 2 mm')).toContain('conditions');
    expect(message('1 mm == 1 mm')).toContain('comparisons');
    expect(message('sqrt')).toContain('the function sqrt needs arguments in parentheses');
    expect(message('rollerRadius(2)')).toContain('the function rollerRadius is not allowed');
    expect(message('f(x) = x')).toContain('not an assignment');
  });

  it('still reads every function, constant and operator the sheets use', () => {
    const { values } = parseVariables('r = 14 mm\nratio = 0.5');
    const cases: [string, number][] = [
      ['sqrt(r * r) + abs(-1 mm)', 0.015],
      ['hypot(3, 4) mm', 0.005],
      ['-(-r)', 0.014],
      ['+r', 0.014],
      ['r ^ 2 / r', 0.014],
      ['(r - 4 mm) * ratio', 0.005],
      ['2 r', 0.028],
      ['sin(pi/2) * cos(0) * tan(pi/4) * 1 m', 1],
      ['(asin(1) + acos(1) + atan(1) + atan2(1, 1)) / pi * 4 m', 4],
      ['e m / e', 1],
      ['tau m / (2 pi)', 1],
    ];
    for (const [text, expected] of cases) {
      const result = parseQuantity(text, 'length', values);
      expect(result, text).toMatchObject({ ok: true });
      if (result.ok) expect(result.value, text).toBeCloseTo(expected, 14);
    }
  });

  it('refuses complex and non-finite values with a message instead of throwing', () => {
    for (const text of ['sqrt(-1) mm', 'asin(2) * 1 mm', '(-8)^0.5 mm', '0/0 mm', '1e400 mm', '1 mm / 0', 'acos(-2) * 1 mm']) {
      const result = parseQuantity(text, 'length');
      expect(result, text).toMatchObject({ ok: false, message: expect.stringContaining('not a finite') });
    }
    const parsed = evaluateSheet(exampleWith('bad = sqrt(-1) mm', '14 mm'));
    expect(parsed).toMatchObject({ ok: false, error: { issues: [{ path: 'variables', line: 1, message: expect.stringContaining('not a finite') }] } });
    const inField = evaluateSheet(exampleWith('', 'asin(2) * 1 mm'));
    expect(inField).toMatchObject({ ok: false, error: { issues: [{ path: 'hand.fingers[0].roller.radius', message: expect.stringContaining('not a finite') }] } });
  });
});

describe('expression limits', () => {
  it('refuses an expression longer than the limit, naming it', () => {
    const long = `1 mm${' + 1 mm'.repeat(MAX_EXPRESSION_LENGTH / 7)}`;
    expect(long.length).toBeGreaterThan(MAX_EXPRESSION_LENGTH);
    expect(parseQuantity(long, 'length')).toEqual({ ok: false, message: expect.stringContaining(`at most ${MAX_EXPRESSION_LENGTH} characters`) });
    expect(parseVariables(`x = ${long}`).issues).toEqual([{ line: 1, message: expect.stringContaining(`at most ${MAX_EXPRESSION_LENGTH} characters`) }]);
  });

  it('refuses deeper nesting than the limit, naming it', () => {
    const nested = (depth: number) => `${'('.repeat(depth)}1 mm${')'.repeat(depth)}`;
    expect(parseQuantity(nested(MAX_EXPRESSION_NESTING), 'length')).toEqual({ ok: true, value: 0.001 });
    expect(parseQuantity(nested(MAX_EXPRESSION_NESTING + 1), 'length')).toEqual({ ok: false, message: expect.stringContaining(`at most ${MAX_EXPRESSION_NESTING} levels`) });
    const calls = `${'abs('.repeat(MAX_EXPRESSION_NESTING + 1)}1 mm${')'.repeat(MAX_EXPRESSION_NESTING + 1)}`;
    expect(parseQuantity(calls, 'length')).toEqual({ ok: false, message: expect.stringContaining(`at most ${MAX_EXPRESSION_NESTING} levels`) });
  });

  it('refuses more operations than the limit, naming it', () => {
    const terms = (count: number) => `1${'+1'.repeat(count - 1)}`;
    // n terms are n constants and n - 1 additions; times one unit adds a multiplication and the unit.
    const fits = Math.floor((MAX_EXPRESSION_NODES - 1) / 2);
    expect(parseQuantity(`(${terms(fits - 1)}) mm`, 'length').ok).toBe(true);
    const over = `(${terms(fits + 1)}) mm`;
    expect(over.length).toBeLessThanOrEqual(MAX_EXPRESSION_LENGTH);
    expect(parseQuantity(over, 'length')).toEqual({ ok: false, message: expect.stringContaining(`at most ${MAX_EXPRESSION_NODES} operations`) });
  });

  it('refuses the definitions that double their work, long before they cost anything', () => {
    let text = 'f0(t) = t';
    for (let i = 1; i < 26; i++) text += `; f${i}(t) = f${i - 1}(t) + f${i - 1}(t)`;
    expect(parseQuantity(`${text}; f25(1) mm`, 'length').ok).toBe(false);
    expect(parseQuantity('evaluate("f0(t)=t;f1(t)=f0(t)+f0(t);f2(t)=f1(t)+f1(t);f2(1)") mm', 'length').ok).toBe(false);
  });

  it('keeps a value built from variables within the unit limit instead of doubling it on every line', () => {
    const lines = ['a0 = 1 mm'];
    for (let i = 1; i < 40; i++) lines.push(`a${i} = a${i - 1} * a${i - 1} / a${i - 1}`);
    const parsed = parseVariables(lines.join('\n'));
    const first = parsed.issues[0];
    expect(first).toMatchObject({ message: expect.stringContaining(`at most ${MAX_UNIT_TERMS} units`) });
    expect(first.line).toBeLessThan(10);
    const squares = ['b0 = 1 mm'];
    for (let i = 1; i < 40; i++) squares.push(`b${i} = b${i - 1} * b${i - 1}`);
    expect(parseVariables(squares.join('\n')).issues.length).toBeGreaterThan(0);
  });
});

describe('operations of one sheet', () => {
  it('refuses a sheet whose expressions together pass the limit, naming it, and reads the largest sheet within it', () => {
    // Each line: five constants, five units, five multiplications and four additions.
    const line = (i: number) => `v${i} = 1 mm + 1 mm + 1 mm + 1 mm + 1 mm`;
    const lines = (count: number) => Array.from({ length: count }, (_, i) => line(i)).join('\n');
    const fits = Math.floor(MAX_SHEET_OPERATIONS / 19);
    expect(evaluateSheet(exampleWith(lines(fits - 10), '14 mm')).ok).toBe(true);
    const over = evaluateSheet(exampleWith(lines(fits + 1), '14 mm'));
    expect(over.ok).toBe(false);
    if (!over.ok) expect(over.error.issues[0]).toMatchObject({ path: 'variables', line: fits + 1, message: expect.stringContaining(`at most ${MAX_SHEET_OPERATIONS} operations in one sheet`) });
    const fieldOver = evaluateSheet(exampleWith(lines(fits), '1 mm + 1 mm + 1 mm + 1 mm + 1 mm'));
    expect(fieldOver.ok).toBe(false);
    if (!fieldOver.ok) expect(fieldOver.error.issues).toContainEqual({ path: 'hand.fingers[0].roller.radius', message: expect.stringContaining(`at most ${MAX_SHEET_OPERATIONS} operations`) });

    const largest = largestSheet(JSON.parse(readFileSync('content/sheets/line4-peg-tilt.json', 'utf8')));
    expect(evaluateSheet(largest).ok).toBe(true);
  });
});
