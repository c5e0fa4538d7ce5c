import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DateTime } from "luxon";
import type { Milestone, MilestoneEventRow } from "../../src/shared/schemas/programme.ts";
import { DEMO, newClient, signIn, startTestApp, type Agent, type TestApp } from "../helpers/app.ts";

let t: TestApp;
let lead: { agent: Agent; csrf: string };
beforeAll(async () => {
  t = await startTestApp();
  lead = await signIn(t, DEMO.lead);
});
afterAll(async () => {
  await t.close();
});

let seq = 0;
/** A project of the test's own, straight into the database (projects have no write API yet). */
async function makeProject(opts: { timeZone?: string; holidays?: string[] } = {}) {
  seq += 1;
  const slug = `prog-ms-${Date.now().toString(36)}-${seq}`;
  const [id] = await t.db("projects").insert({
    slug,
    name: `Programme test ${seq}`,
    operator_name: "Kestrel Colocation",
    time_zone: opts.timeZone ?? "Europe/London",
    currency: "GBP",
    tolerance_working_days: 5,
    behind_working_days: 15,
    weekend_days: "[6,7]",
    holidays: JSON.stringify(opts.holidays ?? []),
  });
  return { id: Number(id), slug };
}

/** Everything a programme write could touch, so "nothing written" can be checked. */
async function footprint(projectId: number) {
  const n = async (q: PromiseLike<Array<Record<string, unknown>>>) => Number((await q)[0]?.n ?? 0);
  return {
    milestones: await n(t.db("milestones").where({ project_id: projectId }).count({ n: "*" })),
    versions: await n(t.db("milestones").where({ project_id: projectId }).sum({ n: "version" })),
    phases: await n(t.db("phases").where({ project_id: projectId }).count({ n: "*" })),
    events: await n(t.db("milestone_events").where({ project_id: projectId }).count({ n: "*" })),
    dependencies: await n(
      t.db("milestone_dependencies as d").join("milestones as m", "m.id", "d.milestone_id").where("m.project_id", projectId).count({ n: "*" }),
    ),
    baselines: await n(t.db("baselines").where({ project_id: projectId }).count({ n: "*" })),
  };
}

const base = { name: "Generators delivered", phase: "Plant", area: "Energy centre", system: "power", weight: 2, baselineFinish: "2027-03-01", audience: "public" };

