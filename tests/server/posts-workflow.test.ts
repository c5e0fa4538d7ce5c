import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { createMilestone, createPhoto, createProject, doc, image, milestoneBlock, postInput, signInAll, text, type Client } from "./posts-fixtures.ts";

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  t = await startTestApp();
  as = await signInAll(t);
});
afterAll(async () => {
  await t.close();
});

const act = (c: Client, id: number, action: string, body?: object) => {
  const req = c.agent.post(`/api/posts/${id}/${action}`).set("X-CSRF-Token", c.csrf);
  return body ? req.send(body) : req;
};
const statusOf = async (id: number) => (await t.db("posts").where({ id }).first("status")).status as string;

/** A post written by `by` in a fresh project with a cleared cover (so it passes every check). */
async function draft(by: Client, over: Record<string, unknown> = {}) {
  const p = await createProject(t);
  const cover = await createPhoto(t, p.id);
  const res = await by.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(cover.id, over));
  if (res.status !== 201) throw new Error(`post not created: ${JSON.stringify(res.body)}`);
  return { project: p, cover, id: res.body.id as number, slug: res.body.slug as string };
}

describe("the publishing workflow", () => {
  it("marketing submits, a lead approves and publishes, and withdraws: each answers { id, status }", async () => {
    const { id } = await draft(as.marketing);
    expect((await act(as.marketing, id, "submit")).body).toEqual({ id, status: "in_review", scheduledFor: null });
    expect((await act(as.lead, id, "approve")).body).toMatchObject({ id, status: "approved" });
    expect((await act(as.lead, id, "publish")).body).toMatchObject({ id, status: "published" });
    const row = await t.db("posts").where({ id }).first();
    expect(row.published_at).not.toBeNull();
    expect((await act(as.lead, id, "withdraw")).body).toMatchObject({ id, status: "withdrawn" });
    const history = await as.lead.agent.get(`/api/posts/${id}/history`).expect(200);
    expect(history.body.map((e: { action: string }) => e.action)).toEqual(["withdraw", "publish", "approve", "submit"]);
  });

  it.each([
    ["approve", "marketing"],
    ["publish", "marketing"],
    ["withdraw", "marketing"],
    ["return", "marketing"],
    ["submit", "investor"],
    ["approve", "investor"],
    ["publish", "investor"],
  ] as const)("refuses %s by %s with 403 and changes nothing", async (action, role) => {
    const { id } = await draft(as.lead);
    await act(as.lead, id, "submit").expect(200);
    const res = await act(as[role], id, action, action === "return" ? { comment: "Tighten the second paragraph." } : undefined);
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe("forbidden");
    expect(await statusOf(id)).toBe("in_review");
  });

  it("refuses a visitor with 401", async () => {
    const { id } = await draft(as.marketing);
    const visitor = await newClient(t);
    expect((await act(visitor, id, "submit")).status).toBe(401);
    expect(await statusOf(id)).toBe("draft");
  });

  it("a lead returns work with comments: back to draft, the comment kept and shown to staff", async () => {
    const { id } = await draft(as.marketing);
    await act(as.marketing, id, "submit").expect(200);
    const res = await act(as.lead, id, "return", { comment: "Say which hall the chillers serve." });
    expect(res.body).toMatchObject({ id, status: "draft" });
    const full = await as.marketing.agent.get(`/api/posts/${id}`).expect(200);
    expect(full.body.reviewComment).toBe("Say which hall the chillers serve.");
    const history = await as.marketing.agent.get(`/api/posts/${id}/history`).expect(200);
    expect(history.body[0]).toMatchObject({ action: "return", from: "in_review", to: "draft", comment: "Say which hall the chillers serve." });
  });

  it("refuses a return without a comment with 400", async () => {
    const { id } = await draft(as.marketing);
    await act(as.marketing, id, "submit").expect(200);
    expect((await act(as.lead, id, "return", {})).status).toBe(400);
    expect(await statusOf(id)).toBe("in_review");
  });

  it("a lead may publish their own draft without approval, but not someone else's (409)", async () => {
    const own = await draft(as.lead);
    expect((await act(as.lead, own.id, "publish")).body.status).toBe("published");
    const theirs = await draft(as.marketing);
    const res = await act(as.lead, theirs.id, "publish");
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("invalid_transition");
    expect(res.body.error.message).toMatch(/approve it first/);
    expect(await statusOf(theirs.id)).toBe("draft");
  });

  it("refuses steps from the wrong state with 409: approve a draft, submit a published post, withdraw a draft", async () => {
    const { id } = await draft(as.marketing);
    expect((await act(as.lead, id, "approve")).status).toBe(409);
    expect((await act(as.lead, id, "withdraw")).status).toBe(409);
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    await act(as.lead, id, "publish").expect(200);
    expect((await act(as.marketing, id, "submit")).status).toBe(409);
    expect(await statusOf(id)).toBe("published");
  });

  it("an admin may do every step", async () => {
    const { id } = await draft(as.marketing);
    await act(as.admin, id, "submit").expect(200);
    await act(as.admin, id, "approve").expect(200);
    await act(as.admin, id, "publish").expect(200);
    await act(as.admin, id, "withdraw").expect(200);
    expect(await statusOf(id)).toBe("withdrawn");
  });

  it("marketing's edit of an approved post sends it back to draft; a published post is edited by a lead only", async () => {
    const { id } = await draft(as.marketing);
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    const edited = await as.marketing.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.marketing.csrf).send({ summary: "Changed after approval." });
    expect(edited.body.status).toBe("draft");
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    await act(as.lead, id, "publish").expect(200);
    const refused = await as.marketing.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.marketing.csrf).send({ summary: "Sneaky." });
    expect(refused.status).toBe(403);
    const byLead = await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ summary: "Corrected by the lead." });
    expect(byLead.body).toMatchObject({ status: "published", summary: "Corrected by the lead." });
  });
});

