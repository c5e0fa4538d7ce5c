import { randomBytes } from "node:crypto";
import { simpleParser } from "mailparser";
import nodemailer from "nodemailer";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, DEMO, lastMailId, newClient, signIn, startTestApp, waitForMail, type Agent, type TestApp } from "../helpers/app.ts";

// The outbox shows what Plumbline mailed. Its messages hold other people's single-use links, so
// only administrators read it, and even they see every secret masked (the sink keeps the original).

const PUBLIC = "http://plumbline.test";
const HOST = PUBLIC.replace(/\./g, "\\.");

let t: TestApp;
let admin: { agent: Agent; csrf: string };
let slug: string;

beforeAll(async () => {
  t = await startTestApp({ MAIL_UNSUBSCRIBE_MAILTO: "unsubscribe@kestrel.example", SUBSCRIBE_LIMIT_PER_IP: "100000", SUBSCRIBE_LIMIT_PER_ADDRESS: "100000" });
  admin = await signIn(t, DEMO.admin);
  slug = `outbox-${randomBytes(3).toString("hex")}`;
  const [id] = await t.db("projects").insert({ slug, name: "Test Campus, Phase 7", operator_name: "Kestrel Colocation", postal_address: "1 Example Way, Aldermere (invented)", time_zone: "Europe/London" });
  const [phaseId] = await t.db("phases").insert({ project_id: Number(id), name: "Fit-out", sort_order: 1 });
  await t.db("milestones").insert({ project_id: Number(id), phase_id: phaseId, name: "Hall 7A containment", area: "Hall 7A", system: "fit-out", weight: 1, baseline_finish: "2027-03-01", audience: "public" });
});
afterAll(async () => {
  await t.close();
});

let n = 0;
const address = (tag: string) => `${tag}-${Date.now().toString(36)}-${++n}@example.org`;

/** The token after `path` in a stored message (read from the sink's own row, as the recipient gets it). */
function tokenIn(text: string, path: string): string {
  const m = text.match(new RegExp(`${HOST}/${path}/([A-Za-z0-9_.-]+)`));
  if (!m) throw new Error(`no ${path} link in:\n${text}`);
  return m[1]!;
}

/** Everything the administrator's outbox shows of one message: list entry, detail, raw download (and its decoded parts). */
async function adminViews(to: string) {
  const list = await admin.agent.get(`/api/outbox?to=${encodeURIComponent(to)}`).expect(200);
  const id = list.body[0].id as number;
  const detail = await admin.agent.get(`/api/outbox/${id}`).expect(200);
  const raw = await admin.agent.get(`/api/outbox/${id}/raw`).buffer(true).parse((res, cb) => {
    const chunks: Buffer[] = [];
    res.on("data", (c: Buffer) => chunks.push(c));
    res.on("end", () => cb(null, Buffer.concat(chunks)));
  });
  expect(raw.status).toBe(200);
  expect(raw.headers["content-type"]).toMatch(/message\/rfc822/);
  const rawText = (raw.body as Buffer).toString("latin1");
  const parsed = await simpleParser(raw.body as Buffer);
  // The download is still a well-formed message: its decoded parts are what the detail view shows.
  expect(parsed.text ?? "").toBe(detail.body.text);
  expect(parsed.html || "").toBe(detail.body.html);
  return {
    id,
    detail: detail.body as { text: string; html: string; headers: Record<string, string> },
    all: [
      JSON.stringify(list.body),
      JSON.stringify(detail.body),
      rawText,
      // Quoted-printable soft line breaks split a token across lines: join them before looking.
      rawText.replace(/=\r?\n/g, ""),
      parsed.text ?? "",
      String(parsed.html ?? ""),
      JSON.stringify([...parsed.headers.entries()]),
      parsed.headerLines.map((h) => h.line.replace(/\r?\n[ \t]+/g, " ")).join("\n"),
    ],
  };
}

/** No view holds the token, nor any long piece of it. */
function expectHidden(views: string[], token: string) {
  for (const v of views) {
    expect(v).not.toContain(token);
    expect(v).not.toContain(token.slice(4, 20));
    expect(v).not.toContain(token.slice(-16));
  }
}

/** What the administrator's view shows in place of the token after `path`. */
function shownAfter(text: string, path: string): string {
  const m = text.match(new RegExp(`${HOST}/${path}/(\\S+?)(?=[\\s"<>]|$)`));
  if (!m) throw new Error(`no ${path} link in the outbox view:\n${text}`);
  return m[1]!;
}

const refused = (status: number) => expect([400, 404, 410]).toContain(status);

