import type { Knex } from "knex";
import type { ActionStatus, CostExposure, RecordAudience, RiskCategory, RiskKind, RiskStatus } from "#shared/schemas/risks.ts";
import { replaceChildRows } from "../core/child-rows.ts";
import { columnsOf, firstRow, instant, num, numOrNull, oneOf, projectIdOf, readRow, text, textOrNull, updateVersioned, type Row } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

/**
 * The risks and issues register as stored: risks and issues (one table, by kind, numbered per
 * kind within a project), their links to milestones, capacity blocks and plant systems, and their
 * mitigation actions. Every read that serves a caller takes the audiences that caller may see and
 * filters in the query (`visibleTo`), in that one place.
 */

/** The written fields of a risk or issue, as its columns hold them (links in their own tables). */
export interface RiskFields {
  title: string;
  description: string;
  cause: string;
  effect: string;
  category: RiskCategory;
  ownerId: number;
  likelihood: number;
  impact: number;
  costExposure: CostExposure | null;
  scheduleDays: number | null;
  status: RiskStatus;
  audience: RecordAudience;
  impactNow: string;
  action: string;
  dueDate: string | null;
}

export interface RiskLinks {
  linkedMilestones: number[];
  linkedBlocks: number[];
  linkedSystems: number[];
}

export interface RiskRecord extends RiskFields, RiskLinks {
  id: number;
  projectId: number;
  kind: RiskKind;
  number: number;
  fromRiskId: number | null;
  version: number;
  createdAt: string;
  updatedAt: string;
}

const LINKS = {
  linkedMilestones: { table: "risk_milestones", column: "milestone_id" },
  linkedBlocks: { table: "risk_blocks", column: "block_id" },
  linkedSystems: { table: "risk_systems", column: "system_id" },
} as const;

/** A risk's cost exposure is stored only with its most likely cost. */
const toCostExposure = (r: Row): RiskRecord["costExposure"] =>
  r.cost_most_likely == null ? null : { min: Number(r.cost_min), mostLikely: Number(r.cost_most_likely), max: Number(r.cost_max), probability: Number(r.probability) };

const readRisk = readRow<Omit<RiskRecord, keyof RiskLinks>>({
  id: num(), projectId: num(), kind: oneOf<RiskKind>(), number: num(), title: text(), description: text(), cause: text(), effect: text(), category: oneOf<RiskCategory>(),
  ownerId: num(), likelihood: num(), impact: num(), costExposure: toCostExposure, scheduleDays: numOrNull(), status: oneOf<RiskStatus>(), audience: oneOf<RecordAudience>(),
  impactNow: text(), action: text(), dueDate: textOrNull(), fromRiskId: numOrNull(), version: num(), createdAt: instant(), updatedAt: instant(),
});
const toRisk = (r: Row, links: RiskLinks): RiskRecord => ({ ...readRisk(r), ...links });

const RISK_KEYS = ["title", "description", "cause", "effect", "category", "ownerId", "likelihood", "impact", "scheduleDays", "status", "audience", "impactNow", "action", "dueDate"] as const;

function riskRow(f: Partial<RiskFields>): Record<string, unknown> {
  const c = f.costExposure;
  const cost = c === undefined ? {} : { cost_min: c?.min ?? null, cost_most_likely: c?.mostLikely ?? null, cost_max: c?.max ?? null, probability: c?.probability ?? null };
  return { ...columnsOf(f, RISK_KEYS), ...cost };
}

/** The one audience filter of the register's reads. */
const visibleTo = <T extends Knex.QueryBuilder>(query: T, audiences: readonly RecordAudience[]): T => query.whereIn("audience", [...audiences]) as T;

async function linksOf(q: Q, ids: readonly number[]): Promise<Map<number, RiskLinks>> {
  const map = new Map<number, RiskLinks>(ids.map((id) => [id, { linkedMilestones: [], linkedBlocks: [], linkedSystems: [] }]));
  if (ids.length === 0) return map;
  for (const [key, { table, column }] of Object.entries(LINKS) as Array<[keyof RiskLinks, { table: string; column: string }]>) {
    const rows = (await q(table).whereIn("risk_id", [...ids]).select("risk_id", column).orderBy(column)) as Array<Record<string, unknown>>;
    for (const r of rows) map.get(Number(r.risk_id))![key].push(Number(r[column]));
  }
  return map;
}

async function risksFrom(q: Q, rows: Array<Record<string, unknown>>): Promise<RiskRecord[]> {
  const links = await linksOf(q, rows.map((r) => Number(r.id)));
  return rows.map((r) => toRisk(r, links.get(Number(r.id))!));
}

/** A project's risks and issues of these audiences, risks first, each kind by number. */
export async function listRisks(q: Q, projectId: number, audiences: readonly RecordAudience[]): Promise<RiskRecord[]> {
  const query = visibleTo(q("risks").where({ project_id: projectId }), audiences).orderBy([{ column: "kind", order: "desc" }, { column: "number" }]);
  return risksFrom(q, (await query) as Array<Record<string, unknown>>);
}

