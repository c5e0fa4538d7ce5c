import { beforeAll, describe, expect, it } from "vitest";
import { createUser, newClient, signIn, type TestApp } from "../helpers/app.ts";
import { createMilestone, createPhoto, createProject, doc, image, milestoneBlock, postInput, text, type Client, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

/**
 * The publishing workflow, the same for every kind of published content (server/publishing):
 * each case of the first part runs for updates and for photo stories alike. The checks and
 * content that belong to one kind (an update's cover and milestones, a story's items and
 * then-and-now pairs) follow in their own parts.
 */

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

type Path = "posts" | "stories";

const actOn = (path: Path, c: Client, id: number, action: string, body?: object) => {
  const req = c.agent.post(`/api/${path}/${id}/${action}`).set("X-CSRF-Token", c.csrf);
  return body ? req.send(body) : req;
};

/** One kind of published content as these tests write and read it. */
interface Kind {
  path: Path;
  /** The owner type of its photo usages and history rows. */
  owner: "post" | "story";
  /** The scheduler's pass of this kind. */
  publishDue(at: Date): Promise<{ published: number[]; heldBack: number[] }>;
  /**
   * A new item written by `by` in a fresh project (or `projectTimeZone`'s), with one cleared photo
   * with alt text (an update's cover, a story's one item), so it passes every check.
   */
  draft(by: Client, opts?: { timeZone?: string }): Promise<{ project: { id: number; slug: string }; photo: { id: number }; id: number; slug: string }>;
  /** A change of its own text for PATCH, and the field it shows in the answer. */
  edit(words: string): Record<string, string>;
  /** The answer of a step that neither sets nor cancels a schedule (updates name `scheduledFor: null`; stories leave it out). */
  answer(id: number, status: string): object;
  /** How a publishing problem names its photo. */
  photoName(id: number): string;
}

const KINDS: Record<"update" | "photo story", Kind> = {
  update: {
    path: "posts",
    owner: "post",
    publishDue: (at) => t.plumbline.posts.publishDue(at),
    async draft(by, opts = {}) {
      const project = await createProject(t, opts);
      const photo = await createPhoto(t, project.id);
      const res = await by.agent.post(`/api/projects/${project.slug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(photo.id));
      if (res.status !== 201) throw new Error(`post not created: ${JSON.stringify(res.body)}`);
      return { project, photo, id: res.body.id as number, slug: res.body.slug as string };
    },
    edit: (words) => ({ summary: words }),
    answer: (id, status) => ({ id, status, scheduledFor: null }),
    photoName: (id) => `The cover \\(photo #${id}\\)`,
  },
  "photo story": {
    path: "stories",
    owner: "story",
    publishDue: (at) => t.plumbline.stories.publishDue(at),
    async draft(by, opts = {}) {
      const project = await createProject(t, opts);
      const photo = await createPhoto(t, project.id, { caption: null });
      const res = await by.agent
        .post(`/api/projects/${project.slug}/stories`)
        .set("X-CSRF-Token", by.csrf)
        .send({ title: "Generator hall, then and now", intro: "The generators are set.", audience: "public", items: [{ kind: "photo", mediaId: photo.id }] });
      if (res.status !== 201) throw new Error(`story not created: ${JSON.stringify(res.body)}`);
      return { project, photo, id: res.body.id as number, slug: res.body.slug as string };
    },
    edit: (words) => ({ intro: words }),
    answer: (id, status) => ({ id, status }),
    photoName: (id) => `Item 1 \\(photo #${id}\\)`,
  },
};

describe.each(Object.entries(KINDS))("the publishing workflow of a %s", (_name, k) => {
  const act = (c: Client, id: number, action: string, body?: object) => actOn(k.path, c, id, action, body);
  const statusOf = async (id: number) => (await t.db(k.path).where({ id }).first("status")).status as string;
  const draft = (by: Client, opts?: { timeZone?: string }) => k.draft(by, opts);

  it("marketing submits, a lead approves and publishes, and withdraws: each answers { id, status }", async () => {
    const { id } = await draft(as.marketing);
    expect((await act(as.marketing, id, "submit")).body).toEqual(k.answer(id, "in_review"));
    expect((await act(as.lead, id, "approve")).body).toMatchObject({ id, status: "approved" });
    expect((await act(as.lead, id, "publish")).body).toEqual(k.answer(id, "published"));
    const row = await t.db(k.path).where({ id }).first();
    expect(row.published_at).not.toBeNull();
    expect((await act(as.lead, id, "withdraw")).body).toMatchObject({ id, status: "withdrawn" });
    const history = await as.lead.agent.get(`/api/${k.path}/${id}/history`).expect(200);
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
    const full = await as.marketing.agent.get(`/api/${k.path}/${id}`).expect(200);
    expect(full.body.reviewComment).toBe("Say which hall the chillers serve.");
    const history = await as.marketing.agent.get(`/api/${k.path}/${id}/history`).expect(200);
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

  it("refuses steps from the wrong state with 409: approve a draft, submit a published one, withdraw a draft", async () => {
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

  it("marketing's edit of approved work sends it back to draft; published work is edited by a lead only", async () => {
    const { id } = await draft(as.marketing);
    const patch = (c: Client, words: string) => c.agent.patch(`/api/${k.path}/${id}`).set("X-CSRF-Token", c.csrf).send(k.edit(words));
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    const edited = await patch(as.marketing, "Changed after approval.");
    expect(edited.body.status).toBe("draft");
    const history = await as.lead.agent.get(`/api/${k.path}/${id}/history`).expect(200);
    expect(history.body[0]).toMatchObject({ action: "edited", from: "approved", to: "draft" });
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    await act(as.lead, id, "publish").expect(200);
    const refused = await patch(as.marketing, "Sneaky.");
    expect(refused.status).toBe(403);
    const byLead = await patch(as.lead, "Corrected by the lead.");
    expect(byLead.body).toMatchObject({ status: "published", ...k.edit("Corrected by the lead.") });
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
      await visitor.agent.get(`/api/projects/${project.slug}/${k.path}/${slug}`).expect(404);

      const early = await k.publishDue(new Date("2030-07-01T07:59:59Z"));
      expect(early.published).not.toContain(id);
      expect(await statusOf(id)).toBe("scheduled");

      const due = await k.publishDue(new Date("2030-07-01T08:00:30Z"));
      expect(due.published).toContain(id);
      const row = await t.db(k.path).where({ id }).first();
      expect(row.status).toBe("published");
      expect(new Date(row.published_at).toISOString()).toBe("2030-07-01T08:00:00.000Z");
      await visitor.agent.get(`/api/projects/${project.slug}/${k.path}/${slug}`).expect(200);
      expect(await t.db("media_usages").where({ owner_type: k.owner, owner_id: id, published: 1 }).first()).toBeDefined();
    });

    it("in winter the project's wall clock is UTC (Greenwich Mean Time); a New York project is five hours behind", async () => {
      // Source: the IANA time zone database — Europe/London is UTC+0 outside summer time;
      // America/New_York is UTC−5 (EST) in December.
      const london = await draft(as.lead);
      expect((await act(as.lead, london.id, "schedule", { at: { date: "2030-12-02", time: "09:00" } })).body.scheduledFor).toBe("2030-12-02T09:00:00.000Z");
      const newYork = await draft(as.lead, { timeZone: "America/New_York" });
      expect((await act(as.lead, newYork.id, "schedule", { at: { date: "2030-12-02", time: "09:00" } })).body.scheduledFor).toBe("2030-12-02T14:00:00.000Z");
    });

    it("publishes a due item once when several schedulers run at the same moment", async () => {
      const { id } = await draft(as.lead);
      await act(as.lead, id, "schedule", { at: "2031-01-05T10:00:00+00:00" }).expect(200);
      const at = new Date("2031-01-05T10:05:00Z");
      const runs = await Promise.all([k.publishDue(at), k.publishDue(at), k.publishDue(at)]);
      expect(runs.flatMap((r) => r.published).filter((x) => x === id)).toHaveLength(1);
      expect(await t.db("publishing_events").where({ owner_type: k.owner, owner_id: id, action: "publish" }).count({ n: "*" }).first()).toEqual({ n: 1 });
    });

    it("runs the checks again at publication: an item that now fails goes back to approved with the reason", async () => {
      const { id, photo } = await draft(as.lead);
      await act(as.lead, id, "schedule", { at: "2032-03-01T09:00:00Z" }).expect(200);
      await t.db("media_items").where({ id: photo.id }).update({ sensitivity: "restricted" });
      const run = await k.publishDue(new Date("2032-03-01T09:01:00Z"));
      expect(run.heldBack).toContain(id);
      const row = await t.db(k.path).where({ id }).first();
      expect(row.status).toBe("approved");
      expect(row.scheduled_for).toBeNull();
      expect(row.review_comment).toMatch(new RegExp(`Not published at the scheduled time: ${k.photoName(photo.id)} is restricted`));
      const event = await t.db("publishing_events").where({ owner_type: k.owner, owner_id: id, action: "schedule_failed" }).first();
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

    it("withdrawing a scheduled item cancels the schedule (back to approved)", async () => {
      const { id } = await draft(as.lead);
      await act(as.lead, id, "schedule", { at: "2033-01-01T09:00:00Z" }).expect(200);
      expect((await act(as.lead, id, "withdraw")).body).toMatchObject({ status: "approved", scheduledFor: null });
      expect((await k.publishDue(new Date("2033-01-02T00:00:00Z"))).published).not.toContain(id);
    });

    it("a lead cannot schedule work that marketing wrote and nobody approved (409)", async () => {
      const { id } = await draft(as.marketing);
      expect((await act(as.lead, id, "schedule", { at: "2034-01-01T09:00:00Z" })).status).toBe(409);
      const other = await createUser(t, "lead");
      const c = await signIn(t, other.email, other.password);
      expect((await act(c, id, "schedule", { at: "2034-01-01T09:00:00Z" })).status).toBe(409);
    });
  });
});

/** An update written by `by` in a fresh project with a cleared cover (so it passes every check). */
async function draftPost(by: Client, over: Record<string, unknown> = {}) {
  const p = await createProject(t);
  const cover = await createPhoto(t, p.id);
  const res = await by.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(cover.id, over));
  if (res.status !== 201) throw new Error(`post not created: ${JSON.stringify(res.body)}`);
  return { project: p, cover, id: res.body.id as number, slug: res.body.slug as string };
}

describe("updates: publishing checks (422 naming the problem; nothing changes)", () => {
  async function expectBlocked(id: number, code: string, pattern: RegExp) {
    const before = await t.db("posts").where({ id }).first();
    const res = await actOn("posts", as.lead, id, "publish");
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
    const { id, project } = await draftPost(as.lead);
    const bare = await createPhoto(t, project.id, { altText: null, caption: "Generator set 2 on its skid" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(text("First."), image(bare.id)) }).expect(200);
    const problems = await expectBlocked(id, "missing_alt_text", new RegExp(`Image 1 in the text \\(photo #${bare.id}, “Generator set 2 on its skid”\\) has no alt text`));
    expect(problems.find((x) => x.code === "missing_alt_text")?.mediaId).toBe(bare.id);
  });

  it("an alt text given on the image itself satisfies the check", async () => {
    const { id, project } = await draftPost(as.lead);
    const bare = await createPhoto(t, project.id, { altText: null });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(bare.id, { alt: "Generator set on its skid" })) }).expect(200);
    await actOn("posts", as.lead, id, "publish").expect(200);
    const page = await (await newClient(t)).agent.get(`/api/projects/${project.slug}/posts/${(await t.db("posts").where({ id }).first()).slug}`).expect(200);
    expect(page.body.html).toContain('alt="Generator set on its skid"');
  });

  it("an image not yet cleared by a lead", async () => {
    const { id, project } = await draftPost(as.lead);
    const raw = await createPhoto(t, project.id, { sensitivity: "unreviewed" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(raw.id)) }).expect(200);
    await expectBlocked(id, "not_cleared", new RegExp(`photo #${raw.id}.*has not been cleared`));
  });

  it("a restricted photo as the cover of investor content", async () => {
    const { id, project } = await draftPost(as.lead, { audience: "investor" });
    const secret = await createPhoto(t, project.id, { sensitivity: "restricted" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ coverMediaId: secret.id }).expect(200);
    await expectBlocked(id, "restricted", new RegExp(`The cover \\(photo #${secret.id}\\) is restricted and can never appear in investor content`));
  });

  it("a restricted photo may appear in internal content", async () => {
    const { id, project } = await draftPost(as.lead, { audience: "internal" });
    const secret = await createPhoto(t, project.id, { sensitivity: "restricted" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(secret.id)) }).expect(200);
    expect((await actOn("posts", as.lead, id, "publish")).body.status).toBe("published");
  });

  it("a photo still being processed", async () => {
    const { id, project } = await draftPost(as.lead);
    const busy = await createPhoto(t, project.id, { status: "processing" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(image(busy.id)) }).expect(200);
    await expectBlocked(id, "media_not_ready", /still being processed/);
  });

  it("a linked milestone that is not visible to the post's audience, by name", async () => {
    const { id, project } = await draftPost(as.lead);
    const m = await createMilestone(t, project.slug, { audience: "investor", name: "Investor-only funding gate" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id] }).expect(200);
    const problems = await expectBlocked(id, "milestone_not_visible", /“Investor-only funding gate” is not visible to the public audience/);
    expect(problems[0]?.milestoneId).toBe(m.id);
  });

  it("a milestone block of an internal milestone in a public post", async () => {
    const { id, project } = await draftPost(as.lead);
    const m = await createMilestone(t, project.slug, { audience: "internal", name: "Internal snag list closed" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ body: doc(text("See:"), milestoneBlock(m.id)) }).expect(200);
    await expectBlocked(id, "milestone_not_visible", /Internal snag list closed/);
  });

  it("a linked milestone that has since been removed from the programme", async () => {
    const { id, project } = await draftPost(as.lead);
    const m = await createMilestone(t, project.slug);
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id] }).expect(200);
    // A linked milestone is on record: it cannot be deleted, only removed from the programme.
    expect((await as.lead.agent.delete(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf)).status).toBe(409);
    await as.lead.agent.post(`/api/milestones/${m.id}/remove`).set("X-CSRF-Token", as.lead.csrf).send({ reason: "Folded into the chiller package" }).expect(200);
    await expectBlocked(id, "milestone_missing", new RegExp(`#${m.id} no longer exists`));
  });

  it("a milestone from another project cannot be linked (422 naming the field)", async () => {
    const { id } = await draftPost(as.lead);
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

describe("updates: linked milestones, then and now", () => {
  it("captures status and dates at publication and shows today's beside them once they change", async () => {
    const { id, project, slug } = await draftPost(as.lead);
    const m = await createMilestone(t, project.slug, { name: "UPS modules commissioned (L4)", baselineFinish: "2027-02-01", forecastFinish: "2027-02-01", percentComplete: 50 });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id], body: doc(text("UPS update."), milestoneBlock(m.id)) }).expect(200);
    await actOn("posts", as.lead, id, "publish").expect(200);

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
    const { id, project, slug } = await draftPost(as.lead);
    const m = await createMilestone(t, project.slug, { name: "Hall 2A practical completion" });
    await as.lead.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.lead.csrf).send({ milestoneIds: [m.id] }).expect(200);
    await actOn("posts", as.lead, id, "publish").expect(200);
    await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: m.version, audience: "internal" }).expect(200);
    const res = await (await newClient(t)).agent.get(`/api/projects/${project.slug}/posts/${slug}`).expect(200);
    expect(res.body.milestones[0]).toMatchObject({ id: m.id, name: "Hall 2A practical completion", now: null, changed: false });
    expect(res.body.milestones[0].then).not.toBeNull();
  });
});

