import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { pino } from "pino";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createMediaJobs } from "../../server/media/media.jobs.ts";
import type { MediaStorage } from "../../server/media/media.storage.ts";
import { DEMO, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";
import { makeGradientImage } from "../helpers/images.ts";

let t: TestApp;
let mediaDir: string;
let project: { id: number; slug: string };
let marketing: { agent: Agent; csrf: string };
const silent = pino({ level: "silent" });

beforeAll(async () => {
  mediaDir = mkdtempSync(path.join(tmpdir(), "plumbline-media-jobs-"));
  t = await startTestApp({ MEDIA_DIR: mediaDir });
  const slug = `media-jobs-${Date.now().toString(36)}`;
  const [id] = await t.db("projects").insert({ slug, name: `Media jobs test ${slug}`, operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
  project = { id: Number(id), slug };
  marketing = await signIn(t, DEMO.marketing);
  // Start from an empty queue: the demo seed's photos are processed already, but be sure.
  await t.drainMediaJobs();
});
afterAll(async () => {
  await t?.close();
  rmSync(mediaDir, { recursive: true, force: true });
});

let n = 0;
async function upload(): Promise<number> {
  n += 1;
  const bytes = await makeGradientImage({ width: 700, height: 500, from: `#${(0x203040 + n * 0x0b0905).toString(16).slice(-6)}`, to: "#e0c090" });
  const res = await marketing.agent.post("/api/media").set("X-CSRF-Token", marketing.csrf).field("project", project.slug).attach("files", bytes, `job-${n}.jpg`).expect(201);
  return res.body[0].id as number;
}

const variantFiles = () => (existsSync(path.join(mediaDir, "variants")) ? readdirSync(path.join(mediaDir, "variants")).sort() : []);
/** Variant keys of one photo, or of every photo of the test project (whose files alone are in its media folder). */
const variantRows = async (mediaId?: number) =>
  (
    (await t
      .db("media_variants as v")
      .join("media_items as i", "i.id", "v.media_id")
      .where("i.project_id", project.id)
      .modify((q) => (mediaId ? q.where("v.media_id", mediaId) : q))
      .select("v.storage_key")) as Array<{ storage_key: string }>
  )
    .map((r) => r.storage_key.replace(/^variants\//, ""))
    .sort();
const itemOf = async (id: number) => (await t.db("media_items").where({ id }).first("status", "failure_reason")) as { status: string; failure_reason: string | null };
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A second worker, as another process would run one, over the same database and storage. */
function otherWorker(storage: MediaStorage = t.plumbline.mediaStorage, leaseMs = 300) {
  return createMediaJobs({ media: t.plumbline.media, storage, uploads: t.plumbline.mediaUploads, logger: silent, workers: 0, maxPixels: 100_000_000, leaseMs });
}

describe("media jobs: crash safety", () => {
  it("a job whose worker died after claiming it (lease abandoned) is re-run by another worker: exactly one set of variants", async () => {
    const id = await upload();
    // A lease long enough that a busy machine still asks again before it runs out.
    const job = await t.plumbline.media.queue.claim(3_000);
    expect(job?.mediaId).toBe(id);
    // The claiming process "dies": nothing more happens under that lease.
    expect(await t.drainMediaJobs()).toBe(0); // still leased: nobody else may take it yet
    await sleep(3_100);
    expect(await t.drainMediaJobs()).toBe(1);
    expect(await itemOf(id)).toMatchObject({ status: "ready" });
    // 700 px wide: 320, 640 and 700 in three formats.
    const rows = await variantRows(id);
    expect(rows).toHaveLength(9);
    expect(variantFiles()).toEqual(await variantRows());
    // The dead worker's late commit is refused: its lease token is no longer the job's.
    expect(await t.plumbline.media.queue.complete(job!, { width: 1, height: 1, placeholder: "", dominantColor: "#000000", variants: [] })).toBe(false);
    expect(await variantRows(id)).toEqual(rows);
  });

  it("a worker that hangs mid-write loses the job to another; when it wakes, its commit is refused and no file is left over", async () => {
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
    const a = otherWorker(hanging, 300);
    const aRun = a.runOne();
    await hung;
    // Two of its files are written, no row yet: nothing is half-made in the database.
    expect(await itemOf(id)).toMatchObject({ status: "processing" });
    expect(await variantRows(id)).toEqual([]);
    await sleep(400);
    expect(await t.drainMediaJobs()).toBe(1);
    const rows = await variantRows(id);
    expect(rows).toHaveLength(9);
    release();
    expect(await aRun).toBe(true);
    expect(await variantRows(id)).toEqual(rows);
    expect(variantFiles()).toEqual(await variantRows());
  });

  it("files a crashed attempt wrote that the re-run does not make are deleted after the re-run commits", async () => {
    const id = await upload();
    const job = (await t.plumbline.media.queue.claim(300))!;
    const stray = "variants/0123456789abcdef-320w.webp";
    expect(await t.plumbline.media.queue.stage(job, [stray])).toEqual([]);
    await t.plumbline.mediaStorage.put(stray, Buffer.from("half of another encoder's output"));
    expect(variantFiles()).toContain("0123456789abcdef-320w.webp");
    await sleep(400);
    expect(await t.drainMediaJobs()).toBe(1);
    expect(await itemOf(id)).toMatchObject({ status: "ready" });
    expect(variantFiles()).not.toContain("0123456789abcdef-320w.webp");
    expect(variantFiles()).toEqual(await variantRows());
  });

  it("after three attempts that never finish, the photo is marked failed, its job removed, and nothing is served", async () => {
    const id = await upload();
    for (let i = 0; i < 3; i += 1) {
      expect((await t.plumbline.media.queue.claim(50))?.mediaId).toBe(id);
      await sleep(80);
    }
    expect(await t.drainMediaJobs()).toBe(0);
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
    const [x, y] = await Promise.all([otherWorker(undefined, 60_000).drain(), otherWorker(undefined, 60_000).drain()]);
    expect(x + y).toBe(4);
    for (const id of ids) {
      expect(await itemOf(id)).toMatchObject({ status: "ready" });
      expect(await variantRows(id)).toHaveLength(9);
    }
    expect(variantFiles()).toEqual(await variantRows());
  });

  it("a running worker picks up an upload by itself and stops cleanly", async () => {
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
    const uploadsDir = path.join(mediaDir, ".uploads");
    mkdirSync(uploadsDir, { recursive: true });
    const old = path.join(uploadsDir, "left-by-a-crash.upload");
    const young = path.join(uploadsDir, "arriving-now.upload");
    writeFileSync(old, "partial upload");
    writeFileSync(young, "another process is receiving this");
    const twoHoursAgo = new Date(Date.now() - 2 * 3600_000);
    utimesSync(old, twoHoursAgo, twoHoursAgo);

    const id = await upload();
    await t.plumbline.media.queue.claim(1);
    await sleep(20);
    const worker = createMediaJobs({ media: t.plumbline.media, storage: t.plumbline.mediaStorage, uploads: t.plumbline.mediaUploads, logger: silent, workers: 0, maxPixels: 100_000_000 });
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
