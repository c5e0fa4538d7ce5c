import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, lastMailId, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { digestSubscriber, digestsTo, scheduledRun } from "../helpers/digests.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { createPhoto, createProject, postInput, signInAll, type Client } from "./posts-fixtures.ts";

const PUBLIC = "https://progress.kestrel.example";
const DAY = 86_400_000;

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
beforeAll(async () => {
  t = await startTestApp({ PUBLIC_URL: PUBLIC, COOKIE_SECURE: "false", SMTP_SINK_REFUSE: "*@bounce.example" });
  as = await signInAll(t);
});
afterAll(async () => {
  await t.close();
});

/** A published post of the project, written and published by the lead through the API. */
async function publish(p: { id: number; slug: string }, over: Record<string, unknown> = {}) {
  const cover = await createPhoto(t, p.id);
  const res = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(cover.id, over));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  await as.lead.agent.post(`/api/posts/${res.body.id}/publish`).set("X-CSRF-Token", as.lead.csrf).expect(200);
  return { id: Number(res.body.id), coverId: cover.id, title: String((await t.db("posts").where({ id: res.body.id }).first("title")).title) };
}

/** This week's weekly run, as the scheduler starts it next week, sent through the sink. */
async function weeklyRun(slug: string) {
  const run = await scheduledRun(t, slug, "weekly", new Date(Date.now() + 7 * DAY));
  await t.plumbline.digestJobs.drain();
  return run;
}

/** The path part of a personal link in a digest's text ("subscriptions/preferences", "api/digests/web"). */
function linkIn(text: string, path: string): string {
  const m = text.match(new RegExp(`${PUBLIC.replace(/\./g, "\\.")}/${path}/([A-Za-z0-9_.-]+)`));
  if (!m) throw new Error(`no ${path} link in:\n${text}`);
  return m[1]!;
}

/** The preferences token from the last digest an address received. */
async function preferencesToken(email: string): Promise<string> {
  const mails = await digestsTo(t, email, 0);
  expect(mails.length).toBeGreaterThan(0);
  return linkIn(mails[mails.length - 1]!.text, "subscriptions/preferences");
}

/** The stored rendering with the reader's own links put back to their placeholders. */
const unpersonalised = (html: string) =>
  html
    .replace(/https:\/\/progress\.kestrel\.example\/api\/digests\/web\/[A-Za-z0-9_.-]+/g, "{{webUrl}}")
    .replace(/https:\/\/progress\.kestrel\.example\/subscriptions\/preferences\/[A-Za-z0-9_.-]+/g, "{{preferencesUrl}}")
    .replace(/https:\/\/progress\.kestrel\.example\/u\/[A-Za-z0-9_.-]+/g, "{{unsubscribeUrl}}");

async function visitor(): Promise<Client> {
  return newClient(t) as Promise<Client>;
}

