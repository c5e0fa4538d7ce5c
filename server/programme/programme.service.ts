import type { ProgrammeHealthResponse } from "#shared/schemas/programme.ts";
import { createBaselineUseCases } from "./programme.baselines.ts";
import { createProgrammeContext, type MilestoneReference, type ProgrammeDeps, type Reader } from "./programme.context.ts";
import { createFileUseCases } from "./programme.files.ts";
import { createHealthUseCases, type MilestoneAsStood, type ProgrammeAsStood } from "./programme.health.ts";
import { createHistoryUseCases, type MilestoneDatesAt } from "./programme.history.ts";
import { createMilestoneUseCases } from "./programme.milestones.ts";

export type { MilestoneAsStood, MilestoneDatesAt, MilestoneReference, ProgrammeAsStood, ProgrammeHealthResponse, Reader };

/**
 * The programme service: one object for the router and the other modules, made of the
 * programme's use cases, each in its own file —
 * - milestones (programme.milestones.ts): list, create, edit, shift forecasts, remove from the
 *   programme, restore, delete one entered by mistake;
 * - history (programme.history.ts): a milestone's events and drivers, a project's changes and moves;
 * - figures (programme.health.ts): health at a date and the S-curve;
 * - baselines and costs (programme.baselines.ts): versions, re-baselining, cost actuals;
 * - files (programme.files.ts): CSV export and import.
 * Reads take the caller, or, from another module reading for an audience, that audience's
 * viewer (`"public"`, `"investor"`, `"staff"`): no made-up user. Other modules also ask by
 * project id: `publicAreas`, `allAreas`, `milestoneNames`, `milestoneIdsOf`, `milestoneDatesAt`, `asStood` (a monthly report's programme).
 */
export function createProgrammeService(deps: ProgrammeDeps) {
  const ctx = createProgrammeContext(deps);
  return {
    ...createMilestoneUseCases(ctx, deps),
    ...createHistoryUseCases(ctx),
    ...createHealthUseCases(ctx),
    ...createBaselineUseCases(ctx),
    ...createFileUseCases(ctx),
  };
}

export type ProgrammeService = ReturnType<typeof createProgrammeService>;
