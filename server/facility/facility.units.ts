import type { UnitAnswer, UnitCreateInput, UnitPatchInput, UnitStageInput } from "#shared/schemas/facility.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { stageRank } from "#shared/domain/facility-record.ts";
import type { Actor } from "../core/types.ts";
import { changeDetail, conflict, invalid, type FacilityContext, type Trx } from "./facility.context.ts";
import type { FigureUseCases } from "./facility.figures.ts";
import { deleteUnit, findSystem, findUnit, findUnitIdByLabel, insertUnit, updateUnit, type SystemRecord, type UnitRecord } from "./facility.repository.ts";

const namedFields = (u: Pick<UnitRecord, "label" | "tag" | "train">) => ({ label: u.label, tag: u.tag, train: u.train });

/** A unit as its events and audit entries name it: by its label, the audit log with its system's name too. */
const unitNamed = (system: SystemRecord, id: number, label: string) => ({ subject: "unit" as const, id, name: label, label: `${system.name}: ${label}` });

/** The unit, locked, with its system (read in the same transaction); null when it has gone. */
async function findUnitWithSystem(trx: Trx, id: number, opts: { forUpdate: boolean }): Promise<{ unit: UnitRecord; system: SystemRecord } | null> {
  const unit = await findUnit(trx, id, opts);
  return unit ? { unit, system: (await findSystem(trx, unit.systemId))! } : null;
}

/**
 * The units of a plant system: entering one, editing its label, tag and train, and its stage
 * (ordered → delivered → installed → L1 … L5) with the day on site it was reached — the dated
 * history a site walk writes. A stage that goes back needs a note saying why.
 */
export function createUnitUseCases(ctx: FacilityContext, figures: Pick<FigureUseCases, "staffFacility">) {
  const { now, recordWrite, eventBase, checkOn, change, recordCreate, recordUpdate, recordDelete } = ctx;

  /** A unit's label is its own within its system, and its train is one the system has. */
  async function check(trx: Trx, system: SystemRecord, selfId: number | null, next: { label: string; train: number }, fields: Record<string, string>): Promise<void> {
    const other = await findUnitIdByLabel(trx, system.id, next.label);
    if (other !== null && other !== selfId) fields.label = `is already the label of another unit of ${system.name}`;
    if (next.train > system.independentSystems) {
      fields.train = `must be at most ${system.independentSystems}: ${system.name} has ${system.independentSystems === 1 ? "one independent system" : `${system.independentSystems} independent systems`}`;
    }
  }

  const answer = async (w: { project: Project; result: number }): Promise<UnitAnswer> =>
    (await figures.staffFacility(w.project)).systems.flatMap((s) => s.units).find((u) => u.id === w.result)!;

  return {
    async createUnit(systemId: number, input: UnitCreateInput, actor: Actor): Promise<UnitAnswer> {
      return answer(
        await change("system", systemId, findSystem, async (trx, system, project) => {
          const fields: Record<string, string> = {};
          await check(trx, system, null, input, fields);
          const on = checkOn(input.on, project, fields);
          if (Object.keys(fields).length > 0) throw invalid(fields);
          const at = now();
          const id = await insertUnit(trx, systemId, { ...namedFields(input), stage: input.stage, stageOn: on }, at);
          // Its first stage, on its day: the start of the unit's dated history.
          await recordCreate(trx, actor, project, {
            action: "facility_unit_created",
            ...unitNamed(system, id, input.label),
            to: input.stage,
            at,
            on,
            note: input.note ?? null,
            detail: { system: system.name, ...namedFields(input), stage: input.stage, on, note: input.note ?? null },
          });
          return id;
        }),
      );
    },

    async patchUnit(id: number, input: UnitPatchInput, actor: Actor): Promise<UnitAnswer> {
      return answer(
        await change("unit", id, findUnitWithSystem, async (trx, { unit, system }, project) => {
          if (unit.version !== input.version) throw conflict("unit", unit);
          const next = { label: input.label ?? unit.label, tag: input.tag ?? unit.tag, train: input.train ?? unit.train };
          const changes = changeDetail(namedFields(unit), next);
          if (Object.keys(changes).length === 0) return id;
          const fields: Record<string, string> = {};
          await check(trx, system, id, next, fields);
          if (Object.keys(fields).length > 0) throw invalid(fields);
          const at = now();
          if ((await updateUnit(trx, id, unit.version, next, at)) === 0) throw conflict("unit", await findUnit(trx, id));
          await recordUpdate(trx, actor, project, { action: "facility_unit_updated", ...unitNamed(system, id, next.label), was: namedFields(unit), will: next, at });
          return id;
        }),
      );
    },

    /**
     * Moves a unit to a stage reached on a day on site (default today). The same stage again
     * changes nothing (a second tap on a phone is not a second event); a stage that goes back
     * needs a note.
     */
    async setUnitStage(id: number, input: UnitStageInput, actor: Actor): Promise<UnitAnswer> {
      return answer(
        await change("unit", id, findUnitWithSystem, async (trx, { unit, system }, project) => {
          if (unit.stage === input.stage) return id;
          if (unit.version !== input.version) throw conflict("unit", unit);
          const fields: Record<string, string> = {};
          const on = checkOn(input.on, project, fields);
          const note = input.note?.trim() ? input.note : null;
          if (stageRank(input.stage) < stageRank(unit.stage) && note === null) fields.note = `is required when the stage goes back (${unit.stage} → ${input.stage}): say why`;
          if (Object.keys(fields).length > 0) throw invalid(fields);
          const at = now();
          if ((await updateUnit(trx, id, unit.version, { stage: input.stage, stageOn: on }, at)) === 0) throw conflict("unit", await findUnit(trx, id));
          await recordWrite(trx, actor, project, {
            action: "facility_unit_stage_changed",
            ...unitNamed(system, id, unit.label),
            events: [{ ...eventBase(project, "unit", id, unit.label, actor, at, { on, note }), field: "stage", from: unit.stage, to: input.stage }],
            detail: { system: system.name, from: unit.stage, to: input.stage, on, note },
          });
          return id;
        }),
      );
    },

    /** Deletes a unit entered by mistake: its history goes with it; the audit log keeps what it was. */
    async deleteUnit(id: number, actor: Actor): Promise<void> {
      await change("unit", id, findUnitWithSystem, async (trx, { unit, system }, project) => {
        await deleteUnit(trx, id);
        await recordDelete(trx, actor, project, {
          action: "facility_unit_deleted",
          ...unitNamed(system, id, unit.label),
          from: unit.stage,
          detail: { system: system.name, ...namedFields(unit), stage: unit.stage, stageOn: unit.stageOn },
        });
      });
    },
  };
}
