import type { RiskAnswer } from "../../src/shared/schemas/risks.ts";

/**
 * A risk as `GET /api/projects/:slug/risks` answers it: an open, investor-audience risk of low score
 * with nothing linked, exposed or mitigated, changed by `over`. Invented, in the demo's shape.
 */
export function riskAnswer(over: Partial<RiskAnswer> = {}): RiskAnswer {
  const id = over.id ?? 1;
  return {
    id,
    kind: "risk",
    reference: `R-${String(id).padStart(3, "0")}`,
    title: `Risk ${id}`,
    description: "",
    cause: "",
    effect: "",
    category: "programme",
    owner: { id: 1, name: "Lead Person" },
    likelihood: 2,
    impact: 2,
    score: 4,
    band: "low",
    trend: "steady",
    scoreAtWindowStart: 4,
    costExposure: null,
    expectedCost: null,
    expectedCostPert: null,
    scheduleDays: null,
    linkedMilestones: [],
    linkedBlocks: [],
    linkedSystems: [],
    status: "open",
    audience: "investor",
    impactNow: "",
    action: "",
    dueDate: null,
    fromRisk: null,
    issue: null,
    mitigations: [],
    version: 1,
    updatedAt: "2026-12-01T10:00:00.000Z",
    ...over,
  };
}
