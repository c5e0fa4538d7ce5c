import { DateTime } from "luxon";
import { beforeAll, describe, expect, it } from "vitest";
import type { DecisionAnswer, DecisionEvent } from "../../src/shared/schemas/decisions.ts";
import { newClient, type TestApp } from "../helpers/app.ts";
import { plainPdf, upload } from "./documents-fixtures.ts";
import { facilityWriter } from "./facility-fixtures.ts";
import { createProject, useAppAsEveryRole, type EveryRole } from "./posts-fixtures.ts";
import { expectRefusedWithNothingWritten, leadId, ok, recordFootprint, recordWriter, type Refusal } from "./record-fixtures.ts";

const app = useAppAsEveryRole();
let t: TestApp;
let as: EveryRole;
let lead: number;
beforeAll(async () => {
  ({ t, as } = app);
  lead = await leadId(t);
});

const ZONE = "Europe/London"; // createProject's zone
const today = () => DateTime.now().setZone(ZONE);
const day = (days: number) => today().plus({ days }).toISODate()!;
const listOf = (c: { agent: EveryRole["lead"]["agent"] }, slug: string, query = "") => ok<DecisionAnswer[]>(c.agent.get(`/api/projects/${slug}/decisions${query}`), 200);
const auditOf = (action: string, id: number) => t.db("audit_events").where({ action, target_id: String(id) });

describe("decisions: who sees what (decision 036)", () => {
  it("investors see investor-audience requests with the risks and milestones they may see; marketing without option costs; a visitor is refused", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const f = facilityWriter(as.lead);
    const shown = await f.milestone(p.slug, { name: "Hall 2A ready for service", audience: "investor" });
    const hidden = await f.milestone(p.slug, { name: "Generator 2 witness test", audience: "internal" });
    const investorRisk = await w.risk(p.slug, { ownerId: lead, title: "Late chiller delivery" });
    const internalRisk = await w.risk(p.slug, { ownerId: lead, title: "Crane hire overrun", audience: "internal" });
    const investor = await w.decision(p.slug, { linkedMilestones: [shown.id, hidden.id], linkedRisks: [investorRisk.id, internalRisk.id] });
    const internal = await w.decision(p.slug, { title: "Site canteen contractor", audience: "internal" });

    expect((await listOf(as.lead, p.slug)).map((d) => d.id).sort()).toEqual([investor.id, internal.id].sort());
    const seen = await listOf(as.investor, p.slug);
    expect(seen.map((d) => d.id)).toEqual([investor.id]);
    expect(seen[0]!.linkedMilestones).toEqual([{ id: shown.id, name: "Hall 2A ready for service" }]);
    expect(seen[0]!.linkedRisks).toEqual([{ id: investorRisk.id, reference: "R-001", title: "Late chiller delivery" }]);
    expect(seen[0]!.options.map((o) => o.cost)).toEqual([45_000_000, 0]);
    const byMarketing = await listOf(as.marketing, p.slug);
    expect(byMarketing.map((d) => d.id)).toEqual([investor.id]);
    expect(byMarketing[0]!.options.map((o) => o.cost)).toEqual([null, null]);

    for (const c of [as.investor, as.marketing]) {
      expect((await c.agent.get(`/api/decisions/${internal.id}`)).status).toBe(404);
      expect((await c.agent.get(`/api/decisions/${internal.id}/events`)).status).toBe(404);
      expect((await c.agent.get(`/api/decisions/${investor.id}/events`)).status).toBe(200);
      expect((await recordWriter(c).send("post", `/api/decisions/${investor.id}/outcome`, { chosenOption: 0, outcome: "x", decidedBy: "x", decidedOn: day(0), version: 1 })).status).toBe(403);
    }
    const visitor = await newClient(t);
    for (const path of [`/api/projects/${p.slug}/decisions`, `/api/decisions/${investor.id}`, `/api/decisions/${investor.id}/events`]) expect((await visitor.agent.get(path)).status, path).toBe(401);
  });
});

