import { beforeAll, describe, expect, it } from "vitest";
import { newClient, type TestApp } from "../helpers/app.ts";
import { createMilestone, createPhoto, createProject, doc, milestoneBlock, parseHtmlFragment, postInput, text, type Client, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

// The public pages rendered on the server for visitors (decision 059). These tests read the HTML
// as it leaves the server, before any script runs: what a phone paints first, and what a reader
// without JavaScript gets. They need the client's build with its server entry (npm test builds it).
const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const DEMO = "/projects/aldermere-phase-2";
const STATE = /<script type="application\/json" id="plumbline-state">([\s\S]*?)<\/script>/;

async function published(projectSlug: string, projectId: number, over: Record<string, unknown> = {}, by: Client = as.lead) {
  const cover = await createPhoto(t, projectId);
  const res = await by.agent.post(`/api/projects/${projectSlug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(cover.id, over)).expect(201);
  await by.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", by.csrf).expect(200);
  return { id: res.body.id as number, slug: res.body.slug as string };
}

/** The page's HTML as `by` (a visitor unless given) gets it: the whole text, and the words inside the root element. */
async function visit(path: string, by?: Client) {
  const res = await (by ?? (await newClient(t))).agent.get(path);
  const root = /<div id="root">([\s\S]*?)<\/div>(?:<script type="application\/json"|\s*<\/body>)/.exec(res.text)?.[1] ?? "";
  const words = (await parseHtmlFragment(root)).textContent ?? "";
  return { res, html: res.text, root, words };
}

describe("server rendering of the public pages", () => {
  it("puts a post's title, body and linked milestone in the HTML, with the state the browser hydrates from", async () => {
    const p = await createProject(t);
    const m = await createMilestone(t, p.slug, { name: "Hall 2A ready for service" });
    const post = await published(p.slug, p.id, { title: "Chillers set on their plinths", body: doc(text("All five chillers are on their plinths."), milestoneBlock(m.id)) });
    const { res, html, words } = await visit(`/projects/${p.slug}/updates/${post.slug}`);
    expect(res.status).toBe(200);
    expect(words).toContain("Chillers set on their plinths");
    expect(words).toContain("All five chillers are on their plinths.");
    expect(words).toContain("Hall 2A ready for service");
    // A visitor's page keeps the shell's caching: revalidated, never stored privately as a signed-in page is.
    expect(res.headers["cache-control"]).toBe("no-cache");
    const state = JSON.parse(STATE.exec(html)![1]!) as { queries: { queries: { queryKey: unknown[] }[] }; router: { loaderData: Record<string, unknown> } };
    expect(state.queries.queries.length).toBeGreaterThan(0);
    expect(Object.keys(state.router.loaderData).length).toBeGreaterThan(0);
  });

  it.each([
    ["/", ["Aldermere Campus, Phase 2"]],
    [DEMO, ["Aldermere Campus, Phase 2", "Hall 2A", "HD-1"]],
    [`${DEMO}/updates`, ["HD-1 containment goes up", "Sealed containment is up over the first rack row of the high-density suite."]],
    [`${DEMO}/updates/hd-1-containment-goes-up`, ["HD-1 containment goes up"]],
    // The months come from the photographs' dates.
    [`${DEMO}/gallery`, ["Photographs from the site", "November 2026"]],
    [`${DEMO}/stories/the-plant-yard-then-and-now`, ["The plant yard, then and now", "Seven months of the plant yard"]],
    [`${DEMO}/timeline`, ["Site set-up, hoarding and welfare"]],
    [`${DEMO}/facility`, ["Hall 2A", "Chillers"]],
    [`${DEMO}/search?q=chill`, ["Chillers on their plinths"]],
  ])("renders %s with its own words before any script runs", async (path, expected) => {
    const { res, words, html } = await visit(path);
    expect(res.status).toBe(200);
    for (const w of expected) expect(words, `${path}: ${w}`).toContain(w);
    expect(html).toMatch(STATE);
  });

  it("gives a visitor the same empty shell as before for an investor update, with none of its words", async () => {
    const p = await createProject(t);
    const post = await published(p.slug, p.id, { title: "Investor briefing on the cost to complete", summary: "Held back for investors.", audience: "investor" });
    const { res, html, root } = await visit(`/projects/${p.slug}/updates/${post.slug}`);
    // Today's answer: the shell, whose script then shows the not-found page in the visitor's browser.
    expect(res.status).toBe(200);
    expect(root).toBe("");
    expect(html).not.toMatch(STATE);
    expect(html).not.toContain("Investor briefing");
    expect(html).not.toContain("Held back for investors");
    // The investor reads it in the investor room; the public page's shell stays empty for them too.
    const signedIn = await visit(`/projects/${p.slug}/updates/${post.slug}`, as.investor);
    expect(signedIn.root).toBe("");
  });

  it("leaves a signed-in caller's pages to the browser, never stored", async () => {
    const { res, root, html } = await visit(DEMO, as.marketing);
    expect(res.status).toBe(200);
    expect(root).toBe("");
    expect(html).not.toMatch(STATE);
    expect(res.headers["cache-control"]).toBe("private, no-store");
  });

  it("leaves the forms and the pages of a link with a token to the browser", async () => {
    for (const path of ["/sign-in", "/subscribe", `${DEMO}/enquire`, "/reset-password/not-a-token", "/office"]) {
      const { root } = await visit(path);
      expect(root, path).toBe("");
    }
  });

  it("keeps a title with a closing script tag as data: in the page's words and in its state, never as markup", async () => {
    const p = await createProject(t);
    const hostile = "</script><script>alert(1)</script>";
    const post = await published(p.slug, p.id, { title: `Plant yard ${hostile}`, summary: `Summary ${hostile}` });
    const { html, words } = await visit(`/projects/${p.slug}/updates/${post.slug}`);
    expect(words).toContain(`Plant yard ${hostile}`);
    expect(html).not.toContain("<script>alert(1)");
    // Every script element the page has is closed once: none was closed early by the title.
    expect(html.match(/<script\b/g)?.length).toBe(html.match(/<\/script>/g)?.length);
    const state = STATE.exec(html)![1]!;
    expect(state).not.toMatch(/[<>]/);
    expect(JSON.stringify(JSON.parse(state))).toContain(`Plant yard ${hostile.replaceAll("/", "\\/").replaceAll("\\/", "/")}`);
  });
});
