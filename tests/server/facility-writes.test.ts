import { describe, expect, it } from "vitest";
import type { FacilityEvent } from "../../src/shared/schemas/facility.ts";
import { DEMO } from "../helpers/app.ts";
import { facilityAs, facilityWriter, footprint, makeProject } from "./facility-fixtures.ts";
import { useAppAsEveryRole } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();
const lead = () => facilityWriter(f.as.lead);

async function auditOf(action: string, targetId: number): Promise<Array<{ actor_email: string; target_label: string; detail: string }>> {
  return f.t.db("audit_events").where({ action, target_id: String(targetId) }).orderBy("id");
}

async function eventsOf(projectId: number, subject: string, subjectId: number): Promise<Array<Record<string, unknown>>> {
  return f.t.db("facility_events").where({ project_id: projectId, subject, subject_id: subjectId }).orderBy("id");
}

async function leadName(): Promise<string> {
  return String((await f.t.db("users").where({ email: DEMO.lead }).first("name")).name);
}

describe("facility writes leave an event and an audit entry", () => {
  it("POST and PATCH of a block: a created event, one event per changed field, and the audit log", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    const m = await w.milestone(p.slug, { name: "Hall 2A ready for service" });
    const block = await w.block(p.slug, { name: "Hall 2A", racks: 48, itKw: 480, dependsOn: [m.id] });
    expect(block).toMatchObject({ name: "Hall 2A", racks: 48, itKw: 480, maxKwPerRack: 10, dependsOn: [m.id], version: 1, baselineReadyDate: "2027-03-01", readyForService: false });
    const res = await w.send("patch", `/api/facility/blocks/${block.id}`, { version: 1, racks: 52, notes: "Two more racks in the end bay" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ racks: 52, version: 2 });

    const events = await eventsOf(p.id, "block", block.id);
    expect(events.map((e) => [e.field, e.from_value, e.to_value])).toEqual([
      ["created", null, "Hall 2A"],
      ["racks", "48", "52"],
      ["notes", "", "Two more racks in the end bay"],
    ]);
    const byUser = (await f.t.db("users").where({ email: DEMO.lead }).first("id")).id;
    expect(events.every((e) => Number(e.by_user_id) === Number(byUser))).toBe(true);
    expect((await auditOf("facility_block_created", block.id)).map((a) => [a.actor_email, a.target_label])).toEqual([[DEMO.lead, "Hall 2A"]]);
    const [updated] = await auditOf("facility_block_updated", block.id);
    expect(JSON.parse(updated!.detail)).toMatchObject({ project: p.slug, changes: { racks: { from: 48, to: 52 } } });
  });

  it("systems, units and features: each write is an event and an audit entry; deleting a system takes its units' history with it", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    const s = await w.system(p.slug, { name: "Chillers", neededPerSystem: 4, ratingPerUnit: 400, ratingUnit: "kW" });
    const patched = await w.send("patch", `/api/facility/systems/${s.id}`, { version: 1, design: { supplyAirC: 24 } }).expect(200);
    expect(patched.body.design).toMatchObject({ supplyAirC: 24, specificFuelConsumption: 0.27 });
    const unit = await w.unit(s.id, { label: "Chiller 1", tag: "CH-01" });
    await w.send("patch", `/api/facility/units/${unit.id}`, { version: unit.version, tag: "CH-1A" }).expect(200);
    const feature = await w.feature(p.slug, { kind: "certification", name: "ISO/IEC 27001", status: "planned" });
    await w.send("patch", `/api/facility/features/${feature.id}`, { version: 1, status: "in_audit" }).expect(200);

    expect((await eventsOf(p.id, "system", s.id)).map((e) => [e.field, e.from_value, e.to_value])).toEqual([
      ["created", null, "Chillers"],
      ["design.supplyAirC", null, "24"],
    ]);
    expect((await eventsOf(p.id, "unit", unit.id)).map((e) => [e.field, e.from_value, e.to_value])).toEqual([
      ["created", null, "ordered"],
      ["tag", "CH-01", "CH-1A"],
    ]);
    expect((await eventsOf(p.id, "feature", feature.id)).map((e) => [e.field, e.from_value, e.to_value])).toEqual([
      ["created", null, "planned"],
      ["status", "planned", "in_audit"],
    ]);
    for (const [action, id] of [
      ["facility_system_created", s.id],
      ["facility_system_updated", s.id],
      ["facility_unit_created", unit.id],
      ["facility_unit_updated", unit.id],
      ["facility_feature_created", feature.id],
      ["facility_feature_updated", feature.id],
    ] as const) {
      expect(await auditOf(action, id), action).toHaveLength(1);
    }

    await w.send("delete", `/api/facility/systems/${s.id}`).expect(204);
    expect(await f.t.db("plant_units").where({ id: unit.id })).toEqual([]);
    expect(await eventsOf(p.id, "unit", unit.id)).toEqual([]);
    expect((await eventsOf(p.id, "system", s.id)).map((e) => e.field)).toEqual(["deleted"]);
    const [deleted] = await auditOf("facility_system_deleted", s.id);
    expect(JSON.parse(deleted!.detail).units.map((u: { label: string }) => u.label)).toEqual(["Chiller 1"]);
    await w.send("delete", `/api/facility/features/${feature.id}`).expect(204);
    expect(await auditOf("facility_feature_deleted", feature.id)).toHaveLength(1);
    expect((await f.t.db("site_features").where({ id: feature.id })).length).toBe(0);
  });

  it("lists a project's facility events for staff, with who and when, within the days asked", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    const block = await w.block(p.slug, { name: "HD-1" });
    const rows = (await f.as.marketing.agent.get(`/api/projects/${p.slug}/facility/events`).expect(200)).body as FacilityEvent[];
    expect(rows.map((e) => [e.subject, e.subjectId, e.subjectName, e.field, e.by])).toEqual([["block", block.id, "HD-1", "created", await leadName()]]);
    const today = rows[0]!.on;
    expect((await f.as.marketing.agent.get(`/api/projects/${p.slug}/facility/events?from=${today}&to=${today}`).expect(200)).body).toHaveLength(1);
    expect((await f.as.marketing.agent.get(`/api/projects/${p.slug}/facility/events?to=2020-01-01`).expect(200)).body).toEqual([]);
    const bad = await f.as.marketing.agent.get(`/api/projects/${p.slug}/facility/events?from=2026-02-01&to=2026-01-01`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("to");
    expect((await f.as.investor.agent.get(`/api/projects/${p.slug}/facility/events`)).status).toBe(403);
  });
});

