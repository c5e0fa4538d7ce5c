import { describe, expect, it } from "vitest";
import type { BudgetChangeAnswer } from "../../src/shared/schemas/budget.ts";
import { DEMO, newClient } from "../helpers/app.ts";
import { budgetFootprint, budgetWriter } from "./budget-fixtures.ts";
import { createProject, useAppAsEveryRole } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();
const lead = () => budgetWriter(f.as.lead);

async function auditOf(action: string, targetId: number): Promise<Array<{ actor_email: string; target_label: string; detail: string }>> {
  return f.t.db("audit_events").where({ action, target_id: String(targetId) }).orderBy("id");
}

describe("GET /api/projects/:slug/budget-changes and /api/budget-changes/:id: by audience", () => {
  it("investors read investor-audience changes only; leads and admins all; marketing is refused (money is not theirs); visitors must sign in", async () => {
    const p = await createProject(f.t);
    const open = await lead().change(p.slug, { description: "Tee-offs for a secondary loop", amount: 126_000, audience: "investor" });
    const internal = await lead().change(p.slug, { description: "Lighting controls saving", amount: -24_000, audience: "internal" });
    const list = (c: { agent: typeof f.as.lead.agent }) => c.agent.get(`/api/projects/${p.slug}/budget-changes`);

    expect((await list(f.as.lead)).body.map((c: BudgetChangeAnswer) => [c.reference, c.audience])).toEqual([
      ["C-001", "investor"],
      ["C-002", "internal"],
    ]);
    expect((await list(f.as.admin)).body).toHaveLength(2);
    const investor = await list(f.as.investor);
    expect(investor.status).toBe(200);
    expect(investor.body.map((c: BudgetChangeAnswer) => c.id)).toEqual([open.id]);
    expect(investor.body[0]).toMatchObject({ id: open.id, audience: "investor", amount: 126_000, status: "proposed" });
    const marketing = await list(f.as.marketing);
    expect(marketing.status).toBe(403);
    expect(marketing.body.error.code).toBe("forbidden");
    expect((await list(await newClient(f.t))).status).toBe(401);

    expect((await f.as.investor.agent.get(`/api/budget-changes/${internal.id}`)).status).toBe(404);
    expect((await f.as.investor.agent.get(`/api/budget-changes/${internal.id}/events`)).status).toBe(404);
    expect((await f.as.investor.agent.get(`/api/budget-changes/${open.id}`)).body).toMatchObject({ id: open.id, reference: "C-001" });
    expect((await f.as.marketing.agent.get(`/api/budget-changes/${open.id}`)).status).toBe(403);
    expect((await f.as.lead.agent.get(`/api/budget-changes/${internal.id}`)).body).toMatchObject({ id: internal.id, amount: -24_000 });
  });

  it("names linked milestones only where the reader may see them, and filters by status", async () => {
    const p = await createProject(f.t);
    const w = lead();
    const shown = await w.milestone(p.slug, { name: "HD-1 containment", audience: "investor" });
    const hidden = await w.milestone(p.slug, { name: "Access control head-end", audience: "internal" });
    const c = await w.change(p.slug, { linkedMilestones: [hidden.id, shown.id], status: "approved", approvedBy: "Investor committee", approvedOn: "2026-03-02" });
    // Staff see both, in id order (the order they were entered).
    expect(c.linkedMilestones).toEqual([
      { id: shown.id, name: "HD-1 containment" },
      { id: hidden.id, name: "Access control head-end" },
    ]);
    const asInvestor = (await f.as.investor.agent.get(`/api/budget-changes/${c.id}`)).body as BudgetChangeAnswer;
    expect(asInvestor.linkedMilestones).toEqual([{ id: shown.id, name: "HD-1 containment" }]);
    await w.change(p.slug, { description: "Still proposed" });
    const approved = (await f.as.lead.agent.get(`/api/projects/${p.slug}/budget-changes?status=approved`)).body as BudgetChangeAnswer[];
    expect(approved.map((x) => x.id)).toEqual([c.id]);
    expect((await f.as.lead.agent.get(`/api/projects/${p.slug}/budget-changes?status=pending`)).status).toBe(400);
  });
});

