import { createChangeUseCases } from "./budget.changes.ts";
import { createBudgetContext, referenceOf, type BudgetDeps, type Reader } from "./budget.context.ts";
import { createPositionUseCases } from "./budget.position.ts";
import { listChangeNumbersLinkingRisk } from "./budget.repository.ts";

export type { BudgetDeps, Reader };

/**
 * The budget service: one object for the router and the other modules, made of the budget's
 * use cases, each in its own file —
 * - changes (budget.changes.ts): the register of budget changes by audience, entering and
 *   editing them (each write an event and an audit entry), deleting a proposal;
 * - position (budget.position.ts): the cost position at a date (original budget from the
 *   programme, approved changes, contingency, the EAC variants, the walk), the budget settings.
 * Other modules ask by id: `contingencyRemaining` (the risks register), `movesIn` (digests),
 * `riskReferences` (a risk that budget changes name stays on record).
 */
export function createBudgetService(deps: BudgetDeps) {
  const ctx = createBudgetContext(deps);
  return {
    ...createChangeUseCases(ctx),
    ...createPositionUseCases(ctx),
    /** The budget changes that name a risk, in words ("budget change C-002"). */
    riskReferences: async (riskId: number): Promise<string[]> => (await listChangeNumbersLinkingRisk(deps.db, riskId)).map((n) => `budget change ${referenceOf(n)}`),
  };
}

export type BudgetService = ReturnType<typeof createBudgetService>;
