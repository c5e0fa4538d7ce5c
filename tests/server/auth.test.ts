import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createUser, DEMO, DEMO_PASSWORD, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

describe("POST /api/auth/login", () => {
  it("signs a demo user in, sets an httpOnly SameSite=Lax cookie, and /me names them", async () => {
    const { agent, csrf } = await newClient(t);
    const res = await agent.post("/api/auth/login").set("X-CSRF-Token", csrf).send({ email: DEMO.lead, password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: DEMO.lead, role: "lead", name: expect.any(String), id: expect.any(Number) });
    const cookie = String(res.headers["set-cookie"]);
    expect(cookie).toMatch(/plumbline\.sid=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    const me = await agent.get("/api/auth/me").expect(200);
    expect(me.body.user.email).toBe(DEMO.lead);
  });

  it("GET /api/auth/session answers a visitor 200 with no user (not a failed load), and names whoever is signed in", async () => {
    const { agent, csrf } = await newClient(t);
    const visitor = await agent.get("/api/auth/session").expect(200);
    expect(visitor.body).toEqual({ user: null });
    expect(visitor.headers["cache-control"]).toBe("private, no-store");
    await agent.post("/api/auth/login").set("X-CSRF-Token", csrf).send({ email: DEMO.lead, password: DEMO_PASSWORD }).expect(200);
    expect((await agent.get("/api/auth/session").expect(200)).body.user).toMatchObject({ email: DEMO.lead, role: "lead" });
  });

  it("regenerates the session id at sign-in (no fixation): a planted session id is not the one the sign-in gets", async () => {
    const sidOf = (res: request.Response) => String(res.headers["set-cookie"]).match(/plumbline\.sid=([^;]+)/)?.[1];
    const csrfCookieOf = (res: request.Response) => String(res.headers["set-cookie"]).match(/plumbline\.csrf=([^;]+)/)?.[1];
    // The attacker's own signed-in session id, planted in the victim's browser before the victim signs in.
    const attacker = await newClient(t);
    const planted = sidOf(await attacker.agent.post("/api/auth/login").set("X-CSRF-Token", attacker.csrf).send({ email: DEMO.marketing, password: DEMO_PASSWORD }).expect(200));
    expect(planted).toBeTruthy();
    const first = await request(t.plumbline.app).get("/api/auth/csrf").expect(200);
    const cookie = `plumbline.sid=${planted}; plumbline.csrf=${csrfCookieOf(first)}`;
    const login = await request(t.plumbline.app).post("/api/auth/login").set("Cookie", cookie).set("X-CSRF-Token", first.body.token).send({ email: DEMO.admin, password: DEMO_PASSWORD }).expect(200);
    const after = sidOf(login);
    expect(after).toBeTruthy();
    expect(after).not.toBe(planted);
    // The planted id ended with the regeneration: it never names the victim's session.
    const attackerMe = await attacker.agent.get("/api/auth/me");
    expect(attackerMe.status).toBe(401);
    expect(await t.db("sessions").where({ sid: planted! }).first()).toBeUndefined();
  });

  it("gives the same answer for a wrong password and an unknown address", async () => {
    const a = await newClient(t);
    const wrong = await a.agent.post("/api/auth/login").set("X-CSRF-Token", a.csrf).send({ email: DEMO.lead, password: "not-the-password" });
    const b = await newClient(t);
    const unknown = await b.agent.post("/api/auth/login").set("X-CSRF-Token", b.csrf).send({ email: "nobody@kestrel.example", password: "not-the-password" });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.code).toBe("invalid_credentials");
  });

  it("without the CSRF token refuses with 403 code csrf and does not sign in", async () => {
    const agent = request.agent(t.plumbline.app);
    await agent.get("/api/auth/csrf");
    const res = await agent.post("/api/auth/login").send({ email: DEMO.lead, password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe("csrf");
    await agent.get("/api/auth/me").expect(401);
  });

  it("with a token from another session refuses with 403 code csrf", async () => {
    const a = await newClient(t);
    const b = await newClient(t);
    const res = await a.agent.post("/api/auth/login").set("X-CSRF-Token", b.csrf).send({ email: DEMO.lead, password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe("csrf");
  });

  it("records sign-in and failed sign-in in the audit log with the IP", async () => {
    const u = await createUser(t, "marketing");
    const a = await newClient(t);
    await a.agent.post("/api/auth/login").set("X-CSRF-Token", a.csrf).send({ email: u.email, password: "wrong-password-here" }).expect(401);
    await a.agent.post("/api/auth/login").set("X-CSRF-Token", a.csrf).send({ email: u.email, password: u.password }).expect(200);
    const admin = await signIn(t, DEMO.admin);
    const log = await admin.agent.get("/api/audit").expect(200);
    const mine = log.body.filter((e: { actorEmail: string }) => e.actorEmail === u.email);
    expect(mine.map((e: { action: string }) => e.action)).toEqual(["sign_in", "sign_in_failed"]);
    expect(mine[0].ip).toMatch(/127\.0\.0\.1/);
  });
});

describe("sign-in rate limits", () => {
  it("after too many failures for one account, refuses with 429 even with the right password", async () => {
    const limited = await startTestApp({ LOGIN_LIMIT_PER_ACCOUNT: "3", LOGIN_LIMIT_PER_IP: "1000" });
    try {
      const u = await createUser(limited, "lead");
      const c = await newClient(limited);
      for (let i = 0; i < 3; i++) {
        await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email: u.email, password: "wrong-password-x" }).expect(401);
      }
      const res = await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email: u.email, password: u.password });
      expect(res.status).toBe(429);
      expect(res.body.error.code).toBe("rate_limited");
      // Another account from the same address is not affected.
      await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email: DEMO.marketing, password: DEMO_PASSWORD }).expect(200);
    } finally {
      await limited.close();
    }
  });

  it("after too many attempts from one IP, refuses with 429", async () => {
    const limited = await startTestApp({ LOGIN_LIMIT_PER_IP: "4", LOGIN_LIMIT_PER_ACCOUNT: "1000" });
    try {
      await limited.plumbline.rateLimits.ip.resetAll();
      const c = await newClient(limited);
      const statuses: number[] = [];
      for (let i = 0; i < 6; i++) {
        const r = await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email: `x${i}@test.example`, password: "whatever-password" });
        statuses.push(r.status);
      }
      expect(statuses).toEqual([401, 401, 401, 401, 429, 429]);
    } finally {
      await limited.plumbline.rateLimits.ip.resetAll();
      await limited.close();
    }
  });
});

