import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { hammingDistance } from "../../src/shared/domain/fingerprint.ts";
import type { ThenAndNowPair } from "../../src/shared/schemas/writing-help.ts";
import { facilityWriter } from "./facility-fixtures.ts";
import { createPhoto, createProject, useAppAsEveryRole, type PhotoOptions } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();

// Two framings, far apart (64 bits); "near" ones a few bits from HALL.
const HALL = "0f0f0f0f0f0f0f0f";
const HALL_LATER = "0f0f0f0f0f0f0f0e";
const YARD = "f0f0f0f0f0f0f0f0";

interface Fixture extends PhotoOptions {
  fingerprint: string | null;
  areas?: string[];
  flagged?: boolean;
  blocks?: number[];
}

/** A processed photo of the test's own project with its fingerprint and area tags (default Hall 2A). */
async function photo(projectId: number, o: Fixture): Promise<number> {
  const { id } = await createPhoto(f.t, projectId, o);
  await f.t.db("media_items").where({ id }).update({ fingerprint: o.fingerprint, flagged_for_review: o.flagged ?? false });
  const tags = [...(o.areas ?? ["Hall 2A"]).map((value) => ({ kind: "area", value })), ...(o.blocks ?? []).map((b) => ({ kind: "block", value: String(b) }))];
  if (tags.length > 0) await f.t.db("media_tags").insert(tags.map((t) => ({ media_id: id, ...t })));
  return id;
}

const pairsOf = async (slug: string, query = "", as = f.as.marketing) => {
  const res = await as.agent.get(`/api/projects/${slug}/then-and-now${query}`).expect(200);
  expect(res.headers["cache-control"]).toBe("private, no-store");
  return res.body.pairs as ThenAndNowPair[];
};
const idsOf = (pairs: ThenAndNowPair[]) => pairs.map((p) => [p.then.mediaId, p.now.mediaId]);

