import { randomBytes } from "node:crypto";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CONSENT, INVESTOR_CONSENT, SUBSCRIBER_EXPORT_COLUMNS } from "../../src/shared/schemas/subscribers.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { topicsAllow, topicsKey } from "../../server/subscribers/subscribers.topics.ts";
import { createUser, DEMO, lastMailId, newClient, signIn, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";

let t: TestApp;
let slug: string;
let projectId: number;

async function clearLimits() {
  await t.db("rate_limit_hits").where("key", "like", "subscribe-%").delete();
}

beforeAll(async () => {
  t = await startTestApp({ SUBSCRIBE_LIMIT_PER_IP: "100000", SUBSCRIBE_LIMIT_PER_ADDRESS: "100000" });
  await clearLimits();
  slug = `office-${randomBytes(3).toString("hex")}`;
  const [id] = await t.db("projects").insert({ slug, name: "Office Test Campus", operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
  projectId = Number(id);
  const [phaseId] = await t.db("phases").insert({ project_id: projectId, name: "Works", sort_order: 1 });
  await t.db("milestones").insert([
    { project_id: projectId, phase_id: phaseId, name: "Hall 7 slab", area: "Hall 7", system: "building", weight: 1, baseline_finish: "2027-01-01", audience: "public" },
    { project_id: projectId, phase_id: phaseId, name: "Yard", area: "Yard", system: "cooling", weight: 1, baseline_finish: "2027-01-01", audience: "public" },
  ]);
});
afterAll(async () => {
  await clearLimits();
  await t.close();
});

let n = 0;
const address = (tag: string) => `${tag}-${Date.now().toString(36)}-${++n}@example.com`;

async function insertSubscriber(p: { email: string; interest?: string; status?: string; frequency?: string; topics?: { areas: string[]; systems: string[] } | null }) {
  const topics = p.topics ?? null;
  const [id] = await t.db("subscribers").insert({
    project_id: projectId,
    email: p.email,
    email_hash: hashAddress(p.email),
    name: "Hester Lindqvist",
    interest: p.interest ?? "prospect",
    frequency: p.frequency ?? "weekly",
    topics: topics ? JSON.stringify(topics) : null,
    topics_key: topicsKey(topics as never),
    status: p.status ?? "confirmed",
    consent_at: new Date(),
    consent_version: "2026-12-01",
    consent_source: "subscribe form",
    consent_ip: "192.0.2.7",
  });
  return Number(id);
}

describe("GET /api/subscribers (marketing, lead, admin)", () => {
  it("filters by interest, status, topic and frequency", async () => {
    const a = address("filter-a");
    const b = address("filter-b");
    const c = address("filter-c");
    await insertSubscriber({ email: a, interest: "press", frequency: "monthly", topics: { areas: ["Hall 7"], systems: [] } });
    await insertSubscriber({ email: b, interest: "press", frequency: "weekly", topics: null, status: "pending" });
    await insertSubscriber({ email: c, interest: "neighbour", frequency: "monthly", topics: { areas: [], systems: ["cooling"] } });
    const m = await signIn(t, DEMO.marketing);
    const emails = async (q: string) => ((await m.agent.get(`/api/subscribers?projectSlug=${slug}&${q}`).expect(200)).body.rows as Array<{ email: string }>).map((r) => r.email).sort();

    expect(await emails("interest=press")).toEqual([a, b].sort());
    expect(await emails("status=pending")).toEqual([b]);
    expect(await emails("frequency=monthly")).toEqual([a, c].sort());
    // A topic filter finds those who would receive it: its followers and those following everything.
    expect(await emails(`topic=${encodeURIComponent("area:Hall 7")}`)).toEqual([a, b].sort());
    expect(await emails("topic=system:cooling")).toEqual([b, c].sort());
    expect(await emails("interest=press&frequency=monthly")).toEqual([a]);
    const list = await m.agent.get(`/api/subscribers?projectSlug=${slug}&interest=press`).expect(200);
    expect(list.body.total).toBe(2);
    expect(list.body.rows[0]).toMatchObject({ project: { slug }, consentSource: "subscribe form", account: false });

    const bad = await m.agent.get(`/api/subscribers?interest=spy&colour=red`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toMatchObject({ interest: expect.any(String), colour: "is not a known field" });
  });

  it("names each row's own project, and a slug naming no project matches nothing (list and export)", async () => {
    const here = address("own-project-here");
    await insertSubscriber({ email: here, interest: "press" });
    const otherSlug = `office-other-${randomBytes(3).toString("hex")}`;
    const [otherId] = await t.db("projects").insert({ slug: otherSlug, name: "Office Test Annex", operator_name: "Kestrel Colocation", time_zone: "Europe/London" });
    const there = address("own-project-there");
    await t.db("subscribers").insert({ project_id: Number(otherId), email: there, email_hash: hashAddress(there), name: "Hester Lindqvist", interest: "press", frequency: "weekly", topics: null, topics_key: topicsKey(null), status: "confirmed" });
    const m = await signIn(t, DEMO.marketing);

    // Without a project filter the rows of both projects come back, each with its own project.
    const all = (await m.agent.get(`/api/subscribers?q=own-project-`).expect(200)).body as { rows: Array<{ email: string; project: unknown }>; total: number };
    expect(all.total).toBe(2);
    expect(all.rows.find((r) => r.email === here)?.project).toEqual({ slug, name: "Office Test Campus" });
    expect(all.rows.find((r) => r.email === there)?.project).toEqual({ slug: otherSlug, name: "Office Test Annex" });

    const none = await m.agent.get(`/api/subscribers?projectSlug=no-such-project`).expect(200);
    expect(none.body).toEqual({ rows: [], total: 0, page: 1, pageSize: 50 });
    const csv = await m.agent.get(`/api/subscribers/export.csv?projectSlug=no-such-project`).expect(200);
    const parsed = Papa.parse<Record<string, string>>(csv.text.trim(), { header: true });
    expect(parsed.meta.fields).toEqual([...SUBSCRIBER_EXPORT_COLUMNS]);
    expect(parsed.data).toEqual([]);
  });

  it("is closed to investors (403) and visitors (401)", async () => {
    expect((await (await signIn(t, DEMO.investor)).agent.get("/api/subscribers")).status).toBe(403);
    expect((await (await newClient(t)).agent.get("/api/subscribers")).status).toBe(401);
  });
});

describe("POST /api/subscribers/import (CSV)", () => {
  it("with one bad row imports nothing and reports the line", async () => {
    const m = await signIn(t, DEMO.marketing);
    const good1 = address("csv-good1");
    const good2 = address("csv-good2");
    const csv = [
      "email,name,organisation,interest,frequency,topics",
      `${good1},Imogen Saltmarsh,Corrow Analytics,prospect,weekly,all`,
      `${good2},"Saltmarsh, Tobias",,press,monthly,system:power;area:Hall 7`,
      `not-an-address,Declan Ormsby,,prospect,weekly,`,
    ].join("\n");
    const before = await lastMailId(t);
    const res = await m.agent.post("/api/subscribers/import").set("X-CSRF-Token", m.csrf).send({ projectSlug: slug, csv });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe("csv_invalid");
    expect(res.body.error.rows).toEqual([{ line: 4, reason: expect.stringMatching(/^email: /) }]);
    expect(await t.db("subscribers").whereIn("email", [good1, good2]).first()).toBeUndefined();
    expect(await lastMailId(t)).toBe(before);
  });

  it("counts lines as the file does, through quoted line breaks, and reports every bad row", async () => {
    const m = await signIn(t, DEMO.marketing);
    const csv = [
      "email,name,organisation,interest,frequency,topics,consent_at,consent_source",
      `${address("ml")},"Otto\nPrendergast",,neighbour,weekly,,,`,
      `${address("ml2")},Thea Valcourt,,neighbour,fortnightly,,,`,
      "",
      `${address("ml3")},Ezra Blackwood,,neighbour,weekly,area:Strongroom,,`,
      `${address("ml4")},Ada Fenwick,,press,weekly,,2026-09-12T10:00:00Z,`,
      `${address("ml5")},Ada Fenwick,,press,weekly,,2099-01-01T00:00:00Z,open day`,
    ].join("\r\n");
    const res = await m.agent.post("/api/subscribers/import").set("X-CSRF-Token", m.csrf).send({ projectSlug: slug, csv });
    expect(res.status).toBe(422);
    expect(res.body.error.rows.map((r: { line: number }) => r.line)).toEqual([4, 6, 7, 8]);
    expect(res.body.error.rows[0].reason).toMatch(/frequency/);
    expect(res.body.error.rows[1].reason).toMatch(/Strongroom/);
    expect(res.body.error.rows[2].reason).toMatch(/consent_at and consent_source go together/);
    expect(res.body.error.rows[3].reason).toMatch(/consent_at/);
  });

  it("refuses an unknown column on line 1, and a repeated address naming the first line", async () => {
    const m = await signIn(t, DEMO.marketing);
    const wrongHeader = await m.agent.post("/api/subscribers/import").set("X-CSRF-Token", m.csrf).send({ projectSlug: slug, csv: "email,name,interest,frequency,status\nx@example.com,X,press,weekly,confirmed\n" });
    expect(wrongHeader.status).toBe(422);
    expect(wrongHeader.body.error.rows).toEqual([{ line: 1, reason: expect.stringMatching(/unknown columns "status"/) }]);
    const twice = address("twice");
    const dup = await m.agent.post("/api/subscribers/import").set("X-CSRF-Token", m.csrf).send({ projectSlug: slug, csv: `email,name,interest,frequency\n${twice},A,press,weekly\n${twice.toUpperCase()},B,press,weekly\n` });
    expect(dup.status).toBe(422);
    expect(dup.body.error.rows).toEqual([{ line: 3, reason: `email: ${twice} is also on line 2` }]);
  });

  it("imports good rows: with consent evidence as confirmed, without it as pending with a confirmation e-mail", async () => {
    const m = await signIn(t, DEMO.marketing);
    const evidence = address("csv-evidence");
    const noEvidence = address("csv-pending");
    const existing = address("csv-existing");
    await insertSubscriber({ email: existing });
    const csv = [
      "email,name,organisation,interest,frequency,topics,consent_at,consent_source",
      `${evidence},Lorna Castellanos,Eastmere Infrastructure Fund,investor,monthly,all,2026-09-12T14:30:00+01:00,Aldermere open day sign-up sheet`,
      `${noEvidence},Jasper Whitcliffe,Infrastructure Desk,press,weekly,system:power;area:Hall 7,,`,
      `${existing},Someone,,press,weekly,,,`,
    ].join("\n");
    const before = await lastMailId(t);
    const res = await m.agent.post("/api/subscribers/import").set("X-CSRF-Token", m.csrf).send({ projectSlug: slug, csv });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ imported: 2, confirmedOnEvidence: 1, confirmationsSent: 1, skipped: [{ line: 4, reason: expect.stringMatching(/already on this project's list/) }] });

    const confirmedRow = await t.db("subscribers").where({ project_id: projectId, email: evidence }).first();
    expect(confirmedRow).toMatchObject({ status: "confirmed", consent_source: "import: Aldermere open day sign-up sheet", interest: "investor", audience: "public" });
    expect(confirmedRow.consent_at.toISOString()).toBe("2026-09-12T13:30:00.000Z");
    const pendingRow = await t.db("subscribers").where({ project_id: projectId, email: noEvidence }).first();
    expect(pendingRow).toMatchObject({ status: "pending", consent_at: null, consent_source: "import" });
    expect(JSON.parse(pendingRow.topics)).toEqual({ areas: ["Hall 7"], systems: ["power"] });
    expect((await t.db("subscribers").where({ project_id: projectId, email: existing }).first()).name).toBe("Hester Lindqvist");

    const mail = await waitForMail(t, noEvidence, before);
    expect(mail.text).toMatch(/Kestrel Colocation would like to send you progress e-mails/);
    // The imported address consents on the confirmation page, to the current wording.
    const token = mail.text.match(/\/subscriptions\/confirm\/([A-Za-z0-9_.-]+)/)![1]!;
    const c = await newClient(t);
    await c.agent.post(`/api/subscriptions/confirm/${token}`).set("X-CSRF-Token", c.csrf).send({}).expect(200);
    const nowConfirmed = await t.db("subscribers").where({ id: pendingRow.id }).first();
    expect(nowConfirmed).toMatchObject({ status: "confirmed", consent_source: "import, confirmed by e-mail link", consent_version: "2026-12-01" });
    expect(nowConfirmed.consent_ip).toMatch(/127\.0\.0\.1/);
    // The evidence row receives no confirmation e-mail.
    expect(await t.db("mail_recipients").where({ address: evidence }).first()).toBeUndefined();
  });
});

describe("GET /api/subscribers/export.csv", () => {
  it("exports the filtered list with the export columns, formula-like cells defused", async () => {
    const email = address("export");
    await insertSubscriber({ email, interest: "neighbour", topics: { areas: ["Yard"], systems: ["cooling"] } });
    await t.db("subscribers").where({ email }).update({ name: "=HYPERLINK(\"http://x.example\")" });
    const m = await signIn(t, DEMO.lead);
    const res = await m.agent.get(`/api/subscribers/export.csv?projectSlug=${slug}&interest=neighbour`).expect(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/^attachment; filename="?subscribers-\d{4}-\d{2}-\d{2}\.csv"?$/);
    const parsed = Papa.parse<Record<string, string>>(res.text.trim(), { header: true });
    expect(parsed.meta.fields).toEqual([...SUBSCRIBER_EXPORT_COLUMNS]);
    const row = parsed.data.find((r) => r.email === email)!;
    expect(row).toMatchObject({ interest: "neighbour", topics: "area:Yard;system:cooling", status: "confirmed", consent_source: "subscribe form" });
    expect(row.name).toMatch(/^'=HYPERLINK/);
    expect(parsed.data.every((r) => r.interest === "neighbour")).toBe(true);
  });
});

describe("one person's data, and erasure", () => {
  it("exports everything about the person as JSON", async () => {
    const email = address("person");
    const id = await insertSubscriber({ email });
    const m = await signIn(t, DEMO.marketing);
    const res = await m.agent.get(`/api/subscribers/${id}/export`).expect(200);
    expect(res.headers["content-disposition"]).toMatch(/subscriber-\d+\.json/);
    expect(res.body).toMatchObject({ email, subscriptions: [{ id, email, consentIp: "192.0.2.7", consentVersion: "2026-12-01" }], mail: [], enquiries: [], suppression: null });
  });

  it("erasure keeps only a hashed suppression entry; the address is not subscribed (still 202) or imported again", async () => {
    const email = address("erase");
    const id = await insertSubscriber({ email });
    const [enquiryId] = await t.db("enquiries").insert({ project_id: projectId, kind: "general", name: "Erase Me", email, message: "A question about noise at night." });
    const m = await signIn(t, DEMO.marketing);
    const res = await m.agent.delete(`/api/subscribers/${id}`).set("X-CSRF-Token", m.csrf);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ erased: { subscriptions: 1, enquiries: 1 }, suppressed: true });

    expect(await t.db("subscribers").where({ email }).first()).toBeUndefined();
    expect(await t.db("enquiries").where({ id: enquiryId }).first()).toBeUndefined();
    const suppression = await t.db("suppressions").where({ email_hash: hashAddress(email) }).first();
    expect(suppression).toMatchObject({ reason: "erased", source: "erasure" });
    // Only the hash: the address appears nowhere in the suppression row.
    expect(JSON.stringify(suppression)).not.toContain(email.split("@")[0]);
    expect(suppression.email_hash).toMatch(/^[0-9a-f]{64}$/);

    const before = await lastMailId(t);
    const c = await newClient(t);
    const again = await c.agent.post("/api/subscriptions").set("X-CSRF-Token", c.csrf).send({ email, name: "Back Again", interest: "press", frequency: "weekly", projectSlug: slug });
    expect(again.status).toBe(202);
    expect(again.body.ok).toBe(true);
    expect(await t.db("subscribers").where({ email }).first()).toBeUndefined();

    const imported = await m.agent.post("/api/subscribers/import").set("X-CSRF-Token", m.csrf).send({ projectSlug: slug, csv: `email,name,interest,frequency\n${email},Back Again,press,weekly\n` });
    expect(imported.status).toBe(200);
    expect(imported.body).toMatchObject({ imported: 0, skipped: [{ line: 2, reason: expect.stringMatching(/suppression list/) }] });
    expect(await t.db("subscribers").where({ email }).first()).toBeUndefined();
    await new Promise((r) => setTimeout(r, 200));
    expect(await lastMailId(t)).toBe(before);

    expect((await m.agent.delete(`/api/subscribers/${id}`).set("X-CSRF-Token", m.csrf)).status).toBe(404);
  });
});

describe("the investor room's own digest (GET/PATCH /api/investors/digest)", () => {
  it("an investor account sets frequency and topics, stored against the account with the investor audience", async () => {
    const investor = await createUser(t, "investor");
    const c = await signIn(t, investor.email, investor.password);
    const list = await c.agent.get("/api/investors/digest").expect(200);
    const mine = list.body.find((s: { project: { slug: string } }) => s.project.slug === slug);
    expect(mine).toMatchObject({ enabled: false, status: null, options: { areas: ["Hall 7", "Yard"] } });

    const set = await c.agent.patch(`/api/investors/digest/${slug}`).set("X-CSRF-Token", c.csrf).send({ enabled: true, frequency: "monthly", topics: { areas: [], systems: ["power"] } });
    expect(set.status).toBe(200);
    expect(set.body).toMatchObject({ enabled: true, frequency: "monthly", topics: { areas: [], systems: ["power"] }, status: "confirmed" });
    const row = await t.db("subscribers").where({ project_id: projectId, user_id: investor.id }).first();
    expect(row).toMatchObject({ email: investor.email, audience: "investor", interest: "investor", status: "confirmed", consent_source: "investor room (signed in)" });
    // Confirmed at once, so not on the public wording (which promises a confirmation e-mail) but on its own.
    expect(row.consent_version).toBe(INVESTOR_CONSENT.version);
    expect(INVESTOR_CONSENT.version).not.toBe(CONSENT.version);
    expect(INVESTOR_CONSENT.text).not.toMatch(/until I confirm/);
    expect((await t.plumbline.subscribers.digestRecipients(projectId, "monthly")).find((r) => r.userId === investor.id)?.audience).toBe("investor");

    // A disabled account receives nothing.
    await t.db("users").where({ id: investor.id }).update({ disabled_at: new Date() });
    expect((await t.plumbline.subscribers.digestRecipients(projectId, "monthly")).some((r) => r.userId === investor.id)).toBe(false);
    await t.db("users").where({ id: investor.id }).update({ disabled_at: null });

    const off = await c.agent.patch(`/api/investors/digest/${slug}`).set("X-CSRF-Token", c.csrf).send({ enabled: false, frequency: "monthly", topics: null });
    expect(off.body).toMatchObject({ enabled: false, status: "unsubscribed" });
    const bad = await c.agent.patch(`/api/investors/digest/${slug}`).set("X-CSRF-Token", c.csrf).send({ enabled: true, frequency: "monthly" });
    expect(bad.status).toBe(400);
    expect((await t.db("subscribers").where({ project_id: projectId, user_id: investor.id }).first()).status).toBe("unsubscribed");
  });

  it("a public subscriber of the same address becomes the account's; everyone else stays on the public audience", async () => {
    const investor = await createUser(t, "investor");
    await insertSubscriber({ email: investor.email, interest: "investor" });
    const publicInvestor = address("public-investor");
    await insertSubscriber({ email: publicInvestor, interest: "investor" });
    const c = await signIn(t, investor.email, investor.password);
    await c.agent.patch(`/api/investors/digest/${slug}`).set("X-CSRF-Token", c.csrf).send({ enabled: true, frequency: "weekly", topics: null }).expect(200);
    const rows = await t.db("subscribers").where({ project_id: projectId, email: investor.email });
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ user_id: investor.id, audience: "investor" });
    expect((await t.db("subscribers").where({ email: publicInvestor }).first()).audience).toBe("public");
  });

  it("is for investor accounts only", async () => {
    expect((await (await signIn(t, DEMO.marketing)).agent.get("/api/investors/digest")).status).toBe(403);
    expect((await (await newClient(t)).agent.get("/api/investors/digest")).status).toBe(401);
  });
});

describe("topicsAllow (for digests)", () => {
  it("lets through everything for 'all topics', and otherwise any chosen area or system", () => {
    // Our own examples of the rule documented in src/shared/schemas/subscribers.ts.
    const t1 = { areas: ["Hall 2A"], systems: ["cooling" as const] };
    expect(topicsAllow(null, { areas: ["HD-1"], systems: ["power"] })).toBe(true);
    expect(topicsAllow(t1, { areas: ["Hall 2A"], systems: ["power"] })).toBe(true);
    expect(topicsAllow(t1, { areas: ["HD-1"], systems: ["cooling"] })).toBe(true);
    expect(topicsAllow(t1, { areas: ["HD-1"], systems: ["power"] })).toBe(false);
    expect(topicsAllow(t1, { areas: [], systems: [] })).toBe(true);
    expect(topicsKey(t1)).toBe(topicsKey({ areas: ["Hall 2A", "Hall 2A"], systems: ["cooling"] }));
    expect(topicsKey(t1)).not.toBe(topicsKey({ areas: ["Hall 2A"], systems: [] }));
    expect(topicsKey(null)).toBe("all");
  });
});
