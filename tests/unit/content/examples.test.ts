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
});

describe('the examples\' variables', () => {
  it('rewrites only the named line and refuses a name the sheet does not define', () => {
    const document = { variables: 'a = 1 mm\nb = 2 mm # kept\nc = a + b' };
    expect(withVariables(document, { b: '5 mm' }).variables).toBe('a = 1 mm\nb = 5 mm\nc = a + b');
    expect(() => withVariables(document, { d: '1' })).toThrow(/no variable "d"/);
    expect([...readVariableEntries(document)]).toEqual([['a', '1 mm'], ['b', '2 mm'], ['c', 'a + b']]);
  });
});
