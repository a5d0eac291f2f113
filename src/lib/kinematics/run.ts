/**
 * A closed-loop run from the sheet's object pose toward motion.target: each tick the controller
 * measures the pose (optionally with seeded Gaussian noise), commands the twist gain * pose error
 * (rotation part by the log map), solves the fingers' joint rates for that twist, and the truth
 * advances: joint angles by rate * dt, the object pose by the exponential map of the commanded
 * twist. Under the sheet's commanded solution "steer-and-roll" (the default) a finger with base,
 * pivot and roll joints follows its steer-and-roll solution (the pivot jumps to the steered angle,
 * base and roll integrate their rates); under "full", and for any other finger, it follows the full
 * damped least-squares rates. Everything recorded lives in typed-array columns, one entry (or one row) per tick.
 */
import type { RunSettings, SheetDocument } from '../sheet/types';
import { keepLatest, mapPacked } from './hidden-classes';
import { ROTATION_METRICS, rotationDistances } from './metrics';
import { fromSheet, multiply } from './quat';
import { createRandom, nextGaussian, type RandomSource } from './random';
import { createResult, createScene, solveScene, type Scene, type SheetResult } from './scene';
import { expMap, integratePose, poseError } from './so3';
import { SEVERITY_LEVELS, WARNING_CATALOGUE, WARNING_CODES, severityRank, warningBit, type WarningCode } from './warnings';

export type RunStopReason = 'converged' | 'tick-limit' | 'singular';

/** Index i of SOLUTION_KINDS is the value stored in RunRecord.solution. */
export const SOLUTION_KINDS: readonly ('full' | 'steer-and-roll')[] = ['full', 'steer-and-roll'];
const FULL = 0;
const STEER_AND_ROLL = 1;

const METRIC_COUNT = ROTATION_METRICS.length;
const RATE_LIMIT_BIT = warningBit('RATE_LIMIT_EXCEEDED');
const RATE_LIMIT_RANK = severityRank(WARNING_CATALOGUE.RATE_LIMIT_EXCEEDED.severity);
/** Columns start this long (or at the tick limit) and double beyond it. */
const INITIAL_CAPACITY = 16_384;

/** Per-tick history of a run; every column has tickCount entries (or rows of the stated width). */
export interface RunRecord {
  tickCount: number;
  stopReason: RunStopReason;
  settings: RunSettings;
  fingerNames: string[];
  jointCounts: number[];
  /** Time at the start of the tick, s. */
  time: Float64Array;
  /** True object origin, m (3 per tick), and orientation [x, y, z, w] (4 per tick), world frame. */
  position: Float64Array;
  orientation: Float64Array;
  /** Pose the controller measured: truth plus noise, or without noise the truth columns themselves (the same arrays, not copies). */
  measuredPosition: Float64Array;
  measuredOrientation: Float64Array;
  /** Commanded object twist [v (m/s); w (rad/s)], world frame, 6 per tick. */
  twist: Float64Array;
  /**
   * Per finger: joint angles (rad) at the start of the tick and the joint rates the finger followed
   * (rad/s), jointCount per tick; under steer-and-roll the pivot's entry is pivotChange / dt.
   */
  jointAngles: Float64Array[];
  jointRates: Float64Array[];
  /** Index into SOLUTION_KINDS of the solution each finger followed, fingerCount per tick. */
  solution: Uint8Array;
  /** Per finger the translational slip speed the followed solution leaves at its contact (its residual norm), m/s, fingerCount per tick. */
  slipResidual: Float64Array;
  /** |target - position| of the truth, m. */
  positionError: Float64Array;
  /** Orientation error of the truth by Huynh's Phi2..Phi6, ROTATION_METRICS order, 5 per tick. */
  orientationError: Float64Array;
  /** Bit mask over WARNING_CODES of the warnings raised that tick. */
  warningMask: Uint32Array;
  /** Index into SEVERITY_LEVELS of the worst warning that tick. */
  worstSeverity: Uint8Array;
}

