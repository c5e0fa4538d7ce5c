// The facility record turned into the figures the pages show: unit stages, each system's
// redundancy, readiness for service and what is missing, heat and fuel, the ramp, and the moves
// a digest reports. The demo plant is the invented Aldermere Campus Phase 2 scenario.
import { describe, expect, it } from "vitest";
import { UNIT_STAGES } from "../../src/shared/schemas/facility.ts";
import {
  computeFacility,
  facilityMoves,
  isUnitAvailable,
  missingWords,
  stageRank,
  systemRedundancy,
  unitStatusOf,
  UNIT_STAGE_ORDER,
  type FacilityRecordInput,
} from "../../src/shared/domain/facility-record.ts";
import { aldermerePlant, block, milestone, system, units, WEEKDAYS, type SystemFields } from "./facility-fixtures.ts";

const L4 = { availableFromLevel: 4, calendar: WEEKDAYS };

describe("unit stages", () => {
  it("runs in the schema's order, ordered → L5", () => {
    expect([...UNIT_STAGE_ORDER]).toEqual([...UNIT_STAGES]);
    expect(UNIT_STAGE_ORDER.map(stageRank)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
  });

  it("names the status and commissioning level a page shows", () => {
    expect(unitStatusOf("delivered")).toEqual({ status: "delivered", commissioningLevel: null });
    expect(unitStatusOf("installed")).toEqual({ status: "installed", commissioningLevel: null });
    expect(unitStatusOf("L1")).toEqual({ status: "commissioned", commissioningLevel: 1 });
    expect(unitStatusOf("L5")).toEqual({ status: "commissioned", commissioningLevel: 5 });
  });

  it("counts a unit available from the project's commissioning level on, never before it", () => {
    expect(UNIT_STAGE_ORDER.filter((s) => isUnitAvailable(s, 4))).toEqual(["L4", "L5"]);
    expect(UNIT_STAGE_ORDER.filter((s) => isUnitAvailable(s, 1))).toEqual(["L1", "L2", "L3", "L4", "L5"]);
    expect(isUnitAvailable("installed", 1)).toBe(false);
  });

  it("refuses a commissioning level outside 1…5 instead of guessing", () => {
    expect(() => isUnitAvailable("L5", 0)).toThrow(/availableFromLevel/);
    expect(() => isUnitAvailable("L5", 6)).toThrow(/availableFromLevel/);
    expect(() => isUnitAvailable("L5", 3.5)).toThrow(/availableFromLevel/);
  });
});

describe("systemRedundancy", () => {
  it("says the design and today's label with the counts behind them", () => {
    const r = systemRedundancy({ neededPerSystem: 4, independentSystems: 1, units: [...units(4, "L4"), ...units(1, "L3")] }, 4);
    expect(r).toEqual({
      design: "N+1",
      now: "N",
      shortfall: 1,
      available: 4,
      planned: 5,
      summary: "design N+1 · now N (4 of 5 commissioned to L4)",
      carriesLoad: true,
    });
  });

  it("counts the shortfall to the design label, not to every unit planned (2N of 5 + 4 is reached at 4 + 4)", () => {
    const r = systemRedundancy(
      { neededPerSystem: 4, independentSystems: 2, units: [...units(4, "L5", 1), ...units(1, "delivered", 1), ...units(4, "L5", 2)] },
      4,
    );
    expect(r).toMatchObject({ design: "2N", now: "2N", shortfall: 0, available: 8, planned: 9 });
  });

  it("carries the load with one complete train of a 2N design, and says the redundancy is not there yet", () => {
    const r = systemRedundancy({ neededPerSystem: 2, independentSystems: 2, units: [...units(2, "L4", 1), ...units(2, "installed", 2)] }, 4);
    expect(r).toMatchObject({ design: "2N", now: "N (short of 2N by 2)", shortfall: 2, carriesLoad: true });
  });

  it("leaves a unit in a train the design does not have out of the labels but in the counts", () => {
    const r = systemRedundancy({ neededPerSystem: 1, independentSystems: 1, units: [...units(1, "L5", 1), ...units(1, "L5", 2)] }, 4);
    expect(r).toMatchObject({ design: "N", now: "N", available: 2, planned: 2 });
  });
});

describe("computeFacility: the Aldermere Phase 2 plant", () => {
  const figures = computeFacility(aldermerePlant("L5"), L4);
  const bySystem = (id: number) => figures.systems.find((s) => s.systemId === id)!;

  it("gives design labels N+1 (chillers), N+2 (fans), N+1 (generators), N+1 (UPS)", () => {
    // Our own example (DESIGN.md): 5 × 400 kW chillers N = 4, 8 fans N = 6, 2 + 1 generators, UPS 4 × 500 kW N = 3
    expect([21, 22, 23, 25].map((id) => bySystem(id).redundancy.design)).toEqual(["N+1", "N+2", "N+1", "N+1"]);
    expect([21, 22, 23, 25].map((id) => bySystem(id).redundancy.now)).toEqual(["N+1", "N+2", "N+1", "N+1"]);
  });

  it("runs the 40,000 L tank 74.07 h at the full load of two 1,250 kVA sets at 0.8 (2,000 kW)", () => {
    // Common practice (no published source): standby set kVA taken at a power factor of 0.8
    const fuel = bySystem(24).fuel!;
    expect(fuel.fullLoadKw).toBeCloseTo(2_000, 10);
    expect(fuel.autonomyHoursAtFullLoad).toBeCloseTo(74.07, 2);
    // At the IT load of the three blocks (1,460 kW): 40,000 / (0.27 × 1,460)
    expect(fuel.designLoadKw).toBe(1_460);
    expect(fuel.autonomyHoursAtDesignLoad).toBeCloseTo(101.47, 2);
  });

  it("sets the chillers' N × rating against the IT load they serve", () => {
    expect(bySystem(21).heat).toEqual({ removalKw: 1_600, loadKw: 1_460, marginKw: 140, method: "rating", inletBand: null });
    expect(bySystem(22).heat).toBeUndefined(); // no airflow given
    expect(bySystem(25).heat).toBeUndefined();
    expect(bySystem(25).fuel).toBeUndefined();
  });

  it("dates each block from its milestones and slips it in working days", () => {
    expect(figures.blocks.map((b) => [b.baselineReadyDate, b.forecastReadyDate, b.slipWorkingDays])).toEqual([
      ["2027-03-05", "2027-03-10", 3], // Fri → Wed
      ["2027-05-14", "2027-05-28", 10], // two working weeks
      ["2028-01-14", "2028-01-14", 0],
    ]);
  });

  it("draws the ramp, baseline against forecast, in the answer's field names", () => {
    expect(figures.ramp).toEqual([
      { date: "2027-03-05", racksBaseline: 48, racksForecast: 0, kwBaseline: 480, kwForecast: 0 },
      { date: "2027-03-10", racksBaseline: 48, racksForecast: 48, kwBaseline: 480, kwForecast: 480 },
      { date: "2027-05-14", racksBaseline: 68, racksForecast: 48, kwBaseline: 980, kwForecast: 480 },
      { date: "2027-05-28", racksBaseline: 68, racksForecast: 68, kwBaseline: 980, kwForecast: 980 },
      { date: "2028-01-14", racksBaseline: 116, racksForecast: 116, kwBaseline: 1_460, kwForecast: 1_460 },
    ]);
  });

  it("lists each unit's status, level and availability", () => {
    const delivered = aldermerePlant("L5");
    delivered.systems[0]!.units[4]!.stage = "delivered";
    delivered.systems[0]!.units[3]!.stage = "L3";
    const chillers = computeFacility(delivered, L4).systems[0]!;
    expect(chillers.units.slice(3).map(({ status, commissioningLevel, available }) => ({ status, commissioningLevel, available }))).toEqual([
      { status: "commissioned", commissioningLevel: 3, available: false },
      { status: "delivered", commissioningLevel: null, available: false },
    ]);
    expect(chillers.redundancy.summary).toBe("design N+1 · now short by 1 (3 of 5 commissioned to L4)");
  });
});

describe("readiness for service needs both conditions", () => {
  function withUps(stageOfTwo: "L4" | "installed"): FacilityRecordInput {
    const record = aldermerePlant("L5");
    const ups = record.systems.find((s) => s.id === 25)!;
    ups.units = [...units(2, "L4", 1, "UPS module"), ...units(2, stageOfTwo, 1, "UPS module")];
    return record;
  }

  it("milestones complete and plant carrying the load: ready, nothing missing", () => {
    const hall2A = computeFacility(withUps("L4"), L4).blocks[0]!;
    expect(hall2A).toMatchObject({ readyForService: true, milestonesComplete: true, missing: [] });
  });

  it("milestones complete but the UPS short: not ready, and missing names the UPS", () => {
    const hall2A = computeFacility(withUps("installed"), L4).blocks[0]!;
    expect(hall2A.milestonesComplete).toBe(true);
    expect(hall2A.readyForService).toBe(false);
    expect(hall2A.missing).toEqual([{ kind: "system", systemId: 25, name: "UPS", now: "short by 1", needed: 3, available: 2 }]);
  });

  it("plant carrying the load but a milestone open: not ready, and missing names the milestone", () => {
    const hd1 = computeFacility(withUps("L4"), L4).blocks[1]!;
    expect(hd1.readyForService).toBe(false);
    expect(hd1.missing).toEqual([{ kind: "milestone", milestoneId: 12, name: "HD-1 integrated systems test", forecast: "2027-05-28" }]);
  });

  it("a block linked to no milestone, or to one not known, cannot be proven ready", () => {
    const record: FacilityRecordInput = {
      blocks: [block({ id: 1 }), block({ id: 2, dependsOn: [99] })],
      systems: [],
      milestones: [],
    };
    const [bare, orphan] = computeFacility(record, L4).blocks;
    expect(bare).toMatchObject({ readyForService: false, missing: [{ kind: "no_milestones" }], slipWorkingDays: null });
    expect(orphan).toMatchObject({ readyForService: false, missing: [{ kind: "milestone", milestoneId: 99 }] });
  });

  it("slips negative when the forecast is early, and skips the project's holidays", () => {
    const record: FacilityRecordInput = {
      blocks: [block({ id: 1, dependsOn: [1] }), block({ id: 2, dependsOn: [2] })],
      systems: [],
      milestones: [
        milestone(1, "2027-03-12", { forecastFinish: "2027-03-08" }), // Fri → Mon before, less the holiday
        milestone(2, "2027-03-05", { forecastFinish: "2027-03-12" }), // one working week, less a holiday
      ],
    };
    const [early, late] = computeFacility(record, { availableFromLevel: 4, calendar: { weekendDays: [6, 7], holidays: ["2027-03-10"] } }).blocks;
    expect(early!.slipWorkingDays).toBe(-3);
    expect(late!.slipWorkingDays).toBe(4);
  });
});

describe("missingWords", () => {
  const items = [
    { kind: "milestone" as const, milestoneId: 12, name: "HD-1 integrated systems test", forecast: "2027-05-28" },
    { kind: "milestone" as const, milestoneId: 14, name: "Switchgear energised", forecast: "2027-04-02" },
    { kind: "milestone" as const, milestoneId: 15, name: "Fire strategy sign-off", forecast: null },
    { kind: "system" as const, systemId: 25, name: "UPS", now: "short by 1", needed: 3, available: 2 },
    { kind: "system" as const, systemId: 26, name: "Secret switchboard", now: "short by 2", needed: 2, available: 0 },
  ];

  it("names what the reader may see, with its forecast date", () => {
    const words = missingWords(items, { milestoneIds: new Set([12, 14, 15]), systemIds: new Set([25, 26]) });
    expect(words).toEqual([
      "HD-1 integrated systems test not yet complete (forecast 28 May 2027)",
      "Switchgear energised not yet complete (forecast 2 Apr 2027)",
      "Fire strategy sign-off not yet complete",
      "UPS: now short by 1, needs 3 units available to carry the load (2 available)",
      "Secret switchboard: now short by 2, needs 2 units available to carry the load (0 available)",
    ]);
  });

  it("words a hidden milestone or system without its name, counted", () => {
    const words = missingWords(items, { milestoneIds: new Set([12]), systemIds: new Set([25]) });
    expect(words).toEqual([
      "HD-1 integrated systems test not yet complete (forecast 28 May 2027)",
      "UPS: now short by 1, needs 3 units available to carry the load (2 available)",
      "2 internal milestones not yet complete",
      "A plant system not yet carrying its load",
    ]);
    expect(words.join(" ")).not.toMatch(/Switchgear|Fire strategy|Secret|switchboard/);
  });

  it("says a block linked to no milestone cannot be shown ready", () => {
    expect(missingWords([{ kind: "no_milestones" }], { milestoneIds: new Set(), systemIds: new Set() })).toEqual([
      "Not linked to any milestone yet, so readiness cannot be shown",
    ]);
  });
});

describe("heat and fuel: which figure applies", () => {
  function only(fields: SystemFields, extra: SystemFields[] = []) {
    const record: FacilityRecordInput = {
      blocks: [block({ id: 1, itKw: 300 }), block({ id: 2, itKw: 200 })],
      systems: [system({ serves: [1], ...fields }), ...extra.map((e) => system(e))],
      milestones: [],
    };
    return computeFacility(record, L4).systems[0]!;
  }

  it("falls back to the rating when the chilled-water return is no warmer than the supply", () => {
    const heat = only({ id: 5, kind: "cooling", neededPerSystem: 2, ratingPerUnit: 200, ratingUnit: "kW", design: { chilledWaterFlowKgS: 10, chilledWaterSupplyC: 14, chilledWaterReturnC: 14 } }).heat!;
    expect(heat).toMatchObject({ method: "rating", removalKw: 400, loadKw: 300, marginKw: 100 });
  });

  it("takes air movement's per-unit airflow from a rating in m³/s, and words the supply air's inlet band", () => {
    const heat = only({ id: 5, kind: "air_movement", neededPerSystem: 2, ratingPerUnit: 10, ratingUnit: "m3/s", design: { deltaTK: 10, supplyAirC: 24 } }).heat!;
    expect(heat.method).toBe("air");
    expect(heat.removalKw).toBeCloseTo(1.2 * 1.006 * 20 * 10, 10);
    // Source: ASHRAE TC 9.9, Thermal Guidelines, 5th ed., 2021, Table 2.1 (secondary): recommended 18–27 °C
    expect(heat.inletBand).toBe("in the recommended range (18–27 °C)");
  });

  it("counts only generator systems serving the tank's blocks, kW ratings as given; none → no full-load figure", () => {
    const tank = { id: 5, kind: "fuel_storage" as const, design: { usableFuelLitres: 10_000 } };
    const genHere = { id: 6, kind: "power_generation" as const, serves: [1], neededPerSystem: 2, ratingPerUnit: 500, ratingUnit: "kW" as const };
    const genElsewhere = { id: 7, kind: "power_generation" as const, serves: [2], neededPerSystem: 1, ratingPerUnit: 800, ratingUnit: "kW" as const };
    expect(only(tank, [genHere, genElsewhere]).fuel).toMatchObject({ designLoadKw: 300, fullLoadKw: 1_000 });
    expect(only(tank, [genElsewhere]).fuel).toMatchObject({ fullLoadKw: null, autonomyHoursAtFullLoad: null });
    expect(only({ ...tank, design: {} }).fuel).toBeUndefined();
    expect(only({ ...tank, serves: [] }).fuel).toMatchObject({ designLoadKw: 0, autonomyHoursAtDesignLoad: null });
  });
});

describe("facilityMoves", () => {
  function windowEnds() {
    const start = aldermerePlant("L5");
    const fans = start.systems.find((s) => s.id === 22)!;
    fans.units.slice(6).forEach((u) => (u.stage = "installed")); // 6 of 8: N
    const ups = start.systems.find((s) => s.id === 25)!;
    ups.units.slice(2).forEach((u) => (u.stage = "L2")); // 2 of 4: short by 1
    const end: FacilityRecordInput = structuredClone(start);
    end.milestones[1]!.forecastFinish = "2027-06-04";
    end.systems.find((s) => s.id === 22)!.units[6]!.stage = "L4";
    end.systems.find((s) => s.id === 25)!.units.slice(2).forEach((u) => (u.stage = "L5"));
    return { start, end };
  }

  it("finds each kind of move between the window's start and end", () => {
    const { start, end } = windowEnds();
    const fanIds = end.systems.find((s) => s.id === 22)!.units.map((u) => u.id);
    const upsIds = end.systems.find((s) => s.id === 25)!.units.map((u) => u.id);
    expect(facilityMoves(computeFacility(start, L4), computeFacility(end, L4))).toEqual([
      { kind: "block_ready", blockId: 1, on: "2027-03-10" },
      { kind: "block_forecast_moved", blockId: 2, from: "2027-05-28", to: "2027-06-04", days: 7 },
      { kind: "system_label", systemId: 22, from: "N", to: "N+1", reachedDesign: false },
      { kind: "units_commissioned", systemId: 22, unitIds: [fanIds[6]] },
      { kind: "system_label", systemId: 25, from: "short by 1", to: "N+1", reachedDesign: true },
      { kind: "units_commissioned", systemId: 25, unitIds: upsIds.slice(2) },
    ]);
  });

  it("finds nothing when nothing moved, and nothing for a block or system added in the window", () => {
    const { start } = windowEnds();
    const figures = computeFacility(start, L4);
    expect(facilityMoves(figures, computeFacility(start, L4))).toEqual([]);
    const empty = computeFacility({ blocks: [], systems: [], milestones: [] }, L4);
    expect(facilityMoves(empty, figures)).toEqual([]);
  });

  it("reports a forecast date that appears as moved without a day count", () => {
    const before = computeFacility({ blocks: [block({ id: 1 })], systems: [], milestones: [] }, L4);
    const after = computeFacility({ blocks: [block({ id: 1, dependsOn: [1] })], systems: [], milestones: [milestone(1, "2027-01-04")] }, L4);
    expect(facilityMoves(before, after)).toEqual([{ kind: "block_forecast_moved", blockId: 1, from: null, to: "2027-01-04", days: null }]);
  });
});
