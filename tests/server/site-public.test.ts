import { beforeAll, describe, expect, it } from "vitest";
import { newClient, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, doc, parseXml, postInput, text, type Client, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const ATOM = "http://www.w3.org/2005/Atom";
const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

/** A published post by the lead (who may publish their own). */
async function published(projectSlug: string, projectId: number, over: Record<string, unknown> = {}, by: Client = as.lead) {
  const cover = await createPhoto(t, projectId);
  const res = await by.agent.post(`/api/projects/${projectSlug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(cover.id, over)).expect(201);
  await by.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", by.csrf).expect(200);
  return { id: res.body.id as number, slug: res.body.slug as string, cover };
}

/** The direct children of an element with a local name in the Atom namespace. */
const childrenNamed = (el: Element, name: string) => Array.from(el.children).filter((c) => c.namespaceURI === ATOM && c.localName === name);

describe("GET /feed/:slug.atom", () => {
  it("is an Atom feed with exactly one id, title and updated in the feed and in each entry, public posts only", async () => {
    const p = await createProject(t);
    await published(p.slug, p.id, { title: "Chillers set on plinths" });
    await published(p.slug, p.id, { title: "Generators load-banked" });
    await published(p.slug, p.id, { title: "Investor briefing: cost to complete", audience: "investor" });
    await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(null, { title: "Unpublished draft" })).expect(201);

    const res = await (await newClient(t)).agent.get(`/feed/${p.slug}.atom`).expect(200);
    expect(res.headers["content-type"]).toMatch(/^application\/atom\+xml/);
    const xml = await parseXml(res.text);
    const feed = xml.documentElement;
    expect(feed.namespaceURI).toBe(ATOM);
    expect(feed.localName).toBe("feed");
    // Source: RFC 4287 §4.1.1 — atom:feed elements MUST contain exactly one atom:id, exactly one
    // atom:title and exactly one atom:updated element, and one or more atom:author elements
    // unless all of the entries contain at least one atom:author element.
    for (const name of ["id", "title", "updated"]) expect(childrenNamed(feed, name), `feed ${name}`).toHaveLength(1);
    expect(childrenNamed(feed, "author").length).toBeGreaterThanOrEqual(1);
    // Source: RFC 3339 §5.6 date-time (RFC 4287 §3.3 Date Constructs).
    expect(childrenNamed(feed, "updated")[0]!.textContent).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?(Z|[+-]\d{2}:\d{2})$/);

    const entries = childrenNamed(feed, "entry");
    const titles = entries.map((e) => childrenNamed(e, "title")[0]!.textContent);
    expect(entries).toHaveLength(2);
    expect(titles).toContain("Chillers set on plinths");
    expect(titles).toContain("Generators load-banked");
    expect(res.text).not.toContain("Investor briefing");
    expect(res.text).not.toContain("Unpublished draft");
    const ids = new Set<string>();
    for (const entry of entries) {
      // Source: RFC 4287 §4.1.2 — atom:entry elements MUST contain exactly one atom:id, exactly
      // one atom:title and exactly one atom:updated element; an entry without atom:content MUST
      // contain at least one atom:link element with a rel attribute of "alternate".
      for (const name of ["id", "title", "updated"]) expect(childrenNamed(entry, name), `entry ${name}`).toHaveLength(1);
      const id = childrenNamed(entry, "id")[0]!.textContent!;
      // Source: RFC 4287 §4.2.6 — the content of atom:id MUST be an IRI (RFC 3987); here a tag URI (RFC 4151).
      expect(id).toMatch(/^tag:plumbline\.test,2026:post-\d+$/);
      ids.add(id);
      const content = childrenNamed(entry, "content")[0]!;
      expect(content.getAttribute("type")).toBe("html");
      expect(content.textContent).toContain("The five chillers arrived this month");
      expect(childrenNamed(entry, "link")[0]!.getAttribute("href")).toMatch(new RegExp(`^http://plumbline\\.test/projects/${p.slug}/updates/`));
      expect(childrenNamed(entry, "author").length).toBeGreaterThanOrEqual(1);
    }
    expect(ids.size).toBe(entries.length);
  });

  it("makes image and link addresses absolute inside the content, for readers elsewhere", async () => {
    const p = await createProject(t);
    const photo = await createPhoto(t, p.id);
    await published(p.slug, p.id, { body: doc(text("Hall 2A."), { type: "image", attrs: { mediaId: photo.id } }) });
    const res = await (await newClient(t)).agent.get(`/feed/${p.slug}.atom`).expect(200);
    const xml = await parseXml(res.text);
    const content = xml.getElementsByTagNameNS(ATOM, "content")[0]!.textContent!;
    expect(content).toContain(`src="http://plumbline.test${photo.urls.find((u) => u.endsWith("1024w.jpg"))}"`);
    expect(content).toMatch(/srcset="http:\/\/plumbline\.test\/media\/v\/[0-9a-f]{16}-320w\.avif 320w, http:\/\/plumbline\.test\/media\/v\//);
  });

  it("keeps an entry's id when the post's address changes", async () => {
    const p = await createProject(t);
    const post = await published(p.slug, p.id, { slug: "first-address" });
    const before = await parseXml((await (await newClient(t)).agent.get(`/feed/${p.slug}.atom`)).text);
    await as.lead.agent.patch(`/api/posts/${post.id}`).set("X-CSRF-Token", as.lead.csrf).send({ slug: "second-address" }).expect(200);
    const after = await parseXml((await (await newClient(t)).agent.get(`/feed/${p.slug}.atom`)).text);
    const idOf = (d: Document) => d.getElementsByTagNameNS(ATOM, "entry")[0]!.getElementsByTagNameNS(ATOM, "id")[0]!.textContent;
    expect(idOf(after)).toBe(idOf(before));
    expect(after.getElementsByTagNameNS(ATOM, "entry")[0]!.getElementsByTagNameNS(ATOM, "link")[0]!.getAttribute("href")).toContain("second-address");
  });

  it("answers an ETag, and 304 when it has not changed; 404 for an unknown project", async () => {
    const p = await createProject(t);
    await published(p.slug, p.id);
    const visitor = await newClient(t);
    const first = await visitor.agent.get(`/feed/${p.slug}.atom`).expect(200);
    expect(first.headers.etag).toBeDefined();
    expect(first.headers["cache-control"]).toMatch(/public/);
    await visitor.agent.get(`/feed/${p.slug}.atom`).set("If-None-Match", first.headers.etag!).expect(304);
    await visitor.agent.get("/feed/no-such-project-here.atom").expect(404);
    await visitor.agent.get("/feed/Bad..name.atom").expect(404);
  });

  it("is a well-formed feed with no entries for a project without public posts", async () => {
    const p = await createProject(t);
    const xml = await parseXml((await (await newClient(t)).agent.get(`/feed/${p.slug}.atom`).expect(200)).text);
    for (const name of ["id", "title", "updated"]) expect(childrenNamed(xml.documentElement, name)).toHaveLength(1);
    expect(childrenNamed(xml.documentElement, "entry")).toHaveLength(0);
  });
});