export interface RunOptions {
  /** Settings to use instead of doc.motion.run. */
  settings?: RunSettings;
  /** Called after every progressEvery ticks (default 500) with the ticks done and the tick limit. */
  onProgress?: (ticksDone: number, maxTicks: number) => void;
  progressEvery?: number;
}

interface Columns {
  capacity: number;
  time: Float64Array;
  position: Float64Array;
  orientation: Float64Array;
  measuredPosition: Float64Array;
  measuredOrientation: Float64Array;
  twist: Float64Array;
  jointAngles: Float64Array[];
  jointRates: Float64Array[];
  solution: Uint8Array;
  slipResidual: Float64Array;
  positionError: Float64Array;
  orientationError: Float64Array;
  warningMask: Uint32Array;
  worstSeverity: Uint8Array;
}

/** Columns for capacity ticks; without noise the measured pose shares the truth's columns, because fresh memory is slow to touch. */
function createColumns(capacity: number, jointCounts: readonly number[], noisy: boolean): Columns {
  const position = new Float64Array(3 * capacity);
  const orientation = new Float64Array(4 * capacity);
  return {
    capacity,
    time: new Float64Array(capacity),
    position,
    orientation,
    measuredPosition: noisy ? new Float64Array(3 * capacity) : position,
    measuredOrientation: noisy ? new Float64Array(4 * capacity) : orientation,
    twist: new Float64Array(6 * capacity),
    jointAngles: mapPacked(jointCounts, (n) => new Float64Array(n * capacity)),
    jointRates: mapPacked(jointCounts, (n) => new Float64Array(n * capacity)),
    solution: new Uint8Array(jointCounts.length * capacity),
    slipResidual: new Float64Array(jointCounts.length * capacity),
    positionError: new Float64Array(capacity),
    orientationError: new Float64Array(METRIC_COUNT * capacity),
    warningMask: new Uint32Array(capacity),
    worstSeverity: new Uint8Array(capacity),
  };
}

function grown<T extends Float64Array | Uint32Array | Uint8Array>(column: T, length: number): T {
  const next = new (column.constructor as new (n: number) => T)(length);
  next.set(column);
  return next;
}

/** Doubles every column (up to the tick limit), keeping what was recorded. */
function growColumns(c: Columns, limit: number): void {
  const capacity = Math.min(limit, 2 * c.capacity);
  const noisy = c.measuredPosition !== c.position;
  c.time = grown(c.time, capacity);
  c.position = grown(c.position, 3 * capacity);
  c.orientation = grown(c.orientation, 4 * capacity);
  c.measuredPosition = noisy ? grown(c.measuredPosition, 3 * capacity) : c.position;
  c.measuredOrientation = noisy ? grown(c.measuredOrientation, 4 * capacity) : c.orientation;
  c.twist = grown(c.twist, 6 * capacity);
  c.jointAngles = mapPacked(c.jointAngles, (column) => grown(column, (column.length / c.capacity) * capacity));
  c.jointRates = mapPacked(c.jointRates, (column) => grown(column, (column.length / c.capacity) * capacity));
  c.solution = grown(c.solution, (c.solution.length / c.capacity) * capacity);
  c.slipResidual = grown(c.slipResidual, (c.slipResidual.length / c.capacity) * capacity);
  c.positionError = grown(c.positionError, capacity);
  c.orientationError = grown(c.orientationError, METRIC_COUNT * capacity);
  c.warningMask = grown(c.warningMask, capacity);
  c.worstSeverity = grown(c.worstSeverity, capacity);
  c.capacity = capacity;
}

/** target[offset..] = source; a plain loop, because TypedArray.set costs more than the copy for a few entries. */
function copyInto(source: Float64Array, target: Float64Array, offset: number): void {
  for (let i = 0; i < source.length; i++) target[offset + i] = source[i]!;
}

/** Runs the sheet's closed loop toward motion.target and records every tick (world frame, SI). */
export function runSheet(doc: SheetDocument, options: RunOptions = {}): RunRecord {
  return runScene(createScene(doc), options.settings ?? doc.motion.run, options);
}

