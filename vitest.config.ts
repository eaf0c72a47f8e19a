import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    testTimeout: 60_000,
    // Hooks that compute a profile (a rain profile under auto spends its Mie budget: ~2 s of two cores cold) get the
    // tests' time, not vitest's 10 s.
    hookTimeout: 60_000,
    pool: "forks",
  },
});
