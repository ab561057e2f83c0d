/**
 * A small least-recently-used map for values that never change once made (an analysis is never
 * rewritten: a re-analysis is a new row with a new id). get() makes an entry the newest; set()
 * drops the oldest entries beyond `max`. A Map keeps insertion order, so the first key is the
 * least recently used one.
 */
export class Lru<K, V> {
  private readonly entries = new Map<K, V>();

  constructor(readonly max: number) {}

  get(key: K): V | undefined {
    const value = this.entries.get(key);
    if (value === undefined) return undefined;
    this.entries.delete(key);
    this.entries.set(key, value);
    return value;
  }

  set(key: K, value: V): void {
    this.entries.delete(key);
    this.entries.set(key, value);
    while (this.entries.size > this.max) this.entries.delete(this.entries.keys().next().value!);
  }

  delete(key: K): void {
    this.entries.delete(key);
  }

  get size(): number {
    return this.entries.size;
  }
}

/**
 * Freezes an object and everything reachable from it, so a value shared by many requests cannot
 * be changed by one of them: an attempt throws a TypeError (modules run in strict mode).
 */
export function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === "object" && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const child of Object.values(value)) deepFreeze(child);
  }
  return value;
}