describe("decisions: the list, days left and overdue ones", () => {
  it("open ones first, overdue leading, then by needed-by date with days left on site; decided and withdrawn ones after, keeping their record", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const later = await w.decision(p.slug, { title: "Later", neededBy: day(30) });
    const soon = await w.decision(p.slug, { title: "Soon", neededBy: day(3) });
    const overdue = await w.decision(p.slug, { title: "Overdue", neededBy: day(1) });
    const decided = await w.decision(p.slug, { title: "Decided", neededBy: day(5) });
    const withdrawn = await w.decision(p.slug, { title: "Withdrawn", neededBy: day(6) });
    // The overdue one was asked for yesterday's date: dated back as it would have been a week ago.
    await t.db("decisions").where({ id: overdue.id }).update({ needed_by: day(-2) });
    await ok(w.send("post", `/api/decisions/${decided.id}/outcome`, { chosenOption: 1, outcome: "Wait a quarter", decidedBy: "Investors' committee", decidedOn: day(0), version: decided.version }), 200);
    await ok(w.send("post", `/api/decisions/${withdrawn.id}/withdraw`, { reason: "Overtaken by the revised layout", version: withdrawn.version }), 200);

    const list = await listOf(as.investor, p.slug);
    expect(list.map((d) => [d.title, d.status, d.daysLeft, d.overdue])).toEqual([
      ["Overdue", "open", -2, true],
      ["Soon", "open", 3, false],
      ["Later", "open", 30, false],
      ["Withdrawn", "withdrawn", null, false],
      ["Decided", "decided", null, false],
    ]);
    expect(list.find((d) => d.id === withdrawn.id)!.withdrawnReason).toBe("Overtaken by the revised layout");
    expect((await listOf(as.investor, p.slug, "?status=open")).map((d) => d.id)).toEqual([overdue.id, soon.id, later.id]);
    expect((await as.investor.agent.get(`/api/projects/${p.slug}/decisions?status=bogus`)).status).toBe(400);
  });
});

