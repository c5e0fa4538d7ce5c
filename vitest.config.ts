import { defineConfig } from "vitest/config";
import react from "@vitejs/plugin-react";

// One run, four projects. Server and browser tests share one MariaDB database that
// tests/setup/global-db.ts creates, migrates and drops; they run one file at a time
// because they share that database and the mail sink.
export default defineConfig({
  test: {
    reporters: ["default", "./tests/setup/summary-reporter.ts"],
    projects: [
      {
        test: {
          name: "domain",
          include: ["tests/domain/**/*.test.ts"],
          environment: "node",
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
        },
      },
      {
        test: {
          name: "server",
          include: ["tests/server/**/*.test.ts"],
          environment: "node",
          globalSetup: ["tests/setup/global-db.ts"],
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        plugins: [react()],
        test: {
          name: "client",
          include: ["tests/client/**/*.test.tsx"],
          environment: "jsdom",
          setupFiles: ["tests/setup/fail-on-console-error.ts", "tests/setup/client-cleanup.ts"],
        },
      },
      {
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          globalSetup: ["tests/setup/global-db.ts"],
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
