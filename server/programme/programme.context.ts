import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";
import { milestoneInputOf, type Milestone, type MilestoneEventFieldName } from "#shared/schemas/programme.ts";
import { viewerOfRole } from "#shared/domain/audience.ts";
import { findCycle } from "#shared/domain/programme-dependencies.ts";
import { milestoneSlip, milestoneStatus, type MilestoneInput, type ProgrammeSettings } from "#shared/domain/programme-health.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import { insertEvents, type NewMilestoneEvent } from "./programme.events.repository.ts";
import {
  findMilestone,
  findMilestoneProjectId,
  listDependencyEdges,
  MILESTONE_FIELD_KEYS,
  updateMilestone,
  type MilestoneFields,
  type MilestoneRecord,
  type Viewer,
} from "./programme.repository.ts";

/**
 * What the programme's use cases share: how a milestone is shown to a viewer, how a write of
 * its fields is made (optimistic version, one event per tracked change, the audit entry), and
 * the checks several writes make. The use cases live in programme.milestones.ts,
 * .history.ts, .health.ts, .baselines.ts and .files.ts; programme.service.ts composes them.
 */

export type Trx = Knex.Transaction;

/**
 * Something outside the programme that links a milestone (an update, a photo's tag). Such a
 * milestone is on record: it can be removed from the programme but not deleted.
 */
export interface MilestoneReference {
  /** `block` and `system`: a capacity block or a plant system of the facility depends on it. */
  kind: "update" | "story" | "photo" | "block" | "system";
  id: number;
  label: string;
}

