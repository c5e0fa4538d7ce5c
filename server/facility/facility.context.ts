import type { Knex } from "knex";
import type { FacilitySubject } from "#shared/schemas/facility.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { viewerOfRole, type Viewer } from "#shared/domain/audience.ts";
import { createAuditService, type AuditAction, type AuditService } from "../audit/audit.service.ts";
import { AppError, notFound } from "../core/app-error.ts";
import { recordWriter } from "../core/record-write.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import { deleteSubjectEvents, insertFacilityEvents, type NewFacilityEvent } from "./facility.events.repository.ts";
import { findProjectIdOf } from "./facility.repository.ts";

/**
 * What the facility's use cases share: the deps, who reads, how a write leaves its events and
 * its audit entry, and the refusals several writes make. The use cases live in
 * facility.blocks.ts, .systems.ts, .units.ts, .features.ts, .figures.ts and .history.ts;
 * facility.service.ts composes them.
 */

export type Trx = Knex.Transaction;

export interface FacilityDeps {
  db: Db;
  /** The project's settings, time zone and today, and its lock, which serialises the facility's writes. */
  projects: ProjectsService;
  /** Milestones a block or system may depend on, and their dates as they stood on a day. */
  programme: Pick<ProgrammeService, "milestoneIdsOf" | "milestoneDatesAt">;
  /** The names of the people who made changes. */
  accounts: Pick<AccountsService, "namesOf">;
  audit?: AuditService;
}

/** A signed-in caller (or a visitor) by their role, or another module reading for an audience it names. */
export type Reader = Actor | Viewer;

export const viewerOf = (reader: Reader): Viewer => (typeof reader === "string" ? reader : viewerOfRole(reader.user?.role));

/** A 422 naming each field and what is wrong with it. */
export function invalid(fields: Record<string, string>, code = "invalid_facility"): AppError {
  const message = Object.entries(fields)
    .map(([field, problem]) => `${field} ${problem}`)
    .join("; ");
  return new AppError(code, `Check ${message}.`, 422, fields);
}

export const uniqueSorted = (ids: readonly number[]) => [...new Set(ids)].sort((x, y) => x - y);

const WORDS: Record<FacilitySubject, string> = { block: "capacity block", system: "plant system", unit: "unit", feature: "site feature" };
const NOUN: Record<FacilitySubject, string> = { block: "That capacity block", system: "That plant system", unit: "That unit", feature: "That site feature" };

export const subjectNotFound = (subject: FacilitySubject) => notFound(NOUN[subject]);

/** 409 with the stored values attached, so the caller can apply their change to them. */
export function conflict(subject: FacilitySubject, current: unknown): AppError {
  return new AppError("conflict", `Someone else changed this ${WORDS[subject]} after you loaded it. The current values are attached; apply your change to them.`, 409, undefined, { current });
}

/** A stored value as an event holds it (the column takes 200 characters: long text is cut, marked with an ellipsis). */
export function eventValue(v: unknown): string | null {
  if (v === null || v === undefined) return null;
  const text = typeof v === "string" ? v : typeof v === "number" || typeof v === "boolean" ? String(v) : JSON.stringify(v);
  return text.length > 200 ? `${text.slice(0, 199)}…` : text;
}

/** One event per field whose value differs (arrays and objects compared by their JSON). */
export function changedFieldEvents(
  before: Record<string, unknown>,
  next: Record<string, unknown>,
  base: Omit<NewFacilityEvent, "field" | "from" | "to">,
): NewFacilityEvent[] {
  const events: NewFacilityEvent[] = [];
  for (const field of Object.keys(next)) {
    const from = before[field];
    const to = next[field];
    if (JSON.stringify(from) === JSON.stringify(to)) continue;
    events.push({ ...base, field, from: eventValue(from), to: eventValue(to) });
  }
  return events;
}

/** Each changed field as { from, to }, for the audit entry of an edit. */
export function changeDetail(before: Record<string, unknown>, next: Record<string, unknown>): Record<string, { from: unknown; to: unknown }> {
  const out: Record<string, { from: unknown; to: unknown }> = {};
  for (const key of Object.keys(next)) {
    if (JSON.stringify(before[key]) !== JSON.stringify(next[key])) out[key] = { from: before[key], to: next[key] };
  }
  return out;
}

const AUDIT_TARGET: Record<FacilitySubject, string> = { block: "capacity_block", system: "plant_system", unit: "plant_unit", feature: "site_feature" };