describe("POST /api/projects/:slug/budget-changes: bad input writes nothing", () => {
  it("refuses an approved change without who approved it or when, a zero amount, and links to unknown milestones or risks, naming the field", async () => {
    const p = await createProject(f.t);
    const before = await budgetFootprint(f.t, p.id, p.slug);
    const post = (body: object) => lead().send("post", `/api/projects/${p.slug}/budget-changes`, { description: "Chiller re-test", amount: 38_500, audience: "investor", ...body });

    const noApprover = await post({ status: "approved", approvedOn: "2026-03-02" });
    expect(noApprover.status).toBe(400);
    expect(noApprover.body.error.fields).toEqual({ approvedBy: "is required for an approved change" });
    const noDate = await post({ status: "approved", approvedBy: "Project board" });
    expect(noDate.status).toBe(400);
    expect(Object.keys(noDate.body.error.fields)).toEqual(["approvedOn"]);
    const zero = await post({ amount: 0 });
    expect(zero.status).toBe(400);
    expect(zero.body.error.fields.amount).toBe("must not be zero");
    const fraction = await post({ amount: 12.5 });
    expect(fraction.body.error.fields.amount).toBe("must be whole minor units");
    const unknownMilestone = await post({ linkedMilestones: [999_999_999] });
    expect(unknownMilestone.status).toBe(422);
    expect(unknownMilestone.body.error.fields).toEqual({ linkedMilestones: "names no milestone of this project: 999999999" });
    const unknownRisk = await post({ linkedRisks: [999_999_998] });
    expect(unknownRisk.status).toBe(422);
    expect(Object.keys(unknownRisk.body.error.fields)).toEqual(["linkedRisks"]);
    const future = await post({ status: "approved", approvedBy: "Project board", approvedOn: "2099-01-01" });
    expect(future.status).toBe(422);
    expect(future.body.error.fields.approvedOn).toMatch(/^must not be after today/);
    const publicAudience = await post({ audience: "public" });
    expect(publicAudience.status).toBe(400);
    expect(Object.keys(publicAudience.body.error.fields)).toEqual(["audience"]);

    expect(await budgetFootprint(f.t, p.id, p.slug)).toEqual(before);
  });

  it("a milestone of another project is unknown here", async () => {
    const [p, other] = [await createProject(f.t), await createProject(f.t)];
    const m = await lead().milestone(other.slug, {});
    const res = await lead().send("post", `/api/projects/${p.slug}/budget-changes`, { description: "x", amount: 1, audience: "internal", linkedMilestones: [m.id] });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.linkedMilestones).toBe(`names no milestone of this project: ${m.id}`);
  });
});

