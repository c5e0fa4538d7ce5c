import type { SystemAnswer, SystemCreateInput, SystemPatchInput } from "#shared/schemas/facility.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { Actor } from "../core/types.ts";
import { changeDetail, conflict, invalid, uniqueSorted, type FacilityContext, type Trx } from "./facility.context.ts";
import type { FigureUseCases } from "./facility.figures.ts";
import { deleteSystem, findSystem, findSystemIdByName, insertSystem, listBlocks, listUnits, replaceSystemLinks, updateSystem, type SystemRecord } from "./facility.repository.ts";

type SystemValues = Omit<SystemRecord, "id" | "projectId" | "version">;

/** The written fields of a system, design figures one by one (`design.airflowM3s`), as its events and audit entries list them. */
function writtenOf(s: SystemValues): Record<string, unknown> {
  const { design, ...rest } = s;
  return {
    name: rest.name,
    kind: rest.kind,
    audience: rest.audience,
    serves: rest.serves,
    neededPerSystem: rest.neededPerSystem,
    independentSystems: rest.independentSystems,
    ratingPerUnit: rest.ratingPerUnit,
    ratingUnit: rest.ratingUnit,
    ...Object.fromEntries(Object.entries(design).map(([k, v]) => [`design.${k}`, v])),
    linkedMilestones: rest.linkedMilestones,
    notes: rest.notes,
  };
}

/** The fields stored in the system's own row. */
const storedOf = ({ serves: _s, linkedMilestones: _l, ...values }: SystemValues) => values;

/** Plant systems: entering one, editing it (optimistic version), deleting one entered by mistake with its units. */
export function createSystemUseCases(ctx: FacilityContext, figures: Pick<FigureUseCases, "staffFacility">) {
  const { now, foreignMilestones, addTo, change, recordCreate, recordUpdate, recordDelete } = ctx;

  /** The rules a system's values must meet against the rest of the record; each broken one named in a 422. */
  async function check(trx: Trx, projectId: number, self: SystemRecord | null, next: SystemValues): Promise<void> {
    const fields: Record<string, string> = {};
    const changed = (key: "name" | "serves" | "linkedMilestones" | "independentSystems") => self === null || JSON.stringify(self[key]) !== JSON.stringify(next[key]);
    if (changed("name")) {
      const other = await findSystemIdByName(trx, projectId, next.name);
      if (other !== null && other !== self?.id) fields.name = "is already the name of another plant system of this project";
    }
    if (changed("serves")) {
      const blocks = new Set((await listBlocks(trx, projectId)).map((b) => b.id));
      const unknown = next.serves.filter((id) => !blocks.has(id));
      if (unknown.length > 0) fields.serves = `names no capacity block of this project: ${unknown.join(", ")}`;
    }
    if (changed("linkedMilestones")) {
      const problem = await foreignMilestones(projectId, next.linkedMilestones);
      if (problem) fields.linkedMilestones = problem;
    }
    // Checked against the stored pair on an edit: a rating means nothing without its unit.
    if (next.ratingPerUnit !== null && next.ratingUnit === null) fields.ratingUnit = "is required with a rating";
    if (next.ratingPerUnit === null && next.ratingUnit !== null) fields.ratingPerUnit = "is required with a unit";
    if (self !== null && changed("independentSystems")) {
      const highest = Math.max(0, ...(await listUnits(trx, [self.id])).map((u) => u.train));
      if (highest > next.independentSystems) fields.independentSystems = `must be at least ${highest}: a unit is in system ${highest}`;
    }
    if (Object.keys(fields).length > 0) throw invalid(fields);
  }

  const answer = async (w: { project: Project; result: number }): Promise<SystemAnswer> => (await figures.staffFacility(w.project)).systems.find((s) => s.id === w.result)!;

  return {
    async createSystem(slug: string, input: SystemCreateInput, actor: Actor): Promise<SystemAnswer> {
      return answer(
        await addTo(slug, async (trx, project) => {
          const next = { ...input, serves: uniqueSorted(input.serves), linkedMilestones: uniqueSorted(input.linkedMilestones) };
          await check(trx, project.id, null, next);
          const at = now();
          const id = await insertSystem(trx, project.id, storedOf(next), at);
          await replaceSystemLinks(trx, id, { serves: next.serves, linkedMilestones: next.linkedMilestones });
          await recordCreate(trx, actor, project, { action: "facility_system_created", subject: "system", id, name: next.name, to: next.name, at, detail: writtenOf(next) });
          return id;
        }),
      );
    },

    async patchSystem(id: number, input: SystemPatchInput, actor: Actor): Promise<SystemAnswer> {
      return answer(
        await change("system", id, findSystem, async (trx, before, project) => {
          if (before.version !== input.version) throw conflict("system", before);
          const { version: _version, design, serves, linkedMilestones, ...given } = input;
          const next: SystemRecord = {
            ...before,
            ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)),
            design: { ...before.design, ...Object.fromEntries(Object.entries(design ?? {}).filter(([, v]) => v !== undefined)) },
            serves: serves === undefined ? before.serves : uniqueSorted(serves),
            linkedMilestones: linkedMilestones === undefined ? before.linkedMilestones : uniqueSorted(linkedMilestones),
          };
          const [was, will] = [writtenOf(before), writtenOf(next)];
          const changes = changeDetail(was, will);
          if (Object.keys(changes).length === 0) return id;
          await check(trx, project.id, before, next);
          const at = now();
          if ((await updateSystem(trx, id, before.version, storedOf(next), at)) === 0) throw conflict("system", await findSystem(trx, id));
          await replaceSystemLinks(trx, id, { serves: "serves" in changes ? next.serves : undefined, linkedMilestones: "linkedMilestones" in changes ? next.linkedMilestones : undefined });
          await recordUpdate(trx, actor, project, { action: "facility_system_updated", subject: "system", id, name: next.name, was, will, at });
          return id;
        }),
      );
    },

    /** Deletes a system entered by mistake, with its units: their links and history go with them; the audit log keeps what they were. */
    async deleteSystem(id: number, actor: Actor): Promise<void> {
      await change("system", id, findSystem, async (trx, s, project) => {
        const units = await listUnits(trx, [id]);
        await deleteSystem(trx, id);
        await recordDelete(trx, actor, project, {
          action: "facility_system_deleted",
          subject: "system",
          id,
          name: s.name,
          from: s.name,
          unitIds: units.map((u) => u.id),
          detail: { system: writtenOf(s), units: units.map((u) => ({ id: u.id, label: u.label, tag: u.tag, train: u.train, stage: u.stage, stageOn: u.stageOn })) },
        });
      });
    },
  };
}