/** A project with photos of Hall 2A taken months apart, and a story of them written by marketing. */
async function story(over: Record<string, unknown> = {}) {
  const p = await createProject(t);
  const march = await createPhoto(t, p.id, { takenAt: "2026-03-02T10:15:00", caption: "Hall 2A slab poured" });
  const july = await createPhoto(t, p.id, { takenAt: "2026-07-20T14:00:00", caption: "Hall 2A fitted out" });
  const yard = await createPhoto(t, p.id, { caption: "Plant yard" });
  const items = [
    { kind: "pair", area: "Hall 2A", beforeMediaId: march.id, afterMediaId: july.id, caption: "From slab to fit-out" },
    { kind: "photo", mediaId: yard.id, caption: "The plant yard" },
  ];
  const res = await as.marketing.agent
    .post(`/api/projects/${p.slug}/stories`)
    .set("X-CSRF-Token", as.marketing.csrf)
    .send({ title: "Hall 2A, then and now", intro: "Five months of building.", audience: "public", items, ...over });
  return { project: p, res, photos: { march, july, yard } };
}

describe("photo stories: their items and checks", () => {
  it("marketing writes a story, a lead approves and publishes it; visitors read its items in order with their pictures", async () => {
    const { project, res, photos } = await story();
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ slug: "hall-2a-then-and-now", status: "draft" });
    const id = res.body.id as number;
    await actOn("stories", as.marketing, id, "submit").expect(200);
    expect((await actOn("stories", as.marketing, id, "approve")).status).toBe(403);
    await actOn("stories", as.lead, id, "approve").expect(200);
    expect((await actOn("stories", as.lead, id, "publish")).body).toEqual({ id, status: "published" });

    const visitor = await newClient(t);
    const list = await visitor.agent.get(`/api/projects/${project.slug}/stories`).expect(200);
    expect(list.body).toHaveLength(1);
    expect(list.body[0]).toMatchObject({ title: "Hall 2A, then and now", itemCount: 2 });
    expect(list.body[0].cover.id).toBe(photos.july.id);
    const page = await visitor.agent.get(`/api/projects/${project.slug}/stories/hall-2a-then-and-now`).expect(200);
    expect(page.body.items.map((i: { kind: string }) => i.kind)).toEqual(["pair", "photo"]);
    expect(page.body.items[0]).toMatchObject({ area: "Hall 2A", caption: "From slab to fit-out" });
    expect(page.body.items[0].before.takenAt).toBe("2026-03-02T10:15:00");
    expect(page.body.items[0].after.takenAt).toBe("2026-07-20T14:00:00");
    expect(page.body.items[0].before.sources.avif.length).toBeGreaterThan(0);
    expect(page.body.version).toBeUndefined();
    for (const url of photos.march.urls.slice(0, 2)) await visitor.agent.get(url).expect(200);
  });

  it("reorders and replaces items with PATCH (order = array order)", async () => {
    const { res, photos } = await story();
    const id = res.body.id as number;
    const patched = await as.marketing.agent
      .patch(`/api/stories/${id}`)
      .set("X-CSRF-Token", as.marketing.csrf)
      .send({ items: [{ kind: "photo", mediaId: photos.yard.id, caption: "Yard first" }, { kind: "photo", mediaId: photos.march.id }] })
      .expect(200);
    expect(patched.body.items.map((i: { mediaId: number }) => i.mediaId)).toEqual([photos.yard.id, photos.march.id]);
    expect(patched.body.items[1].caption).toBe("");
  });

  it.each([
    ["the same capture date", { takenAt: "2026-05-01T08:00:00" }, { takenAt: "2026-05-01T17:30:00" }, /both photos were taken on 2026-05-01/],
    ["a photo without a capture time", { takenAt: null }, { takenAt: "2026-05-01T17:30:00" }, /carries no capture time/],
    ["the then photo later than the now photo", { takenAt: "2026-09-01T08:00:00" }, { takenAt: "2026-05-01T08:00:00" }, /later than the “now” photo/],
  ])("refuses to publish a then-and-now pair with %s (422)", async (_label, before, after, pattern) => {
    const p = await createProject(t);
    const a = await createPhoto(t, p.id, before);
    const b = await createPhoto(t, p.id, after);
    const created = await as.lead.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.lead.csrf)
      .send({ title: "Pair", audience: "public", items: [{ kind: "pair", area: "Plant yard", beforeMediaId: a.id, afterMediaId: b.id }] })
      .expect(201);
    const res = await actOn("stories", as.lead, created.body.id, "publish");
    expect(res.status).toBe(422);
    expect(res.body.error.problems.map((x: { code: string }) => x.code)).toEqual(["pair_dates"]);
    expect(res.body.error.message).toMatch(pattern);
    expect((await t.db("stories").where({ id: created.body.id }).first()).status).toBe("draft");
  });

  it("refuses a pair of one photo with itself (400) and a photo from another project (422)", async () => {
    const p = await createProject(t);
    const other = await createProject(t);
    const a = await createPhoto(t, p.id);
    const foreign = await createPhoto(t, other.id);
    const same = await as.marketing.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.marketing.csrf)
      .send({ title: "Same", audience: "public", items: [{ kind: "pair", area: "Hall 2A", beforeMediaId: a.id, afterMediaId: a.id }] });
    expect(same.status).toBe(400);
    expect(same.body.error.fields["items.0.afterMediaId"]).toMatch(/different photo/);
    const cross = await as.marketing.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.marketing.csrf)
      .send({ title: "Cross", audience: "public", items: [{ kind: "photo", mediaId: foreign.id }] });
    expect(cross.status).toBe(422);
    expect(cross.body.error.fields.items).toContain(`#${foreign.id}`);
    expect(await t.db("stories").where({ project_id: p.id }).first()).toBeUndefined();
  });

  it("runs the photo checks: a restricted photo in public content, naming the item", async () => {
    const p = await createProject(t);
    const secret = await createPhoto(t, p.id, { sensitivity: "restricted" });
    const created = await as.lead.agent
      .post(`/api/projects/${p.slug}/stories`)
      .set("X-CSRF-Token", as.lead.csrf)
      .send({ title: "Doors", audience: "public", items: [{ kind: "photo", mediaId: secret.id, caption: "Access control" }] })
      .expect(201);
    const res = await actOn("stories", as.lead, created.body.id, "publish");
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(new RegExp(`Item 1 \\(photo #${secret.id}\\) is restricted`));
  });

  it("refuses to publish a story with no items", async () => {
    const p = await createProject(t);
    const created = await as.lead.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", as.lead.csrf).send({ title: "Empty", audience: "public" }).expect(201);
    const res = await actOn("stories", as.lead, created.body.id, "publish");
    expect(res.status).toBe(422);
    expect(res.body.error.problems[0].code).toBe("no_items");
  });

  it("keeps investor stories from visitors, and withdrawing hides a story again", async () => {
    const { project, res } = await story({ audience: "investor" });
    const id = res.body.id as number;
    await actOn("stories", as.marketing, id, "submit").expect(200);
    await actOn("stories", as.lead, id, "approve").expect(200);
    await actOn("stories", as.lead, id, "publish").expect(200);
    const visitor = await newClient(t);
    expect((await visitor.agent.get(`/api/projects/${project.slug}/stories`).expect(200)).body).toEqual([]);
    await visitor.agent.get(`/api/projects/${project.slug}/stories/${res.body.slug}`).expect(404);
    await as.investor.agent.get(`/api/projects/${project.slug}/stories/${res.body.slug}`).expect(200);
    await actOn("stories", as.lead, id, "withdraw").expect(200);
    await as.investor.agent.get(`/api/projects/${project.slug}/stories/${res.body.slug}`).expect(404);
  });

  it("refuses writing to investors (403) and visitors (401)", async () => {
    const p = await createProject(t);
    expect((await as.investor.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", as.investor.csrf).send({ title: "x", audience: "public" })).status).toBe(403);
    const visitor = await newClient(t);
    expect((await visitor.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", visitor.csrf).send({ title: "x", audience: "public" })).status).toBe(401);
  });

  it("refuses an address another story holds with 409 naming the slug", async () => {
    const p = await createProject(t);
    const send = () => as.marketing.agent.post(`/api/projects/${p.slug}/stories`).set("X-CSRF-Token", as.marketing.csrf).send({ title: "Same", audience: "public", slug: "yard-story" });
    await send().expect(201);
    const res = await send();
    expect(res.status).toBe(409);
    expect(res.body.error.fields.slug).toBeDefined();
  });

  // Its photos' usages and its items are rewritten by every save: saves of different stories at
  // the same moment must not deadlock one another (a deadlock is a 500).
  it("6 stories created at once all answer 201, each with its photos recorded", async () => {
    const p = await createProject(t);
    const photos = await Promise.all(Array.from({ length: 6 }, () => createPhoto(t, p.id)));
    const res = await Promise.all(
      photos.map((ph, i) =>
        as.marketing.agent
          .post(`/api/projects/${p.slug}/stories`)
          .set("X-CSRF-Token", as.marketing.csrf)
          .send({ title: `Generator hall, visit ${i + 1}`, audience: "public", items: [{ kind: "photo", mediaId: ph.id }] }),
      ),
    );
    expect(res.map((r) => r.status)).toEqual(Array(6).fill(201));
    const ids = res.map((r) => r.body.id as number);
    const rows = await t.db("media_usages").where({ owner_type: "story" }).whereIn("owner_id", ids).select("owner_id", "media_id");
    expect(new Map(rows.map((r: { owner_id: number; media_id: number }) => [Number(r.owner_id), Number(r.media_id)]))).toEqual(new Map(ids.map((id, i) => [id, photos[i]!.id])));
    expect(rows).toHaveLength(6);
  });
});
