import type { Project } from "#shared/schemas/projects.ts";
import type { Milestone, MilestoneCreateInput, MilestonePatchInput, MilestoneRemovalInput, ShiftInput } from "#shared/schemas/programme.ts";
import { addWorkingDays } from "#shared/domain/calendar.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import { dateInZone } from "../projects/projects.service.ts";
import { baselinesHolding } from "./programme.baselines.repository.ts";
import { fieldsOf, storedValuesOf, invalid, sameIds, settingsOf, uniqueSorted, viewerOf, eventsFor, changedFields, type ProgrammeContext, type ProgrammeDeps, type Reader, type Trx } from "./programme.context.ts";
import { countEventsSince, insertEvents } from "./programme.events.repository.ts";
import {
  deleteMilestone,
  findMilestone,
  findOrCreatePhase,
  insertMilestone,
  listAllAreas,
  listAreas,
  listDependants,
  listMilestoneNames,
  listMilestones,
  replaceDependencies,
  existingMilestoneIds,
  setRemoval,
  type MilestoneFields,
  type MilestoneFilter,
  type MilestoneRecord,
} from "./programme.repository.ts";

export type MilestoneListQuery = MilestoneFilter & { at?: string; status?: Milestone["status"] };

/**
 * The milestones of a programme: listing them, entering one, editing it, shifting forecasts,
 * and taking one out of the programme (removal with a reason, restore, or a delete of one
 * entered by mistake).
 */
