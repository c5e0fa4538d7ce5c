import request from "supertest";
import { describe, expect, it } from "vitest";
import { HERO_SIZES } from "../../src/shared/domain/picture-sizes.ts";
import { createPhoto, createProject, useAppAsEveryRole } from "./posts-fixtures.ts";

/** The project's hero photograph and the home page's builds (docs/decisions/055-hero-home-gallery.md). */
const f = useAppAsEveryRole();

async function heroOf(slug: string) {
  return (await request(f.t.plumbline.app).get(`/api/projects/${slug}/hero`).expect(200)).body as { picture: { id: number; sources: { jpeg: Array<{ url: string }> } } | null; focus: { x: number; y: number }; mediaId: number | null; version: number };
}

describe("PUT /api/projects/:slug/hero", () => {
  it("lets a lead choose a cleared photo of the project with its focal point; visitors then see it and may fetch it; the choice is audited", async () => {
    const p = await createProject(f.t);
    const photo = await createPhoto(f.t, p.id, { caption: "Hall 2A from the plant yard" });
    // A photo used nowhere public is not servable to a visitor before it is chosen.
    await request(f.t.plumbline.app).get(photo.urls[0]!).expect(404);
    const res = await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send({ mediaId: photo.id, focus: { x: 0.25, y: 0.8 }, version: 0 });
    expect(res.status).toBe(200);
    expect(res.headers["cache-control"]).toBe("private, no-store");
    expect(res.body).toMatchObject({ mediaId: photo.id, focus: { x: 0.25, y: 0.8 }, version: 1 });
    const seen = await heroOf(p.slug);
    expect(seen.picture?.id).toBe(photo.id);
    expect(seen.focus).toEqual({ x: 0.25, y: 0.8 });
    await request(f.t.plumbline.app).get(seen.picture!.sources.jpeg[0]!.url).expect(200);
    const audit = await f.t.db("audit_events").where({ action: "project_hero_changed", target_id: String(p.id) });
    expect(audit).toHaveLength(1);
    expect(JSON.parse(String(audit[0].detail))).toMatchObject({ from: null, to: photo.id });
  });

  it("lets an admin clear the hero; the photo is no longer served to visitors through it", async () => {
    const p = await createProject(f.t);
    const photo = await createPhoto(f.t, p.id);
    await f.as.admin.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.admin.csrf).send({ mediaId: photo.id, version: 0 }).expect(200);
    const cleared = await f.as.admin.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.admin.csrf).send({ mediaId: null, version: 1 });
    expect(cleared.status).toBe(200);
    expect((await heroOf(p.slug)).picture).toBeNull();
    await request(f.t.plumbline.app).get(photo.urls[0]!).expect(404);
  });

  it("refuses marketing, investors and visitors, and writes nothing", async () => {
    const p = await createProject(f.t);
    const photo = await createPhoto(f.t, p.id);
    const body = { mediaId: photo.id, version: 0 };
    expect((await f.as.marketing.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.marketing.csrf).send(body)).status).toBe(403);
    expect((await f.as.investor.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.investor.csrf).send(body)).status).toBe(403);
    expect((await f.as.lead.agent.get("/api/auth/session")).status).toBe(200);
    expect((await heroOf(p.slug)).mediaId).toBeNull();
  });

  it.each([
    ["unreviewed", { sensitivity: "unreviewed" as const }, "not_cleared"],
    ["restricted", { sensitivity: "restricted" as const }, "not_cleared"],
    ["still processing", { status: "processing" as const }, "media_not_ready"],
    ["without alt text", { altText: null }, "missing_alt_text"],
  ])("refuses a photo %s with 422 naming mediaId, and writes nothing", async (_what, options, code) => {
    const p = await createProject(f.t);
    const photo = await createPhoto(f.t, p.id, options);
    const res = await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send({ mediaId: photo.id, version: 0 });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe(code);
    expect(res.body.error.fields).toHaveProperty("mediaId");
    expect(await heroOf(p.slug)).toMatchObject({ mediaId: null, version: 0 });
    expect(await f.t.db("audit_events").where({ action: "project_hero_changed", target_id: String(p.id) })).toEqual([]);
  });

  it("refuses a photo of another project, a flagged photo and one that does not exist", async () => {
    const p = await createProject(f.t);
    const other = await createProject(f.t);
    const theirs = await createPhoto(f.t, other.id);
    const flagged = await createPhoto(f.t, p.id);
    await f.t.db("media_items").where({ id: flagged.id }).update({ flagged_for_review: true });
    for (const [mediaId, code] of [
      [theirs.id, "other_project"],
      [flagged.id, "flagged"],
      [2_000_000_000, "unknown_media"],
    ] as const) {
      const res = await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send({ mediaId, version: 0 });
      expect(res.status).toBe(422);
      expect(res.body.error.code).toBe(code);
    }
    expect((await heroOf(p.slug)).mediaId).toBeNull();
  });

  it("refuses a stale version with 409 and the current choice attached", async () => {
    const p = await createProject(f.t);
    const a = await createPhoto(f.t, p.id);
    const b = await createPhoto(f.t, p.id);
    await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send({ mediaId: a.id, version: 0 }).expect(200);
    const res = await f.as.admin.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.admin.csrf).send({ mediaId: b.id, version: 0 });
    expect(res.status).toBe(409);
    expect(res.body.error.current).toMatchObject({ mediaId: a.id, version: 1 });
    expect((await heroOf(p.slug)).mediaId).toBe(a.id);
  });

  it.each([
    ["a focal point outside 0..1", { mediaId: 1, focus: { x: 1.5, y: 0.5 }, version: 0 }, "focus.x"],
    ["a focal point that is text", { mediaId: 1, focus: { x: "0.5", y: 0.5 }, version: 0 }, "focus.x"],
    ["a photo id that is text", { mediaId: "1 OR 1=1", version: 0 }, "mediaId"],
    ["a negative photo id", { mediaId: -4, version: 0 }, "mediaId"],
    ["no version", { mediaId: 1 }, "version"],
    ["an unknown field", { mediaId: 1, version: 0, projectId: 9 }, ""],
  ])("answers %s with 400 in the fixed error shape and writes nothing", async (_what, body, field) => {
    const p = await createProject(f.t);
    const res = await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("validation");
    if (field) expect(Object.keys(res.body.error.fields)).toContain(field);
    expect(await heroOf(p.slug)).toMatchObject({ mediaId: null, version: 0 });
  });

  it("a hero restricted after it was chosen stops showing at once", async () => {
    const p = await createProject(f.t);
    const photo = await createPhoto(f.t, p.id);
    await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send({ mediaId: photo.id, version: 0 }).expect(200);
    await f.t.db("media_items").where({ id: photo.id }).update({ sensitivity: "restricted" });
    const seen = await heroOf(p.slug);
    expect(seen.picture).toBeNull();
    expect(seen.mediaId).toBe(photo.id);
  });
});

