/**
 * Benchmarks of the kinematics core, printed as medians over interleaved rounds (not a test).
 * Usage: npm run bench [-- --quick]
 * The script bundles this file with esbuild into one module before running it, as the app's build
 * bundles the kinematics core for its worker, so the figures are those of the shipped code rather
 * than of a per-file module loader; node runs it with --expose-gc so each timed batch starts on a
 * collected heap.
 * Measures one full solve of a three- and a five-finger hand (hand templates on a 30 mm sphere), the three-finger
 * one also with its joint angles changed between calls,
 * a 10,000-tick run, a 200-value sweep, and the same three-finger contact solve written the
 * general-purpose way with mathjs matrices (eigs of J J^T for singular values, inv and multiply
 * for damped least squares), with the ratio between the two routes. Beside the wall-clock medians
 * it prints the process's CPU time per call, which other work on the machine inflates less.
 */
import { closeSync, createReadStream, mkdtempSync, openSync, rmSync, writeSync } from 'node:fs';
import { availableParallelism, cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { all, create, type MathJsInstance, type Matrix as MathMatrix } from 'mathjs';
import { createSheetFromTemplate } from '../lib/sheet/templates';
import type { SheetDocument } from '../lib/sheet/types';
import {
  createLinalgWorkspace, createResult, createScene, dampedLeastSquares, matrixFromRows, matrixToRows, runSheet, singularValues, solveScene, sweepSheet,
} from '../lib/kinematics/index';
import { computeGraspQuality, DEFAULT_FRICTION } from '../lib/kinematics/index';
import { compareLog } from '../lib/logs/compare';
import { runLogHeader, runLogMapping, runLogRow } from '../lib/logs/generate';
import { parseLogMapping } from '../lib/logs/mapping';
import { readLogThreaded } from '../lib/logs/threaded-read-log';

const quick = process.argv.includes('--quick');
const REPETITIONS = quick ? 3 : 15;
const math: MathJsInstance = create(all);

interface Measurement {
  label: string;
  /** Median wall-clock time per call, ms. */
  median: number;
  min: number;
  max: number;
  /** Median CPU time (user + system) of this process per call, ms: less inflated than wall-clock time when other work shares the cores. */
  cpuMedian: number;
}

/** V8's gc(), present when node runs with --expose-gc (as npm run bench does). */
const collectGarbage = (globalThis as { gc?: () => void }).gc;

/** One line of the benchmark: `batch` calls are timed together, once per round. */
interface Benchmark {
  label: string;
  batch: number;
  call: () => void;
}

/** Milliseconds to let V8's background threads finish sweeping and freeing after a full collection. */
const SETTLE_MS = 25;

/**
 * Times every benchmark once per round for REPETITIONS rounds, after a warm-up of each, and gives
 * each line's median, min and max time per call. Interleaving the rounds spreads a slow spell of
 * the shared machine over all lines, where consecutive repetitions of one line would all fall in it.
 * Before each timed batch a full collection and a short pause keep one line's garbage (a run's
 * record) from being cleaned up during the next line.
 */
async function measureInRounds(benchmarks: readonly Benchmark[]): Promise<Measurement[]> {
  for (const { batch, call } of benchmarks) for (let i = 0; i < Math.max(1, batch >> 2); i++) call();
  const times = benchmarks.map(() => [] as number[]);
  const cpuTimes = benchmarks.map(() => [] as number[]);
  for (let r = 0; r < REPETITIONS; r++) {
    for (const [k, { batch, call }] of benchmarks.entries()) {
      collectGarbage?.();
      await new Promise((settled) => setTimeout(settled, SETTLE_MS));
      const cpuStart = process.cpuUsage();
      const start = performance.now();
      for (let i = 0; i < batch; i++) call();
      times[k]!.push((performance.now() - start) / batch);
      const cpu = process.cpuUsage(cpuStart);
      cpuTimes[k]!.push((cpu.user + cpu.system) / 1000 / batch);
    }
  }
  return benchmarks.map(({ label }, k) => {
    const sorted = times[k]!.sort((a, b) => a - b);
    const cpu = cpuTimes[k]!.sort((a, b) => a - b);
    return { label, median: sorted[sorted.length >> 1]!, min: sorted[0]!, max: sorted[sorted.length - 1]!, cpuMedian: cpu[cpu.length >> 1]! };
  });
}

function sphereSheet(templateId: string): SheetDocument {
  return createSheetFromTemplate(templateId, { kind: 'sphere', radius: 0.03 });
}

/** Rates of one finger by the textbook route in mathjs: PoE forward kinematics, contact on a sphere, DLS, eigs. */
function solveFingerWithMathjs(doc: SheetDocument, fingerIndex: number) {
  const finger = doc.hand.fingers[fingerIndex]!;
  const shape = doc.object.shape;
  if (shape.kind !== 'sphere' || finger.roller.kind !== 'sphere') throw new Error('the mathjs route covers sphere objects and ball rollers');
  const identity3 = math.identity(3) as MathMatrix;
  let rotation = identity3;
  let translation = math.matrix([0, 0, 0]);
  const axes: MathMatrix[] = [];
  const points: MathMatrix[] = [];
  for (const joint of finger.joints) {
    const w = math.matrix(joint.axis);
    const r = math.matrix(joint.point);
    axes.push(math.multiply(rotation, w));
    points.push(math.add(math.multiply(rotation, r), translation) as MathMatrix);
    const [wx, wy, wz] = joint.axis;
    const k = math.matrix([
      [0, -wz, wy],
      [wz, 0, -wx],
      [-wy, wx, 0],
    ]);
    // Rodrigues: R = I + sin(t) K + (1 - cos(t)) K^2; a rotation about the line through r moves the origin by (I - R) r.
    const jointRotation = math.add(
      math.add(identity3, math.multiply(Math.sin(joint.angle), k)),
      math.multiply(1 - Math.cos(joint.angle), math.multiply(k, k)),
    ) as MathMatrix;
    const jointTranslation = math.multiply(math.subtract(identity3, jointRotation), r) as MathMatrix;
    translation = math.add(math.multiply(rotation, jointTranslation), translation) as MathMatrix;
    rotation = math.multiply(rotation, jointRotation);
  }
  const center = math.add(math.multiply(rotation, math.matrix(finger.roller.center)), translation) as MathMatrix;
  const objectCenter = math.matrix(doc.object.pose.position);
  const offset = math.subtract(center, objectCenter) as MathMatrix;
  const normal = math.divide(offset, math.norm(offset)) as MathMatrix;
  const x = math.add(objectCenter, math.multiply(shape.radius, normal)) as MathMatrix;
  const y = math.subtract(center, math.multiply(finger.roller.radius, normal)) as MathMatrix;
  const velocity = math.add(
    math.matrix(doc.object.twist.linear),
    math.cross(math.matrix(doc.object.twist.angular), math.subtract(x, objectCenter) as MathMatrix),
  ) as MathMatrix;
  const columns = axes.map((w, i) => (math.cross(w, math.subtract(y, points[i]!) as MathMatrix) as MathMatrix).toArray() as number[]);
  const jacobian = math.transpose(math.matrix(columns));
  const gram = math.multiply(jacobian, math.transpose(jacobian));
  const damped = math.add(gram, math.multiply(doc.solver.damping ** 2, identity3)) as MathMatrix;
  const rates = math.multiply(math.transpose(jacobian), math.multiply(math.inv(damped), velocity)) as MathMatrix;
  const residual = math.norm(math.subtract(velocity, math.multiply(jacobian, rates)) as MathMatrix) as number;
  const eigenvalues = (math.eigs(gram).values as MathMatrix).toArray() as number[];
  const singular = eigenvalues.map((v) => Math.sqrt(Math.max(0, v))).sort((a, b) => b - a);
  const condition = singular[0]! / singular[singular.length - 1]!;
  const manipulability = Math.sqrt(Math.max(0, math.det(gram)));
  return { rates: rates.toArray() as number[], residual, singular, condition, manipulability };
}

function format(ms: number): string {
  if (ms < 1e-3) return `${(ms * 1e6).toFixed(0)} ns`;
  if (ms < 1) return `${(ms * 1e3).toFixed(2)} us`;
  return `${ms.toFixed(1)} ms`;
}

function line(m: Measurement, note = ''): string {
  return `${m.label.padEnd(44)} ${format(m.median).padStart(10)}   (min ${format(m.min)}, max ${format(m.max)}; CPU ${format(m.cpuMedian)})${note ? `   ${note}` : ''}`;
}

function against(m: Measurement, targetMs: number): string {
  const ratio = m.median / targetMs;
  return `target < ${format(targetMs)}: ${ratio <= 1 ? 'met' : 'missed'}, ${ratio.toFixed(2)} x target`;
}

const three = sphereSheet('tri-radial');
const five = sphereSheet('penta-fan');
const threeScene = createScene(three);
const threeResult = createResult(threeScene);
const fiveScene = createScene(five);
const fiveResult = createResult(fiveScene);

// Check that both routes compute the same rates before timing them.
solveScene(threeScene, threeResult);
let largestDifference = 0;
for (let i = 0; i < three.hand.fingers.length; i++) {
  const reference = solveFingerWithMathjs(three, i);
  reference.rates.forEach((rate, k) => {
    largestDifference = Math.max(largestDifference, Math.abs(rate - threeResult.fingers[i]!.full.rates[k]!));
  });
}

// The same three-finger solve with every joint angle nudged between calls, as in a run: forward kinematics keeps its
// results only while the angles stay the same, so this line times the solve with it and the line above without it.
const movingScene = createScene(three);
const movingResult = createResult(movingScene);
let nudge = 1e-9;
function solveWithMovingJoints(): void {
  nudge = -nudge;
  for (const finger of movingScene.fingers) for (let k = 0; k < finger.jointCount; k++) finger.angles[k] += nudge;
  solveScene(movingScene, movingResult);
}

const runSettings = { ...three.motion.run, maxTicks: 10_000, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false };
const sweepSettings = { path: '/object/twist/angular/2', from: 0, to: 0.5, steps: 200 };


// The first finger's contact Jacobian (3 x 3 here) and a 3 x 5 one with two more columns from the second finger.
const jacobian3 = threeResult.fingers[0]!.full.jacobian;
const rows3 = matrixToRows(jacobian3);
const extra = threeResult.fingers[1]!.full.jacobian;
const jacobian5 = matrixFromRows(rows3.map((row, i) => [...row, extra.data[i * extra.cols]!, extra.data[i * extra.cols + 1]!]));
const workspace = createLinalgWorkspace(6, 40);
const rates5 = new Float64Array(5);
const singular5 = new Float64Array(3);
const velocity = threeResult.fingers[0]!.contact.objectVelocity;
const [solveThree, solveThreeMoving, solveFive, run, sweep, linalg, mathjsThree] = (await measureInRounds([
  { label: 'full solve, three fingers (tri-radial)', batch: quick ? 2_000 : 20_000, call: () => solveScene(threeScene, threeResult) },
  { label: 'full solve, three fingers, joints moving', batch: quick ? 2_000 : 20_000, call: solveWithMovingJoints },
  { label: 'full solve, five fingers (penta-fan)', batch: quick ? 2_000 : 20_000, call: () => solveScene(fiveScene, fiveResult) },
  { label: '10,000-tick run, three fingers', batch: quick ? 1 : 3, call: () => runSheet(three, { settings: runSettings }) },
  { label: '200-value sweep, three fingers', batch: quick ? 1 : 3, call: () => sweepSheet(three, sweepSettings) },
  {
    label: 'DLS + Jacobi singular values, 3 x 5',
    batch: quick ? 20_000 : 200_000,
    call: () => {
      dampedLeastSquares(jacobian5, velocity, three.solver.damping, rates5, workspace);
      singularValues(jacobian5, singular5, workspace);
    },
  },
  {
    label: 'mathjs contact solve, three fingers',
    batch: quick ? 20 : 200,
    call: () => {
      for (let i = 0; i < three.hand.fingers.length; i++) solveFingerWithMathjs(three, i);
    },
  },
])) as [Measurement, Measurement, Measurement, Measurement, Measurement, Measurement, Measurement];

const speedup = mathjsThree.median / solveThree.median;
const lines = [
  `Kinematics benchmarks (median of ${REPETITIONS} interleaved rounds; Node ${process.version}; ${cpus()[0]?.model ?? 'unknown CPU'}, ` +
    `${availableParallelism()} cores, load average ${loadavg()[0]!.toFixed(1)})`,
  ...(loadavg()[0]! > availableParallelism() / 2 ? ['Other work is running on this machine; the figures are inflated by it.'] : []),
  line(solveThree, against(solveThree, 2e-3)),
  line(solveThreeMoving),
  line(solveFive),
  line(run, against(run, 30)),
  line(sweep),
  line(linalg, against(linalg, 1e-3)),
  line(mathjsThree, `ours is ${speedup.toFixed(0)} x faster (target >= 100 x: ${speedup >= 100 ? 'met' : 'missed'})`),
  `Largest joint-rate difference between the two routes: ${largestDifference.toExponential(2)} rad/s`,
  'The full solve also computes steer-and-roll rates, warnings and the grasp map, which the mathjs route leaves out.',
];
console.log(lines.join('\n'));

// Grasp quality is computed once per evaluation (not per tick), so it is timed on its own: the
// Ferrari-Canny qualities (Q_L1 and Q_Linf) of the three contacts with 8 cone edges each, as each evaluation computes them,
// for point contacts with friction and for soft fingers (3 mm torsional friction), whose Q_Linf takes far more face combinations.
// The first takes the force-cone route of three point contacts: on a heavily loaded 2-core machine about 0.6 to 0.7 ms of CPU
// time median per call, against 1.2 ms for the face search timed beside it; the second (soft fingers) keeps the face search, about 15 to 17 ms.
// Each batch starts on a collected heap, as an evaluation in the app follows other work: the route keeps no class instance or
// closure of one call alive into the next, since V8 drops optimised code tied to them at a collection and the first calls after
// it would run unoptimised (2.5 to 2.7 ms CPU median per call here before, 1.3 to 1.7 ms after, at load average 24).
const graspQualityInput = {
  origin: threeResult.object.position,
  points: threeResult.fingers.flatMap((f) => Array.from(f.contact.objectPoint)),
  normals: threeResult.fingers.flatMap((f) => Array.from(f.contact.normal)),
  friction: three.hand.fingers.map(() => DEFAULT_FRICTION),
  contactCount: three.hand.fingers.length,
  coneEdges: 8,
  torsionalFriction: 0,
};
const softGraspQualityInput = { ...graspQualityInput, torsionalFriction: 0.003 };
const [graspQuality, softGraspQuality] = (await measureInRounds([
  { label: 'grasp quality, three fingers, 8 edges', batch: quick ? 10 : 100, call: () => computeGraspQuality(graspQualityInput) },
  { label: 'grasp quality, three soft fingers, 8 edges', batch: quick ? 1 : 5, call: () => computeGraspQuality(softGraspQualityInput) },
])) as [Measurement, Measurement];
console.log(line(graspQuality, against(graspQuality, 1)));
console.log(line(softGraspQuality));

// A controller log of 100,000 samples of the three-finger hand (its own run, 9 joints with angle, commanded and
// measured rate), written to a file and compared end to end from a file stream: parse, re-solve, statistics.
const LOG_SAMPLES = 100_000;
const logRun = runSheet(three, { settings: { ...three.motion.run, maxTicks: LOG_SAMPLES, positionTolerance: -1, angleTolerance: -1, stopOnSingular: false } });
const logDirectory = mkdtempSync(join(tmpdir(), 'slipless-bench-'));
const logFile = join(logDirectory, 'log.csv');
const descriptor = openSync(logFile, 'w');
writeSync(descriptor, `${runLogHeader(three).join(',')}\n`);
for (let tick = 0; tick < logRun.tickCount; tick += 1000) {
  const lines: string[] = [];
  for (let k = tick; k < Math.min(logRun.tickCount, tick + 1000); k++) lines.push(runLogRow(logRun, k).join(','));
  writeSync(descriptor, `${lines.join('\n')}\n`);
}
closeSync(descriptor);
const logMapping = parseLogMapping(runLogMapping(three, { rate: '0.05 rad/s', slip: '1 mm/s' }));
if (!logMapping.ok) throw new Error('the generated log mapping does not read');
// Read on one thread, as the server, the command line and the browser's worker read it, and with parsing on a second
// thread beside the re-solving (readLogThreaded); the CPU time is the whole process's, both threads together. On a
// machine whose cores are taken by other work the second thread gains nothing and its hand-offs wait, so it is
// measured here rather than used by default.
const compareOnce = async (threads: 1 | 2) => {
  const stream = createReadStream(logFile);
  stream.setEncoding('utf8');
  const compared = await compareLog(three, logMapping.mapping, stream, threads === 2 ? { read: readLogThreaded } : {});
  if (!compared.ok || compared.value.samples !== logRun.tickCount) throw new Error('the generated log did not compare');
};
await compareOnce(2);
await compareOnce(1);
const logRuns = { 1: { times: [] as number[], cpu: [] as number[] }, 2: { times: [] as number[], cpu: [] as number[] } };
for (let r = 0; r < (quick ? 3 : 9); r++) {
  for (const threads of r % 2 === 0 ? ([2, 1] as const) : ([1, 2] as const)) {
    collectGarbage?.();
    await new Promise((settled) => setTimeout(settled, SETTLE_MS));
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    await compareOnce(threads);
    logRuns[threads].times.push(performance.now() - start);
    const cpu = process.cpuUsage(cpuStart);
    logRuns[threads].cpu.push((cpu.user + cpu.system) / 1000);
  }
}
rmSync(logDirectory, { recursive: true, force: true });
const logMeasurement = (threads: 1 | 2, label: string): Measurement => {
  const times = logRuns[threads].times.sort((a, b) => a - b);
  const cpu = logRuns[threads].cpu.sort((a, b) => a - b);
  return { label, median: times[times.length >> 1]!, min: times[0]!, max: times[times.length - 1]!, cpuMedian: cpu[cpu.length >> 1]! };
};
const logCompare = logMeasurement(1, 'log comparison, 100,000 samples, 3 fingers');
const logCompareTwoThreads = logMeasurement(2, '  the same, parsing on a second thread');
// maxRSS is the whole process's peak (every line above included), so it bounds the comparison's own peak from above.
const peakMegabytes = process.resourceUsage().maxRSS / 1024;
console.log(line(logCompare, against(logCompare, 1000)));
console.log(line(logCompareTwoThreads, against(logCompareTwoThreads, 1000)));
console.log(`Peak resident memory of this process: ${peakMegabytes.toFixed(0)} MB (target < 300 MB: ${peakMegabytes < 300 ? 'met' : 'missed'})`);
