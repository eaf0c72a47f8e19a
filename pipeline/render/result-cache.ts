import type { LRUCache } from "lru-cache";
import { byteBoundedCache } from "../kernels/byte-bounded-cache.js";

interface Entry {
  value: unknown;
  byteLength: number;
}

/** Finished responses by the content hash of their normalised request and output options. */
export class ResultCache {
  private readonly lru: LRUCache<string, Entry>;
  constructor(budgetBytes: number) {
    this.lru = byteBoundedCache(budgetBytes);
  }

  get<T>(key: string): T | undefined {
    return this.lru.get(key)?.value as T | undefined;
  }

  set(key: string, value: unknown, byteLength: number): void {
    this.lru.set(key, { value, byteLength });
  }
}
