import { randomBytes } from "node:crypto";
import { simpleParser } from "mailparser";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CONSENT } from "../../src/shared/schemas/subscribers.ts";
import { listUnsubscribeHeaders } from "../../server/subscribers/subscribers.links.ts";
import { signToken } from "../../server/subscribers/subscribers.tokens.ts";
import { lastMailId, newClient, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";

const PUBLIC = "https://progress.kestrel.example";
const MAILTO = "unsubscribe@kestrel.example";

let t: TestApp;
let slug: string;
let projectId: number;

async function clearLimits() {
  await t.db("rate_limit_hits").where("key", "like", "subscribe-%").delete();
}

beforeAll(async () => {
  t = await startTestApp({
    PUBLIC_URL: PUBLIC,
    // The test client speaks plain HTTP: with an https PUBLIC_URL, Secure cookies would never come back.
    COOKIE_SECURE: "false",
    MAIL_UNSUBSCRIBE_MAILTO: MAILTO,
    SUBSCRIBE_LIMIT_PER_IP: "100000",
    SUBSCRIBE_LIMIT_PER_ADDRESS: "100000",
  });
  await clearLimits();
  // A project of this file's own, with a public and an investor-only area in its programme.
  slug = `subs-${randomBytes(3).toString("hex")}`;
  const [id] = await t.db("projects").insert({ slug, name: "Test Campus, Phase 9", operator_name: "Kestrel Colocation", postal_address: "1 Example Way, Aldermere (invented)", time_zone: "Europe/London" });
  projectId = Number(id);
  const [phaseId] = await t.db("phases").insert({ project_id: projectId, name: "Fit-out", sort_order: 1 });
  await t.db("milestones").insert([
    { project_id: projectId, phase_id: phaseId, name: "Hall 9A containment", area: "Hall 9A", system: "fit-out", weight: 1, baseline_finish: "2027-03-01", audience: "public" },
    { project_id: projectId, phase_id: phaseId, name: "Lender's vault", area: "Strongroom", system: "security", weight: 1, baseline_finish: "2027-03-01", audience: "investor" },
  ]);
});
afterAll(async () => {
  await clearLimits();
  await t.close();
});

let n = 0;
const address = (tag: string) => `${tag}-${Date.now().toString(36)}-${++n}@example.org`;

function linkIn(text: string, path: string): string {
  const m = text.match(new RegExp(`${PUBLIC.replace(/\./g, "\\.")}(/${path}/[A-Za-z0-9_.-]+)`));
  if (!m) throw new Error(`no ${path} link in:\n${text}`);
  return m[1]!;
}
const tokenOf = (path: string) => path.split("/").pop()!;

async function subscribe(email: string, extra: Record<string, unknown> = {}) {
  const c = await newClient(t);
  const res = await c.agent
    .post("/api/subscriptions")
    .set("X-CSRF-Token", c.csrf)
    .send({ email, name: "Ada Fenwick", interest: "prospect", frequency: "weekly", projectSlug: slug, ...extra });
  return res;
}

async function rowOf(email: string) {
  return t.db("subscribers").where({ project_id: projectId, email }).first();
}

/** Subscribes, confirms through the e-mailed link, and returns the welcome e-mail. */
async function confirmed(email: string) {
  const before = await lastMailId(t);
  expect((await subscribe(email)).status).toBe(202);
  const mail = await waitForMail(t, email, before);
  const token = tokenOf(linkIn(mail.text, "subscriptions/confirm"));
  const c = await newClient(t);
  const after = await lastMailId(t);
  await c.agent.post(`/api/subscriptions/confirm/${token}`).set("X-CSRF-Token", c.csrf).send({}).expect(200);
  return waitForMail(t, email, after);
}

async function rawOf(mailId: number) {
  const row = await t.db("mail_messages").where({ id: mailId }).first("raw");
  return simpleParser(row.raw as Buffer);
}

describe("POST /api/subscriptions → confirmation e-mail → confirmation page → Confirm subscription", () => {
  it("subscribes by double opt-in: 202, an e-mail in the sink, a GET that changes nothing, then the POST confirms", async () => {
    const email = address("flow");
    const before = await lastMailId(t);
    const res = await subscribe(email, { organisation: "Fenwick Data", topics: { areas: ["Hall 9A"], systems: ["cooling"] } });
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ ok: true, message: expect.stringMatching(/confirmation link/) });

    const pending = await rowOf(email);
    expect(pending).toMatchObject({ status: "pending", interest: "prospect", frequency: "weekly", organisation: "Fenwick Data", consent_version: CONSENT.version, consent_source: "subscribe form", confirmed_at: null });
    expect(pending.consent_ip).toMatch(/127\.0\.0\.1/);
    expect(pending.consent_at).toBeInstanceOf(Date);
    expect(JSON.parse(pending.topics)).toEqual({ areas: ["Hall 9A"], systems: ["cooling"] });

    const mail = await waitForMail(t, email, before);
    expect(mail.subject).toBe("Confirm your subscription to Test Campus, Phase 9");
    const path = linkIn(mail.text, "subscriptions/confirm");
    expect(mail.html).toContain(`href="${PUBLIC}${path}"`);
    const token = tokenOf(path);
    // The link names the subscriber and is valid for 7 days from sending.
    const payload = JSON.parse(Buffer.from(token.split(".")[0]!, "base64url").toString());
    expect(payload.s).toBe(pending.id);
    expect(payload.e * 1000 - Date.now()).toBeGreaterThan(7 * 86_400_000 - 60_000);
    expect(payload.e * 1000 - Date.now()).toBeLessThanOrEqual(7 * 86_400_000);

    // A mail scanner fetching the link (the page, then the page's API call) changes nothing.
    const scanner = await newClient(t);
    await scanner.agent.get(path).expect(200);
    const view = await scanner.agent.get(`/api/subscriptions/confirm/${token}`).expect(200);
    expect(view.body).toMatchObject({ email, status: "pending", project: { slug, name: "Test Campus, Phase 9" }, consent: { version: CONSENT.version, text: CONSENT.text } });
    const still = await rowOf(email);
    expect(still.status).toBe("pending");
    expect(still.updated_at.getTime()).toBe(pending.updated_at.getTime());

    // Pressing the button.
    const person = await newClient(t);
    const afterConfirmMail = await lastMailId(t);
    const done = await person.agent.post(`/api/subscriptions/confirm/${token}`).set("X-CSRF-Token", person.csrf).send({});
    expect(done.status).toBe(200);
    expect(done.body).toEqual({ status: "confirmed", preferencesPath: expect.stringMatching(/^\/subscriptions\/preferences\/[A-Za-z0-9_-]+\.[A-Za-z0-9_-]{43}$/) });
    const row = await rowOf(email);
    expect(row).toMatchObject({ status: "confirmed", confirm_nonce: null });
    expect(row.confirmed_at).toBeInstanceOf(Date);

    // The welcome e-mail carries the preferences and unsubscribe links.
    const welcome = await waitForMail(t, email, afterConfirmMail);
    expect(welcome.subject).toBe("You are subscribed to Test Campus, Phase 9");
    linkIn(welcome.text, "subscriptions/preferences");
    linkIn(welcome.text, "u");

    // Single use: the same link again is refused.
    const again = await person.agent.post(`/api/subscriptions/confirm/${token}`).set("X-CSRF-Token", person.csrf).send({});
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe("already_confirmed");
  });

  it("confirming needs the CSRF token like every state-changing /api request", async () => {
    const email = address("csrf");
    const before = await lastMailId(t);
    await subscribe(email);
    const token = tokenOf(linkIn((await waitForMail(t, email, before)).text, "subscriptions/confirm"));
    const c = await newClient(t);
    const res = await c.agent.post(`/api/subscriptions/confirm/${token}`).send({});
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe("csrf");
    expect((await rowOf(email)).status).toBe("pending");
  });

  it("answers the same status and body for a new, a pending, a confirmed and a suppressed address", async () => {
    const fresh = await subscribe(address("new"));
    const pendingEmail = address("pending");
    await subscribe(pendingEmail);
    const pendingAgain = await subscribe(pendingEmail);
    const known = address("known");
    await confirmed(known);
    const before = await lastMailId(t);
    const knownAgain = await subscribe(known, { frequency: "monthly", name: "Someone Else" });
    const suppressed = address("suppressed");
    await t.plumbline.subscribers.markUndeliverable(suppressed, "complained", "test");
    const suppressedRes = await subscribe(suppressed);

    for (const r of [pendingAgain, knownAgain, suppressedRes]) {
      expect(r.status).toBe(fresh.status);
      expect(r.body).toEqual(fresh.body);
    }
    expect(fresh.status).toBe(202);
    // The confirmed subscription is not changed by a stranger; its owner is told instead.
    expect(await rowOf(known)).toMatchObject({ status: "confirmed", frequency: "weekly", name: "Ada Fenwick" });
    const told = await waitForMail(t, known, before);
    expect(told.subject).toBe("You are already subscribed to Test Campus, Phase 9");
    // The suppressed address: nothing kept, nothing sent.
    expect(await rowOf(suppressed)).toBeUndefined();
    expect(await t.db("mail_recipients").where({ address: suppressed }).first()).toBeUndefined();
  });

  it("several requests for one new address at the same moment all answer 202 and make one row", async () => {
    const email = address("race");
    const clients = await Promise.all(Array.from({ length: 6 }, () => newClient(t)));
    const body = { email, name: "Ada Fenwick", interest: "prospect", frequency: "weekly", projectSlug: slug };
    const answers = await Promise.all(clients.map((c) => c.agent.post("/api/subscriptions").set("X-CSRF-Token", c.csrf).send(body)));
    expect(answers.map((r) => r.status)).toEqual([202, 202, 202, 202, 202, 202]);
    expect(await t.db("subscribers").where({ project_id: projectId, email }).count({ n: "*" }).first()).toMatchObject({ n: 1 });
  });

  it("an unconfirmed address receives nothing but its confirmation and is not a digest recipient", async () => {
    const email = address("unconfirmed");
    await subscribe(email);
    await waitForMail(t, email);
    const recipients = await t.plumbline.subscribers.digestRecipients(projectId, "weekly");
    expect(recipients.map((r) => r.email)).not.toContain(email);
    const subjects = (await t.db("mail_messages as m").join("mail_recipients as r", "r.message_id", "m.id").where("r.address", email).select("m.subject")).map((r: { subject: string }) => r.subject);
    expect(subjects).toEqual(["Confirm your subscription to Test Campus, Phase 9"]);
  });
});