/** Everything one run's ticks read and write, made once per run so that the per-tick functions below stay small and hot. */
interface RunLoop {
  scene: Scene;
  result: SheetResult;
  columns: Columns;
  settings: RunSettings;
  random: RandomSource | null;
  jointCounts: number[];
  /** A document without the choice commands steer-and-roll, as runs did before it existed. */
  steerChosen: boolean;
  geodesicIndex: number;
  targetPosition: Float64Array;
  targetOrientation: Float64Array;
  /** The truth: object origin (m) and orientation [x, y, z, w], world frame. */
  position: Float64Array;
  orientation: Float64Array;
  measuredPosition: Float64Array;
  measuredOrientation: Float64Array;
  error: Float64Array;
  linear: Float64Array;
  angular: Float64Array;
  noiseRotation: Float64Array;
  noiseQuat: Float64Array;
  distances: Float64Array;
}

/**
 * Runs from the scene's current object pose and joint angles toward its document's target; the scene ends in the final state.
 * The loop only calls recordTick and advanceTick: a long loop body is compiled by on-stack replacement, and V8 drops that
 * code at the next full garbage collection, so a run after one would spend its first thousands of ticks interpreted.
 */
export function runScene(scene: Scene, settings: RunSettings, options: RunOptions = {}): RunRecord {
  const { maxTicks, noise } = settings;
  const target = scene.document.motion.target;
  const fingers = scene.fingers;
  const jointCounts = mapPacked(fingers, (f) => f.jointCount);
  const random: RandomSource | null = noise ? createRandom(noise.seed) : null;
  const object = scene.object;
  const loop: RunLoop = keepLatest('run', {
    scene,
    result: createResult(scene),
    columns: createColumns(Math.min(maxTicks, INITIAL_CAPACITY), jointCounts, random !== null),
    settings,
    random,
    jointCounts,
    steerChosen: scene.document.commanded !== 'full',
    geodesicIndex: ROTATION_METRICS.findIndex((m) => m.key === 'phi6'),
    targetPosition: Float64Array.from(target.position),
    targetOrientation: fromSheet(target.orientation, new Float64Array(4)),
    position: Float64Array.from(object.position),
    orientation: Float64Array.from(object.orientation),
    measuredPosition: new Float64Array(3),
    measuredOrientation: new Float64Array(4),
    error: new Float64Array(6),
    linear: new Float64Array(3),
    angular: new Float64Array(3),
    noiseRotation: new Float64Array(3),
    noiseQuat: new Float64Array(4),
    distances: new Float64Array(METRIC_COUNT),
  });
  const progressEvery = Math.max(1, options.progressEvery ?? 500);

  let stopReason: RunStopReason = 'tick-limit';
  let tick = 0;
  while (tick < maxTicks) {
    if (tick === loop.columns.capacity) growColumns(loop.columns, maxTicks);
    const stop = recordTick(loop, tick);
    tick++;
    if (tick % progressEvery === 0) options.onProgress?.(tick, maxTicks);
    if (stop !== null) {
      stopReason = stop;
      break;
    }
    advanceTick(loop, tick - 1);
  }
  object.position.set(loop.position);
  object.orientation.set(loop.orientation);

  const columns = loop.columns;
  return {
    tickCount: tick,
    stopReason,
    settings,
    fingerNames: fingers.map((f) => f.name),
    jointCounts,
    time: columns.time.subarray(0, tick),
    position: columns.position.subarray(0, 3 * tick),
    orientation: columns.orientation.subarray(0, 4 * tick),
    measuredPosition: columns.measuredPosition.subarray(0, 3 * tick),
    measuredOrientation: columns.measuredOrientation.subarray(0, 4 * tick),
    twist: columns.twist.subarray(0, 6 * tick),
    jointAngles: columns.jointAngles.map((c, i) => c.subarray(0, jointCounts[i]! * tick)),
    jointRates: columns.jointRates.map((c, i) => c.subarray(0, jointCounts[i]! * tick)),
    solution: columns.solution.subarray(0, fingers.length * tick),
    slipResidual: columns.slipResidual.subarray(0, fingers.length * tick),
    positionError: columns.positionError.subarray(0, tick),
    orientationError: columns.orientationError.subarray(0, METRIC_COUNT * tick),
    warningMask: columns.warningMask.subarray(0, tick),
    worstSeverity: columns.worstSeverity.subarray(0, tick),
  };
}