describe("GET /api/projects/:slug/then-and-now", () => {
  it("offers two photos of one area months apart with the same framing, earlier first, with dates, days apart, distance and pictures", async () => {
    const p = await createProject(f.t);
    const then = await photo(p.id, { fingerprint: HALL, takenAt: "2026-03-02T10:15:00", caption: "Hall 2A frame" });
    const now = await photo(p.id, { fingerprint: HALL_LATER, takenAt: "2026-06-15T09:00:00", caption: "Hall 2A clad" });
    await photo(p.id, { fingerprint: YARD, takenAt: "2026-09-01T09:00:00" }); // another framing
    await photo(p.id, { fingerprint: HALL, takenAt: "2026-03-20T09:00:00", areas: ["Plant yard"] }); // another area
    const pairs = await pairsOf(p.slug);
    expect(idsOf(pairs)).toEqual([[then, now]]);
    expect(pairs[0]).toMatchObject({ area: "Hall 2A", daysApart: 105, distance: 1, then: { takenAt: "2026-03-02T10:15:00", caption: "Hall 2A frame" }, now: { takenAt: "2026-06-15T09:00:00", caption: "Hall 2A clad" } });
    expect(pairs[0]!.then.thumbUrl).toMatch(/^\/media\/v\/[0-9a-f]+-320w\.jpg$/);
    expect(pairs[0]!.then.picture.sources.jpeg.length).toBeGreaterThan(0);
    // The thumbnail really answers for staff.
    await f.as.marketing.agent.get(pairs[0]!.then.thumbUrl!).expect(200);
  });

  it("narrows by minimum days apart, area and limit", async () => {
    const p = await createProject(f.t);
    await photo(p.id, { fingerprint: HALL, takenAt: "2026-03-02T10:00:00" });
    await photo(p.id, { fingerprint: HALL, takenAt: "2026-03-22T10:00:00" });
    await photo(p.id, { fingerprint: YARD, takenAt: "2026-01-02T10:00:00", areas: ["Plant yard"] });
    await photo(p.id, { fingerprint: YARD, takenAt: "2026-05-02T10:00:00", areas: ["Plant yard"] });
    expect((await pairsOf(p.slug)).map((x) => x.area)).toEqual(["Plant yard"]);
    expect((await pairsOf(p.slug, "?minDays=20")).map((x) => x.area)).toEqual(["Plant yard", "Hall 2A"]);
    expect((await pairsOf(p.slug, "?minDays=20&area=Hall%202A")).map((x) => x.area)).toEqual(["Hall 2A"]);
    expect(await pairsOf(p.slug, "?minDays=20&limit=1")).toHaveLength(1);
  });

  it("never puts an unreviewed, restricted, flagged or investor-only photo in a public pair; internal content may show them", async () => {
    const p = await createProject(f.t);
    const w = facilityWriter(f.as.lead);
    const investorBlock = await w.block(p.slug, { audience: "investor" });
    const publicBlock = await w.block(p.slug, { audience: "public" });
    const then = await photo(p.id, { fingerprint: HALL, takenAt: "2026-01-05T10:00:00", blocks: [publicBlock.id] });
    const hidden = {
      unreviewed: await photo(p.id, { fingerprint: HALL, takenAt: "2026-04-05T10:00:00", sensitivity: "unreviewed" }),
      restricted: await photo(p.id, { fingerprint: HALL, takenAt: "2026-05-05T10:00:00", sensitivity: "restricted" }),
      flagged: await photo(p.id, { fingerprint: HALL, takenAt: "2026-06-05T10:00:00", flagged: true }),
      investorOnly: await photo(p.id, { fingerprint: HALL, takenAt: "2026-07-05T10:00:00", blocks: [investorBlock.id] }),
    };
    const hiddenIds = Object.values(hidden);
    expect(await pairsOf(p.slug, "?audience=public")).toEqual([]);
    // For investors, the investor-only block's photo may stand; the rest may not.
    expect(idsOf(await pairsOf(p.slug, "?audience=investor"))).toEqual([[then, hidden.investorOnly]]);
    // Internal content may show any processed photo (the publishing checks' rule): every one is a candidate.
    const internal = (await pairsOf(p.slug, "?audience=internal", f.as.lead)).flatMap((x) => [x.then.mediaId, x.now.mediaId]);
    expect(internal.some((id) => hiddenIds.includes(id))).toBe(true);
    // A photo still processing, or with no capture time or fingerprint, is never offered.
    const p2 = await createProject(f.t);
    await photo(p2.id, { fingerprint: HALL, takenAt: "2026-01-05T10:00:00" });
    await photo(p2.id, { fingerprint: HALL, takenAt: "2026-05-05T10:00:00", status: "processing" });
    await photo(p2.id, { fingerprint: HALL, takenAt: null });
    await photo(p2.id, { fingerprint: null, takenAt: "2026-07-05T10:00:00" });
    expect(await pairsOf(p2.slug, "?audience=internal")).toEqual([]);
  });

  it("answers admins, leads and marketing; refuses investors (403) and visitors (401)", async () => {
    const p = await createProject(f.t);
    for (const who of [f.as.admin, f.as.lead, f.as.marketing]) await who.agent.get(`/api/projects/${p.slug}/then-and-now`).expect(200);
    const investor = await f.as.investor.agent.get(`/api/projects/${p.slug}/then-and-now`).expect(403);
    expect(investor.body.error.code).toBeTruthy();
    const { default: request } = await import("supertest");
    await request(f.t.plumbline.app).get(`/api/projects/${p.slug}/then-and-now`).expect(401);
  });

  it("refuses hostile parameters with 400 in the fixed error shape, and an unknown project with 404", async () => {
    const p = await createProject(f.t);
    const bad = async (query: string, field: string) => {
      const res = await f.as.lead.agent.get(`/api/projects/${p.slug}/then-and-now${query}`).expect(400);
      expect(res.body.error.code).toBe("validation");
      expect(Object.keys(res.body.error.fields ?? {}).join(" "), query).toContain(field);
    };
    await bad("?audience=everyone", "audience");
    await bad("?minDays=0", "minDays");
    await bad("?minDays=-5", "minDays");
    await bad("?minDays=abc", "minDays");
    await bad("?minDays=99999", "minDays");
    await bad("?limit=101", "limit");
    await bad("?limit=1.5", "limit");
    await bad(`?area=${encodeURIComponent("Hall\u0000 2A")}`, "area");
    await bad(`?area=${"x".repeat(101)}`, "area");
    await bad("?colour=red", "");
    await bad("?audience=public&audience=internal", "audience");
    // Text that looks like SQL is only an area nobody tagged.
    expect(await pairsOf(p.slug, `?area=${encodeURIComponent("' OR 1=1 --")}`)).toEqual([]);
    await f.as.lead.agent.get("/api/projects/no-such-build/then-and-now").expect(404);
    await f.as.lead.agent.get("/api/projects/NOT%20A%20SLUG/then-and-now").expect(400);
  });
});

