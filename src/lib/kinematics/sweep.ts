/**
 * A parameter sweep: one numeric input of the (SI) sheet document, addressed by a JSON pointer
 * (RFC 6901), takes evenly spaced values from `from` to `to` inclusive; the sheet is solved at
 * each and every output and warning is kept per value.
 */
import type { SheetDocument, SweepSettings } from '../sheet/types';
import { fromSheet } from './quat';
import {
  createResult, createScene, setJointAngles, setObjectPose, setObjectTwist, solveScene, toPlainResult, type PlainSheetResult, type Scene,
} from './scene';
import type { WarningSeverity } from './warnings';

export interface SweepRecord {
  path: string;
  /** The swept input's values, in the document's SI unit. */
  values: Float64Array;
  /** Solved outputs (warnings included) at each value, JSON-ready. */
  results: PlainSheetResult[];
  worstSeverity: (WarningSeverity | 'none')[];
}

export interface SweepOptions {
  /** Called after each value with the number done and the total. */
  onProgress?: (done: number, total: number) => void;
}

/** Reference tokens of a JSON pointer, unescaped (~1 is "/", ~0 is "~"). */
function pointerTokens(pointer: string): string[] {
  if (!pointer.startsWith('/')) throw new RangeError(`sweep path "${pointer}" is not a JSON pointer (it must start with "/")`);
  return pointer
    .slice(1)
    .split('/')
    .map((token) => token.replace(/~1/g, '/').replace(/~0/g, '~'));
}

/** The object holding the pointer's last token and that token, checked to address a finite number. */
function numericSlot(root: unknown, pointer: string): { holder: Record<string, number>; key: string } {
  const tokens = pointerTokens(pointer);
  let node: unknown = root;
  for (let i = 0; i < tokens.length - 1; i++) {
    const token = tokens[i]!;
    if (node === null || typeof node !== 'object' || !Object.hasOwn(node, token)) {
      throw new RangeError(`sweep path "${pointer}" does not exist in the sheet (no "${token}")`);
    }
    node = (node as Record<string, unknown>)[token];
  }
  const key = tokens[tokens.length - 1]!;
  if (node === null || typeof node !== 'object' || !Object.hasOwn(node, key)) {
    throw new RangeError(`sweep path "${pointer}" does not exist in the sheet (no "${key}")`);
  }
  const holder = node as Record<string, unknown>;
  if (typeof holder[key] !== 'number' || !Number.isFinite(holder[key])) {
    throw new RangeError(`sweep path "${pointer}" does not point at a number`);
  }
  return { holder: holder as Record<string, number>, key };
}

/**
 * Inputs a compiled scene holds as plain state (object pose and twist, joint angles, solver settings):
 * sweeping one of them updates the scene instead of compiling the sheet again.
 */
const SCENE_STATE_PATH = /^\/(object\/(pose|twist)\/|hand\/fingers\/\d+\/joints\/\d+\/angle$|solver\/)/;

/** Copies the document's pose, twist, joint angles and solver settings into the scene. */
function syncSceneState(scene: Scene, doc: SheetDocument, orientation: Float64Array): void {
  setObjectPose(scene, doc.object.pose.position, fromSheet(doc.object.pose.orientation, orientation));
  setObjectTwist(scene, doc.object.twist.linear, doc.object.twist.angular);
  doc.hand.fingers.forEach((finger, i) => setJointAngles(scene, i, finger.joints.map((joint) => joint.angle)));
  Object.assign(scene.settings, doc.solver);
}

/** The steps values from..to inclusive, evenly spaced (SI unit of the swept input). */
export function sweepValues(settings: SweepSettings): Float64Array {
  const { from, to, steps } = settings;
  const values = new Float64Array(steps);
  for (let i = 0; i < steps; i++) values[i] = steps === 1 ? from : from + ((to - from) * i) / (steps - 1);
  return values;
}

/** Solves the sheet at every value of the swept input (doc.sweep unless given); the document is not modified. */
export function sweepSheet(doc: SheetDocument, settings: SweepSettings | undefined = doc.sweep, options: SweepOptions = {}): SweepRecord {
  if (settings === undefined) throw new RangeError('the sheet has no sweep settings');
  // One working copy, edited in place per value: each scene is compiled and solved before the next edit.
  const working = structuredClone(doc);
  const { holder, key } = numericSlot(working, settings.path);
  const values = sweepValues(settings);
  const results: PlainSheetResult[] = [];
  const worstSeverity: (WarningSeverity | 'none')[] = [];
  const reuseScene = SCENE_STATE_PATH.test(settings.path);
  let scene = createScene(working);
  const result = createResult(scene);
  const orientation = new Float64Array(4);
  for (let i = 0; i < values.length; i++) {
    holder[key] = values[i]!;
    if (reuseScene) syncSceneState(scene, working, orientation);
    else scene = createScene(working);
    solveScene(scene, result);
    results.push(toPlainResult(result));
    worstSeverity.push(result.worstSeverity);
    options.onProgress?.(i + 1, values.length);
  }
  return { path: settings.path, values, results, worstSeverity };
}