describe("signed links: forged, altered and expired tokens", () => {
  it("refuses a forged token (another key) and an altered one (changed subscriber) with 400, an expired one with 410", async () => {
    const email = address("tokens");
    const before = await lastMailId(t);
    await subscribe(email);
    const token = tokenOf(linkIn((await waitForMail(t, email, before)).text, "subscriptions/confirm"));
    const row = await rowOf(email);
    const c = await newClient(t);

    const forged = signToken("not-the-server-secret-0123456789abcdef", { subscriberId: row.id, purpose: "confirm", expiresAt: new Date(Date.now() + 86_400_000), nonce: row.confirm_nonce });
    const [body, sig] = token.split(".") as [string, string];
    const payload = JSON.parse(Buffer.from(body, "base64url").toString());
    const altered = `${Buffer.from(JSON.stringify({ ...payload, s: payload.s + 1 })).toString("base64url")}.${sig}`;
    const expired = signToken(t.config.TOKEN_SECRET, { subscriberId: row.id, purpose: "confirm", expiresAt: new Date(Date.now() - 1000), nonce: row.confirm_nonce });
    const wrongPurpose = signToken(t.config.TOKEN_SECRET, { subscriberId: row.id, purpose: "unsubscribe", expiresAt: new Date(Date.now() + 86_400_000) });

    for (const [bad, status, code] of [
      [forged, 400, "token_invalid"],
      [altered, 400, "token_invalid"],
      [wrongPurpose, 400, "token_invalid"],
      [expired, 410, "token_expired"],
      ["garbage", 400, "validation"],
    ] as const) {
      const get = await c.agent.get(`/api/subscriptions/confirm/${bad}`);
      expect(get.status, bad).toBe(status);
      expect(get.body.error.code).toBe(code);
      const post = await c.agent.post(`/api/subscriptions/confirm/${bad}`).set("X-CSRF-Token", c.csrf).send({});
      expect(post.status).toBe(status);
    }
    expect((await rowOf(email)).status).toBe("pending");
    // The genuine link still works.
    await c.agent.post(`/api/subscriptions/confirm/${token}`).set("X-CSRF-Token", c.csrf).send({}).expect(200);
  });

  it("a confirmation link from before an unsubscribe and re-subscribe no longer confirms", async () => {
    const email = address("replaced");
    const first = await lastMailId(t);
    await subscribe(email);
    const oldToken = tokenOf(linkIn((await waitForMail(t, email, first)).text, "subscriptions/confirm"));
    const c = await newClient(t);
    await c.agent.post(`/api/subscriptions/confirm/${oldToken}`).set("X-CSRF-Token", c.csrf).send({}).expect(200);
    const row = await rowOf(email);
    const u = signToken(t.config.TOKEN_SECRET, { subscriberId: row.id, purpose: "unsubscribe", expiresAt: new Date(Date.now() + 86_400_000) });
    await c.agent.post(`/api/subscriptions/unsubscribe/${u}`).set("X-CSRF-Token", c.csrf).send({}).expect(200);
    await subscribe(email);
    expect((await rowOf(email)).status).toBe("pending");
    const res = await c.agent.post(`/api/subscriptions/confirm/${oldToken}`).set("X-CSRF-Token", c.csrf).send({});
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe("token_used");
    expect((await rowOf(email)).status).toBe("pending");
  });
});

