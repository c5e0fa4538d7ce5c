import { insertRecordEvents, listFieldEventsIn, listRecordEvents, toRecordEvent, type NewRecordEvent, type RecordEventRow } from "../core/record-events.ts";
import type { Q } from "./risks.repository.ts";
import { countOf } from "../db/rows.ts";

// The register's history: every write is an event (a field's change, from → to, who, when, a
// note), so a score as it stood on any day, and what moved in a window, are queries. The rows
// have the record's one event shape (server/core/record-events.ts); the subject is the risk.

export type NewRiskEvent = NewRecordEvent;
export type RiskEventRecord = RecordEventRow;

export const insertRiskEvents = (q: Q, events: readonly NewRiskEvent[]) => insertRecordEvents(q, "risk_events", "risk_id", events);

/** One risk's events, newest first. */
export const listRiskEvents = (q: Q, riskId: number) => listRecordEvents(q, "risk_events", "risk_id", riskId);

/** A project's status events recorded in [from, before), oldest first (what closed, what became an issue). */
export const listStatusEventsIn = (q: Q, projectId: number, from: Date, before: Date) => listFieldEventsIn(q, "risk_events", "risk_id", projectId, "status", { from, before });

/** The likelihood and impact events of these risks (what the score's history is made of), oldest first. */
export async function listLevelEvents(q: Q, riskIds: readonly number[]): Promise<RiskEventRecord[]> {
  if (riskIds.length === 0) return [];
  const rows = (await q("risk_events").whereIn("risk_id", [...riskIds]).whereIn("field", ["likelihood", "impact"]).orderBy([{ column: "at" }, { column: "id" }])) as Array<Record<string, unknown>>;
  return rows.map((r) => toRecordEvent(r, "risk_id"));
}

/** How many events a risk has beyond its creation (a risk with any is on record). */
export async function countEventsBeyondCreation(q: Q, riskId: number): Promise<number> {
  return countOf(q("risk_events").where({ risk_id: riskId }).whereNot({ field: "created" }));
}
