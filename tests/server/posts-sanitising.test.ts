import { beforeAll, describe, expect, it } from "vitest";
import { newClient, type TestApp } from "../helpers/app.ts";
import { sanitizePostHtml } from "../../server/posts/rich-text.ts";
import { createPhoto, createProject, doc, image, parseHtmlFragment, parseXml, postInput, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

/** Everything in the HTML that could run script or load something from elsewhere. */
async function dangers(html: string): Promise<string[]> {
  const root = await parseHtmlFragment(html);
  const found: string[] = [];
  for (const el of Array.from(root.querySelectorAll("*"))) {
    const tag = el.tagName.toLowerCase();
    if (["script", "style", "svg", "math", "iframe", "object", "embed", "link", "meta", "base", "form", "input", "textarea", "template", "noscript"].includes(tag)) found.push(`<${tag}>`);
    for (const attr of el.getAttributeNames()) {
      const value = el.getAttribute(attr) ?? "";
      if (attr.startsWith("on")) found.push(`${tag}[${attr}]`);
      if (attr === "style" && !/^background-color:#[0-9a-f]{6}$/i.test(value.replace(/\s/g, ""))) found.push(`${tag}[style=${value}]`);
      if (["href", "src", "srcset", "action", "formaction", "xlink:href"].includes(attr) && /^\s*(javascript|data|vbscript):/i.test(value)) found.push(`${tag}[${attr}=${value}]`);
      if (["href", "src"].includes(attr) && /^\s*\/\//.test(value)) found.push(`${tag}[${attr}=${value}]`);
    }
  }
  return found;
}

describe("rich text never carries script into the HTML", () => {
  const paragraph = (s: string, marks?: unknown[]) => ({ type: "paragraph", content: [{ type: "text", text: s, ...(marks ? { marks } : {}) }] });

  // Source: OWASP, "XSS Filter Evasion Cheat Sheet" and "Cross Site Scripting Prevention Cheat
  // Sheet" (the usual payloads: script tags, event handlers, javascript: and data: URLs, SVG, style).
  const TEXT_PAYLOADS = [
    "<script>alert(1)</script>",
    '<img src=x onerror="alert(1)">',
    "<svg/onload=alert(1)>",
    "<style>@import 'https://evil.example/x.css';</style>",
    '<a href="javascript:alert(1)">click</a>',
    '<iframe src="data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg=="></iframe>',
    '"><body onload=alert(1)>',
    "<math><mtext><table><mglyph><style><img src=x onerror=alert(1)>",
  ];

  it("escapes markup typed as text in paragraphs, headings, captions and alt text", async () => {
    const p = await createProject(t);
    const photo = await createPhoto(t, p.id);
    const body = doc(
      ...TEXT_PAYLOADS.map((s) => paragraph(s) as never),
      { type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: TEXT_PAYLOADS[0]! }] },
      image(photo.id, { caption: TEXT_PAYLOADS[2], alt: '" onerror="alert(1)' }),
    );
    const res = await as.marketing.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.marketing.csrf).send(postInput(photo.id, { body })).expect(201);
    const full = await as.marketing.agent.get(`/api/posts/${res.body.id}`).expect(200);
    expect(await dangers(full.body.html)).toEqual([]);
    expect(full.body.html).toContain("&lt;script&gt;alert(1)&lt;/script&gt;");
    expect(full.body.html).not.toMatch(/<script|<svg|<style|<iframe/i);
    expect(full.body.html).toContain('alt="&quot; onerror=&quot;alert(1)"');
  });

  it("drops attributes the editor does not offer (style, event handlers) and ignores an image's own src", async () => {
    const p = await createProject(t);
    const photo = await createPhoto(t, p.id);
    const body = {
      type: "doc",
      content: [
        { type: "paragraph", attrs: { style: "background:url(javascript:alert(1))", onclick: "alert(1)", textAlign: "left" }, content: [{ type: "text", text: "Hall 2A" }] },
        { type: "heading", attrs: { level: 3, onmouseover: "alert(1)", class: "x" }, content: [{ type: "text", text: "Roof" }] },
        {
          type: "paragraph",
          content: [{ type: "text", text: "link", marks: [{ type: "link", attrs: { href: "https://kestrel.example/progress", target: "_top", rel: "opener", class: "evil", onclick: "x" } }] }],
        },
        { type: "image", attrs: { mediaId: photo.id, src: "data:image/svg+xml;base64,PHN2ZyBvbmxvYWQ9YWxlcnQoMSk+", title: "t", onerror: "alert(1)" } },
      ],
    };
    const res = await as.marketing.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.marketing.csrf).send(postInput(photo.id, { body })).expect(201);
    const { html } = (await as.marketing.agent.get(`/api/posts/${res.body.id}`).expect(200)).body as { html: string };
    expect(await dangers(html)).toEqual([]);
    expect(html).not.toContain("data:");
    expect(html).not.toContain("_top");
    expect(html).not.toContain("opener\"");
    expect(html).toContain('<a rel="noopener noreferrer nofollow" href="https://kestrel.example/progress">link</a>');
    expect(html).toContain(photo.urls.find((u) => u.endsWith("1024w.jpg")));
  });

  it.each([
    ["javascript:alert(1)"],
    ["JaVaScRiPt:alert(1)"],
    [" javascript:alert(1)"],
    ["java\tscript:alert(1)"],
    ["jav&#x09;ascript:alert(1)"],
    ["vbscript:msgbox(1)"],
    ["data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg=="],
    ["//evil.example/"],
    ["/\\evil.example/"],
    ["\u0001javascript:alert(1)"],
  ])("refuses a link to %j with 400", async (href) => {
    const p = await createProject(t);
    const body = doc({ type: "paragraph", content: [{ type: "text", text: "x", marks: [{ type: "link", attrs: { href } }] }] } as never);
    const res = await as.marketing.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.marketing.csrf).send(postInput(null, { body }));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).join()).toMatch(/href/);
  });

  it.each([["script"], ["style"], ["svg"], ["iframe"], ["html"], ["codeBlock"]])("refuses a %s node with 400", async (type) => {
    const p = await createProject(t);
    const body = { type: "doc", content: [{ type, attrs: {}, content: [{ type: "text", text: "alert(1)" }] }] };
    const res = await as.marketing.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.marketing.csrf).send(postInput(null, { body }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields["body.content.0.type"]).toContain(`"${type}"`);
  });

  it("the published page and the feed carry the same clean HTML", async () => {
    const p = await createProject(t);
    const photo = await createPhoto(t, p.id);
    const body = doc(...TEXT_PAYLOADS.map((s) => paragraph(s) as never), image(photo.id));
    const created = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(photo.id, { body })).expect(201);
    await as.lead.agent.post(`/api/posts/${created.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    const visitor = await newClient(t);
    const page = await visitor.agent.get(`/api/projects/${p.slug}/posts/${created.body.slug}`).expect(200);
    expect(await dangers(page.body.html)).toEqual([]);
    const feed = await visitor.agent.get(`/feed/${p.slug}.atom`).expect(200);
    const xml = await parseXml(feed.text);
    const content = xml.getElementsByTagNameNS("http://www.w3.org/2005/Atom", "content")[0]?.textContent ?? "";
    expect(content).toContain("&lt;script&gt;");
    expect(await dangers(content)).toEqual([]);
  });
});

describe("the sanitiser's allow-list (HTML from anywhere)", () => {
  // Source: OWASP "XSS Filter Evasion Cheat Sheet" (vectors below are from its families:
  // event handlers, protocol tricks, SVG, style, data: URLs, malformed tags).
  it.each([
    ['<p onclick="alert(1)">x</p>', "<p>x</p>"],
    ["<script>alert(1)</script><p>ok</p>", "<p>ok</p>"],
    ['<a href="javascript:alert(1)">x</a>', '<a rel="noopener noreferrer nofollow">x</a>'],
    ['<a href="JAVASCRIPT:alert(1)">x</a>', '<a rel="noopener noreferrer nofollow">x</a>'],
    ['<a href="&#106;avascript:alert(1)">x</a>', '<a rel="noopener noreferrer nofollow">x</a>'],
    ['<img src="data:image/png;base64,AAAA" onerror="alert(1)">', "<img />"],
    ['<img src="https://evil.example/x.png">', "<img />"],
    ["<svg><script>alert(1)</script></svg><p>after</p>", "<p>after</p>"],
    ["<style>p{background:url(javascript:alert(1))}</style><p>y</p>", "<p>y</p>"],
    ['<p style="color:red">z</p>', "<p>z</p>"],
    ['<img style="background-image:url(javascript:alert(1))">', "<img />"],
    ['<iframe src="https://evil.example"></iframe>', ""],
    ['<a href="//evil.example">x</a>', '<a rel="noopener noreferrer nofollow">x</a>'],
    ['<object data="x.swf"></object><embed src="x.swf">', ""],
    ['<form action="https://evil.example"><input name="a"></form>', ""],
    ['<p class="milestone-name evil">n</p>', '<p class="milestone-name">n</p>'],
  ])("%s → %s", async (input, output) => {
    expect(sanitizePostHtml(input)).toBe(output);
    expect(await dangers(sanitizePostHtml(input))).toEqual([]);
  });
});