describe("RFC 8058 one-click unsubscribe at /u/:token", () => {
  it("POST with body List-Unsubscribe=One-Click unsubscribes at once: 200, no redirect, no cookie or CSRF needed", async () => {
    const email = address("oneclick");
    const welcome = await confirmed(email);
    const path = linkIn(welcome.text, "u");
    // Source: RFC 8058 §3.1 / CHECKS.md "E-mail" — a POST, Content-Type application/x-www-form-urlencoded, body List-Unsubscribe=One-Click, no redirect.
    const res = await request(t.plumbline.app)
      .post(path)
      .set("Content-Type", "application/x-www-form-urlencoded")
      .send("List-Unsubscribe=One-Click");
    expect(res.status).toBe(200);
    expect(res.headers.location).toBeUndefined();
    expect(res.headers["set-cookie"]).toBeUndefined();
    expect(res.text).toMatch(/Unsubscribed/);
    const row = await rowOf(email);
    expect(row.status).toBe("unsubscribed");
    expect(row.unsubscribed_at).toBeInstanceOf(Date);
    expect((await t.plumbline.subscribers.digestRecipients(projectId, "weekly")).map((r) => r.email)).not.toContain(email);
    // Repeating it is harmless.
    const again = await request(t.plumbline.app).post(path).type("form").send("List-Unsubscribe=One-Click");
    expect(again.status).toBe(200);
  });

  it("accepts the same field sent as multipart/form-data", async () => {
    // Source: RFC 8058 §3.2 allows multipart/form-data for the POST body (from memory of the RFC text; CHECKS.md names the urlencoded form).
    const email = address("multipart");
    const path = linkIn((await confirmed(email)).text, "u");
    const res = await request(t.plumbline.app).post(path).field("List-Unsubscribe", "One-Click");
    expect(res.status).toBe(200);
    expect((await rowOf(email)).status).toBe("unsubscribed");
  });

  it("a GET of the link shows the page and changes nothing; a wrong body or a bad token is refused with 400", async () => {
    const email = address("oneclick-get");
    const path = linkIn((await confirmed(email)).text, "u");
    const http = request(t.plumbline.app);
    const page = await http.get(path);
    expect(page.status).toBe(200);
    expect(page.headers["content-type"]).toMatch(/text\/html/);
    expect((await rowOf(email)).status).toBe("confirmed");

    const wrongBody = await http.post(path).type("form").send("List-Unsubscribe=Yes");
    expect(wrongBody.status).toBe(400);
    const noBody = await http.post(path);
    expect(noBody.status).toBe(400);
    expect((await rowOf(email)).status).toBe("confirmed");

    const token = tokenOf(path);
    const altered = `${token.slice(0, 5)}${token[5] === "A" ? "B" : "A"}${token.slice(6)}`;
    const bad = await http.post(`/u/${altered}`).type("form").send("List-Unsubscribe=One-Click");
    expect(bad.status).toBe(400);
    const junk = await http.post("/u/not-a-token").type("form").send("List-Unsubscribe=One-Click");
    expect(junk.status).toBe(400);
    const gone = signToken(t.config.TOKEN_SECRET, { subscriberId: 999_999_999, purpose: "unsubscribe", expiresAt: new Date(Date.now() + 86_400_000) });
    expect((await http.post(`/u/${gone}`).type("form").send("List-Unsubscribe=One-Click")).status).toBe(404);
    expect((await rowOf(email)).status).toBe("confirmed");
  });
});

