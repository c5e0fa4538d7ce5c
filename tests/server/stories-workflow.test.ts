import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, signInAll, type Client } from "./posts-fixtures.ts";

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  t = await startTestApp();
  as = await signInAll(t);
});
afterAll(async () => {
  await t.close();
});

const act = (c: Client, id: number, action: string, body?: object) => {
  const req = c.agent.post(`/api/stories/${id}/${action}`).set("X-CSRF-Token", c.csrf);
  return body ? req.send(body) : req;
};

/** A project with photos of Hall 2A taken months apart, and a story of them written by marketing. */
async function story(over: Record<string, unknown> = {}) {
  const p = await createProject(t);
  const march = await createPhoto(t, p.id, { takenAt: "2026-03-02T10:15:00", caption: "Hall 2A slab poured" });
  const july = await createPhoto(t, p.id, { takenAt: "2026-07-20T14:00:00", caption: "Hall 2A fitted out" });
  const yard = await createPhoto(t, p.id, { caption: "Plant yard" });
  const items = [
    { kind: "pair", area: "Hall 2A", beforeMediaId: march.id, afterMediaId: july.id, caption: "From slab to fit-out" },
    { kind: "photo", mediaId: yard.id, caption: "The plant yard" },
  ];
  const res = await as.marketing.agent
    .post(`/api/projects/${p.slug}/stories`)
    .set("X-CSRF-Token", as.marketing.csrf)
    .send({ title: "Hall 2A, then and now", intro: "Five months of building.", audience: "public", items, ...over });
  return { project: p, res, photos: { march, july, yard } };
}

