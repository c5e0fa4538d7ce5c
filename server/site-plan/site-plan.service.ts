import type { Knex } from "knex";
import type { Project } from "#shared/schemas/projects.ts";
import type { SiteArea, SiteAreaCreateInput, SiteAreaPatchInput, SitePlan } from "#shared/schemas/site-plan.ts";
import { audiencesFor, viewerOfRole } from "#shared/domain/audience.ts";
import { areaStatus, placementProblems, SITE_GRID } from "#shared/domain/site-plan.ts";
import type { MilestoneStatus } from "#shared/domain/programme-health.ts";
import { createAuditService, type AuditService } from "../audit/audit.service.ts";
import { notFound } from "../core/app-error.ts";
import { changeDetail, changedFields, invalidFields, staleVersion } from "../core/field-changes.ts";
import { recordWriter } from "../core/record-write.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { deleteArea, findArea, findAreaProjectId, insertArea, insertAreaEvents, listAreas, updateArea, type SiteAreaFields, type SiteAreaRecord } from "./site-plan.repository.ts";

export interface SitePlanDeps {
  db: Db;
  /** The project, its today and its lock, which serialises the plan's writes (overlap and name checks hold under it). */
  projects: ProjectsService;
  /** Every milestone's area and status: what an area's status is made of. */
  programme: Pick<ProgrammeService, "list">;
  audit?: AuditService;
}

const fieldsOf = (a: SiteAreaFields): SiteAreaFields => ({ name: a.name, kind: a.kind, audience: a.audience, x: a.x, y: a.y, w: a.w, h: a.h });
const key = (name: string) => name.trim().toLowerCase();
const invalid = (fields: Record<string, string>) => invalidFields(fields, "invalid_site_area");
const areaNotFound = () => notFound("That area");

/**
 * The site plan: the site's areas drawn by staff on a grid, read by every caller as their
 * audience allows, each with a status made from the programme's milestones in it. Writes are
 * leads' and administrators' (declared at the route); each leaves its events and an audit entry.
 */
export function createSitePlanService(deps: SitePlanDeps) {
  const { db, projects, programme } = deps;
  const audit = deps.audit ?? createAuditService(db);
  const recordWrite = recordWriter(audit, insertAreaEvents);

  /**
   * Every milestone's status by area name, over the whole programme whoever reads (decision
   * 004): an internal milestone late in a public hall makes the hall late for a visitor too,
   * though the visitor is never told its name.
   */
  async function statusesByArea(slug: string): Promise<Map<string, MilestoneStatus[]>> {
    const byArea = new Map<string, MilestoneStatus[]>();
    for (const m of await programme.list(slug, {}, "staff")) {
      if (!m.area) continue;
      const list = byArea.get(key(m.area)) ?? [];
      list.push(m.status);
      byArea.set(key(m.area), list);
    }
    return byArea;
  }

  function present(a: SiteAreaRecord, statuses: readonly MilestoneStatus[], forStaff: boolean): SiteArea {
    const base = { id: a.id, name: a.name, kind: a.kind, audience: a.audience, x: a.x, y: a.y, w: a.w, h: a.h, status: areaStatus(statuses), milestonesComplete: statuses.filter((s) => s === "complete").length, milestonesTotal: statuses.length };
    return forStaff ? { ...base, version: a.version } : base;
  }

  /** The checks of an area against the rest of its plan: inside the grid, on no other area, a name of its own. */
  async function check(trx: Knex.Transaction, projectId: number, next: SiteAreaFields, selfId: number | null): Promise<void> {
    const others = (await listAreas(trx, projectId, ["public", "investor", "internal"])).filter((o) => o.id !== selfId);
    const problems = placementProblems(next, others);
    if (others.some((o) => key(o.name) === key(next.name))) problems.name = `is already the name of an area of this plan`;
    if (Object.keys(problems).length > 0) throw invalid(problems);
  }

  /** A write to one area by id: under the project's lock, its row locked, 404 when it has gone. */
  async function change<T>(id: number, write: (trx: Knex.Transaction, area: SiteAreaRecord, project: Project) => Promise<T>): Promise<T> {
    const projectId = await findAreaProjectId(db, id);
    if (projectId === null) throw areaNotFound();
    const project = await projects.getById(projectId);
    return db.transaction(async (trx) => {
      await projects.lockForWrite(trx, project.id);
      const area = await findArea(trx, id, { forUpdate: true });
      if (!area) throw areaNotFound();
      return write(trx, area, project);
    });
  }

  const target = (a: { id: number; name: string }) => ({ type: "site_area", id: a.id, label: a.name });

  async function one(id: number, slug: string): Promise<SiteArea> {
    const area = await findArea(db, id);
    if (!area) throw areaNotFound();
    return present(area, (await statusesByArea(slug)).get(key(area.name)) ?? [], true);
  }

  return {
    /** The grid and the areas this caller may see, each with its status; audience and version for staff. */
    async plan(slug: string, actor: Actor): Promise<SitePlan> {
      const project = await projects.get(slug);
      const viewer = viewerOfRole(actor.user?.role);
      const [areas, statuses] = await Promise.all([listAreas(db, project.id, audiencesFor(viewer)), statusesByArea(slug)]);
      return { grid: { ...SITE_GRID }, areas: areas.map((a) => present(a, statuses.get(key(a.name)) ?? [], viewer === "staff")) };
    },

    async create(slug: string, input: SiteAreaCreateInput, actor: Actor): Promise<SiteArea> {
      const project = await projects.get(slug);
      const id = await db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const next = fieldsOf(input);
        await check(trx, project.id, next, null);
        const at = projects.now();
        const id = await insertArea(trx, project.id, next, at);
        await recordWrite(trx, actor, project, {
          action: "site_area_created",
          target: target({ id, name: next.name }),
          events: [{ subjectId: id, field: "created", from: null, to: next.name, at, note: null }],
          detail: { area: next },
        });
        return id;
      });
      return one(id, project.slug);
    },

    /** Renames, moves, resizes or re-audiences an area, from the version the editor loaded (409 when someone wrote since). */
    async patch(id: number, input: SiteAreaPatchInput, actor: Actor): Promise<SiteArea> {
      const slug = await change(id, async (trx, before, project) => {
        if (before.version !== input.version) throw staleVersion("area", fieldsOf(before));
        const { version: _v, ...given } = input;
        const was = fieldsOf(before);
        const next = fieldsOf({ ...was, ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)) } as SiteAreaFields);
        const changes = changedFields({ ...was }, { ...next });
        if (changes.length === 0) return project.slug;
        await check(trx, project.id, next, id);
        const at = projects.now();
        if ((await updateArea(trx, id, before.version, next, at)) === 0) throw staleVersion("area", fieldsOf(before));
        await recordWrite(trx, actor, project, {
          action: "site_area_updated",
          target: target({ id, name: next.name }),
          events: changes.map((c) => ({ ...c, subjectId: id, at, note: null })),
          detail: { changes: changeDetail({ ...was }, { ...next }) },
        });
        return project.slug;
      });
      return one(id, slug);
    },

    /** Deletes an area from the plan; its events stay with the project, the audit entry keeps what it was. */
    async delete(id: number, actor: Actor): Promise<void> {
      await change(id, async (trx, area, project) => {
        const at = projects.now();
        await recordWrite(trx, actor, project, {
          action: "site_area_deleted",
          target: target(area),
          events: [{ subjectId: id, field: "deleted", from: area.name, to: null, at, note: null }],
          detail: { area: fieldsOf(area) },
        });
        await deleteArea(trx, id);
      });
    },
  };
}

export type SitePlanService = ReturnType<typeof createSitePlanService>;
