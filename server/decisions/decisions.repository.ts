import type { Knex } from "knex";
import type { DecisionStatus } from "#shared/schemas/decisions.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { replaceChildRows } from "../core/child-rows.ts";
import { columnsOf, firstRow, instant, json, num, numOrNull, oneOf, projectIdOf, readRow, text, textOrNull, updateVersioned, type Row } from "../db/rows.ts";

export type Q = Knex | Knex.Transaction;

/**
 * Decisions needed as stored: the request (options kept whole as JSON with it), its outcome or
 * withdrawal, and its links to milestones, risks and documents. Every read that serves a caller
 * takes the audiences that caller may see and filters in the query (`visibleTo`), in that one place.
 */

export interface DecisionOption {
  label: string;
  consequence: string;
  cost: number | null;
}

/** The written fields of a request (links in their own tables). */
export interface DecisionFields {
  title: string;
  question: string;
  background: string;
  options: DecisionOption[];
  recommendedOption: number | null;
  recommendation: string;
  decider: string;
  neededBy: string;
  audience: RecordAudience;
}

export interface DecisionLinks {
  linkedMilestones: number[];
  linkedRisks: number[];
  documentIds: number[];
}

/** The outcome of a decided request, or why it was withdrawn. */
export interface DecisionClose {
  status: DecisionStatus;
  chosenOption: number | null;
  outcome: string | null;
  decidedBy: string | null;
  decidedOn: string | null;
  outcomeRecordedBy: number | null;
  withdrawnReason: string | null;
}

export interface DecisionRecord extends DecisionFields, DecisionLinks, DecisionClose {
  id: number;
  projectId: number;
  number: number;
  version: number;
  createdAt: string;
  updatedAt: string;
}

const LINKS = {
  linkedMilestones: { table: "decision_milestones", column: "milestone_id" },
  linkedRisks: { table: "decision_risks", column: "risk_id" },
  documentIds: { table: "decision_documents", column: "document_id" },
} as const;

const readDecision = readRow<Omit<DecisionRecord, keyof DecisionLinks>>({
  id: num(), projectId: num(), number: num(), title: text(), question: text(), background: text(), options: json<DecisionOption[]>([]), recommendedOption: numOrNull(),
  recommendation: text(), decider: text(), neededBy: text(), audience: oneOf<RecordAudience>(), status: oneOf<DecisionStatus>(), chosenOption: numOrNull(),
  outcome: textOrNull(), decidedBy: textOrNull(), decidedOn: textOrNull(), outcomeRecordedBy: numOrNull(), withdrawnReason: textOrNull(), version: num(),
  createdAt: instant(), updatedAt: instant(),
});
const toDecision = (r: Row, links: DecisionLinks): DecisionRecord => ({ ...readDecision(r), ...links });

const DECISION_KEYS = ["title", "question", "background", "recommendedOption", "recommendation", "decider", "neededBy", "audience", "status", "chosenOption", "outcome", "decidedBy", "decidedOn", "outcomeRecordedBy", "withdrawnReason"] as const;

function decisionRow(f: Partial<DecisionFields & DecisionClose>): Record<string, unknown> {
  return { ...columnsOf(f, DECISION_KEYS), ...(f.options === undefined ? {} : { options: JSON.stringify(f.options) }) };
}

/** The one audience filter of the decisions' reads. */
const visibleTo = <T extends Knex.QueryBuilder>(query: T, audiences: readonly RecordAudience[]): T => query.whereIn("audience", [...audiences]) as T;

async function decisionsFrom(q: Q, rows: Array<Record<string, unknown>>): Promise<DecisionRecord[]> {
  const ids = rows.map((r) => Number(r.id));
  const links = new Map<number, DecisionLinks>(ids.map((id) => [id, { linkedMilestones: [], linkedRisks: [], documentIds: [] }]));
  if (ids.length > 0) {
    for (const [key, { table, column }] of Object.entries(LINKS) as Array<[keyof DecisionLinks, { table: string; column: string }]>) {
      const found = (await q(table).whereIn("decision_id", ids).select("decision_id", column).orderBy(column)) as Array<Record<string, unknown>>;
      for (const r of found) links.get(Number(r.decision_id))![key].push(Number(r[column]));
    }
  }
  return rows.map((r) => toDecision(r, links.get(Number(r.id))!));
}

/** A project's decisions of these audiences, by number. */
export async function listDecisions(q: Q, projectId: number, audiences: readonly RecordAudience[]): Promise<DecisionRecord[]> {
  return decisionsFrom(q, (await visibleTo(q("decisions").where({ project_id: projectId }), audiences).orderBy("number")) as Array<Record<string, unknown>>);
}

/** One decision when it is of these audiences; `forUpdate` locks its row for the rest of the transaction. */
export async function findDecision(q: Q, id: number, audiences: readonly RecordAudience[], opts: { forUpdate?: boolean } = {}): Promise<DecisionRecord | null> {
  const r = await firstRow(visibleTo(q("decisions").where({ id }), audiences), opts);
  return r ? (await decisionsFrom(q, [r]))[0]! : null;
}

export const findDecisionProjectId = (q: Q, id: number) => projectIdOf(q, "decisions", id);

/** The decisions (any audience) that link a risk, by number: what keeps the risk on record. */
export async function listDecisionsLinkingRisk(q: Q, riskId: number): Promise<Array<{ id: number; number: number; title: string }>> {
  const rows = (await q("decisions as d").join("decision_risks as l", "l.decision_id", "d.id").where("l.risk_id", riskId).orderBy("d.number").select("d.id", "d.number", "d.title")) as Array<Record<string, unknown>>;
  return rows.map((r) => ({ id: Number(r.id), number: Number(r.number), title: String(r.title) }));
}

export async function nextDecisionNumber(q: Q, projectId: number): Promise<number> {
  const r = (await q("decisions").where({ project_id: projectId }).max({ n: "number" }).first()) as { n: number | null } | undefined;
  return Number(r?.n ?? 0) + 1;
}

export async function insertDecision(q: Q, d: DecisionFields & { projectId: number; number: number }, at: Date): Promise<number> {
  const [id] = await q("decisions").insert({ ...decisionRow(d), project_id: d.projectId, number: d.number, status: "open", version: 1, created_at: at, updated_at: at });
  return Number(id);
}

/** Optimistic concurrency: changes the row only while it still has `version` (0 = someone else saved first). */
export const updateDecision = (q: Q, id: number, version: number, fields: Partial<DecisionFields & DecisionClose>, at: Date) => updateVersioned(q, "decisions", id, version, decisionRow(fields), at);

export async function replaceDecisionLinks(q: Q, decisionId: number, links: Partial<DecisionLinks>): Promise<void> {
  for (const [key, { table, column }] of Object.entries(LINKS) as Array<[keyof DecisionLinks, { table: string; column: string }]>) {
    const ids = links[key];
    if (ids === undefined) continue;
    await replaceChildRows(q, table, { decision_id: decisionId }, [column], ids.map((id) => ({ decision_id: decisionId, [column]: id })));
  }
}
