import request from "supertest";
import { describe, expect, it } from "vitest";
import { INDICATIVE_CAUTION } from "../../src/shared/domain/facility.ts";
import { facilityAs, facilityWriter, makeProject } from "./facility-fixtures.ts";
import { useAppAsEveryRole } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();
const visitor = () => ({ agent: request.agent(f.t.plumbline.app) });

/**
 * A facility with something of every audience: a public hall held back by an internal plant
 * system and an internal milestone, an investor hall, a public fan system, and features.
 */
async function mixedFacility() {
  const p = await makeProject(f.t);
  const w = facilityWriter(f.as.lead);
  const done = await w.milestone(p.slug, { name: "Hall 2A fit-out complete", audience: "public", baselineFinish: "2026-06-01", actualFinish: "2026-06-05" });
  const secret = await w.milestone(p.slug, { name: "Mantrap interlocks tested", audience: "internal", baselineFinish: "2027-01-15" });
  const hall = await w.block(p.slug, { name: "Hall 2A", racks: 48, itKw: 480, audience: "public", dependsOn: [done.id, secret.id] });
  const ready = await w.block(p.slug, { name: "HD-1", racks: 20, itKw: 500, maxKwPerRack: 25, audience: "public", dependsOn: [done.id] });
  const investorHall = await w.block(p.slug, { name: "Hall 2B", racks: 48, itKw: 480, audience: "investor", dependsOn: [done.id] });
  const hidden = await w.system(p.slug, { name: "Secure room cooling", kind: "cooling", audience: "internal", neededPerSystem: 1, serves: [hall.id, ready.id], linkedMilestones: [secret.id] });
  const hiddenUnit = await w.unit(hidden.id, { label: "Split unit 1", stage: "installed" });
  const fans = await w.system(p.slug, {
    name: "Supply fans",
    kind: "air_movement",
    audience: "public",
    neededPerSystem: 2,
    serves: [hall.id, ready.id, investorHall.id],
    linkedMilestones: [done.id, secret.id],
    design: { airflowM3s: 10, deltaTK: 12 },
  });
  for (const [label, stage] of [["Fan 1", "L5"], ["Fan 2", "L4"], ["Fan 3", "installed"]] as const) await w.unit(fans.id, { label, stage });
  const gate = await w.feature(p.slug, { kind: "security", layer: "perimeter", name: "Vehicle barrier", status: "in_place", audience: "public" });
  const controlRoom = await w.feature(p.slug, { kind: "security", layer: "building", name: "Guard force rota", status: "in_progress", audience: "internal" });
  return { p, w, done, secret, hall, ready, investorHall, hidden, hiddenUnit, fans, gate, controlRoom };
}

