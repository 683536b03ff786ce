import { defineConfig } from "vitest/config";

// `npm test -- faults`: the fault tests (database connections dropped, the database stopped
// and restarted under writes, readers that never read). Slow by nature, so kept out of
// `unit`; `npm test` (and CI) runs both. One file at a time: they stop servers and
// terminate backends, and timings are only meaningful without the other files' load.
export default defineConfig({
  test: {
    include: ["tests/faults/**/*.test.ts"],
    globalSetup: ["tests/setup/global-setup.ts"],
    testTimeout: 180_000,
    hookTimeout: 180_000,
    pool: "forks",
    fileParallelism: false,
  },
});
