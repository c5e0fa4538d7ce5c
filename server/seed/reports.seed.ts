import type { Knex } from "knex";
import { DateTime } from "luxon";
import pino from "pino";
import type { Role } from "#shared/schemas/common.ts";
import type { UserRow } from "#shared/schemas/users.ts";
import type { Actor } from "../core/types.ts";
import { createBudgetService } from "../budget/budget.service.ts";
import { createDecisionsService } from "../decisions/decisions.service.ts";
import { createDocumentsService } from "../documents/documents.service.ts";
import { createFacilityService } from "../facility/facility.service.ts";
import type { Mailer } from "../mail/mail.service.ts";
import { createMediaService } from "../media/media.service.ts";
import { createLocalDiskStorage, createUploadArea } from "../media/media.storage.ts";
import { createProgrammeService } from "../programme/programme.service.ts";
import { createProjectsService } from "../projects/projects.service.ts";
import { createReportsService } from "../reports/reports.service.ts";
import { createRisksService } from "../risks/risks.service.ts";
import { createAccountsService } from "../users/users.accounts.ts";
import { seedMediaDir } from "./media.seed.ts";
import { countOf } from "../db/rows.ts";

/**
 * The demo's monthly reports: the last two full months, each drafted, given a line of the lead's
 * commentary and issued through the reports service as the demo lead, on the third day of the
 * month after, so the investor room holds two issued reports with their stamped PDFs. The service
 * computes each report's figures from the record as it stood at its month end. The seed runs no
 * mail: the notices of these issues are recorded as sent at issue. Idempotent: a project that has
 * any report is left alone. Runs after the documents seed.
 */

const TZ = "Europe/London";
const LEAD = "lead@kestrel.example";

const COMMENTARY: Record<"older" | "latest", string> = {
  older: "Hall 2A held its ready-for-service date through the month; the chilled-water plant is the line to watch.",
  latest: "Chiller 3's late delivery moved the N+1 cooling plant's commissioning by two weeks; Hall 2A's date is protected by re-sequencing the integrated systems test.",
};

const paragraph = (text: string) => ({ type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text }] }] });

/** The seed sends no mail; a report issued here has its notices recorded as sent. */
const NO_MAIL: Mailer = {
  mode: "local",
  send: () => Promise.reject(new Error("the demo seed sends no mail")),
  close: () => undefined,
};

export async function seedReports(db: Knex, projectSlug: string, opts: { mediaDir?: string; today?: DateTime } = {}): Promise<{ created: string[] }> {
  const project = (await db("projects").where({ slug: projectSlug }).first("id")) as { id: number } | undefined;
  if (!project) return { created: [] };
  const existing = await countOf(db("reports").where({ project_id: project.id }));
  if (existing > 0) return { created: [] };
  const lead = (await db("users").where({ email: LEAD }).first("id", "name")) as { id: number; name: string } | undefined;
  if (!lead) return { created: [] };
  const actor: Actor = { user: { id: Number(lead.id), email: LEAD, name: String(lead.name), role: "lead" }, ip: null };

  // The clock the services see: set to each report's issue day in turn.
  let clock = new Date();
  const projects = createProjectsService(db, { now: () => clock });
  const accounts = createAccountsService({ db });
  const mediaDir = opts.mediaDir ?? seedMediaDir(db);
  const storage = createLocalDiskStorage(mediaDir);
  const uploads = createUploadArea(mediaDir);
  const programme = createProgrammeService({ db, projects, accounts });
  const facility = createFacilityService({ db, projects, programme, accounts });
  const risks = createRisksService({ db, projects, programme, facility, accounts });
  const decisions = createDecisionsService({ db, projects, programme, risks, accounts });
  const budget = createBudgetService({ db, projects, programme, accounts, risks });
  const media = createMediaService({ db, storage, uploads, projects, programme, accounts, facility, limits: { maxFileBytes: 50 * 1024 * 1024, maxFiles: 20, maxPixels: 100_000_000 } });
  // Seeds may read any table: organisations and accounts straight from theirs.
  const documents = createDocumentsService({
    db,
    projects,
    accounts,
    organisations: { ofUser: async () => null, namesOf: async () => new Map() },
    storage,
    uploads,
    limits: { maxFileBytes: 50 * 1024 * 1024, maxPages: 1000 },
  });
  const users = {
    list: async (): Promise<UserRow[]> =>
      ((await db("users").select("id", "email", "name", "role", "disabled_at", "created_at")) as Array<{ id: number; email: string; name: string; role: Role; disabled_at: Date | null; created_at: Date }>).map((u) => ({
        id: Number(u.id),
        email: u.email,
        name: u.name,
        role: u.role,
        disabled: u.disabled_at !== null,
        lastSignInAt: null,
        createdAt: new Date(u.created_at).toISOString(),
        organisation: null,
      })),
  };
  const reports = createReportsService({
    db,
    logger: pino({ level: "silent" }),
    projects,
    programme,
    facility,
    budget,
    risks,
    decisions,
    media,
    mediaStorage: storage,
    documents,
    users,
    mailer: NO_MAIL,
    outbox: { accepted: async () => false },
    publicUrl: "",
  });

  const today = (opts.today ?? DateTime.now()).setZone(TZ).startOf("day");
  const created: string[] = [];
  const months: Array<[DateTime, keyof typeof COMMENTARY]> = [
    [today.minus({ months: 2 }).startOf("month"), "older"],
    [today.minus({ months: 1 }).startOf("month"), "latest"],
  ];
  for (const [month, key] of months) {
    // Drafted on the first working morning after the month, issued on the third day.
    const issueDay = month.plus({ months: 1 }).set({ day: 3, hour: 11 });
    // A report due after today (early in a month) is drafted and issued today instead.
    clock = (issueDay < DateTime.now() ? issueDay : DateTime.now()).toJSDate();
    const draftedAt = DateTime.fromJSDate(clock).minus({ hours: 2 }).toJSDate();
    const d = await reports.create(projectSlug, { month: month.toFormat("yyyy-LL"), audience: "investor" }, actor);
    const withCommentary = await reports.patch(d.id, { commentary: { summary: paragraph(COMMENTARY[key]) as never }, version: d.version }, actor);
    const issued = await reports.issue(d.id, { version: withCommentary.version }, actor);
    // The seed's own rows, dated as they would have been written.
    await db("reports").where({ id: d.id }).update({ created_at: draftedAt });
    await db("report_notices").where({ report_id: d.id }).update({ status: "sent", sent_at: clock });
    if (issued.documentId !== null) {
      await db("documents").where({ id: issued.documentId }).update({ created_at: clock, updated_at: clock });
      await db("document_versions").where({ document_id: issued.documentId }).update({ uploaded_at: clock });
      await db("document_events").where({ document_id: issued.documentId }).update({ at: clock });
    }
    created.push(`report ${month.toFormat("LLLL yyyy")} (issued)`);
  }
  return { created };
}
