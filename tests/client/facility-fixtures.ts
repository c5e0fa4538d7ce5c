import type { BlockAnswer } from "../../src/shared/schemas/facility.ts";

/** A capacity block as GET /api/projects/:slug/facility answers it: invented figures in the shape of the demo (Aldermere Phase 2). */
export function block(over: Partial<BlockAnswer> = {}): BlockAnswer {
  return {
    id: 1,
    name: "Hall 2A",
    racks: 48,
    itKw: 480,
    maxKwPerRack: 10,
    coolingApproach: "Air-cooled chillers with free cooling",
    containment: "hot_aisle",
    audience: "public",
    stage: "Stage 1",
    notes: "",
    dependsOn: [11],
    baselineReadyDate: "2027-04-02",
    forecastReadyDate: "2027-05-14",
    readyForService: false,
    slipWorkingDays: 30,
    missing: ["Integrated systems test (forecast 14 May 2027)", "Cooling at N: 3 of 4 units carry load"],
    systemIds: [5],
    version: 1,
    ...over,
  };
}
