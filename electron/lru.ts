// Bounded caches for the worker and the solver client.

/** A small least-recently-used map: the worker keeps a few patterns and paths, not every one ever made. */
export class LruMap<K, V> {
  private map = new Map<K, V>();
  constructor(private readonly limit: number) {}
  get(key: K): V | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }
  set(key: K, value: V): void {
    this.map.delete(key);
    this.map.set(key, value);
    while (this.map.size > this.limit) this.map.delete(this.map.keys().next().value as K);
  }
  has(key: K): boolean {
    return this.map.has(key);
  }
  get size(): number {
    return this.map.size;
  }
}