/** One risk or issue when it is of these audiences; `forUpdate` locks its row for the rest of the transaction. */
export async function findRisk(q: Q, id: number, audiences: readonly RecordAudience[], opts: { forUpdate?: boolean } = {}): Promise<RiskRecord | null> {
  const r = await firstRow(visibleTo(q("risks").where({ id }), audiences), opts);
  return r ? (await risksFrom(q, [r]))[0]! : null;
}

/** The project a risk belongs to (any audience), or null. */
export const findRiskProjectId = (q: Q, id: number) => projectIdOf(q, "risks", id);

/** Risks and issues of the project among these ids, of these audiences (for other records' links). */
export async function findRisksOfProject(q: Q, projectId: number, ids: readonly number[], audiences: readonly RecordAudience[]): Promise<RiskRecord[]> {
  if (ids.length === 0) return [];
  const query = visibleTo(q("risks").where({ project_id: projectId }).whereIn("id", [...ids]), audiences).orderBy([{ column: "kind", order: "desc" }, { column: "number" }]);
  return risksFrom(q, (await query) as Array<Record<string, unknown>>);
}

/** The issues opened from these risks, by risk id. */
export async function findIssuesFrom(q: Q, riskIds: readonly number[]): Promise<Map<number, { id: number; number: number; audience: RecordAudience }>> {
  if (riskIds.length === 0) return new Map();
  const rows = (await q("risks").whereIn("from_risk_id", [...riskIds]).select("id", "number", "audience", "from_risk_id")) as Array<Record<string, unknown>>;
  return new Map(rows.map((r) => [Number(r.from_risk_id), { id: Number(r.id), number: Number(r.number), audience: r.audience as RecordAudience }]));
}

/** The next number of a kind within the project (the caller holds the project's write lock). */
export async function nextRiskNumber(q: Q, projectId: number, kind: RiskKind): Promise<number> {
  const r = (await q("risks").where({ project_id: projectId, kind }).max({ n: "number" }).first()) as { n: number | null } | undefined;
  return Number(r?.n ?? 0) + 1;
}

export async function insertRisk(q: Q, r: RiskFields & { projectId: number; kind: RiskKind; number: number; fromRiskId: number | null }, at: Date): Promise<number> {
  const [id] = await q("risks").insert({ ...riskRow(r), project_id: r.projectId, kind: r.kind, number: r.number, from_risk_id: r.fromRiskId, version: 1, created_at: at, updated_at: at });
  return Number(id);
}

/** Optimistic concurrency: changes the row only while it still has `version` (0 = someone else saved first). */
export const updateRisk = (q: Q, id: number, version: number, fields: Partial<RiskFields>, at: Date) => updateVersioned(q, "risks", id, version, riskRow(fields), at);

export async function replaceRiskLinks(q: Q, riskId: number, links: Partial<RiskLinks>): Promise<void> {
  for (const [key, { table, column }] of Object.entries(LINKS) as Array<[keyof RiskLinks, { table: string; column: string }]>) {
    const ids = links[key];
    if (ids === undefined) continue;
    await replaceChildRows(q, table, { risk_id: riskId }, [column], ids.map((id) => ({ risk_id: riskId, [column]: id })));
  }
}

export async function deleteRisk(q: Q, id: number): Promise<void> {
  await q("risks").where({ id }).delete();
}

// ---------------------------------------------------------------------------------------------
// Mitigation actions
// ---------------------------------------------------------------------------------------------

export interface MitigationFields {
  description: string;
  ownerId: number;
  dueDate: string | null;
  status: ActionStatus;
}

export interface MitigationRecord extends MitigationFields {
  id: number;
  riskId: number;
  version: number;
}

const toMitigation = readRow<MitigationRecord>({ id: num(), riskId: num(), description: text(), ownerId: num(), dueDate: textOrNull(), status: oneOf<ActionStatus>(), version: num() });

const mitigationRow = (f: Partial<MitigationFields>) => columnsOf(f, ["description", "ownerId", "dueDate", "status"]);

/** The mitigation actions of these risks, each risk's in the order they were entered. */
export async function listMitigations(q: Q, riskIds: readonly number[]): Promise<MitigationRecord[]> {
  if (riskIds.length === 0) return [];
  return ((await q("risk_mitigations").whereIn("risk_id", [...riskIds]).orderBy([{ column: "sort_order" }, { column: "id" }])) as Array<Record<string, unknown>>).map(toMitigation);
}

export async function findMitigation(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<MitigationRecord | null> {
  const r = await firstRow(q("risk_mitigations").where({ id }), opts);
  return r ? toMitigation(r) : null;
}

export async function insertMitigation(q: Q, riskId: number, f: MitigationFields, at: Date): Promise<number> {
  const r = (await q("risk_mitigations").where({ risk_id: riskId }).max({ n: "sort_order" }).first()) as { n: number | null } | undefined;
  const [id] = await q("risk_mitigations").insert({ ...mitigationRow(f), risk_id: riskId, sort_order: Number(r?.n ?? 0) + 1, version: 1, created_at: at, updated_at: at });
  return Number(id);
}

export const updateMitigation = (q: Q, id: number, version: number, fields: Partial<MitigationFields>, at: Date) => updateVersioned(q, "risk_mitigations", id, version, mitigationRow(fields), at);

export async function deleteMitigation(q: Q, id: number): Promise<void> {
  await q("risk_mitigations").where({ id }).delete();
}
