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
import { MAX_DOCUMENT_DEPTH, createReadingsReader, readDocument } from '../../../src/lib/sheet/readings';
import { createEditReader, parseSheet } from '../../../src/lib/sheet/schema';
import { computeSheetInSteps, createEditReaders, type ComputeReply, type DocumentReaders } from '../../../src/workers/compute-protocol';

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
function answers(protocol: Pick<Protocol, 'computeSheetInSteps'>, message: unknown, readers?: DocumentReaders): { final: ComputeReply; first: ComputeReply } {
  const { first, later } = protocol.computeSheetInSteps(message, () => 0, readers);
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
  // Fields the worker reads by their own schema when nothing else changed (createEditReader), and edits around them.
  { name: 'roller centre', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].roller.center[pick(3)] = (pick(9) - 4) / 1000; } },
  { name: 'joint point, a signed zero', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].joints[0].point[0] = pick(2) === 0 ? -0 : 0; } },
  { name: 'joint rate limit', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].joints[pick(3)].rateLimit = `${1 + pick(30)} rad/s`; } },
  { name: 'a long rate limit (past the operations limit when the others are long)', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].joints[pick(3)].rateLimit = longRate(20 + pick(300)); } },
  { name: 'object height', apply: (doc, pick) => { doc.object.pose.position[2] = `${85 + pick(10)} mm`; } },
  { name: 'object half length', apply: (doc, pick) => { doc.object.shape.halfLength = `${5 + pick(10)} mm`; } },
  { name: 'object linear speed', apply: (doc, pick) => { doc.object.twist.linear[pick(3)] = `${pick(20) - 10} mm/s`; } },
  { name: 'twist in the object frame', apply: (doc) => { doc.object.twist.frame = 'object'; } },
  { name: 'object acceleration', apply: (doc, pick) => { doc.object.acceleration = { linear: [0, 0, (pick(10) - 5) / 10], angular: [0, 0, pick(10)] }; } },
  { name: 'target position', apply: (doc, pick) => { doc.motion.target.position[pick(3)] = `${pick(20) - 10} mm`; } },
  { name: 'run step', apply: (doc, pick) => { doc.motion.run.dt = `${1 + pick(9)} ms`; } },
  { name: 'solver contact tolerance', apply: (doc, pick) => { doc.solver = { ...doc.solver, contactTolerance: `${pick(3) / 10} mm` }; } },
  { name: 'a joint angle that is not a quantity (an issue)', apply: (doc) => { doc.hand.fingers[0].joints[1].angle = true; } },
  { name: 'title', apply: (doc, pick) => { doc.title = `Housing ${pick(1000)}`; } },
  { name: 'a finger removed', apply: (doc) => { if (doc.hand.fingers.length > 1) doc.hand.fingers.pop(); } },
  // The worker keeps each finger compiled while its input stays the same (createFingerCompiler): a finger added, units and the display change none of the others.
  { name: 'a finger added', apply: (doc, pick) => { doc.hand.fingers.push({ ...structuredClone(doc.hand.fingers[0]), name: `extra-${pick(1000)}` }); } },
  { name: 'a finger written in other units', apply: (doc, pick) => { doc.hand.fingers[pick(doc.hand.fingers.length)].roller.radius = `${(10 + pick(60) / 10) / 1000} m`; } },
  { name: 'display units', apply: (doc, pick) => { doc.display = { length: ['mm', 'm'][pick(2)], angle: ['deg', 'rad'][pick(2)] }; } },
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
    // The warm worker reads as the page's worker does, with one set of edit readers; the cold one reads every document whole.
    const readEdits = createEditReaders();
    for (const [step, edit] of steps.entries()) {
      if (edit) edit.apply(doc, pick);
      else doc = clean();
      const message = { type: 'compute', id: step, document: structuredClone(doc), derive: pick(4) === 0 ? undefined : false };
      const warm = answers({ computeSheetInSteps }, message, readEdits);
      const cold = answers(await coldWorker(), structuredClone(message));
      expect(warm.final, `step ${step}: ${edit?.name ?? 'restored'}`).toStrictEqual(cold.final);
      expect(warm.first, `step ${step}: ${edit?.name ?? 'restored'}, first reply`).toStrictEqual(cold.first);
      if (warm.final.type === 'computed' && !warm.final.ok) failed += 1;
    }
    // The run went through issues and results alike.
    expect(failed).toBeGreaterThan(5);
    expect(failed).toBeLessThan(steps.length - 5);
  });

  it('keeps a finger\'s results only while its input, the object and the solver settings are the ones they came from', () => {
    const source = createRandom(20261206);
    const pick = (n: number) => Math.floor(nextUniform(source) * n);
    const start = (): Doc => {
      const doc: Doc = JSON.parse(demoText);
      // Written out, so that their fields are edited one at a time (createEditReader) and the other fingers are kept.
      doc.solver = { damping: '0.1 mm', singularRatio: 0.001, axisDistance: '1 mm', minTangentialSpeed: '0.01 mm/s', contactTolerance: '0.2 mm' };
      doc.object.acceleration = { linear: [0, 0, 0], angular: [0, 0, 0] };
      return doc;
    };
    const finger = (doc: Doc) => doc.hand.fingers[pick(doc.hand.fingers.length)];
    const edits: ((doc: Doc) => void)[] = [
      // One finger: the others are kept.
      (doc) => { finger(doc).roller.radius = `${10 + pick(60) / 10} mm`; },
      (doc) => { finger(doc).joints[pick(3)].angle = `${pick(21) - 10} deg`; },
      (doc) => { finger(doc).roller.center[pick(3)] = (pick(9) - 4) / 1000; },
      // The object and the solver settings: no finger is kept.
      (doc) => { doc.object.pose.position[pick(3)] = `${pick(20) - 10 + (pick(2) === 0 ? 0 : 90)} mm`; },
      (doc) => { doc.object.shape.radius = `${24 + pick(5)} mm`; },
      (doc) => { doc.object.twist.angular[pick(3)] = `${pick(90) - 45} deg/s`; },
      (doc) => { doc.object.twist.linear[pick(3)] = `${pick(20) - 10} mm/s`; },
      (doc) => { doc.object.acceleration.linear[pick(3)] = `${pick(10) - 5} m/s^2`; },
      (doc) => { doc.object.acceleration.angular[pick(3)] = `${pick(10) - 5} rad/s^2`; },
      (doc) => { doc.solver.damping = `${pick(5) / 10} mm`; },
      (doc) => { doc.solver.axisDistance = `${pick(30)} mm`; },
      (doc) => { doc.solver.minTangentialSpeed = `${pick(20)} mm/s`; },
      (doc) => { doc.solver.contactTolerance = `${pick(5) / 10} mm`; },
      // A finger added or removed: the others are kept.
      (doc) => { doc.hand.fingers.push({ ...structuredClone(doc.hand.fingers[pick(doc.hand.fingers.length)]), name: `extra-${pick(1000)}` }); },
      (doc) => { if (doc.hand.fingers.length > 1) doc.hand.fingers.splice(pick(doc.hand.fingers.length), 1); },
    ];
    const readEdits = createEditReaders();
    let doc = start();
    let last: ComputeReply | undefined;
    let keptFingers = 0;
    for (let step = 0; step < 300; step++) {
      if (pick(20) === 0) doc = start();
      else edits[pick(edits.length)]!(doc);
      const message = { type: 'compute', id: step, document: structuredClone(doc), derive: pick(8) === 0 ? undefined : false };
      const warm = answers({ computeSheetInSteps }, message, readEdits);
      const whole = answers({ computeSheetInSteps }, structuredClone(message));
      expect(warm.final, `step ${step}`).toStrictEqual(whole.final);
      expect(warm.first, `step ${step}, first reply`).toStrictEqual(whole.first);
      const reply = warm.final;
      if (reply.type === 'computed' && reply.ok && last?.type === 'computed' && last.ok) {
        const before = last.result.fingers;
        keptFingers += reply.result.fingers.filter((f) => before.includes(f)).length;
      }
      last = reply;
    }
    // The run kept fingers from one reply to the next.
    expect(keptFingers).toBeGreaterThan(100);
  });

  it('reads a run of one-field edits as a whole reading does, sharing what the edit left alone', () => {
    const source = createRandom(20261204);
    const pick = (n: number) => Math.floor(nextUniform(source) * n);
    // Values as typed: texts with units, plain SI numbers, a signed zero, and now and then one the field refuses.
    const length = () => [`${pick(40) - 20} mm`, (pick(40) - 20) / 1000, -0, '-3 mm * 0', 'r'][pick(5)];
    const positive = (unit: string) => [`${1 + pick(20)} ${unit}`, 1 + pick(5), `-${1 + pick(5)} ${unit}`, `${pick(3)} ${unit}`][pick(4)];
    const fields: ((doc: Doc) => void)[] = [
      (doc) => { doc.hand.fingers[pick(3)].roller.radius = positive('mm'); },
      (doc) => { doc.hand.fingers[pick(3)].roller.center[pick(3)] = length(); },
      (doc) => { doc.hand.fingers[pick(3)].joints[pick(3)].angle = [`${pick(60) - 30} deg`, (pick(10) - 5) / 10, -0, '12 mm'][pick(4)]; },
      (doc) => { doc.hand.fingers[pick(3)].joints[pick(3)].point[pick(3)] = length(); },
      (doc) => { doc.hand.fingers[pick(3)].joints[pick(3)].rateLimit = positive('rad/s'); },
      (doc) => { doc.object.shape.radius = positive('mm'); },
      (doc) => { doc.object.shape.halfLength = positive('mm'); },
      (doc) => { doc.object.pose.position[pick(3)] = length(); },
      (doc) => { doc.object.twist.linear[pick(3)] = [`${pick(20) - 10} mm/s`, -0, '1 rad/s'][pick(3)]; },
      (doc) => { doc.object.twist.angular[pick(3)] = [`${pick(90) - 45} deg/s`, -0, '1 m/s'][pick(3)]; },
      (doc) => { doc.motion.target.position[pick(3)] = length(); },
      (doc) => { doc.motion.run.gain = positive('/s'); },
      (doc) => { doc.motion.run.dt = positive('ms'); },
    ];
    const read = createEditReader();
    let doc: Doc = JSON.parse(demoText);
    let last = read(structuredClone(doc));
    let shared = 0;
    for (let step = 0; step < 300; step++) {
      fields[pick(fields.length)]!(doc);
      const next = read(structuredClone(doc));
      const whole = parseSheet(structuredClone(doc));
      expect(next, `step ${step}`).toStrictEqual(whole);
      if (next.ok && last.ok && next.doc.motion.run === last.doc.motion.run && next.doc.object === last.doc.object) shared += 1;
      if (!next.ok && pick(2) === 0) doc = JSON.parse(demoText);
      last = next;
    }
    // Most edits were read by their field alone: the parts they left alone are the last document's own.
    expect(shared).toBeGreaterThan(50);
  });

  it('reads the readings of a run of edits as readDocument reads each document whole, in the same order', () => {
    const source = createRandom(20261205);
    const pick = (n: number) => Math.floor(nextUniform(source) * n);
    const nested = (levels: number): unknown => (levels === 0 ? 'deep' : [nested(levels - 1)]);
    const edits: ((doc: Doc) => void)[] = [
      (doc) => { doc.hand.fingers[pick(doc.hand.fingers.length)].roller.radius = [`${10 + pick(60) / 10} mm`, 'r + 1 mm', '', 'radiu', 12][pick(5)]; },
      (doc) => { doc.hand.fingers[pick(doc.hand.fingers.length)].joints[pick(3)].angle = [`${pick(20) - 10} deg`, '12 mm', (pick(10) - 5) / 10][pick(3)]; },
      (doc) => { doc.object.twist.angular[2] = [`${pick(90)} deg/s`, 'spin', 'spin * 2'][pick(3)]; },
      // The variables: every text that names one reads anew.
      (doc) => { doc.variables = [`r = ${20 + pick(10)} mm\nspin = ${pick(40)} deg/s`, 'r = 3 mm', ''][pick(3)]; },
      // Free text, never read as a quantity.
      (doc) => { doc.title = `${pick(100)} mm`; },
      (doc) => { doc.tags = [`${pick(5)} mm`]; },
      // Structural changes: a finger removed or put back, a key added.
      (doc) => { if (doc.hand.fingers.length > 1) doc.hand.fingers.pop(); else doc.hand.fingers = JSON.parse(demoText).hand.fingers; },
      (doc) => { doc.hand.fingers[0].note = `${pick(9)} mm`; },
      // Nested past the readings' depth, in a quantity's place and in free text.
      (doc) => { doc.object.shape.radius = nested(MAX_DOCUMENT_DEPTH + 2); },
      (doc) => { doc.notes = nested(MAX_DOCUMENT_DEPTH * 4); },
    ];
    const read = createReadingsReader();
    let doc: Doc = JSON.parse(demoText);
    for (let step = 0; step < 400; step++) {
      // Mostly the page's kind of edit, one field at a time; now and then the sheet as it was.
      if (pick(12) === 0) doc = JSON.parse(demoText);
      else edits[pick(4) === 0 ? pick(edits.length) : pick(4)]!(doc);
      const warm = read(structuredClone(doc));
      const whole = readDocument(structuredClone(doc));
      expect(warm, `step ${step}`).toStrictEqual(whole);
      expect(Object.keys(warm.fields), `step ${step}`).toEqual(Object.keys(whole.fields));
    }
  });
});

