/**
 * The compute worker recomputes a sheet on every edit with everything it keeps between evaluations: the generated
 * sheet reader (z.compile), the expression and conversion caches, the variables and readings caches and the grasp
 * quality cache. Through a seeded run of edits, the kind an editor sends (new values, mistakes and their fixes,
 * variables, fingers removed and restored, a sheet whose expressions run out of operations), each of its answers must
 * equal the answer of a cold worker: modules loaded afresh, every cache empty, zod's own reader in place of the
 * generated one.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it, vi } from 'vitest';
import { createRandom, nextUniform } from '../../../src/lib/kinematics/random';
import { computeSheetInSteps, type ComputeReply } from '../../../src/workers/compute-protocol';

type Doc = Record<string, any>;
type Protocol = typeof import('../../../src/workers/compute-protocol');

const demoText = readFileSync(new URL('../../../content/sheets/line4-bearing-housing-quarter-turn.json', import.meta.url), 'utf8');

/** A fresh load of the worker's modules: nothing cached, and sheetSchema read by zod's own reader. */
async function coldWorker(): Promise<Protocol> {
  vi.resetModules();
  vi.doMock('../../../src/lib/validation/zod', async (importOriginal) => {
    const actual = await importOriginal<typeof import('../../../src/lib/validation/zod')>();
    return { ...actual, z: { ...actual.z, compile: <T>(schema: T) => schema } };
  });
  return import('../../../src/workers/compute-protocol');
}

/** The reply the page ends with (the second one when the grasp quality came later), and the first without the grasp quality. */
function answers(protocol: Pick<Protocol, 'computeSheetInSteps'>, message: unknown): { final: ComputeReply; first: ComputeReply } {
  const { first, later } = protocol.computeSheetInSteps(message, () => 0);
  const final = later ? later() : first;
  if (first.type !== 'computed' || !first.ok) return { final, first };
  const { graspQuality: _quality, ...result } = first.result;
  const { graspQualityPending: _pending, ...rest } = first;
  return { final, first: { ...rest, result: result as typeof first.result } };
}

/** A sum of `terms` ones as an angular speed, about 2 * terms operations: nine of 90 terms come near the sheet's limit of 2000. */
const longRate = (terms: number) => `(${Array.from({ length: terms }, () => '1').join('+')}) * 0.1 rad/s`;

interface Edit {
  name: string;
  apply: (doc: Doc, pick: (n: number) => number) => void;
}

const EDITS: Edit[] = [
  { name: 'roller radius', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].roller.radius = `${10 + pick(60) / 10} mm`; } },
  { name: 'joint angle (contacts move)', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].joints[pick(3)].angle = `${pick(21) - 10} deg`; } },
  { name: 'object angular speed', apply: (doc, pick) => { doc.object.twist.angular[2] = `${pick(90) - 45} deg/s`; } },
  { name: 'a length in an angle field (an issue)', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].joints[0].angle = '12 mm'; } },
  { name: 'a negative radius (an issue)', apply: (doc) => { doc.hand.fingers[0].roller.radius = '-3 mm'; } },
  { name: 'an unknown name (an issue)', apply: (doc) => { doc.object.shape.radius = 'radiu + 1 mm'; } },
  { name: 'a duplicate finger name (an issue)', apply: (doc) => { doc.hand.fingers[doc.hand.fingers.length - 1].name = doc.hand.fingers[0].name; } },
  { name: 'variables used by a field', apply: (doc, pick) => { doc.variables = `r = ${20 + pick(10)} mm\nspin = ${pick(40)} deg/s`; doc.object.shape.radius = 'r + 1 mm'; doc.object.twist.angular[2] = 'spin'; } },
  { name: 'a variables line that does not read (an issue)', apply: (doc) => { doc.variables = `${doc.variables ?? ''}\nbad = 2 +`; } },
  { name: 'title', apply: (doc, pick) => { doc.title = `Housing ${pick(1000)}`; } },
  { name: 'a finger removed', apply: (doc) => { if (doc.hand.fingers.length > 1) doc.hand.fingers.pop(); } },
  { name: 'twist about a finger contact', apply: (doc) => { doc.object.twist.about = { contact: doc.hand.fingers[0].name }; } },
  { name: 'rate limits near the operations limit', apply: (doc) => { for (const finger of doc.hand.fingers) for (const joint of finger.joints) joint.rateLimit = longRate(90); } },
  {
    name: 'past the operations limit (an issue)',
    apply: (doc) => { for (const finger of doc.hand.fingers) for (const joint of finger.joints) { joint.rateLimit = longRate(90); joint.angle = `${longRate(90)} * 0 s`; } },
  },
];

describe('the compute worker recomputing after edits', () => {
  it('answers each edit of a seeded run as a cold worker answers it, through issues and their fixes', { timeout: 600_000 }, async () => {
    const source = createRandom(20261203);
    const pick = (n: number) => Math.floor(nextUniform(source) * n);
    const clean = (): Doc => JSON.parse(demoText);
    let doc = clean();
    // Every kind of edit twice, in a seeded order; after one edit in three the sheet is put back as it was, so that every issue is also fixed again.
    const order = [...EDITS, ...EDITS].map((edit) => ({ edit, key: nextUniform(source) })).sort((a, b) => a.key - b.key).map(({ edit }) => edit);
    const steps = order.flatMap((edit) => (pick(3) === 0 ? [edit, undefined] : [edit]));
    let failed = 0;
    for (const [step, edit] of steps.entries()) {
      if (edit) edit.apply(doc, pick);
      else doc = clean();
      const message = { type: 'compute', id: step, document: structuredClone(doc), derive: pick(4) === 0 ? undefined : false };
      const warm = answers({ computeSheetInSteps }, message);
      const cold = answers(await coldWorker(), structuredClone(message));
      expect(warm.final, `step ${step}: ${edit?.name ?? 'restored'}`).toStrictEqual(cold.final);
      expect(warm.first, `step ${step}: ${edit?.name ?? 'restored'}, first reply`).toStrictEqual(cold.first);
      if (warm.final.type === 'computed' && !warm.final.ok) failed += 1;
    }
    // The run went through issues and results alike.
    expect(failed).toBeGreaterThan(5);
    expect(failed).toBeLessThan(steps.length - 5);
  });
});