describe("GET /api/home", () => {
  type Build = { slug: string; picture: { id: number } | null; pictureIs: string | null; focus: { x: number; y: number }; percentComplete: number | null; nextReady: { blockName: string; date: string } | null };

  it("names every build with its picture (the hero when chosen), the one percent complete and the next ready-for-service date", async () => {
    const p = await createProject(f.t);
    const photo = await createPhoto(f.t, p.id);
    await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send({ mediaId: photo.id, focus: { x: 0.1, y: 0.9 }, version: 0 }).expect(200);
    const home = (await request(f.t.plumbline.app).get("/api/home").expect(200)).body as { builds: Build[] };
    const mine = home.builds.find((b) => b.slug === p.slug)!;
    expect(mine).toMatchObject({ picture: { id: photo.id }, pictureIs: "hero", focus: { x: 0.1, y: 0.9 } });

    // The demo build: its figure is the health figure every caller gets; its next date is the earliest public block not yet ready.
    const demo = home.builds.find((b) => b.slug === "aldermere-phase-2")!;
    const health = (await request(f.t.plumbline.app).get("/api/projects/aldermere-phase-2/health").expect(200)).body as { percentComplete: number };
    expect(demo.percentComplete).toBe(health.percentComplete);
    const facility = (await request(f.t.plumbline.app).get("/api/projects/aldermere-phase-2/facility").expect(200)).body as { blocks: Array<{ name: string; readyForService: boolean; forecastReadyDate: string | null }> };
    const open = facility.blocks.filter((b) => !b.readyForService && b.forecastReadyDate).sort((a, b) => a.forecastReadyDate!.localeCompare(b.forecastReadyDate!));
    expect(open.length).toBeGreaterThan(0);
    expect(demo.nextReady).toEqual({ blockName: open[0]!.name, date: open[0]!.forecastReadyDate });
    // With no hero chosen, the newest public update's cover stands in.
    expect(demo.pictureIs).toBe("cover");
    expect(demo.picture).not.toBeNull();
  });

  it("answers every caller alike: a signed-in investor sees the visitor's figures", async () => {
    const visitor = (await request(f.t.plumbline.app).get("/api/home").expect(200)).body as { builds: Build[] };
    const investor = (await f.as.investor.agent.get("/api/home").expect(200)).body as { builds: Build[] };
    const pick = (h: { builds: Build[] }) => h.builds.find((b) => b.slug === "aldermere-phase-2");
    expect(pick(investor)).toEqual(pick(visitor));
  });
});

describe("the project page's HTML head", () => {
  it("preloads the chosen hero with the srcset and sizes the page draws it with, and offers it as the link preview's picture", async () => {
    const p = await createProject(f.t);
    const photo = await createPhoto(f.t, p.id);
    const before = await f.t.plumbline.site.pageFor(`/projects/${p.slug}`);
    expect(before && "head" in before ? before.head.tags : "").not.toContain('as="image"');
    await f.as.lead.agent.put(`/api/projects/${p.slug}/hero`).set("X-CSRF-Token", f.as.lead.csrf).send({ mediaId: photo.id, version: 0 }).expect(200);
    const after = await f.t.plumbline.site.pageFor(`/projects/${p.slug}`);
    const tags = after && "head" in after ? after.head.tags : "";
    const hint = /<link rel="preload" as="image" type="image\/avif" imagesrcset="([^"]+)" imagesizes="([^"]+)" fetchpriority="high">/.exec(tags);
    expect(hint).not.toBeNull();
    for (const u of photo.urls.filter((u) => u.endsWith(".avif"))) expect(hint![1]).toContain(u);
    expect(hint![2]).toBe(HERO_SIZES);
    expect(tags).toMatch(/<meta property="og:image" content="[^"]+\.jpg">/);
  });
});
