import { expect } from "vitest";
import type { BudgetChangeAnswer } from "../../src/shared/schemas/budget.ts";
import type { TestApp } from "../helpers/app.ts";
import type { Client } from "./posts-fixtures.ts";

/**
 * Rows for the budget's server tests: each test makes its own project (straight into the
 * database: projects have no write API) and writes its milestones, costs and changes through the
 * API as a lead.
 */

export function budgetWriter(c: Client) {
  const send = (method: "post" | "patch" | "put" | "delete", path: string, body?: object) => {
    const req = c.agent[method](path).set("X-CSRF-Token", c.csrf);
    return body === undefined ? req : req.send(body);
  };
  const ok = async <T>(res: PromiseLike<{ status: number; body: unknown }>, status: number): Promise<T> => {
    const r = await res;
    expect(r.status, JSON.stringify(r.body)).toBe(status);
    return r.body as T;
  };
  return {
    send,
    change: (slug: string, body: Record<string, unknown>) =>
      ok<BudgetChangeAnswer>(send("post", `/api/projects/${slug}/budget-changes`, { description: "A change", amount: 10_000, audience: "investor", ...body }), 201),
    milestone: (slug: string, body: Record<string, unknown>) =>
      ok<{ id: number; name: string }>(send("post", `/api/projects/${slug}/milestones`, { name: `Milestone ${Math.random().toString(36).slice(2)}`, phase: "Plant", system: "cooling", weight: 1, baselineFinish: "2026-06-30", audience: "public", ...body }), 201),
    costActual: (slug: string, periodEnd: string, amount: number) => ok(send("post", `/api/projects/${slug}/cost-actuals`, { periodEnd, amount }), 201),
    settings: (slug: string, body: { contingencyHeld: number; projectedFinalCostMethod: string }) => ok(send("put", `/api/projects/${slug}/budget/settings`, body), 200),
  };
}

/** Everything a budget write could touch in a project, so "nothing written" can be checked. */
export async function budgetFootprint(t: TestApp, projectId: number, slug: string) {
  const n = async (q: PromiseLike<Array<Record<string, unknown>>>) => Number((await q)[0]?.n ?? 0);
  return {
    changes: await n(t.db("budget_changes").where({ project_id: projectId }).count({ n: "*" })),
    versions: await n(t.db("budget_changes").where({ project_id: projectId }).sum({ n: "version" })),
    milestoneLinks: await n(t.db("budget_change_milestones as l").join("budget_changes as c", "c.id", "l.change_id").where("c.project_id", projectId).count({ n: "*" })),
    events: await n(t.db("budget_events").where({ project_id: projectId }).count({ n: "*" })),
    audit: await n(t.db("audit_events").where("action", "like", "budget_%").whereRaw("detail like ?", [`%"project":"${slug}"%`]).count({ n: "*" })),
    contingency: Number((await t.db("projects").where({ id: projectId }).first("contingency_held")).contingency_held),
  };
}
