import { setFlagsFromString } from 'node:v8';
import { describe, expect, it } from 'vitest';
import { indicesWhere, mapPacked } from '../../../src/lib/kinematics/hidden-classes';
import { createRandom, nextUniform } from '../../../src/lib/kinematics/random';
import { createResult, createScene } from '../../../src/lib/kinematics/scene';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';

// V8's own test hooks (natives syntax): whether two objects share a hidden class, and compiling a function optimised now.
setFlagsFromString('--allow-natives-syntax');
const haveSameMap = new Function('a', 'b', 'return %HaveSameMap(a, b)') as (a: unknown, b: unknown) => boolean;
const optimiseNow = new Function('f', 'call', '%PrepareFunctionForOptimization(f); call(); call(); %OptimizeFunctionOnNextCall(f); return call();') as <T>(
  f: (...args: never[]) => unknown,
  call: () => T,
) => T;

describe('mapPacked and indicesWhere', () => {
  const random = createRandom(11);
  const arrays = [[], [0], ...Array.from({ length: 20 }, (_, n) => Array.from({ length: n + 1 }, () => Math.floor(nextUniform(random) * 7) - 3))];
  it('give what Array.prototype.map and flatMap give (the built-ins are the reference)', () => {
    for (const items of arrays) {
      expect(mapPacked(items, (x, i) => x * 10 + i)).toEqual(items.map((x, i) => x * 10 + i));
      expect(indicesWhere(items, (x) => x > 0)).toEqual(items.flatMap((x, k) => (x > 0 ? [k] : [])));
    }
  });
});

describe('hidden classes of scenes and results', () => {
  it('are the same whether createScene and createResult run unoptimised or optimised, so the solve meets one class per object', () => {
    const doc = createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 });
    const coldScene = createScene(doc);
    const coldResult = createResult(coldScene);
    const hotScene = optimiseNow(createScene, () => createScene(doc));
    const hotResult = optimiseNow(createResult, () => createResult(hotScene));
    const pairs: [string, unknown, unknown][] = [
      ['scene.fingers', coldScene.fingers, hotScene.fingers],
      ['scene.settings', coldScene.settings, hotScene.settings],
      ['finger.roles', coldScene.fingers[0]!.roles, hotScene.fingers[0]!.roles],
      ['result.fingers', coldResult.fingers, hotResult.fingers],
      ['steer.baseJoints', coldResult.fingers[0]!.steer.baseJoints, hotResult.fingers[0]!.steer.baseJoints],
    ];
    for (const [name, cold, hot] of pairs) expect(haveSameMap(cold, hot), name).toBe(true);
  });
});
