import { DateTime } from "luxon";
import { beforeAll, describe, expect, it } from "vitest";
import type { RiskAnswer, RiskEvent, RiskSummary } from "../../src/shared/schemas/risks.ts";
import { newClient, type TestApp } from "../helpers/app.ts";
import { facilityWriter } from "./facility-fixtures.ts";
import { createProject, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";
import { expectRefusedWithNothingWritten, leadId, ok, recordFootprint, recordWriter, type Refusal, userId } from "./record-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
let lead: number;
beforeAll(async () => {
  ({ t, as } = app);
  lead = await leadId(t);
});

const ZONE = "Europe/London"; // createProject's zone
const daysAgo = (n: number) => DateTime.now().setZone(ZONE).minus({ days: n });
const listOf = (c: { agent: EveryRole["lead"]["agent"] }, slug: string, query = "") => ok<RiskAnswer[]>(c.agent.get(`/api/projects/${slug}/risks${query}`), 200);
const auditOf = (action: string, id: number) => t.db("audit_events").where({ action, target_id: String(id) });
const eventsOf = (riskId: number) => t.db("risk_events").where({ risk_id: riskId }).orderBy("id");

/** A project with an investor risk (with a cost exposure, linking an investor and an internal milestone, a public block) and an internal one. */
async function registerOfTwo() {
  const p = await createProject(t);
  const f = facilityWriter(as.lead);
  const investorMilestone = await f.milestone(p.slug, { name: "Hall 2A ready for service", audience: "investor" });
  const internalMilestone = await f.milestone(p.slug, { name: "Chiller 3 delivered", audience: "internal" });
  const internalBlock = await f.block(p.slug, { name: "Hall 2B", audience: "internal" });
  const w = recordWriter(as.lead);
  const investor = await w.risk(p.slug, {
    title: "Late chiller delivery",
    ownerId: lead,
    costExposure: { min: 100_000, mostLikely: 400_000, max: 1_000_000, probability: 0.5 },
    linkedMilestones: [investorMilestone.id, internalMilestone.id],
    linkedBlocks: [internalBlock.id],
  });
  const internal = await w.risk(p.slug, { title: "Crane hire overrun", category: "cost", ownerId: lead, audience: "internal", likelihood: 2, impact: 2 });
  return { p, investor, internal, investorMilestone, internalMilestone };
}

describe("risks: who sees what (decision 036)", () => {
  it("an investor sees investor-audience risks only, with the milestones and blocks they may see; marketing sees them without money; a visitor is refused", async () => {
    const { p, investor, internal, investorMilestone } = await registerOfTwo();
    const byLead = await listOf(as.lead, p.slug);
    expect(byLead.map((r) => r.id).sort()).toEqual([investor.id, internal.id].sort());
    const asLead = byLead.find((r) => r.id === investor.id)!;
    expect(asLead.linkedMilestones).toHaveLength(2);
    expect(asLead.linkedBlocks.map((b) => b.name)).toEqual(["Hall 2B"]);
    expect(asLead.expectedCost).toBe(200_000); // 0.5 × 400,000
    expect(asLead.expectedCostPert).toBeCloseTo(0.5 * ((100_000 + 4 * 400_000 + 1_000_000) / 6), 6);

    const byInvestor = await listOf(as.investor, p.slug);
    expect(byInvestor.map((r) => r.id)).toEqual([investor.id]);
    expect(byInvestor[0]!.linkedMilestones).toEqual([{ id: investorMilestone.id, name: "Hall 2A ready for service" }]);
    expect(byInvestor[0]!.linkedBlocks).toEqual([]);
    expect(byInvestor[0]!.costExposure).toEqual({ min: 100_000, mostLikely: 400_000, max: 1_000_000, probability: 0.5 });

    const byMarketing = await listOf(as.marketing, p.slug);
    expect(byMarketing.map((r) => r.id)).toEqual([investor.id]);
    expect(byMarketing[0]).toMatchObject({ costExposure: null, expectedCost: null, expectedCostPert: null });

    const visitor = await newClient(t);
    for (const path of [`/api/projects/${p.slug}/risks`, `/api/projects/${p.slug}/risks/summary`, `/api/risks/${investor.id}`, `/api/risks/${investor.id}/events`]) {
      expect((await visitor.agent.get(path)).status, path).toBe(401);
    }
  });

  it("one internal risk, its history and its summary share are hidden from investors and marketing (404, not counted)", async () => {
    const { p, investor, internal } = await registerOfTwo();
    for (const c of [as.investor, as.marketing]) {
      expect((await c.agent.get(`/api/risks/${internal.id}`)).status).toBe(404);
      expect((await c.agent.get(`/api/risks/${internal.id}/events`)).status).toBe(404);
      expect((await c.agent.get(`/api/risks/${investor.id}`)).status).toBe(200);
    }
    const forLead = await ok<RiskSummary>(as.lead.agent.get(`/api/projects/${p.slug}/risks/summary`), 200);
    expect(forLead.openRisks).toBe(2);
    expect(forLead.totalExpectedCost).toBe(200_000);
    expect(forLead.grid).toHaveLength(25);
    expect(forLead.grid.find((c) => c.likelihood === 3 && c.impact === 4)).toMatchObject({ count: 1, band: "high" });
    expect(forLead.grid.find((c) => c.likelihood === 2 && c.impact === 2)).toMatchObject({ count: 1, band: "low" });
    const forInvestor = await ok<RiskSummary>(as.investor.agent.get(`/api/projects/${p.slug}/risks/summary`), 200);
    expect(forInvestor.openRisks).toBe(1);
    expect(forInvestor.grid.find((c) => c.likelihood === 2 && c.impact === 2)!.count).toBe(0);
    const forMarketing = await ok<RiskSummary>(as.marketing.agent.get(`/api/projects/${p.slug}/risks/summary`), 200);
    expect(forMarketing).toMatchObject({ openRisks: 1, totalExpectedCost: null, totalExpectedCostPert: null, contingencyRemaining: null });
  });

  it("only leads and administrators write: marketing and investors are refused and nothing is written", async () => {
    const { p, investor } = await registerOfTwo();
    const before = await recordFootprint(t, p.id);
    for (const c of [as.marketing, as.investor]) {
      const w = recordWriter(c);
      expect((await w.send("post", `/api/projects/${p.slug}/risks`, { title: "x", category: "other", ownerId: lead, likelihood: 1, impact: 1, audience: "internal" })).status).toBe(403);
      expect((await w.send("patch", `/api/risks/${investor.id}`, { version: 1, likelihood: 5 })).status).toBe(403);
      expect((await w.send("post", `/api/risks/${investor.id}/mitigations`, { description: "Expedite", ownerId: lead })).status).toBe(403);
    }
    expect(await recordFootprint(t, p.id)).toEqual(before);
  });
});

describe("risks: writes leave events and audit entries", () => {
  it("entering a risk numbers it R-001, R-002 and records a created event and a risk_created entry; an edit records each changed field", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const first = await w.risk(p.slug, { ownerId: lead });
    const second = await w.risk(p.slug, { ownerId: lead, kind: "issue", impactNow: "Hall 2A slips two weeks" });
    const third = await w.risk(p.slug, { ownerId: lead });
    expect([first.reference, second.reference, third.reference]).toEqual(["R-001", "I-001", "R-002"]);
    expect((await eventsOf(first.id)).map((e) => [e.field, e.to_value])).toEqual([["created", "R-001"]]);
    expect(await auditOf("risk_created", first.id)).toHaveLength(1);
    expect(await auditOf("issue_created", second.id)).toHaveLength(1);

    const edited = await ok<RiskAnswer>(w.send("patch", `/api/risks/${first.id}`, { version: first.version, likelihood: 5, note: "Supplier confirms a late slot" }), 200);
    expect(edited).toMatchObject({ likelihood: 5, score: 20, band: "critical", version: first.version + 1 });
    const events = (await eventsOf(first.id)).map((e) => ({ field: e.field, from: e.from_value, to: e.to_value, note: e.note }));
    expect(events.slice(1)).toEqual([{ field: "likelihood", from: "3", to: "5", note: "Supplier confirms a late slot" }]);
    const audit = await auditOf("risk_updated", first.id);
    expect(audit).toHaveLength(1);
    expect(JSON.parse(String(audit[0]!.detail)).changes).toEqual({ likelihood: { from: 3, to: 5 } });
    const history = await ok<RiskEvent[]>(as.lead.agent.get(`/api/risks/${first.id}/events`), 200);
    expect(history.map((e) => e.field)).toEqual(["likelihood", "created"]);
    expect(history[0]!.by).toEqual(expect.any(String));
  });

  it("an edit with a stale version is refused with 409 and the stored values; nothing is written", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const r = await w.risk(p.slug, { ownerId: lead });
    await ok(w.send("patch", `/api/risks/${r.id}`, { version: r.version, impact: 5 }), 200);
    const before = await recordFootprint(t, p.id);
    const res = await w.send("patch", `/api/risks/${r.id}`, { version: r.version, impact: 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.current).toMatchObject({ impact: 5, version: r.version + 1 });
    expect(await recordFootprint(t, p.id)).toEqual(before);
  });

  it("each bad input is refused (400 or 422) naming the field, with nothing written", async () => {
    const p = await createProject(t);
    const other = await createProject(t);
    const foreignMilestone = await facilityWriter(as.lead).milestone(other.slug, { name: "Elsewhere" });
    const w = recordWriter(as.lead);
    const r = await w.risk(p.slug, { ownerId: lead });
    const investorId = await userId(t, "investor@harbourfund.example");
    const base = { title: "Transformer lead time", category: "supply_chain", ownerId: lead, likelihood: 2, impact: 2, audience: "investor" };
    const cases: Refusal[] = [
      ["likelihood above the scale", "post", `/api/projects/${p.slug}/risks`, { ...base, likelihood: 6 }, 422, "likelihood"],
      ["impact of zero", "post", `/api/projects/${p.slug}/risks`, { ...base, impact: 0 }, 400, "impact"],
      ["an owner who is an investor", "post", `/api/projects/${p.slug}/risks`, { ...base, ownerId: investorId }, 422, "ownerId"],
      ["an unknown owner", "post", `/api/projects/${p.slug}/risks`, { ...base, ownerId: 999_999_999 }, 422, "ownerId"],
      ["another project's milestone", "post", `/api/projects/${p.slug}/risks`, { ...base, linkedMilestones: [foreignMilestone.id] }, 422, "linkedMilestones"],
      ["an unknown block", "post", `/api/projects/${p.slug}/risks`, { ...base, linkedBlocks: [999_999_999] }, 422, "linkedBlocks"],
      ["a public audience", "post", `/api/projects/${p.slug}/risks`, { ...base, audience: "public" }, 400, "audience"],
      ["a probability above 1", "post", `/api/projects/${p.slug}/risks`, { ...base, costExposure: { min: 1, mostLikely: 2, max: 3, probability: 1.5 } }, 400, "costExposure.probability"],
      ["a most likely cost above the maximum", "post", `/api/projects/${p.slug}/risks`, { ...base, costExposure: { min: 1, mostLikely: 5, max: 3, probability: 0.5 } }, 400, "costExposure.max"],
      ["an unknown field", "post", `/api/projects/${p.slug}/risks`, { ...base, colour: "red" }, 400, "colour"],
      ["an edit of impact above the scale", "patch", `/api/risks/${r.id}`, { version: r.version, impact: 7 }, 422, "impact"],
      ["became_issue by edit", "patch", `/api/risks/${r.id}`, { version: r.version, status: "became_issue" }, 422, "status"],
      ["an edit without a version", "patch", `/api/risks/${r.id}`, { impact: 2 }, 400, "version"],
    ];
    await expectRefusedWithNothingWritten(t, p.id, w, cases);
  });

  it("the scale is the project's: on a 4-level likelihood scale a 5 is refused, a 4 accepted", async () => {
    const p = await createProject(t);
    await t.db("projects").where({ id: p.id }).update({ risk_likelihood_levels: 4, risk_band_edges: '{"medium":4,"high":8,"critical":12}' });
    const w = recordWriter(as.lead);
    const res = await w.send("post", `/api/projects/${p.slug}/risks`, { title: "Grid connection", category: "regulatory", ownerId: lead, likelihood: 5, impact: 3, audience: "internal" });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.likelihood).toBe("must be a whole level from 1 to 4");
    const ok4 = await w.risk(p.slug, { ownerId: lead, likelihood: 4, impact: 3 });
    expect(ok4).toMatchObject({ score: 12, band: "critical" });
    const summary = await ok<RiskSummary>(as.lead.agent.get(`/api/projects/${p.slug}/risks/summary`), 200);
    expect(summary.scale.likelihoodLevels).toBe(4);
    expect(summary.grid).toHaveLength(20);
  });
});

