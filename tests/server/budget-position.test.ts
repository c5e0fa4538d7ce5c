import { describe, expect, it } from "vitest";
import type { BudgetPosition } from "../../src/shared/schemas/budget.ts";
import { DEMO, newClient } from "../helpers/app.ts";
import { budgetFootprint, budgetWriter } from "./budget-fixtures.ts";
import { createProject, useAppAsEveryRole } from "./posts-fixtures.ts";

const f = useAppAsEveryRole();
const lead = () => budgetWriter(f.as.lead);
const AT = "2026-03-31";

/**
 * A project whose programme gives, at 31 March 2026, the textbook row of CHECKS.md: BAC 120,000,
 * PV 23,000, EV 20,000 and AC 25,000 (minor units). A is done (planned and earned 20,000); B was
 * due by then and is not started (planned 3,000, earned nothing); C starts later (nothing planned).
 */
async function textbookProject() {
  const p = await createProject(f.t);
  const w = lead();
  await w.milestone(p.slug, { name: "A", plannedStart: "2026-01-05", baselineFinish: "2026-02-27", actualFinish: "2026-02-27", budget: 20_000 });
  await w.milestone(p.slug, { name: "B", plannedStart: "2026-01-05", baselineFinish: "2026-02-27", percentComplete: 0, budget: 3_000 });
  await w.milestone(p.slug, { name: "C", plannedStart: "2026-06-01", baselineFinish: "2026-12-31", percentComplete: 0, budget: 97_000 });
  await w.costActual(p.slug, "2026-03-31", 25_000);
  return p;
}

