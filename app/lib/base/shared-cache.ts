/**
 * An in-memory LRU of answers that never change for their key, whose making is shared: requests
 * for the same key while it is being made wait for the one making instead of starting another.
 * `keep` decides which answers are kept (failures are not: a storage hiccup must not stick).
 */
import { Lru } from "./lru";

export function sharedCache<V>(max: number, keep: (value: V) => boolean) {
  const cache = new Lru<string, V>(max);
  const making = new Map<string, Promise<V>>();
  return (key: string, make: () => Promise<V>): Promise<V> => {
    const hit = cache.get(key);
    if (hit !== undefined) return Promise.resolve(hit);
    let pending = making.get(key);
    if (!pending) {
      pending = make()
        .then((value) => {
          if (keep(value)) cache.set(key, value);
          return value;
        })
        .finally(() => making.delete(key));
      making.set(key, pending);
    }
    return pending;
  };
}
