// Order statistics of the benchmarks, against the definition they cite: Hyndman & Fan 1996 (Am. Stat. 50, 361),
// definition 7 (R's quantile type 7, NumPy's "linear"); the expected values below follow that definition by hand.
import { describe, it, expect } from "vitest";
import { median, quantile, spread, percentSpread } from "../../bench/stats.js";

describe("bench statistics", () => {
  it("takes the mean of the two middle values as the median of an even count", () => {
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([5, 1, 3])).toBe(3);
    expect(median([7])).toBe(7);
  });

  it("interpolates quartiles between order statistics (definition 7)", () => {
    // Sorted 1..8: position q·(n − 1) = 1.75 for q = 0.25, so 2 + 0.75·(3 − 2).
    const v = [8, 1, 7, 2, 6, 3, 5, 4];
    expect(quantile(v, 0.25)).toBeCloseTo(2.75, 12);
    expect(quantile(v, 0.75)).toBeCloseTo(6.25, 12);
    expect(quantile(v, 0)).toBe(1);
    expect(quantile(v, 1)).toBe(8);
    expect(spread(v)).toMatchObject({ median: 4.5, min: 1, max: 8, n: 8 });
  });

  it("writes a relative spread with its sign", () => {
    expect(percentSpread(spread([-0.01, 0.02, 0.03]))).toBe("+2.0 % (quartiles +0.5 to +2.5 %, range −1.0 to +3.0 %, n = 3)");
  });
});
