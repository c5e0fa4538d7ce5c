import fc from "fast-check";
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Audience } from "../../src/shared/schemas/common.ts";
import type { System } from "../../src/shared/schemas/programme.ts";
import { renderDigest } from "../../server/digests/digests.render.ts";
import { topicsAllow } from "../../server/subscribers/subscribers.topics.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { lastMailId, startTestApp, type TestApp } from "../helpers/app.ts";
import { scheduledRun } from "../helpers/digests.ts";
import { createProject, createPhoto, postInput, signInAll } from "./posts-fixtures.ts";

let t: TestApp;
beforeAll(async () => {
  // The test client speaks plain HTTP: with an https PUBLIC_URL, Secure cookies would never come back.
  t = await startTestApp({ PUBLIC_URL: "https://progress.kestrel.example", COOKIE_SECURE: "false" });
});
afterAll(async () => {
  await t.close();
});

const AREAS = ["Hall 2A", "HD-1", "Hall 2B", "Plant yard"];
const SYSTEMS: System[] = ["cooling", "power", "security", "fit-out"];

interface GenPost {
  audience: Audience;
  status: "published" | "draft" | "withdrawn";
  areas: string[];
  systems: System[];
  inWindow: boolean;
}
const postArb: fc.Arbitrary<GenPost> = fc.record({
  audience: fc.constantFrom<Audience>("public", "investor", "internal"),
  status: fc.constantFrom("published", "published", "draft", "withdrawn"),
  areas: fc.subarray(AREAS, { maxLength: 2 }),
  systems: fc.subarray(SYSTEMS, { maxLength: 2 }),
  inWindow: fc.boolean(),
});
const topicsArb = fc.option(fc.record({ areas: fc.subarray(AREAS), systems: fc.subarray(SYSTEMS) }), { nil: null });

