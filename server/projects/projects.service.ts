import { DateTime } from "luxon";
import type { Project } from "#shared/schemas/projects.ts";
import { notFound } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import { findProjectById, findProjectBySlug, findProjectSender, listProjects, type ProjectSender } from "./projects.repository.ts";

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
    async getById(id: number): Promise<Project> {
      const p = await findProjectById(db, id);
      if (!p) throw notFound("That project");
      return p;
    },
    /**
     * The project as its e-mails name it, with the operator's postal address for the footer (kept
     * out of the public project record, which the site serves to anyone).
     */
    async sender(id: number): Promise<ProjectSender> {
      const p = await findProjectSender(db, id);
      if (!p) throw notFound("That project");
      return p;
    },
    /** Today's date on site: the programme's "today" is the project's, not the server's. */
    today(project: Pick<Project, "timeZone">): string {
      return dateInZone(now(), project.timeZone);
    },
    now,
  };
}
export type ProjectsService = ReturnType<typeof createProjectsService>;