describe("ending sessions", () => {
  it("POST /api/auth/logout answers 204 and the session no longer works", async () => {
    const { agent, csrf } = await signIn(t, DEMO.marketing);
    await agent.get("/api/auth/me").expect(200);
    await agent.post("/api/auth/logout").set("X-CSRF-Token", csrf).expect(204);
    await agent.get("/api/auth/me").expect(401);
    await agent.get("/api/outbox").expect(401);
  });

  it("when an admin disables a user, that user's open session ends at once", async () => {
    const u = await createUser(t, "lead");
    const victim = await signIn(t, u.email, u.password);
    await victim.agent.get("/api/auth/me").expect(200);
    const admin = await signIn(t, DEMO.admin);
    const res = await admin.agent.patch(`/api/users/${u.id}`).set("X-CSRF-Token", admin.csrf).send({ disabled: true }).expect(200);
    expect(res.body.disabled).toBe(true);
    await victim.agent.get("/api/auth/me").expect(401);
    const rows = await t.db("sessions").where({ user_id: u.id });
    expect(rows).toHaveLength(0);
    // and cannot sign in again
    const again = await newClient(t);
    const r = await again.agent.post("/api/auth/login").set("X-CSRF-Token", again.csrf).send({ email: u.email, password: u.password });
    expect(r.status).toBe(401);
  });

  it("a role change takes effect on the user's next request", async () => {
    const u = await createUser(t, "lead");
    const user = await signIn(t, u.email, u.password);
    await user.agent.get("/api/subscribers").expect(200);
    const admin = await signIn(t, DEMO.admin);
    await admin.agent.patch(`/api/users/${u.id}`).set("X-CSRF-Token", admin.csrf).send({ role: "investor" }).expect(200);
    await user.agent.get("/api/subscribers").expect(403);
    const me = await user.agent.get("/api/auth/me").expect(200);
    expect(me.body.user.role).toBe("investor");
  });

  it("an admin cannot disable themself or remove the last administrator", async () => {
    const admin = await signIn(t, DEMO.admin);
    const me = await admin.agent.get("/api/auth/me");
    const res = await admin.agent.patch(`/api/users/${me.body.user.id}`).set("X-CSRF-Token", admin.csrf).send({ disabled: true });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe("self_lockout");
  });
});

describe("session lifetimes and cookies", () => {
  it("a sign-in older than the absolute lifetime ends, however active", async () => {
    const u = await createUser(t, "marketing");
    const c = await signIn(t, u.email, u.password);
    await c.agent.get("/api/auth/me").expect(200);
    const row = await t.db("sessions").where({ user_id: u.id }).first();
    const sess = JSON.parse(row.sess);
    sess.signedInAt = Date.now() - (t.config.SESSION_ABSOLUTE_HOURS * 3_600_000 + 60_000);
    await t.db("sessions").where({ sid: row.sid }).update({ sess: JSON.stringify(sess) });
    await c.agent.get("/api/auth/me").expect(401);
  });

  it("a session idle longer than the idle lifetime is gone", async () => {
    const u = await createUser(t, "lead");
    const c = await signIn(t, u.email, u.password);
    await t.db("sessions").where({ user_id: u.id }).update({ expires_at: new Date(Date.now() - 1000) });
    await c.agent.get("/api/auth/me").expect(401);
  });

  it("behind a trusted HTTPS proxy the cookie is Secure; over plain HTTP it is not", async () => {
    const proxied = await startTestApp({ TRUST_PROXY: "1" });
    try {
      const overHttps = await request(proxied.plumbline.app).get("/api/auth/csrf").set("X-Forwarded-Proto", "https");
      expect(String(overHttps.headers["set-cookie"])).toMatch(/;\s*Secure/i);
      const overHttp = await request(proxied.plumbline.app).get("/api/auth/csrf");
      expect(String(overHttp.headers["set-cookie"])).not.toMatch(/;\s*Secure/i);
    } finally {
      await proxied.close();
    }
  });
});
