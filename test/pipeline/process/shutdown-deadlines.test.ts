import { describe, expect, it } from "vitest";
import { deadlines, LEAST_CLOSING_RESERVE_MS } from "../../../pipeline/process/shutdown.js";

// The stop's time budget: after the job in hand is abandoned, a worker's bounded steps (the give-back's two Redis
// commands and dropping the connection, 0.5 s each, pipeline/jobs/redis-worker.ts; then 0.25 s kept before the exit
// for the kernel threads, pipeline/jobs/worker-main.ts) must end before the grace does, or the process exits with 1
// although its stop was orderly.
const BOUNDED_STEPS_AFTER_ABANDON_MS = 3 * 500 + 250;

describe("shutdown deadlines", () => {
  it("keep room after the give-back for the worker's bounded steps, at every grace from 5 s to 60 s", () => {
    expect(LEAST_CLOSING_RESERVE_MS).toBeGreaterThan(BOUNDED_STEPS_AFTER_ABANDON_MS);
    for (const graceMs of [5000, 8000, 12_000, 30_000, 60_000]) {
      const { abandonAt, exitAt } = deadlines(graceMs, 0);
      expect(exitAt).toBe(graceMs);
      expect(exitAt - abandonAt).toBeGreaterThan(BOUNDED_STEPS_AFTER_ABANDON_MS);
      expect(exitAt - abandonAt).toBeLessThanOrEqual(3000);
    }
    // 5 s, the grace the worker tests use: a quarter would be 1.25 s, too little.
    expect(deadlines(5000, 0).abandonAt).toBe(3000);
  });

  it("abandons at once when the grace is shorter than the reserve", () => {
    expect(deadlines(1000, 0)).toEqual({ abandonAt: 0, exitAt: 1000 });
  });
});
