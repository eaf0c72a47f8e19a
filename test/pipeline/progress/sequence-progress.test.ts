// Progress of a sequence: frames counted, weighted by the time each one really takes (the first frame computes the
// kernels, the others reuse them), frames kept by an earlier attempt counted as done, never falling.
import { describe, it, expect } from "vitest";
import { SequenceProgress } from "../../../pipeline/progress/sequence-progress.js";
import type { ProgressUpdate } from "../../../pipeline/progress/progress-meter.js";

function sequence(frames: number) {
  let nowMs = 0;
  const updates: ProgressUpdate[] = [];
  const p = new SequenceProgress(frames, (u) => updates.push(u), () => nowMs);
  return { p, updates, tick: (ms: number) => (nowMs += ms) };
}

/** Renders frame k: `ms` in all, its own fraction reported at half-way. */
function frame(s: ReturnType<typeof sequence>, k: number, ms: number) {
  s.p.start(k);
  s.tick(ms / 2);
  s.p.inner(0.5);
  s.tick(ms / 2);
  s.p.finish();
}

describe("SequenceProgress", () => {
  it("counts frames alike until one is measured, then weights them by their time, the latest frame standing for those to go", () => {
    const s = sequence(10);
    s.p.start(0);
    expect(s.updates.at(-1)).toEqual({ fraction: 0, stage: "frame 1 of 10", secondsLeft: null });
    s.tick(1);
    s.p.inner(0.01);
    // Too early to project the frame's time from its own pace: a tenth of a frame of ten.
    expect(s.updates.at(-1)!.fraction).toBeCloseTo(0.001, 12);
    expect(s.updates.at(-1)!.secondsLeft).toBeNull();
    s.tick(4999);
    s.p.inner(0.5);
    // Half-way through a frame projected at 10 s, nine more like it: 5 s done of 100 s.
    expect(s.updates.at(-1)!.fraction).toBeCloseTo(0.05, 12);
    expect(s.updates.at(-1)!.secondsLeft).toBeCloseTo(95, 9);
    s.tick(5000);
    s.p.finish();
    // The next frames reuse the kernels: 1 s each.
    frame(s, 1, 1000);
    s.p.start(2);
    const after = s.updates.at(-1)!;
    expect(after.stage).toBe("frame 3 of 10");
    // 11 s spent; the latest frame (1 s) stands for each of the eight to go.
    expect(after.secondsLeft).toBeCloseTo(8, 9);
    expect(after.fraction).toBeCloseTo(11 / 19, 12);
  });

  it("counts frames kept by an earlier attempt as done, at the pace of the frames rendered here", () => {
    const s = sequence(4);
    s.p.keptFrame(0);
    s.p.keptFrame(1);
    expect(s.updates.at(-1)).toEqual({ fraction: 0.5, stage: "frame 2 of 4", secondsLeft: null });
    frame(s, 2, 2000);
    s.p.start(3);
    // Kept frames weigh as much as the latest rendered one: 2 + 2 + 2 s of 8 s.
    expect(s.updates.at(-1)!.fraction).toBeCloseTo(0.75, 12);
    expect(s.updates.at(-1)!.secondsLeft).toBeCloseTo(2, 9);
    s.p.finish();
    s.p.done();
    expect(s.updates.at(-1)).toEqual({ fraction: 1, stage: "done", secondsLeft: 0 });
  });

  it("never falls, also when a slow frame follows fast ones", () => {
    const s = sequence(5);
    frame(s, 0, 100);
    frame(s, 1, 100);
    frame(s, 2, 5000);
    s.p.start(3);
    s.tick(10);
    s.p.inner(0.5);
    const fractions = s.updates.map((u) => u.fraction);
    for (let k = 1; k < fractions.length; k++) expect(fractions[k]).toBeGreaterThanOrEqual(fractions[k - 1]);
    expect(fractions.at(-1)!).toBeLessThan(1);
  });
});
