import { defineConfig } from "vitest/config";

export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: "unit",
          sequence: { groupOrder: 0 },
          include: ["tests/stats/**/*.test.ts", "tests/unit/**/*.test.ts"],
          environment: "node",
        },
      },
      {
        extends: true,
        test: {
          name: "server",
          sequence: { groupOrder: 1 },
          include: ["tests/server/**/*.test.ts"],
          environment: "node",
          // Every API answer in these tests is checked against the OpenAPI document.
          setupFiles: ["tests/support/answer-check-setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 60_000,
          // PGlite is single-threaded WASM; a few files at a time keeps 2 cores busy without thrashing.
          maxWorkers: 2,
        },
      },
      {
        extends: true,
        test: {
          name: "browser",
          sequence: { groupOrder: 2 },
          include: ["tests/browser/**/*.test.ts"],
          environment: "node",
          globalSetup: ["tests/browser/global-setup.ts"],
          testTimeout: 120_000,
          hookTimeout: 180_000,
          // One Chromium at a time on a 2-core machine.
          fileParallelism: false,
        },
      },
    ],
  },
});
