import { insertRecordEvents, listFieldEventsIn, listRecordEvents, type NewRecordEvent, type RecordEventRow } from "../core/record-events.ts";
import type { Q } from "./decisions.repository.ts";

// The decisions' history: every write is an event (a field's change, from → to, who, when, a
// note), so what was newly asked or decided in a window is a query. The rows have the record's
// one event shape (server/core/record-events.ts); the subject is the decision.

export type NewDecisionEvent = NewRecordEvent;
export type DecisionEventRecord = RecordEventRow;

export const insertDecisionEvents = (q: Q, events: readonly NewDecisionEvent[]) => insertRecordEvents(q, "decision_events", "decision_id", events);

/** One decision's events, newest first. */
export const listDecisionEvents = (q: Q, decisionId: number) => listRecordEvents(q, "decision_events", "decision_id", decisionId);

/** A project's status events recorded in [from, before), oldest first (what was decided in a window). */
export const listDecisionStatusEventsIn = (q: Q, projectId: number, from: Date, before: Date) => listFieldEventsIn(q, "decision_events", "decision_id", projectId, "status", { from, before });
