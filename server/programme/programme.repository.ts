import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import { MILESTONE_FIELD_NAMES, MILESTONE_FIELDS, milestoneColumn, type MilestoneFieldKind, type MilestoneFieldName, type MilestoneFieldValues, type System } from "#shared/schemas/programme.ts";
import { audiencesFor, type Viewer } from "#shared/domain/audience.ts";
import { firstRow, projectIdOf, updateVersioned } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

export type { Viewer };

/**
 * The audience rule of the programme, in one place: visitors see public milestones,
 * investors public and investor ones, staff all (`audiencesFor`, the same audiences as
 * published content, without its status). Every read path of the programme's repositories applies it, in SQL through
 * `visibleTo` or, for baseline snapshots kept as JSON, through `visibleSnapshotEntries`.
 */
export function visibleTo<T extends Knex.QueryBuilder>(query: T, column: string, viewer: Viewer): T {
  return query.whereIn(column, audiencesFor(viewer) as Audience[]) as T;
}

// Milestones

/** The stored fields of a milestone a write may set (camelCase; the phase by id, dependencies in their own table). */
export type MilestoneFields = Omit<MilestoneFieldValues, "phase" | "dependsOn"> & { phaseId: number };

export interface MilestoneRecord extends MilestoneFields {
  id: number;
  projectId: number;
  phase: string;
  phaseOrder: number;
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
  /** Who removed it (the users module names them); null when no one signed in did. */
  byUserId: number | null;
  reason: string;
}

/** The written fields stored in a column of `milestones` of the same name (the phase is stored by id; dependencies have their own table). */
const STORED_FIELDS = MILESTONE_FIELD_NAMES.filter((f): f is Exclude<MilestoneFieldName, "phase" | "dependsOn"> => f !== "phase" && f !== "dependsOn");

/** Field → column, derived from the one field list in the programme's schema. */
const COLUMN = Object.fromEntries([["phaseId", "phase_id"], ...STORED_FIELDS.map((f) => [f, milestoneColumn(f)])]) as Record<keyof MilestoneFields, string>;

/** The keys of `MilestoneFields`, in the order a write lists them. */
export const MILESTONE_FIELD_KEYS = Object.keys(COLUMN) as Array<keyof MilestoneFields>;

function toRow(fields: Partial<MilestoneFields>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [key, column] of Object.entries(COLUMN) as Array<[keyof MilestoneFields, string]>) {
    if (fields[key] !== undefined) row[column] = fields[key];
  }
  return row;
}

const dateOrNull = (v: unknown): string | null => (v === null || v === undefined ? null : String(v));

/** A stored value as its field's kind reads it. */
function fromColumn(kind: MilestoneFieldKind, v: unknown): unknown {
  switch (kind) {
    case "line":
    case "text":
      return String(v ?? "");
    case "code":
      return String(v);
    case "number":
      return Number(v);
    case "optional-number":
      return v === null || v === undefined ? null : Number(v);
    case "optional-date":
      return dateOrNull(v);
    case "ids":
      return v;
  }
}

function toMilestone(r: Record<string, unknown>, dependsOn: number[]): MilestoneRecord {
  const stored = Object.fromEntries(STORED_FIELDS.map((f) => [f, fromColumn(MILESTONE_FIELDS[f].kind, r[milestoneColumn(f)])])) as Omit<MilestoneFields, "phaseId">;
  return {
    id: Number(r.id),
    projectId: Number(r.project_id),
    phaseId: Number(r.phase_id),
    phase: String(r.phase_name),
    phaseOrder: Number(r.phase_order),
    ...stored,
    dependsOn,
    version: Number(r.version),
    createdAt: r.created_at as Date,
    updatedAt: r.updated_at as Date,
    removal: r.removed_at ? { at: r.removed_at as Date, byUserId: r.removed_by_user_id == null ? null : Number(r.removed_by_user_id), reason: String(r.removed_reason ?? "") } : null,
  };
}

function milestoneQuery(q: Q) {
  return q("milestones as m").join("phases as p", "p.id", "m.phase_id").select("m.*", "p.name as phase_name", "p.sort_order as phase_order");
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

/**
 * Every area the project's milestones name, whatever their audience and removed or not, distinct
 * (no empty area): the names a member of staff may tag a photo with.
 */
export async function listAllAreas(q: Q, projectId: number): Promise<string[]> {
  const rows = (await q("milestones").where({ project_id: projectId }).whereNot("area", "").distinct("area as v")) as Array<{ v: string }>;
  return rows.map((r) => r.v);
}

/** Every milestone of the project by id and name, whatever its audience and removed or not, by baseline finish then id. */
export async function listMilestoneNames(q: Q, projectId: number): Promise<Array<{ id: number; name: string }>> {
  const rows = (await q("milestones").where({ project_id: projectId }).orderBy([{ column: "baseline_finish" }, { column: "id" }]).select("id", "name")) as Array<{ id: number; name: string }>;
  return rows.map((r) => ({ id: Number(r.id), name: String(r.name) }));
}

/** Which of these ids are milestones of the project (removed or not). */
export async function existingMilestoneIds(q: Q, projectId: number, ids: readonly number[]): Promise<Set<number>> {
  if (ids.length === 0) return new Set();
  const rows = (await q("milestones").where({ project_id: projectId }).whereIn("id", [...ids]).select("id")) as Array<{ id: number }>;
  return new Set(rows.map((r) => Number(r.id)));
}

/** One milestone (removed or not), when the viewer may see it; `forUpdate` locks the row for the rest of the transaction. */
export async function findMilestone(q: Q, id: number, viewer: Viewer, opts: { forUpdate?: boolean } = {}): Promise<MilestoneRecord | null> {
  const r = await firstRow(visibleTo(milestoneQuery(q).where("m.id", id), "m.audience", viewer), opts);
  if (!r) return null;
  const deps = await dependenciesOf(q, [id], viewer);
  return toMilestone(r, deps.get(id) ?? []);
}

/** The project a milestone belongs to, whoever may see it (the caller's audience is checked after). */
export const findMilestoneProjectId = (q: Q, id: number) => projectIdOf(q, "milestones", id);

export async function insertMilestone(q: Q, projectId: number, fields: MilestoneFields, at: Date): Promise<number> {
  const [id] = await q("milestones").insert({ ...toRow(fields), project_id: projectId, version: 1, created_at: at, updated_at: at });
  return Number(id);
}

/**
 * Optimistic concurrency: the row changes only while it still has `version`, and its
 * version goes up by one. Returns the number of rows changed (0 = someone else won).
 */
export const updateMilestone = (q: Q, id: number, version: number, fields: Partial<MilestoneFields>, at: Date) => updateVersioned(q, "milestones", id, version, toRow(fields), at);

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

