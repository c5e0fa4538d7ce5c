import { createDecisionsContext, type DecisionDocumentSource, type DecisionsDeps, type Reader } from "./decisions.context.ts";
import { createDecisionReadUseCases, type DecisionMove } from "./decisions.reads.ts";
import { createDecisionWriteUseCases } from "./decisions.writes.ts";

export type { DecisionDocumentSource, DecisionMove, DecisionsDeps, Reader };

/**
 * Decisions needed: one object for the router and the other modules, made of its use cases —
 * - reads (decisions.reads.ts): the list by audience (open first, overdue leading, days left on
 *   site), one, its history, a window's moves for digests;
 * - writes (decisions.writes.ts): ask, edit an open one, record the outcome, withdraw.
 * Other modules ask by id: `movesIn` (digests), `openAt` (monthly reports), `linkingRisk` (the risks register's delete).
 */
export function createDecisionsService(deps: DecisionsDeps) {
  const ctx = createDecisionsContext(deps);
  const reads = createDecisionReadUseCases(ctx);
  return {
    list: reads.list,
    get: reads.one,
    events: reads.events,
    movesIn: reads.movesIn,
    openAt: reads.openAt,
    linkingRisk: reads.linkingRisk,
    ...createDecisionWriteUseCases(ctx, reads),
  };
}

export type DecisionsService = ReturnType<typeof createDecisionsService>;
