import type { FacilityTagSubject } from "#shared/domain/facility-tags.ts";
import type { FacilityContext } from "./facility.context.ts";
import { listBlocks, listSystems } from "./facility.repository.ts";

/**
 * What photos and updates read of the facility to be tagged with a capacity block or a plant
 * system (server/media, server/posts): each of a project's blocks and systems with its name and
 * audience. The callers decide, by the content's audience and the reader's, which may be used
 * and shown (src/shared/domain/facility-tags.ts).
 */
export function createFacilityTagUseCases(ctx: Pick<FacilityContext, "db">) {
  return {
    async tagSubjects(projectId: number): Promise<FacilityTagSubject[]> {
      const [blocks, systems] = await Promise.all([listBlocks(ctx.db, projectId), listSystems(ctx.db, projectId)]);
      return [
        ...blocks.map((b) => ({ kind: "block" as const, id: b.id, name: b.name, audience: b.audience })),
        ...systems.map((s) => ({ kind: "plant" as const, id: s.id, name: s.name, audience: s.audience })),
      ];
    },
  };
}
