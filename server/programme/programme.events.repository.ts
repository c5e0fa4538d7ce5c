import type { MilestoneEventFieldName, MilestoneEventRow } from "#shared/schemas/programme.ts";
import { visibleTo, type Q, type Viewer } from "./programme.repository.ts";
import { countOf, instant, num, numOrNull, oneOf, readRow, text, textOrNull } from "../db/rows.ts";

// The history of the programme: every change of a tracked field of a milestone is an event.

/** How many events were recorded after the milestone was entered (creation writes its own at `created_at`). */
export async function countEventsSince(q: Q, milestoneId: number, since: Date): Promise<number> {
  return countOf(q("milestone_events").where({ milestone_id: milestoneId }).where("at", ">", since));
}

export interface NewMilestoneEvent {
  milestoneId: number;
  projectId: number;
  field: MilestoneEventFieldName;
  from: string | null;
  to: string | null;
  at: Date;
  byUserId: number | null;
  note: string | null;
  baselineVersion: number | null;
}

export async function insertEvents(q: Q, events: readonly NewMilestoneEvent[]): Promise<void> {
  if (events.length === 0) return;
  await q("milestone_events").insert(
    events.map((e) => ({
      milestone_id: e.milestoneId,
      project_id: e.projectId,
      field: e.field,
      from_value: e.from,
      to_value: e.to,
      at: e.at,
      by_user_id: e.byUserId,
      note: e.note,
      baseline_version: e.baselineVersion,
    })),
  );
}

/** An event as stored: who made it by user id (the users module names them). */
export type MilestoneEventRecord = Omit<MilestoneEventRow, "by"> & { byUserId: number | null };

function eventQuery(q: Q) {
  return q("milestone_events as e")
    .join("milestones as m", "m.id", "e.milestone_id")
    .select("e.*", "m.name as milestone_name")
    .orderBy([
      { column: "e.at", order: "desc" },
      { column: "e.id", order: "desc" },
    ]);
}

const toEvent = readRow<MilestoneEventRecord>({
  id: num(), milestoneId: num(), milestoneName: text(), field: oneOf<MilestoneEventFieldName>(), from: textOrNull("from_value"), to: textOrNull("to_value"), at: instant(),
  byUserId: numOrNull(), note: textOrNull(), baselineVersion: numOrNull(),
});

/** A milestone's history, newest first (the caller has already been shown the milestone). */
export async function listMilestoneEvents(q: Q, milestoneId: number): Promise<MilestoneEventRecord[]> {
  return ((await eventQuery(q).where("e.milestone_id", milestoneId)) as Array<Record<string, unknown>>).map(toEvent);
}

/**
 * A project's events of milestones the viewer may see, newest first, with `at` in
 * [from, before) when given, and only of `fields` when given.
 */
export async function listProjectEvents(
  q: Q,
  projectId: number,
  viewer: Viewer,
  opts: { from?: Date; before?: Date; fields?: readonly MilestoneEventFieldName[] } = {},
): Promise<MilestoneEventRecord[]> {
  const query = visibleTo(eventQuery(q).where("e.project_id", projectId), "m.audience", viewer);
  if (opts.from) query.where("e.at", ">=", opts.from);
  if (opts.before) query.where("e.at", "<", opts.before);
  if (opts.fields) query.whereIn("e.field", opts.fields as MilestoneEventFieldName[]);
  return ((await query) as Array<Record<string, unknown>>).map(toEvent);
}

