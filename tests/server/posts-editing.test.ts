import { beforeAll, describe, expect, it } from "vitest";
import { newClient, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, doc, image, postInput, text, type Client, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

function create(c: Client, projectSlug: string, body: Record<string, unknown>) {
  return c.agent.post(`/api/projects/${projectSlug}/posts`).set("X-CSRF-Token", c.csrf).send(body);
}
function patch(c: Client, id: number, body: Record<string, unknown>) {
  return c.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", c.csrf).send(body);
}

describe("POST /api/projects/:slug/posts", () => {
  it("creates a draft with an address made from the title, and its first revision", async () => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const res = await create(as.marketing, p.slug, postInput(cover.id, { title: "Chillers délivered: all five!" }));
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ id: expect.any(Number), slug: "chillers-delivered-all-five", status: "draft" });
    const full = await as.marketing.agent.get(`/api/posts/${res.body.id}`).expect(200);
    expect(full.body.revisions).toHaveLength(1);
    expect(full.body.html).toContain("<p>The five chillers arrived this month");
    expect(full.body.authorName).toEqual(expect.any(String));
    expect(full.body.version).toBe(1);
  });

  it("gives a second post with the same title the next free address", async () => {
    const p = await createProject(t);
    const first = await create(as.marketing, p.slug, postInput(null, { title: "Fuel tank set" }));
    const second = await create(as.marketing, p.slug, postInput(null, { title: "Fuel tank set" }));
    expect([first.body.slug, second.body.slug]).toEqual(["fuel-tank-set", "fuel-tank-set-2"]);
  });

  it("refuses an address another update of the project holds with 409 naming the slug, and writes nothing", async () => {
    const p = await createProject(t);
    await create(as.marketing, p.slug, postInput(null, { slug: "hall-2a-roof" })).expect(201);
    const before = await t.db("posts").where({ project_id: p.id }).count({ n: "*" }).first();
    const res = await create(as.marketing, p.slug, postInput(null, { slug: "hall-2a-roof" }));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("slug_taken");
    expect(res.body.error.fields.slug).toMatch(/already used/);
    expect(res.body.error.message).toContain("hall-2a-roof");
    const after = await t.db("posts").where({ project_id: p.id }).count({ n: "*" }).first();
    expect(after?.n).toBe(before?.n);
  });

  it("allows the same address in another project", async () => {
    const [a, b] = [await createProject(t), await createProject(t)];
    await create(as.marketing, a.slug, postInput(null, { slug: "ups-modules" })).expect(201);
    await create(as.marketing, b.slug, postInput(null, { slug: "ups-modules" })).expect(201);
  });

  it.each([
    ["a string", "hello"],
    ["HTML instead of JSON", "<p>hello</p>"],
    ["no doc node", { type: "paragraph", content: [] }],
    ["an unknown node type", { type: "doc", content: [{ type: "iframe", attrs: { src: "https://x.example" } }] }],
    ["an unknown mark", { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "x", marks: [{ type: "blink" }] }] }] }],
    ["a text node at block level", { type: "doc", content: [{ type: "text", text: "loose" }] }],
    ["an image without a media id", { type: "doc", content: [{ type: "image", attrs: { src: "https://x.example/a.jpg" } }] }],
    ["a heading level 1", { type: "doc", content: [{ type: "heading", attrs: { level: 1 }, content: [{ type: "text", text: "x" }] }] }],
    ["an empty list", { type: "doc", content: [{ type: "bulletList", content: [] }] }],
    ["a stray key on a node", { type: "doc", content: [{ type: "paragraph", onclick: "x" }] }],
  ])("refuses a body that is not a valid editor document (%s) with 400 and writes nothing", async (_label, body) => {
    const p = await createProject(t);
    const res = await create(as.marketing, p.slug, postInput(null, { body }));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("validation");
    expect(Object.keys(res.body.error.fields).some((k) => k.startsWith("body"))).toBe(true);
    expect(await t.db("posts").where({ project_id: p.id }).first()).toBeUndefined();
  });

  it("refuses a document nested deeper than the editor can make, with 400", async () => {
    const p = await createProject(t);
    let node: unknown = text("deep");
    for (let i = 0; i < 40; i++) node = { type: "blockquote", content: [node] };
    const res = await create(as.marketing, p.slug, postInput(null, { body: { type: "doc", content: [node] } }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.body).toMatch(/levels deep/);
  });

  it("refuses a photo from another project's library with 422 naming it", async () => {
    const [p, other] = [await createProject(t), await createProject(t)];
    const foreign = await createPhoto(t, other.id);
    const res = await create(as.marketing, p.slug, postInput(null, { body: doc(text("x"), image(foreign.id)) }));
    expect(res.status).toBe(422);
    expect(res.body.error.fields.body).toContain(`#${foreign.id}`);
  });

  it("is refused to an investor (403) and to a visitor (401)", async () => {
    const p = await createProject(t);
    expect((await create(as.investor, p.slug, postInput(null))).status).toBe(403);
    const visitor = await newClient(t);
    expect((await visitor.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", visitor.csrf).send(postInput(null))).status).toBe(401);
    expect(await t.db("posts").where({ project_id: p.id }).first()).toBeUndefined();
  });
});

describe("PATCH /api/posts/:id and revisions", () => {
  it("keeps a revision of every save; the diff shows the words that changed; restore brings one back as a new revision", async () => {
    const p = await createProject(t);
    const { body: created } = await create(as.marketing, p.slug, postInput(null, { title: "Generator sets", body: doc(text("Two generator sets are on site.")) })).expect(201);
    const v2 = await patch(as.marketing, created.id, { version: 1, body: doc(text("Three generator sets are on site and load-banked.")) });
    expect(v2.status).toBe(200);
    expect(v2.body.version).toBe(2);
    await patch(as.marketing, created.id, { version: 2, title: "Generator sets load-banked" }).expect(200);

    const revisions = await as.marketing.agent.get(`/api/posts/${created.id}/revisions`).expect(200);
    expect(revisions.body.map((r: { number: number }) => r.number)).toEqual([3, 2, 1]);

    const diff = await as.marketing.agent.get(`/api/posts/${created.id}/revisions/2/diff`).expect(200);
    expect(diff.body.from).toBe(1);
    expect(diff.body.to).toBe(2);
    const deleted = diff.body.parts.filter((x: { op: string }) => x.op === "delete").map((x: { text: string }) => x.text.trim());
    const inserted = diff.body.parts.filter((x: { op: string }) => x.op === "insert").map((x: { text: string }) => x.text.trim());
    expect(deleted).toEqual(["Two", "site."]);
    expect(inserted.join(" ")).toContain("Three");
    expect(inserted.join(" ")).toContain("site and load-banked.");
    expect(diff.body.parts.filter((x: { op: string }) => x.op !== "insert").map((x: { text: string }) => x.text).join("")).toBe("Generator sets\nAll five chillers are set and piped.\n\nTwo generator sets are on site.");

    const against = await as.marketing.agent.get(`/api/posts/${created.id}/revisions/3/diff?against=1`).expect(200);
    expect(against.body.from).toBe(1);
    expect(against.body.inserted).toBeGreaterThanOrEqual(3);

    const restored = await as.marketing.agent.post(`/api/posts/${created.id}/revisions/1/restore`).set("X-CSRF-Token", as.marketing.csrf).expect(200);
    expect(restored.body.title).toBe("Generator sets");
    expect(restored.body.html).toContain("Two generator sets are on site.");
    const after = await as.marketing.agent.get(`/api/posts/${created.id}/revisions`).expect(200);
    expect(after.body[0]).toMatchObject({ number: 4, note: "Restored revision 1", title: "Generator sets" });
  });

  it("refuses a save based on a stale version with 409 and the current post, and changes nothing", async () => {
    const p = await createProject(t);
    const { body: created } = await create(as.marketing, p.slug, postInput(null, { title: "Hall 2A roof" })).expect(201);
    await patch(as.lead, created.id, { version: 1, summary: "Roof sheets on." }).expect(200);
    const res = await patch(as.marketing, created.id, { version: 1, title: "Overwritten" });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("conflict");
    expect(res.body.error.current.summary).toBe("Roof sheets on.");
    const row = await t.db("posts").where({ id: created.id }).first();
    expect(row.title).toBe("Hall 2A roof");
    expect(await t.db("post_revisions").where({ post_id: created.id }).count({ n: "*" }).first()).toEqual({ n: 2 });
  });

  it("refuses a body that is not a valid editor document with 400 and keeps the stored one", async () => {
    const p = await createProject(t);
    const { body: created } = await create(as.marketing, p.slug, postInput(null)).expect(201);
    const res = await patch(as.marketing, created.id, { body: { type: "doc", content: [{ type: "script", text: "alert(1)" }] } });
    expect(res.status).toBe(400);
    const row = await t.db("posts").where({ id: created.id }).first();
    expect(row.version).toBe(1);
    expect(row.plain_text).toContain("The five chillers arrived");
  });

  it("moves the address: the old one answers 301 to the new one, on the API and on the page", async () => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const { body: created } = await create(as.lead, p.slug, postInput(cover.id, { slug: "fuel-delivery" })).expect(201);
    await as.lead.agent.post(`/api/posts/${created.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    await patch(as.lead, created.id, { slug: "first-fuel-delivery" }).expect(200);

    const visitor = await newClient(t);
    const api = await visitor.agent.get(`/api/projects/${p.slug}/posts/fuel-delivery`).redirects(0);
    expect(api.status).toBe(301);
    expect(api.headers.location).toBe(`/api/projects/${p.slug}/posts/first-fuel-delivery`);
    expect(api.body).toEqual({ redirectTo: `/projects/${p.slug}/updates/first-fuel-delivery` });
    const page = await visitor.agent.get(`/projects/${p.slug}/updates/fuel-delivery`).redirects(0);
    expect(page.status).toBe(301);
    expect(page.headers.location).toBe(`/projects/${p.slug}/updates/first-fuel-delivery`);
    await visitor.agent.get(`/api/projects/${p.slug}/posts/first-fuel-delivery`).expect(200);
  });

  it("lets a post take back its own old address, and refuses one another post once had", async () => {
    const p = await createProject(t);
    const { body: a } = await create(as.marketing, p.slug, postInput(null, { slug: "cooling-a" })).expect(201);
    const { body: b } = await create(as.marketing, p.slug, postInput(null, { slug: "cooling-b" })).expect(201);
    await patch(as.marketing, a.id, { slug: "cooling-a2" }).expect(200);
    const taken = await patch(as.marketing, b.id, { slug: "cooling-a" });
    expect(taken.status).toBe(409);
    expect(taken.body.error.fields.slug).toBeDefined();
    await patch(as.marketing, a.id, { slug: "cooling-a" }).expect(200);
    expect(await t.db("post_slugs").where({ post_id: a.id }).pluck("slug")).toEqual(["cooling-a2"]);
  });
});

// Where a photo is used (media_usages), the post's photos and its tags are rewritten by every save.
// Saves of different updates at the same moment must not deadlock one another (a deadlock is a 500).
describe("several updates saved at the same moment", () => {
  const N = 6;
  const usagesOf = async (ids: number[]) =>
    (await t.db("media_usages").where({ owner_type: "post" }).whereIn("owner_id", ids).orderBy(["owner_id", "media_id"]).select("owner_id", "media_id")).map((r: { owner_id: number; media_id: number }) => [
      Number(r.owner_id),
      Number(r.media_id),
    ]);

  it(`${N} updates with cover photos created at once all answer 201, each with its photos recorded`, async () => {
    const p = await createProject(t);
    const covers = await Promise.all(Array.from({ length: N }, () => createPhoto(t, p.id)));
    const shared = await createPhoto(t, p.id);
    const res = await Promise.all(covers.map((c, i) => create(as.marketing, p.slug, postInput(c.id, { title: `Plant yard week ${i + 1}`, body: doc(text("Both photos."), image(shared.id)) }))));
    expect(res.map((r) => r.status)).toEqual(Array(N).fill(201));
    const ids = res.map((r) => r.body.id as number).sort((a, b) => a - b);
    const coverOf = new Map(res.map((r, i) => [r.body.id as number, covers[i]!.id]));
    expect(await usagesOf(ids)).toEqual(ids.flatMap((id) => [[id, coverOf.get(id)!], [id, shared.id]].sort((a, b) => a[1]! - b[1]!)));
  });

  it(`${N} updates saved at once with new covers all answer 200, and each keeps only its new photo`, async () => {
    const p = await createProject(t);
    const first = await Promise.all(Array.from({ length: N }, () => createPhoto(t, p.id)));
    const ids: number[] = [];
    for (const [i, c] of first.entries()) ids.push((await create(as.marketing, p.slug, postInput(c.id, { title: `Hall 2A fit-out ${i + 1}` })).expect(201)).body.id);
    const second = await Promise.all(Array.from({ length: N }, () => createPhoto(t, p.id)));
    const res = await Promise.all(ids.map((id, i) => patch(as.marketing, id, { coverMediaId: second[i]!.id })));
    expect(res.map((r) => r.status)).toEqual(Array(N).fill(200));
    expect(await usagesOf(ids)).toEqual(ids.map((id, i) => [id, second[i]!.id]));
  });
});
