import type { Milestone } from "../../src/shared/schemas/programme.ts";

/**
 * A milestone as the API answers it, with plain defaults (an open public milestone, on programme,
 * version 1); each test names what it is about.
 */
export function makeMilestone(over: Partial<Milestone> & Pick<Milestone, "id" | "name">): Milestone {
  return {
    phase: "Enabling works",
    phaseId: 1,
    area: "Hall 2A",
    system: "building",
    description: "",
    weight: 1,
    percentComplete: 0,
    plannedStart: null,
    baselineFinish: "2027-03-01",
    forecastFinish: null,
    actualFinish: null,
    audience: "public",
    budget: null,
    dependsOn: [],
    status: "on_programme",
    slipDays: 0,
    slipWorkingDays: 0,
    version: 1,
    updatedAt: "2026-12-01T09:00:00Z",
    removal: null,
    ...over,
  };
}
