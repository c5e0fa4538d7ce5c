import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, DEMO_PASSWORD, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

const anonymousRows = async () => Number((await t.db("sessions").whereNull("user_id").count({ n: "*" }).first())?.n ?? 0);
const csrfCookieOf = (res: request.Response) => String(res.headers["set-cookie"] ?? "").match(/plumbline\.csrf=([^;]+)/)?.[1];

describe("GET /api/auth/csrf", () => {
  it("20 anonymous fetches store no session row, and each token still signs in", async () => {
    const before = await anonymousRows();
    const clients = [];
    for (let i = 0; i < 20; i++) {
      const res = await request(t.plumbline.app).get("/api/auth/csrf").expect(200);
      expect(res.body.token).toMatch(/^[A-Za-z0-9_-]{43}$/);
      expect(res.headers["cache-control"]).toMatch(/no-store/);
      expect(String(res.headers["set-cookie"])).not.toMatch(/plumbline\.sid=/);
      const cookie = csrfCookieOf(res);
      expect(cookie).toBeTruthy();
      expect(String(res.headers["set-cookie"])).toMatch(/HttpOnly/i);
      clients.push({ token: res.body.token as string, cookie: cookie! });
    }
    expect(await anonymousRows()).toBe(before);
    expect(new Set(clients.map((c) => c.token)).size).toBe(20);
    const c = clients[7]!;
    const login = await request(t.plumbline.app).post("/api/auth/login").set("Cookie", `plumbline.csrf=${c.cookie}`).set("X-CSRF-Token", c.token).send({ email: DEMO.lead, password: DEMO_PASSWORD });
    expect(login.status).toBe(200);
  });

  it("a browser that already has its cookie gets the same token again (one fetch per page load is enough)", async () => {
    const { agent, csrf } = await newClient(t);
    const again = await agent.get("/api/auth/csrf").expect(200);
    expect(again.body.token).toBe(csrf);
    expect(again.headers["set-cookie"]).toBeUndefined();
  });
});

describe("the CSRF check on state-changing requests", () => {
  it("a missing token, a wrong token, a token without its cookie and a token beside another browser's cookie are all 403 csrf, and nothing signs in", async () => {
    const a = await newClient(t);
    const b = await newClient(t);
    const bCookie = csrfCookieOf(await request(t.plumbline.app).get("/api/auth/csrf"));
    const attempts = [
      a.agent.post("/api/auth/login").send({ email: DEMO.lead, password: DEMO_PASSWORD }),
      a.agent.post("/api/auth/login").set("X-CSRF-Token", `${a.csrf.slice(0, -1)}${a.csrf.endsWith("A") ? "B" : "A"}`).send({ email: DEMO.lead, password: DEMO_PASSWORD }),
      a.agent.post("/api/auth/login").set("X-CSRF-Token", b.csrf).send({ email: DEMO.lead, password: DEMO_PASSWORD }),
      request(t.plumbline.app).post("/api/auth/login").set("X-CSRF-Token", a.csrf).send({ email: DEMO.lead, password: DEMO_PASSWORD }),
      request(t.plumbline.app).post("/api/auth/login").set("Cookie", `plumbline.csrf=${bCookie}`).set("X-CSRF-Token", a.csrf).send({ email: DEMO.lead, password: DEMO_PASSWORD }),
      request(t.plumbline.app).post("/api/auth/login").set("Cookie", "plumbline.csrf=not-a-cookie-value").set("X-CSRF-Token", a.csrf).send({ email: DEMO.lead, password: DEMO_PASSWORD }),
    ];
    for (const [i, attempt] of attempts.entries()) {
      const res = await attempt;
      expect(res.status, `attempt ${i}`).toBe(403);
      expect(res.body.error.code).toBe("csrf");
      expect(String(res.headers["set-cookie"] ?? "")).not.toMatch(/plumbline\.sid=/);
    }
    await a.agent.get("/api/auth/me").expect(401);
  });

  it("the token fetched before sign-in keeps working after it; after sign-out it no longer does", async () => {
    const c = await signIn(t, DEMO.marketing);
    const me = await c.agent.get("/api/auth/me").expect(200);
    expect(me.body.user.email).toBe(DEMO.marketing);
    const out = await c.agent.post("/api/auth/logout").set("X-CSRF-Token", c.csrf).expect(204);
    expect(String(out.headers["set-cookie"])).toMatch(/plumbline\.csrf=;/);
    const again = await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email: DEMO.marketing, password: DEMO_PASSWORD });
    expect(again.status).toBe(403);
    expect(again.body.error.code).toBe("csrf");
  });

  it("the RFC 8058 one-click POST needs no CSRF token (it carries its own signed token)", async () => {
    const res = await request(t.plumbline.app).post(`/u/${"a".repeat(20)}.${"a".repeat(43)}`).type("form").send("List-Unsubscribe=One-Click");
    expect(res.status).not.toBe(403);
    expect([400, 404]).toContain(res.status);
  });
});