export interface ProgrammeDeps {
  db: Db;
  /** The project's settings and time zone, and its lock, which serialises the programme's writes. */
  projects: ProjectsService;
  /** The names of the people who removed milestones, set baselines and made changes. */
  accounts: Pick<AccountsService, "namesOf">;
  /** Every programme write leaves an audit entry; the seed, which writes through its own path, may leave it out. */
  audit?: AuditService;
  /**
   * What else links a milestone (updates, photos, the facility's blocks and plant systems). Those modules read the programme, so they
   * are built after it and this is asked only when a milestone is to be deleted.
   */
  references?: (milestoneId: number) => Promise<MilestoneReference[]>;
}

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
 * Who reads: a signed-in caller (or a visitor) by their role, or another module reading for an
 * audience it names (a digest for its subscribers' audience), which needs no made-up user.
 */
export type Reader = Actor | Viewer;

export const viewerOf = (reader: Reader): Viewer => (typeof reader === "string" ? reader : viewerOfRole(reader.user?.role));

export function settingsOf(project: Project): ProgrammeSettings {
  return {
    toleranceWorkingDays: project.settings.toleranceWorkingDays,
    behindWorkingDays: project.settings.behindWorkingDays,
    calendar: { weekendDays: project.settings.weekendDays, holidays: project.settings.holidays },
  };
}

export const toInput = (m: MilestoneRecord): MilestoneInput => milestoneInputOf(m);

/** The fields of a milestone stored in its own columns, but the phase (by id): from an input, a CSV row or a record. */
export type StoredValues = Omit<MilestoneFields, "phaseId">;
const STORED_KEYS = MILESTONE_FIELD_KEYS.filter((k): k is keyof StoredValues => k !== "phaseId");

export function storedValuesOf(values: StoredValues): StoredValues {
  return Object.fromEntries(STORED_KEYS.map((k) => [k, values[k]])) as StoredValues;
}

/** The written fields of a stored milestone. */
export function fieldsOf(m: MilestoneRecord): MilestoneFields {
  return Object.fromEntries(MILESTONE_FIELD_KEYS.map((k) => [k, m[k]])) as MilestoneFields;
}

const eventValue = (v: unknown): string | null => (v === null || v === undefined ? null : String(v));

/** The fields that differ between the stored row and the next one. */
export function changedFields(before: MilestoneFields, next: MilestoneFields): Partial<MilestoneFields> {
  const changes: Partial<MilestoneFields> = {};
  for (const key of Object.keys(next) as Array<keyof MilestoneFields>) {
    if (before[key] !== next[key]) (changes as Record<string, unknown>)[key] = next[key];
  }
  return changes;
}

export interface EventContext {
  milestoneId: number;
  projectId: number;
  at: Date;
  byUserId: number | null;
  note: string | null;
  baselineVersion?: number | null;
}

/** One event per tracked field that changed; `before` null for a new milestone (only the values it starts with). */
export function eventsFor(before: MilestoneFields | null, next: MilestoneFields, ctx: EventContext): NewMilestoneEvent[] {
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

export const sameIds = (a: readonly number[], b: readonly number[]) => a.length === b.length && a.every((v, i) => v === b[i]);
export const uniqueSorted = (ids: readonly number[]) => [...new Set(ids)].sort((x, y) => x - y);

/** A 422 naming each field and what is wrong with it; `code` says what was refused. */
export function invalid(fields: Record<string, string>, code = "invalid_milestone"): AppError {
  const message = Object.entries(fields)
    .map(([field, problem]) => `${field} ${problem}`)
    .join("; ");
  return new AppError(code, `Check ${message}.`, 422, fields);
}

export function cycleWords(cycle: readonly number[], nameOf: (id: number) => string): string {
  const names = cycle.map(nameOf);
  return `${[...names, names[0]].join(" → ")}`;
}

/** A project as one caller sees its programme: the project's settings, the status date and the audience rule. */
export interface View {
  project: Project;
  settings: ProgrammeSettings;
  at: string;
  viewer: Viewer;
}

/** The distinct ids among these, leaving out the nulls (records no signed-in person made). */
export const userIdsOf = (ids: ReadonlyArray<number | null | undefined>): number[] => [...new Set(ids.filter((id): id is number => typeof id === "number"))];

export function createProgrammeContext(deps: ProgrammeDeps) {
  const { db, projects, accounts } = deps;
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

  /** A milestone as the view shows it; `names` holds the name of whoever removed it (see `presentAll`). */
  function present(m: MilestoneRecord, view: View, names: ReadonlyMap<number, string>): Milestone {
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
      removal: m.removal ? { at: m.removal.at.toISOString(), by: (m.removal.byUserId === null ? null : names.get(m.removal.byUserId)) ?? null, reason: m.removal.reason } : null,
    };
  }

  /** Milestones as the view shows them, with the names of those who removed any asked for in one read (none when nothing is removed). */
  async function presentAll(records: readonly MilestoneRecord[], view: View, trx?: Trx): Promise<Milestone[]> {
    const names = await accounts.namesOf(userIdsOf(records.map((m) => m.removal?.byUserId)), trx);
    return records.map((m) => present(m, view, names));
  }

  /** One milestone as the view shows it (in the caller's transaction, when it has one). */
  const presentOne = async (m: MilestoneRecord, view: View, trx?: Trx): Promise<Milestone> => (await presentAll([m], view, trx))[0]!;

  function viewOf(project: Project, viewer: Viewer, at?: string): View {
    return { project, settings: settingsOf(project), at: at ?? projects.today(project), viewer };
  }

  const staffView = (project: Project): View => viewOf(project, "staff");

  async function conflictWith(trx: Trx, id: number, project: Project): Promise<AppError> {
    const current = await findMilestone(trx, id, "staff", { forUpdate: true });
    if (!current) return notFound("That milestone");
    return new AppError(
      "conflict",
      "Someone else changed this milestone after you loaded it. The current values are attached; apply your change to them.",
      409,
      undefined,
      { current: await presentOne(current, staffView(project), trx) },
    );
  }

  /** Project of a milestone, for routes addressed by milestone id. */
  async function projectOfMilestone(id: number): Promise<Project> {
    const projectId = await findMilestoneProjectId(db, id);
    if (projectId === null) throw notFound("That milestone");
    return projects.getById(projectId);
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

  /** Writes the changed fields under the version read, with an event per tracked change; false when nothing changed. */
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

  return { db, projects, accounts, now, record, presentAll, presentOne, viewOf, staffView, conflictWith, projectOfMilestone, checkDependencies, writeUpdate, touch };
}

export type ProgrammeContext = ReturnType<typeof createProgrammeContext>;
