import { randomBytes } from "node:crypto";
import { DateTime } from "luxon";
import { simpleParser } from "mailparser";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, DEMO, lastMailId, newClient, signIn, startTestApp, waitForMail, type TestApp } from "../helpers/app.ts";

let t: TestApp;
let slug: string;
let noVisitsSlug: string;
let projectId: number;

async function clearLimits() {
  await t.db("rate_limit_hits").where("key", "like", "enquiry-%").delete();
}

beforeAll(async () => {
  t = await startTestApp({ ENQUIRY_LIMIT_PER_IP: "100000" });
  await clearLimits();
  slug = `enq-${randomBytes(3).toString("hex")}`;
  noVisitsSlug = `${slug}-novisit`;
  const [id] = await t.db("projects").insert({ slug, name: "Enquiry Test Hall", operator_name: "Kestrel Colocation", time_zone: "Europe/London", visits_offered: true });
  projectId = Number(id);
  await t.db("projects").insert({ slug: noVisitsSlug, name: "Closed Site", operator_name: "Kestrel Colocation", time_zone: "Europe/London", visits_offered: false });
});
afterAll(async () => {
  await clearLimits();
  await t.close();
});

const siteDate = (days: number) => DateTime.now().setZone("Europe/London").plus({ days }).toISODate()!;
let n = 0;
const address = (tag: string) => `${tag}-${Date.now().toString(36)}-${++n}@example.org`;

async function send(body: Record<string, unknown>, projectSlug = slug) {
  const c = await newClient(t);
  return c.agent.post(`/api/projects/${projectSlug}/enquiries`).set("X-CSRF-Token", c.csrf).send(body);
}

const capacity = (email: string) => ({ kind: "capacity", name: "Rowan Achterberg", email, organisation: "Fenwick Data Services", racks: 12, kwPerRack: 18, neededBy: siteDate(120), message: "GPU racks for HD-1." });
const visit = (email: string) => ({ kind: "visit", name: "Anjali Verhoeven", email, preferredDates: [siteDate(14), siteDate(7)], partySize: 3, rulesAccepted: true });

describe("POST /api/projects/:slug/enquiries", () => {
  it("keeps a capacity enquiry and e-mails every active marketing user, with Reply-To the enquirer", async () => {
    const second = await createUser(t, "marketing");
    const disabled = await createUser(t, "marketing");
    await t.db("users").where({ id: disabled.id }).update({ disabled_at: new Date() });
    const email = address("capacity");
    const before = await lastMailId(t);
    const res = await send(capacity(email));
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ ok: true, message: expect.stringMatching(/Thank you/) });
    const row = await t.db("enquiries").where({ email }).first();
    expect(row).toMatchObject({ project_id: projectId, kind: "capacity", racks: 12, kw_per_rack: 18, needed_by: siteDate(120), status: "new", owner_id: null });
    expect(row.ip).toMatch(/127\.0\.0\.1/);

    for (const to of [DEMO.marketing, second.email]) {
      const mail = await waitForMail(t, to, before);
      expect(mail.subject).toBe("New enquiry (capacity): 12 racks at 18 kW from Rowan Achterberg (Fenwick Data Services)");
      expect(mail.text).toContain("12 racks at 18 kW per rack (216 kW of IT load in all)");
      expect(mail.text).toContain(`/office/enquiries?open=${row.id}`);
      const raw = await t.db("mail_messages").where({ id: mail.id }).first("raw");
      const parsed = await simpleParser(raw.raw as Buffer);
      expect(parsed.replyTo?.value[0]?.address).toBe(email);
    }
    await new Promise((r) => setTimeout(r, 200));
    expect(await t.db("mail_recipients").where({ address: disabled.email }).first()).toBeUndefined();
    // No copy goes to the address given on the form.
    expect(await t.db("mail_recipients").where({ address: email }).first()).toBeUndefined();
  });

  it("keeps a site-visit request with its dates and party, once the site rules are accepted", async () => {
    const email = address("visit");
    const res = await send(visit(email));
    expect(res.status).toBe(202);
    const row = await t.db("enquiries").where({ email }).first();
    expect(row).toMatchObject({ kind: "visit", party_size: 3 });
    expect(JSON.parse(row.preferred_dates)).toEqual([siteDate(7), siteDate(14)]);
    expect(row.rules_accepted_at).toBeInstanceOf(Date);

    const noRules = await send({ ...visit(address("visit-norules")), rulesAccepted: false });
    expect(noRules.status).toBe(400);
    expect(noRules.body.error.fields.rulesAccepted).toMatch(/site rules/);
    const past = await send({ ...visit(address("visit-past")), preferredDates: [siteDate(0)] });
    expect(past.status).toBe(400);
    expect(past.body.error.fields.preferredDates).toMatch(/after today/);
    const crowd = await send({ ...visit(address("visit-crowd")), partySize: 12 });
    expect(crowd.status).toBe(400);
    expect(crowd.body.error.fields.partySize).toMatch(/at most 6/);
    const closed = await send(visit(address("visit-closed")), noVisitsSlug);
    expect(closed.status).toBe(422);
    expect(closed.body.error.code).toBe("visits_not_offered");
    expect(await t.db("enquiries").whereIn("email", [address("none")]).first()).toBeUndefined();
  });

  it("keeps a general question, which needs a message", async () => {
    const email = address("general");
    expect((await send({ kind: "general", name: "Hamish Ockenden", email, message: "Short" })).status).toBe(400);
    expect((await send({ kind: "general", name: "Hamish Ockenden", email, message: "Will generator tests happen at weekends?" })).status).toBe(202);
    expect(await t.db("enquiries").where({ email }).count({ n: "*" }).first()).toMatchObject({ n: 1 });
  });

  it("a filled honeypot gets the same answer, and nothing is kept or sent", async () => {
    const email = address("robot");
    const before = await lastMailId(t);
    const real = await send(capacity(address("human")));
    const robot = await send({ ...capacity(email), website: "https://cheap-pills.example" });
    expect(robot.status).toBe(real.status);
    expect(robot.body).toEqual(real.body);
    expect(await t.db("enquiries").where({ email }).first()).toBeUndefined();
    // The real one's notification arrives; none ever names the robot's address.
    await waitForMail(t, DEMO.marketing, before);
    await new Promise((r) => setTimeout(r, 300));
    const mentions = await t.db("mail_messages").where("id", ">", before).andWhere("text", "like", `%${email}%`).count({ n: "*" }).first();
    expect(Number(mentions?.n)).toBe(0);
  });

  it("refuses unknown fields, unknown kinds and fields of another kind, with the fixed error shape, writing nothing", async () => {
    const email = address("strict");
    const cases: Array<[Record<string, unknown>, string]> = [
      [{ ...capacity(email), budget: 1000 }, "budget"],
      [{ ...capacity(email), kind: "tour" }, "kind"],
      [{ ...capacity(email), partySize: 2 }, "partySize"],
      [{ ...capacity(email), racks: 2.5 }, "racks"],
      [{ ...capacity(email), neededBy: "2027-02-30" }, "neededBy"],
      [{ ...capacity(email), neededBy: siteDate(-1) }, "neededBy"],
      [{ ...capacity(email), email: "nobody" }, "email"],
    ];
    for (const [body, field] of cases) {
      const res = await send(body);
      expect(res.status, field).toBe(400);
      expect(res.body.error).toMatchObject({ code: "validation", message: expect.any(String) });
      expect(res.body.error.fields[field], JSON.stringify(res.body)).toEqual(expect.any(String));
    }
    expect(await t.db("enquiries").where({ email }).first()).toBeUndefined();
    expect((await send(capacity(email), "no-such-project")).status).toBe(404);
  });
});

