import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, signInAll, type Client } from "./posts-fixtures.ts";

let t: TestApp;
/** A second app on the same database: another process of a multi-process deployment. */
let other: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  [t, other] = await Promise.all([startTestApp(), startTestApp()]);
  as = await signInAll(t);
});
afterAll(async () => {
  await Promise.all([t?.close(), other?.close()]);
});

const act = (c: Client, id: number, action: string, body?: object) => {
  const req = c.agent.post(`/api/stories/${id}/${action}`).set("X-CSRF-Token", c.csrf);
  return body ? req.send(body) : req;
};
const rowOf = async (id: number) => t.db("stories").where({ id }).first();
const eventsOf = async (id: number) => t.db("publishing_events").where({ owner_type: "story", owner_id: id }).orderBy("id");

/** A story of one cleared photo, written by `by` in a fresh project (it passes every check). */
async function story(by: Client, opts: { timeZone?: string; audience?: string } = {}) {
  const project = await createProject(t, { timeZone: opts.timeZone });
  const photo = await createPhoto(t, project.id, { caption: "Generator sets on their plinths" });
  const res = await by.agent
    .post(`/api/projects/${project.slug}/stories`)
    .set("X-CSRF-Token", by.csrf)
    .send({ title: `Energy centre ${Math.random().toString(36).slice(2, 8)}`, intro: "The generators arrive.", audience: opts.audience ?? "public", items: [{ kind: "photo", mediaId: photo.id, caption: "Set 1 of 3" }] });
  if (res.status !== 201) throw new Error(`story not created: ${JSON.stringify(res.body)}`);
  return { project, photo, id: res.body.id as number, slug: res.body.slug as string };
}

