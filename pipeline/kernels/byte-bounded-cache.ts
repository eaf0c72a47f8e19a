// Least-recently-used caches bounded by the bytes of their values: lru-cache with maxSize and a size per value.

import { LRUCache } from "lru-cache";

/**
 * A cache holding values up to `budgetBytes` in all, evicting the least recently used first; a value larger than
 * the whole budget is not kept. lru-cache counts sizes in positive whole numbers, so a budget or a size is
 * rounded to whole bytes, at least 1.
 */
export function byteBoundedCache<V extends { byteLength: number }>(budgetBytes: number): LRUCache<string, V> {
  return new LRUCache<string, V>({
    maxSize: Math.max(1, Math.floor(budgetBytes)),
    sizeCalculation: (value) => Math.max(1, Math.ceil(value.byteLength)),
  });
}
