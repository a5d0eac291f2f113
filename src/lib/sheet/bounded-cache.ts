/**
 * A map that keeps at most `capacity` entries and forgets the least recently used one first. The
 * evaluation's caches are keyed by exact input (texts, numbers), hold pure results, and live as
 * long as the process: the bound keeps a long-running server or page from growing without end.
 */
export class BoundedCache<K, V> {
  readonly #entries = new Map<K, V>();

  constructor(readonly capacity: number) {}

  get size(): number {
    return this.#entries.size;
  }

  /** The value stored for key, now the most recently used, or undefined. */
  get(key: K): V | undefined {
    const value = this.#entries.get(key);
    if (value === undefined) return undefined;
    // A Map iterates in insertion order: inserting again moves the key to the end, away from eviction.
    this.#entries.delete(key);
    this.#entries.set(key, value);
    return value;
  }

  set(key: K, value: V): void {
    this.#entries.delete(key);
    if (this.#entries.size >= this.capacity) this.#entries.delete(this.#entries.keys().next().value as K);
    this.#entries.set(key, value);
  }
}
