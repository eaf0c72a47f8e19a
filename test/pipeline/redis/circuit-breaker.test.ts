import { describe, it, expect } from "vitest";
import { CircuitBreaker } from "../../../pipeline/redis/circuit-breaker.js";

function clocked() {
  let t = 1_000;
  const breaker = new CircuitBreaker({ failuresToOpen: 3, openMs: 5000 }, () => t);
  return { breaker, advance: (ms: number) => void (t += ms) };
}

const fail = () => Promise.reject(new Error("down"));

describe("circuit breaker", () => {
  it("opens after the set number of failures in a row, and refuses calls without making them while open", async () => {
    const { breaker } = clocked();
    for (let k = 0; k < 2; k++) expect(await breaker.run(fail, "fallback")).toBe("fallback");
    expect(breaker.state).toBe("closed");
    await breaker.run(fail, "fallback");
    expect(breaker.state).toBe("open");
    let called = false;
    expect(await breaker.run(async () => ((called = true), "answer"), "fallback")).toBe("fallback");
    expect(called).toBe(false);
  });

  it("a success in between resets the count", async () => {
    const { breaker } = clocked();
    await breaker.run(fail, 0);
    await breaker.run(fail, 0);
    await breaker.run(async () => 1, 0);
    await breaker.run(fail, 0);
    await breaker.run(fail, 0);
    expect(breaker.state).toBe("closed");
  });

  it("after the open time lets one trial call through: its success closes, its failure opens again", async () => {
    const { breaker, advance } = clocked();
    for (let k = 0; k < 3; k++) await breaker.run(fail, 0);
    advance(5000);
    expect(breaker.state).toBe("half-open");
    expect(breaker.allows()).toBe(true);
    // Only one trial at a time.
    expect(breaker.allows()).toBe(false);
    breaker.failed();
    expect(breaker.state).toBe("open");
    advance(5000);
    expect(await breaker.run(async () => "answer", "fallback")).toBe("answer");
    expect(breaker.state).toBe("closed");
  });
});