describe("list headers and RFC 5322 fields, read from the raw message", () => {
  it("the welcome e-mail carries List-Unsubscribe and List-Unsubscribe-Post exactly, and Date, From once each with a Message-ID", async () => {
    const email = address("headers");
    const welcome = await confirmed(email);
    const parsed = await rawOf(welcome.id);
    const unfold = (line: string) => line.replace(/\r\n(?=[ \t])/g, "");
    const valueOf = (key: string) => {
      const lines = parsed.headerLines.filter((h) => h.key === key);
      expect(lines, key).toHaveLength(1);
      return unfold(lines[0]!.line).replace(/^[^:]+:\s*/, "");
    };
    const unsubscribeUrl = `${PUBLIC}${linkIn(welcome.text, "u")}`;
    // Source: RFC 8058 §3.1 — one HTTPS URI in angle brackets; RFC 2369 §3.2 — comma-separated, in order of preference, mailto after it.
    expect(valueOf("list-unsubscribe")).toBe(`<${unsubscribeUrl}>, <mailto:${MAILTO}?subject=unsubscribe>`);
    expect(unsubscribeUrl.startsWith("https://")).toBe(true);
    // Source: RFC 8058 §3.1 — the exact value of List-Unsubscribe-Post.
    expect(valueOf("list-unsubscribe-post")).toBe("List-Unsubscribe=One-Click");
    // Source: RFC 5322 §3.6 — Date and From exactly once each; Message-ID should be present.
    const dateValue = valueOf("date");
    expect(dateValue).toMatch(/^(Mon|Tue|Wed|Thu|Fri|Sat|Sun), \d{1,2} (Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec) \d{4} \d{2}:\d{2}:\d{2} [+-]\d{4}$/);
    expect(Math.abs(new Date(dateValue).getTime() - Date.now())).toBeLessThan(5 * 60_000);
    expect(valueOf("from")).toBe(t.config.MAIL_FROM);
    expect(valueOf("message-id")).toMatch(/^<[^<>@\s]+@[^<>@\s]+>$/);
  });

  it("the confirmation e-mail, sent before there is a subscription, carries no List-Unsubscribe", async () => {
    const email = address("no-list");
    const before = await lastMailId(t);
    await subscribe(email);
    const mail = await waitForMail(t, email, before);
    const parsed = await rawOf(mail.id);
    expect(parsed.headerLines.filter((h) => h.key.startsWith("list-"))).toEqual([]);
    expect(parsed.headerLines.filter((h) => h.key === "date")).toHaveLength(1);
    expect(parsed.headerLines.filter((h) => h.key === "from")).toHaveLength(1);
  });

  it("listUnsubscribeHeaders builds the one-URI and the URI-plus-mailto forms", () => {
    // Source: RFC 8058 §3.1 and RFC 2369 §3.2 (header values as CHECKS.md gives them).
    expect(listUnsubscribeHeaders("https://progress.kestrel.example/u/abc")).toEqual({
      "List-Unsubscribe": "<https://progress.kestrel.example/u/abc>",
      "List-Unsubscribe-Post": "List-Unsubscribe=One-Click",
    });
    expect(listUnsubscribeHeaders("https://progress.kestrel.example/u/abc", "leave@kestrel.example")["List-Unsubscribe"]).toBe(
      "<https://progress.kestrel.example/u/abc>, <mailto:leave@kestrel.example?subject=unsubscribe>",
    );
  });
});

