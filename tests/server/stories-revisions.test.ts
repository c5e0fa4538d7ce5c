import { beforeAll, describe, expect, it } from "vitest";
import { newClient, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, type Client, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const patch = (c: Client, id: number, body: Record<string, unknown>) => c.agent.patch(`/api/stories/${id}`).set("X-CSRF-Token", c.csrf).send(body);
const act = (c: Client, id: number, action: string) => c.agent.post(`/api/stories/${id}/${action}`).set("X-CSRF-Token", c.csrf);
const revisionCount = async (id: number) => Number((await t.db("story_revisions").where({ story_id: id }).count({ n: "*" }).first())!.n);

/** A project with three photos of the plant yard (two taken months apart) and a draft story of two of them. */
async function draft(by: Client, over: Record<string, unknown> = {}) {
  const project = await createProject(t);
  const slab = await createPhoto(t, project.id, { takenAt: "2026-03-02T10:15:00" });
  const chillers = await createPhoto(t, project.id, { takenAt: "2026-08-10T11:00:00" });
  const tank = await createPhoto(t, project.id);
  const res = await by.agent
    .post(`/api/projects/${project.slug}/stories`)
    .set("X-CSRF-Token", by.csrf)
    .send({
      title: "The plant yard",
      intro: "Slab to chillers.",
      audience: "public",
      items: [
        { kind: "pair", area: "Plant yard", beforeMediaId: slab.id, afterMediaId: chillers.id, caption: "From a bare slab" },
        { kind: "photo", mediaId: tank.id, caption: "The bulk fuel tank" },
      ],
      ...over,
    });
  if (res.status !== 201) throw new Error(`story not created: ${JSON.stringify(res.body)}`);
  return { project, photos: { slab, chillers, tank }, id: res.body.id as number, slug: res.body.slug as string };
}

const opsText = (parts: Array<{ op: string; text: string }>, op: string) => parts.filter((p) => p.op === op).map((p) => p.text.trim());

describe("story revisions", () => {
  it("keeps one per save; the diff shows the words of the title, intro and captions that changed; restore brings one back as a new revision", async () => {
    const { id, photos } = await draft(as.marketing);
    const created = await as.marketing.agent.get(`/api/stories/${id}`).expect(200);
    expect(created.body.revisions).toEqual([{ number: 1, createdAt: expect.any(String), authorName: expect.any(String), title: "The plant yard", status: "draft", note: "Created" }]);

    await patch(as.marketing, id, { version: 1, intro: "Slab to chillers in five months." }).expect(200);
    const reordered = [
      { kind: "photo", mediaId: photos.tank.id, caption: "The double-skinned bulk fuel tank" },
      { kind: "pair", area: "Plant yard", beforeMediaId: photos.slab.id, afterMediaId: photos.chillers.id, caption: "From a bare slab" },
    ];
    await patch(as.marketing, id, { version: 2, title: "The plant yard, then and now", items: reordered, note: "Tank first" }).expect(200);

    const list = await as.marketing.agent.get(`/api/stories/${id}/revisions`).expect(200);
    expect(list.body.map((r: { number: number; note: string | null }) => [r.number, r.note])).toEqual([
      [3, "Tank first"],
      [2, null],
      [1, "Created"],
    ]);

    const d2 = await as.marketing.agent.get(`/api/stories/${id}/revisions/2/diff`).expect(200);
    expect(d2.body).toMatchObject({ from: 1, to: 2, inserted: 4, deleted: 1 });
    expect(opsText(d2.body.parts, "delete")).toEqual(["chillers."]);
    expect(opsText(d2.body.parts, "insert").join(" ")).toBe("chillers in five months.");
    // The text as read: title, intro, then a line per item in order.
    expect(d2.body.parts.filter((p: { op: string }) => p.op !== "insert").map((p: { text: string }) => p.text).join("")).toBe(
      "The plant yard\nSlab to chillers.\n\nThen and now, Plant yard: From a bare slab\nPhoto: The bulk fuel tank",
    );

    const d3 = await as.marketing.agent.get(`/api/stories/${id}/revisions/3/diff?against=1`).expect(200);
    expect(d3.body.from).toBe(1);
    expect(d3.body.parts.filter((p: { op: string }) => p.op !== "delete").map((p: { text: string }) => p.text).join("")).toBe(
      "The plant yard, then and now\nSlab to chillers in five months.\n\nPhoto: The double-skinned bulk fuel tank\nThen and now, Plant yard: From a bare slab",
    );

    const restored = await as.marketing.agent.post(`/api/stories/${id}/revisions/1/restore`).set("X-CSRF-Token", as.marketing.csrf).expect(200);
    expect(restored.body).toMatchObject({ title: "The plant yard", intro: "Slab to chillers." });
    expect(restored.body.items.map((i: { kind: string; caption: string }) => [i.kind, i.caption])).toEqual([
      ["pair", "From a bare slab"],
      ["photo", "The bulk fuel tank"],
    ]);
    expect(restored.body.revisions[0]).toMatchObject({ number: 4, note: "Restored revision 1", title: "The plant yard" });
    const d4 = await as.marketing.agent.get(`/api/stories/${id}/revisions/4/diff?against=1`).expect(200);
    expect(d4.body).toMatchObject({ inserted: 0, deleted: 0 });
  });

  it("refuses a stale save with 409 and the current story, writing no revision", async () => {
    const { id } = await draft(as.marketing);
    await patch(as.lead, id, { version: 1, intro: "Lead's words." }).expect(200);
    const res = await patch(as.marketing, id, { version: 1, title: "Overwritten" });
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: "conflict", current: { intro: "Lead's words." } });
    expect((await t.db("stories").where({ id }).first()).title).toBe("The plant yard");
    expect(await revisionCount(id)).toBe(2);
  });

  it("refuses items naming another project's photo with 422: the items, the title and the revisions stay as they were", async () => {
    const { id } = await draft(as.marketing);
    const elsewhere = await createProject(t);
    const foreign = await createPhoto(t, elsewhere.id);
    const res = await patch(as.marketing, id, { title: "Changed", items: [{ kind: "photo", mediaId: foreign.id }] });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.items).toContain(`#${foreign.id}`);
    expect((await t.db("stories").where({ id }).first()).title).toBe("The plant yard");
    expect(await t.db("story_items").where({ story_id: id }).count({ n: "*" }).first()).toEqual({ n: 2 });
    expect(await revisionCount(id)).toBe(1);
  });

  it("answers 404 for a revision that does not exist and 400 for one that is not a number", async () => {
    const { id } = await draft(as.marketing);
    expect((await as.marketing.agent.get(`/api/stories/${id}/revisions/9/diff`)).status).toBe(404);
    expect((await as.marketing.agent.get(`/api/stories/${id}/revisions/2/diff?against=7`)).status).toBe(404);
    const bad = await as.marketing.agent.get(`/api/stories/${id}/revisions/first/diff`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe("validation");
    expect((await as.marketing.agent.post(`/api/stories/${id}/revisions/9/restore`).set("X-CSRF-Token", as.marketing.csrf)).status).toBe(404);
    expect(await revisionCount(id)).toBe(1);
  });

  it("a published story is restored by a lead only: marketing gets 403 and nothing is written", async () => {
    const { id } = await draft(as.lead);
    await patch(as.lead, id, { version: 1, title: "The plant yard in August" }).expect(200);
    await act(as.lead, id, "publish").expect(200);
    const refused = await as.marketing.agent.post(`/api/stories/${id}/revisions/1/restore`).set("X-CSRF-Token", as.marketing.csrf);
    expect(refused.status).toBe(403);
    expect(await revisionCount(id)).toBe(2);
    expect((await t.db("stories").where({ id }).first()).title).toBe("The plant yard in August");
    const restored = await as.lead.agent.post(`/api/stories/${id}/revisions/1/restore`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    expect(restored.body).toMatchObject({ title: "The plant yard", status: "published" });
  });

  it("is staff-only: an investor gets 403 and a visitor 401 on the list, the diff and restore", async () => {
    const { id } = await draft(as.marketing);
    const visitor = await newClient(t);
    for (const c of [as.investor, visitor]) {
      const expected = c === visitor ? 401 : 403;
      expect((await c.agent.get(`/api/stories/${id}/revisions`)).status).toBe(expected);
      expect((await c.agent.get(`/api/stories/${id}/revisions/1/diff`)).status).toBe(expected);
      expect((await c.agent.post(`/api/stories/${id}/revisions/1/restore`).set("X-CSRF-Token", c.csrf)).status).toBe(expected);
      expect((await c.agent.get(`/api/stories/${id}/history`)).status).toBe(expected);
    }
    expect(await revisionCount(id)).toBe(1);
  });
});

