import { describe, expect, it } from 'vitest';
import { nextTask, warmUpInTasks } from '../../../src/workers/warm-up';

describe('nextTask (a task of its own, without the nested timers\' 4 ms)', () => {
  it('calls back later, once, in the order asked', async () => {
    const calls: string[] = [];
    const done = new Promise<void>((resolve) => {
      nextTask(() => calls.push('first'));
      nextTask(() => {
        calls.push('second');
        resolve();
      });
    });
    calls.push('now');
    await Promise.resolve();
    calls.push('after a microtask');
    await done;
    expect(calls).toEqual(['now', 'after a microtask', 'first', 'second']);
  });

  it('carries a whole warm-up of chained tasks to its end, and stops it when no longer wanted', async () => {
    const made: number[] = [];
    await new Promise<void>((resolve) => warmUpInTasks(300, (index) => { made.push(index); if (index === 299) resolve(); }, () => true, nextTask));
    expect(made).toEqual(Array.from({ length: 300 }, (_, index) => index));

    const stopped: number[] = [];
    let wanted = true;
    await new Promise<void>((resolve) => warmUpInTasks(300, (index) => { stopped.push(index); if (index === 9) { wanted = false; resolve(); } }, () => wanted, nextTask));
    for (let turn = 0; turn < 20; turn++) await new Promise<void>((resolve) => nextTask(resolve));
    expect(stopped).toHaveLength(10);
  });
});
