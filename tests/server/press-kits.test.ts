import { randomInt } from "node:crypto";
import Papa from "papaparse";
import sharp from "sharp";
import type { Response } from "supertest";
import { beforeAll, describe, expect, it } from "vitest";
import yauzl from "yauzl";
import { PRESS_KIT_MANIFEST_COLUMNS } from "../../src/shared/schemas/writing-help.ts";
import { newClient, startTestApp, type Agent } from "../helpers/app.ts";
import { makeGradientImage, makeJpegWithGps, makeOrientedJpeg } from "../helpers/images.ts";
import { useMediaFixture } from "../helpers/media-fixture.ts";
import { createPhoto, createProject } from "./posts-fixtures.ts";

const f = useMediaFixture("presskit");

/** Reads a zip back with yauzl (a long-kept unzip library): every entry's bytes by name, in order. */
function readZip(buffer: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(buffer, { lazyEntries: true, strictFileNames: true, validateEntrySizes: true }, (err, zip) => {
      if (err || !zip) return reject(err ?? new Error("no zip"));
      const out = new Map<string, Buffer>();
      zip.on("error", reject);
      zip.on("end", () => resolve(out));
      zip.on("entry", (entry: yauzl.Entry) => {
        zip.openReadStream(entry, (e, stream) => {
          if (e || !stream) return reject(e ?? new Error("no stream"));
          const chunks: Buffer[] = [];
          stream.on("data", (c: Buffer) => chunks.push(c));
          stream.on("error", reject);
          stream.on("end", () => {
            out.set(entry.fileName, Buffer.concat(chunks));
            zip.readEntry();
          });
        });
      });
      zip.readEntry();
    });
  });
}

/** supertest's binary body (the answer is still a stream when a parser reads it). */
const binary = (res: Response, cb: (err: Error | null, body: Buffer) => void) => {
  const stream = res as unknown as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on("data", (c: Buffer) => chunks.push(c));
  stream.on("end", () => cb(null, Buffer.concat(chunks)));
};

type Row = Record<(typeof PRESS_KIT_MANIFEST_COLUMNS)[number], string>;
const manifestOf = (files: Map<string, Buffer>) => {
  const parsed = Papa.parse<Row>(files.get("manifest.csv")!.toString("utf8"), { header: true, skipEmptyLines: true });
  expect(parsed.meta.fields).toEqual([...PRESS_KIT_MANIFEST_COLUMNS]);
  return parsed.data;
};

const staffKit = (body: unknown, who: { agent: Agent; csrf: string } = f.marketing) =>
  who.agent.post(`/api/projects/${f.project.slug}/press-kit`).set("X-CSRF-Token", who.csrf).send(body as object).buffer(true).parse(binary);

const download = (query: string) => f.visitor.agent.get(`/projects/${f.project.slug}/press-kit.zip${query}`).buffer(true).parse(binary);

let n = 0;
/** A photo uploaded through the API, processed by the real pipeline, described and (unless told) cleared by a lead. */
async function photo(o: { caption: string; credit?: string; area?: string; sensitivity?: "cleared" | "restricted" | null; bytes?: Buffer }): Promise<number> {
  n += 1;
  const bytes = o.bytes ?? (await makeGradientImage({ width: 1300, height: 866, from: `#${(0x102030 + n * 0x0a0b0c).toString(16).slice(-6)}`, to: "#e0d0c0" }));
  const up = await f.marketing.agent.post("/api/media").set("X-CSRF-Token", f.marketing.csrf).field("project", f.project.slug).attach("files", bytes, `kit-${n}.jpg`).expect(201);
  await f.t.drainMediaJobs();
  const id = up.body[0].id as number;
  await f.marketing.agent
    .patch(`/api/media/${id}`)
    .set("X-CSRF-Token", f.marketing.csrf)
    .send({ caption: o.caption, altText: `${o.caption}, seen from the yard`, credit: o.credit ?? "Kestrel Colocation", tags: { areas: [o.area ?? "Plant yard"] } })
    .expect(200);
  if (o.sensitivity !== null) await f.review(id, o.sensitivity ?? "cleared");
  return id;
}

