import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { AppError, forbidden, notFound } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import { recordWriter } from "../core/record-write.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { BudgetService } from "../budget/budget.service.ts";
import type { DecisionsService } from "../decisions/decisions.service.ts";
import type { DocumentsService } from "../documents/documents.service.ts";
import type { FacilityService } from "../facility/facility.service.ts";
import type { Mailer, OutboxService } from "../mail/mail.service.ts";
import type { MediaService } from "../media/media.service.ts";
import type { MediaStorage } from "../media/media.storage.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { RisksService } from "../risks/risks.service.ts";
import type { UsersService } from "../users/users.service.ts";
import { findProjectIdOfReport, insertReportEvents, type ReportScope } from "./reports.repository.ts";

/**
 * What the reports' use cases share: the deps (every module a report reads its figures from, the
 * document library its PDF goes into, the mail path of its notices), who reads what, and how a
 * write leaves its events and audit entry. The use cases live in reports.figures.ts,
 * reports.drafts.ts, reports.issue.ts and reports.notices.ts; reports.service.ts composes them.
 */

export type Trx = Knex.Transaction;

export interface ReportsDeps {
  db: Db;
  logger: Logger;
  projects: ProjectsService;
  programme: Pick<ProgrammeService, "asStood" | "milestoneDatesAt">;
  facility: Pick<FacilityService, "figuresAt">;
  budget: Pick<BudgetService, "position">;
  risks: Pick<RisksService, "registerAt">;
  decisions: Pick<DecisionsService, "openAt">;
  media: Pick<MediaService, "gallery">;
  /** Where the photos' derivatives are kept: the PDF embeds them. */
  mediaStorage: Pick<MediaStorage, "get">;
  documents: Pick<DocumentsService, "createFromGenerated" | "file">;
  /** Accounts: a report's readers, and the names of who wrote. */
  users: Pick<UsersService, "list">;
  mailer: Mailer;
  /** The local sink's record of accepted messages: a notice interrupted after sending is not sent again. */
  outbox: Pick<OutboxService, "accepted">;
  audit?: AuditService;
  publicUrl: string;
}

export const reportNotFound = () => notFound("That report");

/**
 * Leads and administrators read every report; an investor the issued ones of investor audience.
 * Marketing reads none: a report is mostly money, which marketing does not read (decision 036;
 * decision 042). The routes refuse them first; this refusal stands behind them.
 */
export function scopeOf(actor: Actor): ReportScope {
  const role = actor.user?.role;
  if (!role) throw new AppError("unauthenticated", "Sign in first.", 401);
  if (role === "investor") return { kind: "investor" };
  if (role === "lead" || role === "admin") return { kind: "staff" };
  throw forbidden("Monthly reports are for investors, project leads and administrators.");
}

export function createReportsContext(deps: ReportsDeps) {
  const { db, projects } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const now = () => projects.now();
  const recordWrite = recordWriter<AuditAction, Parameters<typeof insertReportEvents>[1][number]>(audit, insertReportEvents);

  /** A write to one report: under its project's lock, in one transaction. */
  async function underLock<T>(id: number, write: (trx: Trx, project: Project) => Promise<T>): Promise<T> {
    const projectId = await findProjectIdOfReport(db, id);
    if (projectId === null) throw reportNotFound();
    const project = await projects.getById(projectId);
    return db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      return write(trx, project);
    });
  }

  return { ...deps, audit, now, recordWrite, underLock };
}

export type ReportsContext = ReturnType<typeof createReportsContext>;
