import type { Knex } from "knex";
import { formatInstant } from "#shared/domain/locale-dates.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { recordReaderOf } from "#shared/domain/record-audience.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { notFound } from "../core/app-error.ts";
import { recordWriter } from "../core/record-write.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { MediaStorage, UploadArea } from "../media/media.storage.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import type { IntakeLimits } from "./documents.intake.ts";
import { insertDocumentEvents, type DocumentScope, type NewDocumentEvent } from "./documents.repository.ts";

/**
 * What the document library's use cases share: the deps, who reads what (the scope), and how a
 * write leaves its events and its audit entry. The use cases live in documents.library.ts
 * (documents and versions), .files.ts (serving, stamped for investors) and .views.ts (the view
 * log); documents.service.ts composes them.
 */

export type Trx = Knex.Transaction;

/** The investor organisations an account belongs to and their names (the users module keeps them). */
export interface DocumentOrganisations {
  /** The organisation of an account, or null. */
  ofUser(userId: number): Promise<{ id: number; name: string } | null>;
  /** Names of organisations by id (an unknown id is left out). */
  namesOf(ids: readonly number[]): Promise<Map<number, string>>;
}

export interface DocumentsDeps {
  db: Db;
  projects: ProjectsService;
  /** Names and addresses of the people who upload and read. */
  accounts: Pick<AccountsService, "namesOf" | "findById">;
  organisations: DocumentOrganisations;
  audit?: AuditService;
  /** The private storage the media library keeps its originals in (keys under `documents/`). */
  storage: MediaStorage;
  uploads: UploadArea;
  limits: IntakeLimits;
}

/** The reader a signed-in caller reads the library as (lead and admin: all; marketing: investor audience; an investor: by organisation too). */
export async function scopeOf(actor: Actor, organisations: DocumentOrganisations): Promise<DocumentScope> {
  const user = actor.user;
  if (!user) throw notFound("That document");
  if (user.role === "investor") return { kind: "investor", organisationId: (await organisations.ofUser(user.id))?.id ?? null };
  return recordReaderOf(user.role).audiences.includes("internal") ? { kind: "all" } : { kind: "investor_audience" };
}

/** "5 December 2026, 14:03 GMT": a moment as a reader of the project reads it. */
export function momentInWords(at: Date, project: Pick<Project, "timeZone">): string {
  return formatInstant(at, project.timeZone, "long");
}

export function createDocumentsContext(deps: DocumentsDeps) {
  const { db, projects } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const now = () => projects.now();

  const writeEvents = recordWriter(audit, insertDocumentEvents);

  /** The events of a write (all at one instant) and its audit entry, in the write's transaction. */
  function recordWrite(
    trx: Trx,
    actor: Actor,
    project: Project,
    w: { action: AuditAction; documentId: number; title: string; events: Array<Omit<NewDocumentEvent, "projectId" | "byUserId" | "at">>; at: Date; detail: Record<string, unknown> },
  ): Promise<void> {
    return writeEvents(trx, actor, project, {
      action: w.action,
      target: { type: "document", id: w.documentId, label: w.title },
      events: w.events.map((e) => ({ ...e, at: w.at })),
      detail: w.detail,
    });
  }

  return { ...deps, audit, now, recordWrite, scope: (actor: Actor) => scopeOf(actor, deps.organisations) };
}

export type DocumentsContext = ReturnType<typeof createDocumentsContext>;