describe("photo stories", () => {
  it("marketing writes a story, a lead approves and publishes it; visitors read its items in order with their pictures", async () => {
    const { project, res, photos } = await story();
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ slug: "hall-2a-then-and-now", status: "draft" });
    const id = res.body.id as number;
    await act(as.marketing, id, "submit").expect(200);
    expect((await act(as.marketing, id, "approve")).status).toBe(403);
    await act(as.lead, id, "approve").expect(200);
    expect((await act(as.lead, id, "publish")).body).toEqual({ id, status: "published" });

    const visitor = await newClient(t);
    const list = await visitor.agent.get(`/api/projects/${project.slug}/stories`).expect(200);
    expect(list.body).toHaveLength(1);
    expect(list.body[0]).toMatchObject({ title: "Hall 2A, then and now", itemCount: 2 });
    expect(list.body[0].cover.id).toBe(photos.july.id);
    const page = await visitor.agent.get(`/api/projects/${project.slug}/stories/hall-2a-then-and-now`).expect(200);
    expect(page.body.items.map((i: { kind: string }) => i.kind)).toEqual(["pair", "photo"]);
    expect(page.body.items[0]).toMatchObject({ area: "Hall 2A", caption: "From slab to fit-out" });
    expect(page.body.items[0].before.takenAt).toBe("2026-03-02T10:15:00");
    expect(page.body.items[0].after.takenAt).toBe("2026-07-20T14:00:00");
    expect(page.body.items[0].before.sources.avif.length).toBeGreaterThan(0);
    expect(page.body.version).toBeUndefined();
    for (const url of photos.march.urls.slice(0, 2)) await visitor.agent.get(url).expect(200);
  });

  it("reorders and replaces items with PATCH (order = array order)", async () => {
    const { res, photos } = await story();
    const id = res.body.id as number;
    const patched = await as.marketing.agent
      .patch(`/api/stories/${id}`)
      .set("X-CSRF-Token", as.marketing.csrf)
      .send({ items: [{ kind: "photo", mediaId: photos.yard.id, caption: "Yard first" }, { kind: "photo", mediaId: photos.march.id }] })
      .expect(200);
    expect(patched.body.items.map((i: { mediaId: number }) => i.mediaId)).toEqual([photos.yard.id, photos.march.id]);
    expect(patched.body.items[1].caption).toBe("");
  });

  it.each([
    ["the same capture date", { takenAt: "2026-05-01T08:00:00" }, { takenAt: "2026-05-01T17:30:00" }, /both photos were taken on 2026-05-01/],
    ["a photo without a capture time", { takenAt: null }, { takenAt: "2026-05-01T17:30:00" }, /carries no capture time/],
    ["the then photo later than the now photo", { takenAt: "2026-09-01T08:00:00" }, { takenAt: "2026-05-01T08:00:00" }, /later than the “now” photo/],
  ])("refuses to publish a then-and-now pair with %s (422)", async (_label, before, after, pattern) => {
    const p = await createProject(t);
    const a = await createPhoto(t, p.id, before);
    const b = await createPhoto(t, p.id, after);
    const created = await as.lead.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.lead.csrf)
      .send({ title: "Pair", audience: "public", items: [{ kind: "pair", area: "Plant yard", beforeMediaId: a.id, afterMediaId: b.id }] })
      .expect(201);
    const res = await act(as.lead, created.body.id, "publish");
    expect(res.status).toBe(422);
    expect(res.body.error.problems.map((x: { code: string }) => x.code)).toEqual(["pair_dates"]);
    expect(res.body.error.message).toMatch(pattern);
    expect((await t.db("stories").where({ id: created.body.id }).first()).status).toBe("draft");
  });

  it("refuses a pair of one photo with itself (400) and a photo from another project (422)", async () => {
    const p = await createProject(t);
    const other = await createProject(t);
    const a = await createPhoto(t, p.id);
    const foreign = await createPhoto(t, other.id);
    const same = await as.marketing.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.marketing.csrf)
      .send({ title: "Same", audience: "public", items: [{ kind: "pair", area: "Hall 2A", beforeMediaId: a.id, afterMediaId: a.id }] });
    expect(same.status).toBe(400);
    expect(same.body.error.fields["items.0.afterMediaId"]).toMatch(/different photo/);
    const cross = await as.marketing.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.marketing.csrf)
      .send({ title: "Cross", audience: "public", items: [{ kind: "photo", mediaId: foreign.id }] });
    expect(cross.status).toBe(422);
    expect(cross.body.error.fields.items).toContain(`#${foreign.id}`);
    expect(await t.db("stories").where({ project_id: p.id }).first()).toBeUndefined();
  });

  it("runs the photo checks: a restricted photo in public content, naming the item", async () => {
    const p = await createProject(t);
    const secret = await createPhoto(t, p.id, { sensitivity: "restricted" });
    const created = await as.lead.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.lead.csrf)
      .send({ title: "Doors", audience: "public", items: [{ kind: "photo", mediaId: secret.id, caption: "Access control" }] })
      .expect(201);
    const res = await act(as.lead, created.body.id, "publish");
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(new RegExp(`Item 1 \\(photo #${secret.id}\\) is restricted`));
  });

  it("refuses to publish a story with no items", async () => {
    const p = await createProject(t);
    const created = await as.lead.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", as.lead.csrf).send({ title: "Empty", audience: "public" }).expect(201);
    const res = await act(as.lead, created.body.id, "publish");
    expect(res.status).toBe(422);
    expect(res.body.error.problems[0].code).toBe("no_items");
  });

  it("keeps investor stories from visitors, and withdrawing hides a story again", async () => {
    const { project, res } = await story({ audience: "investor" });
    const id = res.body.id as number;
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    await act(as.lead, id, "publish").expect(200);
    const visitor = await newClient(t);
    expect((await visitor.agent.get(`/api/projects/${project.slug}/stories`).expect(200)).body).toEqual([]);
    await visitor.agent.get(`/api/projects/${project.slug}/stories/${res.body.slug}`).expect(404);
    await as.investor.agent.get(`/api/projects/${project.slug}/stories/${res.body.slug}`).expect(200);
    await act(as.lead, id, "withdraw").expect(200);
    await as.investor.agent.get(`/api/projects/${project.slug}/stories/${res.body.slug}`).expect(404);
  });

  it("refuses writing to investors (403) and visitors (401)", async () => {
    const p = await createProject(t);
    expect((await as.investor.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", as.investor.csrf).send({ title: "x", audience: "public" })).status).toBe(403);
    const visitor = await newClient(t);
    expect((await visitor.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", visitor.csrf).send({ title: "x", audience: "public" })).status).toBe(401);
  });

  it("refuses an address another story holds with 409 naming the slug", async () => {
    const p = await createProject(t);
    const send = () => as.marketing.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", as.marketing.csrf).send({ title: "Same", audience: "public", slug: "yard-story" });
    await send().expect(201);
    const res = await send();
    expect(res.status).toBe(409);
    expect(res.body.error.fields.slug).toBeDefined();
  });

  // Its photos' usages and its items are rewritten by every save: saves of different stories at
  // the same moment must not deadlock one another (a deadlock is a 500).
  it("6 stories created at once all answer 201, each with its photos recorded", async () => {
    const p = await createProject(t);
    const photos = await Promise.all(Array.from({ length: 6 }, () => createPhoto(t, p.id)));
    const res = await Promise.all(
      photos.map((ph, i) =>
        as.marketing.agent
          .post(`/api/projects/${p.slug}/stories`)
          .set("X-CSRF-Token", as.marketing.csrf)
          .send({ title: `Generator hall, visit ${i + 1}`, audience: "public", items: [{ kind: "photo", mediaId: ph.id }] }),
      ),
    );
    expect(res.map((r) => r.status)).toEqual(Array(6).fill(201));
    const ids = res.map((r) => r.body.id as number);
    const rows = await t.db("media_usages").where({ owner_type: "story" }).whereIn("owner_id", ids).select("owner_id", "media_id");
    expect(new Map(rows.map((r: { owner_id: number; media_id: number }) => [Number(r.owner_id), Number(r.media_id)]))).toEqual(new Map(ids.map((id, i) => [id, photos[i]!.id])));
    expect(rows).toHaveLength(6);
  });
});
