// Builders for the facility record in domain tests: a system or block with every field at a
// harmless default, so each test states only what it is about. The demo plant is the invented
// Aldermere Campus Phase 2 scenario (DESIGN.md).
import type {
  FacilityBlockInput,
  FacilityMilestoneInput,
  FacilityRecordInput,
  FacilitySystemInput,
  FacilityUnitInput,
  UnitStageName,
} from "../../src/shared/domain/facility-record.ts";
import type { WorkingCalendar } from "../../src/shared/domain/calendar.ts";

export const WEEKDAYS: WorkingCalendar = { weekendDays: [6, 7], holidays: [] };

let nextUnitId = 1000;

/** `count` units at `stage` in `train`, labelled "<prefix> <n>". */
export function units(count: number, stage: UnitStageName, train = 1, prefix = "Unit"): FacilityUnitInput[] {
  return Array.from({ length: count }, (_, i) => ({ id: nextUnitId++, label: `${prefix} ${i + 1}`, train, stage }));
}

/** The fields a test may give a system: any, with the id, and any of the design figures. */
export type SystemFields = Partial<Omit<FacilitySystemInput, "design">> &
  Pick<FacilitySystemInput, "id"> & { design?: Partial<FacilitySystemInput["design"]> };

export function system(fields: SystemFields): FacilitySystemInput {
  const { design, ...rest } = fields;
  return {
    name: `System ${fields.id}`,
    kind: "other",
    serves: [],
    neededPerSystem: 1,
    independentSystems: 1,
    ratingPerUnit: null,
    ratingUnit: null,
    units: [],
    ...rest,
    design: {
      airflowM3s: null,
      deltaTK: null,
      chilledWaterFlowKgS: null,
      chilledWaterSupplyC: null,
      chilledWaterReturnC: null,
      supplyAirC: null,
      usableFuelLitres: null,
      specificFuelConsumption: 0.27,
      ...design,
    },
  };
}

export function block(fields: Partial<FacilityBlockInput> & Pick<FacilityBlockInput, "id">): FacilityBlockInput {
  return { name: `Block ${fields.id}`, racks: 10, itKw: 100, dependsOn: [], ...fields };
}

export function milestone(
  id: number,
  baselineFinish: string,
  more: Partial<Omit<FacilityMilestoneInput, "id" | "baselineFinish">> = {},
): FacilityMilestoneInput {
  return { id, baselineFinish, forecastFinish: null, actualFinish: null, ...more };
}

/**
 * Aldermere Phase 2: Hall 2A (48 racks, 480 kW), HD-1 (20 racks, 500 kW), Hall 2B (48 racks,
 * 480 kW); 5 × 400 kW chillers (4 needed), 8 supply fans (6 needed), 2 + 1 × 1,250 kVA
 * generators, a 40,000 L tank, UPS 4 × 500 kW modules (3 needed), all serving the three
 * blocks. `stage` sets every unit's stage.
 */
export function aldermerePlant(stage: UnitStageName = "L5"): FacilityRecordInput {
  const all = [1, 2, 3];
  return {
    blocks: [
      block({ id: 1, name: "Hall 2A", racks: 48, itKw: 480, dependsOn: [11] }),
      block({ id: 2, name: "HD-1", racks: 20, itKw: 500, dependsOn: [12] }),
      block({ id: 3, name: "Hall 2B", racks: 48, itKw: 480, dependsOn: [13] }),
    ],
    systems: [
      system({ id: 21, name: "Chilled water plant", kind: "cooling", serves: all, neededPerSystem: 4, ratingPerUnit: 400, ratingUnit: "kW", units: units(5, stage, 1, "Chiller") }),
      system({ id: 22, name: "Supply air fans", kind: "air_movement", serves: all, neededPerSystem: 6, units: units(8, stage, 1, "Fan") }),
      system({ id: 23, name: "Standby generators", kind: "power_generation", serves: all, neededPerSystem: 2, ratingPerUnit: 1250, ratingUnit: "kVA", units: units(3, stage, 1, "Generator") }),
      system({ id: 24, name: "Bulk fuel tank", kind: "fuel_storage", serves: all, ratingPerUnit: 40_000, ratingUnit: "L", design: { usableFuelLitres: 40_000 }, units: units(1, stage, 1, "Tank") }),
      system({ id: 25, name: "UPS", kind: "ups", serves: all, neededPerSystem: 3, ratingPerUnit: 500, ratingUnit: "kW", units: units(4, stage, 1, "UPS module") }),
    ],
    milestones: [
      milestone(11, "2027-03-05", { name: "Hall 2A integrated systems test", actualFinish: "2027-03-10" }),
      milestone(12, "2027-05-14", { name: "HD-1 integrated systems test", forecastFinish: "2027-05-28" }),
      milestone(13, "2028-01-14", { name: "Hall 2B integrated systems test" }),
    ],
  };
}