describe("decisions: writes", () => {
  it("a lead records the outcome and the investor sees it, with who decided, when and who recorded it; events and an audit entry are written", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const d = await w.decision(p.slug, {});
    expect(d).toMatchObject({ reference: "D-001", status: "open", outcome: null, daysLeft: expect.any(Number) });
    expect(await auditOf("decision_created", d.id)).toHaveLength(1);
    const decided = await ok<DecisionAnswer>(w.send("post", `/api/decisions/${d.id}/outcome`, { chosenOption: 0, outcome: "Order the second set now", decidedBy: "Investors' committee", decidedOn: day(0), version: d.version }), 200);
    expect(decided).toMatchObject({ status: "decided", daysLeft: null, overdue: false, version: d.version + 1 });
    const seen = await ok<DecisionAnswer>(as.investor.agent.get(`/api/decisions/${d.id}`), 200);
    expect(seen.outcome).toEqual({ chosenOption: 0, text: "Order the second set now", decidedBy: "Investors' committee", decidedOn: day(0), recordedBy: expect.any(String) });
    const events = await ok<DecisionEvent[]>(as.investor.agent.get(`/api/decisions/${d.id}/events`), 200);
    expect(events.map((e) => [e.field, e.to]).reverse()).toEqual([
      ["created", "D-001"],
      ["status", "decided"],
      ["chosenOption", "Order now"],
      ["decidedBy", "Investors' committee"],
      ["decidedOn", day(0)],
    ]);
    expect(await auditOf("decision_decided", d.id)).toHaveLength(1);
    // A decided request keeps its record.
    const before = await recordFootprint(t, p.id);
    expect((await w.send("patch", `/api/decisions/${d.id}`, { version: decided.version, title: "Changed" })).status).toBe(409);
    expect((await w.send("post", `/api/decisions/${d.id}/outcome`, { chosenOption: 1, outcome: "Again", decidedBy: "Board", decidedOn: day(0), version: decided.version })).status).toBe(409);
    expect((await w.send("post", `/api/decisions/${d.id}/withdraw`, { reason: "x", version: decided.version })).status).toBe(409);
    expect(await recordFootprint(t, p.id)).toEqual(before);
  });

  it("an edit records each changed field; a stale version is refused with 409 and nothing written", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const d = await w.decision(p.slug, {});
    const edited = await ok<DecisionAnswer>(w.send("patch", `/api/decisions/${d.id}`, { version: d.version, neededBy: day(20), decider: "Lender", note: "Lender asked to decide" }), 200);
    expect(edited).toMatchObject({ neededBy: day(20), decider: "Lender", daysLeft: 20 });
    const events = await t.db("decision_events").where({ decision_id: d.id }).orderBy("id");
    expect(events.map((e) => [e.field, e.from_value, e.to_value, e.note])).toEqual([
      ["created", null, "D-001", null],
      ["decider", "Investors' committee", "Lender", "Lender asked to decide"],
      ["neededBy", "2099-01-15", day(20), "Lender asked to decide"],
    ]);
    expect(await auditOf("decision_updated", d.id)).toHaveLength(1);
    const before = await recordFootprint(t, p.id);
    const stale = await w.send("patch", `/api/decisions/${d.id}`, { version: d.version, title: "Stale" });
    expect(stale.status).toBe(409);
    expect(stale.body.error.current).toMatchObject({ decider: "Lender" });
    expect(await recordFootprint(t, p.id)).toEqual(before);
  });

  it("each bad input is refused (400 or 422) naming the field, with nothing written", async () => {
    const p = await createProject(t);
    const other = await createProject(t);
    const w = recordWriter(as.lead);
    const foreignRisk = await w.risk(other.slug, { ownerId: lead });
    const d = await w.decision(p.slug, {});
    const base = {
      title: "Switchgear supplier",
      question: "Which supplier?",
      options: [{ label: "A" }, { label: "B" }],
      decider: "Board",
      neededBy: day(10),
      audience: "investor",
    };
    const cases: Refusal[] = [
      ["a needed-by date in the past", "post", `/api/projects/${p.slug}/decisions`, { ...base, neededBy: day(-1) }, 422, "neededBy"],
      ["a recommendation that is not an option", "post", `/api/projects/${p.slug}/decisions`, { ...base, recommendedOption: 2 }, 422, "recommendedOption"],
      ["another project's risk", "post", `/api/projects/${p.slug}/decisions`, { ...base, linkedRisks: [foreignRisk.id] }, 422, "linkedRisks"],
      ["an unknown milestone", "post", `/api/projects/${p.slug}/decisions`, { ...base, linkedMilestones: [999_999_999] }, 422, "linkedMilestones"],
      ["an unknown document", "post", `/api/projects/${p.slug}/decisions`, { ...base, documentIds: [999_999_999] }, 422, "documentIds"],
      ["no options", "post", `/api/projects/${p.slug}/decisions`, { ...base, options: [] }, 400, "options"],
      ["a date that is not a day", "post", `/api/projects/${p.slug}/decisions`, { ...base, neededBy: "2099-02-30" }, 400, "neededBy"],
      ["a public audience", "post", `/api/projects/${p.slug}/decisions`, { ...base, audience: "public" }, 400, "audience"],
      ["an edit moving the date into the past", "patch", `/api/decisions/${d.id}`, { version: d.version, neededBy: day(-3) }, 422, "neededBy"],
      ["an outcome choosing no option", "post", `/api/decisions/${d.id}/outcome`, { version: d.version, chosenOption: 5, outcome: "x", decidedBy: "Board", decidedOn: day(0) }, 422, "chosenOption"],
      ["an outcome decided tomorrow", "post", `/api/decisions/${d.id}/outcome`, { version: d.version, chosenOption: 0, outcome: "x", decidedBy: "Board", decidedOn: day(1) }, 422, "decidedOn"],
      ["an outcome without its text", "post", `/api/decisions/${d.id}/outcome`, { version: d.version, chosenOption: 0, outcome: "", decidedBy: "Board", decidedOn: day(0) }, 400, "outcome"],
      ["a withdrawal without a reason", "post", `/api/decisions/${d.id}/withdraw`, { version: d.version }, 400, "reason"],
    ];
    await expectRefusedWithNothingWritten(t, p.id, w, cases);
  });

  it("a risk a decision links is on record: deleting it is refused", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const r = await w.risk(p.slug, { ownerId: lead });
    await w.decision(p.slug, { linkedRisks: [r.id] });
    const res = await w.send("delete", `/api/risks/${r.id}`);
    expect(res.status).toBe(409);
    expect(res.body.error.onRecord).toEqual(["decision D-001 links it"]);
  });
});

