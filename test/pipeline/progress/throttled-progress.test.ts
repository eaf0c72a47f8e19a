// Job progress is published at once for each 1 % (at most ten times a second) and within 0.5 s for smaller changes.
import { describe, it, expect, vi, afterEach } from "vitest";
import { throttledProgress } from "../../../pipeline/progress/throttled-progress.js";
import type { ProgressUpdate } from "../../../pipeline/progress/progress-meter.js";

afterEach(() => void vi.useRealTimers());

function setup() {
  vi.useFakeTimers();
  const published: { at: number; update: ProgressUpdate }[] = [];
  const throttle = throttledProgress((update) => published.push({ at: Date.now(), update }), () => Date.now());
  const say = (fraction: number, stage = "kernels") => throttle.listener({ fraction, stage, secondsLeft: null });
  return { published, throttle, say };
}

describe("throttledProgress", () => {
  it("publishes each rise of 1 % or more at once, but never twice within 100 ms", () => {
    const { published, say } = setup();
    say(0.1);
    expect(published).toHaveLength(1);
    vi.advanceTimersByTime(150);
    say(0.2);
    expect(published).toHaveLength(2);
    // A thousand row updates within 50 ms: one publication, 100 ms after the last, with the newest fraction.
    for (let k = 1; k <= 1000; k++) say(0.2 + k * 0.0005);
    vi.advanceTimersByTime(50);
    expect(published).toHaveLength(2);
    vi.advanceTimersByTime(60);
    expect(published).toHaveLength(3);
    expect(published[2].update.fraction).toBeCloseTo(0.7, 12);
  });

  it("publishes a change below 1 % within 0.5 s", () => {
    const { published, say } = setup();
    say(0.1);
    vi.advanceTimersByTime(200);
    say(0.103);
    vi.advanceTimersByTime(299);
    expect(published).toHaveLength(1);
    vi.advanceTimersByTime(1);
    expect(published).toHaveLength(2);
    expect(published[1].update.fraction).toBe(0.103);
  });

  it("publishes a new stage promptly, and nothing after stop", () => {
    const { published, say, throttle } = setup();
    say(0.5, "kernels");
    vi.advanceTimersByTime(120);
    say(0.502, "spectral");
    expect(published.map((p) => p.update.stage)).toEqual(["kernels", "spectral"]);
    say(0.503, "spectral");
    throttle.stop();
    vi.advanceTimersByTime(1000);
    expect(published).toHaveLength(2);
  });
});
