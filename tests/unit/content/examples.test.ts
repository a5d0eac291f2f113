import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { collectQuoteSpecs, computeQuotes, QuoteBook, quoteKey, type ExampleLog, type QuoteSpec } from '../../../src/lib/examples/quotes';
import { SHEET_SECTION_IDS } from '../../../src/lib/examples/sections';
import { exampleSheets } from '../../../src/lib/examples/sheet-files';
import { readVariableEntries, withVariables } from '../../../src/lib/examples/variables';
import { parseSheet } from '../../../src/lib/sheet/schema';

const dir = new URL('../../../content/examples/', import.meta.url);
const files = readdirSync(dir).filter((f) => f.endsWith('.mdx')).sort();

interface Example {
  file: string;
  source: string;
  body: string;
  data: { title: string; summary: string; order: number; sections: string[]; sheets: string[]; log?: ExampleLog };
}

/** The frontmatter as the examples write it: one `key: value` per line, lists and maps in JSON (which YAML reads alike). */
function readExample(file: string): Example {
  const source = readFileSync(new URL(file, dir), 'utf8');
  const match = /^---\n([\s\S]*?)\n---\n/.exec(source);
  if (!match) throw new Error(`${file} has no frontmatter`);
  const data: Record<string, unknown> = {};
  for (const line of match[1]!.split('\n')) {
    const colon = line.indexOf(':');
    const value = line.slice(colon + 1).trim();
    data[line.slice(0, colon).trim()] = /^[[{"\d]/.test(value) ? JSON.parse(value.replace(/\[([^\]"]*)\]/, (_, list: string) => JSON.stringify(list.split(',').map((s) => s.trim())))) : value;
  }
  return { file, source, body: source.slice(match[0].length), data: data as Example['data'] };
}

const examples = files.map(readExample);