export function createFacilityContext(deps: FacilityDeps) {
  const { db, projects, programme, accounts } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const now = () => projects.now();

  const writeEvents = recordWriter(audit, insertFacilityEvents);

  /** The events of a write and its audit entry (labelled by the subject's name unless told), in the write's transaction. */
  function recordWrite(
    trx: Trx,
    actor: Actor,
    project: Project,
    w: { action: AuditAction; subject: FacilitySubject; id: number; name: string; label?: string; events: NewFacilityEvent[]; detail: Record<string, unknown> },
  ): Promise<void> {
    return writeEvents(trx, actor, project, { action: w.action, target: { type: AUDIT_TARGET[w.subject], id: w.id, label: w.label ?? w.name }, events: w.events, detail: w.detail });
  }

  /** The common part of a write's events: project, subject, who, when, the day (today on site unless given). */
  function eventBase(project: Project, subject: FacilitySubject, subjectId: number, subjectName: string, actor: Actor, at: Date, opts: { on?: string; note?: string | null } = {}) {
    return {
      projectId: project.id,
      subject,
      subjectId,
      subjectName,
      on: opts.on ?? projects.today(project),
      at,
      byUserId: actor.user?.id ?? null,
      note: opts.note ?? null,
    };
  }

  /** The project of a block, system, unit or feature addressed by id (404 when there is none). */
  async function projectOf(subject: FacilitySubject, id: number): Promise<Project> {
    const projectId = await findProjectIdOf(db, subject, id);
    if (projectId === null) throw subjectNotFound(subject);
    return projects.getById(projectId);
  }

  /** Milestone ids that are not milestones of the project, in words for a 422; null when all are. */
  async function foreignMilestones(projectId: number, ids: readonly number[]): Promise<string | null> {
    const known = await programme.milestoneIdsOf(projectId, ids);
    const unknown = ids.filter((id) => !known.has(id));
    return unknown.length > 0 ? `names no milestone of this project: ${unknown.join(", ")}` : null;
  }

  /** A day on site for a stage: not after today in the project's time zone. */
  function checkOn(on: string | undefined, project: Project, fields: Record<string, string>): string {
    const today = projects.today(project);
    if (on !== undefined && on > today) fields.on = `must not be after today (${today} in ${project.timeZone})`;
    return on ?? today;
  }

  /** A write that adds to a project's facility: one transaction under the project's lock. */
  async function addTo<T>(slug: string, add: (trx: Trx, project: Project) => Promise<T>): Promise<{ project: Project; result: T }> {
    const project = await projects.get(slug);
    const result = await db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      return add(trx, project);
    });
    return { project, result };
  }

  /** A write to one block, system, unit or feature by id: under the project's lock, its row locked, 404 when it has gone. */
  async function change<R, T>(
    subject: FacilitySubject,
    id: number,
    find: (trx: Trx, id: number, opts: { forUpdate: boolean }) => Promise<R | null>,
    write: (trx: Trx, found: R, project: Project) => Promise<T>,
  ): Promise<{ project: Project; result: T }> {
    const project = await projectOf(subject, id);
    const result = await db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      const found = await find(trx, id, { forUpdate: true });
      if (found === null) throw subjectNotFound(subject);
      return write(trx, found, project);
    });
    return { project, result };
  }

  type Written = { action: AuditAction; subject: FacilitySubject; id: number; name: string; label?: string; at: Date };

  /** An entry's history starts with one `created` event (to its first value: a name, a unit's stage, a feature's status). */
  function recordCreate(trx: Trx, actor: Actor, project: Project, c: Written & { to: string; on?: string; note?: string | null; detail: Record<string, unknown> }): Promise<void> {
    const base = eventBase(project, c.subject, c.id, c.name, actor, c.at, { on: c.on, note: c.note });
    return recordWrite(trx, actor, project, { ...c, events: [{ ...base, field: "created", from: null, to: c.to }] });
  }

  /** An edit: one event per changed field, and the changes (from, to) in the audit entry. */
  function recordUpdate(trx: Trx, actor: Actor, project: Project, u: Written & { was: Record<string, unknown>; will: Record<string, unknown> }): Promise<void> {
    const events = changedFieldEvents(u.was, u.will, eventBase(project, u.subject, u.id, u.name, actor, u.at));
    return recordWrite(trx, actor, project, { ...u, events, detail: { changes: changeDetail(u.was, u.will) } });
  }

  /**
   * The end of a delete, after the row has gone: the subject's history goes with it (and its
   * units', for a system), one `deleted` event stays in the project's history, and the audit
   * entry keeps everything it held.
   */
  async function recordDelete(
    trx: Trx,
    actor: Actor,
    project: Project,
    d: { action: AuditAction; subject: FacilitySubject; id: number; name: string; label?: string; from: string | null; detail: Record<string, unknown>; unitIds?: readonly number[] },
  ): Promise<void> {
    if (d.unitIds) await deleteSubjectEvents(trx, "unit", d.unitIds);
    await deleteSubjectEvents(trx, d.subject, [d.id]);
    await recordWrite(trx, actor, project, { ...d, events: [{ ...eventBase(project, d.subject, d.id, d.name, actor, now()), field: "deleted", from: d.from, to: null }] });
  }

  return { db, projects, programme, accounts, now, recordWrite, eventBase, projectOf, foreignMilestones, checkOn, addTo, change, recordCreate, recordUpdate, recordDelete };
}

export type FacilityContext = ReturnType<typeof createFacilityContext>;
