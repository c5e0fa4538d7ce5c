import type { Knex } from "knex";
import type { BudgetChangeStatus } from "#shared/schemas/budget.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { replaceChildRows } from "../core/child-rows.ts";
import { insertRecordEvents, listRecordEvents, type NewRecordEvent } from "../core/record-events.ts";
import { bool, firstRow, instant, num, oneOf, projectIdOf, readRow, text, textOrNull, updateVersioned, type Row } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

/**
 * The budget's stored record: the project's register of budget changes (with the milestones and
 * risks each names) and the budget's events (a change's every write, and the project's budget
 * settings with no change). Money is integer minor units; BIGINT columns come back as strings
 * from the driver and are read as numbers here.
 */

/** The written fields of a change, as its columns (and link tables) hold them. */
export interface ChangeFields {
  description: string;
  detail: string;
  amount: number;
  status: BudgetChangeStatus;
  approvedBy: string | null;
  approvedOn: string | null;
  drawsOnContingency: boolean;
  audience: RecordAudience;
}

export interface ChangeRecord extends ChangeFields {
  id: number;
  projectId: number;
  number: number;
  linkedMilestones: number[];
  linkedRisks: number[];
  version: number;
  updatedAt: string;
}

const COLUMNS: Record<keyof ChangeFields, string> = {
  description: "description",
  detail: "detail",
  amount: "amount",
  status: "status",
  approvedBy: "approved_by",
  approvedOn: "approved_on",
  drawsOnContingency: "draws_on_contingency",
  audience: "audience",
};

export const CHANGE_FIELD_KEYS = Object.keys(COLUMNS) as Array<keyof ChangeFields>;

/**
 * The audience rule of budget changes, in one place: a reader sees the changes of the audiences
 * their record reader names (src/shared/domain/record-audience.ts: investors the investor ones,
 * leads and admins all; marketing reads no money and is refused before it gets here).
 */
function visibleTo<T extends Knex.QueryBuilder>(query: T, audiences: readonly RecordAudience[]): T {
  return query.whereIn("c.audience", [...audiences]) as T;
}

const readChange = readRow<Omit<ChangeRecord, "linkedMilestones" | "linkedRisks">>({
  id: num(), projectId: num(), number: num(), description: text(), detail: text(), amount: num(), status: oneOf<BudgetChangeStatus>(), approvedBy: textOrNull(),
  approvedOn: textOrNull(), drawsOnContingency: bool(), audience: oneOf<RecordAudience>(), version: num(), updatedAt: instant(),
});
const toChange = (r: Row, links: { milestones: number[]; risks: number[] }): ChangeRecord => ({ ...readChange(r), linkedMilestones: links.milestones, linkedRisks: links.risks });

/** Pairs (change id, linked id) of a link table, grouped by change, linked ids ascending. */
async function linksOf(q: Q, table: "budget_change_milestones" | "budget_change_risks", column: "milestone_id" | "risk_id", changeIds: readonly number[]): Promise<Map<number, number[]>> {
  const map = new Map<number, number[]>();
  if (changeIds.length === 0) return map;
  const rows = (await q(table).whereIn("change_id", [...changeIds]).select("change_id", column).orderBy(column)) as Array<Record<string, unknown>>;
  for (const r of rows) {
    const id = Number(r.change_id);
    map.set(id, [...(map.get(id) ?? []), Number(r[column])]);
  }
  return map;
}

async function withLinks(q: Q, rows: Array<Record<string, unknown>>): Promise<ChangeRecord[]> {
  const ids = rows.map((r) => Number(r.id));
  const [milestones, risks] = await Promise.all([linksOf(q, "budget_change_milestones", "milestone_id", ids), linksOf(q, "budget_change_risks", "risk_id", ids)]);
  return rows.map((r) => toChange(r, { milestones: milestones.get(Number(r.id)) ?? [], risks: risks.get(Number(r.id)) ?? [] }));
}

/** A project's changes the viewer may see, by number; `status` narrows them. */
export async function listChanges(q: Q, projectId: number, audiences: readonly RecordAudience[], filter: { status?: BudgetChangeStatus } = {}): Promise<ChangeRecord[]> {
  const query = visibleTo(q("budget_changes as c").where("c.project_id", projectId), audiences);
  if (filter.status) query.where("c.status", filter.status);
  return withLinks(q, (await query.orderBy("c.number").select("c.*")) as Array<Record<string, unknown>>);
}

/** One change when the viewer may see it; `forUpdate` locks its row for the rest of the transaction. */
export async function findChange(q: Q, id: number, audiences: readonly RecordAudience[], opts: { forUpdate?: boolean } = {}): Promise<ChangeRecord | null> {
  const r = await firstRow(visibleTo(q("budget_changes as c").where("c.id", id), audiences).select("c.*"), opts);
  return r ? (await withLinks(q, [r]))[0]! : null;
}

