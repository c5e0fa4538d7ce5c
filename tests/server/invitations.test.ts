import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, DEMO, lastMailId, newClient, signIn, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

const linkIn = (text: string, path: string) => {
  const m = text.match(new RegExp(`http://plumbline\\.test(/${path}/[A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no /${path}/ link in:\n${text}`);
  return m[1]!;
};

describe("invitation flow through the real SMTP sink", () => {
  it("invite → stored e-mail → follow its link → set a password → signed in → sign in again", async () => {
    const admin = await signIn(t, DEMO.admin);
    const email = `invitee-${Date.now()}@kestrel.example`;
    const before = await lastMailId(t);
    const inv = await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email, role: "marketing" });
    expect(inv.status).toBe(201);

    const mail = await waitForMail(t, email, before);
    expect(mail.subject).toMatch(/invitation/i);
    expect(mail.html).toContain("<a href=");
    const path = linkIn(mail.text, "invitations");
    const token = path.split("/").pop()!;

    // The outbox API shows it, with both parts and headers.
    const outbox = await admin.agent.get(`/api/outbox?to=${encodeURIComponent(email)}`).expect(200);
    expect(outbox.body).toHaveLength(1);
    expect(outbox.body[0]).toMatchObject({ to: email, subject: mail.subject });
    expect(outbox.body[0].headers["content-type"]).toMatch(/multipart\/alternative/);
    const raw = await admin.agent.get(`/api/outbox/${outbox.body[0].id}/raw`).expect(200);
    expect(raw.headers["content-type"]).toMatch(/message\/rfc822/);
    // Even the administrator sees the link masked; the recipient's copy (read from the sink above) keeps it.
    expect(JSON.stringify(outbox.body)).not.toContain(token);
    expect(outbox.body[0].text).toMatch(/\/invitations\/\S+\[hidden\]/);

    // The page the link opens asks the API what the invitation is for.
    const guest = await newClient(t);
    const about = await guest.agent.get(`/api/auth/invitations/${token}`).expect(200);
    expect(about.body).toEqual({ email, role: "marketing" });

    // Too short, and too common, are refused, and nothing is created.
    const short = await guest.agent.post(`/api/auth/invitations/${token}/accept`).set("X-CSRF-Token", guest.csrf).send({ name: "Sam", password: "short" });
    expect(short.status).toBe(400);
    expect(short.body.error.fields.password).toMatch(/12 characters/);
    const common = await guest.agent.post(`/api/auth/invitations/${token}/accept`).set("X-CSRF-Token", guest.csrf).send({ name: "Sam", password: "password1234" });
    expect(common.status).toBe(400);
    expect(common.body.error.fields.password).toMatch(/common/);
    expect(await t.db("users").where({ email }).first()).toBeUndefined();

    const ok = await guest.agent.post(`/api/auth/invitations/${token}/accept`).set("X-CSRF-Token", guest.csrf).send({ name: "Sam Okafor", password: "tidal-brass-lantern-19" });
    expect(ok.status).toBe(201);
    expect(ok.body.user).toMatchObject({ email, role: "marketing", name: "Sam Okafor" });
    await guest.agent.get("/api/auth/me").expect(200);

    // Single use.
    const again = await newClient(t);
    const reuse = await again.agent.post(`/api/auth/invitations/${token}/accept`).set("X-CSRF-Token", again.csrf).send({ name: "X", password: "another-long-passphrase" });
    expect(reuse.status).toBe(410);

    await signIn(t, email, "tidal-brass-lantern-19");

    const log = await admin.agent.get("/api/audit").expect(200);
    const actions = log.body.filter((e: { targetLabel: string | null; actorEmail: string | null }) => e.targetLabel === email || e.actorEmail === email).map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(["invitation_sent", "invitation_accepted", "sign_in"]));
  });

  it("an expired invitation is refused with 410", async () => {
    const admin = await signIn(t, DEMO.admin);
    const email = `late-${Date.now()}@kestrel.example`;
    const before = await lastMailId(t);
    await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email, role: "lead" }).expect(201);
    const mail = await waitForMail(t, email, before);
    const token = linkIn(mail.text, "invitations").split("/").pop()!;
    await t.db("invitations").where({ email }).update({ expires_at: new Date(Date.now() - 1000) });
    const guest = await newClient(t);
    const res = await guest.agent.get(`/api/auth/invitations/${token}`);
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe("invitation_expired");
  });

  it("a new invitation to the same address ends the earlier one: its link answers 404 and cannot be accepted", async () => {
    const admin = await signIn(t, DEMO.admin);
    const email = `twice-${Date.now()}@kestrel.example`;
    let before = await lastMailId(t);
    await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email, role: "admin" }).expect(201);
    const first = linkIn((await waitForMail(t, email, before)).text, "invitations").split("/").pop()!;
    before = await lastMailId(t);
    await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email, role: "marketing" }).expect(201);
    const second = linkIn((await waitForMail(t, email, before)).text, "invitations").split("/").pop()!;
    expect(second).not.toBe(first);

    const guest = await newClient(t);
    const about = await guest.agent.get(`/api/auth/invitations/${first}`);
    expect(about.status).toBe(404);
    expect(about.body.error.code).toBe("invitation_invalid");
    const accept = await guest.agent.post(`/api/auth/invitations/${first}/accept`).set("X-CSRF-Token", guest.csrf).send({ name: "Early Bird", password: "an-early-long-passphrase" });
    expect(accept.status).toBe(404);
    expect(await t.db("users").where({ email }).first()).toBeUndefined();
    // The newer one works, with the newer role.
    const ok = await guest.agent.post(`/api/auth/invitations/${second}/accept`).set("X-CSRF-Token", guest.csrf).send({ name: "Late Bird", password: "a-later-long-passphrase" });
    expect(ok.status).toBe(201);
    expect(ok.body.user.role).toBe("marketing");
  });

  it("inviting an address that already has an account refuses with 409 and sends nothing", async () => {
    const admin = await signIn(t, DEMO.admin);
    const before = await lastMailId(t);
    const res = await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email: DEMO.lead, role: "lead" });
    expect(res.status).toBe(409);
    expect(await lastMailId(t)).toBe(before);
  });
});