describe("POST /api/stories/:id/schedule", () => {
  it("takes a wall-clock time in the project's time zone; the ticker publishes the story once the clock passes it", async () => {
    const { id, project, slug, photo } = await story(as.lead);
    // Source: the IANA time zone database, Europe/London — British Summer Time (UTC+1) runs from
    // the last Sunday of March to the last Sunday of October, so 09:00 on 1 July 2030 is 08:00 UTC.
    const res = await act(as.lead, id, "schedule", { at: { date: "2030-07-01", time: "09:00" } });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ id, status: "scheduled", scheduledFor: "2030-07-01T08:00:00.000Z" });
    expect((await as.lead.agent.get(`/api/stories/${id}`).expect(200)).body).toMatchObject({ status: "scheduled", scheduledFor: "2030-07-01T08:00:00.000Z" });

    const visitor = await newClient(t);
    await visitor.agent.get(`/api/projects/${project.slug}/stories/${slug}`).expect(404);
    await visitor.agent.get(photo.urls[0]!).expect(404);

    await t.plumbline.publishing.tick(new Date("2030-07-01T07:59:59Z"));
    expect((await rowOf(id)).status).toBe("scheduled");

    await t.plumbline.publishing.tick(new Date("2030-07-01T08:00:30Z"));
    const row = await rowOf(id);
    expect(row.status).toBe("published");
    expect(row.scheduled_for).toBeNull();
    expect(new Date(row.published_at).toISOString()).toBe("2030-07-01T08:00:00.000Z");
    const page = await visitor.agent.get(`/api/projects/${project.slug}/stories/${slug}`).expect(200);
    expect(page.body.items[0].caption).toBe("Set 1 of 3");
    await visitor.agent.get(photo.urls[0]!).expect(200);

    const history = await as.lead.agent.get(`/api/stories/${id}/history`).expect(200);
    expect(history.body.map((e: { action: string; by: string | null }) => [e.action, e.by])).toEqual([
      ["publish", "scheduler"],
      ["schedule", expect.any(String)],
    ]);
    expect(history.body[1].comment).toBe("for 2030-07-01T08:00:00.000Z");
  });

  it("in winter a New York project's 09:00 is 14:00 UTC", async () => {
    // Source: the IANA time zone database — America/New_York is UTC−5 (EST) in December.
    const { id } = await story(as.lead, { timeZone: "America/New_York" });
    expect((await act(as.lead, id, "schedule", { at: { date: "2030-12-02", time: "09:00" } })).body.scheduledFor).toBe("2030-12-02T14:00:00.000Z");
  });

  it("refuses a time in the past with 422 naming `at`, and a time that does not parse with 400; nothing is written", async () => {
    const { id } = await story(as.lead);
    const before = await rowOf(id);
    const past = await act(as.lead, id, "schedule", { at: "2020-01-01T09:00:00Z" });
    expect(past.status).toBe(422);
    expect(past.body).toEqual({ error: { code: "invalid_schedule", message: expect.stringMatching(/future/), fields: { at: "must be in the future" } } });
    const bad = await act(as.lead, id, "schedule", { at: { date: "2030-02-30", time: "09:00" } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe("validation");
    expect(Object.keys(bad.body.error.fields).join(" ")).toMatch(/^at/);
    expect((await act(as.lead, id, "schedule", { at: "next tuesday" })).status).toBe(400);
    expect((await act(as.lead, id, "schedule", {})).status).toBe(400);
    const after = await rowOf(id);
    expect(after).toMatchObject({ status: "draft", scheduled_for: null, version: before.version });
    expect(await eventsOf(id)).toEqual([]);
  });

  it("is for leads and admins: marketing gets 403, an investor 403, a visitor 401, and nothing changes", async () => {
    const { id } = await story(as.marketing);
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    const at = { at: "2031-02-01T09:00:00Z" };
    const refused = await act(as.marketing, id, "schedule", at);
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe("forbidden");
    expect((await act(as.investor, id, "schedule", at)).status).toBe(403);
    const visitor = await newClient(t);
    expect((await act(visitor, id, "schedule", at)).status).toBe(401);
    expect(await rowOf(id)).toMatchObject({ status: "approved", scheduled_for: null });
    expect((await eventsOf(id)).map((e) => e.action)).toEqual(["submit", "approve"]);
  });

  it("runs the publishing checks when scheduling: a restricted photo refuses it with 422 and the story stays as it was", async () => {
    const { id, photo } = await story(as.lead);
    await t.db("media_items").where({ id: photo.id }).update({ sensitivity: "restricted" });
    const res = await act(as.lead, id, "schedule", { at: "2031-03-01T09:00:00Z" });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe("publishing_blocked");
    expect(res.body.error.problems.map((p: { code: string }) => p.code)).toEqual(["restricted"]);
    expect(await rowOf(id)).toMatchObject({ status: "draft", scheduled_for: null });
  });

  it("runs the checks again at the due time: a story that now fails goes back to approved with the reason recorded", async () => {
    const { id, photo } = await story(as.lead);
    await act(as.lead, id, "schedule", { at: "2032-03-01T09:00:00Z" }).expect(200);
    await t.db("media_items").where({ id: photo.id }).update({ sensitivity: "restricted" });
    const run = await t.plumbline.stories.publishDue(new Date("2032-03-01T09:01:00Z"));
    expect(run.heldBack).toContain(id);
    expect(run.published).not.toContain(id);
    const row = await rowOf(id);
    expect(row.status).toBe("approved");
    expect(row.scheduled_for).toBeNull();
    expect(row.review_comment).toMatch(new RegExp(`^Not published at the scheduled time: Item 1 \\(photo #${photo.id}.*\\) is restricted`));
    const event = (await eventsOf(id)).find((e) => e.action === "schedule_failed");
    expect(event).toMatchObject({ from_status: "scheduled", to_status: "approved", actor_id: null, actor_name: null });
    expect(event.comment).toBe(row.review_comment);
    const history = await as.lead.agent.get(`/api/stories/${id}/history`).expect(200);
    expect(history.body[0]).toMatchObject({ action: "schedule_failed", by: null, comment: row.review_comment });
  });

  it("two processes ticking at the same moment publish each due story once", async () => {
    const due = [await story(as.lead), await story(as.lead), await story(as.lead)];
    for (const s of due) await act(as.lead, s.id, "schedule", { at: "2031-01-05T10:00:00+00:00" }).expect(200);
    const at = new Date("2031-01-05T10:05:00Z");
    const runs = await Promise.all([t.plumbline.stories.publishDue(at), other.plumbline.stories.publishDue(at), other.plumbline.stories.publishDue(at), t.plumbline.stories.publishDue(at)]);
    const published = runs.flatMap((r) => r.published);
    for (const s of due) {
      expect(published.filter((x) => x === s.id)).toHaveLength(1);
      expect((await rowOf(s.id)).status).toBe("published");
      expect((await eventsOf(s.id)).filter((e) => e.action === "publish")).toHaveLength(1);
    }
  });

  it("both tickers of two processes at once: the story is published once", async () => {
    const { id } = await story(as.lead);
    await act(as.lead, id, "schedule", { at: "2031-06-05T10:00:00Z" }).expect(200);
    const at = new Date("2031-06-05T10:00:01Z");
    await Promise.all([t.plumbline.publishing.tick(at), other.plumbline.publishing.tick(at)]);
    expect((await rowOf(id)).status).toBe("published");
    expect((await eventsOf(id)).filter((e) => e.action === "publish")).toHaveLength(1);
  });

  it("withdrawing a scheduled story cancels the schedule (back to approved), so the ticker leaves it", async () => {
    const { id } = await story(as.lead);
    await act(as.lead, id, "schedule", { at: "2033-01-01T09:00:00Z" }).expect(200);
    expect((await act(as.lead, id, "withdraw")).body).toEqual({ id, status: "approved", scheduledFor: null });
    expect((await t.plumbline.stories.publishDue(new Date("2033-01-02T00:00:00Z"))).published).not.toContain(id);
    expect((await rowOf(id)).status).toBe("approved");
  });

  it("marketing's edit of a scheduled story returns it to draft and cancels the schedule (the approval was for the old text)", async () => {
    const { id } = await story(as.marketing);
    await act(as.marketing, id, "submit").expect(200);
    await act(as.lead, id, "approve").expect(200);
    await act(as.lead, id, "schedule", { at: "2034-01-01T09:00:00Z" }).expect(200);
    const edited = await as.marketing.agent.patch(`/api/stories/${id}`).set("X-CSRF-Token", as.marketing.csrf).send({ intro: "The generators arrive and are set." }).expect(200);
    expect(edited.body).toMatchObject({ status: "draft", scheduledFor: null });
    expect((await eventsOf(id)).map((e) => e.action)).toEqual(["submit", "approve", "schedule", "edited"]);
    expect((await t.plumbline.stories.publishDue(new Date("2034-01-02T00:00:00Z"))).published).not.toContain(id);
  });

  it("a lead cannot schedule a story that marketing wrote and nobody approved (409)", async () => {
    const { id } = await story(as.marketing);
    const res = await act(as.lead, id, "schedule", { at: "2034-01-01T09:00:00Z" });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("invalid_transition");
    expect(await rowOf(id)).toMatchObject({ status: "draft", scheduled_for: null });
  });
});
