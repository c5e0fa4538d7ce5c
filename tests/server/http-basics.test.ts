import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { pino } from "pino";
import { loadConfig } from "../../server/config.ts";
import { createDb } from "../../server/db/knex.ts";
import { createMailer } from "../../server/mail/mail.service.ts";
import { DEMO, newClient, signIn, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPlumbline } from "../helpers/plumbline.ts";

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ BODY_LIMIT: "10kb" });
});
afterAll(async () => {
  await t.close();
});

describe("GET /api/health", () => {
  it("answers { ok: true, db: 'up' }", async () => {
    const res = await request(t.plumbline.app).get("/api/health").expect(200);
    expect(res.body).toEqual({ ok: true, db: "up" });
  });

  it("answers 503 { ok: false, db: 'down' } when the database cannot be reached", async () => {
    const config = loadConfig({ DATABASE_URL: "mysql://nobody:x@127.0.0.1:1/none", SESSION_SECRET: "0123456789abcdef0123", LOG_LEVEL: "silent" });
    const logger = pino({ level: "silent" });
    const db = createDb(config.DATABASE_URL);
    const mailer = createMailer({ smtpUrl: "smtp://127.0.0.1:1", from: config.MAIL_FROM, mode: "local", logger });
    const down = createPlumbline({ db, config, logger, mailer });
    try {
      const res = await request(down.app).get("/api/health");
      expect(res.status).toBe(503);
      expect(res.body).toEqual({ ok: false, db: "down" });
    } finally {
      await down.close();
      mailer.close();
      await db.destroy();
    }
  });
});

describe("bad input gets the fixed error shape and writes nothing", () => {
  it("malformed JSON → 400 malformed_json", async () => {
    const c = await newClient(t);
    const res = await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).set("Content-Type", "application/json").send("{not json");
    expect(res.status).toBe(400);
    expect(res.body).toEqual({ error: { code: "malformed_json", message: expect.any(String) } });
  });

  it("a body over the limit → 413 payload_too_large", async () => {
    const c = await newClient(t);
    const res = await c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf).send({ email: "a@b.example", password: "x".repeat(20_000) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe("payload_too_large");
  });

  it("unknown fields are refused, named in fields", async () => {
    const admin = await signIn(t, DEMO.admin);
    const before = await t.db("invitations").count({ n: "*" }).first();
    const res = await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email: "z@kestrel.example", role: "lead", isAdmin: true });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("validation");
    expect(res.body.error.fields).toHaveProperty("isAdmin");
    const after = await t.db("invitations").count({ n: "*" }).first();
    expect(after).toEqual(before);
  });

  it("a bad value names its field", async () => {
    const admin = await signIn(t, DEMO.admin);
    const res = await admin.agent.post("/api/users/invitations").set("X-CSRF-Token", admin.csrf).send({ email: "not-an-address", role: "owner" });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(["email", "role"]);
  });

  it("a bad query parameter is refused, not ignored", async () => {
    const admin = await signIn(t, DEMO.admin);
    const res = await admin.agent.get("/api/audit?pageSize=100000");
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty("pageSize");
    const extra = await admin.agent.get("/api/outbox?colour=red");
    expect(extra.status).toBe(400);
  });

  it("no response carries a stack trace or SQL", async () => {
    const admin = await signIn(t, DEMO.admin);
    const res = await admin.agent.patch("/api/users/abc").set("X-CSRF-Token", admin.csrf).send({ role: "lead" });
    expect(res.status).toBe(400);
    const text = JSON.stringify(res.body);
    expect(text).not.toMatch(/\bat .*:\d+:\d+|SELECT|INSERT|knex|mysql/i);
  });

  it("an unknown API path → 404 in the fixed shape; a page path → the HTML shell with 200", async () => {
    const api = await request(t.plumbline.app).get("/api/nothing-here");
    expect(api.status).toBe(404);
    expect(api.body.error.code).toBe("not_found");
    const page = await request(t.plumbline.app).get("/office/users");
    expect(page.status).toBe(200);
    expect(page.headers["content-type"]).toMatch(/text\/html/);
    expect(page.text).toMatch(/<div id="root">/);
  });

  it("sends a content security policy and the usual security headers", async () => {
    const res = await request(t.plumbline.app).get("/");
    expect(res.headers["content-security-policy"]).toMatch(/script-src 'self'/);
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.headers["x-powered-by"]).toBeUndefined();
  });
});
