import { describe, expect, it } from "vitest";
import { byteBoundedCache } from "../../../pipeline/kernels/byte-bounded-cache.js";

const entry = (byteLength: number) => ({ byteLength });

describe("byte-bounded LRU cache (lru-cache with maxSize)", () => {
  it("keeps the bytes within the budget, evicting the least recently used first; a read counts as a use", () => {
    const cache = byteBoundedCache<{ byteLength: number }>(100);
    cache.set("a", entry(40));
    cache.set("b", entry(40));
    expect(cache.get("a")).toBeDefined();
    cache.set("c", entry(40));
    expect([...cache.keys()].sort()).toEqual(["a", "c"]);
    expect(cache.calculatedSize).toBe(80);
  });

  it("a value grown in place and set again is counted at its new size", () => {
    const cache = byteBoundedCache<{ byteLength: number }>(100);
    const pack = entry(10);
    cache.set("pack", pack);
    cache.set("other", entry(50));
    pack.byteLength = 45;
    cache.set("pack", pack);
    expect(cache.calculatedSize).toBe(95);
    pack.byteLength = 60;
    cache.set("pack", pack);
    // 110 bytes do not fit: the least recently used (other) goes.
    expect([...cache.keys()]).toEqual(["pack"]);
    expect(cache.calculatedSize).toBe(60);
  });

  it("a value larger than the whole budget is not kept, and takes its key's old value with it", () => {
    const cache = byteBoundedCache<{ byteLength: number }>(100);
    cache.set("a", entry(30));
    cache.set("a", entry(101));
    expect(cache.has("a")).toBe(false);
    expect(cache.calculatedSize).toBe(0);
  });

  it("sizes and budgets are whole bytes, at least 1 (empty values and fractional budgets are accepted)", () => {
    const cache = byteBoundedCache<{ byteLength: number }>(2.5);
    cache.set("empty", entry(0));
    cache.set("one", entry(1));
    expect(cache.calculatedSize).toBe(2);
    cache.set("more", entry(1));
    expect(cache.has("empty")).toBe(false);
  });
});
