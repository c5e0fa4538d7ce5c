import { createBlockUseCases } from "./facility.blocks.ts";
import { createFacilityContext, type FacilityDeps, type Reader } from "./facility.context.ts";
import { createFeatureUseCases } from "./facility.features.ts";
import { createFigureUseCases } from "./facility.figures.ts";
import { createFacilityHistoryUseCases } from "./facility.history.ts";
import { createFacilitySettingsUseCases } from "./facility.settings.ts";
import { listMilestoneLinks } from "./facility.repository.ts";
import { createSystemUseCases } from "./facility.systems.ts";
import { createFacilityTagUseCases } from "./facility.tags.ts";
import { createUnitUseCases } from "./facility.units.ts";

export type { FacilityDeps, Reader };

/**
 * The facility service: one object for the router and the other modules, made of the
 * facility's use cases, each in its own file —
 * - figures (facility.figures.ts): the facility as each audience may see it, today or as it
 *   stood on a day (`facility`, and `figuresAt` for digests);
 * - blocks, systems, units, features (facility.blocks.ts, .systems.ts, .units.ts, .features.ts):
 *   the writes, each an event and an audit entry;
 * - history (facility.history.ts): a unit's stage history, a project's facility events.
 * Other modules ask by id: `milestoneLinks` (what depends on a milestone the programme is asked
 * to delete).
 */
export function createFacilityService(deps: FacilityDeps) {
  const ctx = createFacilityContext(deps);
  const figures = createFigureUseCases(ctx);
  return {
    facility: figures.facility,
    figuresAt: figures.figuresAt,
    ...createBlockUseCases(ctx, figures),
    ...createSystemUseCases(ctx, figures),
    ...createUnitUseCases(ctx, figures),
    ...createFeatureUseCases(ctx, figures),
    ...createFacilityHistoryUseCases(ctx),
    /** `putSettings`: the commissioning level from which a unit carries its load. */
    ...createFacilitySettingsUseCases(ctx, deps.audit),
    /** `tagSubjects`: a project's blocks and systems with their audiences (photos and updates are tagged with them). */
    ...createFacilityTagUseCases(ctx),
    /** Capacity blocks and plant systems that depend on or link a milestone, by name. */
    milestoneLinks: (milestoneId: number) => listMilestoneLinks(deps.db, milestoneId),
  };
}

export type FacilityService = ReturnType<typeof createFacilityService>;
