import { createRisksContext, type Reader, type RisksDeps } from "./risks.context.ts";
import { createMitigationUseCases } from "./risks.mitigations.ts";
import { createRiskReadUseCases, type RiskMoveItem, type RiskMoves } from "./risks.reads.ts";
import { createRiskWriteUseCases } from "./risks.writes.ts";

export type { Reader, RiskMoveItem, RiskMoves, RisksDeps };

/**
 * The risks and issues register: one object for the router and the other modules, made of its
 * use cases, each in its own file —
 * - reads (risks.reads.ts): the register by audience with scores, bands and trends, one item,
 *   its history, the summary (grid, totals, contingency left), a window's moves for digests;
 * - writes (risks.writes.ts): enter, edit, open an issue from a risk, delete one entered by mistake;
 * - mitigations (risks.mitigations.ts): a risk's actions.
 * Other modules ask by project id: `movesIn` (digests), `registerAt` (monthly reports), `referencesOf` (decisions), `riskIdsOf`, `risksNamed`, `exposure` (the budget).
 */
export function createRisksService(deps: RisksDeps) {
  const ctx = createRisksContext(deps);
  const reads = createRiskReadUseCases(ctx);
  return {
    list: reads.list,
    get: (id: number, reader: Reader, since?: string) => reads.one(id, reader, since),
    events: reads.events,
    summary: reads.summary,
    movesIn: reads.movesIn,
    registerAt: reads.registerAt,
    referencesOf: reads.referencesOf,
    riskIdsOf: reads.riskIdsOf,
    risksNamed: reads.risksNamed,
    exposure: reads.exposure,
    ...createRiskWriteUseCases(ctx, reads),
    ...createMitigationUseCases(ctx, reads),
  };
}

export type RisksService = ReturnType<typeof createRisksService>;