describe("enquiry rate limit", () => {
  it("refuses the request after the per-IP limit with 429", async () => {
    const limited = await startTestApp({ ENQUIRY_LIMIT_PER_IP: "2" });
    try {
      await clearLimits();
      const statuses: number[] = [];
      for (let i = 0; i < 3; i++) {
        const c = await newClient(limited);
        statuses.push((await c.agent.post(`/api/projects/${slug}/enquiries`).set("X-CSRF-Token", c.csrf).send(capacity(address(`rl${i}`)))).status);
      }
      expect(statuses).toEqual([202, 202, 429]);
    } finally {
      await clearLimits();
      await limited.close();
    }
  });
});

describe("working enquiries in the site office", () => {
  it("marketing lists them by status, takes ownership, adds notes and moves the status on", async () => {
    const email = address("work");
    await send(visit(email));
    const id = (await t.db("enquiries").where({ email }).first()).id as number;
    const m = await signIn(t, DEMO.marketing);
    const me = (await m.agent.get("/api/auth/me")).body.user;

    const fresh = await m.agent.get(`/api/enquiries?status=new&projectSlug=${slug}`).expect(200);
    expect(fresh.body.map((e: { id: number }) => e.id)).toContain(id);
    const owners = await m.agent.get("/api/enquiries/owners").expect(200);
    expect(owners.body.map((o: { role: string }) => o.role)).not.toContain("investor");

    const patched = await m.agent.patch(`/api/enquiries/${id}`).set("X-CSRF-Token", m.csrf).send({ status: "contacted", ownerId: me.id, notes: "Rang back; induction booked." });
    expect(patched.status).toBe(200);
    expect(patched.body).toMatchObject({ id, status: "contacted", owner: { id: me.id, name: me.name }, notes: "Rang back; induction booked.", preferredDates: [siteDate(7), siteDate(14)] });
    expect((await m.agent.get(`/api/enquiries?status=new&projectSlug=${slug}`)).body.map((e: { id: number }) => e.id)).not.toContain(id);

    const investor = await t.db("users").where({ email: DEMO.investor }).first("id");
    const badOwner = await m.agent.patch(`/api/enquiries/${id}`).set("X-CSRF-Token", m.csrf).send({ ownerId: investor.id, status: "closed" });
    expect(badOwner.status).toBe(422);
    expect(badOwner.body.error.fields.ownerId).toEqual(expect.any(String));
    const badStatus = await m.agent.patch(`/api/enquiries/${id}`).set("X-CSRF-Token", m.csrf).send({ status: "won" });
    expect(badStatus.status).toBe(400);
    expect((await t.db("enquiries").where({ id }).first())).toMatchObject({ status: "contacted", owner_id: me.id });

    const lead = await signIn(t, DEMO.lead);
    await lead.agent.patch(`/api/enquiries/${id}`).set("X-CSRF-Token", lead.csrf).send({ status: "closed", ownerId: null }).expect(200);
    expect((await t.db("enquiries").where({ id }).first())).toMatchObject({ status: "closed", owner_id: null });
  });

  it("is closed to investors and visitors", async () => {
    expect((await (await signIn(t, DEMO.investor)).agent.get("/api/enquiries")).status).toBe(403);
    expect((await (await newClient(t)).agent.get("/api/enquiries")).status).toBe(401);
  });
});
