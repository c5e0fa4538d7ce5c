import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DateTime } from "luxon";
import type { Milestone, MilestoneEventRow } from "../../src/shared/schemas/programme.ts";
import type { AuditEvent } from "../../src/shared/schemas/users.ts";
import { computeProgrammeHealth } from "../../src/shared/domain/programme-health.ts";
import { newClient, startTestApp, type TestApp } from "../helpers/app.ts";
import { createPhoto, postInput, signInAll, type Client } from "./posts-fixtures.ts";

let t: TestApp;
let as: Awaited<ReturnType<typeof signInAll>>;
let visitor: Client;
beforeAll(async () => {
  t = await startTestApp();
  as = await signInAll(t);
  visitor = await newClient(t);
});
afterAll(async () => {
  await t.close();
});

let seq = 0;
const TZ = "Europe/London";
const SETTINGS = { toleranceWorkingDays: 5, behindWorkingDays: 15, calendar: { weekendDays: [6, 7], holidays: [] as string[] } };

async function makeProject() {
  seq += 1;
  const slug = `prog-rm-${Date.now().toString(36)}-${seq}`;
  const [id] = await t.db("projects").insert({
    slug,
    name: `Removal test ${seq}`,
    operator_name: "Kestrel Colocation",
    time_zone: TZ,
    currency: "GBP",
    tolerance_working_days: SETTINGS.toleranceWorkingDays,
    behind_working_days: SETTINGS.behindWorkingDays,
    weekend_days: "[6,7]",
    holidays: "[]",
  });
  return { id: Number(id), slug };
}

/** Everything a programme write could touch (and the audit log), so "nothing written" can be checked. */
async function footprint(projectId: number) {
  const n = async (q: PromiseLike<Array<Record<string, unknown>>>) => Number((await q)[0]?.n ?? 0);
  return {
    milestones: await n(t.db("milestones").where({ project_id: projectId }).count({ n: "*" })),
    removed: await n(t.db("milestones").where({ project_id: projectId }).whereNotNull("removed_at").count({ n: "*" })),
    versions: await n(t.db("milestones").where({ project_id: projectId }).sum({ n: "version" })),
    events: await n(t.db("milestone_events").where({ project_id: projectId }).count({ n: "*" })),
    audit: await n(t.db("audit_events").count({ n: "*" })),
  };
}

const base = { phase: "Plant", area: "Energy centre", system: "power", weight: 2, baselineFinish: "2027-03-01", audience: "public" };

async function create(slug: string, body: Record<string, unknown>): Promise<Milestone> {
  const res = await as.lead.agent.post(`/api/projects/${slug}/milestones`).set("X-CSRF-Token", as.lead.csrf).send({ ...base, ...body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as Milestone;
}
const removeReq = (id: number, body: unknown) => as.lead.agent.post(`/api/milestones/${id}/remove`).set("X-CSRF-Token", as.lead.csrf).send(body as object);
const restoreReq = (id: number, body: unknown) => as.lead.agent.post(`/api/milestones/${id}/restore`).set("X-CSRF-Token", as.lead.csrf).send(body as object);
const deleteReq = (id: number) => as.lead.agent.delete(`/api/milestones/${id}`).set("X-CSRF-Token", as.lead.csrf);
async function rebaseline(slug: string, reason = "Financial close: programme v1") {
  await as.lead.agent.post(`/api/projects/${slug}/baselines`).set("X-CSRF-Token", as.lead.csrf).send({ reason }).expect(201);
}
async function slip(m: Milestone, forecastFinish: string, note?: string) {
  const current = await t.db("milestones").where({ id: m.id }).first("version");
  await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: Number(current.version), forecastFinish, note }).expect(200);
}
const today = () => DateTime.now().setZone(TZ).toISODate()!;

/** Audit rows of an action about one target, newest first, as the admin reads them. */
async function auditOf(action: string, targetId: number | string): Promise<AuditEvent[]> {
  const res = await as.admin.agent.get(`/api/audit?action=${action}&pageSize=100`).expect(200);
  return (res.body as AuditEvent[]).filter((e) => e.targetId === String(targetId));
}

