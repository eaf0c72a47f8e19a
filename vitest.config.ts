import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    testTimeout: 60_000,
    // Hooks that compute a profile (a rain profile under auto spends its Mie budget: ~2 s of two cores cold) get the
    // tests' time, not vitest's 10 s.
    hookTimeout: 60_000,
    pool: "forks",
    // Two test files at a time: vitest's default on 2 cores is one (cores − 1), which ran the suite file after file
    // (9 min 3 s on a clean clone; the files' own times summed to 7.6 min, most of it waiting on timers, Redis and
    // child processes). With two, every file passed under a load average of 8–12 from other work (15 min there).
    maxWorkers: 2,
    // Test files run side by side and share the machine's cores, so a start-up or a render can hold an app's event
    // loop for a whole sampling interval, which the overload guard counts as overloaded (503). The guard itself is
    // tested with its own limit (test/http/hardening.test.ts); everywhere else it is off.
    env: { MAX_EVENT_LOOP_DELAY_MS: "0" },
  },
});
