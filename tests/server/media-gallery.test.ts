import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { DEMO, signIn, startTestApp, type TestApp } from "../helpers/app.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

const SLUG = "aldermere-phase-2";
type Photo = { id: number; month: string | null; areas: string[]; sources: { avif: Array<{ url: string }>; jpeg: Array<{ url: string }> } };

describe("GET /api/projects/:slug/gallery", () => {
  it("shows visitors only cleared photos of published public content, each one servable to them", async () => {
    const res = await request(t.plumbline.app).get(`/api/projects/${SLUG}/gallery`).expect(200);
    const items = res.body.items as Photo[];
    expect(items.length).toBeGreaterThan(0);
    const ids = items.map((p) => p.id);
    const notCleared = await t.db("media_items").whereIn("id", ids).whereNot({ sensitivity: "cleared" });
    expect(notCleared).toEqual([]);
    for (const p of items) {
      const url = (p.sources.avif[0] ?? p.sources.jpeg[0])!.url;
      await request(t.plumbline.app).get(url).expect(200);
    }
    // Photos used only in investor content are not in the visitor's gallery.
    const investorOnly = await t.db("media_usages as u")
      .where({ "u.published": true, "u.audience": "investor" })
      .whereNotExists(t.db("media_usages as p").whereRaw("p.media_id = u.media_id").andWhere({ "p.published": true, "p.audience": "public" }))
      .pluck("u.media_id");
    for (const id of investorOnly) expect(ids).not.toContain(Number(id));
  });

  it("gives a signed-in investor the visitor's photos and those of investor content", async () => {
    const visitor = (await request(t.plumbline.app).get(`/api/projects/${SLUG}/gallery`)).body.items as Photo[];
    const inv = await signIn(t, DEMO.investor);
    const investor = (await inv.agent.get(`/api/projects/${SLUG}/gallery`).expect(200)).body.items as Photo[];
    const investorIds = new Set(investor.map((p) => p.id));
    for (const p of visitor) expect(investorIds.has(p.id)).toBe(true);
  });

  it("filters by month and area, offering the choices of the whole gallery", async () => {
    const all = (await request(t.plumbline.app).get(`/api/projects/${SLUG}/gallery`)).body;
    const month = all.months[0] as string;
    const byMonth = (await request(t.plumbline.app).get(`/api/projects/${SLUG}/gallery?month=${month}`).expect(200)).body;
    expect(byMonth.items.length).toBeGreaterThan(0);
    expect(byMonth.items.every((p: Photo) => p.month === month)).toBe(true);
    expect(byMonth.months).toEqual(all.months);
    if (all.areas.length > 0) {
      const area = all.areas[0] as string;
      const byArea = (await request(t.plumbline.app).get(`/api/projects/${SLUG}/gallery?area=${encodeURIComponent(area)}`)).body;
      expect(byArea.items.every((p: Photo) => p.areas.includes(area))).toBe(true);
    }
  });

  it("refuses a bad filter, and an unknown project, in the fixed error shape", async () => {
    const bad = await request(t.plumbline.app).get(`/api/projects/${SLUG}/gallery?month=2026-13`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("month");
    const extra = await request(t.plumbline.app).get(`/api/projects/${SLUG}/gallery?colour=red`);
    expect(extra.status).toBe(400);
    const missing = await request(t.plumbline.app).get(`/api/projects/no-such-build/gallery`);
    expect(missing.status).toBe(404);
  });
});
