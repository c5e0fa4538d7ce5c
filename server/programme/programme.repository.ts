import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { BaselineVersion, MilestoneEventFieldName, MilestoneEventRow, System } from "#shared/schemas/programme.ts";
import { audiencesFor, type Viewer } from "#shared/domain/audience.ts";

type Q = Knex | Knex.Transaction;

export type { Viewer };

/**
 * The audience rule of the programme, in one place: visitors see public milestones,
 * investors public and investor ones, staff all (`audiencesFor`, the same audiences as
 * published content, without its status). Every read path below applies it, in SQL through
 * `visibleTo` or, for baseline snapshots kept as JSON, through `visibleSnapshotEntries`.
 */
function visibleTo<T extends Knex.QueryBuilder>(query: T, column: string, viewer: Viewer): T {
  return query.whereIn(column, audiencesFor(viewer) as Audience[]) as T;
}

// Milestones

export interface MilestoneRecord {
  id: number;
  projectId: number;
  phaseId: number;
  phase: string;
  phaseOrder: number;
  name: string;
  area: string;
  system: System;
  description: string;
  weight: number;
  percentComplete: number;
  plannedStart: string | null;
  baselineFinish: string;
  forecastFinish: string | null;
  actualFinish: string | null;
  audience: Audience;
  budget: number | null;
  /** Predecessor ids the same viewer may see, ascending. */
  dependsOn: number[];
  version: number;
  createdAt: Date;
  updatedAt: Date;
  /** Set when the milestone was removed from the programme (it stays on record, out of the figures). */
  removal: MilestoneRemovalRecord | null;
}

export interface MilestoneRemovalRecord {
  at: Date;
  by: string | null;
  reason: string;
}

/** The stored fields of a milestone a write may set (camelCase; the phase by id). */
export interface MilestoneFields {
  phaseId: number;
  name: string;
  area: string;
  system: System;
  description: string;
  weight: number;
  percentComplete: number;
  plannedStart: string | null;
  baselineFinish: string;
  forecastFinish: string | null;
  actualFinish: string | null;
  audience: Audience;
  budget: number | null;
}

const COLUMN: Record<keyof MilestoneFields, string> = {
  phaseId: "phase_id",
  name: "name",
  area: "area",
  system: "system",
  description: "description",
  weight: "weight",
  percentComplete: "percent_complete",
  plannedStart: "planned_start",
  baselineFinish: "baseline_finish",
  forecastFinish: "forecast_finish",
  actualFinish: "actual_finish",
  audience: "audience",
  budget: "budget",
};

function toRow(fields: Partial<MilestoneFields>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [key, column] of Object.entries(COLUMN) as Array<[keyof MilestoneFields, string]>) {
    if (fields[key] !== undefined) row[column] = fields[key];
  }
  return row;
}

const dateOrNull = (v: unknown): string | null => (v === null || v === undefined ? null : String(v));

function toMilestone(r: Record<string, unknown>, dependsOn: number[]): MilestoneRecord {
  return {
    id: Number(r.id),
    projectId: Number(r.project_id),
    phaseId: Number(r.phase_id),
    phase: String(r.phase_name),
    phaseOrder: Number(r.phase_order),
    name: String(r.name),
    area: String(r.area ?? ""),
    system: r.system as System,
    description: String(r.description ?? ""),
    weight: Number(r.weight),
    percentComplete: Number(r.percent_complete),
    plannedStart: dateOrNull(r.planned_start),
    baselineFinish: String(r.baseline_finish),
    forecastFinish: dateOrNull(r.forecast_finish),
    actualFinish: dateOrNull(r.actual_finish),
    audience: r.audience as Audience,
    budget: r.budget === null || r.budget === undefined ? null : Number(r.budget),
    dependsOn,
    version: Number(r.version),
    createdAt: r.created_at as Date,
    updatedAt: r.updated_at as Date,
    removal: r.removed_at ? { at: r.removed_at as Date, by: (r.removed_by_name as string | null) ?? null, reason: String(r.removed_reason ?? "") } : null,
  };
}

function milestoneQuery(q: Q) {
  return q("milestones as m")
    .join("phases as p", "p.id", "m.phase_id")
    .leftJoin("users as ru", "ru.id", "m.removed_by_user_id")
    .select("m.*", "p.name as phase_name", "p.sort_order as phase_order", "ru.name as removed_by_name");
}