describe("who reads the outbox", () => {
  it("only administrators: lead, marketing and investor get 403 and visitors 401 on every outbox route", async () => {
    const before = await lastMailId(t);
    await t.mailer.send({ to: "someone@example.org", subject: "Anything", text: "x", html: "<p>x</p>" });
    const id = (await waitForMail(t, "someone@example.org", before)).id;
    const routes = ["/api/outbox", `/api/outbox?to=${encodeURIComponent(DEMO.admin)}`, `/api/outbox/${id}`, `/api/outbox/${id}/raw`];
    const callers = {
      lead: await signIn(t, DEMO.lead),
      marketing: await signIn(t, DEMO.marketing),
      investor: await signIn(t, DEMO.investor),
      anotherLead: await signIn(t, (await createUser(t, "lead")).email, "a-long-test-password-42"),
    };
    for (const path of routes) {
      for (const [who, c] of Object.entries(callers)) {
        const res = await c.agent.get(path);
        expect(res.status, `${who} ${path}`).toBe(403);
        expect(res.body.error.code).toBe("forbidden");
        expect(JSON.stringify(res.body)).not.toContain("someone@example.org");
      }
      const anonymous = await request(t.plumbline.app).get(path);
      expect(anonymous.status, `anonymous ${path}`).toBe(401);
      expect(anonymous.body.error.code).toBe("unauthenticated");
      expect((await admin.agent.get(path)).status, `admin ${path}`).toBe(200);
    }
  });

  it("the marketing takeover path is closed: a reset for the admin cannot be read by marketing", async () => {
    const marketing = await signIn(t, DEMO.marketing);
    const guest = await newClient(t);
    await guest.agent.post("/api/auth/password-reset").set("X-CSRF-Token", guest.csrf).send({ email: DEMO.admin }).expect(202);
    const res = await marketing.agent.get(`/api/outbox?to=${encodeURIComponent(DEMO.admin)}`);
    expect(res.status).toBe(403);
  });
});