describe("GET /sitemap.xml and /robots.txt", () => {
  it("lists public pages only", async () => {
    const p = await createProject(t);
    const open = await published(p.slug, p.id, { title: "Open house" });
    const hidden = await published(p.slug, p.id, { title: "For investors", audience: "investor" });
    const res = await (await newClient(t)).agent.get("/sitemap.xml").expect(200);
    const xml = await parseXml(res.text);
    const locs = Array.from(xml.getElementsByTagNameNS("http://www.sitemaps.org/schemas/sitemap/0.9", "loc")).map((l) => l.textContent);
    expect(locs).toContain(`http://plumbline.test/projects/${p.slug}`);
    expect(locs).toContain(`http://plumbline.test/projects/${p.slug}/updates/${open.slug}`);
    expect(locs).not.toContain(`http://plumbline.test/projects/${p.slug}/updates/${hidden.slug}`);
    expect(locs.every((l) => l?.startsWith("http://plumbline.test/"))).toBe(true);
  });

  it("robots.txt keeps crawlers out of the office and names the sitemap", async () => {
    const res = await (await newClient(t)).agent.get("/robots.txt").expect(200);
    expect(res.text).toContain("Disallow: /office");
    expect(res.text).toContain("Sitemap: http://plumbline.test/sitemap.xml");
  });
});