async function publishedStory(audience: "public" | "investor", mediaIds: number[], slug: string): Promise<number> {
  const res = await f.marketing.agent
    .post(`/api/projects/${f.project.slug}/stories`)
    .set("X-CSRF-Token", f.marketing.csrf)
    .send({ title: `Story ${slug}`, intro: "The plant yard.", audience, slug, items: mediaIds.map((mediaId) => ({ kind: "photo", mediaId, caption: "" })) })
    .expect(201);
  await f.marketing.agent.post(`/api/stories/${res.body.id}/submit`).set("X-CSRF-Token", f.marketing.csrf).expect(200);
  await f.lead.agent.post(`/api/stories/${res.body.id}/approve`).set("X-CSRF-Token", f.lead.csrf).expect(200);
  const published = await f.lead.agent.post(`/api/stories/${res.body.id}/publish`).set("X-CSRF-Token", f.lead.csrf);
  if (published.status !== 200) throw new Error(`story not published: ${JSON.stringify(published.body)}`);
  return res.body.id as number;
}

const ids = { chillers: 0, switchroom: 0, tank: 0, restricted: 0, unreviewed: 0, investorOnly: 0, gps: 0, turned: 0, publicStory: 0 };
const TERMS = "Free to publish with the credit shown; not for advertising.";

beforeAll(async () => {
  ids.chillers = await photo({ caption: "Chillers on their plinths", area: "Plant yard" });
  ids.switchroom = await photo({ caption: "Switch room, first panels", area: "Switch room", credit: "Aldermere site team" });
  ids.tank = await photo({ caption: "Chillers on their plinths", area: "Plant yard" });
  ids.restricted = await photo({ caption: "Security gate", sensitivity: "restricted" });
  ids.unreviewed = await photo({ caption: "Loading bay", sensitivity: null });
  ids.investorOnly = await photo({ caption: "Data hall 1 white space" });
  ids.gps = await photo({ caption: "Roof plant", bytes: await makeJpegWithGps({ latitude: 51.5, longitude: -1.2, dateTimeOriginal: "2026:05:04 09:30:00", width: 320, height: 240 }) });
  ids.turned = await photo({ caption: "Generator bay, turned", bytes: await makeOrientedJpeg(6, 320, 160) });
  ids.publicStory = await publishedStory("public", [ids.chillers, ids.switchroom, ids.tank], "plant-yard-kit");
  await publishedStory("investor", [ids.investorOnly], "white-space-kit");
  await f.marketing.agent.put(`/api/projects/${f.project.slug}/press-kit/terms`).set("X-CSRF-Token", f.marketing.csrf).send({ usageTerms: TERMS }).expect(200);
});

