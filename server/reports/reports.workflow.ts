import { randomBytes } from "node:crypto";
import type { Project } from "#shared/schemas/projects.ts";
import type { RichTextDoc } from "#shared/schemas/rich-text.ts";
import { REPORT_SECTIONS, type ReportCreateInput, type ReportDetail, type ReportListItem, type ReportPatchInput, type ReportSection } from "#shared/schemas/reports.ts";
import { monthEndOf, type ReportFigures } from "#shared/domain/report-figures.ts";
import { AppError } from "../core/app-error.ts";
import { invalidFields, staleVersion } from "../core/field-changes.ts";
import type { Actor } from "../core/types.ts";
import type { ServedFile } from "../documents/documents.files.ts";
import { renderRichText } from "../posts/rich-text.ts";
import { reportNotFound, scopeOf, type ReportsContext, type Trx } from "./reports.context.ts";
import { createFigures } from "./reports.figures.ts";
import { formatMonthYear } from "#shared/domain/locale-dates.ts";
import { renderReportPdf } from "./reports.pdf.ts";
import { findOpenDraft, findReport, findSuperseding, insertNotices, insertReport, listReports, updateReport, type ReportRecord } from "./reports.repository.ts";

/** Commentary renders without pictures or milestone blocks: a report's figures are its own sections. */
const NO_EMBEDS = { pictures: new Map(), milestones: new Map() };

/** The lead's commentary per section as sanitised HTML (the updates' renderer and allow-list). */
function commentaryHtmlOf(commentary: Record<string, unknown>): Partial<Record<ReportSection, string>> {
  const out: Partial<Record<ReportSection, string>> = {};
  for (const section of REPORT_SECTIONS) {
    const doc = commentary[section];
    if (doc) out[section] = renderRichText(doc as RichTextDoc, NO_EMBEDS);
  }
  return out;
}

/**
 * The report workflow: a draft for a month that has ended (one open draft per month), commentary
 * per section, issue (figures frozen, the PDF stored in the document library, one notice per
 * reader, all in one transaction), and a correction (a new draft that supersedes the issue it
 * corrects once it is itself issued). Reads by audience: investors never see a draft.
 */
