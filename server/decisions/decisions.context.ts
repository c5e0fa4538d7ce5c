import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";
import type { RecordAudience } from "#shared/schemas/risks.ts";
import { recordReaderOf, type RecordReader } from "#shared/domain/record-audience.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { AppError, notFound } from "../core/app-error.ts";
import { invalidFields } from "../core/field-changes.ts";
import { recordWriter } from "../core/record-write.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { RisksService } from "../risks/risks.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import { insertDecisionEvents, type NewDecisionEvent } from "./decisions.events.repository.ts";
import { findDecision, findDecisionProjectId, type DecisionRecord } from "./decisions.repository.ts";

/**
 * What the decisions' use cases share: the deps, who reads, how a write leaves its events and its
 * audit entry, and the checks writes make. The use cases live in decisions.reads.ts and
 * decisions.writes.ts; decisions.service.ts composes them.
 */

export type Trx = Knex.Transaction;

/**
 * What decisions ask of the document library (server/documents): which ids are the project's
 * documents, and their titles as a signed-in caller may see them (an investor only their
 * organisation's). Reached through functions asked at request time, as the library is built apart.
 */
export interface DecisionDocumentSource {
  documentIdsOf(projectId: number, ids: readonly number[]): Promise<Set<number>>;
  documentsNamed(projectId: number, ids: readonly number[], actor: Actor): Promise<Array<{ id: number; title: string }>>;
}

export interface DecisionsDeps {
  db: Db;
  /** The project's time zone and today, and its lock, which serialises the decisions' writes. */
  projects: ProjectsService;
  /** Milestones a decision may link, and their names as each audience may see them. */
  programme: Pick<ProgrammeService, "milestoneIdsOf" | "list">;
  /** Risks and issues a decision may link, by reference. */
  risks: Pick<RisksService, "referencesOf">;
  /** The names of the people who recorded outcomes and made changes. */
  accounts: Pick<AccountsService, "namesOf">;
  audit?: AuditService;
  /** The document library; without it no document can be attached. */
  documents?: DecisionDocumentSource;
}

/** A signed-in caller, or another module reading for an audience it names (a digest). */
export type Reader = Actor | RecordReader;

export function readerOf(reader: Reader): RecordReader {
  if ("audiences" in reader) return reader;
  if (!reader.user) throw new AppError("unauthenticated", "Sign in first.", 401);
  return recordReaderOf(reader.user.role);
}

/** D-001 … within a project. */
export const referenceOf = (d: { number: number }) => `D-${String(d.number).padStart(3, "0")}`;

export const invalid = (fields: Record<string, string>) => invalidFields(fields, "invalid_decision");
export const decisionNotFound = () => notFound("That decision");

/** 409: a decided or withdrawn request keeps its record as it was. */
export const closedDecision = (d: DecisionRecord, what: string) =>
  new AppError("decision_closed", `${referenceOf(d)} was ${d.status}: its record stays as it was, so it cannot be ${what}. Ask a new decision instead.`, 409);

export function createDecisionsContext(deps: DecisionsDeps) {
  const { db, projects, programme, risks } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const now = () => projects.now();

  const writeEvents = recordWriter(audit, insertDecisionEvents);

  /** The events of a write (all of the decision) and its audit entry, in the write's transaction. */
  function recordWrite(trx: Trx, actor: Actor, project: Project, w: { action: AuditAction; decision: Pick<DecisionRecord, "id" | "number" | "title">; events: Array<Omit<NewDecisionEvent, "projectId" | "byUserId" | "subjectId">>; detail: Record<string, unknown> }): Promise<void> {
    return writeEvents(trx, actor, project, {
      action: w.action,
      target: { type: "decision", id: w.decision.id, label: `${referenceOf(w.decision)} ${w.decision.title}` },
      events: w.events.map((e) => ({ ...e, subjectId: w.decision.id })),
      detail: w.detail,
    });
  }

  async function projectOfDecision(id: number): Promise<Project> {
    const projectId = await findDecisionProjectId(db, id);
    if (projectId === null) throw decisionNotFound();
    return projects.getById(projectId);
  }

  /** A write to one decision by id: under the project's lock, its row locked, 404 when it has gone. */
  async function change<T>(id: number, write: (trx: Trx, d: DecisionRecord, project: Project) => Promise<T>): Promise<T> {
    const project = await projectOfDecision(id);
    return db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      const d = await findDecision(trx, id, ["investor", "internal"], { forUpdate: true });
      if (!d) throw decisionNotFound();
      return write(trx, d, project);
    });
  }

  /** The links' and the recommendation's checks against the project; only those a write changes. */
  async function checkFields(
    project: Project,
    next: { options: unknown[]; recommendedOption: number | null; linkedMilestones: number[]; linkedRisks: number[]; documentIds: number[]; audience: RecordAudience },
    changed: ReadonlySet<string>,
    fields: Record<string, string>,
  ): Promise<void> {
    if ((changed.has("recommendedOption") || changed.has("options")) && next.recommendedOption !== null && next.recommendedOption >= next.options.length) {
      fields.recommendedOption = `must be the number of one of the options (0 to ${next.options.length - 1})`;
    }
    if (changed.has("linkedMilestones") && next.linkedMilestones.length > 0) {
      const known = await programme.milestoneIdsOf(project.id, next.linkedMilestones);
      const unknown = next.linkedMilestones.filter((id) => !known.has(id));
      if (unknown.length) fields.linkedMilestones = `names no milestone of this project: ${unknown.join(", ")}`;
    }
    if (changed.has("linkedRisks") && next.linkedRisks.length > 0) {
      const known = new Set((await risks.referencesOf(project.id, next.linkedRisks, ["investor", "internal"])).map((r) => r.id));
      const unknown = next.linkedRisks.filter((id) => !known.has(id));
      if (unknown.length) fields.linkedRisks = `names no risk or issue of this project: ${unknown.join(", ")}`;
    }
    if (changed.has("documentIds") && next.documentIds.length > 0) {
      const known = deps.documents ? await deps.documents.documentIdsOf(project.id, next.documentIds) : new Set<number>();
      const unknown = next.documentIds.filter((id) => !known.has(id));
      if (unknown.length) fields.documentIds = `names no document of this project: ${unknown.join(", ")}`;
    }
    if (Object.keys(fields).length > 0) throw invalid(fields);
  }

  return { db, projects, programme, risks, deps, now, recordWrite, change, checkFields };
}

export type DecisionsContext = ReturnType<typeof createDecisionsContext>;
