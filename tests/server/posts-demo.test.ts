import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { DEMO_UPDATE_TITLES, seedPosts } from "../../server/seed/posts.seed.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

const SLUG = "aldermere-phase-2";
// Other tests may add their own updates to the demo project: look at the seed's own.
const SEEDED = new Set([...DEMO_UPDATE_TITLES.published, DEMO_UPDATE_TITLES.scheduled, DEMO_UPDATE_TITLES.inReview]);
const seeded = <T extends { title: string }>(rows: T[]) => rows.filter((r) => SEEDED.has(r.title));
const seededPublished = <T extends { title: string }>(rows: T[]) => rows.filter((r) => DEMO_UPDATE_TITLES.published.includes(r.title));

/** Every page of the list a caller sees. */
async function allPosts(agent: Awaited<ReturnType<typeof newClient>>["agent"]) {
  const all: Array<{ slug: string; title: string; audience: string; cover: unknown }> = [];
  for (let page = 1; page < 50; page++) {
    const res = await agent.get(`/api/projects/${SLUG}/posts?page=${page}`).expect(200);
    all.push(...res.body);
    if (res.body.length < 10) break;
  }
  return all;
}

describe("the demo's updates and photo story", () => {
  it("has eight published updates over nine months (one for investors), one scheduled and one in review", async () => {
    const project = await t.db("projects").where({ slug: SLUG }).first("id");
    const rows = seeded(await t.db("posts").where({ project_id: project.id }).select("title", "status", "audience", "published_at", "scheduled_for"));
    expect(rows).toHaveLength(10);
    const published = rows.filter((r) => DEMO_UPDATE_TITLES.published.includes(r.title));
    expect(published.map((r) => r.status)).toEqual(Array(8).fill("published"));
    expect(published.filter((r) => r.audience === "investor").map((r) => r.title)).toEqual(DEMO_UPDATE_TITLES.investorOnly);
    expect(rows.find((r) => r.title === DEMO_UPDATE_TITLES.inReview)?.status).toBe("in_review");
    // Scheduled for next week; a scheduler run with a far-future clock in another test may already have published it.
    const scheduled = await t.db("publishing_events as e").join("posts as p", "p.id", "e.owner_id").where({ "e.owner_type": "post", "e.action": "schedule", "p.title": DEMO_UPDATE_TITLES.scheduled }).first("e.id");
    expect(scheduled).toBeDefined();
    const times = published.map((r) => new Date(r.published_at).getTime()).sort((a, b) => a - b);
    const months = (times.at(-1)! - times[0]!) / (30.44 * 86_400_000);
    expect(months).toBeGreaterThan(7.5);
    expect(months).toBeLessThanOrEqual(9.2);
  });

  it("each published update links milestones captured as they stood that day, and a visitor reads them", async () => {
    const visitor = await newClient(t);
    const list = { body: seededPublished(await allPosts(visitor.agent)) };
    expect(list.body).toHaveLength(7);
    for (const post of list.body as Array<{ slug: string; cover: unknown }>) {
      expect(post.cover).not.toBeNull();
      const page = await visitor.agent.get(`/api/projects/${SLUG}/posts/${post.slug}`).expect(200);
      expect(page.body.milestones.length).toBeGreaterThan(0);
      for (const m of page.body.milestones) expect(m.then).not.toBeNull();
      expect(page.body.html).toContain('class="milestone-block"');
    }
    const withPhoto = await Promise.all((list.body as Array<{ slug: string }>).map(async (p) => (await visitor.agent.get(`/api/projects/${SLUG}/posts/${p.slug}`)).body));
    expect(withPhoto.some((p) => p.html.includes("<picture>") && p.images.length > 0)).toBe(true);
    // Some milestones moved after an update was written: the page shows "now" beside "then".
    expect(withPhoto.some((p) => p.milestones.some((m: { changed: boolean }) => m.changed))).toBe(true);
    const investor = await signIn(t, DEMO.investor);
    const theirs = seededPublished(await allPosts(investor.agent));
    expect(theirs).toHaveLength(8);
    expect(theirs.filter((p) => p.audience === "investor").map((p) => p.title)).toEqual(DEMO_UPDATE_TITLES.investorOnly);
  });

  it("has a published then-and-now story of one area, its photos taken on different dates", async () => {
    const visitor = await newClient(t);
    const stories = await visitor.agent.get(`/api/projects/${SLUG}/stories`).expect(200);
    expect(stories.body.map((s: { slug: string }) => s.slug)).toContain("the-plant-yard-then-and-now");
    const story = await visitor.agent.get(`/api/projects/${SLUG}/stories/the-plant-yard-then-and-now`).expect(200);
    const pair = story.body.items.find((i: { kind: string }) => i.kind === "pair");
    expect(pair.area).toBe("Plant yard");
    expect(pair.before.takenAt.slice(0, 10) < pair.after.takenAt.slice(0, 10)).toBe(true);
  });

  it("is idempotent: a second run adds nothing", async () => {
    const before = await t.db("posts").count({ n: "*" }).first();
    expect((await seedPosts(t.db, SLUG)).created).toEqual([]);
    expect(await t.db("posts").count({ n: "*" }).first()).toEqual(before);
  });
});