export function createReportWorkflow(ctx: ReportsContext) {
  const { db, projects, documents, users, mediaStorage, now, recordWrite, underLock } = ctx;
  const figuresOf = createFigures(ctx);

  function item(r: ReportRecord, supersededBy: Map<number, number>, months: Map<number, string>): ReportListItem {
    return {
      id: r.id,
      month: r.month,
      state: r.state,
      issuedAt: r.issuedAt?.toISOString() ?? null,
      audience: r.audience,
      supersedes: r.supersedesId === null ? null : { id: r.supersedesId, month: months.get(r.supersedesId) ?? r.month },
      supersededBy: r.state === "superseded" && supersededBy.has(r.id) ? { id: supersededBy.get(r.id)! } : null,
      correctionNote: r.correctionNote,
      version: r.version,
    };
  }

  /** The figures a report shows: frozen once issued; while a draft, computed now for its month end. */
  async function figuresFor(project: Project, r: ReportRecord): Promise<ReportFigures> {
    if (r.figures !== null) return r.figures as ReportFigures;
    return figuresOf(project, { month: r.month, audience: r.audience, state: "draft" }, now());
  }

  async function detail(r: ReportRecord, project: Project): Promise<ReportDetail> {
    const superseding = await findSuperseding(db, [r.id]);
    return {
      ...item(r, superseding, new Map()),
      monthEnd: monthEndOf(r.month),
      commentary: r.commentary,
      commentaryHtml: commentaryHtmlOf(r.commentary),
      figures: (await figuresFor(project, r)) as unknown as Record<string, unknown>,
      documentId: r.documentId,
    };
  }

  const loadImage = async (key: string) => mediaStorage.get(key);

  /** Who is told of an issue: the active investor accounts (investor reports) or active leads and admins (internal ones). */
  async function readersOf(audience: ReportRecord["audience"]): Promise<number[]> {
    const roles = audience === "investor" ? ["investor"] : ["lead", "admin"];
    return (await users.list()).filter((u) => roles.includes(u.role) && !u.disabled).map((u) => u.id);
  }

  async function lockedDraft(trx: Trx, id: number, version: number): Promise<ReportRecord> {
    const r = await findReport(trx, id, { kind: "staff" }, { forUpdate: true });
    if (!r) throw reportNotFound();
    if (r.state !== "draft") throw new AppError("report_issued", "This report has been issued: it no longer changes. Draft a correction instead.", 409);
    if (r.version !== version) throw staleVersion("report", r.version);
    return r;
  }

  return {
    /** GET /api/projects/:slug/reports (fixed): the reports the caller may see, latest month first. */
    async list(slug: string, actor: Actor): Promise<ReportListItem[]> {
      const scope = scopeOf(actor);
      const project = await projects.get(slug);
      const rows = await listReports(db, project.id, scope);
      const superseding = await findSuperseding(db, rows.map((r) => r.id));
      const months = new Map(rows.map((r) => [r.id, r.month]));
      return rows.map((r) => item(r, superseding, months));
    },

    async get(id: number, actor: Actor): Promise<ReportDetail> {
      const r = await findReport(db, id, scopeOf(actor));
      if (!r) throw reportNotFound();
      return detail(r, await projects.getById(r.projectId));
    },

    /** A draft for a month that has ended on site; a second open draft of the same month is refused. */
    async create(slug: string, input: ReportCreateInput, actor: Actor): Promise<ReportDetail> {
      const project = await projects.get(slug);
      if (monthEndOf(input.month) >= projects.today(project)) throw invalidFields({ month: "must have ended on site: a report shows the record as it stood at the month end" }, "invalid_report");
      const id = await db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        if (await findOpenDraft(trx, project.id, input.month)) throw new AppError("report_draft_exists", `A draft for ${formatMonthYear(input.month)} is already open: edit that one.`, 409);
        const at = now();
        const newId = await insertReport(trx, { projectId: project.id, month: input.month, audience: input.audience, commentary: {}, supersedesId: null, correctionNote: null, createdBy: actor.user?.id ?? null, at });
        await recordWrite(trx, actor, project, {
          action: "report_drafted",
          target: { type: "report", id: newId, label: `${formatMonthYear(input.month)} report` },
          events: [{ subjectId: newId, field: "created", from: null, to: input.month, at, note: null }],
          detail: { month: input.month, audience: input.audience },
        });
        return newId;
      });
      return this.get(id, actor);
    },

    /** The lead's commentary (and the audience) of a draft; an issued report never changes. */
    async patch(id: number, input: ReportPatchInput, actor: Actor): Promise<ReportDetail> {
      await underLock(id, async (trx, project) => {
        const r = await lockedDraft(trx, id, input.version);
        const commentary = { ...r.commentary };
        const changed: string[] = [];
        for (const [section, doc] of Object.entries(input.commentary ?? {})) {
          if (doc === null) delete commentary[section];
          else commentary[section] = doc;
          changed.push(section);
        }
        const at = now();
        await updateReport(trx, id, { commentary, audience: input.audience, at });
        await recordWrite(trx, actor, project, {
          action: "report_updated",
          target: { type: "report", id, label: `${formatMonthYear(r.month)} report` },
          events: [
            ...changed.map((section) => ({ subjectId: id, field: "commentary", from: null, to: section, at, note: null })),
            ...(input.audience && input.audience !== r.audience ? [{ subjectId: id, field: "audience", from: r.audience, to: input.audience, at, note: null }] : []),
          ],
          detail: { sections: changed, audience: input.audience ?? r.audience },
        });
      });
      return this.get(id, actor);
    },

    /**
     * Issues a draft: its figures frozen as they stand for the month end, its PDF rendered and kept
     * as a document of the library (so investors get stamped copies and the view log applies), the
     * report it corrects superseded, and one notice queued per reader, all in one transaction. A
     * second issue finds the report issued: 409, and nothing more is queued.
     */
    async issue(id: number, input: { version: number }, actor: Actor): Promise<ReportDetail> {
      // The figures and the PDF are made before the transaction (they read many modules and take a
      // moment); the transaction then finds the draft unchanged (same version) or refuses.
      const before = await findReport(db, id, { kind: "staff" });
      if (!before) throw reportNotFound();
      if (before.state !== "draft") throw new AppError("report_issued", "This report has been issued: it no longer changes. Draft a correction instead.", 409);
      if (before.version !== input.version) throw staleVersion("report", before.version);
      const project0 = await projects.getById(before.projectId);
      const at = now();
      const figures = await figuresOf(project0, { month: before.month, audience: before.audience, state: "issued" }, at);
      const pdf = await renderReportPdf(figures, commentaryHtmlOf(before.commentary), { state: "issued", issuedAt: at.toISOString(), loadImage });
      await underLock(id, async (trx, project) => {
        const r = await lockedDraft(trx, id, input.version);
        const title = `${project.name}: monthly report, ${formatMonthYear(r.month)}${r.supersedesId === null ? "" : " (corrected)"}`;
        const documentId = await documents.createFromGenerated(
          trx,
          project,
          { title, category: "monitoring_report", period: formatMonthYear(r.month), periodEnd: monthEndOf(r.month), audience: r.audience, organisationIds: [] },
          { bytes: pdf, name: `${project.slug}-report-${r.month}.pdf` },
          actor,
        );
        await updateReport(trx, id, { state: "issued", figures, documentId, issuedBy: actor.user?.id ?? null, issuedAt: at, at });
        const events: Array<{ subjectId: number; field: string; from: string | null; to: string | null; at: Date; note: string | null }> = [{ subjectId: id, field: "state", from: "draft", to: "issued", at, note: null }];
        if (r.supersedesId !== null) {
          const old = await findReport(trx, r.supersedesId, { kind: "staff" }, { forUpdate: true });
          if (old && old.state === "issued") {
            await updateReport(trx, old.id, { state: "superseded", at });
            events.push({ subjectId: old.id, field: "state", from: "issued", to: "superseded", at, note: r.correctionNote });
          }
        }
        const readers = await readersOf(r.audience);
        const queued = await insertNotices(
          trx,
          id,
          readers.map((userId) => ({ userId, messageId: `<report-${id}-${userId}.${randomBytes(6).toString("hex")}@plumbline.invalid>` })),
        );
        await recordWrite(trx, actor, project, {
          action: "report_issued",
          target: { type: "report", id, label: title },
          events,
          detail: { month: r.month, audience: r.audience, documentId, notices: queued, supersedes: r.supersedesId },
        });
      });
      return this.get(id, actor);
    },

    /** A correction of an issued report: a new draft of the same month that says what changed, superseding it once issued. */
    async correct(id: number, input: { note: string; version: number }, actor: Actor): Promise<ReportDetail> {
      const newId = await underLock(id, async (trx, project) => {
        const r = await findReport(trx, id, { kind: "staff" }, { forUpdate: true });
        if (!r) throw reportNotFound();
        if (r.state !== "issued") throw new AppError("report_not_issued", r.state === "draft" ? "This report is a draft: edit it instead." : "This report has already been superseded: correct its latest issue.", 409);
        if (r.version !== input.version) throw staleVersion("report", r.version);
        if (await findOpenDraft(trx, project.id, r.month)) throw new AppError("report_draft_exists", `A draft for ${formatMonthYear(r.month)} is already open: edit that one.`, 409);
        const at = now();
        const draftId = await insertReport(trx, { projectId: project.id, month: r.month, audience: r.audience, commentary: r.commentary, supersedesId: r.id, correctionNote: input.note, createdBy: actor.user?.id ?? null, at });
        await recordWrite(trx, actor, project, {
          action: "report_correction_drafted",
          target: { type: "report", id: draftId, label: `${formatMonthYear(r.month)} report (correction)` },
          events: [{ subjectId: draftId, field: "created", from: null, to: r.month, at, note: input.note }],
          detail: { month: r.month, corrects: r.id },
        });
        return draftId;
      });
      return this.get(newId, actor);
    },

    /**
     * GET /api/reports/:id/pdf (fixed): an issued report is its library document, served by the
     * library (an investor's copy stamped for them, and their view logged); a draft is a staff
     * preview rendered now and marked "draft".
     */
    async pdf(id: number, q: { as: "view" | "download" }, actor: Actor, client: { address: string; agent: string; record: boolean }): Promise<ServedFile> {
      const r = await findReport(db, id, scopeOf(actor));
      if (!r) throw reportNotFound();
      if (r.documentId !== null) return documents.file(r.documentId, { as: q.as }, actor, client);
      const project = await projects.getById(r.projectId);
      const figures = await figuresFor(project, r);
      const bytes = await renderReportPdf(figures, commentaryHtmlOf(r.commentary), { state: "draft", loadImage });
      return { name: `${project.slug}-report-${r.month}-draft.pdf`, mime: "application/pdf", disposition: q.as === "view" ? "inline" : "attachment", bytes };
    },
  };
}
