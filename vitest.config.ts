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
          // The pinned AWS SDK runs on Node 20; its notice that later releases will not is known (decision 066).
          env: { AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: "true" },
          globalSetup: ["tests/setup/global-db.ts"],
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        // The media and document tests again, with the stored files in an S3-compatible store
        // (s3rver on loopback) instead of the local disk (decision 066).
        test: {
          name: "server-s3",
          include: ["tests/server/media-*.test.ts", "tests/server/documents-library.test.ts"],
          // These start fake S3 stores of their own whichever project runs them.
          exclude: ["tests/server/media-s3*.test.ts", "tests/server/media-move.test.ts"],
          environment: "node",
          // The pinned SDK runs on Node 20; its notice that later releases will not is known (decision 066).
          env: { TEST_MEDIA_STORE: "s3", AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: "true" },
          globalSetup: ["tests/setup/global-s3.ts"],
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
      {
        // The several-machine layout on loopback: a three-node Galera cluster and HAProxy with
        // deploy/haproxy.cfg (decision 067). They start their own servers, one file at a time.
        test: {
          name: "layout",
          include: ["tests/layout/**/*.test.ts"],
          environment: "node",
          // As for the server projects (decision 066); the app processes it starts inherit it.
          env: { AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: "true" },
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
          fileParallelism: false,
          testTimeout: 180_000,
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
