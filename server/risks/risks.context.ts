import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";
import type { RiskScale } from "#shared/schemas/risks.ts";
import { recordReaderOf, type RecordReader } from "#shared/domain/record-audience.ts";
import { validateLevels } from "#shared/domain/risks.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { AppError, notFound } from "../core/app-error.ts";
import { invalidFields } from "../core/field-changes.ts";
import { recordWriter } from "../core/record-write.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { FacilityService } from "../facility/facility.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import { insertRiskEvents, type NewRiskEvent } from "./risks.events.repository.ts";
import { findRisk, findRiskProjectId, type RiskRecord } from "./risks.repository.ts";

/**
 * What the register's use cases share: the deps, who reads, how a write leaves its events and its
 * audit entry, and the checks several writes make. The use cases live in risks.reads.ts,
 * risks.writes.ts and risks.mitigations.ts; risks.service.ts composes them.
 */

export type Trx = Knex.Transaction;

export interface RisksDeps {
  db: Db;
  /** The project's risk scale, time zone and today, and its lock, which serialises the register's writes. */
  projects: ProjectsService;
  /** Milestones a risk may link, and their names as each audience may see them. */
  programme: Pick<ProgrammeService, "milestoneIdsOf" | "list">;
  /** Capacity blocks and plant systems a risk may link, with their names and audiences. */
  facility: Pick<FacilityService, "tagSubjects">;
  /** Owners: active staff accounts, by name. */
  accounts: Pick<AccountsService, "namesOf" | "findById">;
  audit?: AuditService;
  /** The project's remaining contingency (the budget module's), or null while it has none to tell. */
  contingencyRemaining?: (projectId: number) => Promise<number | null>;
  /** What else has a risk on record (decisions linking it, budget changes …), in words: a risk named there is not deleted. */
  references?: (riskId: number) => Promise<string[]>;
}

/** A signed-in caller, or another module reading for an audience it names (a digest). */
export type Reader = Actor | RecordReader;

export function readerOf(reader: Reader): RecordReader {
  if ("audiences" in reader) return reader;
  if (!reader.user) throw new AppError("unauthenticated", "Sign in first.", 401);
  return recordReaderOf(reader.user.role);
}

/** R-001 for a risk, I-001 for an issue. */
export const referenceOf = (r: { kind: "risk" | "issue"; number: number }) => `${r.kind === "risk" ? "R" : "I"}-${String(r.number).padStart(3, "0")}`;

export const invalid = (fields: Record<string, string>) => invalidFields(fields, "invalid_risk");
export const riskNotFound = () => notFound("That risk");

const STAFF_ROLES = new Set(["admin", "lead", "marketing"]);

export function createRisksContext(deps: RisksDeps) {
  const { db, projects, programme, facility, accounts } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const now = () => projects.now();

  const writeEvents = recordWriter(audit, insertRiskEvents);

  /** The events of a write (of the risk unless an event names another subject) and its audit entry, in the write's transaction. */
  function recordWrite(trx: Trx, actor: Actor, project: Project, w: { action: AuditAction; risk: Pick<RiskRecord, "id" | "kind" | "number" | "title">; events: Array<Omit<NewRiskEvent, "projectId" | "byUserId" | "subjectId"> & { subjectId?: number }>; detail: Record<string, unknown> }): Promise<void> {
    return writeEvents(trx, actor, project, {
      action: w.action,
      target: { type: w.risk.kind, id: w.risk.id, label: `${referenceOf(w.risk)} ${w.risk.title}` },
      events: w.events.map((e) => ({ ...e, subjectId: e.subjectId ?? w.risk.id })),
      detail: w.detail,
    });
  }

  /** The project of a risk addressed by id (404 when there is none). */
  async function projectOfRisk(id: number): Promise<Project> {
    const projectId = await findRiskProjectId(db, id);
    if (projectId === null) throw riskNotFound();
    return projects.getById(projectId);
  }

  /** A write to one risk by id: under the project's lock, its row locked, 404 when it has gone. */
  async function change<T>(id: number, write: (trx: Trx, risk: RiskRecord, project: Project, scale: RiskScale) => Promise<T>): Promise<{ project: Project; result: T }> {
    const project = await projectOfRisk(id);
    const result = await db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      const risk = await findRisk(trx, id, ["investor", "internal"], { forUpdate: true });
      if (!risk) throw riskNotFound();
      return write(trx, risk, project, await projects.riskScale(project.id, trx));
    });
    return { project, result };
  }

  /** A write that adds to a project's register: one transaction under the project's lock. */
  async function addTo<T>(slug: string, add: (trx: Trx, project: Project, scale: RiskScale) => Promise<T>): Promise<{ project: Project; result: T }> {
    const project = await projects.get(slug);
    const result = await db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      return add(trx, project, await projects.riskScale(project.id, trx));
    });
    return { project, result };
  }

  /** Why an owner may not be one (an active staff account), or null. */
  async function ownerProblem(ownerId: number, trx: Trx): Promise<string | null> {
    const user = await accounts.findById(ownerId, trx);
    if (!user || !STAFF_ROLES.has(user.role)) return "must be a member of staff";
    if (user.disabledAt) return "must be an active account (this one is disabled)";
    return null;
  }

  /**
   * The checks of a risk's written fields against the project: levels on its scale, the owner an
   * active member of staff, links to the project's own milestones, blocks and systems. Only the
   * fields a write changes are checked (a scale shrunk later does not block an unrelated edit).
   */
  async function checkFields(
    trx: Trx,
    project: Project,
    scale: RiskScale,
    next: { likelihood: number; impact: number; ownerId: number; linkedMilestones: number[]; linkedBlocks: number[]; linkedSystems: number[] },
    changed: ReadonlySet<string>,
  ): Promise<void> {
    const fields: Record<string, string> = {};
    for (const p of validateLevels(next.likelihood, next.impact, scale)) if (changed.has(p.field)) fields[p.field] = p.message;
    if (changed.has("ownerId")) {
      const problem = await ownerProblem(next.ownerId, trx);
      if (problem) fields.ownerId = problem;
    }
    if (changed.has("linkedMilestones") && next.linkedMilestones.length > 0) {
      const known = await programme.milestoneIdsOf(project.id, next.linkedMilestones);
      const unknown = next.linkedMilestones.filter((id) => !known.has(id));
      if (unknown.length) fields.linkedMilestones = `names no milestone of this project: ${unknown.join(", ")}`;
    }
    if ((changed.has("linkedBlocks") && next.linkedBlocks.length > 0) || (changed.has("linkedSystems") && next.linkedSystems.length > 0)) {
      const subjects = await facility.tagSubjects(project.id);
      const blocks = new Set(subjects.filter((s) => s.kind === "block").map((s) => s.id));
      const systems = new Set(subjects.filter((s) => s.kind === "plant").map((s) => s.id));
      const unknownBlocks = next.linkedBlocks.filter((id) => !blocks.has(id));
      const unknownSystems = next.linkedSystems.filter((id) => !systems.has(id));
      if (changed.has("linkedBlocks") && unknownBlocks.length) fields.linkedBlocks = `names no capacity block of this project: ${unknownBlocks.join(", ")}`;
      if (changed.has("linkedSystems") && unknownSystems.length) fields.linkedSystems = `names no plant system of this project: ${unknownSystems.join(", ")}`;
    }
    if (Object.keys(fields).length > 0) throw invalid(fields);
  }

  return { db, projects, programme, facility, accounts, deps, now, recordWrite, projectOfRisk, change, addTo, ownerProblem, checkFields };
}

export type RisksContext = ReturnType<typeof createRisksContext>;
