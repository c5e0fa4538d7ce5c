import { createHmac, randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTokenSigner, decodeCanonicalBase64url } from "../../server/core/signed-token.ts";
import { signToken } from "../../server/subscribers/subscribers.tokens.ts";
import { newClient, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";

let t: TestApp;
let slug: string;
let projectId: number;
let visitor: { agent: Agent; csrf: string };

beforeAll(async () => {
  t = await startTestApp({ SUBSCRIBE_LIMIT_PER_IP: "100000", SUBSCRIBE_LIMIT_PER_ADDRESS: "100000" });
  slug = `tokens-${randomBytes(3).toString("hex")}`;
  const [id] = await t.db("projects").insert({ slug, name: `Signed token test ${slug}`, operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
  projectId = Number(id);
  visitor = await newClient(t);
});
afterAll(async () => {
  await t?.close();
});

const DAY = 86_400_000;
const inDays = (days: number) => new Date(Date.now() + days * DAY);
const ALPHABET = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_";

/**
 * The same token with its last character changed inside the two bits a 32-byte MAC leaves
 * unused: a lenient decoder reads exactly the same bytes.
 * Source: RFC 4648 §3.5 (canonical encoding: pad bits set to zero) and §5 (base64url alphabet).
 */
function nonCanonical(token: string): string {
  const last = token.at(-1)!;
  const spelled = token.slice(0, -1) + ALPHABET[ALPHABET.indexOf(last) ^ 1];
  const sig = (s: string) => s.slice(s.lastIndexOf(".") + 1);
  // Check the premise: a lenient decode gives the same MAC bytes.
  expect(Buffer.from(sig(spelled), "base64url").equals(Buffer.from(sig(token), "base64url"))).toBe(true);
  expect(spelled).not.toBe(token);
  return spelled;
}

let n = 0;
/** A subscriber of this file's project, through the public form; its row. */
async function subscriber(): Promise<{ id: number; confirm_nonce: string }> {
  n += 1;
  const email = `tokens-${Date.now().toString(36)}-${n}@example.org`;
  await visitor.agent.post("/api/subscriptions").set("X-CSRF-Token", visitor.csrf).send({ email, name: "Ada Fenwick", interest: "prospect", frequency: "weekly", projectSlug: slug }).expect(202);
  const row = await t.db("subscribers").where({ project_id: projectId, email }).first("id", "confirm_nonce");
  return { id: Number(row.id), confirm_nonce: String(row.confirm_nonce) };
}

/** The pre-016 format: HMAC-SHA256(secret, domain + body), purpose code inside the body. */
function legacyToken(domain: string, payload: Record<string, unknown>): string {
  const body = Buffer.from(JSON.stringify(payload)).toString("base64url");
  return `${body}.${createHmac("sha256", t.config.TOKEN_SECRET).update(domain + body).digest("base64url")}`;
}

describe("server/core/signed-token.ts", () => {
  it("decodes base64url only in its canonical spelling", () => {
    const mac = createHmac("sha256", "k").update("m").digest();
    const good = mac.toString("base64url");
    expect(decodeCanonicalBase64url(good)?.equals(mac)).toBe(true);
    expect(decodeCanonicalBase64url(nonCanonical(good))).toBeNull();
    expect(decodeCanonicalBase64url(`${good}=`)).toBeNull();
    expect(decodeCanonicalBase64url(`${good.slice(0, 10)} ${good.slice(10)}`)).toBeNull();
  });

  it("a token verifies only for its own purpose, before its expiry, in its canonical spelling", () => {
    const signer = createTokenSigner(t.config.TOKEN_SECRET);
    const now = new Date();
    const parse = (c: Record<string, unknown>) => (typeof c.s === "number" ? { s: c.s } : null);
    const token = signer.sign("unsubscribe", { s: 7 }, inDays(1));
    expect(signer.verify("unsubscribe", token, now, parse)).toMatchObject({ ok: true, claims: { s: 7 } });
    expect(signer.verify("subscriptionPreferences", token, now, parse)).toEqual({ ok: false, reason: "forged" });
    expect(signer.verify("unsubscribe", nonCanonical(token), now, parse)).toEqual({ ok: false, reason: "malformed" });
    expect(signer.verify("unsubscribe", signer.sign("unsubscribe", { s: 7 }, new Date(now.getTime() - 1000)), now, parse)).toEqual({ ok: false, reason: "expired" });
    // An expired forgery is a forgery.
    expect(createTokenSigner("another-secret-0123456789abcdef0123").verify("unsubscribe", signer.sign("unsubscribe", { s: 7 }, new Date(0)), now, parse)).toEqual({ ok: false, reason: "forged" });
  });
});

describe("subscriber links refuse altered spellings, other purposes and expiry, through their routes", () => {
  const routes = {
    confirm: (tok: string) => visitor.agent.get(`/api/subscriptions/confirm/${tok}`),
    preferences: (tok: string) => visitor.agent.get(`/api/subscriptions/preferences/${tok}`),
    unsubscribe: (tok: string) => visitor.agent.get(`/api/subscriptions/unsubscribe/${tok}`),
  } as const;
  const others = { confirm: "unsubscribe", preferences: "confirm", unsubscribe: "preferences" } as const;

  for (const purpose of ["confirm", "preferences", "unsubscribe"] as const) {
    it(`${purpose}: the good token works; a non-canonical spelling or another purpose's token is 400, an expired one 410`, async () => {
      const s = await subscriber();
      const make = (p: "confirm" | "preferences" | "unsubscribe", expiresAt: Date) =>
        signToken(t.config.TOKEN_SECRET, { subscriberId: s.id, purpose: p, expiresAt, nonce: p === "confirm" ? s.confirm_nonce : null });
      const good = make(purpose, inDays(7));
      await routes[purpose](good).expect(200);

      for (const bad of [nonCanonical(good), make(others[purpose], inDays(7))]) {
        const res = await routes[purpose](bad);
        expect(res.status, bad).toBe(400);
        expect(res.body.error.code).toBe("token_invalid");
      }
      const expired = await routes[purpose](make(purpose, new Date(Date.now() - 1000)));
      expect(expired.status).toBe(410);
      expect(expired.body.error.code).toBe("token_expired");
    });
  }

  it("one-click unsubscribe (POST /u/:token) refuses a non-canonical spelling and keeps the subscription; the good token unsubscribes", async () => {
    const s = await subscriber();
    const good = signToken(t.config.TOKEN_SECRET, { subscriberId: s.id, purpose: "unsubscribe", expiresAt: inDays(7) });
    const before = (await t.db("subscribers").where({ id: s.id }).first("status")).status as string;
    const bad = await visitor.agent.post(`/u/${nonCanonical(good)}`).type("form").send("List-Unsubscribe=One-Click");
    expect(bad.status).toBe(400);
    const preferences = signToken(t.config.TOKEN_SECRET, { subscriberId: s.id, purpose: "preferences", expiresAt: inDays(7) });
    expect((await visitor.agent.post(`/u/${preferences}`).type("form").send("List-Unsubscribe=One-Click")).status).toBe(400);
    expect((await t.db("subscribers").where({ id: s.id }).first("status")).status).toBe(before);
    await visitor.agent.post(`/u/${good}`).type("form").send("List-Unsubscribe=One-Click").expect(200);
    expect((await t.db("subscribers").where({ id: s.id }).first("status")).status).toBe("unsubscribed");
  });

  it("links sent before decision 016 still mean what they meant, in their canonical spelling only", async () => {
    const s = await subscriber();
    const e = Math.floor(inDays(30).getTime() / 1000);
    const oldPreferences = legacyToken("plumbline-subscriber-link:v1.", { s: s.id, p: "p", e });
    await routes.preferences(oldPreferences).expect(200);
    expect((await routes.preferences(nonCanonical(oldPreferences))).status).toBe(400);
    // Its purpose code still binds it: an old preferences link is no unsubscribe link.
    expect((await routes.unsubscribe(oldPreferences)).status).toBe(400);
    const oldExpired = legacyToken("plumbline-subscriber-link:v1.", { s: s.id, p: "u", e: Math.floor(Date.now() / 1000) - 10 });
    expect((await routes.unsubscribe(oldExpired)).status).toBe(410);
  });
});

describe("GET /api/digests/web/:token — the web copy's link", () => {
  /** A delivered digest content for a subscriber, written as the digest worker would leave it. */
  async function delivered(): Promise<{ contentId: number; subscriberId: number }> {
    const s = await subscriber();
    const [runId] = await t.db("digest_runs").insert({ project_id: projectId, frequency: "weekly", run_key: `tokens:${randomBytes(4).toString("hex")}`, window_start: new Date(Date.now() - 7 * DAY), window_end: new Date(), status: "done" });
    const [contentId] = await t.db("digest_contents").insert({
      run_id: runId,
      content_key: randomBytes(32).toString("hex"),
      audience: "public",
      topics_key: "all",
      empty: false,
      subject: "Signed token test digest",
      preheader: "",
      html: "<p>Signed token test digest body</p>",
      text: "Signed token test digest body",
    });
    await t.db("digest_deliveries").insert({ run_id: runId, subscriber_id: s.id, content_id: contentId, window_start: new Date(Date.now() - 7 * DAY), status: "sent", message_id: `<tokens.${randomBytes(6).toString("hex")}@example.org>` });
    return { contentId: Number(contentId), subscriberId: s.id };
  }

  it("the good link shows the copy; a non-canonical spelling or a subscriber link's token is 400; an expired one 410", async () => {
    const d = await delivered();
    const good = t.plumbline.digests.webToken(d.contentId, d.subscriberId, inDays(30));
    const page = await visitor.agent.get(`/api/digests/web/${good}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain("Signed token test digest body");

    const otherPurpose = signToken(t.config.TOKEN_SECRET, { subscriberId: d.subscriberId, purpose: "unsubscribe", expiresAt: inDays(30) });
    for (const bad of [nonCanonical(good), otherPurpose]) {
      const res = await visitor.agent.get(`/api/digests/web/${bad}`);
      expect(res.status, bad).toBe(400);
      expect(res.body.error.code).toBe("token_invalid");
    }
    const expired = await visitor.agent.get(`/api/digests/web/${t.plumbline.digests.webToken(d.contentId, d.subscriberId, new Date(Date.now() - 1000))}`);
    expect(expired.status).toBe(410);
    expect(expired.body.error.code).toBe("token_expired");
  });

  it("a web-copy link sent before decision 016 still opens, in its canonical spelling only", async () => {
    const d = await delivered();
    const old = legacyToken("plumbline-digest-web:v1.", { c: d.contentId, s: d.subscriberId, e: Math.floor(inDays(30).getTime() / 1000) });
    await visitor.agent.get(`/api/digests/web/${old}`).expect(200);
    expect((await visitor.agent.get(`/api/digests/web/${nonCanonical(old)}`)).status).toBe(400);
  });
});