describe("POST /api/projects/:slug/press-kit (staff)", () => {
  it("streams one zip of the chosen photos at the asked width, each entry matching manifest.csv, with manifest.txt", async () => {
    const res = await staffKit({ mediaIds: [ids.chillers, ids.switchroom, ids.tank], size: "1200" }).expect(200);
    expect(res.headers["content-type"]).toBe("application/zip");
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="presskit-[a-z0-9-]+-press-kit-\d{4}-\d{2}-\d{2}\.zip"$/);
    expect(res.headers["cache-control"]).toBe("private, no-store");
    const files = await readZip(res.body as Buffer);
    const rows = manifestOf(files);
    expect([...files.keys()].sort()).toEqual([...rows.map((r) => r.file), "manifest.csv", "manifest.txt"].sort());
    expect(rows).toHaveLength(3);
    // Names from the caption and date, unique though two captions are the same.
    expect(new Set(rows.map((r) => r.file)).size).toBe(3);
    for (const r of rows) expect(r.file).toMatch(/^(\d{4}-\d{2}-\d{2}|undated)-chillers-on-their-plinths(-2)?\.jpg$|^(\d{4}-\d{2}-\d{2}|undated)-switch-room-first-panels\.jpg$/);
    const switchroom = rows.find((r) => r.caption === "Switch room, first panels")!;
    expect(switchroom).toMatchObject({ credit: "Aldermere site team", area: "Switch room", alt: "Switch room, first panels, seen from the yard" });
    for (const r of rows) {
      const meta = await sharp(files.get(r.file)!).metadata();
      expect(meta.format).toBe("jpeg");
      // The narrowest stored derivative at least 1200 px wide: the 1200 px one of a 1300 px photo.
      expect(meta.width).toBe(1200);
    }
    const text = files.get("manifest.txt")!.toString("utf8");
    expect(text).toContain(`Usage terms: ${TERMS}`);
    expect(text).toContain("Aldermere site team (1 photograph)");
    expect(text).toContain("Kestrel Colocation (2 photographs)");
    for (const r of rows) expect(text).toContain(r.file);
  });

  it("leaves out restricted and unreviewed photos and lists them as withheld, by number only", async () => {
    const res = await staffKit({ mediaIds: [ids.chillers, ids.restricted, ids.unreviewed], size: "640" }).expect(200);
    const files = await readZip(res.body as Buffer);
    const rows = manifestOf(files);
    expect(rows.map((r) => r.caption)).toEqual(["Chillers on their plinths"]);
    expect(files.size).toBe(3);
    for (const r of rows) expect((await sharp(files.get(r.file)!).metadata()).width).toBeLessThanOrEqual(640);
    const text = files.get("manifest.txt")!.toString("utf8");
    expect(text).toContain(`photo #${ids.restricted}: it is restricted`);
    expect(text).toContain(`photo #${ids.unreviewed}: no lead has cleared it yet`);
    expect(text).not.toContain("Security gate");
    expect(text).not.toContain("Loading bay");
  });

  it("checks each photo when its file is written: one restricted after the kit was asked for is withheld", async () => {
    const kit = await f.t.plumbline.pressKits.staffKit(f.project.slug, { mediaIds: [ids.chillers, ids.switchroom], size: "640" }, { user: null, ip: null });
    await f.review(ids.switchroom, "restricted");
    try {
      const chunks: Buffer[] = [];
      for await (const c of kit.open()) chunks.push(c as Buffer);
      const files = await readZip(Buffer.concat(chunks));
      expect(manifestOf(files).map((r) => r.caption)).toEqual(["Chillers on their plinths"]);
      expect(files.get("manifest.txt")!.toString("utf8")).toContain(`photo #${ids.switchroom}: it is restricted`);
    } finally {
      await f.review(ids.switchroom, "cleared");
    }
  });

  it("gives originals without any metadata (no EXIF, no GPS) and with their orientation applied", async () => {
    const res = await staffKit({ mediaIds: [ids.gps, ids.turned], size: "original" }, f.lead).expect(200);
    const files = await readZip(res.body as Buffer);
    const rows = manifestOf(files);
    expect(rows).toHaveLength(2);
    const byCaption = new Map(rows.map((r) => [r.caption, files.get(r.file)!]));
    const roof = await sharp(byCaption.get("Roof plant")!).metadata();
    expect(roof).toMatchObject({ width: 320, height: 240 });
    expect(roof.exif).toBeUndefined();
    expect(roof.xmp).toBeUndefined();
    expect(rows.find((r) => r.caption === "Roof plant")!.file).toMatch(/^2026-05-04-roof-plant\.jpg$/);
    const turned = await sharp(byCaption.get("Generator bay, turned")!).metadata();
    // Stored 160 × 320 with orientation 6: upright it is 320 wide, and nothing tells a viewer to turn it again.
    expect(turned).toMatchObject({ width: 320, height: 160 });
    expect(turned.orientation).toBeUndefined();
    expect(turned.exif).toBeUndefined();
  });

  it("takes a whole story, in any state, and a gallery filter", async () => {
    const story = await readZip((await staffKit({ storyId: ids.publicStory, size: "640" }).expect(200)).body as Buffer);
    expect(manifestOf(story)).toHaveLength(3);
    const area = await readZip((await staffKit({ filter: { area: "Switch room" }, size: "640" }).expect(200)).body as Buffer);
    expect(manifestOf(area).map((r) => r.area)).toEqual(["Switch room"]);
  });

  it("refuses bad selections in the fixed error shape and writes no audit entry", async () => {
    const before = Number((await f.t.db("audit_events").where({ action: "press_kit_downloaded" }).count({ n: "*" }).first())!.n);
    const other = await createProject(f.t);
    const stranger = await createPhoto(f.t, other.id);
    const cases: Array<[unknown, number]> = [
      [{ mediaIds: [] }, 400],
      [{ mediaIds: Array.from({ length: 1001 }, (_, i) => i + 1) }, 400],
      [{ mediaIds: [ids.chillers], storyId: ids.publicStory }, 400],
      [{}, 400],
      [{ mediaIds: [ids.chillers], size: "9000" }, 400],
      [{ mediaIds: ["1 OR 1=1"] }, 400],
      [{ mediaIds: [ids.chillers], extra: true }, 400],
      [{ mediaIds: [ids.chillers, stranger.id] }, 404],
      [{ mediaIds: [999999999] }, 404],
      [{ storyId: 999999999 }, 404],
      [{ mediaIds: [ids.restricted, ids.unreviewed] }, 422],
    ];
    for (const [body, status] of cases) {
      const res = await f.marketing.agent.post(`/api/projects/${f.project.slug}/press-kit`).set("X-CSRF-Token", f.marketing.csrf).send(body as object);
      expect(res.status, JSON.stringify(body).slice(0, 80)).toBe(status);
      expect(res.body.error).toMatchObject({ code: expect.any(String), message: expect.any(String) });
    }
    const unknownProject = await f.marketing.agent.post("/api/projects/no-such-project/press-kit").set("X-CSRF-Token", f.marketing.csrf).send({ mediaIds: [ids.chillers] });
    expect(unknownProject.status).toBe(404);
    const after = Number((await f.t.db("audit_events").where({ action: "press_kit_downloaded" }).count({ n: "*" }).first())!.n);
    expect(after).toBe(before);
  });

  it("is for staff: investors 403, visitors 401", async () => {
    await f.investor.agent.post(`/api/projects/${f.project.slug}/press-kit`).set("X-CSRF-Token", f.investor.csrf).send({ mediaIds: [ids.chillers] }).expect(403);
    await f.visitor.agent.post(`/api/projects/${f.project.slug}/press-kit`).set("X-CSRF-Token", f.visitor.csrf).send({ mediaIds: [ids.chillers] }).expect(401);
  });
});