describe("the photo fingerprint at ingest", () => {
  /** A drawn scene as a JPEG with a capture time. */
  const scene = (shade: string, taken: string) =>
    sharp({ create: { width: 900, height: 600, channels: 3, background: "#b8c4d0" } })
      .composite([{ input: Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="900" height="600"><rect x="120" y="200" width="420" height="300" fill="${shade}"/><circle cx="700" cy="160" r="90" fill="#334"/></svg>`) }])
      .jpeg({ quality: 85 })
      .withExif({ IFD2: { DateTimeOriginal: taken } })
      .toBuffer();

  it("stores a 16-hex-digit fingerprint for an uploaded photo, close for the same framing months later", async () => {
    const p = await createProject(f.t);
    const upload = async (bytes: Buffer, name: string) => {
      const res = await f.as.marketing.agent.post(`/api/media?project=${p.slug}`).set("X-CSRF-Token", f.as.marketing.csrf).attach("files", bytes, { filename: name, contentType: "image/jpeg" }).expect(201);
      return Number(res.body[0].id);
    };
    const first = await upload(await scene("#6b4f3a", "2026:02:01 10:00:00"), "hall-then.jpg");
    const second = await upload(await scene("#5d4532", "2026:05:01 10:00:00"), "hall-now.jpg");
    await f.t.drainMediaJobs();
    const rows = (await f.t.db("media_items").whereIn("id", [first, second]).orderBy("id").select("fingerprint", "status")) as Array<{ fingerprint: string; status: string }>;
    expect(rows.map((r) => r.status)).toEqual(["ready", "ready"]);
    for (const r of rows) expect(r.fingerprint).toMatch(/^[0-9a-f]{16}$/);
    expect(hammingDistance(rows[0]!.fingerprint, rows[1]!.fingerprint)).toBeLessThanOrEqual(12);
  });

  it("backfills photos processed before fingerprints were kept, from their stored derivative, and skips one whose file is gone", async () => {
    const p = await createProject(f.t);
    const kept = await photo(p.id, { fingerprint: null });
    const lost = await photo(p.id, { fingerprint: null });
    const lostKeys = (await f.t.db("media_variants").where({ media_id: lost }).pluck("storage_key")) as string[];
    for (const key of lostKeys) await f.t.plumbline.mediaStorage.delete(key);
    const stored = await f.t.plumbline.media.backfillFingerprints();
    expect(stored).toBeGreaterThanOrEqual(1);
    const rows = new Map(((await f.t.db("media_items").whereIn("id", [kept, lost]).select("id", "fingerprint")) as Array<{ id: number; fingerprint: string | null }>).map((r) => [Number(r.id), r.fingerprint]));
    expect(rows.get(kept)).toMatch(/^[0-9a-f]{16}$/);
    expect(rows.get(lost)).toBeNull();
    // Nothing left to do: a second pass stores none of these again.
    await f.t.plumbline.media.backfillFingerprints();
    expect((await f.t.db("media_items").where({ id: lost }).first("fingerprint")).fingerprint).toBeNull();
  });
});
