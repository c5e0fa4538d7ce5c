import type { FacilityEvent } from "#shared/schemas/facility.ts";
import { audiencesFor } from "#shared/domain/audience.ts";
import { endOfDateInZone, startOfDateInZone } from "../projects/projects.service.ts";
import { subjectNotFound, viewerOf, type FacilityContext, type Reader } from "./facility.context.ts";
import { listProjectFacilityEvents, listSubjectEvents, type FacilityEventRecord } from "./facility.events.repository.ts";
import { findSystem, findUnit } from "./facility.repository.ts";

/** The facility's history: a unit's dated stage history, and every change to a project's facility over a range of days. */
export function createFacilityHistoryUseCases(ctx: FacilityContext) {
  const { db, projects, accounts } = ctx;

  /** Events with the names of the people who made them, asked for in one read. */
  async function named(events: readonly FacilityEventRecord[]): Promise<FacilityEvent[]> {
    const names = await accounts.namesOf([...new Set(events.map((e) => e.byUserId).filter((id): id is number => id !== null))]);
    return events.map((e) => ({
      id: e.id,
      subject: e.subject,
      subjectId: e.subjectId,
      subjectName: e.subjectName,
      field: e.field,
      from: e.from,
      to: e.to,
      on: e.on,
      at: e.at,
      by: (e.byUserId === null ? null : names.get(e.byUserId)) ?? null,
      note: e.note,
    }));
  }

  return {
    /** A unit's history, newest first, for whoever may see its system (others are told it does not exist). */
    async unitEvents(id: number, reader: Reader): Promise<FacilityEvent[]> {
      const unit = await findUnit(db, id);
      const system = unit ? await findSystem(db, unit.systemId) : null;
      if (!unit || !system || !audiencesFor(viewerOf(reader)).includes(system.audience)) throw subjectNotFound("unit");
      return named(await listSubjectEvents(db, "unit", id));
    },

    /** Every facility event of a project recorded in [from, to] (days inclusive, in the project's time zone; either end open), newest first: staff's. */
    async projectEvents(slug: string, range: { from?: string; to?: string }): Promise<FacilityEvent[]> {
      const project = await projects.get(slug);
      return named(
        await listProjectFacilityEvents(db, project.id, {
          from: range.from ? startOfDateInZone(range.from, project.timeZone) : undefined,
          before: range.to ? endOfDateInZone(range.to, project.timeZone) : undefined,
        }),
      );
    },
  };
}