/** Predecessor ids by milestone, of predecessors the viewer may see. */
async function dependenciesOf(q: Q, milestoneIds: number[], viewer: Viewer): Promise<Map<number, number[]>> {
  const map = new Map<number, number[]>();
  if (milestoneIds.length === 0) return map;
  const rows = await visibleTo(
    q("milestone_dependencies as d").join("milestones as pre", "pre.id", "d.depends_on_id").whereIn("d.milestone_id", milestoneIds),
    "pre.audience",
    viewer,
  )
    .select("d.milestone_id", "d.depends_on_id")
    .orderBy("d.depends_on_id");
  for (const r of rows as Array<{ milestone_id: number; depends_on_id: number }>) {
    const id = Number(r.milestone_id);
    const list = map.get(id);
    if (list) list.push(Number(r.depends_on_id));
    else map.set(id, [Number(r.depends_on_id)]);
  }
  return map;
}

export interface MilestoneFilter {
  audience?: Audience;
  system?: System;
  area?: string;
  /** Milestones removed from the programme: left out (the default: the programme as it stands), included, or only they. */
  removed?: "exclude" | "include" | "only";
}

/** The project's milestones the viewer may see, by phase order, then baseline finish, then id. */
export async function listMilestones(q: Q, projectId: number, viewer: Viewer, filter: MilestoneFilter = {}): Promise<MilestoneRecord[]> {
  const query = visibleTo(milestoneQuery(q).where("m.project_id", projectId), "m.audience", viewer);
  const removed = filter.removed ?? "exclude";
  if (removed === "exclude") query.whereNull("m.removed_at");
  else if (removed === "only") query.whereNotNull("m.removed_at");
  if (filter.audience) query.where("m.audience", filter.audience);
  if (filter.system) query.where("m.system", filter.system);
  if (filter.area !== undefined) query.where("m.area", filter.area);
  const rows = (await query.orderBy([
    { column: "p.sort_order" },
    { column: "m.baseline_finish" },
    { column: "m.id" },
  ])) as Array<Record<string, unknown>>;
  const deps = await dependenciesOf(q, rows.map((r) => Number(r.id)), viewer);
  return rows.map((r) => toMilestone(r, deps.get(Number(r.id)) ?? []));
}

/** The areas named by the project's milestones that the viewer may see, distinct and in order (no empty area). */
export async function listAreas(q: Q, projectId: number, viewer: Viewer): Promise<string[]> {
  const rows = await visibleTo(q("milestones").where({ project_id: projectId }).whereNull("removed_at"), "audience", viewer).whereNot("area", "").distinct("area").orderBy("area");
  return rows.map((r: { area: string }) => r.area);
}

/** One milestone (removed or not), when the viewer may see it; `forUpdate` locks the row for the rest of the transaction. */
export async function findMilestone(q: Q, id: number, viewer: Viewer, opts: { forUpdate?: boolean } = {}): Promise<MilestoneRecord | null> {
  const query = visibleTo(milestoneQuery(q).where("m.id", id), "m.audience", viewer).first();
  if (opts.forUpdate) query.forUpdate();
  const r = (await query) as Record<string, unknown> | undefined;
  if (!r) return null;
  const deps = await dependenciesOf(q, [id], viewer);
  return toMilestone(r, deps.get(id) ?? []);
}

/** The project a milestone belongs to, whoever may see it (the caller's audience is checked after). */
export async function findMilestoneProjectId(q: Q, id: number): Promise<number | null> {
  const r = await q("milestones").where({ id }).first("project_id");
  return r ? Number(r.project_id) : null;
}

export async function insertMilestone(q: Q, projectId: number, fields: MilestoneFields, at: Date): Promise<number> {
  const [id] = await q("milestones").insert({ ...toRow(fields), project_id: projectId, version: 1, created_at: at, updated_at: at });
  return Number(id);
}

/**
 * Optimistic concurrency: the row changes only while it still has `version`, and its
 * version goes up by one. Returns the number of rows changed (0 = someone else won).
 */
export async function updateMilestone(q: Q, id: number, version: number, fields: Partial<MilestoneFields>, at: Date): Promise<number> {
  return q("milestones")
    .where({ id, version })
    .update({ ...toRow(fields), version: version + 1, updated_at: at });
}

export async function deleteMilestone(q: Q, id: number): Promise<void> {
  await q("milestones").where({ id }).delete();
}

