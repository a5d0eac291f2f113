/**
 * A map that keeps at most `capacity` entries and forgets the least recently used one first. The
 * evaluation's caches are keyed by exact input (texts, numbers), hold pure results, and live as
 * long as the process: the bound keeps a long-running server or page from growing without end.
 */
interface Entry<K, V> {
  key: K;
  value: V;
  /** The next entry toward the least recently used end (the list runs from `#newest`), or null for the last. */
  older: Entry<K, V> | null;
  newer: Entry<K, V> | null;
}

export class BoundedCache<K, V> {
  /**
   * Recency is a linked list of the entries, so that a hit only relinks one: deleting and inserting the key again (a Map
   * iterates in insertion order) costs time that grows with the map's size in V8, 7 µs per hit at 4000 entries.
   */
  readonly #entries = new Map<K, Entry<K, V>>();
  #newest: Entry<K, V> | null = null;
  #oldest: Entry<K, V> | null = null;

  constructor(readonly capacity: number) {}

  get size(): number {
    return this.#entries.size;
  }

  /** The value stored for key, now the most recently used, or undefined. */
  get(key: K): V | undefined {
    const entry = this.#entries.get(key);
    if (entry === undefined) return undefined;
    if (entry !== this.#newest) {
      this.#unlink(entry);
      this.#linkNewest(entry);
    }
    return entry.value;
  }

  set(key: K, value: V): void {
    const known = this.#entries.get(key);
    if (known !== undefined) {
      known.value = value;
      this.get(key);
      return;
    }
    if (this.#entries.size >= this.capacity && this.#oldest !== null) {
      const evicted = this.#oldest;
      this.#unlink(evicted);
      this.#entries.delete(evicted.key);
    }
    const entry: Entry<K, V> = { key, value, older: null, newer: null };
    this.#linkNewest(entry);
    this.#entries.set(key, entry);
  }

  #unlink(entry: Entry<K, V>): void {
    if (entry.newer) entry.newer.older = entry.older;
    else this.#newest = entry.older;
    if (entry.older) entry.older.newer = entry.newer;
    else this.#oldest = entry.newer;
    entry.older = null;
    entry.newer = null;
  }

  #linkNewest(entry: Entry<K, V>): void {
    entry.older = this.#newest;
    if (this.#newest) this.#newest.newer = entry;
    else this.#oldest = entry;
    this.#newest = entry;
  }
}