describe("a risk becomes an issue", () => {
  it("in one step the risk is marked became_issue and issue I-001 is opened from it, each pointing at the other, with events and one audit entry", async () => {
    const { p, investor } = await registerOfTwo();
    const w = recordWriter(as.lead);
    const issue = await ok<RiskAnswer>(w.send("post", `/api/risks/${investor.id}/issue`, { version: investor.version, impactNow: "Chiller 3 arrives six weeks late", action: "Temporary chiller hired", dueDate: "2099-02-01" }), 201);
    expect(issue).toMatchObject({ kind: "issue", reference: "I-001", status: "open", fromRisk: { id: investor.id, reference: "R-001" }, impactNow: "Chiller 3 arrives six weeks late", likelihood: 5, impact: 4, audience: "investor" });
    expect(issue.linkedMilestones).toHaveLength(2);
    const risk = await ok<RiskAnswer>(as.investor.agent.get(`/api/risks/${investor.id}`), 200);
    expect(risk).toMatchObject({ status: "became_issue", issue: { id: issue.id, reference: "I-001" } });
    expect((await eventsOf(investor.id)).map((e) => [e.field, e.to_value])).toEqual([
      ["created", "R-001"],
      ["status", "became_issue"],
      ["issue", "I-001"],
    ]);
    expect((await eventsOf(issue.id)).map((e) => [e.field, e.to_value, e.note])).toEqual([["created", "I-001", "Opened from R-001"]]);
    expect(await auditOf("risk_became_issue", investor.id)).toHaveLength(1);

    // Once an issue, it does not become one again, and its status stays.
    const before = await recordFootprint(t, p.id);
    expect((await w.send("post", `/api/risks/${investor.id}/issue`, { version: risk.version, impactNow: "Again" })).status).toBe(409);
    expect((await w.send("patch", `/api/risks/${investor.id}`, { version: risk.version, status: "open" })).status).toBe(422);
    expect(await recordFootprint(t, p.id)).toEqual(before);
  });

  it("a stale version opens no issue and leaves the risk open", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const r = await w.risk(p.slug, { ownerId: lead });
    await ok(w.send("patch", `/api/risks/${r.id}`, { version: r.version, title: "Late chiller delivery (revised)" }), 200);
    const before = await recordFootprint(t, p.id);
    expect((await w.send("post", `/api/risks/${r.id}/issue`, { version: r.version, impactNow: "Late" })).status).toBe(409);
    expect(await recordFootprint(t, p.id)).toEqual(before);
    expect((await t.db("risks").where({ id: r.id }).first("status")).status).toBe("open");
  });
});

