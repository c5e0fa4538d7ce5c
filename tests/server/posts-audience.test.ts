import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, doc, image, parseXml, postInput, signInAll, text } from "./posts-fixtures.ts";

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
let project: { id: number; slug: string };
let investorPost: { id: number; slug: string; urls: string[] };
let publicPost: { id: number; slug: string; urls: string[] };

/** One public and one investor-only post, each with its own cover and inline photo, plus a draft. */
beforeAll(async () => {
  t = await startTestApp();
  as = await signInAll(t);
  project = await createProject(t);
  const make = async (audience: string, title: string, word: string) => {
    const cover = await createPhoto(t, project.id);
    const inline = await createPhoto(t, project.id);
    const res = await as.lead.agent
      .post(`/api/projects/${project.slug}/posts`)
      .set("X-CSRF-Token", as.lead.csrf)
      .send(postInput(cover.id, { audience, title, body: doc(text(`The ${word} report for this month.`), image(inline.id)) }))
      .expect(201);
    await as.lead.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    return { id: res.body.id as number, slug: res.body.slug as string, urls: [...cover.urls, ...inline.urls] };
  };
  publicPost = await make("public", "Cooling plant progress", "chillerplant");
  investorPost = await make("investor", "Drawdown and contingency", "chillerplant");
  await as.marketing.agent.post(`/api/projects/${project.slug}/posts`).set("X-CSRF-Token", as.marketing.csrf).send(postInput(null, { title: "Draft about chillerplant" })).expect(201);
});
afterAll(async () => {
  await t.close();
});

describe("an investor-only update is never shown to a visitor", () => {
  it("not in the list", async () => {
    const res = await (await newClient(t)).agent.get(`/api/projects/${project.slug}/posts`).expect(200);
    expect(res.body.map((p: { id: number }) => p.id)).toEqual([publicPost.id]);
    expect(res.headers["x-total-count"]).toBe("1");
  });

  it("not as a page (404, as for something that does not exist)", async () => {
    const res = await (await newClient(t)).agent.get(`/api/projects/${project.slug}/posts/${investorPost.slug}`);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe("not_found");
  });

  it("not through an old address", async () => {
    await as.lead.agent.patch(`/api/posts/${investorPost.id}`).set("X-CSRF-Token", as.lead.csrf).send({ slug: `${investorPost.slug}-moved` }).expect(200);
    const visitor = await newClient(t);
    expect((await visitor.agent.get(`/api/projects/${project.slug}/posts/${investorPost.slug}`).redirects(0)).status).toBe(404);
    expect((await visitor.agent.get(`/projects/${project.slug}/updates/${investorPost.slug}`).redirects(0)).status).toBe(200);
    expect((await as.investor.agent.get(`/api/projects/${project.slug}/posts/${investorPost.slug}`).redirects(0)).status).toBe(301);
    await as.lead.agent.patch(`/api/posts/${investorPost.id}`).set("X-CSRF-Token", as.lead.csrf).send({ slug: investorPost.slug }).expect(200);
  });

  it("not in search results", async () => {
    const res = await (await newClient(t)).agent.get(`/api/projects/${project.slug}/posts?q=chillerplant`).expect(200);
    expect(res.body.map((p: { id: number }) => p.id)).toEqual([publicPost.id]);
  });

  it("not with a status or audience filter", async () => {
    const visitor = await newClient(t);
    expect((await visitor.agent.get(`/api/projects/${project.slug}/posts?audience=investor`).expect(200)).body).toEqual([]);
    const drafts = await visitor.agent.get(`/api/projects/${project.slug}/posts?status=draft`).expect(200);
    expect(drafts.body.map((p: { id: number }) => p.id)).toEqual([publicPost.id]);
  });

  it("not in the feed, even when an investor fetches it", async () => {
    for (const client of [await newClient(t), as.investor]) {
      const xml = await parseXml((await client.agent.get(`/feed/${project.slug}.atom`).expect(200)).text);
      const titles = Array.from(xml.getElementsByTagNameNS("http://www.w3.org/2005/Atom", "entry")).map((e) => e.getElementsByTagNameNS("http://www.w3.org/2005/Atom", "title")[0]!.textContent);
      expect(titles).toEqual(["Cooling plant progress"]);
    }
  });

  it("not in the sitemap", async () => {
    const res = await (await newClient(t)).agent.get("/sitemap.xml").expect(200);
    expect(res.text).toContain(`/projects/${project.slug}/updates/${publicPost.slug}<`);
    expect(res.text).not.toContain(`/updates/${investorPost.slug}<`);
  });

  it("not through its photos' URLs (404 for visitors; the public post's photos answer)", async () => {
    const visitor = await newClient(t);
    for (const url of investorPost.urls) expect((await visitor.agent.get(url)).status, url).toBe(404);
    for (const url of publicPost.urls) expect((await visitor.agent.get(url)).status, url).toBe(200);
  });
});

describe("what a signed-in investor sees", () => {
  it("investor updates in the same list, marked as such, and their pages and photos", async () => {
    const list = await as.investor.agent.get(`/api/projects/${project.slug}/posts`).expect(200);
    const byId = new Map(list.body.map((p: { id: number; audience: string }) => [p.id, p.audience]));
    expect(byId.get(investorPost.id)).toBe("investor");
    expect(byId.get(publicPost.id)).toBe("public");
    expect(list.body).toHaveLength(2);
    const page = await as.investor.agent.get(`/api/projects/${project.slug}/posts/${investorPost.slug}`).expect(200);
    expect(page.body.audience).toBe("investor");
    expect(page.body.body).toBeUndefined();
    expect(page.body.revisions).toBeUndefined();
    for (const url of investorPost.urls) expect((await as.investor.agent.get(url)).status, url).toBe(200);
    const search = await as.investor.agent.get(`/api/projects/${project.slug}/posts?q=chillerplant`).expect(200);
    expect(search.body).toHaveLength(2);
  });

  it("never drafts", async () => {
    const list = await as.investor.agent.get(`/api/projects/${project.slug}/posts?status=draft`).expect(200);
    expect(list.body.every((p: { status: string }) => p.status === "published")).toBe(true);
  });
});

