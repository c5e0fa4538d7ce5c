import { randomBytes } from "node:crypto";
import { DateTime } from "luxon";
import { beforeAll, describe, expect, it } from "vitest";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { DEMO, lastMailId, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, postInput, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const TZ = "Europe/London";
const HOUR = 3_600_000;
const runRequest = (body: Record<string, unknown>) => as.marketing.agent.post("/api/digests/runs").set("X-CSRF-Token", as.marketing.csrf).send(body);
const runsOf = async (projectId: number) => Number((await t.db("digest_runs").where({ project_id: projectId }).count({ n: "*" }).first())?.n);

/**
 * The days from `first` to `last` as the digest writes them, worked out here with luxon rather
 * than with the product's own formatter: "4 Dec 2026", "1 to 4 Dec 2026", "30 Nov to 4 Dec 2026".
 */
function days(first: DateTime, last: DateTime): string {
  const full = (d: DateTime) => d.toFormat("d LLL yyyy");
  if (first.hasSame(last, "day")) return full(last);
  if (first.year !== last.year) return `${full(first)} to ${full(last)}`;
  if (first.month !== last.month) return `${first.toFormat("d LLL")} to ${full(last)}`;
  return `${first.day} to ${full(last)}`;
}

async function publishedPost(p: { id: number; slug: string }) {
  const cover = await createPhoto(t, p.id);
  const post = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id));
  await as.lead.agent.post(`/api/posts/${post.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
}

describe("POST /api/digests/runs refuses a moment that has not come", () => {
  it.each([
    ["a week ahead", 7 * 24 * HOUR],
    ["an hour ahead", HOUR],
    ["a minute ahead", 60_000],
  ])("refuses an `at` %s with 400 naming at, and starts no run", async (_label, ahead) => {
    const p = await createProject(t);
    const res = await runRequest({ projectSlug: p.slug, frequency: "weekly", at: new Date(Date.now() + ahead).toISOString() });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("validation");
    expect(Object.keys(res.body.error.fields)).toEqual(["at"]);
    expect(res.body.error.fields.at).toMatch(/future/);
    expect(await runsOf(p.id)).toBe(0);
  });

  it("refuses a future month too, and an `at` that is not an instant", async () => {
    const p = await createProject(t);
    expect((await runRequest({ projectSlug: p.slug, frequency: "monthly", at: new Date(Date.now() + 40 * 24 * HOUR).toISOString() })).status).toBe(400);
    for (const at of ["tomorrow", "2026-12-04", "9999-12-31T23:59:59Z", 1_800_000_000_000]) {
      const res = await runRequest({ projectSlug: p.slug, frequency: "weekly", at });
      expect(res.status, String(at)).toBe(400);
      expect(Object.keys(res.body.error.fields)).toEqual(["at"]);
    }
    expect(await runsOf(p.id)).toBe(0);
  });

  it("accepts now (or a moment ago): the run covers the last ISO week that has ended", async () => {
    const p = await createProject(t);
    const res = await runRequest({ projectSlug: p.slug, frequency: "weekly" });
    expect(res.status).toBe(201);
    const again = await runRequest({ projectSlug: p.slug, frequency: "weekly", at: new Date(Date.now() - 1000).toISOString() });
    expect(again.status).toBe(200);
    expect(again.body.id).toBe(res.body.id);
    const run = await as.marketing.agent.get(`/api/digests/runs/${res.body.id}`).expect(200);
    const thisMonday = DateTime.now().setZone(TZ).startOf("week");
    expect(run.body.windowEnd).toBe(thisMonday.toUTC().toISO());
    expect(run.body.windowStart).toBe(thisMonday.minus({ weeks: 1 }).toUTC().toISO());
  });
});

describe("a digest's title names exactly the window it covers", () => {
  it("a test digest says this ISO week so far, from its Monday to today, and holds what was published today", async () => {
    const p = await createProject(t);
    await publishedPost(p);
    const before = await lastMailId(t);
    const res = await as.marketing.agent.post("/api/digests/test").set("X-CSRF-Token", as.marketing.csrf).send({ projectSlug: p.slug });
    expect(res.status).toBe(202);
    const mail = await t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", DEMO.marketing).andWhere("m.id", ">", before).first("m.subject", "m.text");

    const now = DateTime.now().setZone(TZ);
    const monday = now.startOf("week");
    const sunday = monday.plus({ days: 6 });
    const week = monday.year === monday.weekYear && sunday.year === monday.weekYear ? `week ${monday.weekNumber}` : `week ${monday.weekNumber} of ${monday.weekYear}`;
    const title = `${week} so far, ${days(monday, now)}`;
    expect(mail.subject).toBe(`[Test] Test campus ${p.slug}: progress, ${title}`);
    expect(mail.text.split("\n").slice(0, 2)).toEqual([`Test campus ${p.slug}`, title]);
    expect(mail.text).toContain("Chillers on their plinths");
  });

  it("a monthly reader's preview says this month so far and starts on its first day", async () => {
    const p = await createProject(t);
    await publishedPost(p);
    const email = `monthly-${randomBytes(3).toString("hex")}@example.org`;
    const [id] = await t.db("subscribers").insert({ project_id: p.id, email, email_hash: hashAddress(email), name: "Monthly reader", interest: "press", frequency: "monthly", topics_key: "all", status: "confirmed", confirmed_at: new Date() });
    const res = await as.marketing.agent.get(`/api/digests/preview?subscriberId=${id}`).expect(200);

    const now = DateTime.now().setZone(TZ);
    const first = now.startOf("month");
    expect(res.body.windowStart).toBe(first.toUTC().toISO());
    expect(res.body.subject).toBe(`Test campus ${p.slug}: progress, ${now.toFormat("LLLL yyyy")} so far, ${days(first, now)}`);
    // Never the month before, which the preview used to be headed with.
    expect(res.body.subject).not.toContain(first.minus({ months: 1 }).toFormat("LLLL yyyy"));
  });

  it("a reader whose last digest ended mid-period gets a title of the days since, not a period's name", async () => {
    const p = await createProject(t);
    await publishedPost(p);
    const email = `late-${randomBytes(3).toString("hex")}@example.org`;
    const now = DateTime.now().setZone(TZ);
    const since = now.minus({ days: 10 }).startOf("day").plus({ hours: 8 });
    const [id] = await t.db("subscribers").insert({ project_id: p.id, email, email_hash: hashAddress(email), name: "Weekly reader", interest: "press", frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date(), last_digest_at: since.toJSDate() });
    const res = await as.marketing.agent.get(`/api/digests/preview?subscriberId=${id}`).expect(200);
    expect(res.body.windowStart).toBe(since.toUTC().toISO());
    expect(res.body.subject).toBe(`Test campus ${p.slug}: progress, ${days(since, now)} so far`);
  });
});