describe("the trend compares today's score with the score at the start of the reporting window", () => {
  it("rising, falling, steady and new, from the events, with the window's start injected by `since` and the history dated back", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const make = (title: string) => w.risk(p.slug, { title, ownerId: lead, likelihood: 3, impact: 3 });
    const [rising, falling, steady, earlier] = [await make("Rising"), await make("Falling"), await make("Steady"), await make("Moved before the window")];
    await ok(w.send("patch", `/api/risks/${rising.id}`, { version: 1, likelihood: 5 }), 200);
    await ok(w.send("patch", `/api/risks/${falling.id}`, { version: 1, impact: 1 }), 200);
    await ok(w.send("patch", `/api/risks/${earlier.id}`, { version: 1, likelihood: 4 }), 200);
    // The four were entered 60 days ago; the change to "Moved before the window" was made 40 days ago.
    const sixtyDaysAgo = daysAgo(60).toJSDate();
    await t.db("risks").whereIn("id", [rising.id, falling.id, steady.id, earlier.id]).update({ created_at: sixtyDaysAgo });
    await t.db("risk_events").whereIn("risk_id", [rising.id, falling.id, steady.id, earlier.id]).where({ field: "created" }).update({ at: sixtyDaysAgo });
    await t.db("risk_events").where({ risk_id: earlier.id, field: "likelihood" }).update({ at: daysAgo(40).toJSDate() });
    const fresh = await make("New this week");

    const since = daysAgo(10).toISODate()!;
    const trend = async (s: string) => new Map((await listOf(as.lead, p.slug, `?since=${s}`)).map((r) => [r.id, [r.trend, r.scoreAtWindowStart, r.score]]));
    const tenDays = await trend(since);
    expect(tenDays.get(rising.id)).toEqual(["rising", 9, 15]);
    expect(tenDays.get(falling.id)).toEqual(["falling", 9, 3]);
    expect(tenDays.get(steady.id)).toEqual(["steady", 9, 9]);
    expect(tenDays.get(earlier.id)).toEqual(["steady", 12, 12]);
    expect(tenDays.get(fresh.id)).toEqual(["new", null, 9]);
    // A window reaching back past the earlier change sees it rise.
    const fiftyDays = await trend(daysAgo(50).toISODate()!);
    expect(fiftyDays.get(earlier.id)).toEqual(["rising", 9, 12]);
    // Before they were entered, each is new.
    expect((await trend(daysAgo(70).toISODate()!)).get(steady.id)).toEqual(["new", null, 9]);
  });

  it("the digests' moves name risks entered, risks that rose a band, and those that closed or became issues in the window, by audience", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const rose = await w.risk(p.slug, { title: "Rose a band", ownerId: lead, likelihood: 2, impact: 2 });
    const closed = await w.risk(p.slug, { title: "Closed", ownerId: lead });
    const happened = await w.risk(p.slug, { title: "Happened", ownerId: lead });
    const internal = await w.risk(p.slug, { title: "Internal, closed", ownerId: lead, audience: "internal" });
    const old = [rose.id, closed.id, happened.id, internal.id];
    await t.db("risks").whereIn("id", old).update({ created_at: daysAgo(30).toJSDate() });
    await t.db("risk_events").whereIn("risk_id", old).update({ at: daysAgo(30).toJSDate() });
    await ok(w.send("patch", `/api/risks/${rose.id}`, { version: 1, likelihood: 4 }), 200); // 4 → 8: low → medium
    await ok(w.send("patch", `/api/risks/${closed.id}`, { version: 1, status: "closed" }), 200);
    await ok(w.send("patch", `/api/risks/${internal.id}`, { version: 1, status: "closed" }), 200);
    await ok(w.send("post", `/api/risks/${happened.id}/issue`, { version: 1, impactNow: "It happened" }), 201);
    const entered = await w.risk(p.slug, { title: "Entered this week", ownerId: lead });

    const from = daysAgo(7).toJSDate();
    const to = new Date(Date.now() + 60_000);
    const forInvestor = await t.plumbline.risks.movesIn(p.id, from, to, "investor");
    expect(forInvestor.new.map((x) => x.title).sort()).toEqual(["Entered this week", "Happened"]);
    expect(forInvestor.roseBand).toEqual([expect.objectContaining({ id: rose.id, fromBand: "low", toBand: "medium" })]);
    expect(forInvestor.closed.map((x) => x.id)).toEqual([closed.id]);
    expect(forInvestor.becameIssues).toEqual([expect.objectContaining({ id: happened.id, issue: expect.objectContaining({ reference: "I-001" }) })]);
    expect(forInvestor.new.find((x) => x.id === entered.id)).toMatchObject({ reference: "R-005", audience: "investor", band: "high" });
    const forStaff = await t.plumbline.risks.movesIn(p.id, from, to, "staff");
    expect(forStaff.closed.map((x) => x.id).sort()).toEqual([closed.id, internal.id].sort());
    // A window before all this names nothing.
    const quiet = await t.plumbline.risks.movesIn(p.id, daysAgo(20).toJSDate(), daysAgo(10).toJSDate(), "staff");
    expect(quiet).toEqual({ new: [], roseBand: [], closed: [], becameIssues: [] });
  });
});

