import { createServer } from "node:net";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { isDatabaseUnavailable } from "../../server/core/error-handler.ts";
import { newClient, startTestApp, type TestApp } from "../helpers/app.ts";

// While the database cannot be reached the API answers 503 in the fixed error shape with
// Retry-After, not 500: nothing about the request was wrong.
// Source: RFC 9110 §15.6.4 (503 Service Unavailable) and §10.2.3 (Retry-After).

/** A loopback port with nothing listening: every connection to it is refused. */
async function closedPort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", () => resolve()));
  const { port } = server.address() as { port: number };
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

let t: TestApp;

beforeAll(async () => {
  const url = new URL(inject("databaseUrl"));
  url.host = `127.0.0.1:${await closedPort()}`;
  t = await startTestApp({}, { databaseUrl: url.toString() });
});
afterAll(async () => {
  await t?.close();
});

describe("the API while its database is down", () => {
  it("answers a read 503 with Retry-After in the fixed shape", async () => {
    const r = await request(t.plumbline.app).get("/api/projects/aldermere-phase-2/health");
    expect(r.status).toBe(503);
    expect(r.headers["retry-after"]).toBe("5");
    expect(r.body).toEqual({ error: { code: "unavailable", message: expect.stringMatching(/Try again in 5 seconds/) } });
  });

  it("answers a sign-in 503 too: the session, the counters and the account all live in the database", async () => {
    const { agent, csrf } = await newClient(t);
    const r = await agent.post("/api/auth/login").set("X-CSRF-Token", csrf).send({ email: "lead@example.org", password: "not-the-password" });
    expect(r.status).toBe(503);
    expect(r.headers["retry-after"]).toBe("5");
    expect(r.body.error.code).toBe("unavailable");
  });

  it("tells unreachable from other database errors", () => {
    expect(isDatabaseUnavailable(Object.assign(new Error("connect ECONNREFUSED"), { code: "ECONNREFUSED" }))).toBe(true);
    expect(isDatabaseUnavailable(Object.assign(new Error("Connection lost"), { code: "PROTOCOL_CONNECTION_LOST", fatal: true }))).toBe(true);
    expect(isDatabaseUnavailable(Object.assign(new Error("Knex: Timeout acquiring a connection."), { name: "KnexTimeoutError" }))).toBe(true);
    expect(isDatabaseUnavailable(Object.assign(new Error("Duplicate entry"), { code: "ER_DUP_ENTRY" }))).toBe(false);
    expect(isDatabaseUnavailable(new Error("anything else"))).toBe(false);
  });
});
