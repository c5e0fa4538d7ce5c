import { beforeAll, describe, expect, it } from "vitest";
import type { MediaItem } from "../../src/shared/schemas/media.ts";
import { DEMO, newClient, signIn, type Agent, type TestApp } from "../helpers/app.ts";
import { useMediaFixture } from "../helpers/media-fixture.ts";
import { makeGradientImage, makeJpegTakenAt } from "../helpers/images.ts";

const f = useMediaFixture("media-library");
let t: TestApp;
let project: { id: number; slug: string };
let milestoneId: number;
let otherMilestoneId: number;
let marketing: { agent: Agent; csrf: string };
let lead: { agent: Agent; csrf: string };

async function insertProject(name: string) {
  const slug = `${name}-${Date.now().toString(36)}-${Math.floor(Math.random() * 1e6)}`;
  const [id] = await t.db("projects").insert({ slug, name: `Media test ${slug}`, operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
  return { id: Number(id), slug };
}

async function insertMilestone(projectId: number, name: string): Promise<number> {
  let phase = await t.db("phases").where({ project_id: projectId, name: "Plant" }).first("id");
  if (!phase) {
    const [pid] = await t.db("phases").insert({ project_id: projectId, name: "Plant", sort_order: 1 });
    phase = { id: pid };
  }
  const [id] = await t.db("milestones").insert({ project_id: projectId, phase_id: phase.id, name, area: "Plant yard", system: "cooling", weight: 1, baseline_finish: "2027-03-01", audience: "public" });
  return Number(id);
}

let colour = 0;
/** Uploads one small photo (distinct bytes each time) into the test project and processes it. */
async function photo(opts: { takenAt?: string; name?: string } = {}): Promise<MediaItem> {
  colour += 1;
  const bytes = opts.takenAt
    ? await makeJpegTakenAt(opts.takenAt.replace(/-/g, ":").replace("T", " "))
    : await makeGradientImage({ width: 160, height: 120, from: `#${(colour * 2654435761 % 0xffffff).toString(16).padStart(6, "0")}`, to: "#f2a541" });
  const res = await marketing.agent
    .post("/api/media")
    .set("X-CSRF-Token", marketing.csrf)
    .field("project", project.slug)
    .attach("files", bytes, opts.name ?? `photo-${colour}.jpg`)
    .expect(201);
  await t.drainMediaJobs();
  return (await marketing.agent.get(`/api/media/${res.body[0].id}`).expect(200)).body as MediaItem;
}

const patch = (c: { agent: Agent; csrf: string }, id: number, body: unknown) => c.agent.patch(`/api/media/${id}`).set("X-CSRF-Token", c.csrf).send(body as object);
const list = (c: { agent: Agent }, q: Record<string, string>) => c.agent.get("/api/media").query({ project: project.slug, ...q });

beforeAll(async () => {
  ({ t, project, marketing, lead } = f);
  milestoneId = await insertMilestone(project.id, "Chillers delivered and set");
  const other = await insertProject("media-other");
  otherMilestoneId = await insertMilestone(other.id, "Another project's milestone");
});

describe("PATCH /api/media/:id", () => {
  it("marketing edits caption, credit, alt text, focal point and tags; empty text clears a field", async () => {
    const p = await photo();
    const res = await patch(marketing, p.id, {
      caption: "  Chiller 3 lifted onto its plinth  ",
      credit: "Site team",
      altText: "Crane lifting a chiller onto a concrete plinth",
      focal: { x: 0.25, y: 0.8 },
      tags: { areas: ["Plant yard"], systems: ["cooling"], milestones: [milestoneId] },
    }).expect(200);
    expect(res.body).toMatchObject({
      caption: "Chiller 3 lifted onto its plinth",
      credit: "Site team",
      altText: "Crane lifting a chiller onto a concrete plinth",
      focal: { x: 0.25, y: 0.8 },
      tags: { areas: ["Plant yard"], systems: ["cooling"], milestones: [milestoneId] },
      sensitivity: "unreviewed",
      flaggedForReview: false,
    });
    const cleared = await patch(marketing, p.id, { credit: "", tags: { areas: [] } }).expect(200);
    expect(cleared.body.credit).toBeNull();
    // Only the kinds named are replaced.
    expect(cleared.body.tags).toEqual({ areas: [], systems: ["cooling"], milestones: [milestoneId], blocks: [], plants: [] });
  });

  it("refuses a focal point outside 0..1, unknown fields and an empty patch with 400 naming the field, changing nothing", async () => {
    const p = await photo();
    const r1 = await patch(marketing, p.id, { focal: { x: 1.5, y: 0.5 }, caption: "kept?" }).expect(400);
    expect(r1.body.error.fields["focal.x"]).toMatch(/between 0 and 1/);
    const r2 = await patch(marketing, p.id, { colour: "red" }).expect(400);
    expect(r2.body.error.fields.colour).toBe("is not a known field");
    await patch(marketing, p.id, {}).expect(400);
    const now = await marketing.agent.get(`/api/media/${p.id}`).expect(200);
    expect(now.body.caption).toBeNull();
    expect(now.body.focal).toEqual({ x: 0.5, y: 0.5 });
  });

  it("a milestone of another project is refused with 422 and nothing changes", async () => {
    const p = await photo();
    const res = await patch(marketing, p.id, { caption: "not kept", tags: { milestones: [otherMilestoneId] } }).expect(422);
    expect(res.body.error.fields["tags.milestones"]).toMatch(new RegExp(String(otherMilestoneId)));
    const now = await marketing.agent.get(`/api/media/${p.id}`).expect(200);
    expect(now.body.caption).toBeNull();
    expect(now.body.tags.milestones).toEqual([]);
  });

  it("marketing changing sensitivity is refused with 403, and nothing in that request is applied", async () => {
    const p = await photo();
    const res = await patch(marketing, p.id, { sensitivity: "cleared", caption: "sneaked in" }).expect(403);
    expect(res.body.error.code).toBe("forbidden");
    expect(res.body.error.fields.sensitivity).toMatch(/leads and administrators/);
    const now = await marketing.agent.get(`/api/media/${p.id}`).expect(200);
    expect(now.body).toMatchObject({ sensitivity: "unreviewed", caption: null });
  });

  it("a lead may change sensitivity; the decision and who made it are kept", async () => {
    const p = await photo();
    const res = await patch(lead, p.id, { sensitivity: "restricted" }).expect(200);
    expect(res.body).toMatchObject({ sensitivity: "restricted", flaggedForReview: false, reviewedBy: "Priya Castell" });
    expect(res.body.reviewedAt).toEqual(expect.any(String));
  });

  it("tagging a photo with the security system flags it for review, and sends a cleared one back to unreviewed", async () => {
    const p = await photo();
    const flagged = await patch(marketing, p.id, { tags: { systems: ["security"] } }).expect(200);
    expect(flagged.body).toMatchObject({ sensitivity: "unreviewed", flaggedForReview: true });

    const q = await photo();
    await lead.agent.post(`/api/media/${q.id}/review`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: "cleared" }).expect(200);
    const back = await patch(marketing, q.id, { tags: { systems: ["building", "security"] } }).expect(200);
    expect(back.body).toMatchObject({ sensitivity: "unreviewed", flaggedForReview: true });
  });

  it("an investor or a visitor calling PATCH, bulk tags or review is refused (403, 401) and nothing changes", async () => {
    const p = await photo();
    const investor = await signIn(t, DEMO.investor);
    const visitor = await newClient(t);
    for (const [c, status] of [[investor, 403], [visitor, 401]] as const) {
      await patch(c, p.id, { caption: "x" }).expect(status);
      await c.agent.post("/api/media/bulk-tags").set("X-CSRF-Token", c.csrf).send({ ids: [p.id], add: { areas: ["Hall 2A"] } }).expect(status);
      await c.agent.post(`/api/media/${p.id}/review`).set("X-CSRF-Token", c.csrf).send({ sensitivity: "cleared" }).expect(status);
      await c.agent.get(`/api/media/${p.id}`).expect(status);
      await c.agent.get(`/api/media/${p.id}/original`).expect(status);
    }
    const now = await marketing.agent.get(`/api/media/${p.id}`).expect(200);
    expect(now.body).toMatchObject({ caption: null, sensitivity: "unreviewed", tags: { areas: [] } });
  });
});

describe("POST /api/media/bulk-tags", () => {
  it("adds and removes tags on several photos at once; security flags each of them", async () => {
    const a = await photo();
    const b = await photo();
    const c = await photo();
    await patch(marketing, a.id, { tags: { areas: ["Old name"] } }).expect(200);
    const res = await marketing.agent
      .post("/api/media/bulk-tags")
      .set("X-CSRF-Token", marketing.csrf)
      .send({ ids: [a.id, b.id], add: { areas: ["Hall 2A"], systems: ["security"], milestones: [milestoneId] }, remove: { areas: ["Old name"] } })
      .expect(200);
    expect(res.body.updated).toBe(2);
    for (const item of res.body.items as MediaItem[]) {
      expect(item.tags).toEqual({ areas: ["Hall 2A"], systems: ["security"], milestones: [milestoneId], blocks: [], plants: [] });
      expect(item.flaggedForReview).toBe(true);
    }
    const untouched = await marketing.agent.get(`/api/media/${c.id}`).expect(200);
    expect(untouched.body.tags).toEqual({ areas: [], systems: [], milestones: [], blocks: [], plants: [] });
  });

  it("an unknown photo among the ids refuses the whole request with 404 and tags none", async () => {
    const a = await photo();
    const res = await marketing.agent.post("/api/media/bulk-tags").set("X-CSRF-Token", marketing.csrf).send({ ids: [a.id, 999999999], add: { areas: ["Hall 2B"] } }).expect(404);
    expect(res.body.error.fields.ids).toMatch(/999999999/);
    expect((await marketing.agent.get(`/api/media/${a.id}`)).body.tags.areas).toEqual([]);
  });

  it("names at least one tag: an empty add and remove is 400", async () => {
    const a = await photo();
    await marketing.agent.post("/api/media/bulk-tags").set("X-CSRF-Token", marketing.csrf).send({ ids: [a.id], add: { areas: [] } }).expect(400);
  });
});

describe("GET /api/media: the library with filters, paginated", () => {
  let ids: { hall: number; yard: number; noAlt: number; early: number; late: number; secure: number };
  beforeAll(async () => {
    const hall = await photo({ name: "hall-2a-frame.jpg" });
    const yard = await photo();
    const noAlt = await photo();
    const early = await photo({ takenAt: "2026-01-10T09:00:00" });
    const late = await photo({ takenAt: "2026-06-20T15:30:00" });
    const secure = await photo();
    ids = { hall: hall.id, yard: yard.id, noAlt: noAlt.id, early: early.id, late: late.id, secure: secure.id };
    await patch(marketing, hall.id, { altText: "Steel frame", caption: "Frame of the energy centre", tags: { areas: ["Energy centre"], systems: ["building"] } }).expect(200);
    await patch(marketing, yard.id, { altText: "Yard", tags: { areas: ["Fuel compound"], systems: ["fuel"], milestones: [milestoneId] } }).expect(200);
    for (const id of [early.id, late.id]) await patch(marketing, id, { altText: "Dated" }).expect(200);
    await patch(marketing, secure.id, { altText: "Doors", tags: { systems: ["security"] } }).expect(200);
    await lead.agent.post(`/api/media/${yard.id}/review`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: "cleared" }).expect(200);
  });

  const idsOf = (body: { items: MediaItem[] }) => body.items.map((i) => i.id);

  it("filters by area, system, milestone and any tag", async () => {
    expect(idsOf((await list(marketing, { area: "Energy centre" }).expect(200)).body)).toEqual([ids.hall]);
    expect(idsOf((await list(marketing, { system: "fuel" }).expect(200)).body)).toEqual([ids.yard]);
    const byMilestone = idsOf((await list(marketing, { milestone: String(milestoneId) }).expect(200)).body);
    expect(byMilestone).toContain(ids.yard);
    expect(byMilestone).not.toContain(ids.hall);
    expect(idsOf((await list(marketing, { tag: "Fuel compound" }).expect(200)).body)).toEqual([ids.yard]);
    expect(idsOf((await list(marketing, { tag: "fuel" }).expect(200)).body)).toEqual([ids.yard]);
  });

  it("filters by capture date range (inclusive calendar dates, as the camera recorded them)", async () => {
    const res = await list(marketing, { takenFrom: "2026-01-10", takenTo: "2026-06-19" }).expect(200);
    expect(idsOf(res.body)).toEqual([ids.early]);
    const both = await list(marketing, { takenFrom: "2026-01-01", takenTo: "2026-06-20" }).expect(200);
    expect(idsOf(both.body).sort()).toEqual([ids.early, ids.late].sort());
    expect(res.body.items[0].takenAt).toBe("2026-01-10T09:00:00");
    await list(marketing, { takenFrom: "2026-07-01", takenTo: "2026-06-01" }).expect(400);
  });

  it("filters by sensitivity, by missing alt text, by the security flag and by words", async () => {
    expect(idsOf((await list(marketing, { sensitivity: "cleared" }).expect(200)).body)).toEqual([ids.yard]);
    const missing = idsOf((await list(marketing, { missingAlt: "true" }).expect(200)).body);
    expect(missing).toContain(ids.noAlt);
    expect(missing).not.toContain(ids.hall);
    expect(idsOf((await list(marketing, { flagged: "true" }).expect(200)).body)).toContain(ids.secure);
    expect(idsOf((await list(marketing, { q: "hall-2a" }).expect(200)).body)).toEqual([ids.hall]);
  });

  it("pages newest first with the total", async () => {
    const all = (await list(marketing, { pageSize: "100" }).expect(200)).body;
    const first = (await list(marketing, { pageSize: "2", page: "1" }).expect(200)).body;
    const second = (await list(marketing, { pageSize: "2", page: "2" }).expect(200)).body;
    expect(first.total).toBe(all.total);
    expect(first.items).toHaveLength(2);
    expect(idsOf(first)).toEqual(idsOf(all).slice(0, 2));
    expect(idsOf(second)).toEqual(idsOf(all).slice(2, 4));
    const created = (all.items as MediaItem[]).map((i) => i.createdAt);
    expect([...created].sort().reverse()).toEqual(created);
  });

  it("refuses a bad filter with 400 naming it", async () => {
    const res = await list(marketing, { sensitivity: "secret" }).expect(400);
    expect(Object.keys(res.body.error.fields)).toEqual(["sensitivity"]);
  });

  it("is for staff only", async () => {
    await list(await signIn(t, DEMO.investor), {}).expect(403);
    await list(await newClient(t), {}).expect(401);
  });
});

