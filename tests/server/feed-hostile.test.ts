import { beforeAll, describe, expect, it } from "vitest";
import { newClient, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, doc, parseHtmlFragment, parseXml, postInput, type Client, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

/**
 * Issue #9 item 2: whatever staff type, the Atom feed and the sitemap stay well-formed, and what
 * was typed comes out of an XML parser unchanged. The reference parser is jsdom's DOMParser with
 * "application/xml", which reports any well-formedness error (parseXml throws on it).
 */

const ATOM = "http://www.w3.org/2005/Atom";
const SITEMAP = "http://www.sitemaps.org/schemas/sitemap/0.9";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const hex = (c: string) => `U+${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, "0")}`;
// Source: XML 1.0 (Fifth Edition) §2.2 [2] Char; the list: U+0000–U+0008, U+000B, U+000C, U+000E–U+001F.
const C0 = Array.from({ length: 0x20 }, (_, i) => String.fromCharCode(i));
const LINE = ["\t", "\n", "\r"];
const NOT_XML = /[\u0000-\u0008\u000B\u000C\u000E-\u001F]/;

/** Markup, entity and CDATA-closing text, and both quotes: each breaks a naive writer somewhere. */
const HOSTILE = `<b>bold</b> & &amp; ]]> "double" 'single' <![CDATA[x]]> &#0; </entry>`;

const childrenNamed = (el: Element, name: string) => Array.from(el.children).filter((c) => c.namespaceURI === ATOM && c.localName === name);
const only = (el: Element, name: string) => {
  const found = childrenNamed(el, name);
  expect(found, `exactly one ${name}`).toHaveLength(1);
  return found[0]!;
};

function create(by: Client, slug: string, body: Record<string, unknown>) {
  return by.agent.post(`/api/projects/${slug}/posts`).set("X-CSRF-Token", by.csrf).send(body);
}

async function postCount(projectId: number): Promise<number> {
  const [row] = await t.db("posts").where({ project_id: projectId }).count({ n: "*" });
  return Number(row!.n);
}

describe("POST /api/projects/:slug/posts with control characters", () => {
  it.each(C0.filter((c) => !LINE.includes(c)).map((c) => [hex(c), c]))("refuses %s in the title, the summary and a tag with 400 naming each field, and writes nothing", async (code, c) => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const cases: Array<[string, Record<string, unknown>]> = [
      ["title", { title: `Chillers${c} on plinths` }],
      ["summary", { summary: `All five${c} are set.` }],
      ["tags.0.value", { tags: [{ kind: "area", value: `Hall${c} 2A` }] }],
    ];
    for (const [field, over] of cases) {
      const res = await create(as.lead, p.slug, postInput(cover.id, over));
      expect(res.status, field).toBe(400);
      expect(res.body.error.code).toBe("validation");
      expect(res.body.error.fields[field]).toContain(code);
    }
    expect(await postCount(p.id)).toBe(0);
  });

  it.each(LINE.map((c) => [hex(c), c]))("refuses %s inside a one-line title or tag, and keeps it inside the multi-line summary", async (_code, c) => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    for (const [field, over] of [["title", { title: `Chillers${c}on plinths` }], ["tags.0.value", { tags: [{ kind: "area", value: `Hall${c}2A` }] }]] as const) {
      const res = await create(as.lead, p.slug, postInput(cover.id, over));
      expect(res.status, field).toBe(400);
      expect(res.body.error.fields[field]).toBe("must be on one line (no tabs or line breaks)");
    }
    expect(await postCount(p.id)).toBe(0);
    const ok = await create(as.lead, p.slug, postInput(cover.id, { summary: `All five${c}are set.` })).expect(201);
    expect((await as.lead.agent.get(`/api/posts/${ok.body.id}`).expect(200)).body.summary).toBe(`All five${c}are set.`);
  });

  it("refuses a control character in a changed title (PATCH) with 400 and leaves the post as it was", async () => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const created = await create(as.lead, p.slug, postInput(cover.id, { title: "Generators load-banked" })).expect(201);
    const res = await as.lead.agent.patch(`/api/posts/${created.body.id}`).set("X-CSRF-Token", as.lead.csrf).send({ title: "Generators\u0000 load-banked" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.title).toContain("U+0000");
    expect((await as.lead.agent.get(`/api/posts/${created.body.id}`).expect(200)).body.title).toBe("Generators load-banked");
  });
});