async function create(slug: string, body: Record<string, unknown> = {}): Promise<Milestone> {
  const res = await lead.agent.post(`/api/projects/${slug}/milestones`).set("X-CSRF-Token", lead.csrf).send({ ...base, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as Milestone;
}

const patch = (id: number, body: Record<string, unknown>) => lead.agent.patch(`/api/milestones/${id}`).set("X-CSRF-Token", lead.csrf).send(body);
const todayIn = (tz: string) => DateTime.now().setZone(tz).toISODate()!;

describe("POST /api/projects/:slug/milestones", () => {
  it("creates a milestone with its phase, a forecast equal to its baseline, status and slip, and version 1", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { plannedStart: "2027-01-04", percentComplete: 10, budget: 115_000_000 });
    expect(m).toMatchObject({
      name: "Generators delivered",
      phase: "Plant",
      area: "Energy centre",
      system: "power",
      weight: 2,
      percentComplete: 10,
      plannedStart: "2027-01-04",
      baselineFinish: "2027-03-01",
      forecastFinish: "2027-03-01",
      actualFinish: null,
      audience: "public",
      budget: 115_000_000,
      dependsOn: [],
      status: "on_programme",
      slipDays: 0,
      slipWorkingDays: 0,
      version: 1,
    });
    expect(m.updatedAt).toMatch(/Z$/);
    const list = await lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200);
    expect(list.body.map((x: Milestone) => x.id)).toEqual([m.id]);
    // Its starting progress is history, so the S-curve can start from zero.
    const events = await lead.agent.get(`/api/milestones/${m.id}/events`).expect(200);
    expect(events.body.map((e: MilestoneEventRow) => [e.field, e.from, e.to])).toEqual([["percent_complete", null, "10"]]);
  });

  it("when an actual finish is given, percent complete becomes 100", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { percentComplete: 40, actualFinish: "2026-01-15", baselineFinish: "2026-01-09" });
    expect(m.percentComplete).toBe(100);
    expect(m.status).toBe("complete");
    // 2026-01-09 (Friday) → 2026-01-15 (Thursday): 6 calendar days, 4 working days.
    expect(m.slipDays).toBe(6);
    expect(m.slipWorkingDays).toBe(4);
  });

  it("orders the list by phase order, then baseline finish", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "Late enabling", phase: "Enabling works", baselineFinish: "2027-05-01" });
    const b = await create(p.slug, { name: "Plant late", phase: "Plant", baselineFinish: "2027-04-01" });
    const c = await create(p.slug, { name: "Early enabling", phase: "Enabling works", baselineFinish: "2027-01-01" });
    const list = await lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200);
    expect(list.body.map((x: Milestone) => x.id)).toEqual([c.id, a.id, b.id]);
  });

  const refusals: Array<{ what: string; body: Record<string, unknown>; status: number; field: string }> = [
    { what: "a weight of 0", body: { weight: 0 }, status: 400, field: "weight" },
    { what: "a negative weight", body: { weight: -2 }, status: 400, field: "weight" },
    { what: "a percent above 100", body: { percentComplete: 100.5 }, status: 400, field: "percentComplete" },
    { what: "a negative percent", body: { percentComplete: -1 }, status: 400, field: "percentComplete" },
    { what: "a baseline finish before the planned start", body: { plannedStart: "2027-03-02" }, status: 400, field: "baselineFinish" },
    { what: "an unknown audience", body: { audience: "secret" }, status: 400, field: "audience" },
    { what: "an unknown system", body: { system: "plumbing" }, status: 400, field: "system" },
    { what: "a date that does not exist", body: { baselineFinish: "2027-02-30" }, status: 400, field: "baselineFinish" },
    { what: "an actual finish in the future", body: { actualFinish: "2099-01-01" }, status: 422, field: "actualFinish" },
    { what: "an unknown dependency", body: { dependsOn: [999_999_999] }, status: 422, field: "dependsOn" },
  ];
  for (const r of refusals) {
    it(`refuses ${r.what} with ${r.status} naming ${r.field}, and writes nothing`, async () => {
      const p = await makeProject();
      await create(p.slug, { name: "Already there" });
      const before = await footprint(p.id);
      const res = await lead.agent.post(`/api/projects/${p.slug}/milestones`).set("X-CSRF-Token", lead.csrf).send({ ...base, phase: "A new phase", ...r.body });
      expect(res.status).toBe(r.status);
      expect(res.body.error.fields[r.field]).toEqual(expect.any(String));
      expect(await footprint(p.id)).toEqual(before);
    });
  }

  it("refuses a dependency on a milestone of another project (422, dependsOn), and writes nothing", async () => {
    const p = await makeProject();
    const other = await makeProject();
    const foreign = await create(other.slug);
    const before = await footprint(p.id);
    const res = await lead.agent.post(`/api/projects/${p.slug}/milestones`).set("X-CSRF-Token", lead.csrf).send({ ...base, dependsOn: [foreign.id] });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.dependsOn).toContain(String(foreign.id));
    expect(await footprint(p.id)).toEqual(before);
  });

  it("takes today in the project's time zone: today there is accepted, tomorrow there is refused", async () => {
    // UTC+14: for ten hours of every UTC day, it is already tomorrow on this site.
    const tz = "Pacific/Kiritimati";
    const p = await makeProject({ timeZone: tz });
    const today = todayIn(tz);
    const tomorrow = DateTime.fromISO(today).plus({ days: 1 }).toISODate()!;
    const ok = await create(p.slug, { baselineFinish: today, actualFinish: today });
    expect(ok.actualFinish).toBe(today);
    const res = await lead.agent.post(`/api/projects/${p.slug}/milestones`).set("X-CSRF-Token", lead.csrf).send({ ...base, baselineFinish: today, actualFinish: tomorrow });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.actualFinish).toContain(today);
    expect(res.body.error.fields.actualFinish).toContain(tz);
  });
});