describe("POST /api/milestones/:id/remove", () => {
  it("takes a baselined milestone out of the programme: its history stays, and health is recomputed without it", async () => {
    const p = await makeProject();
    const done = await create(p.slug, { name: "Enabling works complete", baselineFinish: "2026-06-01", plannedStart: "2026-01-05", actualFinish: "2026-06-03", weight: 3 });
    const open = await create(p.slug, { name: "UPS modules installed", baselineFinish: "2027-02-01", plannedStart: "2026-09-01", percentComplete: 30 });
    const doomed = await create(p.slug, { name: "Temporary cabins cleared", baselineFinish: "2027-09-30", plannedStart: "2026-03-02", percentComplete: 10, weight: 5 });
    await rebaseline(p.slug);
    await slip(doomed, "2027-11-15", "Cabin hire extended");
    const eventsBefore = (await as.lead.agent.get(`/api/milestones/${doomed.id}/events`).expect(200)).body as MilestoneEventRow[];
    const healthBefore = (await visitor.agent.get(`/api/projects/${p.slug}/health`).expect(200)).body;
    expect(healthBefore.forecastCompletion).toBe("2027-11-15");

    const res = await removeReq(doomed.id, { reason: "Cabins stay for Hall 2B: no longer a Phase 2 milestone" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ id: doomed.id, removal: { by: expect.any(String), reason: "Cabins stay for Hall 2B: no longer a Phase 2 milestone" } });

    // The history is kept, with the removal on top: who, when and why.
    const events = (await as.lead.agent.get(`/api/milestones/${doomed.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events.slice(1)).toEqual(eventsBefore);
    expect(events[0]).toMatchObject({ field: "removed", from: "false", to: "true", by: expect.any(String), note: "Cabins stay for Hall 2B: no longer a Phase 2 milestone" });
    expect(events.some((e) => e.field === "forecast_finish" && e.note === "Cabin hire extended")).toBe(true);

    // Health leaves it out: the same figures as a recomputation over the milestones still in the programme.
    const listed = (await visitor.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body as Milestone[];
    expect(listed.map((m) => m.id)).toEqual([done.id, open.id]);
    const healthAfter = (await visitor.agent.get(`/api/projects/${p.slug}/health`).expect(200)).body;
    const expected = computeProgrammeHealth({ milestones: listed, at: healthAfter.at, settings: SETTINGS });
    expect(healthAfter).toMatchObject({
      percentComplete: expected.percentComplete,
      plannedPercent: expected.plannedPercent,
      spi: expected.spi,
      sv: expected.sv,
      forecastCompletion: expected.forecastCompletion,
      counts: expected.counts,
    });
    expect(healthAfter.forecastCompletion).toBe("2027-02-01");
    expect(healthAfter.percentComplete).not.toBe(healthBefore.percentComplete);
    expect(healthAfter.counts.complete + healthAfter.counts.onProgramme + healthAfter.counts.atRisk + healthAfter.counts.behind).toBe(2);

    // Hidden from the default list, listed (flagged) on request; the curve spans what remains.
    const removedOnly = (await as.lead.agent.get(`/api/projects/${p.slug}/milestones?removed=only`).expect(200)).body as Milestone[];
    expect(removedOnly.map((m) => [m.id, m.removal?.reason])).toEqual([[doomed.id, "Cabins stay for Hall 2B: no longer a Phase 2 milestone"]]);
    const all = (await as.lead.agent.get(`/api/projects/${p.slug}/milestones?removed=include`).expect(200)).body as Milestone[];
    expect(all.map((m) => [m.id, m.removal === null])).toEqual([
      [done.id, true],
      [open.id, true],
      [doomed.id, false],
    ]);
    const curve = (await visitor.agent.get(`/api/projects/${p.slug}/curve`).expect(200)).body;
    expect(curve.points.at(-1).date <= "2027-02-01").toBe(true);
    // The baseline version it was in still shows it.
    const v1 = (await as.investor.agent.get(`/api/projects/${p.slug}/baselines/1`).expect(200)).body;
    expect(v1.milestones.map((m: { id: number }) => m.id)).toContain(doomed.id);
  });

  it("refuses without a reason (400 naming reason) and writes nothing", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Fuel tank installed" });
    const before = await footprint(p.id);
    for (const body of [{}, { reason: "" }, { reason: "   " }, { reason: "no" }, { reason: 42 }, { reason: "Out of scope\u0007 now" }, { reason: "x".repeat(1001) }]) {
      const res = await removeReq(m.id, body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.code).toBe("validation");
      expect(Object.keys(res.body.error.fields)).toEqual(["reason"]);
    }
    const extra = await removeReq(m.id, { reason: "Moved to Hall 2B", version: 1 });
    expect(extra.status).toBe(400);
    expect(await footprint(p.id)).toEqual(before);
  });

  it("refuses while milestones in the programme depend on it (422 naming them), and a second removal (409)", async () => {
    const p = await makeProject();
    const a = await create(p.slug, { name: "Generators delivered" });
    const b = await create(p.slug, { name: "Generators commissioned (L3)", dependsOn: [a.id] });
    const before = await footprint(p.id);
    const res = await removeReq(a.id, { reason: "Generators move to the next stage" });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.dependants).toContain("Generators commissioned (L3)");
    expect(await footprint(p.id)).toEqual(before);
    // Once the dependant is removed too, it may go; removing it again is a conflict.
    await removeReq(b.id, { reason: "Generators move to the next stage" }).expect(200);
    await removeReq(a.id, { reason: "Generators move to the next stage" }).expect(200);
    expect((await removeReq(a.id, { reason: "Generators move to the next stage" })).status).toBe(409);
  });

  it("a removed milestone cannot be edited, shifted or re-imported by id until it is restored", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Security fence complete" });
    await removeReq(m.id, { reason: "Fence is the landlord's work" }).expect(200);
    const version = Number((await t.db("milestones").where({ id: m.id }).first("version")).version);
    const edit = await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version, percentComplete: 50 });
    expect(edit.status).toBe(409);
    expect(edit.body.error.code).toBe("milestone_removed");
    const shift = await as.lead.agent.post(`/api/projects/${p.slug}/milestones/shift`).set("X-CSRF-Token", as.lead.csrf).send({ ids: [m.id], workingDays: 5 });
    expect(shift.status).toBe(422);
    const csv = `id,name,phase,system,weight,baseline_finish,audience\n${m.id},Security fence complete,Plant,security,2,2027-03-01,public\n`;
    const imp = await as.lead.agent.post(`/api/projects/${p.slug}/milestones/import`).set("X-CSRF-Token", as.lead.csrf).send({ csv });
    expect(imp.status).toBe(422);
    expect(imp.body.error.rows[0].reason).toContain("removed from the programme");
  });
});

describe("POST /api/milestones/:id/restore", () => {
  it("puts a removed milestone back with a reason and an event; refuses one that is in the programme", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Hall 2A ready for service" });
    expect((await restoreReq(m.id, { reason: "Nothing to restore here" })).status).toBe(409);
    await removeReq(m.id, { reason: "Removed in error from the site walk" }).expect(200);
    expect((await restoreReq(m.id, {})).status).toBe(400);
    const res = await restoreReq(m.id, { reason: "Removed by mistake; back in Phase 2" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.removal).toBeNull();
    const events = (await as.lead.agent.get(`/api/milestones/${m.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(events.slice(0, 2).map((e) => [e.field, e.from, e.to, e.note])).toEqual([
      ["removed", "true", "false", "Removed by mistake; back in Phase 2"],
      ["removed", "false", "true", "Removed in error from the site walk"],
    ]);
    expect((await visitor.agent.get(`/api/projects/${p.slug}/milestones`).expect(200)).body.map((x: Milestone) => x.id)).toEqual([m.id]);
    expect(await auditOf("milestone_restored", m.id)).toHaveLength(1);
  });
});

describe("DELETE /api/milestones/:id", () => {
  it("deletes a milestone entered by mistake (never baselined, linked or moved), with an audit entry", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Duplicate: chillers delivered", percentComplete: 20 });
    const res = await deleteReq(m.id).send({ reason: "Entered twice" });
    expect(res.status, JSON.stringify(res.body)).toBe(204);
    expect(await t.db("milestones").where({ id: m.id }).first()).toBeUndefined();
    const [entry] = await auditOf("milestone_deleted", m.id);
    expect(entry).toMatchObject({ actorEmail: "lead@kestrel.example", action: "milestone_deleted", targetType: "milestone", targetLabel: "Duplicate: chillers delivered" });
    expect(entry!.detail).toMatchObject({ project: p.slug, reason: "Entered twice", milestone: { name: "Duplicate: chillers delivered", baselineFinish: "2027-03-01", percentComplete: 20, audience: "public" } });
  });

  it("refuses (409 on_record) a milestone that has been in a baseline, and keeps it and its history", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Chillers commissioned (L4)" });
    await rebaseline(p.slug);
    const before = await footprint(p.id);
    const res = await deleteReq(m.id);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("on_record");
    expect(res.body.error.message).toContain("baseline v1");
    expect(res.body.error.message).toMatch(/[Rr]emove it from the programme/);
    expect(await footprint(p.id)).toEqual(before);
  });

  it("refuses a milestone linked by an update or tagged on a photo, naming them", async () => {
    const p = await makeProject();
    const linked = await create(p.slug, { name: "Switchgear energised" });
    const tagged = await create(p.slug, { name: "Roof plant installed" });
    const post = await as.lead.agent.post(`/api/projects/${p.slug}/posts`).set("X-CSRF-Token", as.lead.csrf).send(postInput(null, { title: "Switchgear day", milestoneIds: [linked.id] }));
    expect(post.status, JSON.stringify(post.body)).toBe(201);
    const photo = await createPhoto(t, p.id);
    await t.db("media_tags").insert({ media_id: photo.id, kind: "milestone", value: String(tagged.id) });

    const a = await deleteReq(linked.id);
    expect(a.status).toBe(409);
    expect(a.body.error.message).toContain("“Switchgear day”");
    const b = await deleteReq(tagged.id);
    expect(b.status).toBe(409);
    expect(b.body.error.message).toContain(`#${photo.id}`);
    expect(await t.db("milestones").whereIn("id", [linked.id, tagged.id]).count({ n: "*" }).first()).toEqual({ n: 2 });
  });

  it("refuses a milestone whose dates have moved since it was entered, and a removed one", async () => {
    const p = await makeProject();
    const moved = await create(p.slug, { name: "Cable containment complete" });
    await slip(moved, "2027-03-22");
    expect((await deleteReq(moved.id)).status).toBe(409);
    const removed = await create(p.slug, { name: "Access road resurfaced" });
    await removeReq(removed.id, { reason: "Landlord's works, not ours" }).expect(200);
    const res = await deleteReq(removed.id);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain("removed from the programme");
  });

  it("refuses a body with unknown fields or a reason that is not text", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Test pit dug" });
    expect((await deleteReq(m.id).send({ cascade: true })).status).toBe(400);
    const bad = await deleteReq(m.id).send({ reason: "typo\u0000" });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(["reason"]);
    expect(await t.db("milestones").where({ id: m.id }).first("id")).toBeDefined();
  });
});

