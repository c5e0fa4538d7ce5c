import type { Audience } from "#shared/schemas/common.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { MilestoneEventRow, MilestoneMovesRow } from "#shared/schemas/programme.ts";
import { summariseChanges } from "#shared/domain/programme-changes.ts";
import { drivingChain, type DrivingLink } from "#shared/domain/programme-dependencies.ts";
import { notFound } from "../core/app-error.ts";
import { dateInZone, endOfDateInZone, startOfDateInZone } from "../projects/projects.service.ts";
import { toInput, userIdsOf, viewerOf, type ProgrammeContext, type Reader } from "./programme.context.ts";
import { listMilestoneEvents, listProjectEvents, type MilestoneEventRecord } from "./programme.events.repository.ts";
import { findMilestone, listMilestones, type Viewer } from "./programme.repository.ts";

/** Dates of a range, inclusive, in the project's time zone. */
type DateRange = { from: string; to: string };

/** A milestone's finish dates as they stood on a day, with what other modules need to show it (or hide it). */
export interface MilestoneDatesAt {
  id: number;
  name: string;
  audience: Audience;
  baselineFinish: string;
  forecastFinish: string | null;
  actualFinish: string | null;
}

/**
 * The programme's history: every change of a tracked field is an event, so "what moved since
 * date X" is a query. A milestone's own history and what drives it; a project's changes and
 * its moves (the changes summarised per milestone) over a range of dates.
 */
export function createHistoryUseCases(ctx: ProgrammeContext) {
  const { db, projects, accounts } = ctx;

  /** Events with the names of the people who made them, asked for in one read. */
  async function named(events: readonly MilestoneEventRecord[]): Promise<MilestoneEventRow[]> {
    const names = await accounts.namesOf(userIdsOf(events.map((e) => e.byUserId)));
    return events.map(({ byUserId, ...e }) => ({ ...e, by: (byUserId === null ? null : names.get(byUserId)) ?? null }));
  }

  function eventsIn(project: Project, viewer: Viewer, range: DateRange): Promise<MilestoneEventRecord[]> {
    return listProjectEvents(db, project.id, viewer, {
      from: startOfDateInZone(range.from, project.timeZone),
      before: endOfDateInZone(range.to, project.timeZone),
    });
  }

  return {
    async events(id: number, reader: Reader): Promise<MilestoneEventRow[]> {
      const m = await findMilestone(db, id, viewerOf(reader));
      if (!m) throw notFound("That milestone");
      return named(await listMilestoneEvents(db, id));
    },

    async drivers(id: number, reader: Reader): Promise<DrivingLink[]> {
      const viewer = viewerOf(reader);
      const m = await findMilestone(db, id, viewer);
      if (!m) throw notFound("That milestone");
      // A removed milestone's history stays readable, and so does what drove it.
      const visible = await listMilestones(db, m.projectId, viewer, { removed: m.removal ? "include" : "exclude" });
      return drivingChain(id, visible.map(toInput));
    },

    /** Events in [from, to], dates inclusive in the project's time zone, of milestones the caller may see; newest first. */
    async changes(slug: string, range: DateRange, reader: Reader): Promise<MilestoneEventRow[]> {
      return named(await eventsIn(await projects.get(slug), viewerOf(reader), range));
    },

    /**
     * Every milestone of the project (any audience, removed or not) that existed when `date` ended
     * in the project's time zone, with its baseline, forecast and actual finish as they stood then:
     * today's values with every later change of those fields undone, newest first. Callers filter
     * by audience themselves (the facility computes readiness over the whole record).
     */
    async milestoneDatesAt(projectId: number, date: string): Promise<MilestoneDatesAt[]> {
      const project = await projects.getById(projectId);
      const boundary = endOfDateInZone(date, project.timeZone);
      const records = (await listMilestones(db, projectId, "staff", { removed: "include" })).filter((m) => m.createdAt < boundary);
      const state = new Map(records.map((m) => [m.id, { id: m.id, name: m.name, audience: m.audience, baselineFinish: m.baselineFinish, forecastFinish: m.forecastFinish, actualFinish: m.actualFinish }]));
      const later = await listProjectEvents(db, projectId, "staff", { from: boundary, fields: ["baseline_finish", "forecast_finish", "actual_finish"] });
      for (const e of later) {
        const m = state.get(e.milestoneId);
        if (!m) continue;
        if (e.field === "baseline_finish") m.baselineFinish = e.from ?? m.baselineFinish;
        else if (e.field === "forecast_finish") m.forecastFinish = e.from;
        else m.actualFinish = e.from;
      }
      return [...state.values()];
    },

    /** The changes in [from, to] summarised per milestone (later, earlier, completed, removed…). */
    async moves(slug: string, range: DateRange, reader: Reader): Promise<MilestoneMovesRow[]> {
      const project = await projects.get(slug);
      const viewer = viewerOf(reader);
      const events = await eventsIn(project, viewer, range);
      const names = new Map(events.map((e) => [e.milestoneId, e.milestoneName]));
      const summary = summariseChanges(
        events.map((e) => ({ milestoneId: e.milestoneId, field: e.field, from: e.from, to: e.to, at: e.at, note: e.note })),
        range.from,
        range.to,
        (at) => dateInZone(new Date(at), project.timeZone),
      );
      return summary.map((s) => ({ milestoneId: s.milestoneId, milestoneName: names.get(s.milestoneId) ?? "", moves: s.moves }));
    },
  };
}
