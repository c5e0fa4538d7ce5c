import type { Config } from "../config.ts";
import { createLocalDiskStorage, type MediaStorage } from "./media.storage.ts";
import { createS3Storage, type S3Settings } from "./media.storage-s3.ts";

type StoreConfig = Pick<
  Config,
  "MEDIA_STORE" | "MEDIA_DIR" | "S3_BUCKET" | "S3_ENDPOINT" | "S3_REGION" | "S3_ACCESS_KEY_ID" | "S3_SECRET_ACCESS_KEY" | "S3_FORCE_PATH_STYLE" | "S3_PREFIX" | "MEDIA_PRIVATE_DELIVERY" | "MEDIA_PRESIGN_SECONDS"
>;

/** The S3 settings of a configuration (loadConfig has checked that a bucket is named). */
export function s3SettingsOf(config: StoreConfig): S3Settings {
  if (!config.S3_BUCKET) throw new Error("S3_BUCKET is not set");
  return {
    bucket: config.S3_BUCKET,
    endpoint: config.S3_ENDPOINT,
    region: config.S3_REGION,
    accessKeyId: config.S3_ACCESS_KEY_ID,
    secretAccessKey: config.S3_SECRET_ACCESS_KEY,
    forcePathStyle: config.S3_FORCE_PATH_STYLE,
    prefix: config.S3_PREFIX,
  };
}

/**
 * The configured store (MEDIA_STORE), with the private-delivery choice attached: the one place
 * that knows which store holds the bytes (decision 066).
 */
export function createMediaStorage(config: StoreConfig): MediaStorage & { close(): void } {
  if (config.MEDIA_STORE === "local") return { ...createLocalDiskStorage(config.MEDIA_DIR), close() {} };
  const store = createS3Storage(s3SettingsOf(config));
  return config.MEDIA_PRIVATE_DELIVERY === "presigned" ? Object.assign(store, { presignSeconds: config.MEDIA_PRESIGN_SECONDS }) : store;
}
