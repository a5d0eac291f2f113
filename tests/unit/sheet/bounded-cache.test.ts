import { describe, expect, it } from 'vitest';
import { BoundedCache } from '../../../src/lib/sheet/bounded-cache';

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
});
