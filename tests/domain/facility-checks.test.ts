// The facility record's figures checked against values from outside the project (CHECKS.md),
// through the same functions the pages use: systemRedundancy and computeFacility, with units at
// their stages. Each check names its source, or says it is common practice or from memory.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { ductVelocityMs, rackFitsThroughDoor } from "../../src/shared/domain/facility.ts";
import {
  computeFacility,
  isUnitAvailable,
  systemRedundancy,
  UNIT_STAGE_ORDER,
  type FacilityUnitInput,
  type UnitStageName,
} from "../../src/shared/domain/facility-record.ts";
import { m3PerHourToM3PerS, tonsOfRefrigerationToKW } from "../../src/shared/domain/units.ts";
import { block, system, units, WEEKDAYS, type SystemFields } from "./facility-fixtures.ts";

const L4 = { availableFromLevel: 4, calendar: WEEKDAYS };

describe("redundancy of a system from its units (CHECKS.md, Redundancy labels)", () => {
  // Source: ANSI/TIA-942 definitions of N, N+1, N+2, 2N and 2(N+1), as quoted in a national
  // regulator's data-centre directive (secondary); rows from CHECKS.md, "Redundancy labels".
  const rows = [
    { needed: 4, systems: 1, perTrain: [3], label: "short by 1" },
    { needed: 4, systems: 1, perTrain: [4], label: "N" },
    { needed: 4, systems: 1, perTrain: [5], label: "N+1" },
    { needed: 4, systems: 1, perTrain: [6], label: "N+2" },
    { needed: 4, systems: 2, perTrain: [4, 4], label: "2N" },
    { needed: 4, systems: 2, perTrain: [5, 5], label: "2(N+1)" },
  ];

  it.each(rows)("N = $needed, $systems system(s) of $perTrain units → $label", ({ needed, systems, perTrain, label }) => {
    const build = (stage: UnitStageName) => ({
      neededPerSystem: needed,
      independentSystems: systems,
      units: perTrain.flatMap((count, i) => units(count, stage, i + 1)),
    });
    const total = perTrain.reduce((a, b) => a + b, 0);

    // Every unit commissioned past the level: design and now both give the table's label.
    const commissioned = systemRedundancy(build("L4"), 4);
    expect(commissioned).toMatchObject({ design: label, now: label, shortfall: 0, available: total, planned: total });

    // Every unit only installed: the design label stands, nothing carries load yet.
    const installed = systemRedundancy(build("installed"), 4);
    expect(installed.design).toBe(label);
    expect(installed.now).toBe(systems === 1 ? `short by ${needed}` : `short by ${needed} (short of ${systems}N by ${systems * needed})`);
    expect(installed.available).toBe(0);
    expect(installed.carriesLoad).toBe(false);
  });

  it("six supply fans where four carry the design airflow are N+2", () => {
    // Common practice (no published source)
    expect(systemRedundancy({ neededPerSystem: 4, independentSystems: 1, units: units(6, "L5") }, 4).design).toBe("N+2");
  });
});

describe("fuel autonomy of a tank (CHECKS.md, Diesel generators and fuel)", () => {
  it("180 L against a 60 kW set at 75 % load at 0.27 L/kWh lasts 14.81 h", () => {
    // Source: engineering calculator site, diesel autonomy worked example (secondary)
    const figures = computeFacility(
      {
        blocks: [block({ id: 1, itKw: 60 * 0.75 })],
        systems: [system({ id: 2, kind: "fuel_storage", serves: [1], design: { usableFuelLitres: 180 } })],
        milestones: [],
      },
      L4,
    );
    expect(figures.systems[0]!.fuel!.designLoadKw).toBeCloseTo(45, 10);
    expect(figures.systems[0]!.fuel!.autonomyHoursAtDesignLoad).toBeCloseTo(14.81, 2);
  });

  it("20,000 L of usable fuel at 0.27 L/kWh and 1,000 kW lasts about 74.1 h", () => {
    // Common practice (no published source)
    const figures = computeFacility(
      {
        blocks: [block({ id: 1, itKw: 1_000 })],
        systems: [system({ id: 2, kind: "fuel_storage", serves: [1], design: { usableFuelLitres: 20_000, specificFuelConsumption: 0.27 } })],
        milestones: [],
      },
      L4,
    );
    expect(figures.systems[0]!.fuel!.autonomyHoursAtDesignLoad).toBeCloseTo(74.07, 2);
  });
});

