import { formatLongDate } from "#shared/domain/locale-dates.ts";
import { createHash, randomBytes } from "node:crypto";
import type { Viewer } from "#shared/domain/audience.ts";
import { viewerOfRole } from "#shared/domain/audience.ts";
import { recordReaderOfViewer } from "#shared/domain/record-audience.ts";
import type { CalendarFeed } from "#shared/schemas/reports.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { notFound, unauthenticated } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { DecisionsService } from "../decisions/decisions.service.ts";
import type { FacilityService } from "../facility/facility.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import { dateInZone, type ProjectsService } from "../projects/projects.service.ts";
import type { ReportsService } from "../reports/reports.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import { writeCalendar, type CalendarEntry } from "./calendars.ics.ts";
import { findLiveFeed, insertFeed, revokeFeeds } from "./calendars.repository.ts";

export interface CalendarsDeps {
  db: Db;
  projects: ProjectsService;
  programme: Pick<ProgrammeService, "list" | "changes">;
  facility: Pick<FacilityService, "facility">;
  decisions: Pick<DecisionsService, "list">;
  /** Issued monthly reports, as the feed's owner may see them. */
  reports: Pick<ReportsService, "list">;
  /** Whose a personal feed is, and whether that account is still enabled and in which role. */
  accounts: Pick<AccountsService, "findById">;
  publicUrl: string;
  now?: () => Date;
}

/** The date fields whose every change moves a milestone's (or a block's) calendar date. */
const DATE_FIELDS: ReadonlySet<string> = new Set(["forecast_finish", "actual_finish", "baseline_finish"]);
/** A personal feed's token: 32 random bytes in base64url, 43 characters. */
const TOKEN = /^[A-Za-z0-9_-]{43}$/;

const hashOf = (token: string) => createHash("sha256").update(token).digest("hex");

const dayWords = (date: string) => formatLongDate(date.slice(0, 10));

/** A slip in calendar days in plain words, for a calendar's description. */
function slipPhrase(days: number): string {
  if (days === 0) return "on the planned date";
  const n = Math.abs(days);
  return `${n} calendar ${n === 1 ? "day" : "days"} ${days > 0 ? "later" : "earlier"} than planned`;
}

function describeDate(baseline: string | null, date: string, done: boolean, slipDays: number | null, link: string): string {
  const when = done ? `Done on ${dayWords(date)}` : `Expected on ${dayWords(date)}`;
  const plan = baseline ? `Planned (baseline): ${dayWords(baseline)}.` : "No baseline date set.";
  const slip = slipDays === null ? "" : ` That is ${slipPhrase(slipDays)}.`;
  return `${when}. ${plan}${slip}\n${link}`;
}

/**
 * Milestone calendars (RFC 5545): the public feed of a project, and each signed-in reader's
 * personal feed behind a random token (only its hash kept; a new one revokes the old). Every
 * event is all-day on its forecast (or actual) date, its UID stable for the life of what it
 * dates, its SEQUENCE the number of date changes so far, so a subscribed calendar moves it
 * when the forecast moves.
 */