/** Prose with every computed or verbatim part taken out: markers, math, code, imports, JSX islands. */
function proseOnly(body: string): string {
  return body
    .replace(/<ExampleCalculator[\s\S]*?\/>/g, '')
    .replace(/<Num\b[^>]*\/>/g, '')
    .replace(/\$\$[\s\S]*?\$\$/g, '')
    .replace(/\$[^$\n]*\$/g, '')
    .replace(/`[^`\n]*`/g, '')
    .replace(/^import .*$/gm, '');
}

describe('worked examples (content/examples)', () => {
  it('are at least eight, ordered without gaps, each on sheets that read and solve', () => {
    expect(examples.length).toBeGreaterThanOrEqual(8);
    expect(examples.map((e) => e.data.order).sort((a, b) => a - b)).toEqual(examples.map((_, i) => i + 1));
    for (const example of examples) {
      for (const section of example.data.sections) expect(SHEET_SECTION_IDS).toContain(section);
      for (const document of exampleSheets(example.data.sheets).values()) expect(parseSheet(document).ok).toBe(true);
    }
  });

  it.each(examples.map((e) => [e.file, e] as const))('%s: every quoted number is computed by the core and finite', async (_file, example) => {
    const specs = collectQuoteSpecs(example.body);
    expect(specs.length).toBeGreaterThanOrEqual(5);
    // computeQuotes throws for a marker that no longer resolves: an unknown output, finger, variable, or a warning the sheet stopped raising.
    const quotes = await computeQuotes(example.body, exampleSheets(example.data.sheets), example.data.log);
    for (const spec of specs) {
      const quote = quotes.get(quoteKey(spec))!;
      if (typeof quote.value === 'number') expect(Number.isFinite(quote.value)).toBe(true);
      expect(quote.text).not.toMatch(/NaN|∞|—/);
    }
  });

  it.each(examples.map((e) => [e.file, e] as const))('%s: quotes no quantity as literal text, so none can drift from the sheet', (_file, example) => {
    // A number with a unit in the prose must be a <Num> marker; plain counts and ordinals ("two contacts", "step 3") may stay.
    expect(proseOnly(example.body)).not.toMatch(/\d\s*(mm|m|rad|deg|°|rpm|s|mm\/s|rad\/s)\b/);
  });

  it.each(examples.map((e) => [e.file, e] as const))('%s: every calculator changes variables its sheet defines', (_file, example) => {
    const sheet = [...exampleSheets(example.data.sheets).values()];
    for (const block of example.body.matchAll(/<ExampleCalculator[\s\S]*?\/>/g)) {
      const names = [...block[0].matchAll(/name: '(\w+)'/g)].map((m) => m[1]!);
      expect(names.length).toBeGreaterThan(0);
      const defined = new Set(sheet.flatMap((d) => [...readVariableEntries(d).keys()]));
      for (const name of names) expect(defined).toContain(name);
    }
  });
});

/** The numbers of one example's first sheet, read through the same book the page prints from. */
function bookOf(file: string, log?: ExampleLog) {
  const example = examples.find((e) => e.file === file)!;
  const book = new QuoteBook(exampleSheets(example.data.sheets), log ?? example.data.log);
  const si = (spec: QuoteSpec) => {
    const quote = book.quote({ ...spec, unit: spec.unit ?? spec.si ?? undefined, digits: '15' });
    return quote.value as number;
  };
  return { book, si };
}

describe('the numbers of the examples against hand calculations', () => {
  it('one contact: surface speed ωR and roll rate ωR/ρ (rolling without slipping; Murray, Li and Sastry 1994, ch. 5)', () => {
    const { si } = bookOf('one-contact-by-hand.mdx');
    const R = si({ of: '/object/shape/radius', si: 'm' });
    const rho = si({ of: '/hand/fingers/0/roller/radius', si: 'm' });
    const omega = si({ of: '/object/twist/angular/2', si: 'rad/s' });
    expect(si({ of: 'contact.tangentialSpeed', finger: 'left', unit: 'm/s' })).toBeNear(omega * R, { digits: 12 });
    expect(Math.abs(si({ of: 'steer.rollRate', finger: 'left', unit: 'rad/s' }))).toBeNear((omega * R) / rho, { digits: 12 });
    // Damped least squares scales a lone joint's rate by σ²/(σ² + λ²) (Wampler 1986, IEEE SMC 16(1)); σ = ρ for the roll joint here.
    const lambda = si({ of: '/solver/damping', si: 'm' });
    expect(Math.abs(si({ of: 'full.rates', finger: 'left', part: 'left-roll', unit: 'rad/s' }))).toBeNear(((omega * R) / rho) * (rho ** 2 / (rho ** 2 + lambda ** 2)), { digits: 9 });
  });
  it('roll axis: the contact sits ρ cos φ from a vertical roll axis, and after steering rolls at v/ρ (rigid-body kinematics, common practice)', () => {
    const { si } = bookOf('near-roll-axis.mdx');
    const rho = si({ of: '/hand/fingers/0/roller/radius', si: 'm' });
    for (const lift of [86, 60]) {
      const set = `contactLift = ${lift} deg`;
      expect(si({ of: 'contact.rollAxisDistance', finger: 'cradle', set, unit: 'm' })).toBeNear(rho * Math.cos((lift * Math.PI) / 180), { digits: 9 });
    }
    const v = si({ of: 'contact.tangentialSpeed', finger: 'cradle', unit: 'm/s' });
    expect(Math.abs(si({ of: 'steer.rollRate', finger: 'cradle', unit: 'rad/s' }))).toBeNear(v / rho, { digits: 9 });
    expect(Math.abs(si({ of: 'steer.pivotAngle', finger: 'cradle', unit: 'rad' }))).toBeNear(Math.PI / 2, { digits: 9 });
  });

  it('cube and ball: the normal speed is n · (ω × (x − p)), zero on the ball (rigid-body kinematics, common practice)', () => {
    const { si } = bookOf('box-and-sphere.mdx');
    const omega = si({ of: '/object/twist/angular/2', si: 'rad/s' });
    const p = [0, 1, 2].map((k) => si({ of: `/object/pose/position/${k}`, si: 'm' }));
    for (const finger of ['north', 'southwest', 'southeast']) {
      const x = ['x', 'y', 'z'].map((part) => si({ of: 'contact.objectPoint', finger, part, unit: 'm' }));
      const n = ['x', 'y', 'z'].map((part) => si({ of: 'contact.normal', finger, part }));
      // ω = (0, 0, ω): ω × r = ω (−r_y, r_x, 0).
      const expected = omega * (-(x[1]! - p[1]!) * n[0]! + (x[0]! - p[0]!) * n[1]!);
      expect(si({ of: 'contact.normalSpeed', finger, unit: 'm/s' })).toBeNear(expected, { abs: 1e-12 });
      expect(si({ of: 'contact.normalSpeed', finger, sheet: 'cell4-sphere-turn', unit: 'm/s' })).toBeNear(0, { abs: 1e-12 });
    }
  });

  it('vertical and horizontal: the grasp map singular values are √3 r and √(3/2) r for three contacts evenly around z (Murray, Li and Sastry 1994, ch. 5, grasp map)', () => {
    const { si } = bookOf('vertical-and-horizontal.mdx');
    const p = si({ of: '/object/pose/position/2', si: 'm' });
    const x = si({ of: 'contact.objectPoint', finger: 'north', part: 'y', unit: 'm' });
    const z = si({ of: 'contact.objectPoint', finger: 'north', part: 'z', unit: 'm' });
    expect(p - z).toBeGreaterThan(0);
    const r = x; // the north contact lies in the y-z plane, r = R cos β from the z axis
    expect(si({ of: 'grasp.singularValues', part: '3' })).toBeNear(Math.sqrt(3) * r, { digits: 9 });
    expect(si({ of: 'grasp.singularValues', part: '4' })).toBeNear(Math.sqrt(1.5) * r, { digits: 9 });
  });

  it('damping: the lone roll column is damped to σv/(σ² + λ²) with slip λ²v/(σ² + λ²) (Wampler 1986, IEEE SMC 16(1); Nakamura and Hanafusa 1986)', () => {
    const { si } = bookOf('damping.mdx');
    const sigma = si({ of: 'contact.rollAxisDistance', finger: 'idler', unit: 'm' });
    const v = si({ of: 'contact.tangentialSpeed', finger: 'idler', unit: 'm/s' });
    for (const lambda of [0.01, 0.1, 0.5, 0.8, 1, 2]) {
      const set = `damping = ${lambda} mm`;
      const l = lambda / 1000;
      expect(Math.abs(si({ of: 'full.rates', finger: 'idler', part: 'idler-roll', set, unit: 'rad/s' }))).toBeNear((sigma * v) / (sigma ** 2 + l ** 2), { digits: 6 });
      expect(si({ of: 'full.residual', finger: 'idler', set, unit: 'm/s' })).toBeNear((l ** 2 * v) / (sigma ** 2 + l ** 2), { digits: 6 });
    }
    // The prose's choice: 1 mm is the smallest damping of the table under the motor limit.
    const limit = si({ of: '/hand/fingers/0/joints/1/rateLimit', si: 'rad/s' });
    expect(Math.abs(si({ of: 'full.rates', finger: 'idler', part: 'idler-roll', set: 'damping = 0.8 mm', unit: 'rad/s' }))).toBeGreaterThan(limit);
    expect(Math.abs(si({ of: 'full.rates', finger: 'idler', part: 'idler-roll', set: 'damping = 1 mm', unit: 'rad/s' }))).toBeLessThan(limit);
  });

  it('roller radius: the roll rate is ω R cos β / ρ, and 12 mm is the smallest swept radius under 80 % of the limit (rolling without slipping, common practice)', () => {
    const { si } = bookOf('roller-radius.mdx');
    const omega = si({ of: '/object/twist/angular/2', si: 'rad/s' });
    const r = si({ of: 'contact.objectPoint', finger: 'north', part: 'y', unit: 'm' });
    const limit = si({ of: '/hand/fingers/0/joints/2/rateLimit', si: 'rad/s' });
    const rate = (mm: number) => Math.abs(si({ of: 'steer.rollRate', finger: 'north', set: `rollerRadius = ${mm} mm`, unit: 'rad/s' }));
    for (const mm of [6, 8, 10, 12, 14]) expect(rate(mm)).toBeNear((omega * r) / (mm / 1000), { digits: 9 });
    expect(rate(10)).toBeGreaterThan(0.8 * limit);
    expect(rate(12)).toBeLessThan(0.8 * limit);
  });

  it('noisy run: without noise the proportional loop reaches the tolerance after about ln(θ0/θtol)/k (first-order exponential decay, common practice)', () => {
    const { si } = bookOf('quarter-turn-with-noise.mdx');
    const set = 'noiseAngle = 0 deg; noisePosition = 0 mm';
    const k = si({ of: '/motion/run/gain', si: '1/s' });
    const tolerance = si({ of: '/motion/run/angleTolerance', si: 'rad' });
    const expected = Math.log(Math.PI / 2 / tolerance) / k;
    expect(si({ of: 'run.time', set, unit: 's' })).toBeNear(expected, { rel: 0.01 });
    expect(si({ of: 'run.orientationError', set, unit: 'rad' })).toBeLessThanOrEqual(tolerance);
  });

  it('controller log: a controller on 11 mm rollers is off by v(1/ρc − 1/ρ), largest at the first tick (rolling without slipping, common practice)', () => {
    const { book, si } = bookOf('controller-log.mdx');
    const R = si({ of: '/object/shape/radius', si: 'm' });
    const rho = si({ of: '/hand/fingers/0/roller/radius', si: 'm' });
    const rhoC = si({ of: '/hand/fingers/0/roller/radius', si: 'm', set: 'rollerRadius = 11 mm' });
    const k = si({ of: '/motion/run/gain', si: '1/s' });
    // First tick: the commanded turn rate is k θ0 with θ0 an eighth of a turn; the contact speed is that times R.
    const v0 = k * (Math.PI / 4) * R;
    return book.prepareLog().then(() => {
      expect(si({ of: 'log.maxResidual', part: 'left-roll', unit: 'rad/s' })).toBeNear(v0 * (1 / rhoC - 1 / rho), { digits: 6 });
    });
  });
});

describe('the examples\' variables', () => {
  it('rewrites only the named line and refuses a name the sheet does not define', () => {
    const document = { variables: 'a = 1 mm\nb = 2 mm # kept\nc = a + b' };
    expect(withVariables(document, { b: '5 mm' }).variables).toBe('a = 1 mm\nb = 5 mm\nc = a + b');
    expect(() => withVariables(document, { d: '1' })).toThrow(/no variable "d"/);
    expect([...readVariableEntries(document)]).toEqual([['a', '1 mm'], ['b', '2 mm'], ['c', 'a + b']]);
  });
});