describe("heat removal of a system (CHECKS.md, Heat carried by air and water)", () => {
  function heatOf(fields: SystemFields, itKw = 0) {
    const figures = computeFacility({ blocks: [block({ id: 1, itKw })], systems: [system({ serves: [1], ...fields })], milestones: [] }, L4);
    return figures.systems[0]!.heat!;
  }

  it("air: 10,000 m³/h at ΔT 20 K carries 67.1 kW", () => {
    // Source: Engineering ToolBox, "Air — heating and cooling load" (with ρ 1.202, cp 1.005; standard air here gives 67.07)
    const heat = heatOf({ id: 2, kind: "air_movement", neededPerSystem: 1, design: { airflowM3s: m3PerHourToM3PerS(10_000), deltaTK: 20 } });
    expect(heat.method).toBe("air");
    expect(heat.removalKw).toBeCloseTo(67.1, 1);
  });

  it("air: 30 m³/s at ΔT 12 K with standard air carries about 434.6 kW", () => {
    // Common practice (no published source): standard air ρ 1.2 kg/m³, cp 1.006 kJ/(kg·K)
    // Six units needed, 5 m³/s each: the design airflow is what N units move.
    const heat = heatOf({ id: 2, kind: "air_movement", neededPerSystem: 6, units: units(8, "L5"), design: { airflowM3s: 5, deltaTK: 12 } }, 400);
    expect(heat.removalKw).toBeCloseTo(434.6, 1);
    expect(heat.marginKw).toBeCloseTo(34.6, 1);
  });

  it("water: 10 kg/s at ΔT 6 K carries 251.16 kW", () => {
    // Source: derived from Q = ṁ · cp · ΔT, cp 4.186 kJ/(kg·K) (CHECKS.md)
    const heat = heatOf({ id: 2, kind: "cooling", design: { chilledWaterFlowKgS: 10, chilledWaterSupplyC: 12, chilledWaterReturnC: 18 } });
    expect(heat.method).toBe("water");
    expect(heat.removalKw).toBeCloseTo(251.16, 2);
  });

  it("one ton of refrigeration rated per chiller counts as 3.516853 kW", () => {
    // Source: NIST SP 811, Appendix B.8, ton of refrigeration = 12,000 Btu/h = 3.516853 kW (secondary)
    const kwPerTon = tonsOfRefrigerationToKW(1);
    expect(kwPerTon).toBeCloseTo(3.516853, 6);
    const heat = heatOf({ id: 2, kind: "cooling", neededPerSystem: 2, ratingPerUnit: kwPerTon, ratingUnit: "kW" });
    expect(heat.method).toBe("rating");
    expect(heat.removalKw).toBeCloseTo(2 * 3.516853, 6);
  });
});

describe("site facts for prospects", () => {
  it("a duct 3.5 m × 2.0 m carrying 30 m³/s runs at 4.29 m/s", () => {
    // Common practice (no published source)
    expect(ductVelocityMs(30, 3.5, 2.0)).toBeCloseTo(4.29, 2);
  });

  it("rejects a duct side of zero rather than print Infinity", () => {
    expect(() => ductVelocityMs(30, 0, 2)).toThrow(/widthM/);
  });

  // From memory: a loaded 48U cabinet on its casters stands about 2.3 m high, 0.8 m wide and
  // 1.2 m deep (48U of mounting space is 2.13 m by EIA-310; the maker's sheet is the authority).
  const rack48U = { rackHeightM: 2.3, rackWidthM: 0.8, rackDepthM: 1.2 };

  it("a door 2.5 m high and 1.8 m wide takes a loaded 48U rack upright", () => {
    // Common practice (no published source)
    expect(rackFitsThroughDoor({ doorHeightM: 2.5, doorWidthM: 1.8 }, rack48U)).toBe(true);
  });

  it("a standard 2.1 m door does not, and a 0.7 m leaf is too narrow either way round", () => {
    // Common practice (no published source)
    expect(rackFitsThroughDoor({ doorHeightM: 2.1, doorWidthM: 1.8 }, rack48U)).toBe(false);
    expect(rackFitsThroughDoor({ doorHeightM: 2.5, doorWidthM: 0.7 }, rack48U)).toBe(false);
  });
});

