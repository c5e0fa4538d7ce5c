import { randomInt } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, DEMO, DEMO_PASSWORD, newClient, startTestApp, type TestApp } from "../helpers/app.ts";

/**
 * Sign-in limits under the real defaults (the test helper lifts them for every other file:
 * an empty value here brings the default back). Every other test file signs in from
 * 127.0.0.1 against the same database, so these tests stand behind one trusted proxy hop
 * and give each client an address of its own (TEST-NET-3, RFC 5737).
 */
const REAL_LIMITS = { LOGIN_LIMIT_PER_IP: "", LOGIN_LIMIT_PER_ACCOUNT: "", LOGIN_LIMIT_WINDOW_MINUTES: "" };

let proxied: TestApp;
let untrusted: TestApp;
let small: TestApp;
beforeAll(async () => {
  [proxied, untrusted, small] = await Promise.all([
    startTestApp({ ...REAL_LIMITS, TRUST_PROXY: "1" }),
    startTestApp({ ...REAL_LIMITS, TRUST_PROXY: "false" }),
    // A budget of three failures per address, to show whose budget a failure spends.
    startTestApp({ ...REAL_LIMITS, LOGIN_LIMIT_PER_IP: "3", TRUST_PROXY: "1" }),
  ]);
});
afterAll(async () => {
  await Promise.all([proxied?.close(), untrusted?.close(), small?.close()]);
});

const base = randomInt(0, 200);
let next = 0;
/** A client address nobody else in this run uses. */
const freshAddress = () => `203.0.113.${(base + next++) % 256}`;

async function signInFrom(t: TestApp, from: string | null, email: string, password: string) {
  const c = await newClient(t);
  let req = c.agent.post("/api/auth/login").set("X-CSRF-Token", c.csrf);
  if (from) req = req.set("X-Forwarded-For", from);
  return req.send({ email, password });
}

/** Lets the pair's current wait run out, as if its time had passed. */
async function endWait(t: TestApp, account: string, address: string) {
  const n = await t.db("sign_in_delays").where({ account, address }).update({ blocked_until: t.db.raw("DATE_SUB(UTC_TIMESTAMP(3), INTERVAL 1 SECOND)") });
  expect(n).toBe(1);
}

async function failedChecks(t: TestApp, email: string): Promise<number> {
  const row = await t.db("audit_events").where({ action: "sign_in_failed", actor_email: email }).count({ n: "*" }).first();
  return Number(row?.n ?? 0);
}

describe("sign-in limits count failures, not colleagues (default limits)", () => {
  it("40 successful sign-ins from one address within a minute all succeed", async () => {
    const office = freshAddress();
    const people = [DEMO.admin, DEMO.lead, DEMO.marketing, DEMO.investor];
    const statuses: number[] = [];
    for (let i = 0; i < 40; i++) statuses.push((await signInFrom(proxied, office, people[i % people.length]!, DEMO_PASSWORD)).status);
    expect(statuses).toEqual(Array(40).fill(200));
  });

  it("10 wrong passwords from one address are slowed (429 with Retry-After, the password not even checked) and refused; the wait grows", async () => {
    const u = await createUser(proxied, "lead");
    const from = freshAddress();
    const answers = [];
    for (let i = 0; i < 10; i++) answers.push(await signInFrom(proxied, from, u.email, "wrong-password-guess"));
    expect(answers.map((r) => r.status)).toEqual([401, 401, 401, 429, 429, 429, 429, 429, 429, 429]);
    for (const r of answers.slice(3)) {
      expect(r.body.error.code).toBe("rate_limited");
      expect(r.body.error.message).toEqual(expect.any(String));
      expect(Number(r.headers["retry-after"])).toBeGreaterThanOrEqual(1);
      expect(Number(r.headers["retry-after"])).toBeLessThanOrEqual(2);
    }
    // Only the three answered 401 reached the password check.
    expect(await failedChecks(proxied, u.email)).toBe(3);
    // The right password from the same address waits too: that is what slows a guesser.
    expect((await signInFrom(proxied, from, u.email, u.password)).status).toBe(429);

    // Once the wait is over, a wrong password is refused (401) and the next wait is twice as long.
    await endWait(proxied, u.email, from);
    expect((await signInFrom(proxied, from, u.email, "wrong-password-guess")).status).toBe(401);
    const slower = await signInFrom(proxied, from, u.email, "wrong-password-guess");
    expect(slower.status).toBe(429);
    expect(Number(slower.headers["retry-after"])).toBeGreaterThan(2);
    expect(Number(slower.headers["retry-after"])).toBeLessThanOrEqual(4);
    expect(slower.body.error.retryAfterSeconds).toBe(Number(slower.headers["retry-after"]));
  });

  it("the owner signing in from another address right after is not refused", async () => {
    const u = await createUser(proxied, "marketing");
    const attacker = freshAddress();
    for (let i = 0; i < 10; i++) await signInFrom(proxied, attacker, u.email, "wrong-password-guess");
    expect((await signInFrom(proxied, attacker, u.email, "wrong-password-guess")).status).toBe(429);

    const owner = await signInFrom(proxied, freshAddress(), u.email, u.password);
    expect(owner.status).toBe(200);
    expect(owner.body.user.email).toBe(u.email);
    // The owner's success does not lift the wait on the guessing address.
    expect((await signInFrom(proxied, attacker, u.email, u.password)).status).toBe(429);
  });

  it("a right password after the wait signs in and starts the pair afresh", async () => {
    const u = await createUser(proxied, "lead");
    const from = freshAddress();
    for (let i = 0; i < 3; i++) expect((await signInFrom(proxied, from, u.email, "wrong-password-guess")).status).toBe(401);
    await endWait(proxied, u.email, from);
    expect((await signInFrom(proxied, from, u.email, u.password)).status).toBe(200);
    expect(await proxied.db("sign_in_delays").where({ account: u.email, address: from })).toHaveLength(0);
    expect((await signInFrom(proxied, from, u.email, "wrong-password-guess")).status).toBe(401);
  });

  it("the wait belongs to the account as typed in any case, known or not", async () => {
    const from = freshAddress();
    const nobody = `Nobody-${Date.now()}@Test.Example`;
    const statuses = [];
    for (let i = 0; i < 4; i++) statuses.push((await signInFrom(proxied, from, i % 2 ? nobody : nobody.toLowerCase(), "wrong-password-guess")).status);
    // An unknown address is slowed exactly like a known one: the limit tells nobody which accounts exist.
    expect(statuses).toEqual([401, 401, 401, 429]);
  });

  it("30 failures from one address spend its budget: the 31st attempt is refused, even with a right password", async () => {
    const from = freshAddress();
    const statuses: number[] = [];
    // Different (unknown) accounts, so no pair's wait is involved: only the address's budget.
    for (let i = 0; i < 30; i++) statuses.push((await signInFrom(proxied, from, `guess-${i}-${Date.now()}@test.example`, "wrong-password-guess")).status);
    expect(statuses).toEqual(Array(30).fill(401));
    const refused = await signInFrom(proxied, from, DEMO.lead, DEMO_PASSWORD);
    expect(refused.status).toBe(429);
    expect(refused.body.error.code).toBe("rate_limited");
    expect(Number(refused.headers["retry-after"])).toBeGreaterThan(0);
    // Anyone else is unaffected.
    expect((await signInFrom(proxied, freshAddress(), DEMO.lead, DEMO_PASSWORD)).status).toBe(200);
  });
});