/** Takes the milestone out of the programme (or back in, with `removal` null); its version goes up by one. */
export async function setRemoval(q: Q, id: number, version: number, removal: { at: Date; byUserId: number | null; reason: string } | null, at: Date): Promise<number> {
  return q("milestones")
    .where({ id, version })
    .update({
      removed_at: removal?.at ?? null,
      removed_by_user_id: removal?.byUserId ?? null,
      removed_reason: removal?.reason ?? null,
      version: version + 1,
      updated_at: at,
    });
}

/** Numbers of the project's baseline versions whose snapshot holds the milestone. */
export async function baselinesHolding(q: Q, projectId: number, milestoneId: number): Promise<number[]> {
  const rows = (await q("baselines").where({ project_id: projectId }).orderBy("number").select("number", "snapshot")) as Array<{ number: number; snapshot: string }>;
  return rows.filter((r) => (JSON.parse(String(r.snapshot)) as BaselineSnapshotEntry[]).some((e) => e.id === milestoneId)).map((r) => Number(r.number));
}

/** How many events were recorded after the milestone was entered (creation writes its own at `created_at`). */
export async function countEventsSince(q: Q, milestoneId: number, since: Date): Promise<number> {
  const r = await q("milestone_events").where({ milestone_id: milestoneId }).where("at", ">", since).count({ n: "*" }).first();
  return Number(r?.n ?? 0);
}

/** Serialises programme writes of one project (dependency cycles, phase creation, baseline numbers). */
export async function lockProject(q: Q, projectId: number): Promise<void> {
  await q("projects").where({ id: projectId }).forUpdate().first("id");
}

// Phases

/** The id of the project's phase with this name, created (last in order) when there is none. */
export async function findOrCreatePhase(q: Q, projectId: number, name: string): Promise<number> {
  const existing = await q("phases").where({ project_id: projectId, name }).first("id");
  if (existing) return Number(existing.id);
  const max = await q("phases").where({ project_id: projectId }).max({ n: "sort_order" }).first();
  const [id] = await q("phases").insert({ project_id: projectId, name, sort_order: Number(max?.n ?? 0) + 1 });
  return Number(id);
}

// Dependencies

/** Every dependency edge of the project, audience aside: a cycle is a cycle whoever can see it. */
export async function listDependencyEdges(q: Q, projectId: number): Promise<Array<{ from: number; to: number }>> {
  const rows = await q("milestone_dependencies as d")
    .join("milestones as m", "m.id", "d.milestone_id")
    .where("m.project_id", projectId)
    .select("d.depends_on_id", "d.milestone_id");
  return (rows as Array<{ depends_on_id: number; milestone_id: number }>).map((r) => ({ from: Number(r.depends_on_id), to: Number(r.milestone_id) }));
}

export async function replaceDependencies(q: Q, milestoneId: number, dependsOn: readonly number[]): Promise<void> {
  await q("milestone_dependencies").where({ milestone_id: milestoneId }).delete();
  if (dependsOn.length > 0) {
    await q("milestone_dependencies").insert(dependsOn.map((id) => ({ milestone_id: milestoneId, depends_on_id: id })));
  }
}

/** Milestones that depend on this one (`removed`: taken out of the programme, but keeping the link for a restore). */
export async function listDependants(q: Q, milestoneId: number): Promise<Array<{ id: number; name: string; removed: boolean }>> {
  const rows = await q("milestone_dependencies as d")
    .join("milestones as m", "m.id", "d.milestone_id")
    .where("d.depends_on_id", milestoneId)
    .select("m.id", "m.name", "m.removed_at")
    .orderBy("m.id");
  return (rows as Array<{ id: number; name: string; removed_at: Date | null }>).map((r) => ({ id: Number(r.id), name: String(r.name), removed: r.removed_at !== null }));
}

// Events

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

function eventQuery(q: Q) {
  return q("milestone_events as e")
    .join("milestones as m", "m.id", "e.milestone_id")
    .leftJoin("users as u", "u.id", "e.by_user_id")
    .select("e.*", "m.name as milestone_name", "u.name as by_name")
    .orderBy([
      { column: "e.at", order: "desc" },
      { column: "e.id", order: "desc" },
    ]);
}

function toEvent(r: Record<string, unknown>): MilestoneEventRow {
  return {
    id: Number(r.id),
    milestoneId: Number(r.milestone_id),
    milestoneName: String(r.milestone_name),
    field: r.field as MilestoneEventFieldName,
    from: (r.from_value as string | null) ?? null,
    to: (r.to_value as string | null) ?? null,
    at: (r.at as Date).toISOString(),
    by: (r.by_name as string | null) ?? null,
    note: (r.note as string | null) ?? null,
    baselineVersion: r.baseline_version === null || r.baseline_version === undefined ? null : Number(r.baseline_version),
  };
}

