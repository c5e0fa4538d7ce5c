import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, postInput, signInAll } from "./posts-fixtures.ts";

// The visitors' answer cache runs in production only; this app runs as production does.
let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  t = await startTestApp({ NODE_ENV: "production" });
  as = await signInAll(t);
});
afterAll(async () => {
  await t.close();
});

/** A cookie-less visitor, as a browser on the public site (or a CDN) asks. */
const visitor = () => request(t.plumbline.app);

async function publishedPost(projectSlug: string, projectId: number, title: string) {
  const cover = await createPhoto(t, projectId);
  const res = await as.lead.agent.post(`/api/projects/${projectSlug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id, { title })).expect(201);
  await as.lead.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
  return res.body as { id: number; slug: string };
}

describe("the visitors' answer cache", () => {
  it("serves a visitor the kept answer, and drops it when anything is written through the API", async () => {
    const p = await createProject(t);
    await publishedPost(p.slug, p.id, "First walk");
    const first = await visitor().get(`/api/projects/${p.slug}/posts`).expect(200);
    expect(first.body.map((x: { title: string }) => x.title)).toEqual(["First walk"]);

    // A row written behind the app's back is not seen until the copy expires or a write clears it…
    const [id] = await t.db("posts").insert({
      project_id: p.id, slug: "behind-the-back", title: "Behind the back", summary: "", body: '{"type":"doc","content":[]}', html: "", plain_text: "",
      audience: "public", status: "published", author_name: "Test", published_at: new Date(),
    });
    const kept = await visitor().get(`/api/projects/${p.slug}/posts`).expect(200);
    expect(kept.body.map((x: { title: string }) => x.title)).toEqual(["First walk"]);
    expect(kept.headers["x-request-id"]).not.toBe(first.headers["x-request-id"]);
    expect(kept.headers["content-security-policy"]).toBe(first.headers["content-security-policy"]);
    // …while signed-in callers (who carry a cookie) are never served a copy.
    const signedIn = await as.investor.agent.get(`/api/projects/${p.slug}/posts`).expect(200);
    expect(signedIn.body).toHaveLength(2);

    await as.marketing.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.marketing.csrf).send(postInput(null)).expect(201);
    const fresh = await visitor().get(`/api/projects/${p.slug}/posts`).expect(200);
    expect(fresh.body.map((x: { id: number }) => x.id)).toContain(Number(id));
  });

  it("answers a revalidation with 304 from the kept copy's ETag", async () => {
    const p = await createProject(t);
    await publishedPost(p.slug, p.id, "Etag walk");
    const first = await visitor().get(`/api/projects/${p.slug}/posts`).expect(200);
    await visitor().get(`/api/projects/${p.slug}/posts`).set("If-None-Match", first.headers.etag!).expect(304);
    await visitor().get(`/api/projects/${p.slug}/posts`).set("If-None-Match", '"something-else"').expect(200);
  });

  it("a withdrawn post is gone for visitors at once", async () => {
    const p = await createProject(t);
    const post = await publishedPost(p.slug, p.id, "Soon withdrawn");
    await visitor().get(`/api/projects/${p.slug}/posts/${post.slug}`).expect(200);
    await as.lead.agent.post(`/api/posts/${post.id}/withdraw`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    await visitor().get(`/api/projects/${p.slug}/posts/${post.slug}`).expect(404);
  });

  it("a scheduled publication by the scheduler (no request) is seen at once", async () => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const res = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id, { title: "Scheduled walk" })).expect(201);
    await as.lead.agent.post(`/api/posts/${res.body.id}/schedule`).set("X-CSRF-Token", as.lead.csrf).send({ at: "2035-01-01T09:00:00Z" }).expect(200);
    expect((await visitor().get(`/api/projects/${p.slug}/posts`).expect(200)).body).toEqual([]);
    await t.plumbline.posts.publishDue(new Date("2035-01-01T09:00:01Z"));
    expect((await visitor().get(`/api/projects/${p.slug}/posts`).expect(200)).body.map((x: { title: string }) => x.title)).toEqual(["Scheduled walk"]);
  });
});