describe("secrets in the outbox are masked", () => {
  it("a password reset: no view holds the token; following what is shown is refused; the password is unchanged", async () => {
    const u = await createUser(t, "admin");
    const before = await lastMailId(t);
    const guest = await newClient(t);
    await guest.agent.post("/api/auth/password-reset").set("X-CSRF-Token", guest.csrf).send({ email: u.email }).expect(202);
    const stored = await waitForMail(t, u.email, before);
    const token = tokenIn(stored.text, "reset-password");
    // The sink's own copy keeps the working link.
    expect(stored.html).toContain(token);

    const v = await adminViews(u.email);
    expectHidden(v.all, token);
    const shown = shownAfter(v.detail.text, "reset-password");
    expect(shown).toMatch(/\[hidden\]$/);
    expect(shownAfter(v.detail.html, "reset-password")).toBe(shown);

    for (const attempt of [shown, encodeURIComponent(shown), shown.replace(/\.\.\.\[hidden\]$/, "")]) {
      const res = await guest.agent.post(`/api/auth/password-reset/${attempt}`).set("X-CSRF-Token", guest.csrf).send({ password: "taken-over-by-someone-9" });
      refused(res.status);
      expect(res.body.error).toBeDefined();
    }
    await signIn(t, u.email, u.password);
    // The real link still works for its owner.
    const own = await newClient(t);
    await own.agent.post(`/api/auth/password-reset/${token}`).set("X-CSRF-Token", own.csrf).send({ password: "owner-chose-this-one-7" }).expect(200);
  });

  it("an invitation (admin role): no view holds the token; following what is shown is refused", async () => {
    const email = address("invitee");
    const before = await lastMailId(t);
    await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email, role: "admin" }).expect(201);
    const stored = await waitForMail(t, email, before);
    const token = tokenIn(stored.text, "invitations");
    const v = await adminViews(email);
    expectHidden(v.all, token);
    const shown = shownAfter(v.detail.text, "invitations");
    const guest = await newClient(t);
    refused((await guest.agent.get(`/api/auth/invitations/${shown}`)).status);
    refused((await guest.agent.get(`/api/auth/invitations/${encodeURIComponent(shown)}`)).status);
    const accept = await guest.agent.post(`/api/auth/invitations/${encodeURIComponent(shown)}/accept`).set("X-CSRF-Token", guest.csrf).send({ name: "Mallory", password: "a-takeover-passphrase-1" });
    refused(accept.status);
    expect(await t.db("users").where({ email }).first()).toBeUndefined();
    await guest.agent.get(`/api/auth/invitations/${token}`).expect(200);
  });

  it("a subscription confirmation and the welcome's preference and one-click links (body and List-Unsubscribe): all masked and refused", async () => {
    const email = address("subscriber");
    const c = await newClient(t);
    let before = await lastMailId(t);
    await c.agent.post("/api/subscriptions").set("X-CSRF-Token", c.csrf).send({ email, name: "Ada Fenwick", interest: "prospect", frequency: "weekly", projectSlug: slug }).expect(202);
    const confirmation = await waitForMail(t, email, before);
    const confirmToken = tokenIn(confirmation.text, "subscriptions/confirm");
    const cv = await adminViews(email);
    expectHidden(cv.all, confirmToken);
    const shownConfirm = shownAfter(cv.detail.text, "subscriptions/confirm");
    refused((await c.agent.post(`/api/subscriptions/confirm/${encodeURIComponent(shownConfirm)}`).set("X-CSRF-Token", c.csrf).send({})).status);
    expect((await t.db("subscribers").where({ email }).first()).confirmed_at).toBeNull();

    before = await lastMailId(t);
    await c.agent.post(`/api/subscriptions/confirm/${confirmToken}`).set("X-CSRF-Token", c.csrf).send({}).expect(200);
    const welcome = await waitForMail(t, email, before);
    const prefs = tokenIn(welcome.text + welcome.html, "subscriptions/preferences");
    const rawRow = await t.db("mail_messages").where({ id: welcome.id }).first("headers");
    const oneClick = tokenIn(JSON.parse(String(rawRow.headers))["list-unsubscribe"], "u");

    const wv = await adminViews(email);
    expectHidden(wv.all, prefs);
    expectHidden(wv.all, oneClick);
    expect(wv.detail.headers["list-unsubscribe"]).toMatch(/\/u\/\S*\[hidden\]>/);
    expect(wv.detail.headers["list-unsubscribe"]).toContain("<mailto:unsubscribe@kestrel.example?subject=unsubscribe>");

    const shownPrefs = shownAfter(wv.detail.text + wv.detail.html, "subscriptions/preferences");
    refused((await c.agent.get(`/api/subscriptions/preferences/${encodeURIComponent(shownPrefs)}`)).status);
    const shownOneClick = shownAfter(wv.detail.headers["list-unsubscribe"]!, "u").replace(/>.*$/, "");
    const post = await request(t.plumbline.app).post(`/u/${encodeURIComponent(shownOneClick)}`).type("form").send("List-Unsubscribe=One-Click");
    refused(post.status);
    expect((await t.db("subscribers").where({ email }).first()).unsubscribed_at ?? null).toBeNull();
  });

  it("digest web copies and signed picture links are masked, even in a base64 body and a 7bit message", async () => {
    const web = `${"eyJjIjoxLCJzIjoyLCJlIjoxODkzNDU2MDAwfQ"}.${randomBytes(32).toString("base64url")}`;
    const sig = randomBytes(32).toString("base64url");
    const picture = `/media/s/0123456789abcdef-640w.webp?exp=1893456000&sig=${sig}`;
    const to = address("digest");
    const sink = nodemailer.createTransport({ host: t.sink.host, port: t.sink.port, ignoreTLS: true, secure: false });
    try {
      // A base64 text part and a quoted-printable HTML part.
      let before = await lastMailId(t);
      await sink.sendMail({
        from: "progress@kestrel.example",
        to,
        subject: "Week 48",
        textEncoding: "base64",
        text: `Read it on the web: ${PUBLIC}/api/digests/web/${web}\nPicture: ${PUBLIC}${picture}\n`,
        html: `<p><a href="${PUBLIC}/api/digests/web/${web}">Read it on the web</a></p><img src="${PUBLIC}${picture.replace("&", "&amp;")}" alt="Chillers">`,
      });
      await waitForMail(t, to, before);
      let v = await adminViews(to);
      expectHidden(v.all, web);
      expectHidden(v.all, sig);
      const shownWeb = shownAfter(v.detail.text, "api/digests/web");
      refused((await request(t.plumbline.app).get(`/api/digests/web/${encodeURIComponent(shownWeb)}`)).status);
      const shownPicture = v.detail.text.match(/\/media\/s\/\S+/)![0];
      expect(shownPicture).toMatch(/^\/media\/s\/0123456789abcdef-640w\.webp\?exp=1893456000&sig=\S*\[hidden\]$/);
      const [path, query] = shownPicture.split("?");
      const pictureRes = await request(t.plumbline.app).get(`${path}?${query!.replace("[hidden]", encodeURIComponent("[hidden]"))}`);
      expect([400, 403, 404, 410]).toContain(pictureRes.status);

      // A hand-written 7bit message: no transfer encoding to undo, a folded List-Unsubscribe header.
      before = await lastMailId(t);
      const reset = randomBytes(32).toString("base64url");
      const raw = [
        "From: progress@kestrel.example",
        `To: ${to}`,
        "Subject: Plain",
        `List-Unsubscribe:\r\n <${PUBLIC}/u/${web}>`,
        "MIME-Version: 1.0",
        "Content-Type: text/plain; charset=us-ascii",
        "Content-Transfer-Encoding: 7bit",
        "",
        `Choose a new password: ${PUBLIC}/reset-password/${reset}`,
        "",
      ].join("\r\n");
      await sink.sendMail({ envelope: { from: "progress@kestrel.example", to: [to] }, raw });
      await waitForMail(t, to, before);
      v = await adminViews(to);
      expectHidden(v.all, reset);
      expectHidden(v.all, web);
      expect(v.all[2]).toContain("Content-Transfer-Encoding: 7bit");
      expect(v.all[2]).toMatch(/\/reset-password\/\S{4}\.\.\.\[hidden\]/);
    } finally {
      sink.close();
    }
  });
});