const positionAs = async (c: { agent: typeof f.as.lead.agent }, slug: string, at: string | null = AT) => {
  const res = await c.agent.get(`/api/projects/${slug}/budget${at ? `?at=${at}` : ""}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as BudgetPosition;
};

describe("GET /api/projects/:slug/budget: the cost position", () => {
  it("takes BAC, PV, EV and AC from the programme and gives the three EAC variants of the textbook row", async () => {
    const p = await textbookProject();
    const pos = await positionAs(f.as.lead, p.slug);
    // Source: CHECKS.md, "Estimate at completion": Schwalbe, Information Technology Project Management, ch. 7,
    // exercise 1 (secondary) — PV 23,000 · EV 20,000 · AC 25,000 · BAC 120,000 → EAC 150,000; the other two derived.
    expect(pos).toMatchObject({ at: AT, currency: "GBP", originalBudget: 120_000, plannedValue: 23_000, earnedValue: 20_000, actualCost: 25_000, approvedChanges: 0, currentBudget: 120_000 });
    expect(pos.cpi).toBeCloseTo(0.8, 10);
    expect(pos.spi).toBeCloseTo(0.869565, 6);
    expect(pos.eac.map((v) => [v.method, v.value])).toEqual([
      ["bac_over_cpi", 150_000],
      ["ac_plus_remaining", 125_000],
      ["ac_plus_remaining_over_cpi_spi", 168_750],
    ]);
    expect(pos.eac.map((v) => v.formula)).toEqual(["EAC = BAC / CPI", "EAC = AC + (BAC − EV)", "EAC = AC + (BAC − EV) / (CPI × SPI)"]);
    expect(pos.eac.every((v) => v.sentence.length > 20)).toBe(true);
    // The default choice until the lead picks one.
    expect(pos).toMatchObject({ projectedFinalCostMethod: "bac_over_cpi", projectedFinalCost: 150_000, contingencyHeld: 0, contingencyRemaining: 0 });
    expect(pos.walk).toEqual([
      { label: "Original budget", amount: 120_000, kind: "start" },
      { label: "Current approved budget", amount: 120_000, kind: "subtotal" },
      { label: "Projected final cost", amount: 150_000, kind: "projection" },
    ]);
    expect(pos.caution).toMatch(/not an audited account/);
  });

  it("counts every approved change up to the date whatever its audience, names in the walk only those the reader may see, and draws contingency apart", async () => {
    const p = await textbookProject();
    const w = lead();
    const approved = { status: "approved", approvedBy: "Project board", approvedOn: "2026-03-10" };
    await w.settings(p.slug, { contingencyHeld: 8_000, projectedFinalCostMethod: "ac_plus_remaining" });
    await w.change(p.slug, { description: "Tee-offs", amount: 10_000, audience: "investor", ...approved });
    await w.change(p.slug, { description: "Lighting", amount: 5_000, audience: "internal", ...approved });
    await w.change(p.slug, { description: "Re-test", amount: 2_000, audience: "internal", drawsOnContingency: true, ...approved });
    // Not counted: proposed, rejected, or approved after the date asked for.
    await w.change(p.slug, { description: "Proposed", amount: 40_000, audience: "investor" });
    await w.change(p.slug, { description: "Rejected", amount: 50_000, audience: "investor", status: "rejected" });
    await w.change(p.slug, { description: "Later", amount: 60_000, audience: "investor", ...approved, approvedOn: "2026-06-01" });

    const staff = await positionAs(f.as.lead, p.slug);
    // Hand-worked: BAC 120,000 + 10,000 + 5,000 = 135,000; EV 20,000, AC 25,000, PV 23,000.
    // AC + (BAC − EV) = 25,000 + 115,000 = 140,000; BAC / CPI = 135,000 / 0.8 = 168,750;
    // AC + (BAC − EV) · AC · PV / EV² = 25,000 + 115,000 × 25,000 × 23,000 / 20,000² = 190,312.5.
    expect(staff).toMatchObject({ approvedChanges: 15_000, currentBudget: 135_000, contingencyHeld: 8_000, contingencyDrawn: 2_000, contingencyRemaining: 6_000 });
    expect(staff.eac.map((v) => v.value)).toEqual([168_750, 140_000, 190_312.5]);
    expect(staff).toMatchObject({ projectedFinalCostMethod: "ac_plus_remaining", projectedFinalCost: 140_000 });
    expect(staff.walk.map((s) => [s.label, s.amount])).toEqual([
      ["Original budget", 120_000],
      ["C-001 Tee-offs", 10_000],
      ["C-002 Lighting", 5_000],
      ["Current approved budget", 135_000],
      ["Projected final cost", 140_000],
    ]);

    const investor = await positionAs(f.as.investor, p.slug);
    // One build, one budget: the investor's figures are the staff's; the internal change is summed unnamed.
    const { walk: investorWalk, ...investorFigures } = investor;
    const { walk: _staffWalk, ...staffFigures } = staff;
    expect(investorFigures).toEqual(staffFigures);
    expect(investorWalk.map((s) => [s.label, s.amount])).toEqual([
      ["Original budget", 120_000],
      ["C-001 Tee-offs", 10_000],
      ["Other approved changes", 5_000],
      ["Current approved budget", 135_000],
      ["Projected final cost", 140_000],
    ]);
    expect(JSON.stringify(investor)).not.toMatch(/Lighting|Re-test/);

    // On a later day the change approved in June counts too.
    expect((await positionAs(f.as.lead, p.slug, "2026-07-01")).approvedChanges).toBe(75_000);
  });

  it("marketing reads no money (403), visitors must sign in (401), a bad date is 400", async () => {
    const p = await createProject(f.t);
    expect((await f.as.marketing.agent.get(`/api/projects/${p.slug}/budget`)).status).toBe(403);
    expect((await (await newClient(f.t)).agent.get(`/api/projects/${p.slug}/budget`)).status).toBe(401);
    const bad = await f.as.lead.agent.get(`/api/projects/${p.slug}/budget?at=2026-02-30`);
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(["at"]);
    expect((await f.as.investor.agent.get("/api/projects/no-such-project/budget")).status).toBe(404);
    // A project with no budgets yet: zeros, and no variant that divides by nothing.
    const empty = await positionAs(f.as.admin, p.slug, null);
    expect(empty).toMatchObject({ originalBudget: 0, currentBudget: 0, cpi: null, projectedFinalCost: null });
  });
});

describe("PUT /api/projects/:slug/budget/settings", () => {
  it("writes the contingency held and the EAC chosen with an event (no change named) and an audit entry; a repeat writes nothing", async () => {
    const p = await createProject(f.t);
    await lead().settings(p.slug, { contingencyHeld: 400_000, projectedFinalCostMethod: "ac_plus_remaining_over_cpi_spi" });
    const events = await f.t.db("budget_events").where({ project_id: p.id }).orderBy("id");
    expect(events.map((e) => [e.change_id, e.field, e.from_value, e.to_value])).toEqual([
      [null, "contingencyHeld", "0", "400000"],
      [null, "projectedFinalCostMethod", "bac_over_cpi", "ac_plus_remaining_over_cpi_spi"],
    ]);
    const audit = await f.t.db("audit_events").where({ action: "budget_settings_changed", target_id: String(p.id) });
    expect(audit).toHaveLength(1);
    expect(audit[0].actor_email).toBe(DEMO.lead);
    const before = await budgetFootprint(f.t, p.id, p.slug);
    await lead().settings(p.slug, { contingencyHeld: 400_000, projectedFinalCostMethod: "ac_plus_remaining_over_cpi_spi" });
    expect(await budgetFootprint(f.t, p.id, p.slug)).toEqual(before);
  });

  it("only leads and admins write them; bad input names the field and writes nothing", async () => {
    const p = await createProject(f.t);
    const before = await budgetFootprint(f.t, p.id, p.slug);
    const put = (c: typeof f.as.lead, body: object) => budgetWriter(c).send("put", `/api/projects/${p.slug}/budget/settings`, body);
    expect((await put(f.as.marketing, { contingencyHeld: 1, projectedFinalCostMethod: "bac_over_cpi" })).status).toBe(403);
    expect((await put(f.as.investor, { contingencyHeld: 1, projectedFinalCostMethod: "bac_over_cpi" })).status).toBe(403);
    const negative = await put(f.as.admin, { contingencyHeld: -5, projectedFinalCostMethod: "bac_over_cpi" });
    expect(negative.status).toBe(400);
    expect(Object.keys(negative.body.error.fields)).toEqual(["contingencyHeld"]);
    const method = await put(f.as.admin, { contingencyHeld: 5, projectedFinalCostMethod: "average" });
    expect(Object.keys(method.body.error.fields)).toEqual(["projectedFinalCostMethod"]);
    expect(await budgetFootprint(f.t, p.id, p.slug)).toEqual(before);
  });
});

describe("what other modules read of the budget", () => {
  it("contingencyRemaining counts every approved draw; movesIn gives the changes approved in a window, by audience", async () => {
    const p = await createProject(f.t);
    const w = lead();
    await w.settings(p.slug, { contingencyHeld: 50_000, projectedFinalCostMethod: "bac_over_cpi" });
    const shown = await w.change(p.slug, { description: "Busbar price rise", amount: 12_000, audience: "investor", drawsOnContingency: true });
    const hidden = await w.change(p.slug, { description: "Crane standing time", amount: 3_000, audience: "internal", drawsOnContingency: true });
    const from = new Date();
    for (const c of [shown, hidden]) await w.send("patch", `/api/budget-changes/${c.id}`, { version: 1, status: "approved", approvedBy: "Project board", approvedOn: "2026-11-30" }).expect(200);
    const to = new Date(Date.now() + 1000);

    expect(await f.t.plumbline.budget.contingencyRemaining(p.id)).toBe(35_000);
    const investor = await f.t.plumbline.budget.movesIn(p.id, from, to, "investor");
    expect(investor).toEqual([{ id: shown.id, reference: "C-001", description: "Busbar price rise", audience: "investor", amount: 12_000, approvedBy: "Project board", approvedOn: "2026-11-30", drawsOnContingency: true }]);
    expect((await f.t.plumbline.budget.movesIn(p.id, from, to, "staff")).map((m) => m.reference)).toEqual(["C-001", "C-002"]);
    // Before the window opened nothing was approved.
    expect(await f.t.plumbline.budget.movesIn(p.id, new Date(from.getTime() - 60_000), from, "staff")).toEqual([]);
  });

  it("the demo's cost position: the seeded contingency, three approved changes (one drawn on contingency), one proposed, one rejected", async () => {
    const demo = "aldermere-phase-2";
    const changes = (await f.as.lead.agent.get(`/api/projects/${demo}/budget-changes`)).body as Array<{ status: string; drawsOnContingency: boolean; audience: string }>;
    expect(changes.map((c) => c.status).sort()).toEqual(["approved", "approved", "approved", "proposed", "rejected"]);
    expect(changes.filter((c) => c.status === "approved" && c.drawsOnContingency)).toHaveLength(1);
    expect(new Set(changes.map((c) => c.audience))).toEqual(new Set(["investor", "internal"]));
    const pos = await positionAs(f.as.investor, demo, null);
    expect(pos.originalBudget).toBe(505_000_000);
    expect(pos.contingencyHeld).toBe(40_000_000);
    expect(pos.contingencyDrawn).toBe(3_850_000);
    expect(pos.walk.map((s) => s.label)).toContain("Other approved changes");
    expect(pos.projectedFinalCost).not.toBeNull();
  });
});
