import type { Knex } from "knex";
import { DateTime } from "luxon";
import type { BudgetSettingsInput } from "#shared/schemas/budget.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { RiskScale } from "#shared/schemas/risks.ts";
import { notFound } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import {
  findBudgetSettings,
  findProjectById,
  findProjectBySlug,
  findProjectSender,
  findProjectSenders,
  findProjectsByIds,
  findRiskScale,
  listProjects,
  lockProjectRow,
  updateBudgetSettings,
  findAvailableFromLevel,
  updateAvailableFromLevel,
  type ProjectSender,
} from "./projects.repository.ts";

/** The calendar date (`YYYY-MM-DD`) of an instant in an IANA time zone. */
export function dateInZone(instant: Date, timeZone: string): string {
  const d = DateTime.fromJSDate(instant, { zone: timeZone });
  if (!d.isValid) throw new Error(`Not a usable time zone: ${timeZone}`);
  return d.toISODate()!;
}

/** The instant at which a calendar date begins (00:00) in an IANA time zone. */
export function startOfDateInZone(date: string, timeZone: string): Date {
  const d = DateTime.fromISO(date, { zone: timeZone }).startOf("day");
  if (!d.isValid) throw new Error(`Not a usable date or time zone: ${date} ${timeZone}`);
  return d.toJSDate();
}

/** The instant at which the day after a calendar date begins in an IANA time zone (so a day of 23 or 25 hours is whole). */
export function endOfDateInZone(date: string, timeZone: string): Date {
  const d = DateTime.fromISO(date, { zone: timeZone }).startOf("day").plus({ days: 1 });
  if (!d.isValid) throw new Error(`Not a usable date or time zone: ${date} ${timeZone}`);
  return d.toJSDate();
}

export function createProjectsService(db: Db, opts: { now?: () => Date } = {}) {
  const now = opts.now ?? (() => new Date());
  return {
    list: () => listProjects(db),
    async get(slug: string): Promise<Project> {
      const p = await findProjectBySlug(db, slug);
      if (!p) throw notFound("That project");
      return p;
    },
    /** The project of a slug, or null when there is none (a filter naming no project matches nothing). */
    findBySlug: (slug: string): Promise<Project | null> => findProjectBySlug(db, slug),
    async getById(id: number): Promise<Project> {
      const p = await findProjectById(db, id);
      if (!p) throw notFound("That project");
      return p;
    },
    /** Projects by id, in one read, for lists that name each row's project (an unknown id is left out). */
    byIds: (ids: readonly number[]): Promise<Map<number, Project>> => findProjectsByIds(db, ids),
    /**
     * Locks the project in the caller's transaction, so that writes which check the whole of a
     * project's records before changing them (the programme's dependency cycles, phases, baseline
     * numbers) take turns across processes. Held until the transaction ends.
     */
    lockForWrite: (trx: Knex.Transaction, projectId: number): Promise<void> => lockProjectRow(trx, projectId),
    /**
     * The project as its e-mails name it, with the operator's postal address for the footer (kept
     * out of the public project record, which the site serves to anyone).
     */
    async sender(id: number): Promise<ProjectSender> {
      const p = await findProjectSender(db, id);
      if (!p) throw notFound("That project");
      return p;
    },
    /** The senders of several projects in one read, by id: for lists naming each row's project. */
    async senders(ids: readonly number[]): Promise<Map<number, ProjectSender>> {
      return new Map((await findProjectSenders(db, ids)).map((p) => [p.id, p]));
    },
    /** The project's risk scale setting (levels of likelihood and impact, band edges): the risks register's. */
    async riskScale(projectId: number, trx?: Knex.Transaction): Promise<RiskScale> {
      const scale = await findRiskScale(trx ?? db, projectId);
      if (!scale) throw notFound("That project");
      return scale;
    },
    /** The contingency held and the projected final cost's method (the budget module reads and writes them; never public). */
    async budgetSettings(id: number, trx?: Knex.Transaction): Promise<BudgetSettingsInput> {
      const settings = await findBudgetSettings(trx ?? db, id);
      if (!settings) throw notFound("That project");
      return settings;
    },
    /** Writes the budget settings in the caller's transaction (the budget module records the event and the audit entry). */
    writeBudgetSettings: (trx: Knex.Transaction, id: number, settings: BudgetSettingsInput): Promise<void> => updateBudgetSettings(trx, id, settings),
    /** The commissioning level from which a unit carries its load, read in the caller's transaction (the facility module writes it). */
    async availableFromLevel(trx: Knex.Transaction, id: number): Promise<number> {
      const level = await findAvailableFromLevel(trx, id);
      if (level === null) throw notFound("That project");
      return level;
    },
    writeAvailableFromLevel: (trx: Knex.Transaction, id: number, level: number): Promise<void> => updateAvailableFromLevel(trx, id, level),
    /** Today's date on site: the programme's "today" is the project's, not the server's. */
    today(project: Pick<Project, "timeZone">): string {
      return dateInZone(now(), project.timeZone);
    },
    now,
  };
}
export type ProjectsService = ReturnType<typeof createProjectsService>;
