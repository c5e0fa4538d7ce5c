import { pino } from "pino";
import request from "supertest";
import { describe, expect, it } from "vitest";
import { createTokenSigner } from "../../server/core/signed-token.ts";
import { createPlumbline } from "../helpers/plumbline.ts";
import { DEMO, lastMailId, newClient, waitForMail, type TestApp } from "../helpers/app.ts";
import { createPhoto, createProject, doc, image, postInput, text, useAppAsEveryRole, type Client } from "./posts-fixtures.ts";

/**
 * Review links (issue #15 item 1, decision 060): staff make a link to one revision of a draft
 * post or story for a named outside reviewer, who reads it without an account and answers.
 */

const f = useAppAsEveryRole();
const STAFF = ["admin", "lead", "marketing"] as const;
const AUDIENCES = ["public", "investor", "internal"] as const;

async function newPost(t: TestApp, by: Client, projectSlug: string, over: Record<string, unknown> = {}) {
  const res = await by.agent.post(`/api/projects/${projectSlug}/posts`).set("X-CSRF-Token", by.csrf).send(postInput(null, over));
  expect(res.status).toBe(201);
  return res.body.id as number;
}

async function newStory(by: Client, projectSlug: string, items: unknown[], audience = "public") {
  const res = await by.agent.post(`/api/projects/${projectSlug}/stories`).set("X-CSRF-Token", by.csrf).send({ title: "Chiller plinths, month by month", intro: "The yard fills up.", audience, items });
  expect(res.status).toBe(201);
  return res.body.id as number;
}

async function makeLink(by: Client, kind: "posts" | "stories", id: number, body: Record<string, unknown> = { name: "Rowan Pike", email: "rowan.pike@example.test", organisation: "Harbour Communications", days: 7 }) {
  return by.agent.post(`/api/${kind}/${id}/review-links`).set("X-CSRF-Token", by.csrf).send(body);
}

const tokenOf = (url: string) => url.slice(url.lastIndexOf("/") + 1);

/** A project of its own with a draft update written by marketing, and a link to it made by `maker`. */
async function draftWithLink(maker: Client) {
  const { t, as } = f;
  const project = await createProject(t);
  const id = await newPost(t, as.marketing, project.slug);
  const made = await makeLink(maker, "posts", id);
  expect(made.status).toBe(201);
  return { project, id, made, token: tokenOf(made.body.url) };
}
const anonymous = (t: TestApp) => request(t.plumbline.app);
const count = async (t: TestApp, table: string, where: Record<string, unknown> = {}) => Number((await t.db(table).where(where).count({ n: "*" }).first())!.n);