describe("a digest holds only what its reader may see", () => {
  it("property: over random audiences, topics and posts, a prospect never gets investor or internal content, and nobody gets a post outside their topics", async () => {
    const p = await createProject(t);
    const project = { id: p.id, slug: p.slug, name: "Property campus", operatorName: "Kestrel Colocation", postalAddress: null, timeZone: "Europe/London" };
    const windowStart = new Date("2026-06-01T00:00:00Z");
    const windowEnd = new Date("2026-06-08T00:00:00Z");
    let round = 0;
    await fc.assert(
      fc.asyncProperty(fc.array(postArb, { minLength: 1, maxLength: 6 }), fc.constantFrom<"public" | "investor">("public", "investor"), topicsArb, async (posts, audience, topics) => {
        round += 1;
        await t.db("posts").where({ project_id: p.id }).delete();
        const titles = new Map<string, GenPost>();
        for (const [i, g] of posts.entries()) {
          const title = `Post ${round}-${i} ${randomBytes(3).toString("hex")}`;
          const [id] = await t.db("posts").insert({
            project_id: p.id,
            slug: `p-${round}-${i}-${randomBytes(2).toString("hex")}`,
            title,
            summary: `Summary of ${title}`,
            body: "{}",
            html: "",
            plain_text: "",
            audience: g.audience,
            status: g.status,
            author_name: "Test",
            published_at: g.status === "draft" ? null : g.inWindow ? new Date("2026-06-03T10:00:00Z") : new Date("2026-05-20T10:00:00Z"),
          });
          const tags = [...g.areas.map((value) => ({ post_id: id, kind: "area", value })), ...g.systems.map((value) => ({ post_id: id, kind: "system", value }))];
          if (tags.length) await t.db("post_tags").insert(tags);
          titles.set(title, g);
        }
        const doc = await t.plumbline.digests.assemble({ project, frequency: "weekly", audience, topics, windowStart, windowEnd, previous: null });
        const rendered = await renderDigest(doc);
        for (const [title, g] of titles) {
          const may = g.status === "published" && g.inWindow && (g.audience === "public" || (g.audience === "investor" && audience === "investor")) && topicsAllow(topics, { areas: g.areas, systems: g.systems });
          expect(rendered.html.includes(title), `${title} ${JSON.stringify(g)} for ${audience} ${JSON.stringify(topics)}`).toBe(may);
          expect(rendered.text.includes(title)).toBe(may);
        }
      }),
      { numRuns: 40 },
    );
  });

  it("an investor-only milestone's slip reaches investor subscribers and never a prospect", async () => {
    const as = await signInAll(t);
    const p = await createProject(t);
    const [phaseId] = await t.db("phases").insert({ project_id: p.id, name: "Security", sort_order: 1 });
    const [mid] = await t.db("milestones").insert({ project_id: p.id, phase_id: phaseId, name: "Lender's strongroom fitted", area: "Strongroom", system: "security", weight: 1, baseline_finish: "2027-03-01", forecast_finish: "2027-03-01", audience: "investor" });
    const version = (await t.db("milestones").where({ id: mid }).first("version")).version;
    await as.lead.agent.patch(`/api/milestones/${mid}`).set("X-CSRF-Token", as.lead.csrf).send({ version: Number(version), forecastFinish: "2027-03-15" }).expect(200);
    const mk = async (tag: string, audience: "public" | "investor") => {
      const email = `${tag}-${randomBytes(3).toString("hex")}@example.org`;
      const [id] = await t.db("subscribers").insert({ project_id: p.id, email, email_hash: hashAddress(email), name: tag, interest: audience === "investor" ? "investor" : "prospect", audience, frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date() });
      return { email, id: Number(id) };
    };
    const prospect = await mk("prospect", "public");
    const investor = await mk("investor", "investor");
    const before = await lastMailId(t);
    const run = await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * 86_400_000));
    expect(run.created).toBe(true);
    const res = { body: run };
    await t.plumbline.digestJobs.drain();
    const got = async (email: string) => t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", email).andWhere("m.id", ">", before).select("m.text");
    const inv = await got(investor.email);
    const dd = await t.db("digest_deliveries as d").leftJoin("digest_contents as c", "c.id", "d.content_id").where("d.run_id", res.body.id).select("d.status", "d.error", "c.audience", "c.empty", "c.text");
    expect(inv, JSON.stringify(dd)).toHaveLength(1);
    expect(inv[0]!.text).toMatch(/Lender's strongroom fitted: later by 14 days/);
    // The prospect's digest would hold nothing it may see: nothing is sent at all.
    expect(await got(prospect.email)).toHaveLength(0);
    // Two audiences, two renders; never one per subscriber.
    expect(await t.db("digest_contents").where({ run_id: res.body.id }).count({ n: "*" }).first()).toEqual({ n: 2 });
    const preview = await as.marketing.agent.get(`/api/digests/preview?subscriberId=${prospect.id}`).expect(200);
    expect(preview.body.html).not.toContain("strongroom");
    const invPreview = await as.marketing.agent.get(`/api/digests/preview?subscriberId=${investor.id}`).expect(200);
    expect(invPreview.body).toMatchObject({ subscriber: { id: investor.id, audience: "investor" } });
  });

  it("renders once per distinct content: forty subscribers in two topic groups are two renders", async () => {
    const as = await signInAll(t);
    const p = await createProject(t);
    const cover = await createPhoto(t, p.id);
    const post = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id));
    await as.lead.agent.post(`/api/posts/${post.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    const rows = Array.from({ length: 40 }, (_, i) => {
      const email = `bulk-${i}-${randomBytes(3).toString("hex")}@example.org`;
      return { project_id: p.id, email, email_hash: hashAddress(email), name: `Reader ${i}`, interest: "prospect", frequency: "weekly", topics: i % 2 ? JSON.stringify({ areas: ["Hall 2A"], systems: [] }) : null, topics_key: i % 2 ? "k-hall-2a" : "all", status: "confirmed", confirmed_at: new Date() };
    });
    await t.db("subscribers").insert(rows);
    const res = { body: await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * 86_400_000)) };
    await t.plumbline.digestJobs.drain();
    expect(await t.db("digest_contents").where({ run_id: res.body.id }).count({ n: "*" }).first()).toEqual({ n: 2 });
    const d = await t.db("digest_deliveries").where({ run_id: res.body.id }).select("status", "message_id");
    expect(d).toHaveLength(40);
    expect(d.every((x) => x.status === "sent")).toBe(true);
    expect(new Set(d.map((x) => x.message_id)).size).toBe(40);
  });

  it("as it happens: one e-mail per published post, only to those it may reach", async () => {
    const as = await signInAll(t);
    const p = await createProject(t);
    const email = `now-${randomBytes(3).toString("hex")}@example.org`;
    await t.db("subscribers").insert({ project_id: p.id, email, email_hash: hashAddress(email), name: "Now", interest: "neighbour", frequency: "immediate", topics_key: "all", status: "confirmed", confirmed_at: new Date() });
    const before = await lastMailId(t);
    const ids: number[] = [];
    for (const audience of ["public", "investor", "public"]) {
      const cover = await createPhoto(t, p.id);
      const r = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id, { audience, title: `Now ${audience} ${randomBytes(2).toString("hex")}` }));
      await as.lead.agent.post(`/api/posts/${r.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
      ids.push(r.body.id);
    }
    await t.plumbline.digestSchedule.tickImmediate();
    await t.plumbline.digestSchedule.tickImmediate();
    await t.plumbline.digestJobs.drain();
    const mails = await t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", email).andWhere("m.id", ">", before).select("m.subject");
    const titles = await t.db("posts").whereIn("id", ids).orderBy("id").select("title", "audience");
    expect(mails.map((m) => m.subject).sort()).toEqual(titles.filter((x) => x.audience === "public").map((x) => `Test campus ${p.slug}: ${x.title}`).sort());
    expect(await t.db("digest_runs").where({ project_id: p.id, frequency: "immediate" }).count({ n: "*" }).first()).toEqual({ n: 3 });
  });
});