describe("the review queue", () => {
  it("lists a project's unreviewed photos for leads, security-flagged first; clear and restrict take them out", async () => {
    const q = await insertProject("media-review");
    const upload = async (c: string) =>
      (
        await marketing.agent
          .post("/api/media")
          .set("X-CSRF-Token", marketing.csrf)
          .field("project", q.slug)
          .attach("files", await makeGradientImage({ width: 100, height: 80, from: c }), `${c.slice(1)}.jpg`)
          .expect(201)
      ).body[0].id as number;
    const plain = await upload("#112233");
    const doors = await upload("#445566");
    await t.drainMediaJobs();
    await patch(marketing, doors, { tags: { systems: ["security"] } }).expect(200);

    const queue = await lead.agent.get("/api/media/review").query({ project: q.slug }).expect(200);
    expect((queue.body as MediaItem[]).map((i) => i.id)).toEqual([doors, plain]);
    expect(queue.body[0].flaggedForReview).toBe(true);

    await marketing.agent.get("/api/media/review").query({ project: q.slug }).expect(403);
    await marketing.agent.post(`/api/media/${doors}/review`).set("X-CSRF-Token", marketing.csrf).send({ sensitivity: "cleared" }).expect(403);

    const restricted = await lead.agent.post(`/api/media/${doors}/review`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: "restricted" }).expect(200);
    expect(restricted.body).toMatchObject({ sensitivity: "restricted", flaggedForReview: false });
    await lead.agent.post(`/api/media/${plain}/review`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: "cleared" }).expect(200);
    await lead.agent.post(`/api/media/${plain}/review`).set("X-CSRF-Token", lead.csrf).send({ sensitivity: "unreviewed" }).expect(400);
    expect((await lead.agent.get("/api/media/review").query({ project: q.slug }).expect(200)).body).toEqual([]);
  });
});

describe("GET /api/media/vocabulary", () => {
  it("offers the project's areas, the systems, its milestones and the upload limits", async () => {
    const res = await marketing.agent.get("/api/media/vocabulary").query({ project: project.slug }).expect(200);
    expect(res.body.project).toMatchObject({ id: project.id, slug: project.slug });
    expect(res.body.areas).toEqual(expect.arrayContaining(["Energy centre", "Fuel compound", "Plant yard"]));
    expect(res.body.systems).toContain("security");
    expect(res.body.milestones).toEqual([{ id: milestoneId, name: "Chillers delivered and set" }]);
    expect(res.body.limits).toEqual({ maxFileMb: 40, maxFiles: 20, maxPixels: 100_000_000 });
  });
});