describe("the preferences page by signed link", () => {
  it("shows and changes topics and frequency without signing in, then unsubscribes", async () => {
    const email = address("prefs");
    const welcome = await confirmed(email);
    const token = tokenOf(linkIn(welcome.text, "subscriptions/preferences"));
    const c = await newClient(t);
    const view = await c.agent.get(`/api/subscriptions/preferences/${token}`).expect(200);
    expect(view.body).toMatchObject({ email, frequency: "weekly", topics: null, status: "confirmed", options: { areas: ["Hall 9A"] } });
    // Only the public programme's areas are offered.
    expect(view.body.options.areas).not.toContain("Strongroom");
    expect(view.body.options.systems).toContain("cooling");

    const changed = await c.agent.patch(`/api/subscriptions/preferences/${token}`).set("X-CSRF-Token", c.csrf).send({ frequency: "monthly", topics: { areas: ["Hall 9A"], systems: ["power", "power"] } });
    expect(changed.status).toBe(200);
    expect(changed.body).toMatchObject({ frequency: "monthly", topics: { areas: ["Hall 9A"], systems: ["power"] } });
    const row = await rowOf(email);
    expect(row.frequency).toBe("monthly");
    expect(row.topics_key).toMatch(/^[0-9a-f]{64}$/);

    const unknownArea = await c.agent.patch(`/api/subscriptions/preferences/${token}`).set("X-CSRF-Token", c.csrf).send({ topics: { areas: ["Strongroom"], systems: [] } });
    expect(unknownArea.status).toBe(400);
    expect(unknownArea.body.error.fields["topics.areas"]).toMatch(/Strongroom/);
    const unknownField = await c.agent.patch(`/api/subscriptions/preferences/${token}`).set("X-CSRF-Token", c.csrf).send({ frequency: "daily", status: "confirmed" });
    expect(unknownField.status).toBe(400);
    expect(unknownField.body.error.fields).toMatchObject({ frequency: expect.any(String), status: "is not a known field" });
    expect(await rowOf(email)).toMatchObject({ frequency: "monthly", topics_key: row.topics_key });

    const left = await c.agent.post(`/api/subscriptions/preferences/${token}/unsubscribe`).set("X-CSRF-Token", c.csrf).send({});
    expect(left.body).toEqual({ status: "unsubscribed" });
    const after = await c.agent.patch(`/api/subscriptions/preferences/${token}`).set("X-CSRF-Token", c.csrf).send({ frequency: "weekly" });
    expect(after.status).toBe(409);
    expect((await rowOf(email)).status).toBe("unsubscribed");
  });
});