describe("GET /api/projects/:slug/facility by audience", () => {
  it("shows a visitor only public blocks, systems, features and milestones; the hidden ones still hold readiness back, worded without their names", async () => {
    const x = await mixedFacility();
    const seen = await facilityAs(visitor(), x.p.slug);
    expect(seen.blocks.map((b) => b.name)).toEqual(["Hall 2A", "HD-1"]);
    expect(seen.systems.map((s) => s.name)).toEqual(["Supply fans"]);
    expect(seen.features.map((ft) => ft.name)).toEqual(["Vehicle barrier"]);
    expect(seen.caution).toBe(INDICATIVE_CAUTION);

    const hall = seen.blocks.find((b) => b.id === x.hall.id)!;
    expect(hall.dependsOn).toEqual([x.done.id]);
    expect(hall.systemIds).toEqual([x.fans.id]);
    expect(hall.readyForService).toBe(false);
    expect(hall.missing).toEqual(["1 internal milestone not yet complete", "A plant system not yet carrying its load"]);
    // HD-1's only milestone is complete: the internal system alone keeps it from service.
    const ready = seen.blocks.find((b) => b.id === x.ready.id)!;
    expect(ready.readyForService).toBe(false);
    expect(ready.missing).toEqual(["A plant system not yet carrying its load"]);

    const fans = seen.systems[0]!;
    expect(fans.serves).toEqual([x.hall.id, x.ready.id]);
    expect(fans.linkedMilestones).toEqual([x.done.id]);
    // A visible system's labels count all its units.
    expect(fans.units.map((u) => [u.label, u.status, u.commissioningLevel, u.available])).toEqual([
      ["Fan 1", "commissioned", 5, true],
      ["Fan 2", "commissioned", 4, true],
      ["Fan 3", "installed", null, false],
    ]);
    expect(fans.redundancy).toMatchObject({ design: "N+1", now: "N", planned: 3, available: 2, carriesLoad: true });

    // The ramp counts only what a visitor may see: the investor hall's racks are not in it.
    expect(Math.max(...seen.ramp.map((r) => r.racksBaseline))).toBe(48 + 20);

    const text = JSON.stringify(seen);
    for (const hidden of ["Secure room cooling", "Split unit 1", "Mantrap", "Hall 2B", "Guard force rota"]) expect(text).not.toContain(hidden);
  });

  it("shows an investor the investor hall too, and never an internal system, feature or milestone", async () => {
    const x = await mixedFacility();
    const seen = await facilityAs(f.as.investor, x.p.slug);
    expect(seen.blocks.map((b) => b.name)).toEqual(["Hall 2A", "HD-1", "Hall 2B"]);
    expect(seen.systems.map((s) => s.name)).toEqual(["Supply fans"]);
    expect(seen.systems[0]!.serves).toEqual([x.hall.id, x.ready.id, x.investorHall.id]);
    expect(seen.features.map((ft) => ft.name)).toEqual(["Vehicle barrier"]);
    expect(Math.max(...seen.ramp.map((r) => r.racksBaseline))).toBe(48 + 20 + 48);
    const text = JSON.stringify(seen);
    for (const hidden of ["Secure room cooling", "Split unit 1", "Mantrap", "Guard force rota"]) expect(text).not.toContain(hidden);
  });

  it("shows staff everything, the hidden system named in what is missing", async () => {
    const x = await mixedFacility();
    const seen = await facilityAs(f.as.marketing, x.p.slug);
    expect(seen.blocks).toHaveLength(3);
    expect(seen.systems.map((s) => s.name)).toEqual(["Secure room cooling", "Supply fans"]);
    expect(seen.features).toHaveLength(2);
    const hall = seen.blocks.find((b) => b.id === x.hall.id)!;
    expect(hall.dependsOn).toEqual([x.done.id, x.secret.id].sort((a, b) => a - b));
    expect(hall.systemIds).toEqual([x.hidden.id, x.fans.id]);
    expect(hall.missing.join(" | ")).toContain("Mantrap interlocks tested not yet complete");
    expect(hall.missing.join(" | ")).toContain("Secure room cooling: now short by 1");
  });

  it("puts a block into service for every audience once the hidden system carries its load", async () => {
    const x = await mixedFacility();
    await x.w.stage(x.hiddenUnit, { stage: "L4" });
    for (const c of [visitor(), f.as.investor, f.as.lead]) {
      const ready = (await facilityAs(c, x.p.slug)).blocks.find((b) => b.id === x.ready.id)!;
      expect(ready).toMatchObject({ readyForService: true, missing: [], baselineReadyDate: "2026-06-01", forecastReadyDate: "2026-06-05" });
    }
  });

  it("counts a unit available from the project's own commissioning level", async () => {
    const p = await makeProject(f.t, { availableFromLevel: 5 });
    const w = facilityWriter(f.as.lead);
    const s = await w.system(p.slug, { name: "Chillers", neededPerSystem: 1 });
    await w.unit(s.id, { label: "Chiller 1", stage: "L4" });
    await w.unit(s.id, { label: "Chiller 2", stage: "L5" });
    const seen = await facilityAs(f.as.lead, p.slug);
    expect(seen.availableFromLevel).toBe(5);
    expect(seen.systems[0]!.units.map((u) => u.available)).toEqual([false, true]);
    expect(seen.systems[0]!.redundancy).toMatchObject({ design: "N+1", now: "N" });
  });
});