describe("PATCH /api/milestones/:id", () => {
  it("saves the change, bumps the version and writes one event per changed field with who, when, from, to and the note", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { plannedStart: "2027-01-04", percentComplete: 20 });
    const started = Date.now();
    const res = await patch(m.id, { version: 1, forecastFinish: "2027-03-08", percentComplete: 35, area: "Plant yard", note: "Third set held for a governor retrofit" });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ version: 2, forecastFinish: "2027-03-08", percentComplete: 35, area: "Plant yard", slipDays: 7, slipWorkingDays: 5 });
    const events = (await lead.agent.get(`/api/milestones/${m.id}/events`).expect(200)).body as MilestoneEventRow[];
    const latest = events.filter((e) => e.note === "Third set held for a governor retrofit");
    // Area is not a tracked field; forecast and percent are.
    expect(latest.map((e) => [e.field, e.from, e.to]).sort()).toEqual([
      ["forecast_finish", "2027-03-01", "2027-03-08"],
      ["percent_complete", "20", "35"],
    ]);
    for (const e of latest) {
      expect(e.by).toBe("Priya Castell");
      expect(e.milestoneName).toBe(m.name);
      expect(e.at).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/);
      expect(Date.parse(e.at)).toBeGreaterThanOrEqual(started - 1000);
      expect(Date.parse(e.at)).toBeLessThanOrEqual(Date.now() + 1000);
    }
  });

  it("records weight, audience and planned start changes as events too", async () => {
    const p = await makeProject();
    const m = await create(p.slug);
    await patch(m.id, { version: 1, weight: 3.5, audience: "investor", plannedStart: "2027-02-01" }).expect(200);
    const events = (await lead.agent.get(`/api/milestones/${m.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events.map((e) => [e.field, e.from, e.to]).sort()).toEqual([
      ["audience", "public", "investor"],
      ["planned_start", null, "2027-02-01"],
      ["weight", "2", "3.5"],
    ]);
  });

  it("answers a stale version with 409 and the current values, and writes nothing", async () => {
    const p = await makeProject();
    const m = await create(p.slug);
    await patch(m.id, { version: 1, percentComplete: 30 }).expect(200);
    const before = await footprint(p.id);
    const res = await patch(m.id, { version: 1, percentComplete: 60 });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("conflict");
    expect(res.body.error.current).toMatchObject({ id: m.id, version: 2, percentComplete: 30 });
    expect(await footprint(p.id)).toEqual(before);
  });

  it("lets exactly one of two simultaneous edits of the same version through", async () => {
    const p = await makeProject();
    const m = await create(p.slug);
    const other = await signIn(t, DEMO.admin);
    const [a, b] = await Promise.all([
      patch(m.id, { version: 1, percentComplete: 40 }),
      other.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", other.csrf).send({ version: 1, percentComplete: 70 }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const winner = a.status === 200 ? a : b;
    const loser = a.status === 409 ? a : b;
    expect(loser.body.error.current).toMatchObject({ version: 2, percentComplete: winner.body.percentComplete });
    const events = (await lead.agent.get(`/api/milestones/${m.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events.filter((e) => e.field === "percent_complete")).toHaveLength(1);
  });

  it("sets percent complete to 100 when an actual finish is set", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { baselineFinish: "2026-06-01", percentComplete: 60 });
    const res = await patch(m.id, { version: 1, actualFinish: "2026-06-03" }).expect(200);
    expect(res.body).toMatchObject({ percentComplete: 100, actualFinish: "2026-06-03", status: "complete" });
    const events = (await lead.agent.get(`/api/milestones/${m.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events.find((e) => e.field === "percent_complete" && e.to === "100")).toMatchObject({ from: "60" });
  });

  it("changes nothing and keeps the version when nothing differs", async () => {
    const p = await makeProject();
    const m = await create(p.slug);
    const before = await footprint(p.id);
    const res = await patch(m.id, { version: 1, weight: 2, name: m.name }).expect(200);
    expect(res.body.version).toBe(1);
    expect(await footprint(p.id)).toEqual(before);
  });

  it("moves a milestone to a new phase, creating it last in order", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { phase: "Plant" });
    const res = await patch(m.id, { version: 1, phase: "Commissioning" }).expect(200);
    expect(res.body.phase).toBe("Commissioning");
    expect(res.body.phaseId).not.toBe(m.phaseId);
  });

  const refusals: Array<{ what: string; body: Record<string, unknown>; status: number; field: string }> = [
    { what: "a percent outside 0–100", body: { percentComplete: 150 }, status: 400, field: "percentComplete" },
    { what: "a weight of 0", body: { weight: 0 }, status: 400, field: "weight" },
    { what: "an unknown audience", body: { audience: "partners" }, status: 400, field: "audience" },
    { what: "a baseline finish (it changes only by re-baselining)", body: { baselineFinish: "2027-04-01" }, status: 400, field: "baselineFinish" },
    { what: "a planned start after the baseline finish", body: { plannedStart: "2027-03-02" }, status: 422, field: "plannedStart" },
    { what: "an actual finish in the future", body: { actualFinish: "2099-12-31" }, status: 422, field: "actualFinish" },
    { what: "an unknown dependency", body: { dependsOn: [999_999_998] }, status: 422, field: "dependsOn" },
  ];
  for (const r of refusals) {
    it(`refuses ${r.what} with ${r.status} naming ${r.field}, and writes nothing`, async () => {
      const p = await makeProject();
      const m = await create(p.slug, { plannedStart: "2027-01-04" });
      const before = await footprint(p.id);
      const res = await patch(m.id, { version: 1, percentComplete: 55, phase: "Somewhere new", ...r.body });
      expect(res.status).toBe(r.status);
      expect(res.body.error.fields[r.field]).toEqual(expect.any(String));
      expect(await footprint(p.id)).toEqual(before);
    });
  }

  it("refuses a dependency cycle with 422, naming the milestones in it, and writes nothing", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "Fuel tank installed" });
    const b = await create(p.slug, { name: "Generator commissioning", dependsOn: [a.id] });
    const c = await create(p.slug, { name: "Integrated systems test", dependsOn: [b.id] });
    const before = await footprint(p.id);
    const res = await patch(a.id, { version: 1, dependsOn: [c.id], percentComplete: 10 });
    expect(res.status).toBe(422);
    const message = res.body.error.fields.dependsOn as string;
    expect(message).toContain("Fuel tank installed → Generator commissioning → Integrated systems test → Fuel tank installed");
    expect(res.body.error.message).toContain("Generator commissioning");
    expect(await footprint(p.id)).toEqual(before);
  });

  it("refuses a milestone depending on itself", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "UPS modules installed" });
    const res = await patch(a.id, { version: 1, dependsOn: [a.id] });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.dependsOn).toContain("UPS modules installed → UPS modules installed");
  });

  it("replaces the dependencies and bumps the version when only they change", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "A" });
    const b = await create(p.slug, { name: "B" });
    const res = await patch(b.id, { version: 1, dependsOn: [a.id, a.id] }).expect(200);
    expect(res.body).toMatchObject({ dependsOn: [a.id], version: 2 });
  });

  it("answers 404 for a milestone that does not exist", async () => {
    const res = await patch(999_999_997, { version: 1, percentComplete: 5 });
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe("not_found");
  });
});

describe("DELETE /api/milestones/:id", () => {
  it("refuses with 422 naming the dependants while others depend on it, and deletes nothing", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "Chillers set" });
    await create(p.slug, { name: "L3 pre-functional checks", dependsOn: [a.id] });
    const before = await footprint(p.id);
    const res = await lead.agent.delete(`/api/milestones/${a.id}`).set("X-CSRF-Token", lead.csrf);
    expect(res.status).toBe(422);
    expect(res.body.error.message).toContain("L3 pre-functional checks");
    expect(res.body.error.fields.dependants).toContain("L3 pre-functional checks");
    expect(await footprint(p.id)).toEqual(before);
  });

  it("deletes a milestone and its history", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { percentComplete: 20 });
    await lead.agent.delete(`/api/milestones/${a.id}`).set("X-CSRF-Token", lead.csrf).expect(204);
    expect((await lead.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body).toEqual([]);
    await lead.agent.get(`/api/milestones/${a.id}/events`).expect(404);
    expect(await footprint(p.id)).toMatchObject({ milestones: 0, events: 0 });
  });
});

describe("POST /api/projects/:slug/milestones/shift", () => {
  it("moves forecasts by N working days of the project's calendar, past weekends and holidays, one event each", async () => {
    // Our own example, counted on the calendar: Friday 2027-01-08, then Saturday, Sunday and
    // the holiday Monday 2027-01-11 are skipped; +3 working days → Thursday 2027-01-14.
    // From Tuesday 2027-01-12, −2 working days: the holiday Monday is skipped → Thursday 2027-01-07.
    const p = await makeProject({ holidays: ["2027-01-11"] });
    const a = await create(p.slug, { name: "Fans installed", baselineFinish: "2027-01-08" });
    const b = await create(p.slug, { name: "UPS installed", baselineFinish: "2027-01-12" });
    const res = await lead.agent
      .post(`/api/projects/${p.slug}/milestones/shift`)
      .set("X-CSRF-Token", lead.csrf)
      .send({ ids: [a.id], workingDays: 3, note: "Crane hire moved" });
    expect(res.status).toBe(200);
    expect(res.body).toHaveLength(1);
    expect(res.body[0]).toMatchObject({ id: a.id, forecastFinish: "2027-01-14", version: 2, slipDays: 6, slipWorkingDays: 3 });
    const back = await lead.agent.post(`/api/projects/${p.slug}/milestones/shift`).set("X-CSRF-Token", lead.csrf).send({ ids: [b.id], workingDays: -2 });
    expect(back.body[0]).toMatchObject({ id: b.id, forecastFinish: "2027-01-07" });
    const events = (await lead.agent.get(`/api/milestones/${a.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events[0]).toMatchObject({ field: "forecast_finish", from: "2027-01-08", to: "2027-01-14", note: "Crane hire moved" });
  });

  it("refuses a finished milestone or one of another project, and moves none of the others", async () => {
    const p = await makeProject();
    const open = await create(p.slug, { name: "Open one" });
    const done = await create(p.slug, { name: "Done one", baselineFinish: "2026-02-02", actualFinish: "2026-02-02" });
    const before = await footprint(p.id);
    const res = await lead.agent.post(`/api/projects/${p.slug}/milestones/shift`).set("X-CSRF-Token", lead.csrf).send({ ids: [open.id, done.id], workingDays: 5 });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.ids).toContain("Done one");
    const foreign = await lead.agent.post(`/api/projects/${p.slug}/milestones/shift`).set("X-CSRF-Token", lead.csrf).send({ ids: [open.id, 999_999_996], workingDays: 5 });
    expect(foreign.status).toBe(422);
    expect(foreign.body.error.fields.ids).toContain("999999996");
    expect(await footprint(p.id)).toEqual(before);
  });
});

