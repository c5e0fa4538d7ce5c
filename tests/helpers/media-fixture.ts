import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import { DEMO, newClient, signIn, startTestApp, type Agent, type TestApp } from "./app.ts";
import { makeGradientImage } from "./images.ts";

export interface MediaFixture {
  t: TestApp;
  project: { id: number; slug: string };
  marketing: { agent: Agent; csrf: string };
  lead: { agent: Agent; csrf: string };
  investor: { agent: Agent; csrf: string };
  visitor: { agent: Agent; csrf: string };
  /** A photo uploaded through the API and processed by the real derivative pipeline. */
  readyPhoto(): Promise<MediaItem>;
  /** A lead's review of a photo. */
  review(id: number, sensitivity: "cleared" | "restricted"): Promise<unknown>;
}

/**
 * A test app with its own media folder and project, the staff, investor and visitor clients,
 * and helpers to make processed photos; set up in beforeAll, torn down in afterAll. Read the
 * fields inside tests (they are filled in beforeAll).
 */
export function useMediaFixture(label: string, env: Record<string, string> = {}): MediaFixture {
  let mediaDir = "";
  let n = 0;
  const seed = [...label].reduce((h, c) => (h * 31 + c.charCodeAt(0)) & 0xffffff, 7);
  const f = {
    readyPhoto: async () => {
      n += 1;
      // Different bytes per file and per photo: an identical upload would be offered the
      // existing item (same SHA-256), shared with another test file's state.
      const bytes = await makeGradientImage({ width: 400, height: 300, from: `#${(0x203040 + n * 0x0b0705).toString(16).slice(-6)}`, to: `#${(seed + n * 0x030901).toString(16).padStart(6, "0").slice(-6)}` });
      const res = await f.marketing.agent.post("/api/media").set("X-CSRF-Token", f.marketing.csrf).field("project", f.project.slug).attach("files", bytes, `${label}-${n}.jpg`).expect(201);
      await f.t.drainMediaJobs();
      return (await f.marketing.agent.get(`/api/media/${res.body[0].id}`).expect(200)).body as MediaItem;
    },
    review: (id: number, sensitivity: "cleared" | "restricted") => f.lead.agent.post(`/api/media/${id}/review`).set("X-CSRF-Token", f.lead.csrf).send({ sensitivity }).expect(200),
  } as unknown as MediaFixture;
  beforeAll(async () => {
    mediaDir = mkdtempSync(path.join(tmpdir(), `plumbline-${label}-`));
    // `env` is read here, so a test may fill it in an earlier beforeAll (a store it starts).
    // Under the server-s3 project, a key prefix of its own is this app's empty store, as the folder is on disk.
    const ownStore: Record<string, string> = process.env.TEST_MEDIA_STORE === "s3" ? { S3_PREFIX: `${path.basename(mediaDir)}/` } : {};
    f.t = await startTestApp({ MEDIA_DIR: mediaDir, ...ownStore, ...env });
    const slug = `${label}-${Date.now().toString(36)}`;
    const [id] = await f.t.db("projects").insert({ slug, name: `Media test ${slug}`, operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
    f.project = { id: Number(id), slug };
    f.marketing = await signIn(f.t, DEMO.marketing);
    f.lead = await signIn(f.t, DEMO.lead);
    f.investor = await signIn(f.t, DEMO.investor);
    f.visitor = await newClient(f.t);
  });
  afterAll(async () => {
    await f.t?.close();
    if (mediaDir) rmSync(mediaDir, { recursive: true, force: true });
  });
  return f;
}