describe("GET /projects/:slug/press-kit.zip (public)", () => {

  it("holds the cleared photos of published public content only, with the credits and the usage terms", async () => {
    const res = await download("").expect(200);
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename=".+\.zip"$/);
    expect(res.headers["cache-control"]).toBe("no-store");
    const files = await readZip(res.body as Buffer);
    const rows = manifestOf(files);
    expect(rows.map((r) => r.caption).sort()).toEqual(["Chillers on their plinths", "Chillers on their plinths", "Switch room, first panels"]);
    for (const r of rows) expect((await sharp(files.get(r.file)!).metadata()).width).toBeLessThanOrEqual(1200);
    const text = files.get("manifest.txt")!.toString("utf8");
    expect(text).toContain(`Usage terms: ${TERMS}`);
    expect(text).toContain("Credits");
    // Never the investor, restricted or unreviewed photos, nor a word about them.
    for (const hidden of ["Data hall 1 white space", "Security gate", "Loading bay", "Roof plant", "Withheld"]) expect(text).not.toContain(hidden);
  });

  it("narrows to a gallery area or a published public story; an investor story or an unknown one is 404", async () => {
    const area = await readZip(((await download("?area=Switch%20room").expect(200)) as Response).body as Buffer);
    expect(manifestOf(area).map((r) => r.caption)).toEqual(["Switch room, first panels"]);
    const story = await readZip(((await download("?story=plant-yard-kit&size=2400").expect(200)) as Response).body as Buffer);
    expect(manifestOf(story)).toHaveLength(3);
    for (const q of ["?story=white-space-kit", "?story=no-such-story", "?area=Nowhere"]) {
      const res = await f.visitor.agent.get(`/projects/${f.project.slug}/press-kit.zip${q}`);
      expect(res.status, q).toBe(404);
      expect(res.body.error.code).toBe("not_found");
    }
  });

  it("refuses hostile queries with 400 (originals are staff's; area and story together; unknown fields)", async () => {
    for (const q of ["?size=original", "?area=a&story=b", "?area=%00", "?sort=1", `?area=${"x".repeat(101)}`]) {
      const res = await f.visitor.agent.get(`/projects/${f.project.slug}/press-kit.zip${q}`);
      expect(res.status, q).toBe(400);
      expect(res.body.error).toMatchObject({ code: "validation" });
    }
  });

  it("is limited per network address: past 20 downloads in 15 minutes, 429; another address is not held up", async () => {
    // The real default (the test helper lifts it for every other file), behind one trusted proxy hop,
    // from addresses nobody else in this run uses (TEST-NET-3, RFC 5737).
    const limited = await startTestApp({ PRESS_KIT_LIMIT_PER_IP: "", TRUST_PROXY: "1" });
    try {
      const from = `203.0.113.${randomInt(0, 120)}`;
      const get = (address: string) => newClient(limited).then((c) => c.agent.get(`/projects/${f.project.slug}/press-kit.zip?story=no-such-story`).set("X-Forwarded-For", address));
      for (let i = 0; i < 20; i += 1) expect((await get(from)).status).toBe(404);
      const refused = await get(from);
      expect(refused.status).toBe(429);
      expect(refused.body.error.code).toBe("rate_limited");
      expect((await get(`203.0.113.${randomInt(130, 250)}`)).status).toBe(404);
    } finally {
      await limited.close();
    }
  });
});

