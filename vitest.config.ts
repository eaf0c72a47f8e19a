import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    testTimeout: 60_000,
    pool: "forks",
    // Test files run side by side and share the machine's cores, so a render can hold an app's event loop past the
    // overload guard's 1 s default and turn answers into 503s. The guard itself is tested with its own limit
    // (test/http/hardening.test.ts); everywhere else it is set out of the way.
    env: { MAX_EVENT_LOOP_DELAY_MS: "600000" },
  },
});
