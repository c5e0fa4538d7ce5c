import type { Knex } from "knex";
import { instant, num, numOrNull, readRow, text, textOrNull, type Row } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

/**
 * The investor record's event tables (risk_events, decision_events, budget_events,
 * document_events) share one shape, made by one helper of their migration: a project, a subject
 * (`risk_id`, `decision_id` …), the field changed from → to, when, by whom, a note. Each module's
 * repository names its own table and calls these, as repositories call `replaceChildRows`.
 */

/**
 * An event to write. The subject is null where a table allows it: the budget's own settings (no
 * change), a deleted document (its row has gone; the event stays in the project's history).
 */
export interface NewRecordEvent<Subject extends number | null = number> {
  projectId: number;
  subjectId: Subject;
  field: string;
  from: string | null;
  to: string | null;
  at: Date;
  byUserId: number | null;
  note: string | null;
}

export interface RecordEventRow extends Omit<NewRecordEvent, "at"> {
  id: number;
  at: string;
}

export async function insertRecordEvents(q: Q, table: string, subjectColumn: string, events: ReadonlyArray<NewRecordEvent<number | null>>): Promise<void> {
  if (events.length === 0) return;
  await q(table).insert(
    events.map((e) => ({ project_id: e.projectId, [subjectColumn]: e.subjectId, field: e.field, from_value: e.from, to_value: e.to, at: e.at, by_user_id: e.byUserId, note: e.note })),
  );
}

const readRecordEvent = readRow<Omit<RecordEventRow, "subjectId">>({
  id: num(), projectId: num(), field: text(), from: textOrNull("from_value"), to: textOrNull("to_value"), at: instant(), byUserId: numOrNull(), note: textOrNull(),
});
export const toRecordEvent = (r: Row, subjectColumn: string): RecordEventRow => ({ ...readRecordEvent(r), subjectId: Number(r[subjectColumn]) });

/** One subject's events, newest first. */
export async function listRecordEvents(q: Q, table: string, subjectColumn: string, subjectId: number): Promise<RecordEventRow[]> {
  const rows = (await q(table).where({ [subjectColumn]: subjectId }).orderBy([{ column: "at", order: "desc" }, { column: "id", order: "desc" }])) as Array<Record<string, unknown>>;
  return rows.map((r) => toRecordEvent(r, subjectColumn));
}

/** A project's events of one field recorded in [from, before), oldest first (what closed, what was decided in a window). */
export async function listFieldEventsIn(q: Q, table: string, subjectColumn: string, projectId: number, field: string, range: { from: Date; before: Date }): Promise<RecordEventRow[]> {
  const rows = (await q(table).where({ project_id: projectId, field }).where("at", ">=", range.from).where("at", "<", range.before).orderBy([{ column: "at" }, { column: "id" }])) as Array<Record<string, unknown>>;
  return rows.map((r) => toRecordEvent(r, subjectColumn));
}
