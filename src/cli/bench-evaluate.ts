/**
 * What one evaluation of a sheet costs, by stage (not a test): the server evaluates every saved
 * document and the compute worker every edit, so both want it well under a millisecond.
 * Usage: npm run bench:evaluate [-- --quick] [-- --sheet path.json]
 * Bundled by esbuild first, as the app's build bundles the worker, and run with --expose-gc so that
 * each round starts on a collected heap. Prints medians over rounds of CPU time per call (user +
 * system of this process, less inflated by other work on a shared machine than wall time) and wall time:
 * - evaluateSheet on a new document object each call (what the server does on save), its texts
 *   the same every call, and again with every quantity text new every call, to the same values (no cached reading of a text helps);
 * - the same pipeline stage by stage (the editor's readings, parse, solve, curvature, acceleration, grasp quality, plain result, commanded rates);
 * - the worker's recompute (computeSheet, no derivation, as the page asks while the derivation is closed)
 *   after a one-field edit: a roller radius, the object's angular speed, a base joint's angle (the contacts move);
 * - the worker's first reply after the same edits (computeSheetInSteps: a grasp quality not cached follows in a second reply);
 * - the first reply to each of the page benchmark's edits (the same field and values, npm run bench:page -- only=edits) in a
 *   worker thread of its own, started for them: as in the page, the worker's code is still being optimised over those
 *   edits, so this is nearer the page's figure than a warmed-up loop (wall time as the worker measures it, median per thread).
 */
import { readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { Worker, isMainThread, parentPort } from 'node:worker_threads';
import { sheetCurvature, solveAccelerations, solveSheet, toPlainResult } from '../lib/kinematics/index';
import { commandedRates } from '../lib/sheet/commanded';
import { evaluateSheet } from '../lib/sheet/evaluate';
import { sheetGraspQuality } from '../lib/sheet/grasp-quality-cache';
import { readDocument } from '../lib/sheet/readings';
import { parseSheet, prepareSheetReader } from '../lib/sheet/schema';
import { computeSheet, computeSheetInSteps, createEditReaders } from '../workers/compute-protocol';

const quick = process.argv.includes('--quick');
const sheetArgument = process.argv.indexOf('--sheet');
const SHEET = sheetArgument > 0 ? process.argv[sheetArgument + 1]! : 'content/sheets/line4-bearing-housing-quarter-turn.json';
const ROUNDS = quick ? 5 : 21;
const BATCH = quick ? 20 : 50;

const collectGarbage = (globalThis as { gc?: () => void }).gc;
const text = readFileSync(SHEET, 'utf8');
const fresh = (): Record<string, any> => JSON.parse(text);

/** The page benchmark's edits: the field it types into and the values it types in turn. */
/** Reads as the compute worker does: each document an edit of the one before. */
const readEdits = createEditReaders();

const PAGE_EDITS = 11;
const PAGE_EDIT_VALUES = ['13.5 mm', '13 mm', '12.5 mm', '12 mm'];
const FRESH_WORKERS = quick ? 5 : 9;

/** In a worker thread started for it: the worker's time to its first reply to each page edit, as the page marks it, ms. */
function pageEditsInAFreshWorker(): number[] {
  prepareSheetReader();
  const times: number[] = [];
  for (let k = 0; k < PAGE_EDITS; k++) {
    const doc = fresh();
    doc.hand.fingers[2].roller.radius = PAGE_EDIT_VALUES[k % PAGE_EDIT_VALUES.length];
    const { first, later } = computeSheetInSteps({ type: 'compute', id: k + 1, document: doc, derive: false }, undefined, readEdits);
    if (first.type !== 'computed' || !first.ok) throw new Error('the edited sheet did not compute');
    times.push(first.elapsedMs);
    later?.();
  }
  return times;
}

if (!isMainThread) {
  parentPort!.postMessage(pageEditsInAFreshWorker());
  process.exit(0);
}

/** The document with every quantity text written anew, to the same value: no reading of a text is reused, every number stays the same to the bit. */
let serial = 0;
function withNewTexts(): unknown {
  serial += 1;
  // "26 mm" -> "26 mm * (17 / 17)": x * 1 and n / n are exact in binary floating point.
  return JSON.parse(text.replace(/"(-?\d+(?:\.\d+)?) (mm|deg|deg\/s|rad\/s|ms|\/s)"/g, (_, n: string, unit: string) => `"${n} ${unit} * (${serial} / ${serial})"`));
}

/** One edit the page sends: the field set to the k-th of a series of values, each new (typing rarely comes back to a value). */
interface Edit {
  label: string;
  apply: (doc: Record<string, any>, k: number) => void;
}
const EDITS: Edit[] = [
  { label: 'roller radius', apply: (doc, k) => { doc.hand.fingers[2].roller.radius = `${12 + k * 1e-4} mm`; } },
  { label: 'object angular speed', apply: (doc, k) => { doc.object.twist.angular[2] = `${30 + k * 1e-3} deg/s`; } },
  { label: 'base joint angle (contacts move)', apply: (doc, k) => { doc.hand.fingers[0].joints[0].angle = `${k * 1e-4} deg`; } },
];

interface Line {
  label: string;
  /** Documents for one batch, made before the batch is timed (the page's postMessage makes them outside the worker's time too). */
  prepare: (count: number) => unknown[];
  call: (doc: unknown) => void;
}

/** CPU time of this process so far, ms (microsecond resolution). */
function cpuNow(): number {
  const { user, system } = process.cpuUsage();
  return (user + system) / 1000;
}

/** Stage CPU times of one pipeline call, ms, added into `into`. */
const STAGES = ['readings', 'parse', 'solve', 'curvature', 'acceleration', 'grasp quality', 'plain result', 'commanded rates'] as const;
function stagedEvaluation(input: unknown, into: number[]): void {
  let at = cpuNow();
  const mark = (i: number) => { const now = cpuNow(); into[i] += now - at; at = now; };
  readDocument(input);
  mark(0);
  const parsed = parseSheet(input);
  if (!parsed.ok) throw new Error(`the sheet does not read: ${parsed.issues[0]?.path}: ${parsed.issues[0]?.message}`);
  const doc = parsed.doc;
  mark(1);
  const solved = solveSheet(doc);
  mark(2);
  const curvatures = sheetCurvature(doc, solved);
  mark(3);
  solveAccelerations(solved, doc.object.acceleration, doc.solver, curvatures, doc.hand.fingers);
  mark(4);
  solved.graspQuality = sheetGraspQuality(doc, solved);
  mark(5);
  const result = toPlainResult(solved);
  curvatures.forEach((curvature, i) => { result.fingers[i].curvature = curvature; });
  mark(6);
  result.commanded = commandedRates(doc, result);
  mark(7);
}

let editCounter = 0;
const lines: Line[] = [
  { label: 'evaluateSheet, new object, same texts', prepare: (n) => Array.from({ length: n }, fresh), call: (doc) => { evaluateSheet(doc); } },
  { label: 'evaluateSheet, every text new, same values', prepare: (n) => Array.from({ length: n }, withNewTexts), call: (doc) => { evaluateSheet(doc); } },
  ...EDITS.map((edit): Line => ({
    label: `worker recompute after an edit: ${edit.label}`,
    prepare: (n) => Array.from({ length: n }, () => { const doc = fresh(); edit.apply(doc, editCounter++); return { type: 'compute', id: editCounter, document: doc, derive: false }; }),
    call: (message) => {
      const reply = computeSheet(message, undefined, readEdits);
      if (reply.type !== 'computed' || !reply.ok) throw new Error('the edited sheet did not compute');
    },
  })),
  ...EDITS.map((edit): Line => ({
    label: `worker first reply after an edit: ${edit.label}`,
    prepare: (n) => Array.from({ length: n }, () => { const doc = fresh(); edit.apply(doc, editCounter++); return { type: 'compute', id: editCounter, document: doc, derive: false }; }),
    call: (message) => {
      const { first } = computeSheetInSteps(message, undefined, readEdits);
      if (first.type !== 'computed' || !first.ok) throw new Error('the edited sheet did not compute');
    },
  })),
];

const stageTimes: number[][] = [];
const wall = lines.map(() => [] as number[]);
const cpu = lines.map(() => [] as number[]);
for (const line of lines) for (const doc of line.prepare(BATCH)) line.call(doc);
for (let round = 0; round < ROUNDS; round++) {
  for (const [k, line] of lines.entries()) {
    const docs = line.prepare(BATCH);
    collectGarbage?.();
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    for (const doc of docs) line.call(doc);
    wall[k]!.push((performance.now() - start) / BATCH);
    const used = process.cpuUsage(cpuStart);
    cpu[k]!.push((used.user + used.system) / 1000 / BATCH);
  }
  const docs = Array.from({ length: BATCH }, fresh);
  const sums = STAGES.map(() => 0);
  collectGarbage?.();
  for (const doc of docs) stagedEvaluation(doc, sums);
  stageTimes.push(sums.map((sum) => sum / BATCH));
}

const freshWorkerTimes: number[][] = [];
for (let k = 0; k < FRESH_WORKERS; k++) {
  freshWorkerTimes.push(await new Promise<number[]>((resolve, reject) => {
    const worker = new Worker(new URL(import.meta.url));
    worker.once('message', resolve);
    worker.once('error', reject);
  }));
}

const median = (values: readonly number[]) => [...values].sort((a, b) => a - b)[values.length >> 1]!;
const ms = (value: number) => `${value.toFixed(3)} ms`;
console.log(`sheet ${SHEET}, ${ROUNDS} rounds of ${BATCH} calls, load average ${loadavg().map((l) => l.toFixed(2)).join(' ')}`);
for (const [k, line] of lines.entries()) {
  console.log(`${line.label.padEnd(58)} CPU ${ms(median(cpu[k]!)).padStart(10)}   wall ${ms(median(wall[k]!)).padStart(10)} (min ${ms(Math.min(...wall[k]!))})`);
}
const perEdit = Array.from({ length: PAGE_EDITS }, (_, k) => median(freshWorkerTimes.map((times) => times[k]!)).toFixed(2));
console.log(`${`the page's ${PAGE_EDITS} edits, each in a fresh worker thread (${FRESH_WORKERS})`.padEnd(58)} wall ${ms(median(freshWorkerTimes.map(median))).padStart(10)} (median per thread; by edit: ${perEdit.join(' ')} ms)`);
console.log('stages of one evaluation, new object, same texts (CPU median):');
for (const [i, stage] of STAGES.entries()) console.log(`  ${stage.padEnd(20)} ${ms(median(stageTimes.map((times) => times[i]!))).padStart(10)}`);
