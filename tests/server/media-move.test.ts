import { execFile } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createLocalDiskStorage, type MediaStorage } from "../../server/media/media.storage.ts";
import { createS3Storage } from "../../server/media/media.storage-s3.ts";
import { startFakeS3, type FakeS3 } from "../../scripts/layout/fake-s3.ts";

const ROOT = path.resolve(import.meta.dirname, "../..");
let s3: FakeS3;
let work: string;
let bucket: MediaStorage & { close(): void };
const files = new Map<string, Buffer>();

/** `npm run media:move` as an operator runs it (the TypeScript entry the npm script's shell wrapper runs), with its exit code and output. */
function move(args: string[], env: Record<string, string>): Promise<{ code: number; out: string }> {
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      ["--import", "tsx", "scripts/media-move.ts", ...args],
      { cwd: ROOT, env: { PATH: process.env.PATH ?? "", AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: "true", ...env } },
      (err, stdout, stderr) => resolve({ code: err ? Number((err as { code?: number }).code ?? 1) : 0, out: `${stdout}${stderr}` }),
    );
  });
}

const keysOf = async (store: MediaStorage) => {
  const keys: string[] = [];
  for await (const { key } of store.list("")) keys.push(key);
  return keys.sort();
};

beforeAll(async () => {
  s3 = await startFakeS3();
  work = mkdtempSync(path.join(tmpdir(), "plumbline-media-move-"));
  bucket = createS3Storage({ bucket: s3.bucket, endpoint: s3.endpoint, region: "us-east-1", accessKeyId: s3.env.S3_ACCESS_KEY_ID, secretAccessKey: s3.env.S3_SECRET_ACCESS_KEY, forcePathStyle: true, prefix: "moved/" });
  const local = createLocalDiskStorage(path.join(work, "media"));
  for (const key of ["originals/ab/one.jpg", "originals/cd/two.png", "variants/0123456789abcdef-320w.webp", "variants/0123456789abcdef-640w.avif", "documents/ef/plan.pdf", "documents/ef/terms.pdf"]) {
    const data = randomBytes(2000 + files.size * 700);
    files.set(key, data);
    await local.put(key, data);
  }
});
afterAll(async () => {
  bucket?.close();
  await s3?.close();
  if (work) rmSync(work, { recursive: true, force: true });
});

describe("npm run media:move", () => {
  const toS3 = () => ({ MEDIA_DIR: path.join(work, "media"), DATA_DIR: path.join(work, "data"), ...s3.env, MEDIA_STORE: "local", S3_PREFIX: "moved/" });
  const settingFile = () => path.join(work, "data", "media-store.env");

  it("with a failing destination: exit 1, the failed keys named, nothing switched", async () => {
    const r = await move(["--to", "s3"], { ...toS3(), S3_BUCKET: "no-such-bucket" });
    expect(r.code).toBe(1);
    expect(r.out).toContain("Nothing was switched");
    for (const key of files.keys()) expect(r.out).toContain(key);
    expect(existsSync(settingFile())).toBe(false);
  });

  it("--to s3, stopped after 2 keys, corrupted at the destination, run again: every key verified, the setting written only at the end", async () => {
    const first = await move(["--to", "s3", "--limit", "2"], toS3());
    expect(first.code).toBe(3);
    expect(first.out).toContain("nothing was switched");
    expect(existsSync(settingFile())).toBe(false);
    const copied = await keysOf(bucket);
    expect(copied).toHaveLength(2);

    // A torn or altered copy: the same key, other bytes. The checksum must catch it.
    await bucket.put(copied[0]!, Buffer.from("not the original bytes"));

    const second = await move(["--to", "s3"], toS3());
    expect(second.code).toBe(0);
    expect(second.out).toMatch(/6 keys: 5 copied and verified, 1 already there and verified, 0 failed/);
    expect(second.out).toContain(`${copied[0]}: copied`);
    expect(await keysOf(bucket)).toEqual([...files.keys()].sort());
    for (const [key, data] of files) expect((await bucket.get(key))!.equals(data)).toBe(true);

    expect(statSync(settingFile()).mode & 0o777).toBe(0o600);
    const setting = readFileSync(settingFile(), "utf8");
    expect(setting).toMatch(/^MEDIA_STORE='s3'$/m);
    expect(setting).toMatch(new RegExp(`^S3_ENDPOINT='${s3.endpoint}'$`, "m"));
    expect(setting).toMatch(/^S3_PREFIX='moved\/'$/m);
    expect(setting).toMatch(/^S3_SECRET_ACCESS_KEY='S3RVER'$/m);

    // Run once more (the same settings): nothing to copy, every key checked again.
    const third = await move(["--to", "s3"], toS3());
    expect(third.code).toBe(0);
    expect(third.out).toMatch(/6 keys: 0 copied and verified, 6 already there and verified, 0 failed/);
  });

  it("--to local, the way back, resumable too; then the setting names the local folder", async () => {
    const back = path.join(work, "media-back");
    const env = { ...s3.env, MEDIA_STORE: "s3", S3_PREFIX: "moved/", MEDIA_DIR: back, DATA_DIR: path.join(work, "data") };
    const part = await move(["--to", "local", "--limit", "4"], env);
    expect(part.code).toBe(3);
    expect(readFileSync(settingFile(), "utf8")).toMatch(/^MEDIA_STORE='s3'$/m);
    const local = createLocalDiskStorage(back);
    expect(await keysOf(local)).toHaveLength(4);
    const rest = await move(["--to", "local"], env);
    expect(rest.code).toBe(0);
    expect(rest.out).toMatch(/6 keys: 2 copied and verified, 4 already there and verified, 0 failed/);
    for (const [key, data] of files) expect((await local.get(key))!.equals(data)).toBe(true);
    const setting = readFileSync(settingFile(), "utf8");
    expect(setting).toMatch(/^MEDIA_STORE='local'$/m);
    expect(setting).toContain(`MEDIA_DIR='${back}'`);
    expect(setting).not.toContain("S3_SECRET_ACCESS_KEY");
  });
});