describe("bad input is refused with the fixed error shape and writes nothing", () => {
  it("refuses unknown fields, bad values, unknown areas and an unknown project", async () => {
    const email = address("bad");
    const cases: Array<[Record<string, unknown>, number, string]> = [
      [{ interest: "spy" }, 400, "interest"],
      [{ frequency: "hourly" }, 400, "frequency"],
      [{ email: "not-an-address" }, 400, "email"],
      [{ colour: "orange" }, 400, "colour"],
      [{ topics: { areas: [], systems: [] } }, 400, "topics"],
      [{ topics: { areas: ["Strongroom"], systems: [] } }, 400, "topics.areas"],
      [{ topics: { areas: [], systems: ["plumbing"] } }, 400, "topics.systems.0"],
      [{ name: "" }, 400, "name"],
    ];
    for (const [patch, status, field] of cases) {
      const res = await subscribe(email, patch);
      expect(res.status, JSON.stringify(patch)).toBe(status);
      expect(res.body.error.code).toBe("validation");
      expect(res.body.error.fields[field], JSON.stringify(res.body)).toEqual(expect.any(String));
    }
    const noProject = await subscribe(email, { projectSlug: "no-such-project" });
    expect(noProject.status).toBe(404);
    expect(await t.db("subscribers").where({ email }).first()).toBeUndefined();
  });
});

describe("unconfirmed addresses are purged after 30 days", () => {
  it("the sweep removes rows pending for more than 30 days and keeps newer and confirmed ones", async () => {
    const old = address("purge-old");
    const recent = address("purge-recent");
    const kept = address("purge-confirmed");
    await subscribe(old);
    await subscribe(recent);
    await confirmed(kept);
    const now = new Date("2031-06-30T12:00:00Z");
    await t.db("subscribers").where({ email: old }).update({ pending_since: new Date(now.getTime() - 30 * 86_400_000 - 60_000) });
    await t.db("subscribers").where({ email: recent }).update({ pending_since: new Date(now.getTime() - 29 * 86_400_000) });
    await t.db("subscribers").where({ email: kept }).update({ created_at: new Date("2031-01-01T00:00:00Z") });
    const purged = await t.plumbline.subscribers.purgeUnconfirmed(now);
    expect(purged).toBeGreaterThanOrEqual(1);
    expect(await rowOf(old)).toBeUndefined();
    expect((await rowOf(recent))?.status).toBe("pending");
    expect((await rowOf(kept))?.status).toBe("confirmed");
  });
});

describe("GET /api/projects/:slug/subscription-options", () => {
  it("gives the consent wording with its version, the public areas and the systems", async () => {
    const res = await (await newClient(t)).agent.get(`/api/projects/${slug}/subscription-options`).expect(200);
    expect(res.body).toEqual({
      project: { slug, name: "Test Campus, Phase 9", operatorName: "Kestrel Colocation" },
      consent: { version: CONSENT.version, text: CONSENT.text },
      areas: ["Hall 9A"],
      systems: ["building", "cooling", "power", "fuel", "security", "fit-out", "commissioning"],
    });
  });
});
