import type { BlockAnswer, BlockCreateInput, BlockPatchInput } from "#shared/schemas/facility.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { Actor } from "../core/types.ts";
import { changeDetail, conflict, invalid, uniqueSorted, type FacilityContext, type Trx } from "./facility.context.ts";
import type { FigureUseCases } from "./facility.figures.ts";
import { blockFieldsOf, deleteBlock, findBlock, findBlockIdByName, insertBlock, replaceBlockMilestones, updateBlock, type BlockRecord } from "./facility.repository.ts";

/** The written fields of a block and its dependencies, as its events and audit entries list them. */
const writtenOf = (b: Omit<BlockRecord, "id" | "projectId" | "version">) => ({ ...blockFieldsOf(b), dependsOn: b.dependsOn });

/** Capacity blocks: entering one, editing it (optimistic version), deleting one entered by mistake. */
export function createBlockUseCases(ctx: FacilityContext, figures: Pick<FigureUseCases, "staffFacility">) {
  const { now, foreignMilestones, addTo, change, recordCreate, recordUpdate, recordDelete } = ctx;

  /** A block's name is its own within the project; its milestones are the project's. */
  async function check(trx: Trx, projectId: number, selfId: number | null, next: { name: string; dependsOn: number[] }, changed: { name: boolean; dependsOn: boolean }): Promise<void> {
    const fields: Record<string, string> = {};
    if (changed.name) {
      const other = await findBlockIdByName(trx, projectId, next.name);
      if (other !== null && other !== selfId) fields.name = "is already the name of another block of this project";
    }
    if (changed.dependsOn) {
      const problem = await foreignMilestones(projectId, next.dependsOn);
      if (problem) fields.dependsOn = problem;
    }
    if (Object.keys(fields).length > 0) throw invalid(fields);
  }

  const answer = async (w: { project: Project; result: number }): Promise<BlockAnswer> =>
    (await figures.staffFacility(w.project)).blocks.find((b) => b.id === w.result)!;

  return {
    async createBlock(slug: string, input: BlockCreateInput, actor: Actor): Promise<BlockAnswer> {
      return answer(
        await addTo(slug, async (trx, project) => {
          const next = { ...input, dependsOn: uniqueSorted(input.dependsOn) };
          await check(trx, project.id, null, next, { name: true, dependsOn: true });
          const at = now();
          const id = await insertBlock(trx, project.id, blockFieldsOf(next), at);
          await replaceBlockMilestones(trx, id, next.dependsOn);
          await recordCreate(trx, actor, project, { action: "facility_block_created", subject: "block", id, name: next.name, to: next.name, at, detail: writtenOf(next) });
          return id;
        }),
      );
    },

    async patchBlock(id: number, input: BlockPatchInput, actor: Actor): Promise<BlockAnswer> {
      return answer(
        await change("block", id, findBlock, async (trx, before, project) => {
          if (before.version !== input.version) throw conflict("block", before);
          const { version: _version, dependsOn, ...given } = input;
          const next: BlockRecord = { ...before, ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)), dependsOn: dependsOn === undefined ? before.dependsOn : uniqueSorted(dependsOn) };
          const [was, will] = [writtenOf(before), writtenOf(next)];
          const changes = changeDetail(was, will);
          if (Object.keys(changes).length === 0) return id;
          await check(trx, project.id, id, next, { name: "name" in changes, dependsOn: "dependsOn" in changes });
          const at = now();
          if ((await updateBlock(trx, id, before.version, blockFieldsOf(next), at)) === 0) throw conflict("block", await findBlock(trx, id));
          if ("dependsOn" in changes) await replaceBlockMilestones(trx, id, next.dependsOn);
          await recordUpdate(trx, actor, project, { action: "facility_block_updated", subject: "block", id, name: next.name, was, will, at });
          return id;
        }),
      );
    },

    /** Deletes a block entered by mistake: its links and history go with it; the audit log keeps what it was. */
    async deleteBlock(id: number, actor: Actor): Promise<void> {
      await change("block", id, findBlock, async (trx, b, project) => {
        await deleteBlock(trx, id);
        await recordDelete(trx, actor, project, { action: "facility_block_deleted", subject: "block", id, name: b.name, from: b.name, detail: { block: writtenOf(b) } });
      });
    },
  };
}
