// A small least-recently-used map with a fixed maximum size: every cache keyed by something a
// client can vary (a time-zone spelling, an address, a query) uses it, so none grows without end.
export class Lru<K, V> {
  readonly #map = new Map<K, V>();
  constructor(readonly maxSize: number) {
    if (!(maxSize >= 1)) throw new RangeError("an LRU needs room for at least one entry");
  }

  get size() {
    return this.#map.size;
  }

  get(key: K): V | undefined {
    const value = this.#map.get(key);
    if (value === undefined) return undefined;
    this.#map.delete(key);
    this.#map.set(key, value);
    return value;
  }

  has(key: K) {
    return this.#map.has(key);
  }

  set(key: K, value: V): this {
    this.#map.delete(key);
    this.#map.set(key, value);
    while (this.#map.size > this.maxSize) this.#map.delete(this.#map.keys().next().value as K);
    return this;
  }

  delete(key: K) {
    return this.#map.delete(key);
  }

  clear() {
    this.#map.clear();
  }

  /** The cached value, or `make()`'s, which is then kept. */
  getOrSet(key: K, make: () => V): V {
    const hit = this.get(key);
    if (hit !== undefined) return hit;
    const value = make();
    this.set(key, value);
    return value;
  }

  entries() {
    return this.#map.entries();
  }
}