describe("a unit's stage and its dated history", () => {
  it("records who, when, the day on site, from, to and the note; going back needs a note; the same stage again writes nothing", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    const s = await w.system(p.slug, { name: "Supply fans", kind: "air_movement", neededPerSystem: 2 });
    let fan = await w.unit(s.id, { label: "Fan 5", stage: "installed", on: "2026-03-02" });
    fan = await w.stage(fan, { stage: "L4", on: "2026-04-14" });
    expect(fan).toMatchObject({ stage: "L4", status: "commissioned", commissioningLevel: 4, available: true });

    const before = await footprint(f.t, p.id);
    const back = await w.send("post", `/api/facility/units/${fan.id}/stage`, { version: fan.version, stage: "installed" });
    expect(back.status).toBe(422);
    expect(back.body.error.fields).toHaveProperty("note");
    expect(await footprint(f.t, p.id)).toEqual(before);

    fan = await w.stage(fan, { stage: "installed", on: "2026-04-20", note: "Bearing noise; motor to be replaced" });
    const again = await w.stage(fan, { stage: "installed" });
    expect(again.version).toBe(fan.version);

    const history = (await f.as.lead.agent.get(`/api/facility/units/${fan.id}/events`).expect(200)).body as FacilityEvent[];
    const name = await leadName();
    expect(history.map((e) => [e.field, e.from, e.to, e.on, e.by, e.note])).toEqual([
      ["stage", "L4", "installed", "2026-04-20", name, "Bearing noise; motor to be replaced"],
      ["stage", "installed", "L4", "2026-04-14", name, null],
      ["created", null, "installed", "2026-03-02", name, null],
    ]);
    expect(history.every((e) => !Number.isNaN(Date.parse(e.at)))).toBe(true);
    const audited = (await auditOf("facility_unit_stage_changed", fan.id)).map((a) => JSON.parse(a.detail) as Record<string, unknown>);
    expect(audited.map((d) => [d.from, d.to, d.on, d.note])).toEqual([
      ["installed", "L4", "2026-04-14", null],
      ["L4", "installed", "2026-04-20", "Bearing noise; motor to be replaced"],
    ]);
  });

  it("shows a unit's history to whoever may see its system, and no one else", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    const internal = await w.system(p.slug, { name: "Security head-end", kind: "security", audience: "internal" });
    const unit = await w.unit(internal.id, { label: "Panel 1" });
    for (const c of [f.as.investor]) expect((await c.agent.get(`/api/facility/units/${unit.id}/events`)).status).toBe(404);
    expect((await f.as.marketing.agent.get(`/api/facility/units/${unit.id}/events`).expect(200)).body).toHaveLength(1);
  });
});

