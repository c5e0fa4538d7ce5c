import { existsSync, mkdirSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import path from "node:path";
import { pino } from "pino";
import { beforeAll, describe, expect, it } from "vitest";
import { createMediaJobs } from "../../server/media/media.jobs.ts";
import type { MediaStorage } from "../../server/media/media.storage.ts";
import { useMediaFixture } from "../helpers/media-fixture.ts";
import { makeGradientImage } from "../helpers/images.ts";

const f = useMediaFixture("media-jobs");
const silent = pino({ level: "silent" });

beforeAll(async () => {
  // Start from an empty queue: the demo seed's photos are processed already, but be sure.
  await f.t.drainMediaJobs();
});

let n = 0;
async function upload(): Promise<number> {
  const { marketing, project } = f;
  n += 1;
  const bytes = await makeGradientImage({ width: 700, height: 500, from: `#${(0x203040 + n * 0x0b0905).toString(16).slice(-6)}`, to: "#e0c090" });
  const res = await marketing.agent.post("/api/media").set("X-CSRF-Token", marketing.csrf).field("project", project.slug).attach("files", bytes, `job-${n}.jpg`).expect(201);
  return res.body[0].id as number;
}

/** The derivative files in the app's store (its own folder, or its own prefix in the S3 bucket). */
const variantFiles = async () => {
  const names: string[] = [];
  for await (const { key } of f.t.plumbline.mediaStorage.list("variants")) names.push(key.replace(/^variants\//, ""));
  return names.sort();
};
/** Variant keys of one photo, or of every photo of the test project (whose files alone are in its media folder). */
const variantRows = async (mediaId?: number) =>
  (
    (await f.t
      .db("media_variants as v")
      .join("media_items as i", "i.id", "v.media_id")
      .where("i.project_id", f.project.id)
      .modify((q) => (mediaId ? q.where("v.media_id", mediaId) : q))
      .select("v.storage_key")) as Array<{ storage_key: string }>
  )
    .map((r) => r.storage_key.replace(/^variants\//, ""))
    .sort();
const itemOf = async (id: number) => (await f.t.db("media_items").where({ id }).first("status", "failure_reason")) as { status: string; failure_reason: string | null };
/** `ms` after `at`: the time a worker's clock is set to, instead of waiting for it. */
const after = (at: Date, ms: number) => new Date(at.getTime() + ms);

/**
 * A second worker, as another process would run one, over the same database and storage; with
 * `now`, its clock (for leases) reads that time, else the database's clock decides.
 */
function otherWorker(opts: { storage?: MediaStorage; leaseMs?: number; now?: Date } = {}) {
  const { t } = f;
  const now = opts.now;
  return createMediaJobs({
    media: t.plumbline.media,
    storage: opts.storage ?? t.plumbline.mediaStorage,
    uploads: t.plumbline.mediaUploads,
    logger: silent,
    workers: 0,
    maxPixels: 100_000_000,
    leaseMs: opts.leaseMs ?? 60_000,
    ...(now ? { now: () => now } : {}),
  });
}

describe("media jobs: crash safety", () => {
  it("a job whose worker died after claiming it (lease abandoned) is re-run by another worker: exactly one set of variants", async () => {
    const { t } = f;
    const id = await upload();
    const at = new Date();
    const job = await t.plumbline.media.queue.claim(60_000, at);
    expect(job?.mediaId).toBe(id);
    // The claiming process "dies": nothing more happens under that lease.
    expect(await t.drainMediaJobs()).toBe(0); // still leased: nobody else may take it yet
    expect(await otherWorker({ now: after(at, 59_000) }).drain()).toBe(0);
    expect(await otherWorker({ now: after(at, 60_001) }).drain()).toBe(1);
    expect(await itemOf(id)).toMatchObject({ status: "ready" });
    // 700 px wide: 320, 640 and 700 in three formats.
    const rows = await variantRows(id);
    expect(rows).toHaveLength(9);
    expect(await variantFiles()).toEqual(await variantRows());
    // The dead worker's late commit is refused: its lease token is no longer the job's.
    expect(await t.plumbline.media.queue.complete(job!, { width: 1, height: 1, placeholder: "", dominantColor: "#000000", variants: [] })).toBe(false);
    expect(await variantRows(id)).toEqual(rows);
  });

  it("a worker that hangs mid-write loses the job to another; when it wakes, its commit is refused and no file is left over", async () => {
    const { t } = f;
    const id = await upload();
    const real = t.plumbline.mediaStorage;
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    let reached!: () => void;
    const hung = new Promise<void>((r) => (reached = r));
    let puts = 0;
    const hanging: MediaStorage = {
      ...real,
      async put(key, data) {
        puts += 1;
        if (puts === 3) {
          reached();
          await gate;
        }
        return real.put(key, data);
      },
    };
    const at = new Date();
    const a = otherWorker({ storage: hanging, now: at });
    const aRun = a.runOne();
    await hung;
    // Two of its files are written, no row yet: nothing is half-made in the database.
    expect(await itemOf(id)).toMatchObject({ status: "processing" });
    expect(await variantRows(id)).toEqual([]);
    // Its lease runs out while it hangs: another worker takes the job over.
    expect(await otherWorker({ now: after(at, 60_001) }).drain()).toBe(1);
    const rows = await variantRows(id);
    expect(rows).toHaveLength(9);
    release();
    expect(await aRun).toBe(true);
    expect(await variantRows(id)).toEqual(rows);
    expect(await variantFiles()).toEqual(await variantRows());
  });

  it("files a crashed attempt wrote that the re-run does not make are deleted after the re-run commits", async () => {
    const { t } = f;
    const id = await upload();
    const at = new Date();
    const job = (await t.plumbline.media.queue.claim(60_000, at))!;
    const stray = "variants/0123456789abcdef-320w.webp";
    expect(await t.plumbline.media.queue.stage(job, [stray])).toEqual([]);
    await t.plumbline.mediaStorage.put(stray, Buffer.from("half of another encoder's output"));
    expect(await variantFiles()).toContain("0123456789abcdef-320w.webp");
    expect(await otherWorker({ now: after(at, 60_001) }).drain()).toBe(1);
    expect(await itemOf(id)).toMatchObject({ status: "ready" });
    expect(await variantFiles()).not.toContain("0123456789abcdef-320w.webp");
    expect(await variantFiles()).toEqual(await variantRows());
  });

  it("after three attempts that never finish, the photo is marked failed, its job removed, and nothing is served", async () => {
    const { t, marketing } = f;
    const id = await upload();
    const at = new Date();
    // Each attempt's one-second lease has run out when the next is claimed, two seconds on.
    for (let i = 0; i < 3; i += 1) {
      expect((await t.plumbline.media.queue.claim(1_000, after(at, i * 2_000)))?.mediaId).toBe(id);
    }
    expect(await otherWorker({ now: after(at, 6_000) }).drain()).toBe(0);
    expect(await itemOf(id)).toMatchObject({ status: "failed", failure_reason: expect.stringMatching(/3 attempts/) });
    expect(await t.db("media_jobs").where({ media_id: id }).first()).toBeUndefined();
    expect(await variantRows(id)).toEqual([]);
    // A member of staff may queue it again.
    const retried = await marketing.agent.post(`/api/media/${id}/retry`).set("X-CSRF-Token", marketing.csrf).expect(200);
    expect(retried.body.status).toBe("processing");
    expect(await t.drainMediaJobs()).toBe(1);
    expect(await itemOf(id)).toMatchObject({ status: "ready" });
  });

  it("an original missing from storage fails the photo at once with the reason", async () => {
    const { t } = f;
    const id = await upload();
    const { original_key } = await t.db("media_items").where({ id }).first("original_key");
    await t.plumbline.mediaStorage.delete(original_key);
    expect(await t.drainMediaJobs()).toBe(1);
    expect(await itemOf(id)).toMatchObject({ status: "failed", failure_reason: expect.stringMatching(/original file is missing/) });
  });
});

describe("media jobs: several workers share the queue", () => {
  it("two workers draining at once process each photo exactly once (SKIP LOCKED)", async () => {
    const ids = [await upload(), await upload(), await upload(), await upload()];
    const [x, y] = await Promise.all([otherWorker().drain(), otherWorker().drain()]);
    expect(x + y).toBe(4);
    for (const id of ids) {
      expect(await itemOf(id)).toMatchObject({ status: "ready" });
      expect(await variantRows(id)).toHaveLength(9);
    }
    expect(await variantFiles()).toEqual(await variantRows());
  });

  it("a running worker picks up an upload by itself and stops cleanly", async () => {
    const { t } = f;
    const worker = createMediaJobs({ media: t.plumbline.media, storage: t.plumbline.mediaStorage, uploads: t.plumbline.mediaUploads, logger: silent, workers: 1, maxPixels: 100_000_000, pollMs: 50 });
    await worker.start();
    try {
      const id = await upload();
      await expect.poll(async () => (await itemOf(id)).status, { timeout: 10_000, interval: 50 }).toBe("ready");
    } finally {
      await worker.stop();
    }
  });
});

describe("media jobs: start-up sweep", () => {
  it("removes temporary files older than the sweep age (not younger ones, which may be another process's) and re-queues expired leases", async () => {
    const { t } = f;
    const uploadsDir = path.join(t.config.MEDIA_DIR, ".uploads");
    mkdirSync(uploadsDir, { recursive: true });
    const old = path.join(uploadsDir, "left-by-a-crash.upload");
    const young = path.join(uploadsDir, "arriving-now.upload");
    writeFileSync(old, "partial upload");
    writeFileSync(young, "another process is receiving this");
    const twoHoursAgo = new Date(Date.now() - 2 * 3600_000);
    utimesSync(old, twoHoursAgo, twoHoursAgo);

    const id = await upload();
    const at = new Date();
    await t.plumbline.media.queue.claim(1_000, at);
    // Started after that lease ran out.
    const worker = createMediaJobs({ media: t.plumbline.media, storage: t.plumbline.mediaStorage, uploads: t.plumbline.mediaUploads, logger: silent, workers: 0, maxPixels: 100_000_000, now: () => after(at, 2_000) });
    await worker.start();
    expect(existsSync(old)).toBe(false);
    expect(existsSync(young)).toBe(true);
    const job = await t.db("media_jobs").where({ media_id: id }).first("state", "lease_token");
    expect(job).toEqual({ state: "queued", lease_token: null });
    await worker.stop();
    rmSync(young);
    expect(await t.drainMediaJobs()).toBe(1);
  });
});