// A rank for now-labels, read from the words so the property speaks of what a reader sees:
// complete trains first ("2N" over "N+2"), then spare units in each (a shortfall counts as
// negative spare), then how far the whole design is from complete.
function labelRank(label: string): [number, number, number] {
  const suffix = / \(short of \d+N by (\d+)\)$/.exec(label);
  const head = suffix ? label.slice(0, suffix.index) : label;
  const missing = suffix ? Number(suffix[1]) : 0;
  let match = /^short by (\d+)$/.exec(head);
  if (match) return [0, -Number(match[1]), -missing];
  match = /^(\d*)(?:\()?N(?:\+(\d+))?\)?$/.exec(head);
  if (!match) throw new Error(`not a redundancy label: ${label}`);
  return [match[1] ? Number(match[1]) : 1, match[2] ? Number(match[2]) : 0, -missing];
}

function compareRank(a: [number, number, number], b: [number, number, number]): number {
  for (let i = 0; i < 3; i += 1) if (a[i] !== b[i]) return a[i]! - b[i]!;
  return 0;
}

describe("properties of the now-label", () => {
  const plant = fc
    .record({ needed: fc.integer({ min: 1, max: 6 }), trains: fc.integer({ min: 1, max: 3 }), level: fc.integer({ min: 1, max: 5 }) })
    .chain(({ needed, trains, level }) =>
      fc.record({
        needed: fc.constant(needed),
        trains: fc.constant(trains),
        level: fc.constant(level),
        units: fc.array(
          fc.record({ train: fc.integer({ min: 1, max: trains }), stage: fc.constantFrom(...UNIT_STAGE_ORDER) }),
          { minLength: 1, maxLength: 20 },
        ),
        pick: fc.nat(),
      }),
    );

  function asUnits(list: { train: number; stage: UnitStageName }[]): FacilityUnitInput[] {
    return list.map((u, i) => ({ id: i + 1, label: `Unit ${i + 1}`, ...u }));
  }

  it("reads every label it can produce (the rank is defined)", () => {
    // Common practice (no published source): the labels of CHECKS.md's table rank in this order.
    const ordered = ["short by 2", "short by 1", "N", "N+1", "N+2", "2N (short of 3N by 1)", "2N", "2(N+1)"];
    for (let i = 1; i < ordered.length; i += 1) expect(compareRank(labelRank(ordered[i - 1]!), labelRank(ordered[i]!))).toBeLessThan(0);
  });

  it("commissioning another unit never lowers the now-label nor raises the shortfall", () => {
    fc.assert(
      fc.property(plant, ({ needed, trains, level, units: list, pick }) => {
        const candidates = list.map((_, i) => i).filter((i) => !isUnitAvailable(list[i]!.stage, level));
        fc.pre(candidates.length > 0);
        const index = candidates[pick % candidates.length]!;
        const before = systemRedundancy({ neededPerSystem: needed, independentSystems: trains, units: asUnits(list) }, level);
        const after = systemRedundancy(
          { neededPerSystem: needed, independentSystems: trains, units: asUnits(list.map((u, i) => (i === index ? { ...u, stage: "L5" } : u))) },
          level,
        );
        expect(after.available).toBe(before.available + 1);
        expect(compareRank(labelRank(after.now), labelRank(before.now))).toBeGreaterThanOrEqual(0);
        expect(after.shortfall).toBeLessThanOrEqual(before.shortfall);
      }),
    );
  });

  it("the now-label never exceeds the design label, and equals it exactly when the shortfall is 0", () => {
    fc.assert(
      fc.property(plant, ({ needed, trains, level, units: list }) => {
        const r = systemRedundancy({ neededPerSystem: needed, independentSystems: trains, units: asUnits(list) }, level);
        expect(compareRank(labelRank(r.now), labelRank(r.design))).toBeLessThanOrEqual(0);
        expect(r.now === r.design).toBe(r.shortfall === 0);
      }),
    );
  });
});