describe("POST /api/posts/:id/review-links and /api/stories/:id/review-links", () => {
  it("each staff role makes a link for a draft of each audience; the URL is absolute and opens without an account", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    for (const role of STAFF) {
      for (const audience of AUDIENCES) {
        const id = await newPost(t, as.marketing, project.slug, { audience, title: `Draft for ${role} ${audience}` });
        const made = await makeLink(as[role], "posts", id);
        expect(made.status, `${role} ${audience}`).toBe(201);
        expect(made.body).toEqual({ id: expect.any(Number), url: expect.stringMatching(/^http:\/\/plumbline\.test\/review\/[A-Za-z0-9_-]+\.[A-Za-z0-9_-]{43}$/) });
        expect(made.headers["cache-control"]).toBe("private, no-store");
        const read = await anonymous(t).get(`/api/review/${tokenOf(made.body.url)}`);
        expect(read.status).toBe(200);
        expect(read.body).toMatchObject({ kind: "post", title: `Draft for ${role} ${audience}`, audience, revisionNumber: 1, newerRevision: null, reviewerName: "Rowan Pike" });
        expect(read.headers["x-robots-tag"]).toBe("noindex");
        expect(read.headers["cache-control"]).toBe("private, no-store");
      }
    }
    const story = await newStory(as.marketing, project.slug, [], "investor");
    const made = await makeLink(as.lead, "stories", story);
    expect(made.status).toBe(201);
    const read = await anonymous(t).get(`/api/review/${tokenOf(made.body.url)}`).expect(200);
    expect(read.body).toMatchObject({ kind: "story", title: "Chiller plinths, month by month", intro: "The yard fills up.", items: [] });
  });

  it("refuses an investor (403) and a visitor (401), and content that is approved or published (409), writing nothing", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const id = await newPost(t, as.marketing, project.slug);
    const before = await count(t, "review_links");
    expect((await makeLink(as.investor, "posts", id)).status).toBe(403);
    const visitor = await newClient(t);
    expect((await visitor.agent.post(`/api/posts/${id}/review-links`).set("X-CSRF-Token", visitor.csrf).send({ name: "A", email: "a@example.test" })).status).toBe(401);
    for (const status of ["approved", "published", "withdrawn"]) {
      await t.db("posts").where({ id }).update({ status });
      const res = await makeLink(as.lead, "posts", id);
      expect(res.status, status).toBe(409);
      expect(res.body.error.code).toBe("not_open_for_review");
    }
    expect((await makeLink(as.lead, "posts", 999999999)).status).toBe(404);
    expect(await count(t, "review_links")).toBe(before);
  });

  it("refuses days 0, 31 and \"x\", a bad e-mail and control characters with 400 in the fixed shape, writing nothing", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const id = await newPost(t, as.marketing, project.slug);
    const before = [await count(t, "review_links"), await count(t, "audit_events")];
    const good = { name: "Rowan Pike", email: "rowan.pike@example.test" };
    const cases: Array<[Record<string, unknown>, string]> = [
      [{ ...good, days: 0 }, "days"],
      [{ ...good, days: 31 }, "days"],
      [{ ...good, days: "x" }, "days"],
      [{ ...good, days: 2.5 }, "days"],
      [{ ...good, email: "not-an-address" }, "email"],
      [{ ...good, name: "Rowan\u0000Pike" }, "name"],
      [{ ...good, organisation: "Harbour\u001BComms" }, "organisation"],
      [{ ...good, name: "" }, "name"],
      [{ ...good, url: "https://elsewhere.example" }, ""],
    ];
    for (const [body, field] of cases) {
      const res = await makeLink(as.lead, "posts", id, body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.code).toBe("validation");
      if (field) expect(Object.keys(res.body.error.fields ?? {})).toContain(field);
    }
    expect([await count(t, "review_links"), await count(t, "audit_events")]).toEqual(before);
  });
});

describe("GET /api/posts/:id/review-links and DELETE /api/review-links/:id", () => {
  it("lists links with state and events but never a token or URL; the audit log never holds the URL either", async () => {
    const { t, as } = f;
    const { project, id, made, token } = await draftWithLink(as.marketing);
    await anonymous(t).get(`/api/review/${token}`).set("User-Agent", "ReviewerBrowser/1.0").expect(200);
    const list = await as.lead.agent.get(`/api/posts/${id}/review-links`).expect(200);
    expect(list.headers["cache-control"]).toBe("private, no-store");
    expect(list.body.links).toHaveLength(1);
    expect(list.body.links[0]).toMatchObject({
      id: made.body.id,
      contentKind: "post",
      contentId: id,
      revisionNumber: 1,
      reviewer: { name: "Rowan Pike", email: "rowan.pike@example.test", organisation: "Harbour Communications" },
      state: "live",
      revokedAt: null,
      events: [{ kind: "opened", verdict: null, revisionNumber: 1 }],
    });
    expect(list.body.links[0].createdBy.name).not.toBe("A former user");
    const signature = token.split(".")[1]!;
    expect(JSON.stringify(list.body)).not.toContain(signature);
    const audit = await t.db("audit_events").where("action", "like", "review_link_%").select("detail", "target_label", "target_type");
    expect(audit.map((a) => a.target_type)).toContain("post");
    expect(JSON.stringify(audit)).not.toContain(signature);
    const auditApi = await as.admin.agent.get("/api/audit?pageSize=100").expect(200);
    expect(JSON.stringify(auditApi.body)).toContain("review_link_opened");
    expect(JSON.stringify(auditApi.body)).not.toContain(signature);
    // Another post's list knows nothing of it.
    const other = await newPost(t, as.marketing, project.slug);
    expect((await as.lead.agent.get(`/api/posts/${other}/review-links`).expect(200)).body.links).toEqual([]);
  });

  it("revokes at once (204, audited): the link, its replay and its photos answer 410/404, never the draft", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const photo = await createPhoto(t, project.id);
    const id = await newPost(t, as.marketing, project.slug, { coverMediaId: photo.id });
    const made = await makeLink(as.lead, "posts", id);
    const token = tokenOf(made.body.url);
    const read = await anonymous(t).get(`/api/review/${token}`).expect(200);
    const file = read.body.cover.sources.webp[0].url as string;
    expect(file).toMatch(new RegExp(`^/api/review/${token.replace(/[.]/g, "\\.")}/media/[0-9a-f]{16}-\\d+w\\.webp$`));
    expect((await anonymous(t).get(file)).status).toBe(200);

    const revoked = await as.marketing.agent.delete(`/api/review-links/${made.body.id}`).set("X-CSRF-Token", as.marketing.csrf);
    expect(revoked.status).toBe(204);
    for (const path of [`/api/review/${token}`, file]) {
      const res = await anonymous(t).get(path);
      expect(res.status, path).toBe(410);
      expect(res.body.error.code).toBe("review_link_revoked");
      expect(JSON.stringify(res.body)).not.toContain("Chillers on their plinths");
    }
    const csrf = await newClient(t);
    const answer = await csrf.agent.post(`/api/review/${token}/answer`).set("X-CSRF-Token", csrf.csrf).send({ verdict: "looks_right" });
    expect(answer.status).toBe(410);
    expect((await as.lead.agent.get(`/api/posts/${id}/review-links`)).body.links[0].state).toBe("revoked");
    expect(await count(t, "audit_events", { action: "review_link_revoked", target_id: String(id) })).toBe(1);
    // Revoking again changes nothing and is not audited twice.
    expect((await as.lead.agent.delete(`/api/review-links/${made.body.id}`).set("X-CSRF-Token", as.lead.csrf)).status).toBe(204);
    expect(await count(t, "audit_events", { action: "review_link_revoked", target_id: String(id) })).toBe(1);
    expect((await as.investor.agent.delete(`/api/review-links/${made.body.id}`).set("X-CSRF-Token", as.investor.csrf)).status).toBe(403);
  });
});