export function createMilestoneUseCases(ctx: ProgrammeContext, deps: Pick<ProgrammeDeps, "references">) {
  const { db, projects, now, record, presentAll, presentOne, staffView } = ctx;

  /** Each changed field as { from, to }, for the audit entry of an edit. */
  function changeDetail(before: MilestoneRecord, next: MilestoneFields, extra: { phase?: string; dependsOn?: number[] }): Record<string, { from: unknown; to: unknown }> {
    const out: Record<string, { from: unknown; to: unknown }> = {};
    const prev = fieldsOf(before);
    for (const [key, to] of Object.entries(changedFields(prev, next))) {
      if (key === "phaseId") continue;
      out[key] = { from: prev[key as keyof MilestoneFields], to };
    }
    if (extra.phase !== undefined && extra.phase !== before.phase) out.phase = { from: before.phase, to: extra.phase };
    if (extra.dependsOn !== undefined && !sameIds(extra.dependsOn, before.dependsOn)) out.dependsOn = { from: before.dependsOn, to: extra.dependsOn };
    return out;
  }

  /**
   * Why a milestone is on record and so may not be deleted, in words; empty when it was
   * entered by mistake and nothing has seen it since: in no baseline, linked by nothing, and
   * with no change of its dates, progress or audience recorded after it was entered.
   */
  async function onRecord(trx: Trx, m: MilestoneRecord): Promise<string[]> {
    const reasons: string[] = [];
    const versions = await baselinesHolding(trx, m.projectId, m.id);
    if (versions.length > 0) reasons.push(`it is in baseline ${versions.map((n) => `v${n}`).join(", ")}`);
    const refs = deps.references ? await deps.references(m.id) : [];
    const nouns = { update: "update", story: "story", photo: "photo", block: "capacity block", system: "plant system" } as const;
    for (const kind of ["update", "story", "photo", "block", "system"] as const) {
      const of = refs.filter((r) => r.kind === kind);
      const one = nouns[kind];
      if (of.length > 0) reasons.push(`${of.length === 1 ? `a ${one} links it` : `${of.length} ${kind === "story" ? "stories" : `${one}s`} link it`} (${of.map((r) => r.label).join(", ")})`);
    }
    if (m.removal) reasons.push("it has been removed from the programme");
    else if ((await countEventsSince(trx, m.id, m.createdAt)) > 0) reasons.push("its history records changes since it was entered");
    return reasons;
  }

  function checkActual(actualFinish: string | null | undefined, project: Project, fields: Record<string, string>): void {
    const today = projects.today(project);
    if (actualFinish && actualFinish > today) {
      fields.actualFinish = `must not be after today (${today} in ${project.timeZone})`;
    }
  }

  function checkStart(plannedStart: string | null, baselineFinish: string, fields: Record<string, string>): void {
    if (plannedStart !== null && plannedStart > baselineFinish) {
      fields.plannedStart = `must not be after the baseline finish (${baselineFinish})`;
    }
  }

  /**
   * A write to one milestone, in one transaction: the project's write lock first (writes to one
   * project queue behind each other), then the milestone's row; 404 when it is not there.
   */
  async function changeMilestone<T>(id: number, change: (trx: Trx, m: MilestoneRecord, project: Project) => Promise<T>): Promise<T> {
    const project = await ctx.projectOfMilestone(id);
    return db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      const m = await findMilestone(trx, id, "staff", { forUpdate: true });
      if (!m) throw notFound("That milestone");
      return change(trx, m, project);
    });
  }

  /** A milestone as the staff see it, read again inside the write that changed it. */
  async function presentWritten(trx: Trx, id: number, project: Project): Promise<Milestone> {
    return presentOne((await findMilestone(trx, id, "staff"))!, staffView(project), trx);
  }

  function removedError(m: MilestoneRecord, project: Project): AppError {
    const on = m.removal ? ` on ${dateInZone(m.removal.at, project.timeZone)}` : "";
    return new AppError("milestone_removed", `${m.name} was removed from the programme${on}. Restore it before changing it.`, 409);
  }

  /**
   * 422 naming the milestones that depend on this one: `all` for a delete (even a removed
   * dependant keeps its link, for a restore), `in programme` for a removal.
   */
  async function refuseWhileDepended(trx: Trx, m: MilestoneRecord, which: "all" | "in programme"): Promise<void> {
    const dependants = (await listDependants(trx, m.id)).filter((d) => which === "all" || !d.removed);
    if (dependants.length === 0) return;
    const names = dependants.map((d) => (d.removed ? `${d.name} (removed)` : d.name)).join(", ");
    throw new AppError(
      "has_dependants",
      `${names} ${dependants.length === 1 ? "depends" : "depend"} on ${m.name}; remove ${dependants.length === 1 ? "that dependency" : "those dependencies"} first.`,
      422,
      { dependants: names },
      { dependants: dependants.map((d) => ({ id: d.id, name: d.name })) },
    );
  }

  return {
    async list(slug: string, query: MilestoneListQuery, reader: Reader): Promise<Milestone[]> {
      const view = ctx.viewOf(await projects.get(slug), viewerOf(reader), query.at);
      const records = await listMilestones(db, view.project.id, view.viewer, { audience: query.audience, system: query.system, area: query.area, removed: query.removed });
      const list = await presentAll(records, view);
      return query.status ? list.filter((m) => m.status === query.status) : list;
    },

    /** Areas named by the project's public milestones: the area topics a visitor may subscribe to. */
    publicAreas: (projectId: number): Promise<string[]> => listAreas(db, projectId, "public"),

    /** Every area the project's milestones name (any audience, removed or not), for staff tagging photos. */
    allAreas: (projectId: number): Promise<string[]> => listAllAreas(db, projectId),

    /** Every milestone of the project by id and name (any audience, removed or not), by baseline finish: what a photo may be tagged with. */
    milestoneNames: (projectId: number): Promise<Array<{ id: number; name: string }>> => listMilestoneNames(db, projectId),

    /** Which of these ids are milestones of the project (removed or not). */
    milestoneIdsOf: (projectId: number, ids: readonly number[]): Promise<Set<number>> => existingMilestoneIds(db, projectId, ids),

    async create(slug: string, input: MilestoneCreateInput, actor: Actor): Promise<Milestone> {
      const project = await projects.get(slug);
      return db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const all = await listMilestones(trx, project.id, "staff");
        const dependsOn = uniqueSorted(input.dependsOn);
        const fields: Record<string, string> = {};
        checkActual(input.actualFinish, project, fields);
        await ctx.checkDependencies(trx, project, null, dependsOn, all, fields);
        if (Object.keys(fields).length > 0) throw invalid(fields);

        const at = now();
        const next: MilestoneFields = {
          phaseId: await findOrCreatePhase(trx, project.id, input.phase),
          ...storedValuesOf(input),
          percentComplete: input.actualFinish ? 100 : input.percentComplete,
          // Until someone says otherwise, a milestone is forecast to finish on its baseline date;
          // storing that makes the first real change of forecast a measurable move.
          forecastFinish: input.forecastFinish ?? input.baselineFinish,
        };
        const id = await insertMilestone(trx, project.id, next, at);
        await replaceDependencies(trx, id, dependsOn);
        await insertEvents(trx, eventsFor(null, next, { milestoneId: id, projectId: project.id, at, byUserId: actor.user?.id ?? null, note: null }));
        const { phaseId: _phaseId, ...values } = next;
        await record(trx, actor, "milestone_created", { type: "milestone", id, label: next.name }, { project: project.slug, ...values, phase: input.phase, dependsOn });
        return presentWritten(trx, id, project);
      });
    },

    async patch(id: number, input: MilestonePatchInput, actor: Actor): Promise<Milestone> {
      return changeMilestone(id, async (trx, before, project) => {
        if (before.removal) throw removedError(before, project);
        if (before.version !== input.version) throw await ctx.conflictWith(trx, id, project);

        // Each field the patch gives replaces the stored one; the baseline finish changes only by re-baselining.
        const next: MilestoneFields = { ...fieldsOf(before) };
        for (const key of Object.keys(next) as Array<keyof MilestoneFields>) {
          if (key !== "phaseId" && key !== "baselineFinish" && input[key] !== undefined) (next as Record<string, unknown>)[key] = input[key];
        }
        if (next.actualFinish !== null) next.percentComplete = 100;

        const fields: Record<string, string> = {};
        if (input.actualFinish !== undefined) checkActual(input.actualFinish, project, fields);
        checkStart(next.plannedStart, next.baselineFinish, fields);
        const dependsOn = input.dependsOn === undefined ? before.dependsOn : uniqueSorted(input.dependsOn);
        const dependenciesChange = !sameIds(dependsOn, before.dependsOn);
        if (dependenciesChange) {
          await ctx.checkDependencies(trx, project, id, dependsOn, await listMilestones(trx, project.id, "staff"), fields);
        }
        if (Object.keys(fields).length > 0) throw invalid(fields);
        if (input.phase !== undefined && input.phase !== before.phase) next.phaseId = await findOrCreatePhase(trx, project.id, input.phase);

        const at = now();
        const changes = changeDetail(before, next, { phase: input.phase, dependsOn });
        const written = await ctx.writeUpdate(trx, before, next, { at, byUserId: actor.user?.id ?? null, note: input.note ?? null }, project);
        if (dependenciesChange) {
          if (!written) await ctx.touch(trx, before, at, project);
          await replaceDependencies(trx, id, dependsOn);
        }
        if (written || dependenciesChange) {
          await record(trx, actor, "milestone_updated", { type: "milestone", id, label: next.name }, { project: project.slug, changes, note: input.note ?? null });
        }
        return presentWritten(trx, id, project);
      });
    },

    /**
     * Deletes a milestone entered by mistake: only while nothing has it on record (see
     * `onRecord`); otherwise 409 `on_record`, and the caller removes it from the programme.
     */
    async delete(id: number, input: { reason?: string }, actor: Actor): Promise<void> {
      await changeMilestone(id, async (trx, m, project) => {
        await refuseWhileDepended(trx, m, "all");
        const reasons = await onRecord(trx, m);
        if (reasons.length > 0) {
          throw new AppError(
            "on_record",
            `${m.name} is on record (${reasons.join("; ")}), so it cannot be deleted. Remove it from the programme instead, with a reason: it leaves every figure and its history stays.`,
            409,
            undefined,
            { onRecord: reasons },
          );
        }
        const { phaseId: _phaseId, ...values } = fieldsOf(m);
        await record(trx, actor, "milestone_deleted", { type: "milestone", id, label: m.name }, { project: project.slug, reason: input.reason ?? null, milestone: { ...values, phase: m.phase, dependsOn: m.dependsOn } });
        await deleteMilestone(trx, id);
      });
    },

    /**
     * Takes a milestone out of the programme with a reason: it keeps its row and history (a
     * `removed` event carries the reason), leaves health, curve, counts and forecast completion,
     * and "what moved" and digests report it to the audiences that may see it.
     */
    async removeFromProgramme(id: number, input: MilestoneRemovalInput, actor: Actor): Promise<Milestone> {
      return changeMilestone(id, async (trx, m, project) => {
        if (m.removal) throw removedError(m, project);
        await refuseWhileDepended(trx, m, "in programme");
        const at = now();
        const byUserId = actor.user?.id ?? null;
        if ((await setRemoval(trx, id, m.version, { at, byUserId, reason: input.reason }, at)) === 0) throw await ctx.conflictWith(trx, id, project);
        await insertEvents(trx, [{ milestoneId: id, projectId: project.id, field: "removed", from: "false", to: "true", at, byUserId, note: input.reason, baselineVersion: null }]);
        await record(trx, actor, "milestone_removed", { type: "milestone", id, label: m.name }, { project: project.slug, reason: input.reason });
        return presentWritten(trx, id, project);
      });
    },

    /** Puts a removed milestone back into the programme, with a reason (a `removed` event "true" → "false"). */
    async restore(id: number, input: MilestoneRemovalInput, actor: Actor): Promise<Milestone> {
      return changeMilestone(id, async (trx, m, project) => {
        if (!m.removal) throw new AppError("not_removed", `${m.name} is in the programme; there is nothing to restore.`, 409);
        const removedPredecessors = (await listMilestones(trx, project.id, "staff", { removed: "only" })).filter((x) => m.dependsOn.includes(x.id));
        if (removedPredecessors.length > 0) {
          const names = removedPredecessors.map((x) => x.name).join(", ");
          throw invalid({ dependsOn: `names ${removedPredecessors.length === 1 ? "a milestone" : "milestones"} removed from the programme (${names}); restore ${removedPredecessors.length === 1 ? "it" : "them"} first` }, "depends_on_removed");
        }
        const at = now();
        const byUserId = actor.user?.id ?? null;
        if ((await setRemoval(trx, id, m.version, null, at)) === 0) throw await ctx.conflictWith(trx, id, project);
        await insertEvents(trx, [{ milestoneId: id, projectId: project.id, field: "removed", from: "true", to: "false", at, byUserId, note: input.reason, baselineVersion: null }]);
        await record(trx, actor, "milestone_restored", { type: "milestone", id, label: m.name }, { project: project.slug, reason: input.reason, removedAt: m.removal.at.toISOString(), removedReason: m.removal.reason });
        return presentWritten(trx, id, project);
      });
    },

    /** Moves the forecasts of several open milestones by a number of the project's working days. */
    async shift(slug: string, input: ShiftInput, actor: Actor): Promise<Milestone[]> {
      const project = await projects.get(slug);
      const settings = settingsOf(project);
      return db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const all = await listMilestones(trx, project.id, "staff");
        const byId = new Map(all.map((m) => [m.id, m]));
        const ids = uniqueSorted(input.ids);
        const unknown = ids.filter((i) => !byId.has(i));
        if (unknown.length > 0) throw invalid({ ids: `names no milestone of this project: ${unknown.join(", ")}` });
        const complete = ids.map((i) => byId.get(i)!).filter((m) => m.actualFinish !== null);
        if (complete.length > 0) {
          throw invalid({ ids: `includes finished milestones, whose forecast no longer applies: ${complete.map((m) => m.name).join(", ")}` });
        }
        const at = now();
        for (const id of ids) {
          const m = byId.get(id)!;
          const from = m.forecastFinish ?? m.baselineFinish;
          const next = { ...fieldsOf(m), forecastFinish: addWorkingDays(from, input.workingDays, settings.calendar) };
          await ctx.writeUpdate(trx, m, next, { at, byUserId: actor.user?.id ?? null, note: input.note ?? null }, project);
        }
        await record(trx, actor, "milestones_shifted", { type: "project", id: project.id, label: project.slug }, {
          workingDays: input.workingDays,
          note: input.note ?? null,
          milestones: ids.map((i) => ({ id: i, name: byId.get(i)!.name, from: byId.get(i)!.forecastFinish ?? byId.get(i)!.baselineFinish })),
        });
        const view = staffView(project);
        return presentAll((await listMilestones(trx, project.id, "staff")).filter((m) => ids.includes(m.id)), view, trx);
      });
    },
  };
}
