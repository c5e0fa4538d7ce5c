import type { TestProject } from "vitest/node";
import { startFakeS3 } from "../../scripts/layout/fake-s3.ts";
import { createLocalDiskStorage, testMediaDirFor } from "../../server/media/media.storage.ts";
import { createS3Storage } from "../../server/media/media.storage-s3.ts";
import { copyStore } from "../../server/media/media.storage-move.ts";
import setupDatabase from "./global-db.ts";

declare module "vitest" {
  export interface ProvidedContext {
    /** The app's settings for the fake S3 store (MEDIA_STORE=s3, S3_*), in the server-s3 project. */
    mediaS3Env: Record<string, string>;
  }
}

/**
 * The server-s3 project: the same throw-away database and demo seed as the server project, a
 * real S3 API (s3rver) on loopback, and the seed's files copied into its bucket the way
 * `npm run media:move -- --to s3` copies them, so seeded photos and documents resolve there.
 */
export default async function setup(project: TestProject) {
  // The pinned SDK runs on Node 20; its notice that later releases will not is known (decision 066).
  process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= "true";
  const dropDatabase = await setupDatabase(project);
  const s3 = await startFakeS3();
  try {
    const store = createS3Storage({ bucket: s3.bucket, endpoint: s3.endpoint, region: "us-east-1", accessKeyId: s3.env.S3_ACCESS_KEY_ID, secretAccessKey: s3.env.S3_SECRET_ACCESS_KEY, forcePathStyle: true, prefix: "" });
    const seeded = createLocalDiskStorage(testMediaDirFor(new URL(project.getProvidedContext().databaseUrl).pathname.slice(1)));
    const copied = await copyStore(seeded, store);
    store.close();
    if (copied.failed.length > 0) throw new Error(`the demo's files did not reach the fake S3 store: ${copied.failed.map((f) => f.key).join(", ")}`);
  } catch (err) {
    await s3.close();
    await dropDatabase();
    throw err;
  }
  project.provide("mediaS3Env", s3.env);
  return async () => {
    await s3.close();
    await dropDatabase();
  };
}
