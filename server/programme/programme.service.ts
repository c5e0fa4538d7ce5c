import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";
import type {
  BaselineDetail,
  BaselineInput,
  BaselineVersion,
  CostActualRow,
  CsvImportResult,
  CurveResponse,
  Milestone,
  MilestoneCreateInput,
  MilestoneEventFieldName,
  MilestoneEventRow,
  MilestoneMovesRow,
  MilestonePatchInput,
  MilestoneRemovalInput,
  ShiftInput,
} from "#shared/schemas/programme.ts";
import { viewerOfRole } from "#shared/domain/audience.ts";
import { addWorkingDays, daysBetween } from "#shared/domain/calendar.ts";
import { summariseChanges } from "#shared/domain/programme-changes.ts";
import { drivingChain, findCycle, projectDrivers, type DrivingLink, type ProjectDrivers } from "#shared/domain/programme-dependencies.ts";
import {
  computeProgrammeHealth,
  earnedCurve,
  earnedPercentOfMilestone,
  milestoneFinish,
  milestoneSlip,
  milestoneStatus,
  type MilestoneInput,
  type ProgrammeHealth,
  type ProgrammeSettings,
} from "#shared/domain/programme-health.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { dateInZone, endOfDateInZone, startOfDateInZone, type ProjectsService } from "../projects/projects.service.ts";
import { milestonesToCsv, parseMilestoneCsv, type CsvMilestoneRow, type MilestoneCsvColumn } from "./programme.csv.ts";
import {
  baselinesHolding,
  countEventsSince,
  deleteMilestone,
  findBaseline,
  findMilestone,
  findMilestoneProjectId,
  findOrCreatePhase,
  insertBaseline,
  insertEvents,
  insertMilestone,
  listAreas,
  listBaselines,
  listCostActuals,
  listDependants,
  listDependencyEdges,
  listMilestoneEvents,
  listMilestones,
  listProjectEvents,
  lockProject,
  maxBaselineNumber,
  replaceDependencies,
  setRemoval,
  updateMilestone,
  upsertCostActual,
  type BaselineSnapshotEntry,
  type MilestoneFields,
  type MilestoneFilter,
  type MilestoneRecord,
  type NewMilestoneEvent,
  type Viewer,
} from "./programme.repository.ts";

type Trx = Knex.Transaction;

/** The health endpoint's answer: the domain figures over what the caller may see, and what drives completion. */
export type ProgrammeHealthResponse = ProgrammeHealth & { drivers: ProjectDrivers | null; timeZone: string };

/** The fields whose every change is an event, by event field name. */
const TRACKED: ReadonlyArray<[MilestoneEventFieldName, keyof MilestoneFields]> = [
  ["forecast_finish", "forecastFinish"],
  ["actual_finish", "actualFinish"],
  ["percent_complete", "percentComplete"],
  ["baseline_finish", "baselineFinish"],
  ["audience", "audience"],
  ["planned_start", "plannedStart"],
  ["weight", "weight"],
];

/**
 * Something outside the programme that links a milestone (an update, a photo's tag). Such a
 * milestone is on record: it can be removed from the programme but not deleted.
 */
export interface MilestoneReference {
  kind: "update" | "story" | "photo";
  id: number;
  label: string;
}

/** A curve of more points than this is a mistake in the query, not a chart. */
const MAX_CURVE_POINTS = 2_000;

const viewerOf = (actor: Actor): Viewer => viewerOfRole(actor.user?.role);

function settingsOf(project: Project): ProgrammeSettings {
  return {
    toleranceWorkingDays: project.settings.toleranceWorkingDays,
    behindWorkingDays: project.settings.behindWorkingDays,
    calendar: { weekendDays: project.settings.weekendDays, holidays: project.settings.holidays },
  };
}

function toInput(m: MilestoneRecord): MilestoneInput {
  return {
    id: m.id,
    name: m.name,
    weight: m.weight,
    percentComplete: m.percentComplete,
    plannedStart: m.plannedStart,
    baselineFinish: m.baselineFinish,
    forecastFinish: m.forecastFinish,
    actualFinish: m.actualFinish,
    budget: m.budget,
    dependsOn: m.dependsOn,
  };
}

function fieldsOf(m: MilestoneRecord): MilestoneFields {
  return {
    phaseId: m.phaseId,
    name: m.name,
    area: m.area,
    system: m.system,
    description: m.description,
    weight: m.weight,
    percentComplete: m.percentComplete,
    plannedStart: m.plannedStart,
    baselineFinish: m.baselineFinish,
    forecastFinish: m.forecastFinish,
    actualFinish: m.actualFinish,
    audience: m.audience,
    budget: m.budget,
  };
}

const eventValue = (v: unknown): string | null => (v === null || v === undefined ? null : String(v));

/** The fields that differ between the stored row and the next one. */
function changedFields(before: MilestoneFields, next: MilestoneFields): Partial<MilestoneFields> {
  const changes: Partial<MilestoneFields> = {};
  for (const key of Object.keys(next) as Array<keyof MilestoneFields>) {
    if (before[key] !== next[key]) (changes as Record<string, unknown>)[key] = next[key];
  }
  return changes;
}

