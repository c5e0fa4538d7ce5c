import { createReadStream } from "node:fs";
import { rm } from "node:fs/promises";
import type { Readable } from "node:stream";
import { DeleteObjectCommand, GetObjectCommand, PutObjectCommand, S3Client, S3ServiceException, paginateListObjectsV2 } from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";
import { getSignedUrl } from "@aws-sdk/s3-request-presigner";
import { checkKey, type MediaStorage } from "./media.storage.ts";

export interface S3Settings {
  bucket: string;
  /** For stores other than AWS; unset, the region's AWS endpoint. */
  endpoint?: string;
  region: string;
  /** Both or neither; neither asks the SDK's default chain (environment, shared files, instance role). */
  accessKeyId?: string;
  secretAccessKey?: string;
  forcePathStyle: boolean;
  /** Prepended to every key ("" or ending in "/"), for a bucket shared with other data. */
  prefix: string;
}

/** Multipart parts for large originals: S3's minimum is 5 MB; 8 MB keeps a 40 MB photo to five parts. */
const PART_BYTES = 8 * 1024 * 1024;

/** Whether an SDK error says the key is not there (S3 names it; some compatible stores only send 404). */
function isMissing(err: unknown): boolean {
  if (err instanceof S3ServiceException) return err.name === "NoSuchKey" || err.name === "NotFound" || err.$metadata.httpStatusCode === 404;
  return false;
}

/** `bytes 0-99/1234` → 1234. */
function totalOf(contentRange: string | undefined): number | null {
  const m = contentRange ? /\/(\d+)$/.exec(contentRange) : null;
  return m ? Number(m[1]) : null;
}

/**
 * Media storage in an S3-compatible bucket through the official SDK (decision 066). Writes are
 * atomic as on the local disk: S3 makes an object visible only once PutObject or the multipart
 * upload has completed.
 */
export function createS3Storage(settings: S3Settings): MediaStorage & { close(): void } {
  const client = new S3Client({
    region: settings.region,
    ...(settings.endpoint ? { endpoint: settings.endpoint } : {}),
    forcePathStyle: settings.forcePathStyle,
    ...(settings.accessKeyId && settings.secretAccessKey ? { credentials: { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey } } : {}),
    // The SDK's default CRC checksums (streamed as aws-chunked trailers) are refused by many
    // S3-compatible stores; content is verified by its own SHA-256 where it matters (media:move).
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
  });
  const Bucket = settings.bucket;
  const full = (key: string) => settings.prefix + checkKey(key);

  async function getObject(key: string, range?: { start: number; end: number }) {
    try {
      return await client.send(new GetObjectCommand({ Bucket, Key: full(key), ...(range ? { Range: `bytes=${range.start}-${range.end}` } : {}) }));
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  return {
    async put(key, data) {
      await client.send(new PutObjectCommand({ Bucket, Key: full(key), Body: data, ContentLength: data.length }));
    },
    async putFile(key, filePath) {
      const upload = new Upload({ client, params: { Bucket, Key: full(key), Body: createReadStream(filePath) }, partSize: PART_BYTES, queueSize: 2, leavePartsOnError: false });
      await upload.done();
      // Stored: the temporary file's work is done, as the local store's rename ends it.
      await rm(filePath, { force: true });
    },
    async get(key) {
      const res = await getObject(key);
      if (!res?.Body) return null;
      return Buffer.from(await res.Body.transformToByteArray());
    },
    async stream(key, range) {
      const res = await getObject(key, range);
      if (!res?.Body) return null;
      const bytes = Number(res.ContentLength ?? 0);
      return { stream: res.Body as Readable, bytes, size: totalOf(res.ContentRange) ?? bytes };
    },
    async delete(key) {
      // S3 answers a delete of a missing key with success too.
      await client.send(new DeleteObjectCommand({ Bucket, Key: full(key) }));
    },
    async *list(prefix) {
      const under = prefix.split("/").filter(Boolean).join("/");
      const Prefix = settings.prefix + (under ? `${under}/` : "");
      for await (const page of paginateListObjectsV2({ client, pageSize: 1000 }, { Bucket, Prefix })) {
        for (const o of page.Contents ?? []) {
          if (!o.Key) continue;
          yield { key: o.Key.slice(settings.prefix.length), modifiedAt: o.LastModified ?? new Date(0) };
        }
      }
    },
    presignedUrl(key, seconds, response) {
      const command = new GetObjectCommand({
        Bucket,
        Key: full(key),
        ResponseContentType: response.contentType,
        ...(response.disposition ? { ResponseContentDisposition: response.disposition } : {}),
        // The URL is a bearer pass for minutes: neither it nor the bytes belong in a shared cache.
        ResponseCacheControl: "private, no-store",
      });
      return getSignedUrl(client, command, { expiresIn: seconds });
    },
    close() {
      client.destroy();
    },
  };
}