describe("decisions: a digest's moves", () => {
  it("names requests newly needed, open ones due within 14 days of the window's end (overdue too) and those decided, by audience", async () => {
    const p = await createProject(t);
    const w = recordWriter(as.lead);
    const old = await w.decision(p.slug, { title: "Due in ten days", neededBy: day(10) });
    const far = await w.decision(p.slug, { title: "Due in sixty days", neededBy: day(60) });
    const decided = await w.decision(p.slug, { title: "Decided this week", neededBy: day(20) });
    const internal = await w.decision(p.slug, { title: "Internal, due soon", neededBy: day(5), audience: "internal" });
    const asked = [old.id, far.id, decided.id, internal.id];
    await t.db("decisions").whereIn("id", asked).update({ created_at: today().minus({ days: 30 }).toJSDate() });
    await ok(w.send("post", `/api/decisions/${decided.id}/outcome`, { chosenOption: 0, outcome: "Go ahead", decidedBy: "Lender", decidedOn: day(0), version: 1 }), 200);
    const fresh = await w.decision(p.slug, { title: "Asked this week", neededBy: day(40) });

    const from = today().minus({ days: 7 }).toJSDate();
    const to = new Date(Date.now() + 60_000);
    const forInvestor = await t.plumbline.decisions.movesIn(p.id, from, to, "investor");
    expect(forInvestor.map((m) => [m.kind, m.title])).toEqual([
      ["needed", "Asked this week"],
      ["due_soon", "Due in ten days"],
      ["decided", "Decided this week"],
    ]);
    expect(forInvestor[0]).toMatchObject({ id: fresh.id, reference: "D-005", daysLeft: 40, decider: "Investors' committee" });
    expect(forInvestor[1]).toMatchObject({ daysLeft: 10 });
    expect(forInvestor[2]).toMatchObject({ outcome: "Go ahead", decidedBy: "Lender", decidedOn: day(0) });
    const forStaff = await t.plumbline.decisions.movesIn(p.id, from, to, "staff");
    expect(forStaff.filter((m) => m.kind === "due_soon").map((m) => m.title)).toEqual(["Internal, due soon", "Due in ten days"]);
  });
});

describe("decisions: documents attached from the library", () => {
  it("attaches the project's documents; each reader sees only the titles they may read, and another project's document is refused with nothing written", async () => {
    const p = await createProject(t);
    const other = await createProject(t);
    const w = recordWriter(as.lead);
    const shownRes = await upload(as.lead, p.slug, await plainPdf(1, "Lender pack"), "lender-pack.pdf", { title: "Lender pack", category: "lender_pack", audience: "investor" });
    const hiddenRes = await upload(as.lead, p.slug, await plainPdf(1, "Cost plan"), "cost-plan.pdf", { title: "Internal cost plan", category: "financial", audience: "internal" });
    const foreignRes = await upload(as.lead, other.slug, await plainPdf(1, "Elsewhere"), "elsewhere.pdf", { title: "Another project's pack", category: "lender_pack", audience: "investor" });
    for (const res of [shownRes, hiddenRes, foreignRes]) expect(res.status).toBe(201);
    const [shown, hidden, foreign] = [shownRes.body.id as number, hiddenRes.body.id as number, foreignRes.body.id as number];

    const decision = await w.decision(p.slug, { documentIds: [shown, hidden] });
    const byLead = await ok<DecisionAnswer>(as.lead.agent.get(`/api/decisions/${decision.id}`), 200);
    expect(byLead.documents.map((d) => d.title).sort()).toEqual(["Internal cost plan", "Lender pack"]);
    const byInvestor = await ok<DecisionAnswer>(as.investor.agent.get(`/api/decisions/${decision.id}`), 200);
    expect(byInvestor.documents).toEqual([{ id: shown, title: "Lender pack" }]);

    await expectRefusedWithNothingWritten(t, p.id, w, [["a document of another project", "post", `/api/projects/${p.slug}/decisions`, { title: "Pick a pack", question: "Which pack?", options: [{ label: "A" }], decider: "Board", neededBy: day(10), audience: "investor", documentIds: [foreign] }, 422, "documentIds"]]);
  });
});