describe("budget change writes leave events and an audit entry", () => {
  it("creating: a created event and the first status; the audit names the change; numbers run per project", async () => {
    const p = await createProject(f.t);
    const c = await lead().change(p.slug, { description: "Chiller 3 re-test and port storage", amount: 38_500, drawsOnContingency: true, status: "approved", approvedBy: "Project board", approvedOn: "2026-03-02" });
    expect(c).toMatchObject({ reference: "C-001", status: "approved", approvedBy: "Project board", approvedOn: "2026-03-02", drawsOnContingency: true, version: 1 });
    const events = (await f.as.lead.agent.get(`/api/budget-changes/${c.id}/events`)).body as Array<{ field: string; from: string | null; to: string | null; by: string }>;
    expect(events.map((e) => [e.field, e.from, e.to]).sort()).toEqual([
      ["created", null, "C-001"],
      ["status", null, "approved"],
    ]);
    const leadName = (await f.t.db("users").where({ email: DEMO.lead }).first("name")).name;
    expect(events.every((e) => e.by === leadName)).toBe(true);
    const [audit] = await auditOf("budget_change_created", c.id);
    expect(audit).toMatchObject({ actor_email: DEMO.lead, target_label: "C-001 Chiller 3 re-test and port storage" });
    expect(JSON.parse(audit!.detail)).toMatchObject({ project: p.slug, reference: "C-001", amount: 38_500, drawsOnContingency: true });
    expect((await lead().change(p.slug, {})).reference).toBe("C-002");
  });

  it("PATCH checks approval on the stored row merged with the patch, writes one event per changed field, and refuses a stale version with 409", async () => {
    const p = await createProject(f.t);
    const c = await lead().change(p.slug, { description: "HD-1 tee-offs", amount: 126_000 });
    const before = await budgetFootprint(f.t, p.id, p.slug);

    const incomplete = await lead().send("patch", `/api/budget-changes/${c.id}`, { version: 1, status: "approved" });
    expect(incomplete.status).toBe(422);
    expect(incomplete.body.error.fields).toEqual({ approvedBy: "is required for an approved change", approvedOn: "is required for an approved change" });
    expect(await budgetFootprint(f.t, p.id, p.slug)).toEqual(before);

    const approved = await lead().send("patch", `/api/budget-changes/${c.id}`, { version: 1, status: "approved", approvedBy: "Investor committee", approvedOn: "2026-02-10", note: "Agreed at the February committee" });
    expect(approved.status, JSON.stringify(approved.body)).toBe(200);
    expect(approved.body).toMatchObject({ status: "approved", approvedBy: "Investor committee", version: 2 });
    const rows = await f.t.db("budget_events").where({ change_id: c.id }).whereNot({ field: "created" }).orderBy("id");
    expect(rows.map((e) => [e.field, e.from_value, e.to_value, e.note])).toEqual([
      ["status", null, "proposed", null],
      ["status", "proposed", "approved", "Agreed at the February committee"],
      ["approvedBy", null, "Investor committee", "Agreed at the February committee"],
      ["approvedOn", null, "2026-02-10", "Agreed at the February committee"],
    ]);
    const [audit] = await auditOf("budget_change_updated", c.id);
    expect(JSON.parse(audit!.detail)).toMatchObject({ project: p.slug, changes: { status: { from: "proposed", to: "approved" } } });

    // A later edit that leaves the approval whole passes the merged check; clearing the approver does not.
    const cleared = await lead().send("patch", `/api/budget-changes/${c.id}`, { version: 2, approvedBy: null });
    expect(cleared.status).toBe(422);
    expect(Object.keys(cleared.body.error.fields)).toEqual(["approvedBy"]);
    const stale = await lead().send("patch", `/api/budget-changes/${c.id}`, { version: 1, amount: 130_000 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe("conflict");
    expect((await f.t.db("budget_changes").where({ id: c.id }).first("amount", "version")).version).toBe(2);
  });

  it("DELETE removes a proposal entered by mistake (audit kept); an approved or rejected change stays on record (409)", async () => {
    const p = await createProject(f.t);
    const proposal = await lead().change(p.slug, { description: "Entered twice" });
    const rejected = await lead().change(p.slug, { description: "Second gatehouse lane", status: "rejected" });
    const marketing = await budgetWriter(f.as.marketing).send("delete", `/api/budget-changes/${proposal.id}`);
    expect(marketing.status).toBe(403);

    expect((await lead().send("delete", `/api/budget-changes/${proposal.id}`)).status).toBe(204);
    expect(await f.t.db("budget_changes").where({ id: proposal.id }).first()).toBeUndefined();
    const [audit] = await auditOf("budget_change_deleted", proposal.id);
    expect(JSON.parse(audit!.detail)).toMatchObject({ change: { reference: "C-001", description: "Entered twice" } });
    expect((await f.t.db("budget_events").where({ project_id: p.id, field: "deleted" })).map((e) => e.from_value)).toEqual(["C-001"]);

    const refused = await lead().send("delete", `/api/budget-changes/${rejected.id}`);
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe("change_on_record");
    expect(await f.t.db("budget_changes").where({ id: rejected.id }).first("id")).toBeDefined();
    expect((await lead().send("delete", "/api/budget-changes/999999999")).status).toBe(404);
  });
});
