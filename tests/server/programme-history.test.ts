import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DateTime } from "luxon";
import type { Milestone, MilestoneEventRow } from "../../src/shared/schemas/programme.ts";
import { DEMO, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";

let t: TestApp;
let lead: { agent: Agent; csrf: string };
beforeAll(async () => {
  t = await startTestApp();
  lead = await signIn(t, DEMO.lead);
});
afterAll(async () => {
  await t.close();
});

const LONDON = "Europe/London";
let seq = 0;
async function makeProject(opts: { timeZone?: string } = {}) {
  seq += 1;
  const slug = `prog-hist-${Date.now().toString(36)}-${seq}`;
  const [id] = await t.db("projects").insert({
    slug,
    name: `History test ${seq}`,
    operator_name: "Kestrel Colocation",
    time_zone: opts.timeZone ?? LONDON,
    currency: "GBP",
    tolerance_working_days: 5,
    behind_working_days: 15,
    weekend_days: "[6,7]",
    holidays: "[]",
  });
  return { id: Number(id), slug };
}

const base = { name: "Chillers set", phase: "Plant", area: "Plant yard", system: "cooling", weight: 1, baselineFinish: "2027-03-01", audience: "public" };

async function create(slug: string, body: Record<string, unknown> = {}): Promise<Milestone> {
  const res = await lead.agent.post(`/api/projects/${slug}/milestones`).set("X-CSRF-Token", lead.csrf).send({ ...base, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as Milestone;
}
async function patch(id: number, body: Record<string, unknown>): Promise<Milestone> {
  const current = await t.db("milestones").where({ id }).first("version");
  const res = await lead.agent.patch(`/api/milestones/${id}`).set("X-CSRF-Token", lead.csrf).send({ version: Number(current.version), ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as Milestone;
}
const post = (path: string, body: unknown) => lead.agent.post(path).set("X-CSRF-Token", lead.csrf).send(body as object);
const today = () => DateTime.now().setZone(LONDON).toISODate()!;
const plus = (date: string, days: number) => DateTime.fromISO(date).plus({ days }).toISODate()!;
/** An instant given as a wall-clock time in London. */
const londonInstant = (date: string, time: string) => DateTime.fromISO(`${date}T${time}`, { zone: LONDON }).toJSDate();

describe("GET /api/projects/:slug/changes", () => {
  it("returns the events whose date in the project's time zone lies in [from, to], both ends included", async () => {
    const p = await makeProject();
    const m = await create(p.slug);
    for (const percent of [10, 20, 30, 40]) await patch(m.id, { percentComplete: percent });
    const ids = (await t.db("milestone_events").where({ milestone_id: m.id, field: "percent_complete" }).orderBy("id").select("id")).map((r) => Number(r.id));
    // British Summer Time (UTC+1) in July: the first and last instants of the window by London's clock.
    const times = [
      londonInstant("2026-06-30", "23:59:59.999"), // 30 June in London: before the window
      londonInstant("2026-07-01", "00:00:00.000"), // 22:59 UTC on 30 June, but 1 July in London: inside
      londonInstant("2026-07-31", "23:59:59.999"), // inside
      londonInstant("2026-08-01", "00:00:00.000"), // outside
    ];
    for (const [i, id] of ids.entries()) await t.db("milestone_events").where({ id }).update({ at: times[i] });
    const res = await lead.agent.get(`/api/projects/${p.slug}/changes?from=2026-07-01&to=2026-07-31`).expect(200);
    const rows = res.body as MilestoneEventRow[];
    expect(rows.map((r) => r.to)).toEqual(["30", "20"]); // newest first
    expect(rows[1]).toMatchObject({ milestoneId: m.id, field: "percent_complete", from: "10", to: "20", at: "2026-06-30T23:00:00.000Z" });
    const oneDay = await lead.agent.get(`/api/projects/${p.slug}/changes?from=2026-07-31&to=2026-07-31`).expect(200);
    expect(oneDay.body.map((r: MilestoneEventRow) => r.to)).toEqual(["30"]);
  });

  it("refuses a window that ends before it starts", async () => {
    const p = await makeProject();
    const res = await lead.agent.get(`/api/projects/${p.slug}/changes?from=2026-07-31&to=2026-07-01`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.to).toEqual(expect.any(String));
  });
});

describe("GET /api/projects/:slug/moves", () => {
  it("summarises the window: later by N days, earlier, completed, re-baselined", async () => {
    const p = await makeProject();
    const slipped = await create(p.slug, { name: "Chillers delivered" });
    const pulled = await create(p.slug, { name: "UPS modules installed" });
    const done = await create(p.slug, { name: "Fuel tank tested", baselineFinish: "2026-03-02" });
    const moved = await create(p.slug, { name: "Hall 2B fit-out", baselineFinish: "2027-06-01" });
    await patch(slipped.id, { forecastFinish: "2027-03-06", note: "Factory re-test" });
    await patch(slipped.id, { forecastFinish: "2027-03-15", note: "Held at the port" });
    await patch(pulled.id, { forecastFinish: "2027-02-26" });
    await patch(done.id, { actualFinish: "2026-03-04" });
    await post(`/api/projects/${p.slug}/baselines`, {
      reason: "Hall 2B moved to a later stage",
      adoptForecasts: false,
      overrides: [{ id: moved.id, baselineFinish: "2027-08-03" }],
    }).expect(201);

    const day = today();
    const res = await lead.agent.get(`/api/projects/${p.slug}/moves?from=${day}&to=${day}`).expect(200);
    const byName = Object.fromEntries(res.body.map((r: { milestoneName: string; moves: unknown[] }) => [r.milestoneName, r.moves]));
    expect(byName["Chillers delivered"]).toEqual([
      { kind: "later", days: 14, from: "2027-03-01", to: "2027-03-15", notes: ["Factory re-test", "Held at the port"] },
    ]);
    expect(byName["UPS modules installed"]).toEqual([{ kind: "earlier", days: -3, from: "2027-03-01", to: "2027-02-26", notes: [] }]);
    expect(byName["Fuel tank tested"]).toEqual([
      { kind: "completed", from: null, to: "2026-03-04", notes: [] },
      { kind: "progress", from: "0", to: "100", notes: [] },
    ]);
    expect(byName["Hall 2B fit-out"]).toEqual([
      { kind: "rebaselined", days: 63, from: "2027-06-01", to: "2027-08-03", notes: ["Hall 2B moved to a later stage"] },
    ]);
    // A window before any of it reports nothing.
    const before = await lead.agent.get(`/api/projects/${p.slug}/moves?from=2020-01-01&to=2020-12-31`).expect(200);
    expect(before.body).toEqual([]);
  });
});

describe("POST /api/projects/:slug/baselines", () => {
  it("creates version n+1 from the forecasts, writes tagged baseline events, and keeps the older snapshot readable", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "Generators set", plannedStart: "2027-01-04", budget: 50_000_000 });
    const done = await create(p.slug, { name: "Enabling works", baselineFinish: "2026-05-01", actualFinish: "2026-05-06" });
    const first = await post(`/api/projects/${p.slug}/baselines`, { reason: "Programme agreed at financial close" });
    expect(first.status).toBe(201);
    expect(first.body).toMatchObject({ number: 1, reason: "Programme agreed at financial close", by: "Priya Castell", milestoneCount: 2 });

    await patch(a.id, { forecastFinish: "2027-03-15" });
    const versionBefore = Number((await t.db("milestones").where({ id: a.id }).first("version")).version);
    const second = await post(`/api/projects/${p.slug}/baselines`, { reason: "Generator delivery re-planned" });
    expect(second.status).toBe(201);
    expect(second.body.number).toBe(2);

    const list = (await lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    const gens = list.find((m) => m.id === a.id)!;
    expect(gens).toMatchObject({ baselineFinish: "2027-03-15", forecastFinish: "2027-03-15", slipDays: 0, version: versionBefore + 1 });
    // The finished milestone keeps the baseline its work was measured against.
    expect(list.find((m) => m.id === done.id)).toMatchObject({ baselineFinish: "2026-05-01", slipDays: 5 });

    const events = (await lead.agent.get(`/api/milestones/${a.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events[0]).toMatchObject({ field: "baseline_finish", from: "2027-03-01", to: "2027-03-15", baselineVersion: 2, note: "Generator delivery re-planned" });

    const versions = await lead.agent.get(`/api/projects/${p.slug}/baselines`).expect(200);
    expect(versions.body.map((v: { number: number; reason: string }) => [v.number, v.reason])).toEqual([
      [1, "Programme agreed at financial close"],
      [2, "Generator delivery re-planned"],
    ]);
    const v1 = await lead.agent.get(`/api/projects/${p.slug}/baselines/1`).expect(200);
    expect(v1.body.milestones.find((e: { id: number }) => e.id === a.id)).toEqual({
      id: a.id,
      name: "Generators set",
      audience: "public",
      plannedStart: "2027-01-04",
      baselineFinish: "2027-03-01",
      weight: 1,
      budget: 50_000_000,
    });
    const v2 = await lead.agent.get(`/api/projects/${p.slug}/baselines/2`).expect(200);
    expect(v2.body.milestones.find((e: { id: number }) => e.id === a.id).baselineFinish).toBe("2027-03-15");
    await lead.agent.get(`/api/projects/${p.slug}/baselines/9`).expect(404);
  });

  it("applies overrides of planned start and baseline finish", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "Hall 2B fit-out", plannedStart: "2027-01-04", baselineFinish: "2027-05-28" });
    await post(`/api/projects/${p.slug}/baselines`, {
      reason: "Hall 2B moved to a later stage",
      adoptForecasts: false,
      overrides: [{ id: a.id, plannedStart: "2027-03-01", baselineFinish: "2027-07-30" }],
    }).expect(201);
    const [m] = (await lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    expect(m).toMatchObject({ plannedStart: "2027-03-01", baselineFinish: "2027-07-30" });
    const events = (await lead.agent.get(`/api/milestones/${a.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events.filter((e) => e.baselineVersion === 1).map((e) => e.field).sort()).toEqual(["baseline_finish", "planned_start"]);
  });

  it("asks for a reason, and refuses unknown or impossible overrides without writing anything", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { plannedStart: "2027-01-04" });
    const count = async () => ({
      baselines: Number((await t.db("baselines").where({ project_id: p.id }).count({ n: "*" }))[0]!.n),
      events: Number((await t.db("milestone_events").where({ project_id: p.id }).count({ n: "*" }))[0]!.n),
    });
    const before = await count();
    const noReason = await post(`/api/projects/${p.slug}/baselines`, { reason: "" });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toEqual(expect.any(String));
    const unknown = await post(`/api/projects/${p.slug}/baselines`, { reason: "A good reason", overrides: [{ id: 999_999_995, baselineFinish: "2027-05-01" }] });
    expect(unknown.status).toBe(422);
    expect(unknown.body.error.fields.overrides).toContain("999999995");
    const backwards = await post(`/api/projects/${p.slug}/baselines`, { reason: "A good reason", overrides: [{ id: a.id, baselineFinish: "2026-12-01" }] });
    expect(backwards.status).toBe(422);
    expect(backwards.body.error.fields.overrides).toContain(a.name);
    expect(await count()).toEqual(before);
  });
});

describe("GET /api/projects/:slug/curve", () => {
  it("reconstructs earned percent at past dates by replaying percent and actual-finish events backwards", async () => {
    const p = await makeProject();
    const d0 = today();
    const m = await create(p.slug, { name: "Fit-out", weight: 1, plannedStart: plus(d0, -30), baselineFinish: plus(d0, 30) });
    const n = await create(p.slug, { name: "Fuel tank", weight: 3, baselineFinish: plus(d0, -40) });
    await patch(m.id, { percentComplete: 50 });
    await patch(m.id, { percentComplete: 80 });
    await patch(n.id, { actualFinish: plus(d0, -12) });
    const moveEvents = async (milestoneId: number, field: string, at: Date, to?: string) => {
      const q = t.db("milestone_events").where({ milestone_id: milestoneId, field });
      if (to !== undefined) q.andWhere({ to_value: to });
      await q.update({ at });
    };
    await moveEvents(m.id, "percent_complete", londonInstant(plus(d0, -20), "12:00"), "50");
    await moveEvents(m.id, "percent_complete", londonInstant(plus(d0, -10), "12:00"), "80");
    await moveEvents(n.id, "percent_complete", londonInstant(plus(d0, -12), "16:00"));
    await moveEvents(n.id, "actual_finish", londonInstant(plus(d0, -12), "16:00"));

    const res = await lead.agent.get(`/api/projects/${p.slug}/curve?from=${plus(d0, -30)}&to=${plus(d0, 5)}&step=5`).expect(200);
    expect(res.body.at).toBe(d0);
    const points = res.body.points as Array<{ date: string; plannedPercent: number; earnedPercent: number | null }>;
    expect(points.map((x) => x.date)).toEqual([-30, -25, -20, -15, -10, -5, 0, 5].map((k) => plus(d0, k)));
    // Earned (weights 1 and 3): Fit-out 0 → 50 on day −20 → 80 on day −10; Fuel tank done on day −12.
    expect(points.map((x) => x.earnedPercent)).toEqual([0, 0, 12.5, 12.5, 95, 95, 95, null]);
    // Planned: Fit-out linear over 60 days, the point milestone already at 100.
    for (const [i, x] of points.entries()) {
      const k = -30 + 5 * i;
      expect(x.plannedPercent).toBeCloseTo(((k + 30) / 60 + 3) / 4 * 100, 10);
    }
    // Today's earned point is the health figure.
    const health = await lead.agent.get(`/api/projects/${p.slug}/health`).expect(200);
    expect(health.body.percentComplete).toBeCloseTo(95, 10);
  });

  it("spans the programme by default and answers an empty programme with no points", async () => {
    const p = await makeProject();
    expect((await lead.agent.get(`/api/projects/${p.slug}/curve`).expect(200)).body.points).toEqual([]);
    await create(p.slug, { plannedStart: "2026-01-05", baselineFinish: "2026-03-02" });
    const res = await lead.agent.get(`/api/projects/${p.slug}/curve`).expect(200);
    expect(res.body.points[0]).toMatchObject({ date: "2026-01-05", plannedPercent: 0 });
    expect(res.body.points.at(-1)).toMatchObject({ date: "2026-03-02", plannedPercent: 100 });
    const tooMany = await lead.agent.get(`/api/projects/${p.slug}/curve?from=2000-01-01&to=2090-01-01&step=1`);
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.fields.step).toEqual(expect.any(String));
  });
});

describe("GET /api/projects/:slug/health", () => {
  it("answers the fixed fields, computed (our own example)", async () => {
    // Our own example, by hand: M1 (weight 1) planned 1–11 Jan, done on 10 Jan; M2 (weight 3)
    // planned 11–21 Jan, 20 % done. At 16 Jan: PV = 1 + 3 × 0.5 = 2.5, EV = 1 + 3 × 0.2 = 1.6,
    // SPI = 0.64, SV = −0.9, percent complete 1.6 / 4 = 40 %, planned 62.5 %. Money: budgets
    // 100,000 and 300,000 → PV 250,000, EV 160,000; AC 200,000 booked by 15 Jan (the
    // 31 Jan booking is after the status date) → CPI 0.8, EAC = 400,000 / 0.8 = 500,000.
    const p = await makeProject();
    const m1 = await create(p.slug, { name: "M1", weight: 1, plannedStart: "2026-01-01", baselineFinish: "2026-01-11", actualFinish: "2026-01-10", budget: 100_000 });
    await create(p.slug, { name: "M2", weight: 3, plannedStart: "2026-01-11", baselineFinish: "2026-01-21", forecastFinish: "2026-01-21", percentComplete: 20, budget: 300_000, dependsOn: [m1.id] });
    await post(`/api/projects/${p.slug}/cost-actuals`, { periodEnd: "2026-01-15", amount: 150_000 }).expect(201);
    // Posting a period again replaces its amount.
    await post(`/api/projects/${p.slug}/cost-actuals`, { periodEnd: "2026-01-15", amount: 200_000 }).expect(201);
    await post(`/api/projects/${p.slug}/cost-actuals`, { periodEnd: "2026-01-31", amount: 90_000 }).expect(201);
    expect((await lead.agent.get(`/api/projects/${p.slug}/cost-actuals`).expect(200)).body).toEqual([
      { periodEnd: "2026-01-15", amount: 200_000 },
      { periodEnd: "2026-01-31", amount: 90_000 },
    ]);

    const res = await lead.agent.get(`/api/projects/${p.slug}/health?at=2026-01-16`).expect(200);
    const h = res.body;
    expect(h.at).toBe("2026-01-16");
    expect(h.timeZone).toBe(LONDON);
    expect(h.percentComplete).toBeCloseTo(40, 10);
    expect(h.plannedPercent).toBeCloseTo(62.5, 10);
    expect(h.spi).toBeCloseTo(0.64, 10);
    expect(h.sv).toBeCloseTo(-0.9, 10);
    expect(h.earnedSchedule).toEqual(expect.objectContaining({ es: expect.any(Number), spiT: expect.any(Number), svT: expect.any(Number), ieacT: expect.any(Number), tspi: expect.any(Number) }));
    expect(h.forecastCompletion).toBe("2026-01-21");
    expect(h.counts).toEqual({ complete: 1, onProgramme: 1, atRisk: 0, behind: 0 });
    expect(h.money).toMatchObject({ bac: 400_000, ac: 200_000, currency: "GBP" });
    expect(h.money.pv).toBeCloseTo(250_000, 6);
    expect(h.money.ev).toBeCloseTo(160_000, 6);
    expect(h.money.cpi).toBeCloseTo(0.8, 10);
    expect(h.money.eac).toBeCloseTo(500_000, 6);
    expect(h.drivers).toEqual({
      milestoneId: expect.any(Number),
      finish: "2026-01-21",
      chain: [
        { id: expect.any(Number), name: "M2", finish: "2026-01-21" },
        { id: m1.id, name: "M1", finish: "2026-01-10" },
      ],
    });
  });

  it("gives an empty programme zeros and nulls, never NaN", async () => {
    const p = await makeProject();
    const res = await lead.agent.get(`/api/projects/${p.slug}/health`).expect(200);
    expect(res.body).toMatchObject({ percentComplete: 0, plannedPercent: 0, spi: null, forecastCompletion: null, money: null, drivers: null, counts: { complete: 0, onProgramme: 0, atRisk: 0, behind: 0 } });
    expect(JSON.stringify(res.body)).not.toContain("NaN");
  });

  it("refuses a status date that is not a date", async () => {
    const p = await makeProject();
    const res = await lead.agent.get(`/api/projects/${p.slug}/health?at=2026-13-01`);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.at).toEqual(expect.any(String));
    await lead.agent.get(`/api/projects/no-such-project-here/health`).expect(404);
  });
});