describe("the project's usage terms", () => {
  const put = (who: { agent: Agent; csrf: string }, body: unknown) => who.agent.put(`/api/projects/${f.project.slug}/press-kit/terms`).set("X-CSRF-Token", who.csrf).send(body as object);

  it("are read by anyone and set by staff, each change audited; blank clears them", async () => {
    expect((await f.visitor.agent.get(`/api/projects/${f.project.slug}/press-kit/terms`).expect(200)).body).toEqual({ usageTerms: TERMS });
    try {
      expect((await put(f.lead, { usageTerms: "  " }).expect(200)).body).toEqual({ usageTerms: null });
      const entry = await f.t.db("audit_events").where({ action: "press_usage_terms_changed" }).orderBy("id", "desc").first();
      expect(entry).toBeTruthy();
      const text = (await readZip(((await download("")) as Response).body as Buffer)).get("manifest.txt")!.toString("utf8");
      expect(text).toContain("Usage terms: none set; ask Kestrel Colocation");
    } finally {
      await put(f.marketing, { usageTerms: TERMS }).expect(200);
    }
  });

  it("refuse investors (403), visitors (401) and hostile text (400), changing nothing", async () => {
    await put(f.investor, { usageTerms: "Anything goes" }).expect(403);
    await put(f.visitor, { usageTerms: "Anything goes" }).expect(401);
    for (const body of [{ usageTerms: "x".repeat(501) }, { usageTerms: "line\nbreak" }, { usageTerms: 42 }, {}, { usageTerms: "ok", more: 1 }]) {
      const res = await put(f.marketing, body);
      expect(res.status, JSON.stringify(body).slice(0, 60)).toBe(400);
    }
    expect((await f.visitor.agent.get(`/api/projects/${f.project.slug}/press-kit/terms`).expect(200)).body).toEqual({ usageTerms: TERMS });
  });
});
