import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DateTime } from "luxon";
import type { Milestone } from "../../src/shared/schemas/programme.ts";
import { DEMO, newClient, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";

let t: TestApp;
type Client = { agent: Agent; csrf: string };
let lead: Client;
let investor: Client;
let visitor: Client;
beforeAll(async () => {
  t = await startTestApp();
  lead = await signIn(t, DEMO.lead);
  investor = await signIn(t, DEMO.investor);
  visitor = await newClient(t);
});
afterAll(async () => {
  await t.close();
});

let seq = 0;
async function makeProject() {
  seq += 1;
  const slug = `prog-aud-${Date.now().toString(36)}-${seq}`;
  const [id] = await t.db("projects").insert({
    slug,
    name: `Audience test ${seq}`,
    operator_name: "Kestrel Colocation",
    time_zone: "Europe/London",
    currency: "GBP",
    tolerance_working_days: 5,
    behind_working_days: 15,
    weekend_days: "[6,7]",
    holidays: "[]",
  });
  return { id: Number(id), slug };
}

async function create(slug: string, body: Record<string, unknown>): Promise<Milestone> {
  const res = await lead.agent.post(`/api/projects/${slug}/milestones`).set("X-CSRF-Token", lead.csrf).send({ phase: "Plant", system: "power", weight: 1, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as Milestone;
}
const patch = (id: number, body: Record<string, unknown>) => lead.agent.patch(`/api/milestones/${id}`).set("X-CSRF-Token", lead.csrf).send(body).expect(200);
const today = () => DateTime.now().setZone("Europe/London").toISODate()!;

/** Everything a reader is shown about a programme, with the parts a change of dependencies may bump left out. */
async function everythingSeenBy(c: Client, slug: string, publicId: number) {
  const day = today();
  const get = async (path: string) => (await c.agent.get(path).expect(200)).body;
  const list = (await get(`/api/projects/${slug}/milestones?at=${day}`)) as Milestone[];
  return {
    health: await get(`/api/projects/${slug}/health?at=${day}`),
    curve: await get(`/api/projects/${slug}/curve?from=2026-01-05&to=2027-12-27&step=7`),
    list: list.map(({ version: _v, updatedAt: _u, ...rest }) => rest),
    changes: await get(`/api/projects/${slug}/changes?from=${day}&to=${day}`),
    moves: await get(`/api/projects/${slug}/moves?from=${day}&to=${day}`),
    drivers: await get(`/api/milestones/${publicId}/drivers`),
  };
}

async function programmeWithoutInternal() {
  const p = await makeProject();
  const inv = await create(p.slug, { name: "UPS modules installed", audience: "investor", weight: 3, plannedStart: "2026-09-07", baselineFinish: "2027-01-29", percentComplete: 45, budget: 98_000_000 });
  const pub = await create(p.slug, { name: "Hall 2A ready for service", audience: "public", weight: 2, plannedStart: "2026-10-05", baselineFinish: "2027-04-02", forecastFinish: "2027-04-16", percentComplete: 10, budget: 20_000_000, dependsOn: [inv.id] });
  await patch(pub.id, { version: pub.version, percentComplete: 15, note: "Site walk" });
  return { p, inv, pub };
}

describe("audience: internal milestones", () => {
  it("are never listed or named to an investor or a visitor, yet count in everyone's headline figures", async () => {
    const { p, pub } = await programmeWithoutInternal();
    const before = { investor: await everythingSeenBy(investor, p.slug, pub.id), visitor: await everythingSeenBy(visitor, p.slug, pub.id), staff: await everythingSeenBy(lead, p.slug, pub.id) };

    // A heavy, late, costly internal milestone that the public one depends on, with history of its own.
    const secret = await create(p.slug, {
      name: "Mantrap interlocks tested",
      audience: "internal",
      system: "security",
      weight: 10,
      plannedStart: "2026-06-01",
      baselineFinish: "2026-09-01",
      forecastFinish: "2028-01-14",
      percentComplete: 5,
      budget: 500_000_000,
    });
    await patch(secret.id, { version: 1, percentComplete: 25, forecastFinish: "2028-02-11", note: "Secure zoning redesign" });
    const current = (await lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    const pubNow = current.find((m) => m.id === pub.id)!;
    await patch(pub.id, { version: pubNow.version, dependsOn: [...pubNow.dependsOn, secret.id] });

    const after = { investor: await everythingSeenBy(investor, p.slug, pub.id), visitor: await everythingSeenBy(visitor, p.slug, pub.id), staff: await everythingSeenBy(lead, p.slug, pub.id) };
    // What is listed does not move for those who may not see the internal milestone.
    for (const who of ["investor", "visitor"] as const) {
      const { health: _h, curve: _c, ...listedAfter } = after[who];
      const { health: _hb, curve: _cb, ...listedBefore } = before[who];
      expect(listedAfter).toEqual(listedBefore);
      expect(JSON.stringify(after[who])).not.toContain("Mantrap");
      expect(JSON.stringify(after[who])).not.toContain("Secure zoning");
      expect(after[who].health.milestones.map((m: { id: number }) => m.id)).not.toContain(secret.id);
    }
    // One build, one set of figures: everyone's headline moved with the internal milestone, to the same values.
    // Weights 3 × 45 % + 2 × 15 % + 10 × 25 % over 15.
    expect(after.staff.health.percentComplete).toBeCloseTo((3 * 45 + 2 * 15 + 10 * 25) / 15, 10);
    expect(after.visitor.health.percentComplete).not.toBeCloseTo(before.visitor.health.percentComplete, 5);
    for (const who of ["investor", "visitor"] as const) {
      for (const k of ["percentComplete", "plannedPercent", "spi", "forecastCompletion", "baselineCompletion", "earnedScheduleCompletion", "counts"] as const) {
        expect(after[who].health[k], `${who} ${k}`).toEqual(after.staff.health[k]);
      }
      expect(after[who].health.earnedSchedule.spiT).toEqual(after.staff.health.earnedSchedule.spiT);
      expect(after[who].curve).toEqual(after.staff.curve);
    }
    expect(after.staff.health.forecastCompletion).toBe("2028-02-11");
    // The driving chain says something internal stands in the way, without its name or date.
    expect(after.staff.health.drivers.chain.map((l: { name: string }) => l.name)).toEqual(["Mantrap interlocks tested"]);
    for (const who of ["investor", "visitor"] as const) {
      expect(after[who].health.drivers).toEqual({ milestoneId: null, finish: "2028-02-11", chain: [{ id: null, name: "A milestone not listed here", finish: null }] });
    }
    expect(after.staff.drivers.map((l: { name: string }) => l.name)).toEqual(["Hall 2A ready for service", "Mantrap interlocks tested"]);
    expect(after.staff.list.find((m: { id: number }) => m.id === pub.id)!.dependsOn).toContain(secret.id);
    expect(after.staff.changes.some((e: { milestoneId: number }) => e.milestoneId === secret.id)).toBe(true);
  });

  it("is not found by its id for investors and visitors, and is filtered out of lists", async () => {
    const { p } = await programmeWithoutInternal();
    const secret = await create(p.slug, { name: "Security head-end", audience: "internal", baselineFinish: "2027-02-12" });
    for (const c of [investor, visitor]) {
      const events = await c.agent.get(`/api/milestones/${secret.id}/events`);
      expect(events.status).toBe(404);
      expect(events.body.error.code).toBe("not_found");
      expect((await c.agent.get(`/api/milestones/${secret.id}/drivers`)).status).toBe(404);
      expect((await c.agent.get(`/api/projects/${p.slug}/milestones?audience=internal`).expect(200)).body).toEqual([]);
    }
    await lead.agent.get(`/api/milestones/${secret.id}/events`).expect(200);
    const marketing = await signIn(t, DEMO.marketing);
    const all = (await marketing.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    expect(all.map((m) => m.name)).toContain("Security head-end");
  });

  it("shows investors public and investor milestones, visitors public ones only", async () => {
    const { p, inv, pub } = await programmeWithoutInternal();
    const names = async (c: Client) => ((await c.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[]).map((m) => m.id).sort();
    expect(await names(investor)).toEqual([inv.id, pub.id].sort());
    expect(await names(visitor)).toEqual([pub.id]);
    // The visitor's view of the public milestone does not mention the investor-only predecessor.
    const [seen] = (await visitor.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    expect(seen!.dependsOn).toEqual([]);
    // The visitor's health lists the public milestone's line only, but its percent covers both: (3 × 45 + 2 × 15) / 5.
    const health = (await visitor.agent.get(`/api/projects/${p.slug}/health`).expect(200)).body;
    expect(health.milestones.map((m: { id: number }) => m.id)).toEqual([pub.id]);
    expect(health.percentComplete).toBeCloseTo(33, 10);
    // The investor-only predecessor drives the forecast; the visitor is told that, not its name.
    expect(health.drivers.chain).toEqual([
      { id: pub.id, name: "Hall 2A ready for service", finish: "2027-04-16" },
      { id: null, name: "A milestone not listed here", finish: null },
    ]);
    expect(JSON.stringify(health)).not.toContain("UPS modules");
  });
});

describe("audience: money", () => {
  it("is never sent to visitors; investors see budgets, money health and cost actuals", async () => {
    const { p } = await programmeWithoutInternal();
    await lead.agent.post(`/api/projects/${p.slug}/cost-actuals`).set("X-CSRF-Token", lead.csrf).send({ periodEnd: "2026-10-31", amount: 40_000_000 }).expect(201);

    const visitorList = (await visitor.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    expect(visitorList.every((m) => m.budget === null)).toBe(true);
    const visitorHealth = (await visitor.agent.get(`/api/projects/${p.slug}/health`).expect(200)).body;
    expect(visitorHealth.money).toBeNull();
    expect((await visitor.agent.get(`/api/projects/${p.slug}/cost-actuals`)).status).toBe(401);
    expect((await visitor.agent.get(`/api/projects/${p.slug}/milestones.csv`)).status).toBe(401);
    expect((await visitor.agent.get(`/api/projects/${p.slug}/baselines`)).status).toBe(401);

    const investorList = (await investor.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    expect(investorList.map((m) => m.budget).sort()).toEqual([20_000_000, 98_000_000]);
    const investorHealth = (await investor.agent.get(`/api/projects/${p.slug}/health`).expect(200)).body;
    expect(investorHealth.money).toMatchObject({ bac: 118_000_000, ac: 40_000_000, currency: "GBP" });
    expect((await investor.agent.get(`/api/projects/${p.slug}/cost-actuals`).expect(200)).body).toEqual([{ periodEnd: "2026-10-31", amount: 40_000_000 }]);
    expect((await investor.agent.get(`/api/projects/${p.slug}/milestones.csv`)).status).toBe(403);
  });
});

describe("audience: baselines", () => {
  it("count and show an investor only the milestones they may see", async () => {
    const { p, inv, pub } = await programmeWithoutInternal();
    await create(p.slug, { name: "Head-end configured", audience: "internal", baselineFinish: "2027-02-12" });
    await lead.agent.post(`/api/projects/${p.slug}/baselines`).set("X-CSRF-Token", lead.csrf).send({ reason: "Programme agreed", adoptForecasts: false }).expect(201);
    const staffView = (await lead.agent.get(`/api/projects/${p.slug}/baselines/1`).expect(200)).body;
    expect(staffView.milestoneCount).toBe(3);
    const investorView = (await investor.agent.get(`/api/projects/${p.slug}/baselines/1`).expect(200)).body;
    expect(investorView.milestoneCount).toBe(2);
    expect(investorView.milestones.map((e: { id: number }) => e.id).sort()).toEqual([inv.id, pub.id].sort());
    const list = (await investor.agent.get(`/api/projects/${p.slug}/baselines`).expect(200)).body;
    expect(list).toEqual([expect.objectContaining({ number: 1, milestoneCount: 2, reason: "Programme agreed" })]);
  });
});
