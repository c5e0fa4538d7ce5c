import { randomBytes } from "node:crypto";
import { DateTime } from "luxon";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { BaselineDetail, BaselineVersion, Milestone, MilestoneEventRow } from "../../src/shared/schemas/programme.ts";
import type { EnquiryRow } from "../../src/shared/schemas/enquiries.ts";
import { hashAddress } from "../../server/subscribers/subscribers.tokens.ts";
import { newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { signInAll, type Client } from "./posts-fixtures.ts";

// The programme and enquiries keep people and projects by id; the users and projects modules
// name them (decision 015). These check the names in the answers, and that a list asks for them
// in one read however many rows it has.

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
const names = { admin: "", lead: "", marketing: "" };

beforeAll(async () => {
  t = await startTestApp({ ENQUIRY_LIMIT_PER_IP: "100000" });
  as = await signInAll(t);
  for (const role of ["admin", "lead", "marketing"] as const) names[role] = (await as[role].agent.get("/api/auth/me").expect(200)).body.user.name as string;
});
afterAll(async () => {
  await t.db("rate_limit_hits").where("key", "like", "enquiry-%").delete();
  await t.close();
});

const TZ = "Europe/London";
let seq = 0;
async function makeProject(name: string): Promise<{ id: number; slug: string; name: string }> {
  seq += 1;
  const slug = `names-${randomBytes(3).toString("hex")}-${seq}`;
  const [id] = await t.db("projects").insert({ slug, name, operator_name: "Kestrel Colocation", time_zone: TZ, visits_offered: true, currency: "GBP" });
  return { id: Number(id), slug, name };
}

/** The statements the app sends while `run` runs, so a test can count reads of one table. */
async function statementsDuring<T>(run: () => Promise<T>): Promise<{ result: T; sql: string[] }> {
  const sql: string[] = [];
  const listener = (q: { sql: string }) => sql.push(q.sql);
  t.db.on("query", listener);
  try {
    return { result: await run(), sql };
  } finally {
    t.db.off("query", listener);
  }
}
const namesRead = (sql: string[]) => sql.filter((s) => /from `users` where `id` in/i.test(s)).length;
const projectsRead = (sql: string[]) => sql.filter((s) => /from `projects` where `id` in/i.test(s)).length;

const send = async (c: Client, method: "post" | "patch", url: string, body: Record<string, unknown>) => {
  const res = await c.agent[method](url).set("X-CSRF-Token", c.csrf).send(body);
  expect(res.status, JSON.stringify(res.body)).toBeLessThan(300);
  return res.body;
};

describe("the programme names the people behind its records", () => {
  it("names who made each change, set each baseline and removed a milestone, reading the names once per list", async () => {
    const p = await makeProject("Names test: programme");
    const base = { phase: "Plant", area: "Energy centre", system: "power", weight: 1, baselineFinish: "2027-03-01", audience: "public" };
    const a = (await send(as.lead, "post", `/api/projects/${p.slug}/milestones`, { ...base, name: "Generators set" })) as Milestone;
    const b = (await send(as.lead, "post", `/api/projects/${p.slug}/milestones`, { ...base, name: "Site cabins cleared" })) as Milestone;

    await send(as.admin, "patch", `/api/milestones/${a.id}`, { version: a.version, forecastFinish: "2027-03-08", note: "Crane slot moved" });
    await send(as.lead, "patch", `/api/milestones/${a.id}`, { version: a.version + 1, percentComplete: 40 });
    await send(as.lead, "post", `/api/projects/${p.slug}/baselines`, { reason: "Programme agreed at financial close" });
    await send(as.admin, "post", `/api/projects/${p.slug}/baselines`, { reason: "Generator delivery re-planned" });
    const current = (await as.lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    await send(as.admin, "post", `/api/milestones/${b.id}/remove`, { reason: "Cabins stay for Hall 2B" });
    expect(current.find((m) => m.id === b.id)!.removal).toBeNull();

    // A milestone's history: by the admin, then the lead (newest first), each named.
    const events = await statementsDuring(async () => (await as.lead.agent.get(`/api/milestones/${a.id}/events`).expect(200)).body as MilestoneEventRow[]);
    const edits = events.result.filter((e) => e.field === "forecast_finish" || e.field === "percent_complete");
    expect(edits.map((e) => [e.field, e.by])).toEqual(
      expect.arrayContaining([
        ["forecast_finish", names.admin],
        ["percent_complete", names.lead],
      ]),
    );
    expect(events.result.every((e) => e.by === names.admin || e.by === names.lead)).toBe(true);
    expect(namesRead(events.sql)).toBe(1);

    // The project's changes name both people, from one read of names.
    const today = DateTime.now().setZone(TZ);
    const range = `from=${today.minus({ days: 1 }).toISODate()}&to=${today.plus({ days: 1 }).toISODate()}`;
    const changes = await statementsDuring(async () => (await as.lead.agent.get(`/api/projects/${p.slug}/changes?${range}`).expect(200)).body as MilestoneEventRow[]);
    expect(new Set(changes.result.map((e) => e.by))).toEqual(new Set([names.admin, names.lead]));
    expect(changes.result.find((e) => e.field === "removed")).toMatchObject({ milestoneId: b.id, by: names.admin, note: "Cabins stay for Hall 2B" });
    expect(namesRead(changes.sql)).toBe(1);

    // Baseline versions: who set each.
    const versions = await statementsDuring(async () => (await as.investor.agent.get(`/api/projects/${p.slug}/baselines`).expect(200)).body as BaselineVersion[]);
    expect(versions.result.map((v) => [v.number, v.by])).toEqual([
      [1, names.lead],
      [2, names.admin],
    ]);
    expect(namesRead(versions.sql)).toBe(1);
    const second = (await as.lead.agent.get(`/api/projects/${p.slug}/baselines/2`).expect(200)).body as BaselineDetail;
    expect(second).toMatchObject({ number: 2, reason: "Generator delivery re-planned", by: names.admin, milestoneCount: 2 });

    // The removal names who removed it; a list with nothing removed reads no names at all.
    const listed = await statementsDuring(async () => (await as.lead.agent.get(`/api/projects/${p.slug}/milestones?removed=include`).expect(200)).body as Milestone[]);
    expect(listed.result.find((m) => m.id === b.id)!.removal).toMatchObject({ by: names.admin, reason: "Cabins stay for Hall 2B" });
    expect(listed.result.find((m) => m.id === a.id)!.removal).toBeNull();
    expect(namesRead(listed.sql)).toBe(1);
    const inProgramme = await statementsDuring(async () => (await as.lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[]);
    expect(inProgramme.result.map((m) => m.id)).toEqual([a.id]);
    expect(namesRead(inProgramme.sql)).toBe(0);
  });

  it("a stale edit's 409 carries the current milestone with its values as written", async () => {
    const p = await makeProject("Names test: conflict");
    const m = (await send(as.lead, "post", `/api/projects/${p.slug}/milestones`, { phase: "Fit-out", area: "Hall 2A", system: "fit-out", weight: 1, baselineFinish: "2027-05-03", audience: "public", name: "Containment installed" })) as Milestone;
    await send(as.admin, "patch", `/api/milestones/${m.id}`, { version: m.version, percentComplete: 30 });
    const stale = await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: m.version, percentComplete: 50 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ id: m.id, percentComplete: 30, version: m.version + 1, removal: null });
  });
});

describe("enquiries name their project and owner", () => {
  const ask = async (slug: string, email: string) => {
    const c = await newClient(t);
    const res = await c.agent.post(`/api/projects/${slug}/enquiries`).set("X-CSRF-Token", c.csrf).send({ kind: "general", name: "Rowan Achterberg", email, message: "What is the lead time for a cage in Hall 2A?" });
    expect(res.status).toBe(202);
    return Number((await t.db("enquiries").where({ email }).orderBy("id", "desc").first("id")).id);
  };

  it("lists one project's enquiries with its slug and name and each owner's name, reading each once; an unknown project lists none", async () => {
    const mine = await makeProject("Names test: Hall 2A");
    const other = await makeProject("Names test: HD-1");
    const tag = randomBytes(3).toString("hex");
    const first = await ask(mine.slug, `first-${tag}@example.org`);
    const second = await ask(mine.slug, `second-${tag}@example.org`);
    const third = await ask(mine.slug, `third-${tag}@example.org`);
    const elsewhere = await ask(other.slug, `elsewhere-${tag}@example.org`);
    const ids = (who: Client) => who.agent.get("/api/auth/me").then((r) => Number(r.body.user.id));
    await send(as.marketing, "patch", `/api/enquiries/${first}`, { ownerId: await ids(as.marketing) });
    await send(as.marketing, "patch", `/api/enquiries/${second}`, { ownerId: await ids(as.lead) });

    const listed = await statementsDuring(async () => (await as.marketing.agent.get(`/api/enquiries?projectSlug=${mine.slug}`).expect(200)).body as EnquiryRow[]);
    expect(listed.result.map((e) => e.id)).toEqual([third, second, first]);
    expect(listed.result.map((e) => e.project)).toEqual(Array(3).fill({ slug: mine.slug, name: mine.name }));
    expect(listed.result.map((e) => e.owner)).toEqual([null, { id: await ids(as.lead), name: names.lead }, { id: await ids(as.marketing), name: names.marketing }]);
    expect(namesRead(listed.sql)).toBe(1);
    expect(projectsRead(listed.sql)).toBe(1);

    const all = (await as.marketing.agent.get("/api/enquiries").expect(200)).body as EnquiryRow[];
    expect(all.find((e) => e.id === elsewhere)).toMatchObject({ project: { slug: other.slug, name: other.name }, owner: null });

    expect((await as.marketing.agent.get(`/api/enquiries/${second}`).expect(200)).body).toMatchObject({ id: second, project: { slug: mine.slug, name: mine.name }, owner: { name: names.lead } });
    expect((await as.marketing.agent.get("/api/enquiries?projectSlug=no-such-project").expect(200)).body).toEqual([]);
    expect((await as.marketing.agent.get("/api/enquiries/999999999")).status).toBe(404);
  });

  it("a person's data export names the project of each of their enquiries", async () => {
    const p = await makeProject("Names test: export");
    const email = `export-${randomBytes(3).toString("hex")}@example.org`;
    const enquiry = await ask(p.slug, email);
    const [subscriberId] = await t.db("subscribers").insert({ project_id: p.id, email, email_hash: hashAddress(email), name: "Rowan Achterberg", interest: "prospect", frequency: "weekly", topics_key: "all", status: "confirmed", confirmed_at: new Date() });
    const res = await as.marketing.agent.get(`/api/subscribers/${subscriberId}/export`).expect(200);
    expect(res.body.enquiries).toEqual([expect.objectContaining({ id: enquiry, email, project: { slug: p.slug, name: p.name }, owner: null })]);
  });
});