describe("publishing checks (422 naming the problem; nothing changes)", () => {
  async function expectBlocked(id: number, code: string, pattern: RegExp) {
    const before = await t.db("posts").where({ id }).first();
    const res = await act(as.lead, id, "publish");
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe("publishing_blocked");
    const problem = res.body.error.problems.find((p: { code: string }) => p.code === code);
    expect(problem, JSON.stringify(res.body.error.problems)).toBeDefined();
    expect(problem.message).toMatch(pattern);
    expect(res.body.error.message).toMatch(pattern);
    const after = await t.db("posts").where({ id }).first();
    expect(after.status).toBe(before.status);
    expect(after.version).toBe(before.version);
    expect(await t.db("media_usages").where({ owner_type: "post", owner_id: id, published: 1 }).first()).toBeUndefined();
    return res.body.error.problems as Array<{ code: string; mediaId?: number; milestoneId?: number }>;
  }

  it("no cover", async () => {
    const p = await createProject(t);
    const res = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(null)).expect(201);
    await expectBlocked(res.body.id, "no_cover", /cover photo/);
  });

  it("an image without alt text, naming the image", async () => {
    const { id, project } = await draft(as.lead);
    const bare = await createPhoto(t, project.id, { altText: null, caption: "Generator set 2 on its skid" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(text("First."), image(bare.id)) }).expect(200);
    const problems = await expectBlocked(id, "missing_alt_text", new RegExp(`Image 1 in the text \\(photo #${bare.id}, “Generator set 2 on its skid”\\) has no alt text`));
    expect(problems.find((x) => x.code === "missing_alt_text")?.mediaId).toBe(bare.id);
  });

  it("an alt text given on the image itself satisfies the check", async () => {
    const { id, project } = await draft(as.lead);
    const bare = await createPhoto(t, project.id, { altText: null });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(bare.id, { alt: "Generator set on its skid" })) }).expect(200);
    await act(as.lead, id, "publish").expect(200);
    const page = await (await newClient(t)).agent.get(`/api/projects/${project.slug}/posts/${(await t.db("posts").where({ id }).first()).slug}`).expect(200);
    expect(page.body.html).toContain('alt="Generator set on its skid"');
  });

  it("an image not yet cleared by a lead", async () => {
    const { id, project } = await draft(as.lead);
    const raw = await createPhoto(t, project.id, { sensitivity: "unreviewed" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(raw.id)) }).expect(200);
    await expectBlocked(id, "not_cleared", new RegExp(`photo #${raw.id}.*has not been cleared`));
  });

  it("a restricted photo as the cover of investor content", async () => {
    const { id, project } = await draft(as.lead, { audience: "investor" });
    const secret = await createPhoto(t, project.id, { sensitivity: "restricted" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ coverMediaId: secret.id }).expect(200);
    await expectBlocked(id, "restricted", new RegExp(`The cover \\(photo #${secret.id}\\) is restricted and can never appear in investor content`));
  });

  it("a restricted photo may appear in internal content", async () => {
    const { id, project } = await draft(as.lead, { audience: "internal" });
    const secret = await createPhoto(t, project.id, { sensitivity: "restricted" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(secret.id)) }).expect(200);
    expect((await act(as.lead, id, "publish")).body.status).toBe("published");
  });

  it("a photo still being processed", async () => {
    const { id, project } = await draft(as.lead);
    const busy = await createPhoto(t, project.id, { status: "processing" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(busy.id)) }).expect(200);
    await expectBlocked(id, "media_not_ready", /still being processed/);
  });

  it("a linked milestone that is not visible to the post's audience, by name", async () => {
    const { id, project } = await draft(as.lead);
    const m = await createMilestone(t, project.slug, { audience: "investor", name: "Investor-only funding gate" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id] }).expect(200);
    const problems = await expectBlocked(id, "milestone_not_visible", /“Investor-only funding gate” is not visible to the public audience/);
    expect(problems[0]?.milestoneId).toBe(m.id);
  });

  it("a milestone block of an internal milestone in a public post", async () => {
    const { id, project } = await draft(as.lead);
    const m = await createMilestone(t, project.slug, { audience: "internal", name: "Internal snag list closed" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(text("See:"), milestoneBlock(m.id)) }).expect(200);
    await expectBlocked(id, "milestone_not_visible", /Internal snag list closed/);
  });

  it("a linked milestone that has since been removed from the programme", async () => {
    const { id, project } = await draft(as.lead);
    const m = await createMilestone(t, project.slug);
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id] }).expect(200);
    // A linked milestone is on record: it cannot be deleted, only removed from the programme.
    expect((await as.lead.agent.delete(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf)).status).toBe(409);
    await as.lead.agent.post(`/api/milestones/${m.id}/remove`).set("X-CSRF-Token", as.lead.csrf).send({ reason: "Folded into the chiller package" }).expect(200);
    await expectBlocked(id, "milestone_missing", new RegExp(`#${m.id} no longer exists`));
  });

  it("a milestone from another project cannot be linked (422 naming the field)", async () => {
    const { id } = await draft(as.lead);
    const other = await createProject(t);
    const m = await createMilestone(t, other.slug);
    const res = await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id] });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.milestoneIds).toContain(`#${m.id}`);
  });

  it("staff see the problems on the post before they try", async () => {
    const p = await createProject(t);
    const res = await as.marketing.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.marketing.csrf).send(postInput(null)).expect(201);
    const full = await as.marketing.agent.get(`/api/posts/${res.body.id}`).expect(200);
    expect(full.body.problems.map((x: { code: string }) => x.code)).toEqual(["no_cover"]);
  });
});