describe("GET /api/subscriptions/preferences/:token/digests — a subscriber's past digests", () => {
  it("lists exactly the digests this subscriber was sent, newest first, and each copy is the one sent", async () => {
    const p = await createProject(t);
    const mine = await digestSubscriber(t, p.id, "public", "archive-mine");
    const other = await digestSubscriber(t, p.id, "public", "archive-other");
    // An address the sink refuses (5xx): its delivery fails.
    const placeholder = await digestSubscriber(t, p.id, "public", "archive-refused");
    const bounced = placeholder.replace("@example.org", "@bounce.example");
    await t.db("subscribers").where({ project_id: p.id, email: placeholder }).update({ email: bounced, email_hash: hashAddress(bounced) });
    const first = await publish(p, { title: "Generator yard handed over" });
    const run1 = await weeklyRun(p.slug);

    const token = await preferencesToken(mine);
    const c = await visitor();
    const list = await c.agent.get(`/api/subscriptions/preferences/${token}/digests`);
    expect(list.status).toBe(200);
    expect(list.headers["cache-control"]).toBe("private, no-store");
    expect(list.body).toMatchObject({ total: 1, page: 1, pageSize: 20 });
    const [item] = list.body.items;
    expect(item).toMatchObject({ project: { slug: p.slug }, frequency: "weekly" });
    expect(item.subject).toContain(p.slug);
    expect(item.webUrl).toMatch(/^https:\/\/progress\.kestrel\.example\/api\/digests\/web\//);
    const mineSubscriber = await t.db("subscribers").where({ project_id: p.id, email: mine }).first("id");
    const delivery = await t.db("digest_deliveries").where({ run_id: run1.id, subscriber_id: mineSubscriber.id }).first();
    expect(item.id).toBe(Number(delivery.id));

    // The copy is the stored rendering, with only the reader's links filled in.
    const copy = await c.agent.get(`/api/subscriptions/preferences/${token}/digests/${item.id}`);
    expect(copy.status).toBe(200);
    expect(copy.headers["cache-control"]).toBe("private, no-store");
    const stored = await t.db("digest_contents").where({ id: delivery.content_id }).first("html");
    expect(copy.body.withheld).toBeNull();
    expect(copy.body.html).toContain(first.title);
    expect(copy.body.html).not.toContain("{{");
    expect(unpersonalised(copy.body.html)).toBe(stored.html);

    // A second week with nothing to say is skipped for everyone: it is not in the archive.
    const run2 = await scheduledRun(t, p.slug, "weekly", new Date(Date.now() + 14 * DAY));
    await t.plumbline.digestJobs.drain();
    expect((await t.db("digest_deliveries").where({ run_id: run2.id }).pluck("status")).every((s: string) => s === "skipped")).toBe(true);
    // The refused address's delivery failed: its owner has nothing in the archive.
    const refused = await t.db("digest_deliveries as d").join("subscribers as s", "s.id", "d.subscriber_id").where({ "d.run_id": run1.id, "s.email": bounced }).first("d.status", "s.id");
    expect(refused.status).toBe("failed");
    const refusedLink = (await t.plumbline.subscribers.linksFor(Number(refused.id))).preferencesUrl.split("/").pop()!;
    expect((await c.agent.get(`/api/subscriptions/preferences/${refusedLink}/digests`).expect(200)).body.total).toBe(0);
    expect((await c.agent.get(`/api/subscriptions/preferences/${token}/digests`)).body.total).toBe(1);

    // Another subscriber's digest is not found through my link, and theirs lists only theirs.
    const otherId = (await t.db("subscribers").where({ project_id: p.id, email: other }).first("id")).id;
    const theirs = await t.db("digest_deliveries").where({ run_id: run1.id, subscriber_id: otherId }).first("id");
    expect((await c.agent.get(`/api/subscriptions/preferences/${token}/digests/${theirs.id}`)).status).toBe(404);
    const otherList = await c.agent.get(`/api/subscriptions/preferences/${await preferencesToken(other)}/digests`).expect(200);
    expect(otherList.body.items.map((x: { id: number }) => x.id)).toEqual([Number(theirs.id)]);
  });

  it("a post withdrawn after sending is withheld from the copy, which says so; the web copy withholds it too", async () => {
    const p = await createProject(t);
    const email = await digestSubscriber(t, p.id, "public", "archive-withdrawn");
    const kept = await publish(p, { title: "Second chiller on its plinth" });
    const gone = await publish(p, { title: "Crane lift of the generator sets" });
    const before = await lastMailId(t);
    await weeklyRun(p.slug);
    const [mail] = await digestsTo(t, email, before);
    expect(mail!.text).toContain(gone.title);
    await as.lead.agent.post(`/api/posts/${gone.id}/withdraw`).set("X-CSRF-Token", as.lead.csrf).send({}).expect(200);

    const token = linkIn(mail!.text, "subscriptions/preferences");
    const c = await visitor();
    const [item] = (await c.agent.get(`/api/subscriptions/preferences/${token}/digests`).expect(200)).body.items;
    const copy = (await c.agent.get(`/api/subscriptions/preferences/${token}/digests/${item.id}`).expect(200)).body;
    expect(copy.withheld).toEqual({ count: 1, whole: false, notice: "One item in this digest is no longer available to you and has been withheld." });
    expect(copy.html).toContain(kept.title);
    expect(copy.html).not.toContain(gone.title);

    // The e-mail's own "view in the browser" link keeps working, with the same rule.
    const web = await c.agent.get(`/api/digests/web/${linkIn(mail!.text, "api/digests/web")}`);
    expect(web.status).toBe(200);
    expect(web.text).toContain(kept.title);
    expect(web.text).not.toContain(gone.title);
    expect(web.text).toContain("One item in this digest is no longer available to you and has been withheld.");

    // A picture restricted after sending: the picture goes, its post stays.
    const coverSrc = (html: string) => html.match(/<img[^>]+src="([^"]+)"/g) ?? [];
    expect(coverSrc(copy.html)).toHaveLength(1);
    await t.db("media_items").where({ id: kept.coverId }).update({ sensitivity: "restricted" });
    const again = (await c.agent.get(`/api/subscriptions/preferences/${token}/digests/${item.id}`).expect(200)).body;
    expect(again.withheld).toMatchObject({ count: 2, notice: "2 items in this digest are no longer available to you and have been withheld." });
    expect(again.html).toContain(kept.title);
    expect(coverSrc(again.html)).toHaveLength(0);
  });

  it("a digest rendered before digests recorded their items: the archive withholds it whole and says why; its old web-copy link still works until it expires", async () => {
    const p = await createProject(t);
    const email = await digestSubscriber(t, p.id, "public", "archive-old");
    const post = await publish(p, { title: "Roof plant screens fitted" });
    const before = await lastMailId(t);
    const run = await weeklyRun(p.slug);
    await t.db("digest_contents").where({ run_id: run.id }).update({ item_refs: null });
    const [mail] = await digestsTo(t, email, before);
    const token = linkIn(mail!.text, "subscriptions/preferences");
    const c = await visitor();
    const [item] = (await c.agent.get(`/api/subscriptions/preferences/${token}/digests`).expect(200)).body.items;
    expect(item.webUrl).toBeNull();
    const copy = (await c.agent.get(`/api/subscriptions/preferences/${token}/digests/${item.id}`).expect(200)).body;
    expect(copy.html).toBeNull();
    expect(copy.withheld).toMatchObject({ whole: true });
    expect(copy.withheld.notice).toMatch(/withheld/);

    const web = await c.agent.get(`/api/digests/web/${linkIn(mail!.text, "api/digests/web")}`);
    expect(web.status).toBe(200);
    expect(web.text).toContain(post.title);
    // The same reader's link signed to expire yesterday is refused as expired.
    const subscriberId = (await t.db("subscribers").where({ project_id: p.id, email }).first("id")).id;
    const contentId = (await t.db("digest_contents").where({ run_id: run.id }).first("id")).id;
    const expired = t.plumbline.digests.webToken(Number(contentId), Number(subscriberId), new Date(Date.now() - DAY));
    expect((await c.agent.get(`/api/digests/web/${expired}`)).status).toBe(410);
  });

  it("an altered link → 404, for the list and for a copy", async () => {
    const p = await createProject(t);
    const email = await digestSubscriber(t, p.id, "public", "archive-altered");
    await publish(p);
    await weeklyRun(p.slug);
    const token = await preferencesToken(email);
    const altered = token.slice(0, -3) + (token.endsWith("AAA") ? "BBB" : "AAA");
    const c = await visitor();
    const [item] = (await c.agent.get(`/api/subscriptions/preferences/${token}/digests`).expect(200)).body.items;
    expect((await c.agent.get(`/api/subscriptions/preferences/${altered}/digests`)).status).toBe(404);
    expect((await c.agent.get(`/api/subscriptions/preferences/${altered}/digests/${item.id}`)).status).toBe(404);
    expect((await c.agent.get(`/api/subscriptions/preferences/not-a-link/digests`)).status).toBe(404);
  });
});

