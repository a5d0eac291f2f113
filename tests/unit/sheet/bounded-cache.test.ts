import { describe, expect, it } from 'vitest';
import { BoundedCache } from '../../../src/lib/sheet/bounded-cache';
import { createRandom, nextUniform } from '../../../src/lib/kinematics/random';

// Least-recently-used eviction as textbooks define it (common practice; e.g. Tanenbaum, Modern Operating Systems, 4th ed., 3.4.6).
describe('BoundedCache', () => {
  it('keeps at most its capacity, forgetting the least recently used entry first', () => {
    const cache = new BoundedCache<string, number>(2);
    cache.set('a', 1);
    cache.set('b', 2);
    expect(cache.get('a')).toBe(1); // a is now the most recently used
    cache.set('c', 3);
    expect(cache.size).toBe(2);
    expect(cache.get('b')).toBeUndefined();
    expect(cache.get('a')).toBe(1);
    expect(cache.get('c')).toBe(3);
  });

  it('replaces the value of a key it holds without evicting another', () => {
    const cache = new BoundedCache<string, number>(2);
    cache.set('a', 1);
    cache.set('b', 2);
    cache.set('a', 10);
    expect(cache.size).toBe(2);
    expect(cache.get('a')).toBe(10);
    expect(cache.get('b')).toBe(2);
  });

  it('follows a list kept in recency order through a long seeded run of reads and writes', () => {
    // The reference is the textbook's own model: a list ordered from least to most recently used, the front evicted.
    const source = createRandom(15);
    const random = () => nextUniform(source);
    const cache = new BoundedCache<number, number>(5);
    const recency: { key: number; value: number }[] = [];
    for (let step = 0; step < 2000; step++) {
      const key = Math.floor(random() * 9);
      const at = recency.findIndex((entry) => entry.key === key);
      if (random() < 0.5) {
        const expected = at >= 0 ? recency.splice(at, 1)[0] : undefined;
        if (expected) recency.push(expected);
        expect(cache.get(key)).toBe(expected?.value);
      } else {
        if (at >= 0) recency.splice(at, 1);
        else if (recency.length === 5) recency.shift();
        recency.push({ key, value: step });
        cache.set(key, step);
      }
      expect(cache.size).toBe(recency.length);
    }
  });
});

