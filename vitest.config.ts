import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    testTimeout: 60_000,
    // Hooks that compute a profile (a rain profile under auto spends its Mie budget: ~2 s of two cores cold) get the
    // tests' time, not vitest's 10 s.
    hookTimeout: 60_000,
    pool: "forks",
    // Test files run side by side and share the machine's cores, so a start-up or a render can hold an app's event
    // loop for a whole sampling interval, which the overload guard counts as overloaded (503). The guard itself is
    // tested with its own limit (test/http/hardening.test.ts); everywhere else it is off.
    env: { MAX_EVENT_LOOP_DELAY_MS: "0" },
  },
});