describe("GET /api/projects/:slug/facility?at=", () => {
  it("is for staff only: an investor and a visitor are refused", async () => {
    const p = await makeProject(f.t);
    for (const c of [visitor(), f.as.investor]) {
      const res = await c.agent.get(`/api/projects/${p.slug}/facility?at=2026-06-01`);
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe("forbidden");
    }
    await f.as.marketing.agent.get(`/api/projects/${p.slug}/facility?at=2026-06-01`).expect(200);
    const bad = await f.as.lead.agent.get(`/api/projects/${p.slug}/facility?at=2026-02-30`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("at");
  });

  it("replays a unit's stages from its history and the milestones' dates as they stood", async () => {
    const p = await makeProject(f.t);
    const w = facilityWriter(f.as.lead);
    const m = await w.milestone(p.slug, { name: "Hall 2A integrated systems test", baselineFinish: "2026-09-01" });
    // Entered at the start of the programme (the API can only enter it now): on record on every day asked below.
    await f.t.db("milestones").where({ id: m.id }).update({ created_at: new Date("2025-12-01T09:00:00Z") });
    const block = await w.block(p.slug, { name: "Hall 2A", dependsOn: [m.id] });
    const s = await w.system(p.slug, { name: "Chillers", neededPerSystem: 1, serves: [block.id] });
    let unit = await w.unit(s.id, { label: "Chiller 1", stage: "delivered", on: "2026-01-12" });
    unit = await w.stage(unit, { stage: "installed", on: "2026-02-02" });
    unit = await w.stage(unit, { stage: "L4", on: "2026-03-02", note: "Functional test witnessed" });
    unit = await w.stage(unit, { stage: "L3", on: "2026-03-09", note: "Compressor replaced; functional test to repeat" });
    await w.stage(unit, { stage: "L5", on: "2026-04-20" });
    await w.send("patch", `/api/milestones/${m.id}`, { version: m.version, forecastFinish: "2026-10-05" }).expect(200);

    const stageOn = async (day: string) => {
      const seen = await facilityAs(f.as.lead, p.slug, `?at=${day}`);
      expect(seen.at).toBe(day);
      return [seen.systems[0]!.units[0]!.stage, seen.systems[0]!.redundancy.now, seen.blocks[0]!.forecastReadyDate];
    };
    // Before its first recorded day, the unit stood at "ordered"; the milestone's forecast was its baseline until it moved today.
    expect(await stageOn("2026-01-05")).toEqual(["ordered", "short by 1", "2026-09-01"]);
    expect(await stageOn("2026-01-12")).toEqual(["delivered", "short by 1", "2026-09-01"]);
    expect(await stageOn("2026-02-20")).toEqual(["installed", "short by 1", "2026-09-01"]);
    expect(await stageOn("2026-03-05")).toEqual(["L4", "N", "2026-09-01"]);
    expect(await stageOn("2026-03-20")).toEqual(["L3", "short by 1", "2026-09-01"]);
    expect(await stageOn("2026-05-01")).toEqual(["L5", "N", "2026-09-01"]);
    const now = await facilityAs(f.as.lead, p.slug);
    expect([now.systems[0]!.units[0]!.stage, now.blocks[0]!.forecastReadyDate]).toEqual(["L5", "2026-10-05"]);
    // A milestone entered after the day asked was not on record then: the block had no date to give.
    await f.t.db("milestones").where({ id: m.id }).update({ created_at: new Date() });
    expect((await facilityAs(f.as.lead, p.slug, "?at=2026-05-01")).blocks[0]!.forecastReadyDate).toBeNull();
  });
});
