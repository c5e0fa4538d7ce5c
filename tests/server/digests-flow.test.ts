import { simpleParser } from "mailparser";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { headersOf } from "../../server/mail/mail.sink.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { lastMailId, newClient, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";
import { scheduledRun } from "../helpers/digests.ts";
import { createMilestone, createPhoto, createProject, postInput, signInAll, type Client } from "./posts-fixtures.ts";

const PUBLIC = "https://progress.kestrel.example";
const DAY = 86_400_000;

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  // The test client speaks plain HTTP: with an https PUBLIC_URL, Secure cookies would never come back.
  t = await startTestApp({ PUBLIC_URL: PUBLIC, COOKIE_SECURE: "false", SMTP_SINK_REFUSE: "*@bounce.example", SUBSCRIBE_LIMIT_PER_IP: "100000", SUBSCRIBE_LIMIT_PER_ADDRESS: "100000" });
  as = await signInAll(t);
});
afterAll(async () => {
  await t.close();
});

let n = 0;
const address = (tag: string, domain = "example.org") => `${tag}-${Date.now().toString(36)}-${++n}@${domain}`;

function linkIn(text: string, path: string): string {
  const m = text.match(new RegExp(`${PUBLIC.replace(/\./g, "\\.")}(/${path}/[A-Za-z0-9_.-]+)`));
  if (!m) throw new Error(`no ${path} link in:\n${text}`);
  return m[1]!;
}

/** Subscribes through the API and confirms with the link from the e-mail in the sink. */
async function subscribeAndConfirm(slug: string, email: string, extra: Record<string, unknown> = {}) {
  const c = await newClient(t);
  const before = await lastMailId(t);
  await c.agent.post("/api/subscriptions").set("X-CSRF-Token", c.csrf).send({ email, name: "Ada Fenwick", interest: "prospect", frequency: "weekly", projectSlug: slug, ...extra }).expect(202);
  const mail = await waitForMail(t, email, before);
  const token = linkIn(mail.text, "subscriptions/confirm").split("/").pop()!;
  await c.agent.post(`/api/subscriptions/confirm/${token}`).set("X-CSRF-Token", c.csrf).send({}).expect(200);
}

