import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";
import type { Viewer } from "#shared/domain/audience.ts";
import { recordReaderOf, recordReaderOfViewer, type RecordReader } from "#shared/domain/record-audience.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { forbidden, notFound } from "../core/app-error.ts";
import { recordWriter } from "../core/record-write.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { RisksService } from "../risks/risks.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import { findChangeProjectId, insertBudgetEvents, type NewBudgetEvent } from "./budget.repository.ts";

/**
 * What the budget's use cases share: the deps, who reads (and whether they may read money), how
 * a write leaves its events and audit entry, and the refusals writes make. The use cases live in
 * budget.changes.ts and budget.position.ts; budget.service.ts composes them.
 */

export type Trx = Knex.Transaction;

export interface BudgetDeps {
  db: Db;
  /** The project's time zone and today, its lock, and its budget settings (contingency held, EAC chosen). */
  projects: Pick<ProjectsService, "get" | "getById" | "today" | "now" | "lockForWrite" | "budgetSettings" | "writeBudgetSettings">;
  /** The original budget (BAC), PV, EV and AC at a date; which milestones a change may name, and their names. */
  programme: Pick<ProgrammeService, "health" | "milestoneIdsOf" | "list">;
  /** The names of the people who made changes. */
  accounts: Pick<AccountsService, "namesOf">;
  /** The risks a change may name, by reference as each audience may see them, and the expected cost exposure of the open ones. */
  risks: Pick<RisksService, "riskIdsOf" | "risksNamed" | "exposure">;
  audit?: AuditService;
}

/** A signed-in caller, or another module reading for the audience it names (a digest: investors). */
export type Reader = Actor | Viewer;

/**
 * How a caller reads the budget: an investor the investor-audience changes, leads and admins
 * everything; marketing reads no money (decision 036), so nothing here. The routes refuse them
 * first; this refusal stands behind them.
 */
export function budgetReaderOf(reader: Reader): RecordReader {
  const r = typeof reader === "string" ? (reader === "public" ? null : recordReaderOfViewer(reader)) : reader.user ? recordReaderOf(reader.user.role) : null;
  if (!r || !r.money) throw forbidden("Budget figures are for investors, project leads and administrators.");
  return r;
}

export const changeNotFound = () => notFound("That budget change");

/** C-001 …: a change's reference within its project. */
export const referenceOf = (n: number) => `C-${String(n).padStart(3, "0")}`;

export function createBudgetContext(deps: BudgetDeps) {
  const { db, projects } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const now = () => projects.now();

  const writeEvents = recordWriter(audit, insertBudgetEvents);

  /** The events of a write (all at one instant, of one change or of the settings) and its audit entry, in the write's transaction. */
  function recordWrite(
    trx: Trx,
    actor: Actor,
    project: Project,
    w: {
      action: AuditAction;
      /** The change the events belong to; null for the project's settings, and for a deleted change (its row has gone). */
      changeId: number | null;
      /** The change the audit entry is about, when it is not `changeId` (a deleted one). */
      auditChangeId?: number;
      label: string;
      events: Array<Omit<NewBudgetEvent, "projectId" | "changeId" | "at" | "byUserId">>;
      at: Date;
      detail: Record<string, unknown>;
    },
  ): Promise<void> {
    const target = w.auditChangeId ?? w.changeId;
    return writeEvents(trx, actor, project, {
      action: w.action,
      target: target === null ? { type: "project", id: project.id, label: w.label } : { type: "budget_change", id: target, label: w.label },
      events: w.events.map((e) => ({ ...e, changeId: w.changeId, at: w.at })),
      detail: w.detail,
    });
  }

  /** The project of a change addressed by id (404 when there is none). */
  async function projectOfChange(id: number): Promise<Project> {
    const projectId = await findChangeProjectId(db, id);
    if (projectId === null) throw changeNotFound();
    return projects.getById(projectId);
  }

  /** A write to a project's budget: one transaction under the project's lock. */
  async function underLock<T>(project: Project, write: (trx: Trx) => Promise<T>): Promise<T> {
    return db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      return write(trx);
    });
  }

  return { ...deps, audit, now, recordWrite, projectOfChange, underLock };
}

export type BudgetContext = ReturnType<typeof createBudgetContext>;