describe("Open Graph tags in the HTML the server sends", () => {
  it("a public update's page carries its title, description and an absolute public image", async () => {
    const p = await createProject(t);
    const post = await published(p.slug, p.id, { title: "Bulk fuel tank & bund <complete>", summary: "The 40,000 L tank is set in its bund." });
    const res = await (await newClient(t)).agent.get(`/projects/${p.slug}/updates/${post.slug}`).expect(200);
    expect(res.headers["content-type"]).toMatch(/text\/html/);
    expect(res.text).toContain('<meta property="og:title" content="Bulk fuel tank &amp; bund &lt;complete&gt;">');
    expect(res.text).toContain('<meta property="og:description" content="The 40,000 L tank is set in its bund.">');
    expect(res.text).toContain('<meta property="og:type" content="article">');
    expect(res.text).toMatch(/<meta property="og:image" content="http:\/\/plumbline\.test\/media\/v\/[0-9a-f]{16}-1024w\.jpg">/);
    expect(res.text).toContain(`<link rel="canonical" href="http://plumbline.test/projects/${p.slug}/updates/${post.slug}">`);
    expect(res.text).toMatch(/<title>Bulk fuel tank &amp; bund &lt;complete&gt; · Test campus/);
    // The image in the preview is one a visitor may fetch.
    const image = /og:image" content="http:\/\/plumbline\.test([^"]+)"/.exec(res.text)![1]!;
    await (await newClient(t)).agent.get(image).expect(200);
  });

  it("the project page's title names the build once, and its updates page says what it is first", async () => {
    const p = await createProject(t);
    const visitor = await newClient(t);
    const home = await visitor.agent.get(`/projects/${p.slug}`).expect(200);
    const name = /<title>([^<]*)<\/title>/.exec(home.text)![1]!;
    expect(name).toMatch(/^Test campus/);
    expect(name).not.toContain(" · ");
    const updates = await visitor.agent.get(`/projects/${p.slug}/updates`).expect(200);
    expect(/<title>([^<]*)<\/title>/.exec(updates.text)![1]).toBe(`Updates · ${name}`);
  });

  it("an investor update's page gives away nothing (the plain shell), even to an investor's link preview", async () => {
    const p = await createProject(t);
    const post = await published(p.slug, p.id, { title: "Lender drawdown schedule", audience: "investor" });
    const res = await as.investor.agent.get(`/projects/${p.slug}/updates/${post.slug}`).expect(200);
    expect(res.text).not.toContain("Lender drawdown schedule");
    expect(res.text).not.toContain("og:title");
  });

  it("an unknown update still gets the app's shell (the app shows its not-found page)", async () => {
    const p = await createProject(t);
    const res = await (await newClient(t)).agent.get(`/projects/${p.slug}/updates/nothing-here`).expect(200);
    expect(res.text).not.toContain("og:title");
  });
});

describe("caching of the public lists", () => {
  it("a visitor's list varies by Cookie, is kept by no shared cache and revalidates by ETag (304); a signed-in answer is never stored", async () => {
    const p = await createProject(t);
    await published(p.slug, p.id);
    const visitor = await newClient(t);
    const first = await visitor.agent.get(`/api/projects/${p.slug}/posts`).expect(200);
    // The same URL answers an investor with investor posts: no shared cache may keep either answer.
    expect(first.headers["cache-control"]).toBe("private, no-cache");
    expect(first.headers.vary).toMatch(/Cookie/i);
    expect(first.headers["x-total-count"]).toBe("1");
    await visitor.agent.get(`/api/projects/${p.slug}/posts`).set("If-None-Match", first.headers.etag!).expect(304);
    const signedIn = await as.investor.agent.get(`/api/projects/${p.slug}/posts`).expect(200);
    expect(signedIn.headers["cache-control"]).toBe("private, no-store");
  });

  it("a post page changes its ETag when the post changes", async () => {
    const p = await createProject(t);
    const post = await published(p.slug, p.id);
    const visitor = await newClient(t);
    const first = await visitor.agent.get(`/api/projects/${p.slug}/posts/${post.slug}`).expect(200);
    await as.lead.agent.patch(`/api/posts/${post.id}`).set("X-CSRF-Token", as.lead.csrf).send({ summary: "Corrected." }).expect(200);
    const second = await visitor.agent.get(`/api/projects/${p.slug}/posts/${post.slug}`).set("If-None-Match", first.headers.etag!).expect(200);
    expect(second.body.summary).toBe("Corrected.");
  });
});

describe("full-text search over posts (q)", () => {
  it("finds published public posts by words in the title, summary or text, best match first", async () => {
    const p = await createProject(t);
    await published(p.slug, p.id, { title: "Switchgear energised", summary: "The HV switchgear room is live.", body: doc(text("Switchgear testing went to plan; switchgear interlocks checked.")) });
    await published(p.slug, p.id, { title: "Landscaping", body: doc(text("Trees planted along the perimeter; the switchgear room roof was also sealed.")) });
    await published(p.slug, p.id, { title: "Hall 2A flooring", body: doc(text("Raised floor installed.")) });
    const visitor = await newClient(t);
    const res = await visitor.agent.get(`/api/projects/${p.slug}/posts?q=switchgear`).expect(200);
    expect(res.body.map((x: { title: string }) => x.title)).toEqual(["Switchgear energised", "Landscaping"]);
    expect(res.headers["x-total-count"]).toBe("2");
    const none = await visitor.agent.get(`/api/projects/${p.slug}/posts?q=chiller`).expect(200);
    expect(none.body).toEqual([]);
  });

  it("refuses a query over 200 characters with 400", async () => {
    const p = await createProject(t);
    const res = await (await newClient(t)).agent.get(`/api/projects/${p.slug}/posts?q=${"a".repeat(201)}`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.q).toMatch(/200/);
  });

  it("pages ten at a time, with the total in X-Total-Count, and filters by tag", async () => {
    const p = await createProject(t);
    for (let i = 0; i < 12; i++) await published(p.slug, p.id, { title: `Weekly walk ${i}`, tags: i % 3 === 0 ? [{ kind: "area", value: "Hall 2A" }] : [] });
    const visitor = await newClient(t);
    const first = await visitor.agent.get(`/api/projects/${p.slug}/posts`).expect(200);
    const second = await visitor.agent.get(`/api/projects/${p.slug}/posts?page=2`).expect(200);
    expect(first.body).toHaveLength(10);
    expect(second.body).toHaveLength(2);
    expect(first.headers["x-total-count"]).toBe("12");
    const tagged = await visitor.agent.get(`/api/projects/${p.slug}/posts?tag=${encodeURIComponent("Hall 2A")}`).expect(200);
    expect(tagged.body).toHaveLength(4);
    expect(tagged.body.every((x: { tags: Array<{ value: string }> }) => x.tags.some((g) => g.value === "Hall 2A"))).toBe(true);
  });
});