describe("GET /api/me/digests — an investor's own digests", () => {
  it("an investor sees their investor-room subscription's digests only; a visitor is asked to sign in", async () => {
    const p = await createProject(t);
    const investor = await createUser(t, "investor");
    const c = await signIn(t, investor.email, investor.password);
    await c.agent.patch(`/api/investors/digest/${p.slug}`).set("X-CSRF-Token", c.csrf).send({ enabled: true, frequency: "weekly", topics: null }).expect(200);
    const someoneElse = await digestSubscriber(t, p.id, "investor", "archive-investor-other");
    const post = await publish(p, { title: "Investor site walk notes", audience: "investor" });
    const run = await weeklyRun(p.slug);

    const res = await c.agent.get("/api/me/digests");
    expect(res.status).toBe(200);
    expect(res.headers["cache-control"]).toBe("private, no-store");
    const mineId = (await t.db("subscribers").where({ project_id: p.id, user_id: investor.id }).first("id")).id;
    const mine = await t.db("digest_deliveries").where({ run_id: run.id, subscriber_id: mineId }).first("id", "status");
    expect(mine.status).toBe("sent");
    expect(res.body.items.map((x: { id: number }) => x.id)).toEqual([Number(mine.id)]);
    const copy = await c.agent.get(`/api/me/digests/${mine.id}`).expect(200);
    expect(copy.body.html).toContain(post.title);

    const otherId = (await t.db("subscribers").where({ project_id: p.id, email: someoneElse }).first("id")).id;
    const theirs = await t.db("digest_deliveries").where({ run_id: run.id, subscriber_id: otherId }).first("id");
    expect((await c.agent.get(`/api/me/digests/${theirs.id}`)).status).toBe(404);
    // The demo investor has no subscription to this project: none of it is theirs.
    expect((await as.investor.agent.get(`/api/me/digests/${mine.id}`)).status).toBe(404);

    const anon = await visitor();
    expect((await anon.agent.get("/api/me/digests")).status).toBe(401);
    expect((await anon.agent.get(`/api/me/digests/${mine.id}`)).status).toBe(401);
    expect((await as.lead.agent.get("/api/me/digests")).status).toBe(403);
  });
});