describe("password reset flow through the real SMTP sink", () => {
  it("request → e-mail → new password → other sessions end → old password refused", async () => {
    const admin = await signIn(t, DEMO.admin);
    const email = `resetter-${Date.now()}@kestrel.example`;
    let before = await lastMailId(t);
    await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email, role: "lead" }).expect(201);
    const invite = await waitForMail(t, email, before);
    const inviteToken = linkIn(invite.text, "invitations").split("/").pop()!;
    const other = await newClient(t);
    await other.agent.post(`/api/auth/invitations/${inviteToken}/accept`).set("X-CSRF-Token", other.csrf).send({ name: "Rae Lindqvist", password: "first-long-passphrase-1" }).expect(201);
    await other.agent.get("/api/auth/me").expect(200);

    before = await lastMailId(t);
    const asker = await newClient(t);
    const req = await asker.agent.post("/api/auth/password-reset").set("X-CSRF-Token", asker.csrf).send({ email });
    expect(req.status).toBe(202);
    const unknown = await asker.agent.post("/api/auth/password-reset").set("X-CSRF-Token", asker.csrf).send({ email: "nobody@kestrel.example" });
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(req.body);

    const mail = await waitForMail(t, email, before);
    const token = linkIn(mail.text, "reset-password").split("/").pop()!;
    const done = await asker.agent.post(`/api/auth/password-reset/${token}`).set("X-CSRF-Token", asker.csrf).send({ password: "second-long-passphrase-2" });
    expect(done.status).toBe(200);
    expect(done.body.user.email).toBe(email);
    await asker.agent.get("/api/auth/me").expect(200);

    // The other session ended; the link is single use; the old password no longer works.
    await other.agent.get("/api/auth/me").expect(401);
    const reuse = await asker.agent.post(`/api/auth/password-reset/${token}`).set("X-CSRF-Token", asker.csrf).send({ password: "third-long-passphrase-3" });
    expect(reuse.status).toBe(410);
    const c = await newClient(t);
    await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email, password: "first-long-passphrase-1" }).expect(401);
    await signIn(t, email, "second-long-passphrase-2");
  });

  it("a second reset request ends the first link: the first answers 410 and changes nothing, the second works", async () => {
    const u = await createUser(t, "lead");
    const c = await newClient(t);
    let before = await lastMailId(t);
    await c.agent.post("/api/auth/password-reset").set("X-CSRF-Token", c.csrf).send({ email: u.email }).expect(202);
    const first = linkIn((await waitForMail(t, u.email, before)).text, "reset-password").split("/").pop()!;
    before = await lastMailId(t);
    await c.agent.post("/api/auth/password-reset").set("X-CSRF-Token", c.csrf).send({ email: u.email }).expect(202);
    const second = linkIn((await waitForMail(t, u.email, before)).text, "reset-password").split("/").pop()!;
    expect(second).not.toBe(first);

    // The reset page asks first (GET), without spending the link: the live one answers 200 every time, the ended one 410.
    await c.agent.get(`/api/auth/password-reset/${second}`).expect(200);
    await c.agent.get(`/api/auth/password-reset/${second}`).expect(200);
    expect((await c.agent.get(`/api/auth/password-reset/${first}`).expect(410)).body.error.code).toBe("reset_invalid");
    const stale = await c.agent.post(`/api/auth/password-reset/${first}`).set("X-CSRF-Token", c.csrf).send({ password: "from-the-stale-link-1" });
    expect(stale.status).toBe(410);
    expect(stale.body.error.code).toBe("reset_invalid");
    await signIn(t, u.email, u.password);
    await c.agent.post(`/api/auth/password-reset/${second}`).set("X-CSRF-Token", c.csrf).send({ password: "from-the-newest-link-2" }).expect(200);
    // Used, it is spent too.
    const reuse = await c.agent.post(`/api/auth/password-reset/${second}`).set("X-CSRF-Token", c.csrf).send({ password: "from-the-newest-link-3" });
    expect(reuse.status).toBe(410);
    await c.agent.get(`/api/auth/password-reset/${second}`).expect(410);
    await signIn(t, u.email, "from-the-newest-link-2");
  });

  it("a reset link older than one hour is refused", async () => {
    const email = DEMO.marketing;
    const before = await lastMailId(t);
    const c = await newClient(t);
    await c.agent.post("/api/auth/password-reset").set("X-CSRF-Token", c.csrf).send({ email }).expect(202);
    const mail = await waitForMail(t, email, before);
    const token = linkIn(mail.text, "reset-password").split("/").pop()!;
    await t.db("password_resets").whereNull("used_at").update({ expires_at: new Date(Date.now() - 1) });
    const res = await c.agent.post(`/api/auth/password-reset/${token}`).set("X-CSRF-Token", c.csrf).send({ password: "a-brand-new-passphrase" });
    expect(res.status).toBe(410);
    await signIn(t, email); // the demo password still works
  });
});