interface EventContext {
  milestoneId: number;
  projectId: number;
  at: Date;
  byUserId: number | null;
  note: string | null;
  baselineVersion?: number | null;
}

/** One event per tracked field that changed; `before` null for a new milestone (only the values it starts with). */
function eventsFor(before: MilestoneFields | null, next: MilestoneFields, ctx: EventContext): NewMilestoneEvent[] {
  const events: NewMilestoneEvent[] = [];
  for (const [field, key] of TRACKED) {
    const from = before === null ? null : eventValue(before[key]);
    const to = eventValue(next[key]);
    if (before === null) {
      // A new milestone's plan, forecast and audience are where it starts, not moves; its
      // progress and completion are recorded so the S-curve can be replayed from zero.
      if (field !== "actual_finish" && field !== "percent_complete") continue;
      if (to === null || (field === "percent_complete" && next.percentComplete === 0)) continue;
    } else if (from === to) {
      continue;
    }
    events.push({
      milestoneId: ctx.milestoneId,
      projectId: ctx.projectId,
      field,
      from,
      to,
      at: ctx.at,
      byUserId: ctx.byUserId,
      note: ctx.note,
      baselineVersion: ctx.baselineVersion ?? null,
    });
  }
  return events;
}

const sameIds = (a: readonly number[], b: readonly number[]) => a.length === b.length && a.every((v, i) => v === b[i]);
const uniqueSorted = (ids: readonly number[]) => [...new Set(ids)].sort((x, y) => x - y);

/** A 422 naming each field and what is wrong with it; `code` says what was refused. */
function invalid(fields: Record<string, string>, code = "invalid_milestone"): AppError {
  const message = Object.entries(fields)
    .map(([field, problem]) => `${field} ${problem}`)
    .join("; ");
  return new AppError(code, `Check ${message}.`, 422, fields);
}

function cycleWords(cycle: readonly number[], nameOf: (id: number) => string): string {
  const names = cycle.map(nameOf);
  return `${[...names, names[0]].join(" → ")}`;
}

