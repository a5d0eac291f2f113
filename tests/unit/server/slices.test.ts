import { describe, expect, it } from 'vitest';
import { mapInSlices } from '../../../src/lib/server/slices';

/** Holds the thread for `ms`, like typesetting a long formula does. */
function busy(ms: number): void {
  const until = performance.now() + ms;
  while (performance.now() < until);
}

describe('mapInSlices', () => {
  it('maps every item in order', async () => {
    expect(await mapInSlices([1, 2, 3], (n) => n * 10)).toEqual([10, 20, 30]);
  });

  it('lets other work run between slices of a long computation', async () => {
    const events: string[] = [];
    setImmediate(() => events.push('other request'));
    const done = mapInSlices(Array.from({ length: 10 }, (_, i) => i), (i) => {
      busy(3);
      events.push(`item ${i}`);
    }, 5);
    await done;
    const other = events.indexOf('other request');
    expect(other).toBeGreaterThan(0);
    expect(other).toBeLessThan(events.length - 1);
  });

  it('does not yield when the work is shorter than a slice', async () => {
    const events: string[] = [];
    setImmediate(() => events.push('other request'));
    await mapInSlices([1, 2, 3], (i) => events.push(`item ${i}`), 1_000);
    expect(events).toEqual(['item 1', 'item 2', 'item 3']);
  });
});