describe("linked milestones: then and now", () => {
  it("captures status and dates at publication and shows today's beside them once they change", async () => {
    const { id, project, slug } = await draft(as.lead);
    const m = await createMilestone(t, project.slug, { name: "UPS modules commissioned (L4)", baselineFinish: "2027-02-01", forecastFinish: "2027-02-01", percentComplete: 50 });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id], body: doc(text("UPS update."), milestoneBlock(m.id)) }).expect(200);
    await act(as.lead, id, "publish").expect(200);

    const patched = await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: m.version, forecastFinish: "2027-04-30", percentComplete: 60 });
    expect(patched.status).toBe(200);

    const visitor = await newClient(t);
    const res = await visitor.agent.get(`/api/projects/${project.slug}/posts/${slug}`).expect(200);
    expect(res.body.milestones).toHaveLength(1);
    const linked = res.body.milestones[0];
    expect(linked).toMatchObject({ id: m.id, name: "UPS modules commissioned (L4)", changed: true });
    expect(linked.then).toMatchObject({ forecastFinish: "2027-02-01", baselineFinish: "2027-02-01", percentComplete: 50, status: "on_programme" });
    expect(linked.now).toMatchObject({ forecastFinish: "2027-04-30", percentComplete: 60 });
    expect(linked.now.status).not.toBe("on_programme");
    // The published text keeps what was true then.
    expect(res.body.html).toContain("UPS modules commissioned (L4)");
    expect(res.body.html).toContain("forecast 1 February 2027");
    expect(res.body.html).not.toContain("30 April 2027");
    expect(res.body.html).toMatch(/○ On programme/);
  });

  it("shows now as null to a caller who may no longer see the milestone", async () => {
    const { id, project, slug } = await draft(as.lead);
    const m = await createMilestone(t, project.slug, { name: "Hall 2A practical completion" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id] }).expect(200);
    await act(as.lead, id, "publish").expect(200);
    await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: m.version, audience: "internal" }).expect(200);
    const res = await (await newClient(t)).agent.get(`/api/projects/${project.slug}/posts/${slug}`).expect(200);
    expect(res.body.milestones[0]).toMatchObject({ id: m.id, name: "Hall 2A practical completion", now: null, changed: false });
    expect(res.body.milestones[0].then).not.toBeNull();
  });
});