describe("what moved reports a removal, to the audiences that could see the milestone", () => {
  it("/changes and /moves show the removal with its reason; a visitor does not see an internal one's", async () => {
    const p = await makeProject();
    const pub = await create(p.slug, { name: "Visitor car park opened", audience: "public" });
    const inv = await create(p.slug, { name: "Lender's monitoring visit", audience: "investor" });
    const int = await create(p.slug, { name: "Internal snag walk", audience: "internal" });
    for (const m of [pub, inv, int]) await removeReq(m.id, { reason: `No longer part of Phase 2 (${m.name})` }).expect(200);
    const range = `from=${today()}&to=${today()}`;

    const removalsSeenBy = async (c: Client) => {
      const changes = (await c.agent.get(`/api/projects/${p.slug}/changes?${range}`).expect(200)).body as MilestoneEventRow[];
      const moves = (await c.agent.get(`/api/projects/${p.slug}/moves?${range}`).expect(200)).body as Array<{ milestoneId: number; moves: Array<{ kind: string; notes: string[] }> }>;
      const fromChanges = changes.filter((e) => e.field === "removed" && e.to === "true").map((e) => e.milestoneId).sort((x, y) => x - y);
      const fromMoves = moves.filter((m) => m.moves.some((mv) => mv.kind === "removed")).map((m) => m.milestoneId);
      expect(fromMoves).toEqual(fromChanges);
      for (const m of moves) expect(m.moves.find((mv) => mv.kind === "removed")?.notes[0]).toMatch(/^No longer part of Phase 2/);
      return fromChanges;
    };
    expect(await removalsSeenBy(visitor)).toEqual([pub.id]);
    expect(await removalsSeenBy(as.investor)).toEqual([pub.id, inv.id]);
    expect(await removalsSeenBy(as.marketing)).toEqual([pub.id, inv.id, int.id]);
    // Nor its history, nor the removed list.
    await visitor.agent.get(`/api/milestones/${int.id}/events`).expect(404);
    expect((await visitor.agent.get(`/api/projects/${p.slug}/milestones?removed=only`).expect(200)).body.map((m: Milestone) => m.id)).toEqual([pub.id]);
    // A visitor can still read a removed public milestone's history.
    const history = (await visitor.agent.get(`/api/milestones/${pub.id}/events`).expect(200)).body as MilestoneEventRow[];
    expect(history[0]).toMatchObject({ field: "removed", note: "No longer part of Phase 2 (Visitor car park opened)" });
  });

  it("refuses a bad removed filter on the list", async () => {
    const p = await makeProject();
    const res = await visitor.agent.get(`/api/projects/${p.slug}/milestones?removed=all`);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toEqual(["removed"]);
  });
});