describe("GET /feed/:slug.atom and /sitemap.xml with hostile text", () => {
  it("a published post whose title, summary, tag and body hold markup, ampersands, ]]> and quotes round-trips through an XML parser; the body's control characters are removed", async () => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const title = `Fuel tank ${HOSTILE}`;
    const summary = `Bund\tcomplete.\nTank ${HOSTILE}\r\nfilled.`;
    const tag = `Plant <yard> & "bund" ]]> 'x'`;
    // Every C0 control inside the body's text: the tab and line breaks stay, the rest are removed.
    const bodyText = `Delivered ${HOSTILE} ${C0.join("")} end`;
    const created = await create(as.lead, p.slug, postInput(cover.id, { title, summary, tags: [{ kind: "area", value: tag }, { kind: "system", value: "fuel" }], body: doc({ type: "paragraph", content: [{ type: "text", text: bodyText }] }) })).expect(201);
    await as.lead.agent.post(`/api/posts/${created.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);

    const visitor = await newClient(t);
    const res = await visitor.agent.get(`/feed/${p.slug}.atom`).expect(200);
    expect(res.text).not.toMatch(NOT_XML);
    expect(res.text).not.toContain("<![CDATA[");
    const feed = (await parseXml(res.text)).documentElement;
    // Source: RFC 4287 §4.1.1 — exactly one atom:id, atom:title and atom:updated in the feed, and an author.
    for (const name of ["id", "title", "updated"]) only(feed, name);
    expect(childrenNamed(feed, "author").length).toBeGreaterThanOrEqual(1);
    const [entry] = childrenNamed(feed, "entry");
    expect(entry).toBeDefined();
    // Source: RFC 4287 §4.1.2 — exactly one atom:id, atom:title and atom:updated in each entry.
    for (const name of ["id", "title", "updated"]) only(entry!, name);

    // Plain text constructs (RFC 4287 §3.1.1.1, type="text"): what a reader shows is what was typed.
    const titleEl = only(entry!, "title");
    expect(titleEl.getAttribute("type")).toBe("text");
    expect(titleEl.textContent).toBe(title);
    const summaryEl = only(entry!, "summary");
    expect(summaryEl.getAttribute("type")).toBe("text");
    expect(summaryEl.textContent).toBe(summary);

    const categories = childrenNamed(entry!, "category");
    expect(categories.map((c) => c.getAttribute("label"))).toEqual([tag, "fuel"]);
    expect(categories.map((c) => c.getAttribute("term"))).toEqual([tag, "fuel"]);

    // The content is HTML (type="html"): escaped once for XML, then read as HTML by the reader.
    const content = only(entry!, "content");
    expect(content.getAttribute("type")).toBe("html");
    const html = await parseHtmlFragment(content.textContent!);
    const paragraph = html.querySelector("p")!;
    // HTML reads a lone carriage return as a line feed (WHATWG HTML, "preprocessing the input stream").
    expect(paragraph.textContent).toBe(`Delivered ${HOSTILE} \t\n\n end`);
    expect(html.querySelector("b")).toBeNull();

    // The alternate link and the sitemap name the post's page, and the sitemap is well-formed too.
    const href = childrenNamed(entry!, "link").find((l) => l.getAttribute("rel") === "alternate")!.getAttribute("href")!;
    const sitemap = await visitor.agent.get("/sitemap.xml").expect(200);
    expect(sitemap.text).not.toMatch(NOT_XML);
    const locs = Array.from((await parseXml(sitemap.text)).getElementsByTagNameNS(SITEMAP, "loc")).map((l) => l.textContent);
    expect(locs).toContain(href);
    expect(href).toMatch(new RegExp(`^http://plumbline\\.test/projects/${p.slug}/updates/[a-z0-9-]+$`));

    // The page and the API answer carry the same text.
    const api = await visitor.agent.get(`/api/projects/${p.slug}/posts/${created.body.slug}`).expect(200);
    expect(api.body.title).toBe(title);
    expect(api.body.tags.map((x: { value: string }) => x.value)).toContain(tag);
  });

  it("stays well-formed when a row written before this rule (or outside the API) holds control characters and markup", async () => {
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id, { caption: "Plant\u0001 yard <b>" });
    const created = await create(as.lead, p.slug, postInput(cover.id, { title: "Placeholder", tags: [{ kind: "area", value: "Hall 2A" }] })).expect(201);
    await as.lead.agent.post(`/api/posts/${created.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    // As if written before the schemas refused them: straight into the rows.
    await t.db("posts").where({ id: created.body.id }).update({
      title: "Old\u0001 title <i>&</i> ]]>",
      summary: "Old\u000B summary \"q\"",
      html: "<p>Old\u0002 body &amp; more</p>",
      author_name: "Site\u001F team <lead>",
    });
    await t.db("post_tags").where({ post_id: created.body.id }).update({ value: "Hall\u0000 2A <b>\"x\"</b>" });
    await t.db("projects").where({ id: p.id }).update({ name: "Campus\u0007 <Phase 2>", description: "A\u0008 & B" });

    const visitor = await newClient(t);
    const res = await visitor.agent.get(`/feed/${p.slug}.atom`).expect(200);
    expect(res.text).not.toMatch(NOT_XML);
    const feed = (await parseXml(res.text)).documentElement;
    expect(only(feed, "title").textContent).toBe("Campus <Phase 2>: progress updates");
    expect(only(feed, "subtitle").textContent).toBe("A & B");
    const entry = childrenNamed(feed, "entry")[0]!;
    expect(only(entry, "title").textContent).toBe("Old title <i>&</i> ]]>");
    expect(only(entry, "summary").textContent).toBe('Old summary "q"');
    expect(childrenNamed(entry, "category")[0]!.getAttribute("label")).toBe('Hall 2A <b>"x"</b>');
    expect(only(only(entry, "author"), "name").textContent).toBe("Site team <lead>");
    expect(only(entry, "content").textContent).toBe("<p>Old body &amp; more</p>");
    await parseXml((await visitor.agent.get("/sitemap.xml").expect(200)).text);
  });
});