describe("scheduled publication", () => {
  it("takes a wall-clock time in the project's time zone and publishes when the scheduler runs after it", async () => {
    const { id, project, slug } = await draft(as.lead);
    // Source: the IANA time zone database, Europe/London — British Summer Time (UTC+1) runs from
    // the last Sunday of March to the last Sunday of October, so 09:00 on 1 July 2030 is 08:00 UTC.
    const res = await act(as.lead, id, "schedule", { at: { date: "2030-07-01", time: "09:00" } });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ id, status: "scheduled", scheduledFor: "2030-07-01T08:00:00.000Z" });

    const visitor = await newClient(t);
    await visitor.agent.get(`/api/projects/${project.slug}/posts/${slug}`).expect(404);

    const early = await t.plumbline.posts.publishDue(new Date("2030-07-01T07:59:59Z"));
    expect(early.published).not.toContain(id);
    expect(await statusOf(id)).toBe("scheduled");

    const due = await t.plumbline.posts.publishDue(new Date("2030-07-01T08:00:30Z"));
    expect(due.published).toContain(id);
    const row = await t.db("posts").where({ id }).first();
    expect(row.status).toBe("published");
    expect(new Date(row.published_at).toISOString()).toBe("2030-07-01T08:00:00.000Z");
    await visitor.agent.get(`/api/projects/${project.slug}/posts/${slug}`).expect(200);
    expect(await t.db("media_usages").where({ owner_type: "post", owner_id: id, published: 1 }).first()).toBeDefined();
  });

  it("in winter the project's wall clock is UTC (Greenwich Mean Time); a New York project is five hours behind", async () => {
    // Source: the IANA time zone database — Europe/London is UTC+0 outside summer time;
    // America/New_York is UTC−5 (EST) in December.
    const london = await draft(as.lead);
    expect((await act(as.lead, london.id, "schedule", { at: { date: "2030-12-02", time: "09:00" } })).body.scheduledFor).toBe("2030-12-02T09:00:00.000Z");
    const p = await createProject(t, { timeZone: "America/New_York" });
    const cover = await createPhoto(t, p.id);
    const res = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id)).expect(201);
    expect((await act(as.lead, res.body.id, "schedule", { at: { date: "2030-12-02", time: "09:00" } })).body.scheduledFor).toBe("2030-12-02T14:00:00.000Z");
  });

  it("publishes a due post once when several schedulers run at the same moment", async () => {
    const { id } = await draft(as.lead);
    await act(as.lead, id, "schedule", { at: "2031-01-05T10:00:00+00:00" }).expect(200);
    const at = new Date("2031-01-05T10:05:00Z");
    const runs = await Promise.all([t.plumbline.posts.publishDue(at), t.plumbline.posts.publishDue(at), t.plumbline.posts.publishDue(at)]);
    expect(runs.flatMap((r) => r.published).filter((x) => x === id)).toHaveLength(1);
    expect(await t.db("publishing_events").where({ owner_type: "post", owner_id: id, action: "publish" }).count({ n: "*" }).first()).toEqual({ n: 1 });
  });

  it("runs the checks again at publication: a post that now fails goes back to approved with the reason", async () => {
    const { id, cover } = await draft(as.lead);
    await act(as.lead, id, "schedule", { at: "2032-03-01T09:00:00Z" }).expect(200);
    await t.db("media_items").where({ id: cover.id }).update({ sensitivity: "restricted" });
    const run = await t.plumbline.posts.publishDue(new Date("2032-03-01T09:01:00Z"));
    expect(run.heldBack).toContain(id);
    const row = await t.db("posts").where({ id }).first();
    expect(row.status).toBe("approved");
    expect(row.scheduled_for).toBeNull();
    expect(row.review_comment).toMatch(new RegExp(`Not published at the scheduled time: The cover \\(photo #${cover.id}\\) is restricted`));
    const event = await t.db("publishing_events").where({ owner_type: "post", owner_id: id, action: "schedule_failed" }).first();
    expect(event.comment).toMatch(/restricted/);
  });

  it("refuses a time in the past with 422 and a time that does not parse with 400", async () => {
    const { id } = await draft(as.lead);
    const past = await act(as.lead, id, "schedule", { at: "2020-01-01T09:00:00Z" });
    expect(past.status).toBe(422);
    expect(past.body.error.fields.at).toMatch(/future/);
    expect((await act(as.lead, id, "schedule", { at: { date: "2030-02-30", time: "09:00" } })).status).toBe(400);
    expect((await act(as.lead, id, "schedule", { at: "next tuesday" })).status).toBe(400);
    expect(await statusOf(id)).toBe("draft");
  });

  it("withdrawing a scheduled post cancels the schedule (back to approved)", async () => {
    const { id } = await draft(as.lead);
    await act(as.lead, id, "schedule", { at: "2033-01-01T09:00:00Z" }).expect(200);
    expect((await act(as.lead, id, "withdraw")).body).toMatchObject({ status: "approved", scheduledFor: null });
    expect((await t.plumbline.posts.publishDue(new Date("2033-01-02T00:00:00Z"))).published).not.toContain(id);
  });

  it("a lead cannot schedule a post that marketing wrote and nobody approved (409)", async () => {
    const { id } = await draft(as.marketing);
    expect((await act(as.lead, id, "schedule", { at: "2034-01-01T09:00:00Z" })).status).toBe(409);
    const other = await createUser(t, "lead");
    const c = await signIn(t, other.email, other.password);
    expect((await act(c, id, "schedule", { at: "2034-01-01T09:00:00Z" })).status).toBe(409);
  });
});