describe("bad input is refused, naming the field, and nothing is written", () => {
  it("refuses each with 400 (the schema) or 422 (the rules against the record)", async () => {
    const p = await makeProject(f.t);
    const other = await makeProject(f.t);
    const w = lead();
    const foreign = await w.milestone(other.slug, { name: "Other campus milestone" });
    const block = await w.block(p.slug, { name: "Hall 2A" });
    const plain = await w.system(p.slug, { name: "Generators", kind: "power_generation", neededPerSystem: 2 });
    const single = await w.system(p.slug, { name: "UPS modules", kind: "ups", neededPerSystem: 3, independentSystems: 1 });
    const unit = await w.unit(single.id, { label: "UPS 1" });
    const feature = await w.feature(p.slug, { kind: "client", name: "Meeting room", status: "planned" });

    const cases: Array<[string, "post" | "patch", string, object, number, string]> = [
      ["negative racks", "post", `/api/projects/${p.slug}/facility/blocks`, { name: "Hall 9", racks: -1, itKw: 10, maxKwPerRack: 5, audience: "public" }, 400, "racks"],
      ["N = 0", "post", `/api/projects/${p.slug}/facility/systems`, { name: "Fans", kind: "air_movement", audience: "public", neededPerSystem: 0 }, 400, "neededPerSystem"],
      ["a rating without its unit", "post", `/api/projects/${p.slug}/facility/systems`, { name: "Chillers", kind: "cooling", audience: "public", neededPerSystem: 4, ratingPerUnit: 400 }, 400, "ratingUnit"],
      ["a rating without its unit, against the stored pair", "patch", `/api/facility/systems/${plain.id}`, { version: 1, ratingPerUnit: 1250 }, 422, "ratingUnit"],
      ["a unit without its rating, against the stored pair", "patch", `/api/facility/systems/${plain.id}`, { version: 1, ratingUnit: "kVA" }, 422, "ratingPerUnit"],
      ["a block depending on an unknown milestone", "post", `/api/projects/${p.slug}/facility/blocks`, { name: "Hall 9", racks: 1, itKw: 10, maxKwPerRack: 10, audience: "public", dependsOn: [999999999] }, 422, "dependsOn"],
      ["a block depending on another project's milestone", "patch", `/api/facility/blocks/${block.id}`, { version: 1, dependsOn: [foreign.id] }, 422, "dependsOn"],
      ["a system serving an unknown block", "post", `/api/projects/${p.slug}/facility/systems`, { name: "Fans", kind: "air_movement", audience: "public", neededPerSystem: 6, serves: [999999999] }, 422, "serves"],
      ["a unit train above the system's independent systems", "post", `/api/facility/systems/${single.id}/units`, { label: "UPS 2", train: 2 }, 422, "train"],
      ["a unit moved to a train the system does not have", "patch", `/api/facility/units/${unit.id}`, { version: 1, train: 2 }, 422, "train"],
      ["a stage on a day still to come", "post", `/api/facility/units/${unit.id}/stage`, { version: 1, stage: "delivered", on: "2099-01-01" }, 422, "on"],
      ["an unknown stage", "post", `/api/facility/units/${unit.id}/stage`, { version: 1, stage: "L6" }, 400, "stage"],
      ["a status that does not fit the feature's kind", "patch", `/api/facility/features/${feature.id}`, { version: 1, status: "certified" }, 422, "status"],
      ["a security layer on a client facility", "patch", `/api/facility/features/${feature.id}`, { version: 1, layer: "rack" }, 422, "layer"],
      ["a security feature without its layer", "post", `/api/projects/${p.slug}/facility/features`, { kind: "security", name: "CCTV", status: "planned", audience: "public" }, 400, "layer"],
      ["a duplicate block name", "post", `/api/projects/${p.slug}/facility/blocks`, { name: "Hall 2A", racks: 1, itKw: 10, maxKwPerRack: 10, audience: "public" }, 422, "name"],
      ["an unknown field", "patch", `/api/facility/blocks/${block.id}`, { version: 1, colour: "orange" }, 400, "colour"],
    ];
    const before = await footprint(f.t, p.id);
    const problems: string[] = [];
    for (const [what, method, path, body, status, field] of cases) {
      const res = await w.send(method, path, body);
      if (res.status !== status || !res.body.error?.fields || !(field in res.body.error.fields)) problems.push(`${what}: ${res.status} ${JSON.stringify(res.body)}`);
    }
    expect(problems).toEqual([]);
    expect(await footprint(f.t, p.id)).toEqual(before);
  });

  it("answers 409 with the current values to a write made on a stale version, and writes nothing", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    const block = await w.block(p.slug, { name: "Hall 2B" });
    await w.send("patch", `/api/facility/blocks/${block.id}`, { version: 1, racks: 40 }).expect(200);
    const s = await w.system(p.slug, { name: "Fans", kind: "air_movement", neededPerSystem: 2 });
    const unit = await w.unit(s.id, { label: "Fan 1" });
    await w.stage(unit, { stage: "delivered" });
    const before = await footprint(f.t, p.id);
    const stale = await w.send("patch", `/api/facility/blocks/${block.id}`, { version: 1, racks: 44 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe("conflict");
    const staleStage = await w.send("post", `/api/facility/units/${unit.id}/stage`, { version: 1, stage: "installed" });
    expect(staleStage.status).toBe(409);
    expect(await footprint(f.t, p.id)).toEqual(before);
    expect((await facilityAs(f.as.lead, p.slug)).blocks[0]!.racks).toBe(40);
  });

  it("refuses writes to marketing and investors", async () => {
    const p = await makeProject(f.t);
    for (const c of [f.as.marketing, f.as.investor]) {
      const res = await c.agent.post(`/api/projects/${p.slug}/facility/blocks`).set("X-CSRF-Token", c.csrf).send({ name: "Hall 3", racks: 1, itKw: 1, maxKwPerRack: 1, audience: "public" });
      expect(res.status).toBe(403);
    }
    expect((await footprint(f.t, p.id)).blocks).toBe(0);
  });
});

describe("the programme and the facility", () => {
  it("refuses to delete a milestone a block or a plant system depends on, and names them", async () => {
    const p = await makeProject(f.t);
    const w = lead();
    const m = await w.milestone(p.slug, { name: "Hall 2A integrated systems test" });
    const loose = await w.milestone(p.slug, { name: "Entered by mistake" });
    await w.block(p.slug, { name: "Hall 2A", dependsOn: [m.id] });
    await w.system(p.slug, { name: "Chillers", linkedMilestones: [m.id] });
    const res = await w.send("delete", `/api/milestones/${m.id}`);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("on_record");
    expect(res.body.error.message).toContain("a capacity block links it (Hall 2A)");
    expect(res.body.error.message).toContain("a plant system links it (Chillers)");
    expect(await f.t.db("milestones").where({ id: m.id })).toHaveLength(1);
    await w.send("delete", `/api/milestones/${loose.id}`).expect(204);
  });
});