describe("GET /api/review/:token", () => {
  it("an altered token (one character changed, signature swapped, token of another purpose) is 404; an authentic expired one 410", async () => {
    const { t, as } = f;
    const { id, made, token } = await draftWithLink(as.lead);
    const [body, sig] = token.split(".") as [string, string];
    const other = tokenOf((await makeLink(as.lead, "posts", id)).body.url);
    const flip = (s: string, i: number) => s.slice(0, i) + (s[i] === "A" ? "B" : "A") + s.slice(i + 1);
    const signer = createTokenSigner(t.config.TOKEN_SECRET);
    const row = await t.db("review_links").where({ id: made.body.id }).first("nonce");
    const altered = [
      `${flip(body, 5)}.${sig}`,
      `${body}.${flip(sig, 10)}`,
      `${body}.${other.split(".")[1]}`,
      signer.sign("mediaLink", { l: made.body.id, n: row.nonce }, new Date(Date.now() + 86_400_000)),
      // Authentic, but naming a link whose secret is not this one's.
      signer.sign("reviewLink", { l: made.body.id, n: "A".repeat(43) }, new Date(Date.now() + 86_400_000)),
      "not-a-token",
    ];
    for (const bad of altered) {
      const res = await anonymous(t).get(`/api/review/${encodeURIComponent(bad)}`);
      expect(res.status, bad).toBe(404);
      expect(res.body.error.code).toBe("review_link_not_found");
    }
    const expired = signer.sign("reviewLink", { l: made.body.id, n: row.nonce }, new Date(Date.now() - 1000));
    const res = await anonymous(t).get(`/api/review/${expired}`);
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe("review_link_expired");
    // The link itself, read with a clock past its expiry (now injected), is expired too.
    await expect(t.plumbline.reviewLinks.open(token, {}, { ip: null, userAgent: null }, new Date(Date.now() + 8 * 86_400_000))).rejects.toMatchObject({ status: 410, code: "review_link_expired" });
    expect((await anonymous(t).get(`/api/review/${token}`)).status).toBe(200);
  });

  it("a post since withdrawn or deleted is 410 with a clear message, never the draft", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const withdrawn = await newPost(t, as.marketing, project.slug);
    const deleted = await newPost(t, as.marketing, project.slug);
    const a = tokenOf((await makeLink(as.lead, "posts", withdrawn)).body.url);
    const b = tokenOf((await makeLink(as.lead, "posts", deleted)).body.url);
    await t.db("posts").where({ id: withdrawn }).update({ status: "withdrawn" });
    await t.db("post_revisions").where({ post_id: deleted }).delete();
    await t.db("posts").where({ id: deleted }).delete();
    for (const token of [a, b]) {
      const res = await anonymous(t).get(`/api/review/${token}`);
      expect(res.status).toBe(410);
      expect(res.body.error).toMatchObject({ code: "review_content_gone", message: "The draft this link was made for is no longer available for review." });
    }
  });

  it("shows the exact revision, says when a newer one exists and offers it through the same link", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const id = await newPost(t, as.marketing, project.slug, { title: "First words" });
    const token = tokenOf((await makeLink(as.lead, "posts", id)).body.url);
    await as.marketing.agent.patch(`/api/posts/${id}`).set("X-CSRF-Token", as.marketing.csrf).send({ title: "Second words" }).expect(200);
    const first = await anonymous(t).get(`/api/review/${token}`).expect(200);
    expect(first.body).toMatchObject({ title: "First words", revisionNumber: 1, linkRevision: 1, newerRevision: 2 });
    const latest = await anonymous(t).get(`/api/review/${token}?revision=latest`).expect(200);
    expect(latest.body).toMatchObject({ title: "Second words", revisionNumber: 2, linkRevision: 1, newerRevision: null });
    expect((await anonymous(t).get(`/api/review/${token}?revision=3`)).status).toBe(400);
    const events = await t.db("review_link_events").join("review_links", "review_links.id", "review_link_events.review_link_id").where("review_links.content_id", id).select("review_link_events.revision_number");
    expect(events.map((e) => Number(e.revision_number)).sort()).toEqual([1, 2]);
  });

  it("shows cleared photos; unreviewed ones only on a lead's or admin's link; restricted ones never", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const cleared = await createPhoto(t, project.id, { sensitivity: "cleared" });
    const unreviewed = await createPhoto(t, project.id, { sensitivity: "unreviewed" });
    const restricted = await createPhoto(t, project.id, { sensitivity: "restricted" });
    const body = doc(text("Three photos."), image(cleared.id), image(unreviewed.id), image(restricted.id));
    const id = await newPost(t, as.marketing, project.slug, { body, audience: "internal" });
    const shown = async (by: Client) => {
      const token = tokenOf((await makeLink(by, "posts", id)).body.url);
      const read = await anonymous(t).get(`/api/review/${token}`).expect(200);
      const html = read.body.html as string;
      return { token, html, names: [cleared, unreviewed, restricted].map((p) => html.includes(p.urls[4]!.replace("/media/v/", ""))) };
    };
    const byLead = await shown(as.lead);
    expect(byLead.names).toEqual([true, true, false]);
    expect(byLead.html).not.toContain("/media/v/");
    expect((await shown(as.admin)).names).toEqual([true, true, false]);
    const byMarketing = await shown(as.marketing);
    expect(byMarketing.names).toEqual([true, false, false]);
    expect(byMarketing.html).toContain("This photo is not available.");
    // The files follow the same rule, whatever name is asked for.
    const fileOf = (token: string, p: { urls: string[] }) => `/api/review/${token}/media/${p.urls[4]!.replace("/media/v/", "")}`;
    expect((await anonymous(t).get(fileOf(byLead.token, unreviewed))).status).toBe(200);
    expect((await anonymous(t).get(fileOf(byMarketing.token, unreviewed))).status).toBe(404);
    expect((await anonymous(t).get(fileOf(byLead.token, restricted))).status).toBe(404);
    const elsewhere = await createPhoto(t, project.id);
    expect((await anonymous(t).get(fileOf(byLead.token, elsewhere))).status).toBe(404);
    expect((await anonymous(t).get(`/api/review/${byLead.token}/media/..%2F..%2Fetc%2Fpasswd`)).status).toBe(404);
  });

  it("request lines in the log never carry a review link's token, whatever the answer", async () => {
    const { t, as } = f;
    const { token } = await draftWithLink(as.lead);
    const lines: string[] = [];
    const logger = pino({ level: "debug" }, { write: (line: string) => void lines.push(line) });
    const logged = createPlumbline({ db: t.db, config: t.config, logger, mailer: t.mailer });
    try {
      await request(logged.app).get(`/api/review/${token}`).expect(200);
      await request(logged.app).get(`/api/review/${token}x`).expect(404);
      await request(logged.app).get(`/api/review/${token}/media/0000000000000000-320w.webp`).expect(404);
    } finally {
      await logged.close();
    }
    const requests = lines.filter((l) => l.includes('"/api/review/'));
    expect(requests).toHaveLength(3);
    expect(requests.join("\n")).toContain('"url":"/api/review/…"');
    expect(lines.join("\n")).not.toContain(token.split(".")[1]!);
  });

  it("a photo story shows its items, a then-and-now pair's photos served under the link; its answer reaches the story's author", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const before = await createPhoto(t, project.id, { takenAt: "2026-01-10T09:00:00" });
    const after = await createPhoto(t, project.id, { takenAt: "2026-06-10T09:00:00" });
    const hidden = await createPhoto(t, project.id, { sensitivity: "restricted" });
    const story = await newStory(as.marketing, project.slug, [
      { kind: "pair", area: "Plant yard", beforeMediaId: before.id, afterMediaId: after.id, caption: "Five months apart" },
      { kind: "photo", mediaId: hidden.id, caption: "The fuel farm" },
    ]);
    const token = tokenOf((await makeLink(as.marketing, "stories", story)).body.url);
    const read = await anonymous(t).get(`/api/review/${token}`).expect(200);
    expect(read.body.items).toHaveLength(2);
    expect(read.body.items[0]).toMatchObject({ kind: "pair", area: "Plant yard", caption: "Five months apart", before: { id: before.id }, after: { id: after.id } });
    expect(read.body.items[1]).toMatchObject({ kind: "photo", caption: "The fuel farm", media: null });
    const url = read.body.items[0].after.sources.jpeg[0].url as string;
    expect(url.startsWith(`/api/review/${token}/media/`)).toBe(true);
    const file = await anonymous(t).get(url).expect(200);
    expect(file.headers["content-type"]).toBe("image/jpeg");
    expect(file.headers["cache-control"]).toBe("private, no-store");

    const reviewer = await newClient(t);
    const afterMail = await lastMailId(t);
    await reviewer.agent.post(`/api/review/${token}/answer`).set("X-CSRF-Token", reviewer.csrf).send({ verdict: "looks_right" }).expect(201);
    const history = await as.lead.agent.get(`/api/stories/${story}/history`).expect(200);
    expect(history.body[0]).toEqual({
      action: "outside_review_looks_right",
      from: "draft",
      to: "draft",
      by: "Rowan Pike (outside reviewer, Harbour Communications)",
      comment: "Looks right (revision 1)",
      at: expect.any(String),
    });
    const mail = await waitForMail(t, DEMO.marketing, afterMail);
    expect(mail.subject).toContain("looks right");
    expect(mail.text).toContain(`/office/stories/${story}`);
    expect(mail.text).toContain("They left no comment.");
  });

  it("the HTML shell of /review/* carries noindex, as a header and a meta tag", async () => {
    const { t } = f;
    const res = await anonymous(t).get("/review/anything.at-all").expect(200);
    expect(res.headers["x-robots-tag"]).toBe("noindex");
    expect(res.text).toContain('<meta name="robots" content="noindex">');
  });
});

