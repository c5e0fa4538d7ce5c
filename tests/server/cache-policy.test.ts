import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { decideCachePolicy } from "../../server/core/cache-policy.ts";
import { createUser, DEMO, DEMO_PASSWORD, signIn, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";

const SLUG = "aldermere-phase-2";
const PROGRAMME = `/api/projects/${SLUG}`;

let t: TestApp;
let publicMilestone: number;
beforeAll(async () => {
  t = await startTestApp();
  const list = await request(t.plumbline.app).get(`${PROGRAMME}/milestones`).expect(200);
  publicMilestone = (list.body as Array<{ id: number; audience: string }>).find((m) => m.audience === "public")!.id;
});
afterAll(async () => {
  await t?.close();
});

const varies = (res: { headers: Record<string, string> }) => /\bcookie\b/i.test(res.headers.vary ?? "");

describe("answers that depend on who asks (issue 9, item 4)", () => {
  const callerDependent = () => [
    `${PROGRAMME}/milestones`,
    `${PROGRAMME}/health`,
    `${PROGRAMME}/curve`,
    `${PROGRAMME}/changes?from=2026-01-01&to=2026-12-31`,
    `${PROGRAMME}/moves?from=2026-01-01&to=2026-12-31`,
    `/api/milestones/${publicMilestone}/events`,
    `${PROGRAMME}/posts`,
    `${PROGRAMME}/stories`,
    `${PROGRAMME}/gallery`,
  ];

  it("a visitor's answer varies by Cookie, is kept by no shared cache and revalidates by ETag", async () => {
    for (const path of callerDependent()) {
      const res = await request(t.plumbline.app).get(path).expect(200);
      expect(res.headers["cache-control"], path).toBe("private, no-cache");
      expect(varies(res), path).toBe(true);
      expect(res.headers.etag, path).toBeDefined();
      const again = await request(t.plumbline.app).get(path).set("If-None-Match", res.headers.etag!);
      expect(again.status, path).toBe(304);
      expect(again.headers["cache-control"], path).toBe("private, no-cache");
    }
  });

  it("a signed-in caller's answer is private, no-store and varies by Cookie", async () => {
    for (const who of [DEMO.lead, DEMO.investor]) {
      const c = await signIn(t, who);
      for (const path of callerDependent()) {
        const res = await c.agent.get(path).expect(200);
        expect(res.headers["cache-control"], `${who} ${path}`).toBe("private, no-store");
        expect(varies(res), `${who} ${path}`).toBe(true);
      }
    }
  });

  it("staff and investor answers are private, no-store", async () => {
    const admin = await signIn(t, DEMO.admin);
    const investor = await signIn(t, DEMO.investor);
    // A message in the outbox to read raw.
    const u = await createUser(t, "marketing");
    const c = await signIn(t, DEMO.lead);
    await c.agent.post("/api/auth/password-reset").set("X-CSRF-Token", c.csrf).send({ email: u.email }).expect(202);
    const mail = await waitForMail(t, u.email);
    const media = (await admin.agent.get(`/api/media?project=${SLUG}`).expect(200)).body as { items: Array<{ id: number }> };
    const post = (await t.db("posts").orderBy("id").first("id")) as { id: number };
    const reads: Array<[typeof admin, string]> = [
      [admin, "/api/users"],
      [admin, "/api/users/invitations"],
      [admin, "/api/audit"],
      [admin, "/api/outbox"],
      [admin, `/api/outbox/${mail.id}`],
      [admin, `/api/outbox/${mail.id}/raw`],
      [admin, "/api/subscribers"],
      [admin, "/api/subscribers/export.csv"],
      [admin, "/api/enquiries"],
      [admin, `/api/media/${media.items[0]!.id}`],
      [admin, `/api/posts/${post.id}/revisions`],
      [admin, `${PROGRAMME}/cost-actuals`],
      [admin, `${PROGRAMME}/baselines`],
      [admin, "/api/digests/runs"],
      [admin, "/api/auth/me"],
      [admin, "/api/auth/session"],
      [investor, `${PROGRAMME}/cost-actuals`],
      [investor, `${PROGRAMME}/baselines`],
      [investor, "/api/investors/digest"],
    ];
    for (const [who, path] of reads) {
      const res = await who.agent.get(path);
      expect(res.status, path).toBe(200);
      expect(res.headers["cache-control"], path).toBe("private, no-store");
    }
  });

  it("error answers are never stored", async () => {
    const investor = await signIn(t, DEMO.investor);
    const answers = [
      await request(t.plumbline.app).get("/api/users"), // 401
      await investor.agent.get("/api/users"), // 403
      await request(t.plumbline.app).get("/api/projects/no-such-project"), // 404
      await request(t.plumbline.app).get(`${PROGRAMME}/changes`), // 400
      await request(t.plumbline.app).get("/api/no-such-route"), // 404
      await request(t.plumbline.app).get("/feed/no-such-project.atom"), // 404
    ];
    expect(answers.map((r) => r.status)).toEqual([401, 403, 404, 400, 404, 404]);
    for (const [i, res] of answers.entries()) expect(res.headers["cache-control"], `answer ${i}`).toBe("private, no-store");
  });

  it("answers that are the same for every caller keep public caching and their ETag for visitors", async () => {
    for (const path of ["/api/projects", `/api/projects/${SLUG}`, `/api/projects/${SLUG}/subscription-options`]) {
      const res = await request(t.plumbline.app).get(path).expect(200);
      expect(res.headers["cache-control"], path).toMatch(/^public, max-age=\d+/);
      expect(res.headers.etag, path).toBeDefined();
      await request(t.plumbline.app).get(path).set("If-None-Match", res.headers.etag!).expect(304);
    }
    const feed = await request(t.plumbline.app).get(`/feed/${SLUG}.atom`).expect(200);
    expect(feed.headers["cache-control"]).toMatch(/^public, max-age=300/);
  });

  it("a public derivative stays public and immutable for visitors; a signed-in reader's copy is private (it carries their session cookie)", async () => {
    const gallery = (await request(t.plumbline.app).get(`${PROGRAMME}/gallery`).expect(200)).body as { items: Array<{ sources: { webp: Array<{ url: string }> } }> };
    const url = gallery.items[0]!.sources.webp[0]!.url;
    const visitor = await request(t.plumbline.app).get(url).expect(200);
    expect(visitor.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
    const lead = await signIn(t, DEMO.lead);
    const staff = await lead.agent.get(url).expect(200);
    expect(staff.headers["cache-control"]).toBe("private, max-age=31536000, immutable");
    // A signed-in caller's page or feed is not kept either.
    const page = await lead.agent.get(`/feed/${SLUG}.atom`).expect(200);
    expect(page.headers["cache-control"]).toBe("private, no-store");
  });
});

describe("the public cache's copies (production) leave under the same policy", () => {
  it("a replayed visitor answer still varies by Cookie and is private, no-cache; a same-for-everyone one stays public", async () => {
    const prod = await startTestApp({ NODE_ENV: "production" });
    try {
      for (const [path, policy, vary] of [
        [`${PROGRAMME}/milestones`, "private, no-cache", true],
        ["/api/projects", "public, max-age=60", false],
      ] as const) {
        const first = await request(prod.plumbline.app).get(path).expect(200);
        const copy = await request(prod.plumbline.app).get(path).expect(200);
        expect(copy.body).toEqual(first.body);
        for (const res of [first, copy]) {
          expect(res.headers["cache-control"], path).toBe(policy);
          expect(varies(res), path).toBe(vary);
        }
        const notModified = await request(prod.plumbline.app).get(path).set("If-None-Match", first.headers.etag!);
        expect(notModified.status).toBe(304);
        expect(notModified.headers["cache-control"]).toBe(policy);
      }
    } finally {
      await prod.close();
    }
  });
});

describe("decideCachePolicy", () => {
  const base = { status: 200, signedIn: false, setsCookie: false, routePolicy: undefined };
  it.each([
    // [what, inputs, Cache-Control, Vary: Cookie]
    ["a visitor's programme", { path: "/api/projects/x/milestones" }, "private, no-cache", true],
    ["a visitor's programme, whatever the route asked", { path: "/api/projects/x/posts", routePolicy: "public, max-age=60" }, "private, no-cache", true],
    ["staff's programme", { path: "/api/projects/x/milestones", signedIn: true }, "private, no-store", true],
    ["a visitor's project list", { path: "/api/projects" }, "public, max-age=60", false],
    ["a project list that sets a cookie", { path: "/api/projects", setsCookie: true }, "private, max-age=60", false],
    ["an invitation link's answer", { path: "/api/auth/invitations/abc" }, "private, no-store", true],
    ["a visitor's 404", { path: "/api/projects/nope", status: 404 }, "private, no-store", false],
    ["the feed for a visitor", { path: "/feed/x.atom", routePolicy: "public, max-age=300" }, "public, max-age=300", false],
    ["the feed with a cookie being set", { path: "/feed/x.atom", routePolicy: "public, max-age=300, s-maxage=600", setsCookie: true }, "private, max-age=300", false],
    ["the feed for staff", { path: "/feed/x.atom", routePolicy: "public, max-age=300", signedIn: true }, "private, no-store", false],
    ["a public derivative for staff", { path: "/media/v/a.webp", routePolicy: "public, max-age=31536000, immutable", signedIn: true }, "private, max-age=31536000, immutable", false],
    ["a signed link for staff", { path: "/media/s/a.webp", routePolicy: "private, max-age=600", signedIn: true }, "private, max-age=600", false],
    ["a hidden derivative's 404", { path: "/media/v/a.webp", status: 404, routePolicy: "no-store" }, "no-store", false],
    ["the page shell for staff", { path: "/office", routePolicy: "no-cache", signedIn: true }, "private, no-store", false],
    ["the page shell for a visitor", { path: "/office", routePolicy: "no-cache" }, "no-cache", false],
  ] as const)("%s", (_what, inputs, cacheControl, varyCookie) => {
    expect(decideCachePolicy({ ...base, ...inputs })).toEqual({ cacheControl, varyCookie });
  });
});

/** Signs the lead in with explicit headers (a Secure cookie is not sent back over plain HTTP by the test client). */
async function signInWith(app: TestApp, headers: Record<string, string>) {
  const csrf = await request(app.plumbline.app).get("/api/auth/csrf").set(headers).expect(200);
  const cookies = ((csrf.headers["set-cookie"] as unknown as string[] | undefined) ?? []).map((c) => c.split(";")[0]).join("; ");
  const login = await request(app.plumbline.app)
    .post("/api/auth/login")
    .set(headers)
    .set("Cookie", cookies)
    .set("X-CSRF-Token", csrf.body.token as string)
    .send({ email: DEMO.lead, password: DEMO_PASSWORD })
    .expect(200);
  const session = ((login.headers["set-cookie"] as unknown as string[] | undefined) ?? []).find((c) => c.startsWith("plumbline.sid="));
  expect(session).toBeDefined();
  return { login, session: session! };
}

describe("TLS: a Secure session cookie and HSTS", () => {
  it("an http PUBLIC_URL with no proxy: no HSTS, and the cookie is not Secure", async () => {
    const { login, session } = await signInWith(t, {});
    expect(session).not.toMatch(/;\s*Secure/i);
    expect(login.headers["strict-transport-security"]).toBeUndefined();
    const health = await request(t.plumbline.app).get("/api/health").set("X-Forwarded-Proto", "https");
    expect(health.headers["strict-transport-security"]).toBeUndefined();
  });

  it("an https PUBLIC_URL: HSTS on every answer and a Secure cookie, whatever hop comes before", async () => {
    const tls = await startTestApp({ PUBLIC_URL: "https://progress.kestrel.example" });
    try {
      const { login, session } = await signInWith(tls, {});
      expect(session).toMatch(/;\s*Secure/i);
      expect(login.headers["strict-transport-security"]).toBe("max-age=31536000; includeSubDomains");
      for (const path of ["/api/health", "/api/projects", "/office", "/api/no-such-route"]) {
        const res = await request(tls.plumbline.app).get(path);
        expect(res.headers["strict-transport-security"], path).toBe("max-age=31536000; includeSubDomains");
      }
    } finally {
      await tls.close();
    }
  });

  it("behind one trusted proxy: X-Forwarded-Proto https gives HSTS and a Secure cookie; plain http gives neither", async () => {
    const proxied = await startTestApp({ TRUST_PROXY: "1" });
    try {
      const overTls = await signInWith(proxied, { "X-Forwarded-Proto": "https" });
      expect(overTls.session).toMatch(/;\s*Secure/i);
      expect(overTls.login.headers["strict-transport-security"]).toBe("max-age=31536000; includeSubDomains");
      const plain = await signInWith(proxied, { "X-Forwarded-Proto": "http" });
      expect(plain.session).not.toMatch(/;\s*Secure/i);
      expect(plain.login.headers["strict-transport-security"]).toBeUndefined();
    } finally {
      await proxied.close();
    }
  });

  it("from a peer that is not a trusted proxy, X-Forwarded-Proto: https changes nothing", async () => {
    const { login, session } = await signInWith(t, { "X-Forwarded-Proto": "https" });
    expect(session).not.toMatch(/;\s*Secure/i);
    expect(login.headers["strict-transport-security"]).toBeUndefined();
  });
});