describe("mitigation actions and deleting a risk", () => {
  it("actions are added, edited (409 when stale) and deleted, each an event of the risk and an audit entry; an overdue open action says so", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const r = await w.risk(p.slug, { ownerId: lead });
    const action = await ok<RiskAnswer["mitigations"][number]>(w.send("post", `/api/risks/${r.id}/mitigations`, { description: "Second supplier quote", ownerId: lead, dueDate: "2020-01-31" }), 201);
    expect(action).toMatchObject({ status: "planned", overdue: true, owner: { id: lead } });
    const done = await ok<RiskAnswer["mitigations"][number]>(w.send("patch", `/api/mitigations/${action.id}`, { version: action.version, status: "done" }), 200);
    expect(done).toMatchObject({ status: "done", overdue: false, description: "Second supplier quote", dueDate: "2020-01-31" });
    expect((await w.send("patch", `/api/mitigations/${action.id}`, { version: action.version, status: "dropped" })).status).toBe(409);
    const badOwner = await w.send("post", `/api/risks/${r.id}/mitigations`, { description: "x", ownerId: await userId(t, "investor@harbourfund.example") });
    expect(badOwner.status).toBe(422);
    expect(badOwner.body.error.fields).toHaveProperty("ownerId");
    expect((await w.send("delete", `/api/mitigations/${action.id}`)).status).toBe(204);
    expect((await eventsOf(r.id)).map((e) => [e.field, e.to_value])).toEqual([
      ["created", "R-001"],
      ["mitigation_added", "planned"],
      ["mitigation.status", "done"],
      ["mitigation_deleted", null],
    ]);
    for (const a of ["risk_mitigation_added", "risk_mitigation_updated", "risk_mitigation_deleted"]) expect(await auditOf(a, r.id), a).toHaveLength(1);
  });

  it("a risk entered by mistake is deleted (audit kept); one on record is refused with 409 on_record and kept", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const mistake = await w.risk(p.slug, { ownerId: lead, title: "Typed twice" });
    const kept = await w.risk(p.slug, { ownerId: lead });
    await ok(w.send("patch", `/api/risks/${kept.id}`, { version: 1, impact: 5 }), 200);
    expect((await w.send("delete", `/api/risks/${mistake.id}`)).status).toBe(204);
    expect(await t.db("risks").where({ id: mistake.id })).toHaveLength(0);
    const audit = await auditOf("risk_deleted", mistake.id);
    expect(JSON.parse(String(audit[0]!.detail)).risk.title).toBe("Typed twice");
    const refused = await w.send("delete", `/api/risks/${kept.id}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe("on_record");
    expect(await t.db("risks").where({ id: kept.id })).toHaveLength(1);
    expect((await recordWriter(as.marketing).send("delete", `/api/risks/${kept.id}`)).status).toBe(403);
  });
});
