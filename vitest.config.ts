import { defineConfig } from "vitest/config";

// Kept apart from vite.config.ts: the React Router plugin must not run inside tests.
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    projects: [
      {
        extends: true,
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node" },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          setupFiles: ["tests/integration/setup.ts"],
          // Each file gets its own SQLite database; files run in separate forks.
          pool: "forks",
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          // Timing bounds (a server that stays responsive while a heavy file is parsed) are measured alone, after
          // the integration files, so other test files' CPU does not land in the figures.
          name: "robustness",
          include: ["tests/robustness/**/*.test.ts"],
          environment: "node",
          setupFiles: ["tests/integration/setup.ts"],
          pool: "forks",
          fileParallelism: false,
          testTimeout: 120_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          pool: "forks",
          fileParallelism: false,
          // Pointer drags in a loaded headless browser can land a frame late; one retry keeps CI honest, not flaky.
          retry: 1,
          // expect.poll gives up after 1 s by default; a loaded CI machine can take longer to draw the next frame, so a
          // condition that does come true was reported as a failure.
          expect: { poll: { timeout: 10_000 } },
          testTimeout: 120_000,
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