describe("old story addresses", () => {
  it("moves the address: the old one answers 301 to the new one, on the API and on the page", async () => {
    const { id, project } = await draft(as.lead, { slug: "plant-yard" });
    await act(as.lead, id, "publish").expect(200);
    await patch(as.lead, id, { slug: "plant-yard-then-and-now" }).expect(200);

    const visitor = await newClient(t);
    const api = await visitor.agent.get(`/api/projects/${project.slug}/stories/plant-yard`).redirects(0);
    expect(api.status).toBe(301);
    expect(api.headers.location).toBe(`/api/projects/${project.slug}/stories/plant-yard-then-and-now`);
    expect(api.body).toEqual({ redirectTo: `/projects/${project.slug}/stories/plant-yard-then-and-now` });
    const followed = await visitor.agent.get(`/api/projects/${project.slug}/stories/plant-yard`).redirects(1).expect(200);
    expect(followed.body).toMatchObject({ id, slug: "plant-yard-then-and-now" });

    const page = await visitor.agent.get(`/projects/${project.slug}/stories/plant-yard`).redirects(0);
    expect(page.status).toBe(301);
    expect(page.headers.location).toBe(`/projects/${project.slug}/stories/plant-yard-then-and-now`);
    const current = await visitor.agent.get(`/projects/${project.slug}/stories/plant-yard-then-and-now`).redirects(0);
    expect(current.status).toBe(200);
    expect(current.text).toContain(`<link rel="canonical" href="http://plumbline.test/projects/${project.slug}/stories/plant-yard-then-and-now">`);
  });

  it("leads nowhere for callers who may not read the story: an unpublished story's old address is 404 to visitors, 301 to staff", async () => {
    const { id, project } = await draft(as.marketing, { slug: "yard-draft" });
    await patch(as.marketing, id, { slug: "yard-draft-2" }).expect(200);
    const visitor = await newClient(t);
    expect((await visitor.agent.get(`/api/projects/${project.slug}/stories/yard-draft`).redirects(0)).status).toBe(404);
    expect((await visitor.agent.get(`/projects/${project.slug}/stories/yard-draft`).redirects(0)).status).toBe(200);
    expect((await as.marketing.agent.get(`/api/projects/${project.slug}/stories/yard-draft`).redirects(0)).status).toBe(301);
  });

  it("lets a story take back its own old address, and refuses one another story once had (409), writing nothing", async () => {
    const { id: a, project } = await draft(as.marketing, { slug: "yard-a" });
    const b = await as.marketing.agent.post(`/api/projects/${project.slug}/stories`).set("X-CSRF-Token", as.marketing.csrf).send({ title: "Another", audience: "public", slug: "yard-b" }).expect(201);
    await patch(as.marketing, a, { slug: "yard-a2" }).expect(200);

    const taken = await patch(as.marketing, b.body.id, { slug: "yard-a" });
    expect(taken.status).toBe(409);
    expect(taken.body.error).toMatchObject({ code: "slug_taken", fields: { slug: expect.any(String) } });
    expect((await t.db("stories").where({ id: b.body.id }).first()).slug).toBe("yard-b");
    expect(await revisionCount(b.body.id)).toBe(1);
    const create = await as.marketing.agent.post(`/api/projects/${project.slug}/stories`).set("X-CSRF-Token", as.marketing.csrf).send({ title: "Third", audience: "public", slug: "yard-a" });
    expect(create.status).toBe(409);

    await patch(as.marketing, a, { slug: "yard-a" }).expect(200);
    expect(await t.db("story_slugs").where({ story_id: a }).pluck("slug")).toEqual(["yard-a2"]);
  });
});