/** Measures the pose, commands gain * pose error, solves the fingers and records row `tick`; returns why the run stops there, or null. */
function recordTick(loop: RunLoop, tick: number): RunStopReason | null {
  const { scene, result, columns, settings, jointCounts, position, orientation, measuredPosition, measuredOrientation, linear, angular, error, distances } = loop;
  const { gain, dt, positionTolerance, angleTolerance, stopOnSingular } = settings;
  const object = scene.object;
  const fingers = scene.fingers;
  measure(position, orientation, measuredPosition, measuredOrientation, loop.random, settings.noise, loop.noiseRotation, loop.noiseQuat);
  poseError(measuredPosition, measuredOrientation, loop.targetPosition, loop.targetOrientation, error);
  linear[0] = gain * error[0]!; linear[1] = gain * error[1]!; linear[2] = gain * error[2]!;
  angular[0] = gain * error[3]!; angular[1] = gain * error[4]!; angular[2] = gain * error[5]!;
  copyInto(measuredPosition, object.position, 0);
  copyInto(measuredOrientation, object.orientation, 0);
  copyInto(linear, object.linearVelocity, 0);
  copyInto(angular, object.angularVelocity, 0);
  solveScene(scene, result, 'run');

  columns.time[tick] = tick * dt;
  copyInto(position, columns.position, 3 * tick);
  copyInto(orientation, columns.orientation, 4 * tick);
  if (loop.random !== null) {
    copyInto(measuredPosition, columns.measuredPosition, 3 * tick);
    copyInto(measuredOrientation, columns.measuredOrientation, 4 * tick);
  }
  copyInto(linear, columns.twist, 6 * tick);
  copyInto(angular, columns.twist, 6 * tick + 3);
  let mask = result.warningList.mask;
  let worstRank = result.warningList.worstRank;
  for (let i = 0; i < fingers.length; i++) {
    const n = jointCounts[i]!;
    const angles = fingers[i]!.angles;
    const solved = result.fingers[i]!;
    const steered = loop.steerChosen && solved.steer.available;
    const rates = steered ? solved.steer.rates : solved.full.rates;
    const angleColumn = columns.jointAngles[i]!;
    const rateColumn = columns.jointRates[i]!;
    for (let k = 0, o = n * tick; k < n; k++, o++) {
      angleColumn[o] = angles[k]!;
      rateColumn[o] = rates[k]!;
    }
    if (steered) {
      // The solve cannot know dt: a steered pivot turns to its new angle within the tick, so its rate is pivotChange / dt.
      const pivot = fingers[i]!.pivotIndex;
      const pivotRate = solved.steer.pivotChange / dt;
      rateColumn[n * tick + pivot] = pivotRate;
      if (Math.abs(pivotRate) > fingers[i]!.rateLimits[pivot]!) {
        mask |= RATE_LIMIT_BIT;
        if (RATE_LIMIT_RANK > worstRank) worstRank = RATE_LIMIT_RANK;
      }
    }
    columns.solution[fingers.length * tick + i] = steered ? STEER_AND_ROLL : FULL;
    columns.slipResidual[fingers.length * tick + i] = steered ? solved.steer.residualNorm : solved.full.residualNorm;
  }
  const targetPosition = loop.targetPosition;
  const dx = targetPosition[0]! - position[0]!, dy = targetPosition[1]! - position[1]!, dz = targetPosition[2]! - position[2]!;
  const positionError = Math.sqrt(dx * dx + dy * dy + dz * dz);
  columns.positionError[tick] = positionError;
  rotationDistances(orientation, loop.targetOrientation, distances);
  copyInto(distances, columns.orientationError, METRIC_COUNT * tick);
  columns.warningMask[tick] = mask >>> 0;
  columns.worstSeverity[tick] = worstRank;

  if (positionError <= positionTolerance && distances[loop.geodesicIndex]! <= angleTolerance) return 'converged';
  if (stopOnSingular && result.worstSeverity === 'singular') return 'singular';
  return null;
}

