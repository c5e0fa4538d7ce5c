import { spawn } from "node:child_process";
import { mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { createInterface } from "node:readline";
import { fileURLToPath } from "node:url";

/** s3rver's built-in account: it checks request signatures against these. */
const ACCESS_KEY_ID = "S3RVER";
const SECRET_ACCESS_KEY = "S3RVER";
const BUCKET = "plumbline-media";
const SERVER = path.join(path.dirname(fileURLToPath(import.meta.url)), "fake-s3-server.mjs");

export interface FakeS3 {
  /** The app's settings for this store (MEDIA_STORE=s3 and the S3_* keys of server/config.ts). */
  env: Record<string, string>;
  endpoint: string;
  bucket: string;
  close(): Promise<void>;
}

/**
 * A real S3 API (s3rver, from npm) on loopback with one bucket, in a process of its own, for the
 * tests, `npm run scale` and the demo. Its objects live in `dir` (a new temporary folder when none
 * is given, removed again on close); the port is a free one unless given.
 */
export async function startFakeS3(opts: { dir?: string; port?: number } = {}): Promise<FakeS3> {
  const ownDir = !opts.dir;
  const dir = opts.dir ?? (await mkdtemp(path.join(os.tmpdir(), "plumbline-s3-")));
  const child = spawn(process.execPath, ["--openssl-legacy-provider", SERVER], {
    env: { ...process.env, FAKE_S3_DIR: dir, FAKE_S3_PORT: String(opts.port ?? 0), FAKE_S3_BUCKET: BUCKET },
    stdio: ["ignore", "pipe", "inherit"],
  });
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  const port = await new Promise<number>((resolve, reject) => {
    const lines = createInterface({ input: child.stdout! });
    lines.once("line", (line) => {
      lines.close();
      resolve((JSON.parse(line) as { port: number }).port);
    });
    child.once("exit", (code) => reject(new Error(`the fake S3 store stopped before listening (exit ${code})`)));
    child.once("error", reject);
  });
  const endpoint = `http://127.0.0.1:${port}`;
  let closed = false;
  return {
    endpoint,
    bucket: BUCKET,
    env: {
      MEDIA_STORE: "s3",
      S3_BUCKET: BUCKET,
      S3_ENDPOINT: endpoint,
      S3_REGION: "us-east-1",
      S3_ACCESS_KEY_ID: ACCESS_KEY_ID,
      S3_SECRET_ACCESS_KEY: SECRET_ACCESS_KEY,
      // s3rver answers on one host name; virtual-hosted buckets would need DNS names for each.
      S3_FORCE_PATH_STYLE: "true",
    },
    async close() {
      if (closed) return;
      closed = true;
      if (child.exitCode === null && child.signalCode === null) child.kill("SIGTERM");
      await exited;
      if (ownDir) await rm(dir, { recursive: true, force: true });
    },
  };
}