/** The project a change belongs to, whoever may see it (the caller's audience is checked after). */
export const findChangeProjectId = (q: Q, id: number) => projectIdOf(q, "budget_changes", id);

function rowOf(fields: Partial<ChangeFields>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const key of CHANGE_FIELD_KEYS) if (fields[key] !== undefined) row[COLUMNS[key]] = fields[key];
  return row;
}

/** A new change, numbered next in its project (the caller holds the project's lock). */
export async function insertChange(q: Q, projectId: number, fields: ChangeFields, at: Date): Promise<{ id: number; number: number }> {
  const max = await q("budget_changes").where({ project_id: projectId }).max({ n: "number" }).first();
  const number = Number(max?.n ?? 0) + 1;
  const [id] = await q("budget_changes").insert({ ...rowOf(fields), project_id: projectId, number, version: 1, created_at: at, updated_at: at });
  return { id: Number(id), number };
}

/** Optimistic concurrency: 0 = someone else saved first. */
export const updateChange = (q: Q, id: number, version: number, fields: Partial<ChangeFields>, at: Date) => updateVersioned(q, "budget_changes", id, version, rowOf(fields), at);

export async function deleteChange(q: Q, id: number): Promise<void> {
  await q("budget_changes").where({ id }).delete();
}

export async function replaceChangeLinks(q: Q, changeId: number, links: { milestones?: readonly number[]; risks?: readonly number[] }): Promise<void> {
  if (links.milestones) await replaceChildRows(q, "budget_change_milestones", { change_id: changeId }, ["milestone_id"], links.milestones.map((id) => ({ change_id: changeId, milestone_id: id })));
  if (links.risks) await replaceChildRows(q, "budget_change_risks", { change_id: changeId }, ["risk_id"], links.risks.map((id) => ({ change_id: changeId, risk_id: id })));
}

/** The numbers of the changes that name a risk (any audience), ascending. */
export async function listChangeNumbersLinkingRisk(q: Q, riskId: number): Promise<number[]> {
  const rows = (await q("budget_change_risks as l").join("budget_changes as c", "c.id", "l.change_id").where("l.risk_id", riskId).orderBy("c.number").select("c.number")) as Array<{ number: number }>;
  return rows.map((r) => Number(r.number));
}

// ---------------------------------------------------------------------------------------------
// Events
// ---------------------------------------------------------------------------------------------

// The rows have the record's one event shape (server/core/record-events.ts); the subject is the
// change, which the budget calls `changeId`.

export interface NewBudgetEvent extends Omit<NewRecordEvent<number | null>, "subjectId"> {
  /** Null: an event of the project's budget settings. */
  changeId: number | null;
}

export interface BudgetEventRecord extends Omit<NewBudgetEvent, "at"> {
  id: number;
  at: string;
}

export const insertBudgetEvents = (q: Q, events: readonly NewBudgetEvent[]) =>
  insertRecordEvents(
    q,
    "budget_events",
    "change_id",
    events.map(({ changeId, ...e }) => ({ ...e, subjectId: changeId })),
  );

/**
 * Changes of the audiences given whose status became approved in [from, before) and that are
 * approved still, with the instant of that approval: what a digest reports as approved.
 */
export async function listChangesApprovedIn(q: Q, projectId: number, audiences: readonly RecordAudience[], range: { from: Date; before: Date }): Promise<Array<ChangeRecord & { approvedAt: string }>> {
  const approvals = (await q("budget_events")
    .where({ project_id: projectId, field: "status", to_value: "approved" })
    .whereNotNull("change_id")
    .where("at", ">=", range.from)
    .where("at", "<", range.before)
    .groupBy("change_id")
    .select("change_id", q.raw("MAX(at) as at"))) as Array<{ change_id: number; at: Date }>;
  if (approvals.length === 0) return [];
  const at = new Map(approvals.map((a) => [Number(a.change_id), new Date(a.at).toISOString()]));
  const rows = (await visibleTo(q("budget_changes as c").where({ "c.project_id": projectId, "c.status": "approved" }), audiences)
    .whereIn("c.id", [...at.keys()])
    .orderBy("c.number")
    .select("c.*")) as Array<Record<string, unknown>>;
  return (await withLinks(q, rows)).map((c) => ({ ...c, approvedAt: at.get(c.id)! }));
}

/** A change's events, newest first. */
export async function listChangeEvents(q: Q, changeId: number): Promise<BudgetEventRecord[]> {
  return (await listRecordEvents(q, "budget_events", "change_id", changeId)).map(({ subjectId, ...e }) => ({ ...e, changeId: subjectId }));
}