/** Moves the truth on by the rates recorded in row `tick`: joint angles by rate * dt (a steered pivot to its steered angle), the pose by the commanded twist. */
function advanceTick(loop: RunLoop, tick: number): void {
  const { scene, result, columns, jointCounts } = loop;
  const dt = loop.settings.dt;
  const fingers = scene.fingers;
  for (let i = 0; i < fingers.length; i++) {
    const finger = fingers[i]!;
    const angles = finger.angles;
    const n = jointCounts[i]!;
    const rateColumn = columns.jointRates[i]!;
    for (let k = 0, o = n * tick; k < n; k++, o++) angles[k] = angles[k]! + rateColumn[o]! * dt;
    // Exactly the steered angle, not the rate times dt rounded back.
    if (columns.solution[fingers.length * tick + i] === STEER_AND_ROLL) angles[finger.pivotIndex] = result.fingers[i]!.steer.pivotAngle;
  }
  integratePose(loop.position, loop.orientation, loop.linear, loop.angular, dt, loop.position, loop.orientation);
}

/** Measured pose: the truth, or with noise p + N(0, s_p^2) per axis (m) and exp(N(0, s_a^2) per axis) q (rad, world frame). */
function measure(
  position: Float64Array,
  orientation: Float64Array,
  outPosition: Float64Array,
  outOrientation: Float64Array,
  random: RandomSource | null,
  noise: RunSettings['noise'],
  rotation: Float64Array,
  rotationQuat: Float64Array,
): void {
  if (random === null || noise === undefined) {
    copyInto(position, outPosition, 0);
    copyInto(orientation, outOrientation, 0);
    return;
  }
  outPosition[0] = position[0]! + noise.position * nextGaussian(random);
  outPosition[1] = position[1]! + noise.position * nextGaussian(random);
  outPosition[2] = position[2]! + noise.position * nextGaussian(random);
  rotation[0] = noise.angle * nextGaussian(random);
  rotation[1] = noise.angle * nextGaussian(random);
  rotation[2] = noise.angle * nextGaussian(random);
  multiply(expMap(rotation, rotationQuat), orientation, outOrientation);
}

/** Warning codes raised at one tick of a run record. */
export function warningsAt(record: RunRecord, tick: number): WarningCode[] {
  const mask = record.warningMask[tick]!;
  return WARNING_CODES.filter((_, i) => (mask & (1 << i)) !== 0);
}

/** JSON-ready copy of a run record: typed arrays as plain arrays, with the legends for warning bits and metric columns. */
export function toPlainRunRecord(record: RunRecord) {
  return {
    tickCount: record.tickCount,
    stopReason: record.stopReason,
    settings: record.settings,
    fingerNames: record.fingerNames,
    jointCounts: record.jointCounts,
    warningCodes: [...WARNING_CODES],
    severityLevels: [...SEVERITY_LEVELS],
    solutionKinds: [...SOLUTION_KINDS],
    orientationMetrics: ROTATION_METRICS.map((m) => m.key),
    time: Array.from(record.time),
    position: Array.from(record.position),
    orientation: Array.from(record.orientation),
    measuredPosition: Array.from(record.measuredPosition),
    measuredOrientation: Array.from(record.measuredOrientation),
    twist: Array.from(record.twist),
    jointAngles: record.jointAngles.map((c) => Array.from(c)),
    jointRates: record.jointRates.map((c) => Array.from(c)),
    solution: Array.from(record.solution),
    slipResidual: Array.from(record.slipResidual),
    positionError: Array.from(record.positionError),
    orientationError: Array.from(record.orientationError),
    warningMask: Array.from(record.warningMask),
    worstSeverity: Array.from(record.worstSeverity),
  };
}
