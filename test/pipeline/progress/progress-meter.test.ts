// The progress meter: a fraction of estimated cost, never falling, with the time left from the rate so far.
import { describe, it, expect } from "vitest";
import { ProgressMeter, type ProgressUpdate } from "../../../pipeline/progress/progress-meter.js";

function meter(stages: string[]) {
  let nowMs = 0;
  const updates: ProgressUpdate[] = [];
  const m = new ProgressMeter(stages, (u) => updates.push(u), () => nowMs);
  return { m, updates, tick: (ms: number) => (nowMs += ms) };
}

describe("ProgressMeter", () => {
  it("weights the stages by their estimated cost, in the order they were named", () => {
    const { m, updates } = meter(["kernels", "spectral", "encoding"]);
    m.plan("encoding", 100);
    m.plan("spectral", 100);
    m.plan("kernels", 800);
    m.advance("kernels", 400);
    expect(updates.at(-1)).toMatchObject({ fraction: 0.4, stage: "kernels" });
    // A later stage completes the earlier ones.
    m.advance("spectral", 50);
    expect(updates.at(-1)!.fraction).toBeCloseTo(0.85, 12);
    m.complete("encoding");
    // Not 1 until the render says it is done.
    expect(updates.at(-1)!.fraction).toBeLessThan(1);
    m.done();
    expect(updates.at(-1)).toEqual({ fraction: 1, stage: "done", secondsLeft: 0 });
  });

  it("never falls, also when a stage is re-planned larger or its count restarts", () => {
    const { m, updates } = meter(["kernels", "colour"]);
    m.plan("colour", 10);
    m.plan("kernels", 90);
    m.advance("kernels", 60);
    m.plan("kernels", 900);
    m.advance("kernels", 30);
    m.advance("kernels", 100);
    const fractions = updates.map((u) => u.fraction);
    for (let k = 1; k < fractions.length; k++) expect(fractions[k]).toBeGreaterThanOrEqual(fractions[k - 1]);
    expect(fractions[0]).toBeCloseTo(0.6, 12);
  });

  it("estimates the time left as (1 − f)·elapsed / (f − f₀), leaving rows found in a cache out of the rate", () => {
    const { m, updates, tick } = meter(["kernels"]);
    m.plan("kernels", 1000);
    tick(100);
    // 30 % found in a cache at once: the rate starts from there.
    m.advance("kernels", 300, { found: true });
    expect(updates.at(-1)!.secondsLeft).toBeNull();
    tick(1000);
    m.advance("kernels", 400);
    // 10 % in 1 s: 60 % left take 6 s.
    expect(updates.at(-1)!.secondsLeft).toBeCloseTo(6, 9);
    tick(1000);
    m.advance("kernels", 650);
    // 35 % in 2 s: 35 % left take 2 s.
    expect(updates.at(-1)!.secondsLeft).toBeCloseTo(2, 9);
  });

  it("gives no estimate before half a second of work", () => {
    const { m, updates, tick } = meter(["kernels"]);
    m.plan("kernels", 10);
    tick(200);
    m.advance("kernels", 5);
    expect(updates.at(-1)!.secondsLeft).toBeNull();
  });

  it("refuses a stage it was not made with", () => {
    const { m } = meter(["kernels"]);
    expect(() => m.advance("pixels", 1)).toThrow(/no progress stage 'pixels'/);
  });
});

describe("ProgressMeter parts", () => {
  it("fills a part's stage with the share of the part's own work done, not with rows it found", () => {
    const { m, updates } = meter(["row 1", "row 2"]);
    m.plan("row 1", 100);
    m.plan("row 2", 300);
    const part = m.part("row 2", ["kernels", "spectral"]);
    part.plan("spectral", 50);
    part.plan("kernels", 100);
    // Half the kernels found in a cache: no work done for the row yet.
    part.advance("kernels", 50, { found: true });
    expect(m.fraction).toBe(0);
    // 25 of the 100 left to work for: a quarter of row 2's 300.
    part.advance("kernels", 75);
    expect(m.fraction).toBeCloseTo(75 / 400, 12);
    // Parts run side by side: row 2 does not complete row 1.
    expect(updates.at(-1)!.stage).toBe("row 2");
    part.done();
    expect(m.fraction).toBeCloseTo(300 / 400, 12);
    const first = m.part("row 1", ["kernels"]);
    first.plan("kernels", 10);
    first.advance("kernels", 5);
    expect(m.fraction).toBeCloseTo(350 / 400, 12);
    first.done();
    expect(m.fraction).toBe(0.999);
  });
});
