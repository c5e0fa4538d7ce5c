import { describe, expect, it } from "vitest";
import type { FacilityAnswer } from "../../src/shared/schemas/facility.ts";
import type { Gallery, MediaItem } from "../../src/shared/schemas/media.ts";
import type { PostSummary } from "../../src/shared/schemas/posts.ts";
import { DEMO_PROJECT_SLUG } from "../../server/seed/demo.seed.ts";
import { seedFacility } from "../../server/seed/facility.seed.ts";
import { newClient } from "../helpers/app.ts";
import { createPhoto, createProject, postInput, useAppAsEveryRole, type Client } from "./posts-fixtures.ts";

/**
 * The demo facility (the seed) and tagging photos and updates with a capacity block or a plant
 * system: only a block or system of the same project, never one the content's audience may not
 * see, and the `?block=` / `?plant=` filters show each reader only what they may read.
 */

const f = useAppAsEveryRole();

async function facilityOf(c: { agent: Client["agent"] }, slug = DEMO_PROJECT_SLUG): Promise<FacilityAnswer> {
  return (await c.agent.get(`/api/projects/${slug}/facility`).expect(200)).body as FacilityAnswer;
}

/** A project with one block and one system of each audience, written as rows (the facility's own tests drive its API). */
async function projectWithFacility() {
  const project = await createProject(f.t);
  const ids: Record<string, number> = {};
  for (const audience of ["public", "investor", "internal"] as const) {
    const [block] = await f.t.db("capacity_blocks").insert({ project_id: project.id, name: `Hall ${audience}`, racks: 10, it_kw: 100, max_kw_per_rack: 10, audience });
    const [system] = await f.t.db("plant_systems").insert({ project_id: project.id, name: `Chillers ${audience}`, kind: "cooling", audience, needed_per_system: 1, design: "{}" });
    ids[`block-${audience}`] = Number(block);
    ids[`plant-${audience}`] = Number(system);
  }
  return { ...project, ids };
}

const send = (c: Client, method: "post" | "patch", path: string, body: object) => c.agent[method](path).set("X-CSRF-Token", c.csrf).send(body);

