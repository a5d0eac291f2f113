import { readFileSync, readdirSync } from 'node:fs';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../../../src/lib/roles';
import type { Identity } from '../../../../src/lib/server/access';
import * as sheetsRoute from '../../../../src/pages/api/sheets/index';
import * as importRoute from '../../../../src/pages/api/sheets/import';
import * as revisionsRoute from '../../../../src/pages/api/sheets/[sheetId]/revisions';
import { apiContext, createTeamWithRoles } from '../../../helpers/identities';

const exampleDir = new URL('../../../../content/sheets/', import.meta.url);
const examples = readdirSync(exampleDir)
  .filter((file) => file.endsWith('.json'))
  .sort()
  .map((file) => JSON.parse(readFileSync(new URL(file, exampleDir), 'utf8')) as unknown);

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

/** Every location inside a value: the keys and indices that lead to it. */
function locations(value: unknown, at: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  out.push(at);
  if (Array.isArray(value)) value.forEach((item, index) => locations(item, [...at, index], out));
  else if (value !== null && typeof value === 'object') for (const [key, item] of Object.entries(value)) locations(item, [...at, key], out);
  return out;
}

function nested(depth: number, inner: Json): Json {
  let value = inner;
  for (let i = 0; i < depth; i++) value = i % 2 === 0 ? [value] : { a: value };
  return value;
}

const hostileValue: fc.Arbitrary<Json> = fc.oneof(
  fc.constantFrom<Json>(
    '12 mm', '30 deg', '0.5 rad/s', '-0 mm', '1e400 mm', '1e-400 mm', '0/0 mm', 'sqrt(-1) mm', 'asin(2) * 1 mm',
    'createUnit("mm", "1 m", {override: true})', 'evaluate("1 mm")', 'import({pi: 3}, {override: true})', 'f(x) = x', 'x = 1 mm',
    '[1, 2] mm', '{a: 1}', 'x.y', 'pi[1]', '"a"', 'true ? 1 mm : 2 mm', '1 mm == 1 mm', '1:3', 'rollerRadius', 'mm', '12',
    '((((((((((((((((((((((1 mm))))))))))))))))))))))', 'NaN', 'Infinity', '-Infinity', '', ' ', '\u0000', '__proto__', 'constructor',
    1e308, -1e308, Number.MAX_SAFE_INTEGER, -Number.MAX_SAFE_INTEGER, 5e-324, -1, 0, 1.5, 1_000_000_001,
    null, true, false, [], {}, [[[]]], { __proto__: null }, { constructor: 'x' },
    'x'.repeat(600), 'x'.repeat(25_000), `1 mm${' + 1 mm'.repeat(80)}`,
  ),
  fc.integer({ min: 2, max: 60 }).map((depth) => nested(depth, '1 mm')),
  fc.double(),
  fc.string({ maxLength: 40 }),
  fc.jsonValue({ maxDepth: 3 }) as fc.Arbitrary<Json>,
);

type Mutation =
  | { kind: 'replace'; pick: number; value: Json }
  | { kind: 'remove'; pick: number }
  | { kind: 'rename'; pick: number; name: string }
  | { kind: 'scale'; pick: number; factor: number };

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  { weight: 6, arbitrary: fc.record({ kind: fc.constant('replace' as const), pick: fc.nat(), value: hostileValue }) },
  { weight: 2, arbitrary: fc.record({ kind: fc.constant('remove' as const), pick: fc.nat() }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('rename' as const), pick: fc.nat(), name: fc.constantFrom('__proto__', 'constructor', 'radius', 'kind', 'x', '') }) },
  // Numbers that stay numbers keep the document valid more often and reach the solve with odd geometry.
  { weight: 4, arbitrary: fc.record({ kind: fc.constant('scale' as const), pick: fc.nat(), factor: fc.constantFrom(0, -1, 1e-12, 1e-6, 2, 1e3, 1e12, 1e300) }) },
);

/** The example with the mutations applied in turn, each at a location picked among those that exist then. */
function mutate(example: unknown, mutations: readonly Mutation[]): Json {
  let doc = structuredClone(example) as Json;
  for (const change of mutations) {
    const all = locations(doc);
    const candidates = change.kind === 'scale' ? all.filter((path) => typeof path.reduce<unknown>((node, key) => (node as Record<string, unknown>)[key as string], doc) === 'number') : all;
    if (candidates.length === 0) continue;
    const at = candidates[change.pick % candidates.length];
    if (at.length === 0) {
      if (change.kind === 'replace') doc = change.value;
      continue;
    }
    const parent = at.slice(0, -1).reduce<Json>((node, key) => (node as Record<string, Json>)[key as string], doc) as Record<string | number, Json>;
    const key = at[at.length - 1];
    if (change.kind === 'scale') {
      if (typeof parent[key] === 'number') parent[key] = (parent[key] as number) * change.factor;
    } else if (change.kind === 'replace') parent[key] = structuredClone(change.value);
    else if (Array.isArray(parent)) parent.splice(Number(key), 1);
    else if (change.kind === 'remove') delete parent[key];
    else {
      const value = parent[key];
      delete parent[key];
      Object.defineProperty(parent, change.name, { value, enumerable: true, configurable: true, writable: true });
    }
  }
  return doc;
}

const endpoint = fc.constantFrom('create', 'save', 'import', 'import-text');

let teamId: string;
let editor: Identity;
let sheetId: string;
let latest = 1;

beforeAll(async () => {
  let people: Record<Role, Identity>;
  ({ teamId, identities: people } = await createTeamWithRoles('property'));
  editor = people.editor;
  const created = await sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Property base', document: examples[0] }, identity: editor }));
  sheetId = (await created.json()).sheetId;
});

async function post(where: string, document: Json, textCut: number): Promise<Response> {
  if (where === 'create') return sheetsRoute.POST(apiContext({ method: 'POST', body: { teamId, title: 'Property', document }, identity: editor }));
  if (where === 'save') {
    return revisionsRoute.POST(apiContext({ method: 'POST', params: { sheetId }, body: { baseRevision: latest, document, message: 'property' }, identity: editor }));
  }
  const text = JSON.stringify(document, null, 2) ?? '';
  // Cut files as well as whole ones: a file can break anywhere.
  const content = where === 'import-text' ? text.slice(0, Math.max(1, text.length - (textCut % Math.max(1, text.length)))) : text;
  return importRoute.POST(apiContext({ method: 'POST', body: { teamId, fileName: 'property.json', content }, identity: editor }));
}

describe('write endpoints with documents mutated from the example sheets', () => {
  it('answer every document without a 5xx, and every 4xx with a message and a path', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.nat({ max: examples.length - 1 }),
        fc.array(mutation, { minLength: 1, maxLength: 3 }),
        endpoint,
        fc.nat(),
        async (which, mutations, where, textCut) => {
          const document = mutate(examples[which], mutations);
          const response = await post(where, document, textCut);
          const body = await response.json();
          expect(response.status, JSON.stringify(body).slice(0, 400)).toBeLessThan(500);
          if (response.status >= 400) {
            expect(body.error.message, JSON.stringify(body).slice(0, 400)).toEqual(expect.any(String));
            expect(body.error.message.length).toBeGreaterThan(0);
            expect(body.error.path, JSON.stringify(body).slice(0, 400)).toEqual(expect.any(String));
            expect(body.error.path.length).toBeGreaterThan(0);
          } else if (where === 'save') {
            latest = body.revision;
          }
        },
      ),
      { numRuns: 300, seed: 20251202, endOnFailure: true },
    );
  });
});