describe("POST /api/review/:token/answer", () => {
  it("records the answer in the link's history and the audit log, and e-mails the author through the mail path", async () => {
    const { t, as } = f;
    const project = await createProject(t);
    const id = await newPost(t, as.marketing, project.slug, { title: "Cooling plant <b>handover</b>" });
    const made = await makeLink(as.lead, "posts", id, { name: "Sam <i>Vale</i>", email: "sam.vale@example.test", days: 3 });
    const token = tokenOf(made.body.url);
    const reviewer = await newClient(t);
    const afterMail = await lastMailId(t);
    const res = await reviewer.agent
      .post(`/api/review/${token}/answer`)
      .set("X-CSRF-Token", reviewer.csrf)
      .set("User-Agent", "ReviewerBrowser/2.0")
      .send({ verdict: "needs_changes", comment: "The second chiller is not yet piped.\nPlease check the date." });
    expect(res.status).toBe(201);
    expect(res.headers["cache-control"]).toBe("private, no-store");
    expect(res.body.answers).toEqual([{ verdict: "needs_changes", comment: "The second chiller is not yet piped.\nPlease check the date.", revisionNumber: 1, at: expect.any(String) }]);

    const list = await as.marketing.agent.get(`/api/posts/${id}/review-links`).expect(200);
    expect(list.body.links[0].events[0]).toMatchObject({ kind: "answered", verdict: "needs_changes", comment: "The second chiller is not yet piped.\nPlease check the date." });
    expect(list.body.links[0].reviewer.name).toBe("Sam <i>Vale</i>");
    const event = await t.db("review_link_events").where({ review_link_id: made.body.id, kind: "answered" }).first();
    expect(event.user_agent).toBe("ReviewerBrowser/2.0");
    expect(await count(t, "audit_events", { action: "review_link_answered", actor_email: "sam.vale@example.test" })).toBe(1);

    const mail = await waitForMail(t, DEMO.marketing, afterMail);
    expect(mail.subject).toContain("needs changes");
    expect(mail.text).toContain("The second chiller is not yet piped.");
    expect(mail.text).toContain(`/office/updates/${id}`);
    expect(mail.html).toContain("Sam &lt;i&gt;Vale&lt;/i&gt;");
    expect(mail.html).not.toContain("<i>Vale</i>");
    expect(mail.text).not.toContain(token);
  });

  it("lands in the post's history as the reviewer's entry, the state unchanged and markup kept as text; a revoked link's answer lands nowhere", async () => {
    const { t, as } = f;
    const { id, made, token } = await draftWithLink(as.lead);
    await as.marketing.agent.post(`/api/posts/${id}/submit`).set("X-CSRF-Token", as.marketing.csrf).expect(200);
    const reviewer = await newClient(t);
    const comment = "The <script>alert(1)</script> date is wrong.\nHall 2 is <b>not</b> ready.";
    await reviewer.agent.post(`/api/review/${token}/answer`).set("X-CSRF-Token", reviewer.csrf).send({ verdict: "needs_changes", comment: `  ${comment}  ` }).expect(201);
    await reviewer.agent.post(`/api/review/${token}/answer`).set("X-CSRF-Token", reviewer.csrf).send({ verdict: "looks_right", comment: "Fixed on the phone." }).expect(201);

    const history = await as.marketing.agent.get(`/api/posts/${id}/history`).expect(200);
    expect(history.body.map((e: { action: string }) => e.action)).toEqual(["outside_review_looks_right", "outside_review_needs_changes", "submit"]);
    expect(history.body[1]).toEqual({
      action: "outside_review_needs_changes",
      from: "in_review",
      to: "in_review",
      by: "Rowan Pike (outside reviewer, Harbour Communications)",
      comment: `Needs changes (revision 1) — ${comment}`,
      at: expect.any(String),
    });
    expect(history.body[0]).toMatchObject({ from: "in_review", to: "in_review", comment: "Looks right (revision 1) — Fixed on the phone." });
    expect((await as.marketing.agent.get(`/api/posts/${id}`).expect(200)).body.status).toBe("in_review");
    const rows = await t.db("publishing_events").where({ owner_type: "post", owner_id: id, action: "outside_review_needs_changes" });
    expect(rows).toHaveLength(1);
    expect(rows[0].actor_id).toBeNull();

    await as.lead.agent.delete(`/api/review-links/${made.body.id}`).set("X-CSRF-Token", as.lead.csrf).expect(204);
    expect((await reviewer.agent.post(`/api/review/${token}/answer`).set("X-CSRF-Token", reviewer.csrf).send({ verdict: "looks_right" })).status).toBe(410);
    expect(await count(t, "publishing_events", { owner_type: "post", owner_id: id })).toBe(3);
  });

  it("needs the CSRF token; refuses a bad verdict or control characters with 400, writing nothing", async () => {
    const { t, as } = f;
    const { id, made, token } = await draftWithLink(as.lead);
    const reviewer = await newClient(t);
    expect((await reviewer.agent.post(`/api/review/${token}/answer`).send({ verdict: "looks_right" })).status).toBe(403);
    for (const body of [{ verdict: "fine" }, { verdict: "looks_right", comment: "ok\u0007" }, { verdict: "looks_right", extra: 1 }, { comment: "no verdict" }]) {
      const res = await reviewer.agent.post(`/api/review/${token}/answer`).set("X-CSRF-Token", reviewer.csrf).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.code).toBe("validation");
    }
    expect(await count(t, "review_link_events", { review_link_id: made.body.id, kind: "answered" })).toBe(0);
    expect(await count(t, "publishing_events", { owner_type: "post", owner_id: id })).toBe(0);
  });
});
