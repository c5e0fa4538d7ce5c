import type { FacilitySubject } from "#shared/schemas/facility.ts";
import type { Q } from "./facility.repository.ts";
import { instant, num, numOrNull, oneOf, readRow, text, textOrNull } from "../db/rows.ts";

// The facility's history: every write is an event (a field's change, from → to, who, when, a
// note); a unit's stage events are its dated history, `on` being the day on site.

export interface NewFacilityEvent {
  projectId: number;
  subject: FacilitySubject;
  subjectId: number;
  subjectName: string;
  field: string;
  from: string | null;
  to: string | null;
  /** The day on site (a unit's stage), else the day it was recorded, in the project's time zone. */
  on: string;
  at: Date;
  byUserId: number | null;
  note: string | null;
}

/** An event as stored: who made it by user id (the users module names them). */
export interface FacilityEventRecord extends Omit<NewFacilityEvent, "at"> {
  id: number;
  at: string;
}

export async function insertFacilityEvents(q: Q, events: readonly NewFacilityEvent[]): Promise<void> {
  if (events.length === 0) return;
  await q("facility_events").insert(
    events.map((e) => ({
      project_id: e.projectId,
      subject: e.subject,
      subject_id: e.subjectId,
      subject_name: e.subjectName,
      field: e.field,
      from_value: e.from,
      to_value: e.to,
      on_date: e.on,
      at: e.at,
      by_user_id: e.byUserId,
      note: e.note,
    })),
  );
}

const toEvent = readRow<FacilityEventRecord>({
  id: num(), projectId: num(), subject: oneOf<FacilitySubject>(), subjectId: num(), subjectName: text(), field: text(), from: textOrNull("from_value"),
  to: textOrNull("to_value"), on: text("on_date"), at: instant(), byUserId: numOrNull(), note: textOrNull(),
});

const newestFirst = [
  { column: "at", order: "desc" as const },
  { column: "id", order: "desc" as const },
];

/** One subject's events, newest first. */
export async function listSubjectEvents(q: Q, subject: FacilitySubject, subjectId: number): Promise<FacilityEventRecord[]> {
  return ((await q("facility_events").where({ subject, subject_id: subjectId }).orderBy(newestFirst)) as Array<Record<string, unknown>>).map(toEvent);
}

/** A project's events recorded in [from, before) when given, newest first. */
export async function listProjectFacilityEvents(q: Q, projectId: number, range: { from?: Date; before?: Date } = {}): Promise<FacilityEventRecord[]> {
  const query = q("facility_events").where({ project_id: projectId });
  if (range.from) query.where("at", ">=", range.from);
  if (range.before) query.where("at", "<", range.before);
  return ((await query.orderBy(newestFirst)) as Array<Record<string, unknown>>).map(toEvent);
}

/** A unit's creation or stage change, as the replay of stages needs it. */
export interface UnitStageEvent {
  unitId: number;
  field: "created" | "stage";
  from: string | null;
  to: string | null;
  on: string;
}

/** The units' stage history of a project: each unit's creation and stage events, oldest first by day on site, then as recorded. */
export async function listUnitStageEvents(q: Q, projectId: number): Promise<UnitStageEvent[]> {
  const rows = (await q("facility_events")
    .where({ project_id: projectId, subject: "unit" })
    .whereIn("field", ["created", "stage"])
    .orderBy([{ column: "on_date" }, { column: "at" }, { column: "id" }])
    .select("subject_id", "field", "from_value", "to_value", "on_date")) as Array<Record<string, unknown>>;
  return rows.map((r) => ({ unitId: Number(r.subject_id), field: r.field as "created" | "stage", from: (r.from_value as string | null) ?? null, to: (r.to_value as string | null) ?? null, on: String(r.on_date) }));
}

/** Deletes the events of these subjects (a deleted block, system, unit or feature: its history goes with it; the audit log keeps the deletion). */
export async function deleteSubjectEvents(q: Q, subject: FacilitySubject, subjectIds: readonly number[]): Promise<void> {
  if (subjectIds.length === 0) return;
  await q("facility_events").where({ subject }).whereIn("subject_id", [...subjectIds]).delete();
}
