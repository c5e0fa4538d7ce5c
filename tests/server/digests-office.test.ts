import { randomBytes } from "node:crypto";
import { pino } from "pino";
import { beforeAll, describe, expect, it } from "vitest";
import { createDigestJobs } from "../../server/digests/digests.jobs.ts";
import { createOutboxService } from "../../server/mail/mail.service.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { DEMO, lastMailId, type TestApp } from "../helpers/app.ts";
import { scheduledRun } from "../helpers/digests.ts";
import { createPhoto, createProject, postInput, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
beforeAll(() => ({ t, as } = app));

const nextWeek = () => new Date(Date.now() + 7 * 86_400_000);

/** A project with one published update and `count` confirmed weekly subscribers. */
async function projectWithReaders(count: number) {
  const p = await createProject(t);
  const cover = await createPhoto(t, p.id);
  const post = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id));
  await as.lead.agent.post(`/api/posts/${post.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
  const tag = randomBytes(3).toString("hex");
  const emails = Array.from({ length: count }, (_, i) => `office-${tag}-${i}@example.org`);
  if (count) await t.db("subscribers").insert(emails.map((email, i) => ({ project_id: p.id, email, email_hash: hashAddress(email), name: `Reader ${i}`, interest: "press", frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date() })));
  return { ...p, emails };
}

async function startRun(slug: string) {
  const run = await scheduledRun(t, slug, "weekly", nextWeek());
  expect(run.created).toBe(true);
  return run.id;
}

describe("the site office's digest controls", () => {
  it("pause holds a run's sending and resume finishes it; history shows counts and duration", async () => {
    const p = await projectWithReaders(5);
    const id = await startRun(p.slug);
    await as.lead.agent.post(`/api/digests/runs/${id}/pause`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    await t.plumbline.digestJobs.drain();
    const paused = await as.lead.agent.get(`/api/digests/runs/${id}`).expect(200);
    expect(paused.body).toMatchObject({ status: "paused", counts: { total: 5, queued: 5, sent: 0 } });
    // Pausing a paused run is refused, not silently repeated.
    expect((await as.lead.agent.post(`/api/digests/runs/${id}/pause`).set("X-CSRF-Token", as.lead.csrf)).status).toBe(409);
    await as.lead.agent.post(`/api/digests/runs/${id}/resume`).set("X-CSRF-Token", as.lead.csrf).expect(200);
    await t.plumbline.digestJobs.drain();
    const list = await as.marketing.agent.get(`/api/digests/runs?project=${p.slug}`).expect(200);
    expect(list.body).toHaveLength(1);
    expect(list.body[0]).toMatchObject({ id, status: "done", frequency: "weekly", counts: { total: 5, queued: 0, sent: 5, failed: 0, skipped: 0 } });
    expect(list.body[0].durationSeconds).toBeGreaterThanOrEqual(0);
    expect(new Date(list.body[0].windowEnd).getTime() - new Date(list.body[0].windowStart).getTime()).toBeGreaterThanOrEqual(167 * 3_600_000);
  });

  it("lists upcoming runs on Monday 08:00 and the first working day 08:00 in the project's zone", async () => {
    const p = await projectWithReaders(2);
    const res = await as.marketing.agent.get(`/api/digests/upcoming?project=${p.slug}`).expect(200);
    const weekly = res.body.find((u: { frequency: string }) => u.frequency === "weekly");
    const monthly = res.body.find((u: { frequency: string }) => u.frequency === "monthly");
    expect(weekly.recipients).toBe(2);
    expect(monthly.recipients).toBe(0);
    const local = (iso: string) => new Intl.DateTimeFormat("en-GB", { timeZone: "Europe/London", weekday: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(new Date(iso));
    expect(local(weekly.at)).toBe("Mon 08:00");
    expect(local(monthly.at)).toMatch(/^(Mon|Tue|Wed|Thu|Fri) 08:00$/);
    expect(new Date(weekly.at).getTime()).toBeGreaterThan(Date.now());
  });

  it("sends a test to the signed-in member of staff", async () => {
    const p = await projectWithReaders(0);
    const before = await lastMailId(t);
    const res = await as.marketing.agent.post("/api/digests/test").set("X-CSRF-Token", as.marketing.csrf).send({ projectSlug: p.slug });
    expect(res.status).toBe(202);
    const mail = await t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", DEMO.marketing).andWhere("m.id", ">", before).first("m.subject", "m.message_id");
    expect(mail.subject).toMatch(/^\[Test\] Test campus/);
    expect(mail.message_id).toBe(res.body.messageId);
  });

  it("a delivery whose worker vanished after the relay accepted it is recorded as sent, not sent again", async () => {
    const p = await projectWithReaders(1);
    const id = await startRun(p.slug);
    const d = await t.db("digest_deliveries").where({ run_id: id }).first();
    // What a killed worker leaves: the message is in the sink, the row still says "sending".
    await t.mailer.send({ to: p.emails[0]!, subject: "earlier attempt", text: "x", html: "<p>x</p>", headers: { "Message-ID": d.message_id } });
    await t.db("digest_deliveries").where({ id: d.id }).update({ status: "sending", attempts: 1, lease_until: new Date(Date.now() - 1000) });
    await t.plumbline.digestJobs.drain();
    const n = await t.db("mail_recipients").where({ address: p.emails[0]! }).count({ n: "*" }).first();
    expect(Number(n?.n)).toBe(1);
    expect(await t.db("digest_deliveries").where({ id: d.id }).first()).toMatchObject({ status: "sent", attempts: 2 });
  });

  it("keeps to the configured sending rate", async () => {
    const p = await projectWithReaders(8);
    const jobs = createDigestJobs({ db: t.db, mailer: t.mailer, logger: pino({ level: "silent" }), digests: t.plumbline.digests, subscribers: t.plumbline.subscribers, outbox: createOutboxService(t.db) }, { ratePerSecond: 10 });
    await startRun(p.slug);
    const started = Date.now();
    await jobs.drain();
    // Eight messages at ten a second: the last may leave no sooner than 0.7 s after the first.
    expect(Date.now() - started).toBeGreaterThanOrEqual(700);
    const n = await t.db("mail_recipients").whereIn("address", p.emails).count({ n: "*" }).first();
    expect(Number(n?.n)).toBe(8);
  });
});