/** A milestone's history, newest first (the caller has already been shown the milestone). */
export async function listMilestoneEvents(q: Q, milestoneId: number): Promise<MilestoneEventRow[]> {
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
): Promise<MilestoneEventRow[]> {
  const query = visibleTo(eventQuery(q).where("e.project_id", projectId), "m.audience", viewer);
  if (opts.from) query.where("e.at", ">=", opts.from);
  if (opts.before) query.where("e.at", "<", opts.before);
  if (opts.fields) query.whereIn("e.field", opts.fields as MilestoneEventFieldName[]);
  return ((await query) as Array<Record<string, unknown>>).map(toEvent);
}

// Baselines

/** One milestone's plan as a baseline version recorded it. */
export interface BaselineSnapshotEntry {
  id: number;
  name: string;
  audience: Audience;
  plannedStart: string | null;
  baselineFinish: string;
  weight: number;
  budget: number | null;
}

/** The snapshot entries the viewer may see (the audience the milestone had when the version was taken). */
export function visibleSnapshotEntries(entries: readonly BaselineSnapshotEntry[], viewer: Viewer): BaselineSnapshotEntry[] {
  const allowed = audiencesFor(viewer);
  return entries.filter((e) => allowed.includes(e.audience));
}

export async function maxBaselineNumber(q: Q, projectId: number): Promise<number> {
  const r = await q("baselines").where({ project_id: projectId }).max({ n: "number" }).first();
  return Number(r?.n ?? 0);
}

export async function insertBaseline(
  q: Q,
  b: { projectId: number; number: number; reason: string; byUserId: number | null; at: Date; snapshot: BaselineSnapshotEntry[] },
): Promise<void> {
  await q("baselines").insert({
    project_id: b.projectId,
    number: b.number,
    reason: b.reason,
    by_user_id: b.byUserId,
    at: b.at,
    snapshot: JSON.stringify(b.snapshot),
  });
}

function baselineQuery(q: Q, projectId: number) {
  return q("baselines as b")
    .leftJoin("users as u", "u.id", "b.by_user_id")
    .where("b.project_id", projectId)
    .select("b.*", "u.name as by_name");
}

function toBaseline(r: Record<string, unknown>, viewer: Viewer): BaselineVersion & { milestones: BaselineSnapshotEntry[] } {
  const entries = visibleSnapshotEntries(JSON.parse(String(r.snapshot)) as BaselineSnapshotEntry[], viewer);
  return {
    number: Number(r.number),
    reason: String(r.reason),
    by: (r.by_name as string | null) ?? null,
    at: (r.at as Date).toISOString(),
    milestoneCount: entries.length,
    milestones: entries,
  };
}

/** The project's baseline versions, oldest first, each counting the milestones the viewer may see. */
export async function listBaselines(q: Q, projectId: number, viewer: Viewer): Promise<BaselineVersion[]> {
  const rows = (await baselineQuery(q, projectId).orderBy("b.number")) as Array<Record<string, unknown>>;
  return rows.map((r) => {
    const { milestones: _omitted, ...version } = toBaseline(r, viewer);
    return version;
  });
}

export async function findBaseline(q: Q, projectId: number, number: number, viewer: Viewer) {
  const r = (await baselineQuery(q, projectId).where("b.number", number).first()) as Record<string, unknown> | undefined;
  return r ? toBaseline(r, viewer) : null;
}

// Cost actuals

export interface CostActualRecord {
  periodEnd: string;
  amount: number;
}

export async function listCostActuals(q: Q, projectId: number): Promise<CostActualRecord[]> {
  const rows = await q("cost_actuals").where({ project_id: projectId }).orderBy("period_end").select("period_end", "amount");
  return (rows as Array<{ period_end: string; amount: number | string }>).map((r) => ({ periodEnd: String(r.period_end), amount: Number(r.amount) }));
}

/** One amount per period end: posting a period again replaces its amount. */
export async function upsertCostActual(q: Q, projectId: number, c: { periodEnd: string; amount: number; byUserId: number | null; at: Date }): Promise<void> {
  await q("cost_actuals")
    .insert({ project_id: projectId, period_end: c.periodEnd, amount: c.amount, by_user_id: c.byUserId, updated_at: c.at })
    .onConflict(["project_id", "period_end"])
    .merge(["amount", "by_user_id", "updated_at"]);
}