describe("every programme write is in the audit log, with who and what", () => {
  it("create, edit, shift, re-baseline, CSV import, cost actuals, remove and restore each leave an entry", async () => {
    const p = await makeProject();
    const m = await create(p.slug, { name: "Chilled water pipework tested", percentComplete: 5 });
    const [created] = await auditOf("milestone_created", m.id);
    expect(created).toMatchObject({ actorEmail: "lead@kestrel.example", targetType: "milestone", targetLabel: "Chilled water pipework tested" });
    expect(created!.detail).toMatchObject({ project: p.slug, name: "Chilled water pipework tested", percentComplete: 5, baselineFinish: "2027-03-01" });

    await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: 1, percentComplete: 35, name: "Chilled water pipework pressure-tested", note: "Test passed" }).expect(200);
    const [edited] = await auditOf("milestone_updated", m.id);
    expect(edited!.detail).toMatchObject({ changes: { percentComplete: { from: 5, to: 35 }, name: { from: "Chilled water pipework tested", to: "Chilled water pipework pressure-tested" } }, note: "Test passed" });
    // An edit that changes nothing writes nothing, to the log either.
    await as.lead.agent.patch(`/api/milestones/${m.id}`).set("X-CSRF-Token", as.lead.csrf).send({ version: 2, percentComplete: 35 }).expect(200);
    expect(await auditOf("milestone_updated", m.id)).toHaveLength(1);

    await as.lead.agent.post(`/api/projects/${p.slug}/milestones/shift`).set("X-CSRF-Token", as.lead.csrf).send({ ids: [m.id], workingDays: 5, note: "Crane booked a week later" }).expect(200);
    const [shifted] = await auditOf("milestones_shifted", p.id);
    expect(shifted).toMatchObject({ targetType: "project", targetLabel: p.slug });
    expect(shifted!.detail).toMatchObject({ workingDays: 5, note: "Crane booked a week later", milestones: [{ id: m.id, from: "2027-03-01" }] });

    await rebaseline(p.slug, "Programme v1 at financial close");
    const [baselined] = await auditOf("programme_rebaselined", p.id);
    expect(baselined!.detail).toMatchObject({ number: 1, reason: "Programme v1 at financial close", milestones: 1, changed: 1 });

    const csv = `name,phase,system,weight,baseline_finish,audience\nCondenser water flushed,Plant,cooling,1,2027-04-01,investor\n`;
    await as.lead.agent.post(`/api/projects/${p.slug}/milestones/import`).set("X-CSRF-Token", as.lead.csrf).send({ csv }).expect(200);
    const [imported] = await auditOf("programme_imported", p.id);
    expect(imported!.detail).toMatchObject({ created: 1, updated: 0, milestones: [{ name: "Condenser water flushed", change: "created" }] });

    await as.lead.agent.post(`/api/projects/${p.slug}/cost-actuals`).set("X-CSRF-Token", as.lead.csrf).send({ periodEnd: "2026-10-31", amount: 1_250_000 }).expect(201);
    await as.admin.agent.post(`/api/projects/${p.slug}/cost-actuals`).set("X-CSRF-Token", as.admin.csrf).send({ periodEnd: "2026-10-31", amount: 1_300_000 }).expect(201);
    const costs = await auditOf("cost_actual_recorded", p.id);
    expect(costs.map((c) => [c.actorEmail, c.detail])).toEqual([
      ["admin@kestrel.example", { periodEnd: "2026-10-31", amount: 1_300_000, previous: 1_250_000, currency: "GBP" }],
      ["lead@kestrel.example", { periodEnd: "2026-10-31", amount: 1_250_000, previous: null, currency: "GBP" }],
    ]);

    await removeReq(m.id, { reason: "Pipework now in the chiller package" }).expect(200);
    const [removed] = await auditOf("milestone_removed", m.id);
    expect(removed).toMatchObject({ actorEmail: "lead@kestrel.example", targetLabel: "Chilled water pipework pressure-tested", detail: { project: p.slug, reason: "Pipework now in the chiller package" } });
    await restoreReq(m.id, { reason: "Package split again" }).expect(200);
    expect(await auditOf("milestone_restored", m.id)).toHaveLength(1);
  });
});