async function publishedPost(slug: string, cover: number, over: Record<string, unknown>): Promise<number> {
  const { as } = f;
  const res = await send(as.lead, "post", `/api/projects/${slug}/posts`, postInput(cover, over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  await as.lead.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
  return Number(res.body.id);
}

describe("the demo facility (Aldermere Campus Phase 2)", () => {
  it("has Hall 2A, HD-1 and Hall 2B with DESIGN.md's racks, kW and density, each depending on the programme", async () => {
    const facility = await facilityOf(await newClient(f.t));
    const block = (name: string) => facility.blocks.find((b) => b.name === name)!;
    // Source: DESIGN.md, the demo scenario (Hall 2A 48 racks 480 kW; HD-1 20 racks up to 25 kW, 500 kW; Hall 2B 48 racks 480 kW).
    expect([block("Hall 2A").racks, block("Hall 2A").itKw, block("Hall 2A").maxKwPerRack]).toEqual([48, 480, 10]);
    expect([block("HD-1").racks, block("HD-1").itKw, block("HD-1").maxKwPerRack]).toEqual([20, 500, 25]);
    expect([block("Hall 2B").racks, block("Hall 2B").itKw]).toEqual([48, 480]);
    expect(block("Hall 2B").stage).toMatch(/later/i);
    for (const b of facility.blocks) {
      expect(b.dependsOn.length, b.name).toBeGreaterThan(0);
      expect(b.forecastReadyDate, b.name).not.toBeNull();
    }
    // Hall 2B is a later stage: ready after the first two.
    expect(block("Hall 2B").forecastReadyDate! > block("HD-1").forecastReadyDate!).toBe(true);
  });

  it("has the plant DESIGN.md gives, with its design labels, and keeps the internal system from visitors", async () => {
    const visitor = await facilityOf(await newClient(f.t));
    const staff = await facilityOf(f.as.lead);
    const system = (name: string) => staff.systems.find((s) => s.name === name)!;
    // Source: DESIGN.md (5 × 400 kW chillers, 4 needed; 8 fans, 6 needed; 2 + 1 × 1,250 kVA; UPS 4 × 500 kW, 3 needed) and CHECKS.md's redundancy table.
    expect([system("Chillers").units.length, system("Chillers").neededPerSystem, system("Chillers").ratingPerUnit, system("Chillers").redundancy.design]).toEqual([5, 4, 400, "N+1"]);
    expect([system("Supply fans").units.length, system("Supply fans").neededPerSystem, system("Supply fans").redundancy.design]).toEqual([8, 6, "N+2"]);
    expect([system("Standby generators").units.length, system("Standby generators").ratingPerUnit, system("Standby generators").ratingUnit, system("Standby generators").redundancy.design]).toEqual([3, 1250, "kVA", "N+1"]);
    expect([system("UPS modules").units.length, system("UPS modules").ratingPerUnit, system("UPS modules").redundancy.design]).toEqual([4, 500, "N+1"]);
    const tank = system("Bulk fuel tank");
    expect([tank.kind, tank.ratingPerUnit, tank.ratingUnit, tank.design.usableFuelLitres, tank.design.specificFuelConsumption]).toEqual(["fuel_storage", 40_000, "L", 38_000, 0.27]);
    expect(tank.fuel?.usableLitres).toBe(38_000);
    // Nothing is past L2 yet: the programme's L3, L4 and L5 are all ahead, so no system carries its load today.
    expect(staff.systems.flatMap((s) => s.units).some((u) => u.available)).toBe(false);
    expect(staff.systems.some((s) => s.audience === "internal")).toBe(true);
    expect(visitor.systems.map((s) => s.audience)).not.toContain("internal");
    expect(visitor.systems.map((s) => s.name)).toEqual(expect.arrayContaining(["Chillers", "Supply fans", "Standby generators", "Bulk fuel tank", "UPS modules"]));
    expect(visitor.features.every((x) => x.audience === "public")).toBe(true);
    for (const kind of ["security", "client", "connectivity", "certification"] as const) expect(visitor.features.some((x) => x.kind === kind), kind).toBe(true);
    expect(visitor.features.filter((x) => x.kind === "certification").map((x) => x.status).sort()).toEqual(["in_audit", "planned"]);
  });

  it("gives each unit a dated stage history by the demo lead, late and backward steps with their reasons", async () => {
    const project = await f.t.db("projects").where({ slug: DEMO_PROJECT_SLUG }).first("id");
    const events = (await f.t.db("facility_events").where({ project_id: project.id, subject: "unit", field: "stage" })) as Array<{ subject_name: string; from_value: string | null; to_value: string; on_date: unknown; note: string | null; by_user_id: number | null }>;
    const lead = await f.t.db("users").where({ email: "lead@kestrel.example" }).first("id");
    expect(events.length).toBeGreaterThan(40);
    expect(events.every((e) => e.by_user_id === Number(lead.id))).toBe(true);
    const late = events.find((e) => e.subject_name === "Chiller 3" && e.to_value === "delivered")!;
    expect(late.note).toMatch(/late/i);
    const backwards = events.find((e) => e.subject_name === "Fan 5" && e.from_value === "installed" && e.to_value === "delivered")!;
    expect(backwards.note).toBeTruthy();
    // The generators' delivery matches the programme's actual finish of "Generators delivered and set".
    const generators = await f.t.db("milestones").where({ project_id: project.id }).andWhere("name", "like", "Generators delivered%").first("actual_finish");
    const day = (v: unknown) => (v instanceof Date ? v.toISOString().slice(0, 10) : String(v).slice(0, 10));
    const g3 = events.find((e) => e.subject_name === "Generator 3" && e.to_value === "installed")!;
    expect(day(g3.on_date)).toBe(day(generators.actual_finish));
  });

  it("changes nothing on a second run", async () => {
    const project = await f.t.db("projects").where({ slug: DEMO_PROJECT_SLUG }).first("id");
    const before = await f.t.db("facility_events").where({ project_id: project.id }).count({ n: "*" }).first();
    expect((await seedFacility(f.t.db, Number(project.id), { byUserId: null })).created).toEqual([]);
    const after = await f.t.db("facility_events").where({ project_id: project.id }).count({ n: "*" }).first();
    expect(Number(after?.n)).toBe(Number(before?.n));
  });

  it("tags the demo's chiller photo and updates, which the plant filter finds for a visitor", async () => {
    const visitor = await newClient(f.t);
    const chillers = (await facilityOf(visitor)).systems.find((s) => s.name === "Chillers")!;
    const gallery = (await visitor.agent.get(`/api/projects/${DEMO_PROJECT_SLUG}/gallery?plant=${chillers.id}`).expect(200)).body as Gallery;
    expect(gallery.items.length).toBeGreaterThan(0);
    expect(gallery.items.every((p) => p.facilityTags.some((t) => t.kind === "plant" && t.id === chillers.id && t.name === "Chillers"))).toBe(true);
    const posts = (await visitor.agent.get(`/api/projects/${DEMO_PROJECT_SLUG}/posts?plant=${chillers.id}`).expect(200)).body as PostSummary[];
    expect(posts.map((p) => p.title)).toContain("Chillers on their plinths");
    expect(posts[0]!.tags).toContainEqual({ kind: "plant", value: String(chillers.id), name: "Chillers" });
  });
});

describe("tagging photos with a block or a plant system", () => {
  it("tags a photo with a block and a system of its project, and lists it by either", async () => {
    const { as } = f;
    const p = await projectWithFacility();
    const photo = await createPhoto(f.t, p.id);
    const res = await send(as.marketing, "patch", `/api/media/${photo.id}`, { tags: { blocks: [p.ids["block-public"]], plants: [p.ids["plant-investor"]] } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect((res.body as MediaItem).tags).toMatchObject({ blocks: [p.ids["block-public"]], plants: [p.ids["plant-investor"]] });
    const byBlock = await as.marketing.agent.get(`/api/media?project=${p.slug}&block=${p.ids["block-public"]}`).expect(200);
    expect(byBlock.body.items.map((i: MediaItem) => i.id)).toEqual([photo.id]);
    const byOther = await as.marketing.agent.get(`/api/media?project=${p.slug}&block=${p.ids["block-investor"]}`).expect(200);
    expect(byOther.body.items).toEqual([]);
  });

  it("refuses an internal system on a photo that can be published, and a block of another project, writing nothing", async () => {
    const { as } = f;
    const p = await projectWithFacility();
    const other = await projectWithFacility();
    const photo = await createPhoto(f.t, p.id);
    const internal = await send(as.lead, "patch", `/api/media/${photo.id}`, { tags: { plants: [p.ids["plant-internal"]] }, caption: "Should not be saved" });
    expect(internal.status).toBe(422);
    expect(internal.body.error.fields["tags.plants"]).toMatch(/Chillers internal/);
    const foreign = await send(as.lead, "patch", `/api/media/${photo.id}`, { tags: { blocks: [other.ids["block-public"]] } });
    expect(foreign.status).toBe(422);
    expect(foreign.body.error.fields["tags.blocks"]).toMatch(/not in this project/);
    const bulk = await send(as.lead, "post", "/api/media/bulk-tags", { ids: [photo.id], add: { plants: [p.ids["plant-internal"]] } });
    expect(bulk.status).toBe(422);
    const stored = (await as.lead.agent.get(`/api/media/${photo.id}`).expect(200)).body as MediaItem;
    expect(stored.tags.plants).toEqual([]);
    expect(stored.tags.blocks).toEqual([]);
    expect(stored.caption).toBeNull();
  });

  it("lets a restricted photo carry an internal system, and refuses to clear it until the tag is gone", async () => {
    const { as } = f;
    const p = await projectWithFacility();
    const photo = await createPhoto(f.t, p.id, { sensitivity: "restricted" });
    await send(as.lead, "patch", `/api/media/${photo.id}`, { tags: { plants: [p.ids["plant-internal"]] } }).expect(200);
    const clear = await send(as.lead, "post", `/api/media/${photo.id}/review`, { sensitivity: "cleared" });
    expect(clear.status).toBe(422);
    expect(((await as.lead.agent.get(`/api/media/${photo.id}`).expect(200)).body as MediaItem).sensitivity).toBe("restricted");
  });

  it("shows each gallery reader only the blocks and systems they may see, and a hidden one's filter is not found", async () => {
    const { as } = f;
    const p = await projectWithFacility();
    const photo = await createPhoto(f.t, p.id);
    await send(as.lead, "patch", `/api/media/${photo.id}`, { tags: { blocks: [p.ids["block-public"], p.ids["block-investor"]] } }).expect(200);
    await publishedPost(p.slug, photo.id, {});
    const visitor = await newClient(f.t);
    const open = (await visitor.agent.get(`/api/projects/${p.slug}/gallery?block=${p.ids["block-public"]}`).expect(200)).body as Gallery;
    expect(open.items.map((i) => i.id)).toEqual([photo.id]);
    expect(open.items[0]!.facilityTags).toEqual([{ kind: "block", id: p.ids["block-public"], name: "Hall public" }]);
    await visitor.agent.get(`/api/projects/${p.slug}/gallery?block=${p.ids["block-investor"]}`).expect(404);
    const investor = (await as.investor.agent.get(`/api/projects/${p.slug}/gallery?block=${p.ids["block-investor"]}`).expect(200)).body as Gallery;
    expect(investor.items[0]!.facilityTags.map((t) => t.name).sort()).toEqual(["Hall investor", "Hall public"]);
    await visitor.agent.get(`/api/projects/${p.slug}/gallery?block=abc`).expect(400);
  });
});

describe("tagging updates with a block or a plant system", () => {
  it("tags a public update with a public block and lists it by that block only", async () => {
    const p = await projectWithFacility();
    const cover = await createPhoto(f.t, p.id);
    const tagged = await publishedPost(p.slug, cover.id, { tags: [{ kind: "block", value: String(p.ids["block-public"]) }, { kind: "area", value: "Hall 2A" }] });
    await publishedPost(p.slug, cover.id, { tags: [{ kind: "area", value: "Hall 2A" }] });
    const visitor = await newClient(f.t);
    const list = await visitor.agent.get(`/api/projects/${p.slug}/posts?block=${p.ids["block-public"]}`).expect(200);
    expect((list.body as PostSummary[]).map((x) => x.id)).toEqual([tagged]);
    expect(list.headers["x-total-count"]).toBe("1");
    expect((list.body as PostSummary[])[0]!.tags).toContainEqual({ kind: "block", value: String(p.ids["block-public"]), name: "Hall public" });
    // A bare number is no topic: the id of a block does not match `?tag=`.
    const byTag = await visitor.agent.get(`/api/projects/${p.slug}/posts?tag=${p.ids["block-public"]}`).expect(200);
    expect(byTag.body).toEqual([]);
  });

  it("refuses an internal system or an investor block on a public update, and an internal system on an investor one (422, nothing written)", async () => {
    const { as } = f;
    const p = await projectWithFacility();
    const cover = await createPhoto(f.t, p.id);
    const before = await f.t.db("posts").where({ project_id: p.id }).count({ n: "*" }).first();
    for (const [audience, tag] of [
      ["public", { kind: "plant", value: String(p.ids["plant-internal"]) }],
      ["public", { kind: "block", value: String(p.ids["block-investor"]) }],
      ["investor", { kind: "plant", value: String(p.ids["plant-internal"]) }],
    ] as const) {
      const res = await send(as.marketing, "post", `/api/projects/${p.slug}/posts`, postInput(cover.id, { audience, tags: [tag] }));
      expect(res.status, `${audience} ${tag.kind}`).toBe(422);
      expect(res.body.error.fields.tags).toMatch(/cannot be shown/);
    }
    const after = await f.t.db("posts").where({ project_id: p.id }).count({ n: "*" }).first();
    expect(Number(after?.n)).toBe(Number(before?.n));
    const ok = await send(as.marketing, "post", `/api/projects/${p.slug}/posts`, postInput(cover.id, { audience: "investor", tags: [{ kind: "block", value: String(p.ids["block-investor"]) }] }));
    expect(ok.status).toBe(201);
    // Making that update public would show the investor block to visitors: refused, the audience kept.
    const detail = await as.marketing.agent.get(`/api/posts/${ok.body.id}`).expect(200);
    const widen = await send(as.marketing, "patch", `/api/posts/${ok.body.id}`, { version: detail.body.version, audience: "public" });
    expect(widen.status).toBe(422);
    expect((await as.marketing.agent.get(`/api/posts/${ok.body.id}`).expect(200)).body.audience).toBe("investor");
    const bad = await send(as.marketing, "post", `/api/projects/${p.slug}/posts`, postInput(cover.id, { tags: [{ kind: "block", value: "Hall 2A" }] }));
    expect(bad.status).toBe(400);
  });

  it("lists by a block only what the caller may read, and a block hidden from them is not found", async () => {
    const { as } = f;
    const p = await projectWithFacility();
    const cover = await createPhoto(f.t, p.id);
    const investorOnly = await publishedPost(p.slug, cover.id, { audience: "investor", tags: [{ kind: "block", value: String(p.ids["block-public"]) }, { kind: "block", value: String(p.ids["block-investor"]) }] });
    const visitor = await newClient(f.t);
    const open = await visitor.agent.get(`/api/projects/${p.slug}/posts?block=${p.ids["block-public"]}`).expect(200);
    expect(open.body).toEqual([]);
    await visitor.agent.get(`/api/projects/${p.slug}/posts?block=${p.ids["block-investor"]}`).expect(404);
    await as.investor.agent.get(`/api/projects/${p.slug}/posts?plant=${p.ids["plant-internal"]}`).expect(404);
    const investor = await as.investor.agent.get(`/api/projects/${p.slug}/posts?block=${p.ids["block-investor"]}`).expect(200);
    expect((investor.body as PostSummary[]).map((x) => x.id)).toEqual([investorOnly]);
    // Another project's block is not this project's: not found either.
    const other = await projectWithFacility();
    await as.lead.agent.get(`/api/projects/${p.slug}/posts?block=${other.ids["block-public"]}`).expect(404);
  });
});