export function createProgrammeService(deps: {
  db: Db;
  projects: ProjectsService;
  /** Every programme write leaves an audit entry; the seed, which writes through its own path, may leave it out. */
  audit?: AuditService;
  /**
   * What else links a milestone (updates, photos). Those modules read the programme, so they
   * are built after it and this is asked only when a milestone is to be deleted.
   */
  references?: (milestoneId: number) => Promise<MilestoneReference[]>;
}) {
  const { db, projects } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const now = () => projects.now();

  function record(
    trx: Trx,
    actor: Actor,
    action: AuditAction,
    target: { type: "milestone" | "project"; id: number; label: string },
    detail: Record<string, unknown>,
  ): Promise<void> {
    return audit.record({ action, actor, target, detail }, trx);
  }

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
    for (const kind of ["update", "story", "photo"] as const) {
      const of = refs.filter((r) => r.kind === kind);
      if (of.length > 0) reasons.push(`${of.length === 1 ? `a ${kind} links it` : `${of.length} ${kind === "story" ? "stories" : `${kind}s`} link it`} (${of.map((r) => r.label).join(", ")})`);
    }
    if (m.removal) reasons.push("it has been removed from the programme");
    else if ((await countEventsSince(trx, m.id, m.createdAt)) > 0) reasons.push("its history records changes since it was entered");
    return reasons;
  }

  interface View {
    project: Project;
    settings: ProgrammeSettings;
    at: string;
    viewer: Viewer;
  }

  function present(m: MilestoneRecord, view: View): Milestone {
    const input = toInput(m);
    const slip = milestoneSlip(input, view.settings);
    return {
      id: m.id,
      name: m.name,
      phase: m.phase,
      phaseId: m.phaseId,
      area: m.area,
      system: m.system,
      description: m.description,
      weight: m.weight,
      percentComplete: m.percentComplete,
      plannedStart: m.plannedStart,
      baselineFinish: m.baselineFinish,
      forecastFinish: m.forecastFinish,
      actualFinish: m.actualFinish,
      audience: m.audience,
      // Visitors never get money.
      budget: view.viewer === "public" ? null : m.budget,
      dependsOn: m.dependsOn,
      status: milestoneStatus(input, view.at, view.settings),
      slipDays: slip.slipDays,
      slipWorkingDays: slip.slipWorkingDays,
      version: m.version,
      updatedAt: m.updatedAt.toISOString(),
      removal: m.removal ? { at: m.removal.at.toISOString(), by: m.removal.by, reason: m.removal.reason } : null,
    };
  }

  function staffView(project: Project): View {
    return { project, settings: settingsOf(project), at: projects.today(project), viewer: "staff" };
  }

  async function conflictWith(trx: Trx, id: number, project: Project): Promise<AppError> {
    const current = await findMilestone(trx, id, "staff", { forUpdate: true });
    if (!current) return notFound("That milestone");
    return new AppError(
      "conflict",
      "Someone else changed this milestone after you loaded it. The current values are attached; apply your change to them.",
      409,
      undefined,
      { current: present(current, staffView(project)) },
    );
  }

  /** Project of a milestone, for routes addressed by milestone id. */
  async function projectOfMilestone(id: number): Promise<Project> {
    const projectId = await findMilestoneProjectId(db, id);
    if (projectId === null) throw notFound("That milestone");
    return projects.getById(projectId);
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

  /** Unknown or foreign predecessors, and a cycle once this milestone's dependencies are replaced. */
  async function checkDependencies(
    trx: Trx,
    project: Project,
    selfId: number | null,
    dependsOn: readonly number[],
    all: readonly MilestoneRecord[],
    fields: Record<string, string>,
  ): Promise<void> {
    const byId = new Map(all.map((m) => [m.id, m]));
    const unknown = dependsOn.filter((id) => !byId.has(id));
    if (unknown.length > 0) {
      fields.dependsOn = `names no milestone of this project: ${unknown.join(", ")}`;
      return;
    }
    if (selfId === null) return; // a new milestone has no dependants yet, so it cannot close a loop
    const edges = (await listDependencyEdges(trx, project.id)).filter((e) => e.to !== selfId);
    for (const from of dependsOn) edges.push({ from, to: selfId });
    const cycle = findCycle(edges);
    if (cycle) {
      fields.dependsOn = `would make a dependency cycle: ${cycleWords(cycle, (id) => byId.get(id)?.name ?? `#${id}`)}`;
    }
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

  async function writeUpdate(
    trx: Trx,
    before: MilestoneRecord,
    next: MilestoneFields,
    ctx: Omit<EventContext, "milestoneId" | "projectId">,
    project: Project,
  ): Promise<boolean> {
    const changes = changedFields(fieldsOf(before), next);
    if (Object.keys(changes).length === 0) return false;
    const rows = await updateMilestone(trx, before.id, before.version, changes, ctx.at);
    if (rows === 0) throw await conflictWith(trx, before.id, project);
    await insertEvents(trx, eventsFor(fieldsOf(before), next, { ...ctx, milestoneId: before.id, projectId: before.projectId }));
    return true;
  }

  /** Bumps the version of a milestone whose only change is its dependencies. */
  async function touch(trx: Trx, before: MilestoneRecord, at: Date, project: Project): Promise<void> {
    const rows = await updateMilestone(trx, before.id, before.version, {}, at);
    if (rows === 0) throw await conflictWith(trx, before.id, project);
  }

  async function listView(slug: string, actor: Actor, at?: string) {
    const project = await projects.get(slug);
    const view: View = { project, settings: settingsOf(project), at: at ?? projects.today(project), viewer: viewerOf(actor) };
    return view;
  }

  return {
    async list(slug: string, query: MilestoneFilter & { at?: string; status?: Milestone["status"] }, actor: Actor): Promise<Milestone[]> {
      const view = await listView(slug, actor, query.at);
      const records = await listMilestones(db, view.project.id, view.viewer, { audience: query.audience, system: query.system, area: query.area, removed: query.removed });
      const list = records.map((m) => present(m, view));
      return query.status ? list.filter((m) => m.status === query.status) : list;
    },

    /** Areas named by the project's public milestones: the area topics a visitor may subscribe to. */
    publicAreas: (projectId: number): Promise<string[]> => listAreas(db, projectId, "public"),

    async create(slug: string, input: MilestoneCreateInput, actor: Actor): Promise<Milestone> {
      const project = await projects.get(slug);
      return db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const all = await listMilestones(trx, project.id, "staff");
        const dependsOn = uniqueSorted(input.dependsOn);
        const fields: Record<string, string> = {};
        checkActual(input.actualFinish, project, fields);
        await checkDependencies(trx, project, null, dependsOn, all, fields);
        if (Object.keys(fields).length > 0) throw invalid(fields);

        const at = now();
        const next: MilestoneFields = {
          phaseId: await findOrCreatePhase(trx, project.id, input.phase),
          name: input.name,
          area: input.area,
          system: input.system,
          description: input.description,
          weight: input.weight,
          percentComplete: input.actualFinish ? 100 : input.percentComplete,
          plannedStart: input.plannedStart,
          baselineFinish: input.baselineFinish,
          // Until someone says otherwise, a milestone is forecast to finish on its baseline date;
          // storing that makes the first real change of forecast a measurable move.
          forecastFinish: input.forecastFinish ?? input.baselineFinish,
          actualFinish: input.actualFinish,
          audience: input.audience,
          budget: input.budget,
        };
        const id = await insertMilestone(trx, project.id, next, at);
        await replaceDependencies(trx, id, dependsOn);
        await insertEvents(trx, eventsFor(null, next, { milestoneId: id, projectId: project.id, at, byUserId: actor.user?.id ?? null, note: null }));
        const { phaseId: _phaseId, ...values } = next;
        await record(trx, actor, "milestone_created", { type: "milestone", id, label: next.name }, { project: project.slug, ...values, phase: input.phase, dependsOn });
        return present((await findMilestone(trx, id, "staff"))!, staffView(project));
      });
    },

    async patch(id: number, input: MilestonePatchInput, actor: Actor): Promise<Milestone> {
      const project = await projectOfMilestone(id);
      return db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const before = await findMilestone(trx, id, "staff", { forUpdate: true });
        if (!before) throw notFound("That milestone");
        if (before.removal) throw removedError(before, project);
        if (before.version !== input.version) throw await conflictWith(trx, id, project);

        const pick = <K extends keyof MilestonePatchInput & keyof MilestoneFields>(key: K): MilestoneFields[K] =>
          (input[key] !== undefined ? input[key] : before[key]) as MilestoneFields[K];
        const next: MilestoneFields = {
          phaseId: before.phaseId,
          name: pick("name"),
          area: pick("area"),
          system: pick("system"),
          description: pick("description"),
          weight: pick("weight"),
          percentComplete: pick("percentComplete"),
          plannedStart: pick("plannedStart"),
          baselineFinish: before.baselineFinish,
          forecastFinish: pick("forecastFinish"),
          actualFinish: pick("actualFinish"),
          audience: pick("audience"),
          budget: pick("budget"),
        };
        if (next.actualFinish !== null) next.percentComplete = 100;

        const fields: Record<string, string> = {};
        if (input.actualFinish !== undefined) checkActual(input.actualFinish, project, fields);
        checkStart(next.plannedStart, next.baselineFinish, fields);
        const dependsOn = input.dependsOn === undefined ? before.dependsOn : uniqueSorted(input.dependsOn);
        const dependenciesChange = !sameIds(dependsOn, before.dependsOn);
        if (dependenciesChange) {
          await checkDependencies(trx, project, id, dependsOn, await listMilestones(trx, project.id, "staff"), fields);
        }
        if (Object.keys(fields).length > 0) throw invalid(fields);
        if (input.phase !== undefined && input.phase !== before.phase) next.phaseId = await findOrCreatePhase(trx, project.id, input.phase);

        const at = now();
        const changes = changeDetail(before, next, { phase: input.phase, dependsOn });
        const written = await writeUpdate(trx, before, next, { at, byUserId: actor.user?.id ?? null, note: input.note ?? null }, project);
        if (dependenciesChange) {
          if (!written) await touch(trx, before, at, project);
          await replaceDependencies(trx, id, dependsOn);
        }
        if (written || dependenciesChange) {
          await record(trx, actor, "milestone_updated", { type: "milestone", id, label: next.name }, { project: project.slug, changes, note: input.note ?? null });
        }
        return present((await findMilestone(trx, id, "staff"))!, staffView(project));
      });
    },

    /**
     * Deletes a milestone entered by mistake: only while nothing has it on record (see
     * `onRecord`); otherwise 409 `on_record`, and the caller removes it from the programme.
     */
    async delete(id: number, input: { reason?: string }, actor: Actor): Promise<void> {
      const project = await projectOfMilestone(id);
      await db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const m = await findMilestone(trx, id, "staff", { forUpdate: true });
        if (!m) throw notFound("That milestone");
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
      const project = await projectOfMilestone(id);
      return db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const m = await findMilestone(trx, id, "staff", { forUpdate: true });
        if (!m) throw notFound("That milestone");
        if (m.removal) throw removedError(m, project);
        await refuseWhileDepended(trx, m, "in programme");
        const at = now();
        const byUserId = actor.user?.id ?? null;
        if ((await setRemoval(trx, id, m.version, { at, byUserId, reason: input.reason }, at)) === 0) throw await conflictWith(trx, id, project);
        await insertEvents(trx, [{ milestoneId: id, projectId: project.id, field: "removed", from: "false", to: "true", at, byUserId, note: input.reason, baselineVersion: null }]);
        await record(trx, actor, "milestone_removed", { type: "milestone", id, label: m.name }, { project: project.slug, reason: input.reason });
        return present((await findMilestone(trx, id, "staff"))!, staffView(project));
      });
    },

    /** Puts a removed milestone back into the programme, with a reason (a `removed` event "true" → "false"). */
    async restore(id: number, input: MilestoneRemovalInput, actor: Actor): Promise<Milestone> {
      const project = await projectOfMilestone(id);
      return db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const m = await findMilestone(trx, id, "staff", { forUpdate: true });
        if (!m) throw notFound("That milestone");
        if (!m.removal) throw new AppError("not_removed", `${m.name} is in the programme; there is nothing to restore.`, 409);
        const removedPredecessors = (await listMilestones(trx, project.id, "staff", { removed: "only" })).filter((x) => m.dependsOn.includes(x.id));
        if (removedPredecessors.length > 0) {
          const names = removedPredecessors.map((x) => x.name).join(", ");
          throw invalid({ dependsOn: `names ${removedPredecessors.length === 1 ? "a milestone" : "milestones"} removed from the programme (${names}); restore ${removedPredecessors.length === 1 ? "it" : "them"} first` }, "depends_on_removed");
        }
        const at = now();
        const byUserId = actor.user?.id ?? null;
        if ((await setRemoval(trx, id, m.version, null, at)) === 0) throw await conflictWith(trx, id, project);
        await insertEvents(trx, [{ milestoneId: id, projectId: project.id, field: "removed", from: "true", to: "false", at, byUserId, note: input.reason, baselineVersion: null }]);
        await record(trx, actor, "milestone_restored", { type: "milestone", id, label: m.name }, { project: project.slug, reason: input.reason, removedAt: m.removal.at.toISOString(), removedReason: m.removal.reason });
        return present((await findMilestone(trx, id, "staff"))!, staffView(project));
      });
    },

    async shift(slug: string, input: ShiftInput, actor: Actor): Promise<Milestone[]> {
      const project = await projects.get(slug);
      const settings = settingsOf(project);
      return db.transaction(async (trx) => {
        await lockProject(trx, project.id);
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
          await writeUpdate(trx, m, next, { at, byUserId: actor.user?.id ?? null, note: input.note ?? null }, project);
        }
        await record(trx, actor, "milestones_shifted", { type: "project", id: project.id, label: project.slug }, {
          workingDays: input.workingDays,
          note: input.note ?? null,
          milestones: ids.map((i) => ({ id: i, name: byId.get(i)!.name, from: byId.get(i)!.forecastFinish ?? byId.get(i)!.baselineFinish })),
        });
        const view = staffView(project);
        return (await listMilestones(trx, project.id, "staff")).filter((m) => ids.includes(m.id)).map((m) => present(m, view));
      });
    },

    async events(id: number, actor: Actor): Promise<MilestoneEventRow[]> {
      const m = await findMilestone(db, id, viewerOf(actor));
      if (!m) throw notFound("That milestone");
      return listMilestoneEvents(db, id);
    },

    async drivers(id: number, actor: Actor): Promise<DrivingLink[]> {
      const viewer = viewerOf(actor);
      const m = await findMilestone(db, id, viewer);
      if (!m) throw notFound("That milestone");
      // A removed milestone's history stays readable, and so does what drove it.
      const visible = await listMilestones(db, m.projectId, viewer, { removed: m.removal ? "include" : "exclude" });
      return drivingChain(id, visible.map(toInput));
    },

    /** Events in [from, to], dates inclusive in the project's time zone, of milestones the caller may see; newest first. */
    async changes(slug: string, range: { from: string; to: string }, actor: Actor): Promise<MilestoneEventRow[]> {
      const project = await projects.get(slug);
      return listProjectEvents(db, project.id, viewerOf(actor), {
        from: startOfDateInZone(range.from, project.timeZone),
        before: endOfDateInZone(range.to, project.timeZone),
      });
    },

    async moves(slug: string, range: { from: string; to: string }, actor: Actor): Promise<MilestoneMovesRow[]> {
      const project = await projects.get(slug);
      const events = await listProjectEvents(db, project.id, viewerOf(actor), {
        from: startOfDateInZone(range.from, project.timeZone),
        before: endOfDateInZone(range.to, project.timeZone),
      });
      const names = new Map(events.map((e) => [e.milestoneId, e.milestoneName]));
      const summary = summariseChanges(
        events.map((e) => ({ milestoneId: e.milestoneId, field: e.field, from: e.from, to: e.to, at: e.at, note: e.note })),
        range.from,
        range.to,
        (at) => dateInZone(new Date(at), project.timeZone),
      );
      return summary.map((s) => ({ milestoneId: s.milestoneId, milestoneName: names.get(s.milestoneId) ?? "", moves: s.moves }));
    },

    async health(slug: string, query: { at?: string }, actor: Actor): Promise<ProgrammeHealthResponse> {
      const view = await listView(slug, actor, query.at);
      const inputs = (await listMilestones(db, view.project.id, view.viewer)).map(toInput);
      const costs = view.viewer === "public" ? [] : await listCostActuals(db, view.project.id);
      const health = computeProgrammeHealth({
        milestones: inputs,
        at: view.at,
        settings: view.settings,
        // No cost actuals recorded means cost is not tracked (AC null), not that nothing was spent.
        costActuals: costs.length > 0 ? costs : undefined,
        currency: view.project.currency,
      });
      return {
        ...health,
        money: view.viewer === "public" ? null : health.money,
        drivers: projectDrivers(inputs),
        timeZone: view.project.timeZone,
      };
    },

    async curve(slug: string, query: { from?: string; to?: string; step?: number }, actor: Actor): Promise<CurveResponse> {
      const view = await listView(slug, actor);
      const records = await listMilestones(db, view.project.id, view.viewer);
      const inputs = records.map(toInput);
      const at = view.at;
      if (inputs.length === 0) return { at, points: [] };
      const from = query.from ?? inputs.reduce((min, m) => ((m.plannedStart ?? m.baselineFinish) < min ? (m.plannedStart ?? m.baselineFinish) : min), "9999-12-31");
      const to =
        query.to ??
        inputs.reduce((max, m) => {
          const latest = milestoneFinish(m) > m.baselineFinish ? milestoneFinish(m) : m.baselineFinish;
          return latest > max ? latest : max;
        }, "0000-01-01");
      const step = query.step ?? 7;
      if (to < from) throw new AppError("validation", "Check to.", 400, { to: "must not be before from" });
      if (daysBetween(from, to) / step > MAX_CURVE_POINTS) {
        throw new AppError("validation", "Check step.", 400, { step: `gives more than ${MAX_CURVE_POINTS} points between from and to; use a longer step` });
      }
      const grid = earnedCurve({ milestones: inputs, from, to, stepDays: step, at });
      const pastDates = grid.map((p) => p.date).filter((d) => d < at);
      const earned = await replayEarned(view, records, pastDates);
      return {
        at,
        points: grid.map((p) => ({
          date: p.date,
          plannedPercent: p.plannedPercent,
          earnedPercent: p.date < at ? (earned.get(p.date) ?? null) : p.date === at ? (p.earnedPercent ?? null) : null,
        })),
      };
    },

    async baselines(slug: string, actor: Actor): Promise<BaselineVersion[]> {
      const project = await projects.get(slug);
      return listBaselines(db, project.id, viewerOf(actor));
    },

    async baseline(slug: string, number: number, actor: Actor): Promise<BaselineDetail> {
      const project = await projects.get(slug);
      const viewer = viewerOf(actor);
      const b = await findBaseline(db, project.id, number, viewer);
      if (!b) throw notFound("That baseline version");
      return { ...b, milestones: b.milestones.map((e) => ({ ...e, budget: viewer === "public" ? null : e.budget })) };
    },

    /**
     * Re-baselining: version n+1 records the plan it sets. Open milestones take their
     * forecast as the new baseline finish (unless `adoptForecasts` is false); finished
     * ones keep the baseline their work was measured against; `overrides` set
     * particular ones. Each baseline change is an event tagged with the version.
     */
    async rebaseline(slug: string, input: BaselineInput, actor: Actor): Promise<BaselineVersion> {
      const project = await projects.get(slug);
      return db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const all = await listMilestones(trx, project.id, "staff");
        const byId = new Map(all.map((m) => [m.id, m]));
        const overrides = new Map<number, BaselineInput["overrides"][number]>();
        const problems: string[] = [];
        for (const o of input.overrides) {
          if (!byId.has(o.id)) problems.push(`${o.id} is not a milestone of this project`);
          else if (overrides.has(o.id)) problems.push(`${byId.get(o.id)!.name} is given twice`);
          overrides.set(o.id, o);
        }
        if (problems.length > 0) throw invalid({ overrides: problems.join("; ") }, "invalid_baseline");

        const plan = all.map((m) => {
          const o = overrides.get(m.id);
          const adopted = input.adoptForecasts && m.actualFinish === null && m.forecastFinish !== null ? m.forecastFinish : m.baselineFinish;
          const baselineFinish = o ? o.baselineFinish : adopted;
          const plannedStart = o && o.plannedStart !== undefined ? o.plannedStart : m.plannedStart;
          return { m, next: { ...fieldsOf(m), baselineFinish, plannedStart } };
        });
        const late = plan.filter((p) => p.next.plannedStart !== null && p.next.plannedStart > p.next.baselineFinish);
        if (late.length > 0) {
          throw invalid(
            {
              [overrides.size > 0 ? "overrides" : "adoptForecasts"]: `would put a planned start after the baseline finish: ${late.map((p) => `${p.m.name} (${p.next.plannedStart} > ${p.next.baselineFinish})`).join(", ")}`,
            },
            "invalid_baseline",
          );
        }

        const number = (await maxBaselineNumber(trx, project.id)) + 1;
        const at = now();
        const snapshot: BaselineSnapshotEntry[] = plan.map(({ m, next }) => ({
          id: m.id,
          name: m.name,
          audience: m.audience,
          plannedStart: next.plannedStart,
          baselineFinish: next.baselineFinish,
          weight: m.weight,
          budget: m.budget,
        }));
        await insertBaseline(trx, { projectId: project.id, number, reason: input.reason, byUserId: actor.user?.id ?? null, at, snapshot });
        let moved = 0;
        for (const { m, next } of plan) {
          if (await writeUpdate(trx, m, next, { at, byUserId: actor.user?.id ?? null, note: input.reason, baselineVersion: number }, project)) moved += 1;
        }
        await record(trx, actor, "programme_rebaselined", { type: "project", id: project.id, label: project.slug }, {
          number,
          reason: input.reason,
          adoptForecasts: input.adoptForecasts,
          overrides: input.overrides.length,
          milestones: snapshot.length,
          changed: moved,
        });
        return { number, reason: input.reason, by: actor.user?.name ?? null, at: at.toISOString(), milestoneCount: snapshot.length };
      });
    },

    async costActuals(slug: string): Promise<CostActualRow[]> {
      const project = await projects.get(slug);
      return listCostActuals(db, project.id);
    },

    async addCostActual(slug: string, input: { periodEnd: string; amount: number }, actor: Actor): Promise<CostActualRow> {
      const project = await projects.get(slug);
      await db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const previous = (await listCostActuals(trx, project.id)).find((c) => c.periodEnd === input.periodEnd)?.amount ?? null;
        await upsertCostActual(trx, project.id, { ...input, byUserId: actor.user?.id ?? null, at: now() });
        await record(trx, actor, "cost_actual_recorded", { type: "project", id: project.id, label: project.slug }, { periodEnd: input.periodEnd, amount: input.amount, previous, currency: project.currency });
      });
      return { periodEnd: input.periodEnd, amount: input.amount };
    },

    async exportCsv(slug: string): Promise<{ filename: string; csv: string }> {
      const project = await projects.get(slug);
      const all = await listMilestones(db, project.id, "staff");
      return { filename: `${project.slug}-milestones.csv`, csv: milestonesToCsv(all) };
    },

    async importCsv(slug: string, csv: string, actor: Actor): Promise<CsvImportResult> {
      const project = await projects.get(slug);
      const parsed = parseMilestoneCsv(csv);
      return db.transaction(async (trx) => {
        await lockProject(trx, project.id);
        const existing = await listMilestones(trx, project.id, "staff");
        const plans = await planImport(trx, project, existing, parsed);
        const at = now();
        const ctx = { at, byUserId: actor.user?.id ?? null, note: "Imported from a CSV file" };
        const idOfKey = new Map<number, number>(existing.map((m) => [m.id, m.id]));
        const result: CsvImportResult = { created: 0, updated: 0, unchanged: 0 };
        const touched: Array<{ id: number; name: string; change: "created" | "updated" }> = [];
        for (const p of plans) {
          const phaseId = await findOrCreatePhase(trx, project.id, p.phase);
          const next = { ...p.next, phaseId };
          if (p.target === null) {
            const id = await insertMilestone(trx, project.id, next, at);
            idOfKey.set(p.key, id);
            await insertEvents(trx, eventsFor(null, next, { ...ctx, milestoneId: id, projectId: project.id }));
            result.created += 1;
            touched.push({ id, name: next.name, change: "created" });
            continue;
          }
          const written = await writeUpdate(trx, p.target, next, ctx, project);
          if (!written && p.dependenciesChange) await touch(trx, p.target, at, project);
          if (written || p.dependenciesChange) {
            result.updated += 1;
            touched.push({ id: p.target.id, name: next.name, change: "updated" });
          } else result.unchanged += 1;
        }
        for (const p of plans) {
          if (p.dependsOn === null || (p.target !== null && !p.dependenciesChange)) continue;
          await replaceDependencies(trx, idOfKey.get(p.key)!, uniqueSorted(p.dependsOn.map((k) => idOfKey.get(k)!)));
        }
        if (touched.length > 0) {
          await record(trx, actor, "programme_imported", { type: "project", id: project.id, label: project.slug }, { ...result, rows: parsed.rows.length, milestones: touched });
        }
        return result;
      });
    },
  };

  /**
   * Earned percent at each past date, reconstructed from the current state by undoing,
   * newest first, every percent and actual-finish event made after that date ended in
   * the project's time zone. Weights are today's, like the planned curve's.
   */
  async function replayEarned(view: View, records: readonly MilestoneRecord[], dates: readonly string[]): Promise<Map<string, number>> {
    const result = new Map<string, number>();
    if (dates.length === 0) return result;
    const tz = view.project.timeZone;
    const state = new Map(records.map((m) => [m.id, toInput(m)]));
    let totalWeight = 0;
    for (const m of records) totalWeight += m.weight;
    const events = await listProjectEvents(db, view.project.id, view.viewer, {
      from: endOfDateInZone(dates[0]!, tz),
      fields: ["percent_complete", "actual_finish"],
    });
    let next = 0;
    for (const date of [...dates].sort().reverse()) {
      const boundary = endOfDateInZone(date, tz).getTime();
      while (next < events.length && Date.parse(events[next]!.at) >= boundary) {
        const e = events[next]!;
        next += 1;
        const m = state.get(e.milestoneId);
        if (!m) continue;
        if (e.field === "percent_complete") m.percentComplete = e.from === null ? 0 : Number(e.from);
        else m.actualFinish = e.from;
      }
      // The same sum, in the same order, as computeProgrammeHealth's percent complete, so the
      // replayed point just before today and today's figure differ only by what changed.
      let earned = 0;
      for (const m of state.values()) earned += m.weight * (earnedPercentOfMilestone(m) / 100);
      result.set(date, totalWeight > 0 ? (earned / totalWeight) * 100 : 0);
    }
    return result;
  }

  interface ImportPlan {
    line: number;
    /** The stored milestone's id, or −line for a new one. */
    key: number;
    target: MilestoneRecord | null;
    phase: string;
    next: MilestoneFields;
    /** Keys of predecessors; null when the file has no depends_on column. */
    dependsOn: number[] | null;
    dependenciesChange: boolean;
  }

  /** Every check of an import, on every row; throws `csv_invalid` listing each bad row, so nothing is written. */
  async function planImport(trx: Trx, project: Project, existing: readonly MilestoneRecord[], parsed: ReturnType<typeof parseMilestoneCsv>): Promise<ImportPlan[]> {
    const today = projects.today(project);
    const problems = new Map<number, string[]>();
    const add = (line: number, reason: string) => {
      const list = problems.get(line);
      if (list) list.push(reason);
      else problems.set(line, [reason]);
    };
    for (const p of parsed.problems) add(p.line, p.reason);

    const byId = new Map(existing.map((m) => [m.id, m]));
    const removedIds = new Set((await listMilestones(trx, project.id, "staff", { removed: "only" })).map((m) => m.id));
    const byName = new Map<string, MilestoneRecord[]>();
    for (const m of existing) byName.set(m.name, [...(byName.get(m.name) ?? []), m]);

    const claimed = new Map<number, number>();
    const resolved: Array<{ row: CsvMilestoneRow; target: MilestoneRecord | null; key: number }> = [];
    for (const row of parsed.rows) {
      let target: MilestoneRecord | null = null;
      if (row.id !== null) {
        target = byId.get(row.id) ?? null;
        if (!target) {
          add(
            row.line,
            removedIds.has(row.id)
              ? `id ${row.id} was removed from the programme (restore it first, or leave id empty to add a milestone)`
              : `id ${row.id} is not a milestone of this project (leave id empty to add a milestone)`,
          );
          continue;
        }
      } else {
        const same = byName.get(row.input.name) ?? [];
        if (same.length > 1) {
          add(row.line, `name matches ${same.length} milestones (ids ${same.map((m) => m.id).join(", ")}); give the id`);
          continue;
        }
        target = same[0] ?? null;
      }
      if (target) {
        const other = claimed.get(target.id);
        if (other !== undefined) {
          add(row.line, `updates the same milestone as line ${other}`);
          continue;
        }
        claimed.set(target.id, row.line);
      }
      resolved.push({ row, target, key: target ? target.id : -row.line });
    }

    // Names after the import, for depends_on written as names.
    const keysByName = new Map<string, number[]>();
    const nameOfKey = new Map<number, string>();
    for (const m of existing) if (!claimed.has(m.id)) nameOfKey.set(m.id, m.name);
    for (const r of resolved) nameOfKey.set(r.key, r.row.input.name);
    for (const [key, name] of nameOfKey) keysByName.set(name, [...(keysByName.get(name) ?? []), key]);

    const plans: ImportPlan[] = [];
    for (const { row, target, key } of resolved) {
      const has = (c: MilestoneCsvColumn) => row.columns.has(c);
      const input = row.input;
      const stored = target ? fieldsOf(target) : null;
      const keep = <K extends keyof MilestoneFields>(column: MilestoneCsvColumn, key: K, value: MilestoneFields[K]): MilestoneFields[K] =>
        stored && !has(column) ? stored[key] : value;
      const next: MilestoneFields = {
        phaseId: stored?.phaseId ?? 0,
        name: input.name,
        area: keep("area", "area", input.area),
        system: input.system,
        description: keep("description", "description", input.description),
        weight: input.weight,
        percentComplete: keep("percent_complete", "percentComplete", input.percentComplete),
        plannedStart: keep("planned_start", "plannedStart", input.plannedStart),
        baselineFinish: input.baselineFinish,
        forecastFinish: keep("forecast_finish", "forecastFinish", stored ? input.forecastFinish : (input.forecastFinish ?? input.baselineFinish)),
        actualFinish: keep("actual_finish", "actualFinish", input.actualFinish),
        audience: input.audience,
        budget: keep("budget", "budget", input.budget),
      };
      if (next.actualFinish !== null) next.percentComplete = 100;
      if (next.actualFinish !== null && next.actualFinish > today && next.actualFinish !== stored?.actualFinish) {
        add(row.line, `actual_finish ${next.actualFinish} is after today (${today} in ${project.timeZone})`);
      }
      if (stored && next.baselineFinish !== stored.baselineFinish) {
        add(row.line, `baseline_finish changes only by re-baselining (it is ${stored.baselineFinish}, the file says ${next.baselineFinish})`);
      }
      if (next.plannedStart !== null && next.plannedStart > next.baselineFinish) {
        add(row.line, `planned_start ${next.plannedStart} is after the baseline finish ${next.baselineFinish}`);
      }

      let dependsOn: number[] | null = null;
      if (row.dependsOn !== null) {
        dependsOn = [];
        for (const token of row.dependsOn) {
          if (/^\d+$/.test(token)) {
            const id = Number(token);
            if (!byId.has(id)) add(row.line, `depends_on names no milestone of this project: ${token}`);
            else dependsOn.push(id);
            continue;
          }
          const keys = keysByName.get(token) ?? [];
          if (keys.length === 0) add(row.line, `depends_on names no milestone called "${token}"`);
          else if (keys.length > 1) add(row.line, `depends_on "${token}" names ${keys.length} milestones; use the id`);
          else dependsOn.push(keys[0]!);
        }
        dependsOn = [...new Set(dependsOn)];
      }
      const dependenciesChange = dependsOn !== null && (target === null ? dependsOn.length > 0 : !sameIds(uniqueSorted(dependsOn), target.dependsOn));
      plans.push({ line: row.line, key, target, phase: input.phase, next, dependsOn, dependenciesChange });
    }

    // A loop can only close through a row of the file: the stored programme has none.
    const replaced = new Set(plans.filter((p) => p.dependsOn !== null).map((p) => p.key));
    const edges = (await listDependencyEdges(trx, project.id)).filter((e) => !replaced.has(e.to));
    for (const p of plans) for (const from of p.dependsOn ?? []) edges.push({ from, to: p.key });
    const cycle = findCycle(edges);
    if (cycle) {
      const words = cycleWords(cycle, (k) => nameOfKey.get(k) ?? `#${k}`);
      const lines = plans.filter((p) => cycle.includes(p.key)).map((p) => p.line);
      for (const line of lines) add(line, `depends_on would make a dependency cycle: ${words}`);
    }

    if (problems.size > 0) {
      const rows = [...problems.entries()].sort(([a], [b]) => a - b).map(([line, reasons]) => ({ line, reason: reasons.join("; ") }));
      throw new AppError(
        "csv_invalid",
        `${rows.length === 1 ? "One row has" : `${rows.length} rows have`} problems; nothing was imported. Correct ${rows.length === 1 ? "it" : "them"} and import the file again.`,
        422,
        undefined,
        { rows },
      );
    }
    return plans;
  }
}

export type ProgrammeService = ReturnType<typeof createProgrammeService>;
