import { createHmac, randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { lastMailId, newClient, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";

const WEBHOOK_SECRET = "whsec-test-0123456789abcdef";

let t: TestApp;
let slug: string;
let projectId: number;

async function clearLimits() {
  await t.db("rate_limit_hits").where("key", "like", "subscribe-%").delete();
}

beforeAll(async () => {
  t = await startTestApp(
    {
      SMTP_SINK_REFUSE: "*@bounce.example",
      MAIL_WEBHOOK_SECRET: WEBHOOK_SECRET,
      SUBSCRIBE_LIMIT_PER_ADDRESS: "2",
      SUBSCRIBE_LIMIT_PER_IP: "5",
    },
    { listen: true },
  );
  await clearLimits();
  slug = `deliv-${randomBytes(3).toString("hex")}`;
  const [id] = await t.db("projects").insert({ slug, name: "Delivery Test Hall", operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
  projectId = Number(id);
});
afterAll(async () => {
  await clearLimits();
  await t.close();
});

let n = 0;
const address = (tag: string, domain = "example.net") => `${tag}-${Date.now().toString(36)}-${++n}@${domain}`;

async function subscribe(email: string) {
  const c = await newClient(t);
  return c.agent.post("/api/subscriptions").set("X-CSRF-Token", c.csrf).send({ email, name: "Ezra Blackwood", interest: "neighbour", frequency: "monthly", projectSlug: slug });
}

async function confirmedRow(email: string) {
  const [id] = await t.db("subscribers").insert({
    project_id: projectId,
    email,
    email_hash: hashAddress(email),
    name: "Odette Marchetti",
    interest: "investor",
    frequency: "weekly",
    topics_key: "all",
    status: "confirmed",
    confirmed_at: new Date(),
  });
  return Number(id);
}

describe("confirmation rate limits (MariaDB-backed)", () => {
  it("per address: the third request in the window is refused with 429 and sends nothing more", async () => {
    await clearLimits();
    const email = address("limit");
    const before = await lastMailId(t);
    expect((await subscribe(email)).status).toBe(202);
    expect((await subscribe(email)).status).toBe(202);
    const third = await subscribe(email);
    expect(third.status).toBe(429);
    expect(third.body.error.code).toBe("rate_limited");
    // The limit counts requests, so a known and an unknown address are limited alike.
    await waitForMail(t, email, before);
    await new Promise((r) => setTimeout(r, 300));
    const sent = await t.db("mail_recipients as r").join("mail_messages as m", "m.id", "r.message_id").where("r.address", email).andWhere("m.id", ">", before).count({ n: "*" }).first();
    expect(Number(sent?.n)).toBe(2);
    // The counter lives in MariaDB, where every app process sees it.
    const counter = await t.db("rate_limit_hits").where("key", `subscribe-address:${email}`).first();
    expect(Number(counter.hits)).toBe(3);
  });

  it("per IP: the sixth request from one address in the window is refused with 429", async () => {
    await clearLimits();
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await subscribe(address(`ip${i}`))).status);
    expect(statuses).toEqual([202, 202, 202, 202, 202, 429]);
    await clearLimits();
  });
});

describe("a permanent SMTP failure over real SMTP", () => {
  // Source: RFC 5321 §4.2.1 — a 5yz reply is a permanent negative completion, so the address is not tried again (from memory of the RFC).
  it("the sink refuses a matching recipient with 550; the address ends bounced and suppressed", async () => {
    await clearLimits();
    const email = address("gone", "bounce.example");
    expect((await subscribe(email)).status).toBe(202);
    await expect
      .poll(async () => (await t.db("subscribers").where({ project_id: projectId, email }).first())?.status, { timeout: 8000, interval: 100 })
      .toBe("bounced");
    const row = await t.db("subscribers").where({ project_id: projectId, email }).first();
    const job = await t.db("subscriber_mail_jobs").where({ subscriber_id: row.id }).first();
    expect(job.status).toBe("failed");
    expect(job.last_error).toMatch(/^550/);
    expect(job.last_error).not.toContain(email);
    const suppression = await t.db("suppressions").where({ email_hash: hashAddress(email) }).first();
    expect(suppression).toMatchObject({ reason: "bounced", source: "smtp-550" });
    expect(await t.db("mail_recipients").where({ address: email }).first()).toBeUndefined();

    // Subscribing it again answers as usual and queues nothing.
    await clearLimits();
    const again = await subscribe(email);
    expect(again.status).toBe(202);
    expect(Number((await t.db("subscriber_mail_jobs").where({ subscriber_id: row.id }).count({ n: "*" }).first())?.n)).toBe(1);
    expect(await t.plumbline.subscribers.isSuppressed(email)).toBe(true);
  });
});

/** A local stand-in for the hosted provider: signs its events with the shared secret and POSTs them over HTTP. */
async function providerSends(body: unknown, opts: { secret?: string; timestamp?: number; tamper?: (raw: string) => string; omitSignature?: boolean } = {}) {
  const raw = JSON.stringify(body);
  const ts = opts.timestamp ?? Math.floor(Date.now() / 1000);
  const mac = createHmac("sha256", opts.secret ?? WEBHOOK_SECRET).update(`${ts}.${raw}`).digest("hex");
  const res = await fetch(`${t.baseUrl}/api/webhooks/mail-events`, {
    method: "POST",
    headers: { "Content-Type": "application/json", ...(opts.omitSignature ? {} : { "Plumbline-Signature": `t=${ts},v1=${mac}` }) },
    body: opts.tamper ? opts.tamper(raw) : raw,
  });
  return { status: res.status, body: (await res.json()) as Record<string, unknown> & { error?: { code: string } } };
}

describe("POST /api/webhooks/mail-events (HMAC-signed, no CSRF)", () => {
  it("a signed bounce and a signed complaint mark the addresses and suppress them; a temporary bounce changes nothing", async () => {
    const bounced = address("hook-bounce");
    const complained = address("hook-complaint");
    const soft = address("hook-soft");
    for (const e of [bounced, complained, soft]) await confirmedRow(e);
    const res = await providerSends({
      events: [
        { id: "evt-1", type: "bounce", email: bounced.toUpperCase(), permanent: true, at: new Date().toISOString() },
        { id: "evt-2", type: "complaint", email: complained },
        { id: "evt-3", type: "bounce", email: soft, permanent: false },
      ],
    });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ processed: 2, ignored: 1 });
    const statusOf = async (email: string) => (await t.db("subscribers").where({ project_id: projectId, email }).first()).status;
    expect(await statusOf(bounced)).toBe("bounced");
    expect(await statusOf(complained)).toBe("complained");
    expect(await statusOf(soft)).toBe("confirmed");
    expect(await t.db("suppressions").where({ email_hash: hashAddress(bounced) }).first()).toMatchObject({ reason: "bounced", source: "webhook" });
    expect(await t.db("suppressions").where({ email_hash: hashAddress(complained) }).first()).toMatchObject({ reason: "complained" });
    expect(await t.db("suppressions").where({ email_hash: hashAddress(soft) }).first()).toBeUndefined();
    const recipients = (await t.plumbline.subscribers.digestRecipients(projectId, "weekly")).map((r) => r.email);
    expect(recipients).toContain(soft);
    expect(recipients).not.toContain(bounced);
    expect(recipients).not.toContain(complained);
  });

  it("a forged, missing, stale or tampered signature is refused with 401 and changes nothing", async () => {
    const email = address("hook-forged");
    await confirmedRow(email);
    const body = { events: [{ type: "complaint", email }] };
    const forged = await providerSends(body, { secret: "someone-elses-secret-123" });
    expect(forged.status).toBe(401);
    expect(forged.body.error?.code).toBe("signature_invalid");
    expect((await providerSends(body, { omitSignature: true })).status).toBe(401);
    expect((await providerSends(body, { timestamp: Math.floor(Date.now() / 1000) - 3600 })).status).toBe(401);
    expect((await providerSends(body, { tamper: (raw) => raw.replace("complaint", "bounce") })).status).toBe(401);
    expect((await t.db("subscribers").where({ project_id: projectId, email }).first()).status).toBe("confirmed");
    expect(await t.db("suppressions").where({ email_hash: hashAddress(email) }).first()).toBeUndefined();
  });

  it("a signed body that is not a valid event list is refused with 400 and writes nothing", async () => {
    const email = address("hook-bad");
    await confirmedRow(email);
    const res = await providerSends({ events: [{ type: "complaint", email }, { type: "delivered", email }] });
    expect(res.status).toBe(400);
    expect(res.body.error?.code).toBe("validation");
    expect((await t.db("subscribers").where({ project_id: projectId, email }).first()).status).toBe("confirmed");
  });
});