describe("staff", () => {
  it("see every post in every state, filterable by status", async () => {
    const all = await as.marketing.agent.get(`/api/projects/${project.slug}/posts`).expect(200);
    expect(all.body).toHaveLength(3);
    const drafts = await as.marketing.agent.get(`/api/projects/${project.slug}/posts?status=draft`).expect(200);
    expect(drafts.body.map((p: { title: string }) => p.title)).toEqual(["Draft about chillerplant"]);
  });
});

describe("withdrawing closes the door again", () => {
  it("a withdrawn post and its photos disappear for visitors", async () => {
    const cover = await createPhoto(t, project.id);
    const res = await as.lead.agent.post(`/api/projects/${project.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id, { title: "Short-lived" })).expect(201);
    await as.lead.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    const visitor = await newClient(t);
    await visitor.agent.get(cover.urls[0]!).expect(200);
    await as.lead.agent.post(`/api/posts/${res.body.id}/withdraw`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    await visitor.agent.get(`/api/projects/${project.slug}/posts/${res.body.slug}`).expect(404);
    expect((await visitor.agent.get(cover.urls[0]!)).status).toBe(404);
  });

  it("changing a published post's audience to investors hides it and its photos from visitors at once", async () => {
    const cover = await createPhoto(t, project.id);
    const res = await as.lead.agent.post(`/api/projects/${project.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id, { title: "Audience moves" })).expect(201);
    await as.lead.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    await as.lead.agent.patch(`/api/posts/${res.body.id}`).set("X-CSRF-Token", as.lead.csrf).send({ audience: "investor" }).expect(200);
    const visitor = await newClient(t);
    await visitor.agent.get(`/api/projects/${project.slug}/posts/${res.body.slug}`).expect(404);
    expect((await visitor.agent.get(cover.urls[0]!)).status).toBe(404);
    expect((await as.investor.agent.get(cover.urls[0]!)).status).toBe(200);
  });
});

describe("a photo sent back to review after publication", () => {
  it("is shown to visitors and investors as 'not available' (no broken image, no caption); staff still see it", async () => {
    const cover = await createPhoto(t, project.id);
    const inline = await createPhoto(t, project.id, { caption: "Gatehouse camera positions" });
    const kept = await createPhoto(t, project.id);
    const res = await as.lead.agent
      .post(`/api/projects/${project.slug}/posts`)
      .set("X-CSRF-Token", as.lead.csrf)
      .send(postInput(cover.id, { title: "Security line goes in", body: doc(text("The secure line is being fitted."), image(inline.id), image(kept.id)) }))
      .expect(201);
    await as.lead.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    const visitor = await newClient(t);
    const page = `/api/projects/${project.slug}/posts/${res.body.slug}`;
    const before = await visitor.agent.get(page).expect(200);
    expect(before.body.html).toContain(inline.urls[0]);
    expect(before.body.cover?.id).toBe(cover.id);

    // Both sent back: the inline photo to review, the cover restricted.
    await t.db("media_items").where({ id: inline.id }).update({ sensitivity: "unreviewed" });
    await t.db("media_items").where({ id: cover.id }).update({ sensitivity: "restricted" });
    for (const reader of [visitor, as.investor]) {
      const after = await reader.agent.get(page).expect(200);
      // Nothing the browser would fetch and fail on, and the caption of a withdrawn photo is not shown.
      for (const url of inline.urls) expect(after.body.html).not.toContain(url);
      expect(after.body.html).not.toContain("Gatehouse camera positions");
      expect(after.body.html).toContain(`<figure class="post-image post-image-missing" data-media-id="${inline.id}"><figcaption>This photo is not available.</figcaption></figure>`);
      // The photo still cleared is untouched.
      expect(after.body.html).toContain(kept.urls[0]);
      expect(after.body.images.map((p: { id: number }) => p.id)).toEqual([kept.id]);
      expect(after.body.cover).toBeNull();
      const list = await reader.agent.get(`/api/projects/${project.slug}/posts`).expect(200);
      expect(list.body.find((p: { id: number }) => p.id === res.body.id).cover).toBeNull();
    }
    const staff = await as.lead.agent.get(page).expect(200);
    expect(staff.body.html).toContain(inline.urls[0]);
    expect(staff.body.cover?.id).toBe(cover.id);

    // The feed gives the same as the page; a digest assembled now has no cover for it.
    const feed = (await visitor.agent.get(`/feed/${project.slug}.atom`).expect(200)).text;
    expect(feed).toContain("Security line goes in");
    for (const url of inline.urls) expect(feed).not.toContain(url);
    expect(feed).not.toContain("Gatehouse camera positions");
    expect(feed).toContain(`&lt;figure class="post-image post-image-missing" data-media-id="${inline.id}"&gt;&lt;figcaption&gt;This photo is not available.&lt;/figcaption&gt;`);
    expect((await t.plumbline.posts.findPublished(res.body.id))?.coverMediaId).toBeNull();
    const week = await t.plumbline.posts.publishedBetween(project.id, ["public"], new Date(Date.now() - 86_400_000), new Date(Date.now() + 86_400_000));
    expect(week.find((p) => p.id === res.body.id)?.coverMediaId).toBeNull();
    expect(week.some((p) => p.coverMediaId !== null)).toBe(true);
  });
});
