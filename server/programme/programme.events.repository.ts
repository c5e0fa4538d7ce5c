import type { MilestoneEventFieldName, MilestoneEventRow } from "#shared/schemas/programme.ts";
import { visibleTo, type Q, type Viewer } from "./programme.repository.ts";

// The history of the programme: every change of a tracked field of a milestone is an event.

/** How many events were recorded after the milestone was entered (creation writes its own at `created_at`). */
export async function countEventsSince(q: Q, milestoneId: number, since: Date): Promise<number> {
  const r = await q("milestone_events").where({ milestone_id: milestoneId }).where("at", ">", since).count({ n: "*" }).first();
  return Number(r?.n ?? 0);
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

function toEvent(r: Record<string, unknown>): MilestoneEventRecord {
  return {
    id: Number(r.id),
    milestoneId: Number(r.milestone_id),
    milestoneName: String(r.milestone_name),
    field: r.field as MilestoneEventFieldName,
    from: (r.from_value as string | null) ?? null,
    to: (r.to_value as string | null) ?? null,
    at: (r.at as Date).toISOString(),
    byUserId: r.by_user_id == null ? null : Number(r.by_user_id),
    note: (r.note as string | null) ?? null,
    baselineVersion: r.baseline_version === null || r.baseline_version === undefined ? null : Number(r.baseline_version),
  };
}

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

