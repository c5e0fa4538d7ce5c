import { expect } from "vitest";
import type { DecisionAnswer } from "../../src/shared/schemas/decisions.ts";
import type { RiskAnswer } from "../../src/shared/schemas/risks.ts";
import { DEMO, type TestApp } from "../helpers/app.ts";
import type { Client } from "./posts-fixtures.ts";

/**
 * Rows for the risks and decisions server tests: each test makes its own project (posts-fixtures'
 * `createProject`) and writes its register through the API as a lead.
 */

export async function ok<T>(res: PromiseLike<{ status: number; body: unknown }>, status: number): Promise<T> {
  const r = await res;
  expect(r.status, JSON.stringify(r.body)).toBe(status);
  return r.body as T;
}

export async function userId(t: TestApp, email: string): Promise<number> {
  return Number(((await t.db("users").where({ email }).first("id")) as { id: number }).id);
}

export const leadId = (t: TestApp) => userId(t, DEMO.lead);

/** Writes to the register and the decisions as the client (a lead, in most tests). */
export function recordWriter(c: Client) {
  const send = (method: "post" | "patch" | "delete", path: string, body?: object) => {
    const req = c.agent[method](path).set("X-CSRF-Token", c.csrf);
    return body === undefined ? req : req.send(body);
  };
  return {
    send,
    risk: (slug: string, body: Record<string, unknown>) =>
      ok<RiskAnswer>(send("post", `/api/projects/${slug}/risks`, { title: "Chiller delivery slips", category: "supply_chain", likelihood: 3, impact: 4, audience: "investor", ...body }), 201),
    decision: (slug: string, body: Record<string, unknown>) =>
      ok<DecisionAnswer>(
        send("post", `/api/projects/${slug}/decisions`, {
          title: "Second generator set for Hall 2",
          question: "Should a second generator set be ordered now?",
          options: [
            { label: "Order now", consequence: "Hall 2 ready on time", cost: 45_000_000 },
            { label: "Wait a quarter", consequence: "Hall 2 ready date moves by six weeks", cost: 0 },
          ],
          recommendedOption: 0,
          decider: "Investors' committee",
          neededBy: "2099-01-15",
          audience: "investor",
          ...body,
        }),
        201,
      ),
  };
}

/** Everything a risk or decision write could touch in a project, so "nothing written" can be checked. */
export async function recordFootprint(t: TestApp, projectId: number) {
  const n = async (q: PromiseLike<Array<Record<string, unknown>>>) => Number((await q)[0]?.n ?? 0);
  const slug = ((await t.db("projects").where({ id: projectId }).first("slug")) as { slug: string }).slug;
  return {
    risks: await n(t.db("risks").where({ project_id: projectId }).count({ n: "*" })),
    riskVersions: await n(t.db("risks").where({ project_id: projectId }).sum({ n: "version" })),
    mitigations: await n(t.db("risk_mitigations as m").join("risks as r", "r.id", "m.risk_id").where("r.project_id", projectId).count({ n: "*" })),
    riskLinks: await n(t.db("risk_milestones as l").join("risks as r", "r.id", "l.risk_id").where("r.project_id", projectId).count({ n: "*" })),
    riskEvents: await n(t.db("risk_events").where({ project_id: projectId }).count({ n: "*" })),
    decisions: await n(t.db("decisions").where({ project_id: projectId }).count({ n: "*" })),
    decisionVersions: await n(t.db("decisions").where({ project_id: projectId }).sum({ n: "version" })),
    decisionEvents: await n(t.db("decision_events").where({ project_id: projectId }).count({ n: "*" })),
    audit: await n(t.db("audit_events").whereRaw("detail like ?", [`%"project":"${slug}"%`]).count({ n: "*" })),
  };
}

/** A bad request: what it is, how it is sent, the status expected and the field its refusal must name. */
export type Refusal = [what: string, method: "post" | "patch", path: string, body: object, status: number, field: string];

/** Sends each bad request and checks it is refused naming its field, and that nothing of the project's record was written. */
export async function expectRefusedWithNothingWritten(t: TestApp, projectId: number, w: ReturnType<typeof recordWriter>, cases: readonly Refusal[]): Promise<void> {
  const before = await recordFootprint(t, projectId);
  for (const [what, method, path, body, status, field] of cases) {
    const res = await w.send(method, path, body);
    expect(res.status, what).toBe(status);
    expect(Object.keys(res.body.error.fields ?? {}), what).toContain(field);
  }
  expect(await recordFootprint(t, projectId)).toEqual(before);
}