export function createCalendarsService(deps: CalendarsDeps) {
  const { db, projects, programme, facility, decisions, reports, accounts, publicUrl } = deps;
  const now = deps.now ?? (() => new Date());
  const base = publicUrl.replace(/\/+$/, "");
  const host = new URL(publicUrl).host;

  /** Date changes so far per milestone, from the programme's history (one read for the project). */
  async function dateChanges(project: Project): Promise<Map<number, number>> {
    const events = await programme.changes(project.slug, { from: "1970-01-01", to: projects.today(project) }, "staff");
    const counts = new Map<number, number>();
    for (const e of events) if (DATE_FIELDS.has(e.field)) counts.set(e.milestoneId, (counts.get(e.milestoneId) ?? 0) + 1);
    return counts;
  }

  /**
   * Issue dates of the monthly reports the owner may read, asked of the reports module as the
   * owner themselves (their account, not a made-up one): drafts are never dates of a feed, and a
   * superseded issue gives way to its correction.
   */
  async function reportEntries(project: Project, owner: Actor): Promise<CalendarEntry[]> {
    const link = `${base}/investors/projects/${project.slug}`;
    const issued = (await reports.list(project.slug, owner)).filter((r) => r.state === "issued" && r.issuedAt !== null);
    return issued.map((r) => ({
      uid: `report-${r.id}@${host}`,
      date: dateInZone(new Date(r.issuedAt!), project.timeZone),
      summary: `Monthly report issued: ${r.month}`,
      description: `The monthly report for ${r.month} was issued.${r.correctionNote ? ` It corrects an earlier issue: ${r.correctionNote}` : ""}\n${link}`,
      url: link,
      // An issued report is frozen: its issue date never moves.
      sequence: 0,
      lastModified: new Date(r.issuedAt!),
      categories: ["Monthly report"],
    }));
  }

  async function entriesFor(project: Project, viewer: Viewer): Promise<CalendarEntry[]> {
    const page = viewer === "public" ? `${base}/projects/${project.slug}/timeline` : `${base}/investors/projects/${project.slug}`;
    const [milestones, visibleFacility, wholeFacility, changes, staffMilestones] = await Promise.all([
      programme.list(project.slug, {}, viewer),
      facility.facility(project.slug, {}, viewer),
      // A block's readiness rests on milestones a reader may not see; their changes move its date all the same.
      facility.facility(project.slug, {}, "staff"),
      dateChanges(project),
      programme.list(project.slug, {}, "staff"),
    ]);
    const updatedAt = new Map(staffMilestones.map((m) => [m.id, new Date(m.updatedAt)]));
    const entries: CalendarEntry[] = milestones.map((m) => {
      const date = m.actualFinish ?? m.forecastFinish ?? m.baselineFinish;
      return {
        uid: `milestone-${m.id}@${host}`,
        date,
        summary: m.actualFinish ? `${m.name} (done)` : m.name,
        description: describeDate(m.baselineFinish, date, m.actualFinish !== null, m.slipDays, page),
        url: page,
        sequence: changes.get(m.id) ?? 0,
        lastModified: new Date(m.updatedAt),
        categories: ["Milestone"],
      };
    });

    for (const b of visibleFacility.blocks) {
      const date = b.forecastReadyDate ?? b.baselineReadyDate;
      if (!date) continue;
      const behind = wholeFacility.blocks.find((x) => x.id === b.id)?.dependsOn ?? b.dependsOn;
      const touched = behind.map((id) => updatedAt.get(id)?.getTime() ?? 0);
      const slip = b.baselineReadyDate ? Math.round((Date.parse(date) - Date.parse(b.baselineReadyDate)) / 86_400_000) : null;
      entries.push({
        uid: `block-${b.id}@${host}`,
        date,
        summary: `${b.name}: ${b.readyForService ? "ready for service" : "ready for service (forecast)"}`,
        description: describeDate(b.baselineReadyDate, date, b.readyForService, slip, viewer === "public" ? `${base}/projects/${project.slug}/facility` : page),
        url: viewer === "public" ? `${base}/projects/${project.slug}/facility` : page,
        // The date changes of the milestones the block waits on: it rises whenever what sets the block's date moves.
        sequence: behind.reduce((sum, id) => sum + (changes.get(id) ?? 0), 0),
        lastModified: new Date(Math.max(0, ...touched)),
        categories: ["Ready for service"],
      });
    }

    if (viewer !== "public") {
      const open = await decisions.list(project.slug, { status: "open" }, recordReaderOfViewer(viewer));
      for (const d of open) {
        const link = `${base}/investors/projects/${project.slug}/decisions`;
        entries.push({
          uid: `decision-${d.id}@${host}`,
          date: d.neededBy,
          summary: `Decision needed by: ${d.reference} ${d.title}`,
          description: `${d.question}\nDecided by: ${d.decider}. Needed by ${dayWords(d.neededBy)}.\n${link}`,
          url: link,
          // Every edit of an open decision raises its version; its needed-by date moves only by an edit.
          sequence: d.version - 1,
          lastModified: new Date(d.updatedAt),
          categories: ["Decision needed"],
        });
      }
    }
    return entries.sort((a, b) => a.date.localeCompare(b.date) || a.uid.localeCompare(b.uid));
  }

  const nameOf = (project: Project, viewer: Viewer) => (viewer === "public" ? `${project.name}: key dates` : `${project.name}: key dates (${viewer === "investor" ? "investors" : "staff"})`);

  return {
    /** GET /projects/:slug/calendar.ics: public milestones and public blocks' ready-for-service dates. */
    async publicCalendar(slug: string): Promise<string> {
      const project = await projects.get(slug);
      return writeCalendar(nameOf(project, "public"), await entriesFor(project, "public"), now());
    },

    /** POST /api/projects/:slug/calendar-feed: a new personal feed; the user's earlier ones for the project stop working. */
    async createFeed(slug: string, actor: Actor): Promise<CalendarFeed> {
      if (!actor.user) throw unauthenticated();
      const user = actor.user;
      const project = await projects.get(slug);
      const token = randomBytes(32).toString("base64url");
      const at = now();
      await db.transaction(async (trx) => {
        await revokeFeeds(trx, user.id, project.id, at);
        await insertFeed(trx, { userId: user.id, projectId: project.id, tokenHash: hashOf(token), at });
      });
      return { url: `${base}/calendars/${token}.ics`, createdAt: at.toISOString() };
    },

    /** DELETE /api/projects/:slug/calendar-feed: the user's feed for the project stops working. */
    async revokeFeed(slug: string, actor: Actor): Promise<void> {
      if (!actor.user) throw unauthenticated();
      const project = await projects.get(slug);
      await revokeFeeds(db, actor.user.id, project.id, now());
    },

    /**
     * GET /calendars/:token.ics: the feed as its owner may see it now (their current role); a
     * malformed, unknown or revoked token, or a disabled owner, is "not found" alike.
     */
    async personalCalendar(token: string): Promise<string> {
      const missing = notFound("That calendar");
      if (!TOKEN.test(token)) throw missing;
      const feed = await findLiveFeed(db, hashOf(token));
      if (!feed) throw missing;
      const owner = await accounts.findById(feed.userId);
      if (!owner || owner.disabledAt !== null) throw missing;
      const project = await projects.getById(feed.projectId);
      const viewer = viewerOfRole(owner.role);
      const actor: Actor = { user: { id: owner.id, email: owner.email, name: owner.name, role: owner.role }, ip: null };
      const entries = [...(await entriesFor(project, viewer)), ...(await reportEntries(project, actor))];
      return writeCalendar(nameOf(project, viewer), entries, now());
    },
  };
}

export type CalendarsService = ReturnType<typeof createCalendarsService>;