describe("GET /api/milestones/:id/events and /drivers", () => {
  it("lists a milestone's history newest first", async () => {
    const p = await makeProject();
    const m = await create(p.slug);
    await patch(m.id, { version: 1, percentComplete: 10 }).expect(200);
    await patch(m.id, { version: 2, percentComplete: 25 }).expect(200);
    const events = (await lead.agent.get(`/api/milestones/${m.id}/events`).expect(200)).body as MilestoneEventRow[];
    const percents = events.filter((e) => e.field === "percent_complete").map((e) => e.to);
    expect(percents).toEqual(["25", "10"]);
  });

  it("gives the chain of predecessors that sets a milestone's forecast", async () => {
    const p = await makeProject();
    const fuel = await create(p.slug, { name: "Fuel tank", baselineFinish: "2027-01-10" });
    const gens = await create(p.slug, { name: "Generators set", baselineFinish: "2027-01-20" });
    const comm = await create(p.slug, { name: "Generator commissioning", baselineFinish: "2027-02-10", dependsOn: [fuel.id, gens.id] });
    const rfs = await create(p.slug, { name: "Hall ready for service", baselineFinish: "2027-03-01", dependsOn: [comm.id] });
    const chain = await newClient(t).then((c) => c.agent.get(`/api/milestones/${rfs.id}/drivers`).expect(200));
    expect(chain.body.map((l: { name: string }) => l.name)).toEqual(["Hall ready for service", "Generator commissioning", "Generators set"]);
    // The fuel tank slips past the generators: now it drives.
    await patch(fuel.id, { version: 1, forecastFinish: "2027-01-25" }).expect(200);
    const again = await lead.agent.get(`/api/milestones/${rfs.id}/drivers`).expect(200);
    expect(again.body.map((l: { name: string }) => l.name)).toEqual(["Hall ready for service", "Generator commissioning", "Fuel tank"]);
  });
});
