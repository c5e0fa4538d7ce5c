import { describe, expect, it } from "vitest";
import type { SiteArea, SitePlan } from "../../src/shared/schemas/site-plan.ts";
import { newClient } from "../helpers/app.ts";
import { facilityWriter, makeProject } from "./facility-fixtures.ts";
import { useAppAsEveryRole } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();
const lead = () => facilityWriter(f.as.lead);

const area = (over: Record<string, unknown> = {}) => ({ name: "Hall 2A", kind: "hall", audience: "public", x: 2, y: 2, w: 6, h: 4, ...over });

async function draw(slug: string, over: Record<string, unknown> = {}): Promise<SiteArea> {
  const res = await lead().send("post", `/api/projects/${slug}/site-areas`, area(over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as SiteArea;
}

async function planAs(agent: { get: (p: string) => PromiseLike<{ status: number; body: unknown }> }, slug: string): Promise<SitePlan> {
  const res = await agent.get(`/api/projects/${slug}/site-plan`);
  expect(res.status).toBe(200);
  return res.body as SitePlan;
}

/** Everything a plan write could touch in a project, so "nothing written" can be checked. */
async function footprint(projectId: number) {
  const areas = await f.t.db("site_areas").where({ project_id: projectId }).select("name", "x", "y", "w", "h", "version").orderBy("id");
  const events = await f.t.db("site_area_events").where({ project_id: projectId }).count({ n: "*" });
  const audit = await f.t.db("audit_events").where("action", "like", "site_area_%").count({ n: "*" });
  return { areas, events: Number(events[0]!.n), audit: Number(audit[0]!.n) };
}

describe("GET /api/projects/:slug/site-plan", () => {
  it("gives each caller the areas its audience may see: an internal area never reaches a visitor or an investor", async () => {
    const p = await makeProject(f.t);
    await draw(p.slug, { name: "Hall 2A", audience: "public" });
    await draw(p.slug, { name: "Client suite", kind: "client_area", audience: "investor", x: 10, y: 2, w: 3, h: 3 });
    await draw(p.slug, { name: "Contractor compound", kind: "other", audience: "internal", x: 14, y: 10, w: 4, h: 3 });
    const visitor = await newClient(f.t);
    const names = (plan: SitePlan) => plan.areas.map((a) => a.name);
    expect(names(await planAs(visitor.agent, p.slug))).toEqual(["Hall 2A"]);
    expect(names(await planAs(f.as.investor.agent, p.slug))).toEqual(["Hall 2A", "Client suite"]);
    const staff = await planAs(f.as.marketing.agent, p.slug);
    expect(names(staff)).toEqual(["Hall 2A", "Client suite", "Contractor compound"]);
    const visitorPlan = await visitor.agent.get(`/api/projects/${p.slug}/site-plan`);
    expect(JSON.stringify(visitorPlan.body)).not.toContain("Contractor compound");
    expect(visitorPlan.body.areas[0]).not.toHaveProperty("version");
    expect(staff.areas[0]).toMatchObject({ audience: "public", version: 1 });
    expect(staff.grid).toEqual({ columns: 24, rows: 16 });
  });

  it("an area's status comes from every milestone in it, hidden ones counted but never named", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    // A public milestone finished, and an internal one whose forecast is long past: the hall is behind for everyone.
    const done = await w.milestone(p.slug, { name: "Hall 2A frame", area: "Hall 2A", baselineFinish: "2026-01-10", audience: "public" });
    await w.send("patch", `/api/milestones/${done.id}`, { version: done.version, actualFinish: "2026-01-09" }).expect(200);
    await w.milestone(p.slug, { name: "Secret snagging walk", area: "Hall 2A", baselineFinish: "2026-02-01", audience: "internal" });
    await w.milestone(p.slug, { name: "Energy centre roof", area: "Energy centre", baselineFinish: "2026-01-05", audience: "public" }).then((m) => w.send("patch", `/api/milestones/${m.id}`, { version: m.version, actualFinish: "2026-01-05" }).expect(200));
    await draw(p.slug, { name: "Hall 2A" });
    await draw(p.slug, { name: "energy centre", kind: "energy_centre", x: 12, y: 2, w: 4, h: 4 });
    await draw(p.slug, { name: "Hall 2B", x: 2, y: 8, w: 6, h: 4 });
    const visitor = await newClient(f.t);
    const res = await visitor.agent.get(`/api/projects/${p.slug}/site-plan`).expect(200);
    const byName = new Map((res.body as SitePlan).areas.map((a) => [a.name, a]));
    expect(byName.get("Hall 2A")).toMatchObject({ status: "behind", milestonesComplete: 1, milestonesTotal: 2 });
    expect(byName.get("energy centre")).toMatchObject({ status: "complete", milestonesComplete: 1, milestonesTotal: 1 });
    expect(byName.get("Hall 2B")).toMatchObject({ status: null, milestonesTotal: 0 });
    expect(JSON.stringify(res.body)).not.toContain("Secret snagging walk");
    // The investor and staff see the same status: one figure for the build.
    const investor = await planAs(f.as.investor.agent, p.slug);
    expect(investor.areas.find((a) => a.name === "Hall 2A")!.status).toBe("behind");
  });

  it("answers 404 for a project that does not exist", async () => {
    const visitor = await newClient(f.t);
    await visitor.agent.get("/api/projects/no-such-project/site-plan").expect(404);
  });
});

describe("writes to the site plan", () => {
  it("a lead draws, moves and deletes an area; each write leaves its events and an audit entry", async () => {
    const p = await makeProject(f.t);
    const a = await draw(p.slug);
    expect(a).toMatchObject({ name: "Hall 2A", x: 2, y: 2, w: 6, h: 4, version: 1, audience: "public" });
    const moved = await lead().send("patch", `/api/site-areas/${a.id}`, { version: 1, x: 3, w: 7 });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    expect(moved.body).toMatchObject({ x: 3, w: 7, version: 2 });
    await lead().send("delete", `/api/site-areas/${a.id}`).expect(204);
    const events = await f.t.db("site_area_events").where({ project_id: p.id }).orderBy("id");
    expect(events.map((e) => [e.field, e.from_value, e.to_value])).toEqual([
      ["created", null, "Hall 2A"],
      ["x", "2", "3"],
      ["w", "6", "7"],
      ["deleted", "Hall 2A", null],
    ]);
    const audit = await f.t.db("audit_events").where({ target_id: String(a.id), target_type: "site_area" }).orderBy("id");
    expect(audit.map((e) => e.action)).toEqual(["site_area_created", "site_area_updated", "site_area_deleted"]);
    expect((await planAs(f.as.lead.agent, p.slug)).areas).toEqual([]);
  });

  it("a stale version answers 409 with the current values, and nothing is written", async () => {
    const p = await makeProject(f.t);
    const a = await draw(p.slug);
    await lead().send("patch", `/api/site-areas/${a.id}`, { version: 1, name: "Hall 2A east" }).expect(200);
    const before = await footprint(p.id);
    const res = await lead().send("patch", `/api/site-areas/${a.id}`, { version: 1, x: 10 });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("conflict");
    expect(res.body.error.current).toMatchObject({ name: "Hall 2A east", x: 2 });
    expect(await footprint(p.id)).toEqual(before);
  });

  it.each([
    ["overlapping another area", { x: 4, y: 3 }, 422, "cells"],
    ["reaching past the right edge", { x: 20, w: 6 }, 422, "w"],
    ["reaching past the bottom edge", { y: 14, h: 4 }, 422, "h"],
    ["starting outside the grid", { x: 24 }, 400, "x"],
    ["a huge width", { w: 1e12 }, 400, "w"],
    ["a fractional cell", { y: 1.5 }, 400, "y"],
    ["a negative cell", { x: -1 }, 400, "x"],
    ["markup in the name", { name: "<img src=x onerror=alert(1)>" }, 400, "name"],
    ["an empty name", { name: "   " }, 400, "name"],
    ["a line break in the name", { name: "Hall\n2B" }, 400, "name"],
    ["a name another area has", { name: "hall 2a", x: 12 }, 422, "name"],
    ["an unknown kind", { kind: "car_park", x: 12 }, 400, "kind"],
    ["an unknown field", { colour: "red", x: 12 }, 400, ""],
  ])("refuses an area %s (%i), naming the field, with nothing written", async (_what, over, status, field) => {
    const p = await makeProject(f.t);
    await draw(p.slug);
    const before = await footprint(p.id);
    const res = await lead().send("post", `/api/projects/${p.slug}/site-areas`, area({ name: "Hall 2B", ...over }));
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    if (field) expect(Object.keys(res.body.error.fields ?? {})).toContain(field);
    expect(await footprint(p.id)).toEqual(before);
  });

  it("a move onto another area is refused with nothing written; a move to touch it is fine", async () => {
    const p = await makeProject(f.t);
    await draw(p.slug);
    const b = await draw(p.slug, { name: "HD-1", kind: "suite", x: 10, y: 2, w: 3, h: 3 });
    const before = await footprint(p.id);
    const res = await lead().send("patch", `/api/site-areas/${b.id}`, { version: 1, x: 7 });
    expect(res.status).toBe(422);
    expect(res.body.error.message).toContain("Hall 2A");
    expect(await footprint(p.id)).toEqual(before);
    await lead().send("patch", `/api/site-areas/${b.id}`, { version: 1, x: 8 }).expect(200);
  });

  it("marketing and investors may not write; visitors are asked to sign in", async () => {
    const p = await makeProject(f.t);
    const a = await draw(p.slug);
    const before = await footprint(p.id);
    for (const c of [f.as.marketing, f.as.investor]) {
      await c.agent.post(`/api/projects/${p.slug}/site-areas`).set("X-CSRF-Token", c.csrf).send(area({ name: "Hall 2B", x: 12 })).expect(403);
      await c.agent.patch(`/api/site-areas/${a.id}`).set("X-CSRF-Token", c.csrf).send({ version: 1, x: 3 }).expect(403);
      await c.agent.delete(`/api/site-areas/${a.id}`).set("X-CSRF-Token", c.csrf).expect(403);
    }
    const visitor = await newClient(f.t);
    await visitor.agent.post(`/api/projects/${p.slug}/site-areas`).set("X-CSRF-Token", visitor.csrf).send(area({ name: "Hall 2B", x: 12 })).expect(401);
    expect(await footprint(p.id)).toEqual(before);
  });

  it("answers a signed-in caller's plan with private, no-store", async () => {
    const p = await makeProject(f.t);
    const res = await f.as.lead.agent.get(`/api/projects/${p.slug}/site-plan`).expect(200);
    expect(res.headers["cache-control"]).toBe("private, no-store");
  });
});