describe("whose address a limit counts (TRUST_PROXY)", () => {
  it("with one trusted hop, two clients named by X-Forwarded-For have separate budgets", async () => {
    const [one, two] = [freshAddress(), freshAddress()];
    const first: number[] = [];
    for (let i = 0; i < 4; i++) first.push((await signInFrom(small, `${one}`, `nobody-${i}-${Date.now()}@test.example`, "wrong-password-guess")).status);
    expect(first).toEqual([401, 401, 401, 429]);
    // The proxy appends the real client; whatever the client claimed before it is not believed.
    expect((await signInFrom(small, `${two}, ${one}`, DEMO.marketing, DEMO_PASSWORD)).status).toBe(429);
    const other = await signInFrom(small, two, `nobody-x-${Date.now()}@test.example`, "wrong-password-guess");
    expect(other.status).toBe(401);
    expect((await signInFrom(small, `${one}, ${two}`, DEMO.marketing, DEMO_PASSWORD)).status).toBe(200);
    // The audit log records the client the proxy named.
    const row = await small.db("audit_events").where({ action: "sign_in_failed" }).orderBy("id", "desc").first();
    expect(row.ip).toBe(two);
  });

  it("without a trusted proxy, a spoofed X-Forwarded-For is ignored: both 'clients' spend the peer's one budget", async () => {
    const [a, b] = [freshAddress(), freshAddress()];
    const peerBefore = (await untrusted.plumbline.rateLimits.ip.get("127.0.0.1"))?.totalHits ?? 0;
    await signInFrom(untrusted, a, `spoof-a-${Date.now()}@test.example`, "wrong-password-guess").then((r) => expect([401, 429]).toContain(r.status));
    await signInFrom(untrusted, b, `spoof-b-${Date.now()}@test.example`, "wrong-password-guess").then((r) => expect([401, 429]).toContain(r.status));
    // Other test files fail sign-ins from 127.0.0.1 meanwhile, so the peer's count grows by at least two.
    const peerAfter = (await untrusted.plumbline.rateLimits.ip.get("127.0.0.1"))?.totalHits ?? 0;
    expect(peerAfter - peerBefore).toBeGreaterThanOrEqual(2);
    expect(await untrusted.plumbline.rateLimits.ip.get(a)).toBeUndefined();
    expect(await untrusted.plumbline.rateLimits.ip.get(b)).toBeUndefined();
    // The pair's wait is keyed by the peer too, never by the claimed address.
    expect(await untrusted.db("sign_in_delays").whereIn("address", [a, b])).toHaveLength(0);
  });
});

describe("other sign-in paths", () => {
  it("failed reset-link and invitation uses spend the same per-address budget as failed sign-ins", async () => {
    const from = freshAddress();
    const bad = `${"a".repeat(43)}`;
    const statuses: number[] = [];
    for (let i = 0; i < 3; i++) {
      const c = await newClient(small);
      statuses.push((await c.agent.post(`/api/auth/password-reset/${bad}`).set("X-CSRF-Token", c.csrf).set("X-Forwarded-For", from).send({ password: "a-long-new-password-42" })).status);
    }
    expect(statuses.every((s) => s >= 400 && s !== 429)).toBe(true);
    const c = await newClient(small);
    const refused = await c.agent.post(`/api/auth/invitations/${bad}/accept`).set("X-CSRF-Token", c.csrf).set("X-Forwarded-For", from).send({ name: "Someone", password: "a-long-new-password-42" });
    expect(refused.status).toBe(429);
    expect(refused.body.error.code).toBe("rate_limited");
  });
});
