import { randomBytes } from "node:crypto";
import { existsSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ConfigError, loadConfig } from "../../server/config.ts";
import { createS3Storage } from "../../server/media/media.storage-s3.ts";
import type { MediaStorage } from "../../server/media/media.storage.ts";
import { startFakeS3, type FakeS3 } from "../../scripts/layout/fake-s3.ts";

let s3: FakeS3;
let store: MediaStorage & { close(): void };
let other: MediaStorage & { close(): void };
let work: string;

const settings = (prefix: string) => ({
  bucket: s3.bucket,
  endpoint: s3.endpoint,
  region: "us-east-1",
  accessKeyId: s3.env.S3_ACCESS_KEY_ID,
  secretAccessKey: s3.env.S3_SECRET_ACCESS_KEY,
  forcePathStyle: true,
  prefix,
});

beforeAll(async () => {
  s3 = await startFakeS3();
  store = createS3Storage(settings("contract/"));
  other = createS3Storage(settings("elsewhere/"));
  work = mkdtempSync(path.join(tmpdir(), "plumbline-s3-contract-"));
});
afterAll(async () => {
  store?.close();
  other?.close();
  await s3?.close();
  if (work) rmSync(work, { recursive: true, force: true });
});

const read = async (s: MediaStorage, key: string, range?: { start: number; end: number }) => {
  const file = await s.stream(key, range);
  if (!file) return null;
  const chunks: Buffer[] = [];
  for await (const c of file.stream) chunks.push(Buffer.from(c as Uint8Array));
  return { data: Buffer.concat(chunks), bytes: file.bytes, size: file.size };
};

describe("the S3 store keeps the MediaStorage contract (s3rver on loopback)", () => {
  it("put, get, stream whole and in part, delete (twice is fine), missing keys are null", async () => {
    const data = randomBytes(5000);
    await store.put("originals/ab/photo.jpg", data);
    expect((await store.get("originals/ab/photo.jpg"))!.equals(data)).toBe(true);
    const whole = (await read(store, "originals/ab/photo.jpg"))!;
    expect(whole).toMatchObject({ bytes: 5000, size: 5000 });
    expect(whole.data.equals(data)).toBe(true);
    const part = (await read(store, "originals/ab/photo.jpg", { start: 1000, end: 1999 }))!;
    expect(part).toMatchObject({ bytes: 1000, size: 5000 });
    expect(part.data.equals(data.subarray(1000, 2000))).toBe(true);
    // The prefix is the store's own space: another prefix does not see the key.
    expect(await other.get("originals/ab/photo.jpg")).toBeNull();
    await store.delete("originals/ab/photo.jpg");
    await store.delete("originals/ab/photo.jpg");
    expect(await store.get("originals/ab/photo.jpg")).toBeNull();
    expect(await store.stream("originals/ab/photo.jpg")).toBeNull();
  });

  it("refuses keys that are not plain relative names, before asking the store", async () => {
    for (const key of ["../escape", "/abs", "variants/../x", "Variants/UPPER.jpg", ""]) {
      await expect(store.put(key, Buffer.from("x"))).rejects.toThrow(RangeError);
      await expect(store.get(key)).rejects.toThrow(RangeError);
    }
  });

  it("lists every key under a prefix, across pages, with its last write time, and nothing of a sibling prefix", async () => {
    const before = Date.now() - 2000;
    const keys = Array.from({ length: 1005 }, (_, i) => `variants/list-${String(i).padStart(4, "0")}-320w.webp`);
    for (let i = 0; i < keys.length; i += 50) await Promise.all(keys.slice(i, i + 50).map((k) => store.put(k, Buffer.from(k))));
    await store.put("variantsx/not-under.webp", Buffer.from("x"));
    const seen: Array<{ key: string; modifiedAt: Date }> = [];
    for await (const e of store.list("variants")) seen.push(e);
    expect(seen.map((e) => e.key).sort()).toEqual(keys);
    expect(seen.every((e) => e.modifiedAt.getTime() >= before && e.modifiedAt.getTime() <= Date.now() + 2000)).toBe(true);
    const all: string[] = [];
    for await (const e of store.list("")) all.push(e.key);
    expect(all).toContain("variantsx/not-under.webp");
    expect(all.length).toBe(1006);
  });

  it("putFile sends a file over 8 MB in parts, stores it whole and removes the temporary file", async () => {
    const big = randomBytes(19 * 1024 * 1024 + 123);
    const file = path.join(work, "upload.tmp");
    writeFileSync(file, big);
    await store.putFile("originals/cd/big.jpg", file);
    expect(existsSync(file)).toBe(false);
    const back = (await store.get("originals/cd/big.jpg"))!;
    expect(back.length).toBe(big.length);
    expect(back.equals(big)).toBe(true);
  });

  it("presigns a GET that fetches the bytes with the asked content type and expires as asked", async () => {
    const data = randomBytes(300);
    await store.put("variants/signed-320w.jpg", data);
    const url = new URL(await store.presignedUrl!("variants/signed-320w.jpg", 120, { contentType: "image/jpeg", disposition: "inline" }));
    expect(url.searchParams.get("X-Amz-Expires")).toBe("120");
    const res = await fetch(url);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("image/jpeg");
    expect(res.headers.get("cache-control")).toBe("private, no-store");
    expect(Buffer.from(await res.arrayBuffer()).equals(data)).toBe(true);
  });
});

describe("the store's settings", () => {
  const base = { DATABASE_URL: "mysql://u:p@127.0.0.1/x", SESSION_SECRET: "a-session-secret-of-length" };
  it("local by default; s3 needs a bucket; keys go in pairs; presigned lifetimes are at most 15 minutes", () => {
    const c = loadConfig(base);
    expect(c).toMatchObject({ MEDIA_STORE: "local", S3_REGION: "us-east-1", S3_FORCE_PATH_STYLE: false, S3_PREFIX: "", MEDIA_PRIVATE_DELIVERY: "stream", MEDIA_PRESIGN_SECONDS: 300 });
    expect(() => loadConfig({ ...base, MEDIA_STORE: "s3" })).toThrow(/S3_BUCKET is required when MEDIA_STORE is s3/);
    expect(() => loadConfig({ ...base, MEDIA_STORE: "s3", S3_BUCKET: "b1b", S3_ACCESS_KEY_ID: "k" })).toThrow(ConfigError);
    expect(() => loadConfig({ ...base, MEDIA_STORE: "s3", S3_BUCKET: "b1b", MEDIA_PRESIGN_SECONDS: "901" })).toThrow(/MEDIA_PRESIGN_SECONDS/);
    expect(() => loadConfig({ ...base, MEDIA_STORE: "disk" })).toThrow(/MEDIA_STORE must be local or s3/);
    expect(() => loadConfig({ ...base, S3_PREFIX: "no-slash" })).toThrow(/S3_PREFIX/);
    expect(loadConfig({ ...base, MEDIA_STORE: "s3", S3_BUCKET: "plumbline-media", S3_FORCE_PATH_STYLE: "true", S3_PREFIX: "site/" })).toMatchObject({ S3_FORCE_PATH_STYLE: true, S3_PREFIX: "site/" });
  });
});