/** A published post in the project (a lead writes and publishes it through the API). */
async function publish(p: { id: number; slug: string }, by: Client, over: Record<string, unknown> = {}) {
  const cover = await createPhoto(t, p.id);
  const res = await by.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(cover.id, over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  await by.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", by.csrf).expect(200);
  return { id: res.body.id as number, slug: res.body.slug as string, title: (over.title as string) ?? (await t.db("posts").where({ id: res.body.id }).first("title")).title };
}

/** Moves a milestone's forecast finish later through the API (an event in today's window). */
async function slip(milestoneId: number, forecastFinish: string) {
  const current = await t.db("milestones").where({ id: milestoneId }).first("version");
  const res = await as.lead.agent.patch(`/api/milestones/${milestoneId}`).set("X-CSRF-Token", as.lead.csrf).send({ version: Number(current.version), forecastFinish });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
}

/** The weekly run whose window is the current ISO week (as the scheduler starts it next week), then sends it. */
async function weeklyRun(slug: string) {
  const run = await scheduledRun(t, slug, "weekly", new Date(Date.now() + 7 * DAY));
  await t.plumbline.digestJobs.drain();
  return run;
}

/** Digests (not the subscription's own e-mails) that reached an address. */
async function mailsTo(email: string, after = 0) {
  return t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", email.toLowerCase()).andWhere("m.id", ">", after).andWhere("m.message_id", "like", "<digest.%").orderBy("m.id").select("m.id", "m.subject", "m.text", "m.html", "m.raw");
}

describe("a weekly digest, end to end over HTTP, MariaDB and SMTP", () => {
  it("subscribe → confirm → a post is published → a weekly run → the e-mail holds the post and the slip", async () => {
    const p = await createProject(t);
    await t.db("projects").where({ id: p.id }).update({ postal_address: "1 Example Way, Aldermere (invented)" });
    const m = await createMilestone(t, p.slug, { name: "Chillers commissioned", baselineFinish: "2027-03-01" });
    const email = address("prospect");
    await subscribeAndConfirm(p.slug, email);
    const post = await publish(p, as.lead, { title: "Chillers on their plinths" });
    await slip(m.id, "2027-03-10");
    const before = await lastMailId(t);

    const run = await weeklyRun(p.slug);
    const got = await mailsTo(email, before);
    expect(got).toHaveLength(1);
    const mail = got[0]!;
    expect(mail.text).toContain("Chillers on their plinths");
    expect(mail.text).toContain(`${PUBLIC}/projects/${p.slug}/updates/${post.slug}`);
    expect(mail.text).toMatch(/Chillers commissioned: later by 9 days/);
    expect(mail.text).toContain("1 Example Way, Aldermere (invented)");
    expect(mail.html).toContain(`${PUBLIC}/projects/${p.slug}/updates/${post.slug}`);
    // The cover picture as an absolute URL of a public derivative.
    expect(mail.html).toMatch(new RegExp(`src="${PUBLIC.replace(/\./g, "\\.")}/media/v/[^"]+"`));

    // Source: RFC 5322 §3.6 — Date and From exactly once each; Message-ID present (CHECKS.md "E-mail").
    const raw = (mail.raw as Buffer).toString("latin1");
    const head = raw.slice(0, raw.search(/\r?\n\r?\n/));
    expect(head.match(/^Date:/gim)).toHaveLength(1);
    expect(head.match(/^From:/gim)).toHaveLength(1);
    expect(head.match(/^Message-ID:/gim)).toHaveLength(1);
    const parsed = await simpleParser(mail.raw as Buffer);
    const delivery = await t.db("digest_deliveries").where({ run_id: run.id }).first();
    expect(parsed.messageId).toBe(delivery.message_id);
    // Source: RFC 8058 §3.1 — one HTTPS URI in angle brackets, and the One-Click post header.
    const h = headersOf(mail.raw as Buffer);
    expect(h["list-unsubscribe"]).toMatch(/^<https:\/\/progress\.kestrel\.example\/u\/[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+>$/);
    expect(h["list-unsubscribe-post"]).toBe("List-Unsubscribe=One-Click");

    const status = await as.lead.agent.get(`/api/digests/runs/${run.id}`).expect(200);
    expect(status.body).toMatchObject({ id: run.id, status: "done", counts: { sent: 1, failed: 0, queued: 0 } });

    // The web copy: the signed link shows the same digest; an altered one is refused.
    const web = linkIn(mail.text, "api/digests/web");
    const page = await newClient(t).then((c) => c.agent.get(web));
    expect(page.status).toBe(200);
    expect(page.text).toContain("Chillers on their plinths");
    const forged = web.slice(0, -3) + (web.endsWith("AAA") ? "BBB" : "AAA");
    expect((await newClient(t).then((c) => c.agent.get(forged))).status).toBe(400);
  });

  it("an unconfirmed subscriber gets nothing", async () => {
    const p = await createProject(t);
    const email = address("pending");
    const c = await newClient(t);
    await c.agent.post("/api/subscriptions").set("X-CSRF-Token", c.csrf).send({ email, name: "Ezra Blackwood", interest: "press", frequency: "weekly", projectSlug: p.slug }).expect(202);
    await waitForMail(t, email);
    const before = await lastMailId(t);
    await publish(p, as.lead);
    const run = await weeklyRun(p.slug);
    expect(await mailsTo(email, before)).toHaveLength(0);
    expect(await t.db("digest_deliveries").where({ run_id: run.id }).count({ n: "*" }).first()).toEqual({ n: 0 });
  });

  it("nothing to say → nothing sent", async () => {
    const p = await createProject(t);
    const email = address("quiet");
    await subscribeAndConfirm(p.slug, email);
    const before = await lastMailId(t);
    const run = await weeklyRun(p.slug);
    expect(await mailsTo(email, before)).toHaveLength(0);
    const summary = await as.lead.agent.get(`/api/digests/runs/${run.id}`).expect(200);
    expect(summary.body.counts).toMatchObject({ sent: 0, skipped: 1 });
  });

  it("after one-click unsubscribe nothing more arrives", async () => {
    const p = await createProject(t);
    const email = address("leaver");
    await subscribeAndConfirm(p.slug, email);
    await publish(p, as.lead);
    const before = await lastMailId(t);
    await weeklyRun(p.slug);
    const [first] = await mailsTo(email, before);
    expect(first).toBeDefined();
    const url = headersOf(first!.raw as Buffer)["list-unsubscribe"]!.match(/<https:\/\/[^/]+(\/u\/[^>]+)>/)![1]!;
    // Source: RFC 8058 §3.1 — a POST of List-Unsubscribe=One-Click, form-encoded; 200 and no redirect.
    const res = await newClient(t).then((c) => c.agent.post(url).type("form").send("List-Unsubscribe=One-Click"));
    expect(res.status).toBe(200);
    await publish(p, as.lead);
    const after = await lastMailId(t);
    // A monthly run covers the same post; the address has left.
    await scheduledRun(t, p.slug, "monthly", new Date(Date.now() + 40 * DAY));
    await weeklyRun(p.slug);
    await t.plumbline.digestJobs.drain();
    expect(await mailsTo(email, after)).toHaveLength(0);
  });

  it("the same run twice sends nothing the second time", async () => {
    const p = await createProject(t);
    const email = address("twice");
    await subscribeAndConfirm(p.slug, email);
    await publish(p, as.lead);
    const before = await lastMailId(t);
    const first = await weeklyRun(p.slug);
    const second = await weeklyRun(p.slug);
    expect(second.id).toBe(first.id);
    expect(await mailsTo(email, before)).toHaveLength(1);
    // Even a fresh run of the same window (the period's row removed) finds the window already sent.
    await t.db("digest_runs").where({ id: first.id }).update({ run_key: `weekly:moved-${first.id}` });
    const third = await weeklyRun(p.slug);
    expect(third.id).not.toBe(first.id);
    expect(await mailsTo(email, before)).toHaveLength(1);
    const skipped = await t.db("digest_deliveries").where({ run_id: third.id }).first();
    expect(skipped).toMatchObject({ status: "skipped" });
  });

  it("a 550 address ends bounced and suppressed, and is not tried again", async () => {
    const p = await createProject(t);
    const email = address("refused", "bounce.example");
    // Confirmed directly: the sink refuses this domain, so the confirmation could never arrive.
    const [sid] = await t.db("subscribers").insert({ project_id: p.id, email, email_hash: hashAddress(email), name: "Odette Marchetti", interest: "investor", frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date() });
    await publish(p, as.lead);
    const run = await weeklyRun(p.slug);
    const d = await t.db("digest_deliveries").where({ run_id: run.id, subscriber_id: sid }).first();
    expect(d.status).toBe("failed");
    expect(d.error).toMatch(/^550/);
    expect((await t.db("subscribers").where({ id: sid }).first()).status).toBe("bounced");
    expect(await t.db("suppressions").where({ email_hash: hashAddress(email) }).first()).toMatchObject({ reason: "bounced" });
    expect(await t.plumbline.subscribers.isSuppressed(email)).toBe(true);
  });

  it("a temporary failure is queued again with a later attempt time", async () => {
    const p = await createProject(t);
    const email = address("later");
    await subscribeAndConfirm(p.slug, email);
    await publish(p, as.lead);
    const send = t.plumbline.digestJobs;
    const original = t.mailer.send;
    t.mailer.send = async () => {
      throw Object.assign(new Error("Try again later"), { responseCode: 451 });
    };
    try {
      const res = { body: await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 7 * DAY)) };
      await send.drain();
      const d = await t.db("digest_deliveries").where({ run_id: res.body.id }).first();
      expect(d.status).toBe("queued");
      expect(d.attempts).toBe(1);
      expect(new Date(d.next_attempt_at).getTime()).toBeGreaterThan(Date.now() + 30_000);
      expect((await t.db("subscribers").where({ email }).first()).status).toBe("confirmed");
    } finally {
      t.mailer.send = original;
    }
  });
});
