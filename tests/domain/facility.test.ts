import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  ASHRAE_A1_ALLOWABLE_INLET_C,
  ASHRAE_RECOMMENDED_INLET_C,
  DEFAULT_SPECIFIC_FUEL_CONSUMPTION_L_PER_KWH,
  INDICATIVE_CAUTION,
  airHeatBtuPerHour,
  airHeatRemovalKW,
  blockReadiness,
  capacityRamp,
  compareHeatRemovalWithItLoad,
  dcie,
  dcieFromPue,
  fuelAutonomyHours,
  fuelBurnLitresPerHour,
  heatBtuPerHourToKW,
  inletTemperatureBand,
  litresPerSecondToKgPerS,
  pue,
  pueFromDcie,
  redundancyLabel,
  specificFuelConsumption,
  waterHeatBtuPerHour,
  waterHeatRemovalKW,
  type CapacityBlockInput,
  type InletTemperatureBand,
  type MilestoneDates,
  type RedundancyKind,
} from "../../src/shared/domain/facility.ts";
import {
  btuPerHourToTonsOfRefrigeration,
  cfmToM3PerS,
  fahrenheitDifferenceToKelvin,
  gpmToLitresPerSecond,
  m3PerHourToM3PerS,
} from "../../src/shared/domain/units.ts";

function expectWithinPercent(actual: number, expected: number, percent: number): void {
  expect(Math.abs(actual - expected) / Math.abs(expected)).toBeLessThanOrEqual(percent / 100);
}

describe("INDICATIVE_CAUTION", () => {
  it("says in plain words that figures are indicative and plant is for qualified engineers under local codes", () => {
    expect(INDICATIVE_CAUTION).toMatch(/indicative/i);
    expect(INDICATIVE_CAUTION).toMatch(/planning/i);
    expect(INDICATIVE_CAUTION).toMatch(/qualified engineers/i);
    expect(INDICATIVE_CAUTION).toMatch(/local codes/i);
  });
});

describe("redundancyLabel", () => {
  type Row = {
    needed: number;
    systems: number;
    commissioned: number[];
    label: string;
    kind: RedundancyKind;
    spare: number;
    shortfall: number;
  };

  // Source: ANSI/TIA-942 definitions of N, N+1, N+2, 2N and 2(N+1), as quoted in a national
  // regulator's data-centre directive (secondary); rows from CHECKS.md, "Redundancy labels".
  const published: Row[] = [
    { needed: 4, systems: 1, commissioned: [3], label: "short by 1", kind: "short", spare: 0, shortfall: 1 },
    { needed: 4, systems: 1, commissioned: [4], label: "N", kind: "n", spare: 0, shortfall: 0 },
    { needed: 4, systems: 1, commissioned: [5], label: "N+1", kind: "n_plus", spare: 1, shortfall: 0 },
    { needed: 4, systems: 1, commissioned: [6], label: "N+2", kind: "n_plus", spare: 2, shortfall: 0 },
    { needed: 4, systems: 2, commissioned: [4, 4], label: "2N", kind: "two_n", spare: 1, shortfall: 0 },
    { needed: 4, systems: 2, commissioned: [5, 5], label: "2(N+1)", kind: "two_n_plus", spare: 3, shortfall: 0 },
  ];

  it.each(published)(
    "ANSI/TIA-942: N = $needed, $systems system(s) of $commissioned → $label",
    ({ needed, systems, commissioned, label, kind, spare, shortfall }) => {
      expect(redundancyLabel({ neededPerSystem: needed, systems, commissionedPerSystem: commissioned })).toEqual({
        label,
        kind,
        spare,
        shortfall,
      });
    },
  );

  it("tells N+1 from 2N when N = 1 by the number of systems, not the unit count", () => {
    // Source: CHECKS.md, "Redundancy labels" (unit counts alone cannot tell N+1 from 2N when N = 1)
    expect(redundancyLabel({ neededPerSystem: 1, systems: 1, commissionedPerSystem: [2] }).label).toBe("N+1");
    expect(redundancyLabel({ neededPerSystem: 1, systems: 2, commissionedPerSystem: [1, 1] }).label).toBe("2N");
  });

  // Our own examples: the Aldermere Campus Phase 2 plant (invented demo scenario).
  const aldermere: (Row & { plant: string })[] = [
    { plant: "5 × 400 kW chillers, 4 needed", needed: 4, systems: 1, commissioned: [5], label: "N+1", kind: "n_plus", spare: 1, shortfall: 0 },
    { plant: "8 supply fans, 6 needed", needed: 6, systems: 1, commissioned: [8], label: "N+2", kind: "n_plus", spare: 2, shortfall: 0 },
    { plant: "2 + 1 × 1,250 kVA generators", needed: 2, systems: 1, commissioned: [3], label: "N+1", kind: "n_plus", spare: 1, shortfall: 0 },
    { plant: "4 × 500 kW UPS modules, 3 needed", needed: 3, systems: 1, commissioned: [4], label: "N+1", kind: "n_plus", spare: 1, shortfall: 0 },
    { plant: "chillers while the fifth awaits commissioning", needed: 4, systems: 1, commissioned: [4], label: "N", kind: "n", spare: 0, shortfall: 0 },
    { plant: "UPS with two modules commissioned so far", needed: 3, systems: 1, commissioned: [2], label: "short by 1", kind: "short", spare: 0, shortfall: 1 },
  ];

  it.each(aldermere)("Aldermere $plant → $label", ({ needed, systems, commissioned, label, kind, spare, shortfall }) => {
    expect(redundancyLabel({ neededPerSystem: needed, systems, commissionedPerSystem: commissioned })).toEqual({
      label,
      kind,
      spare,
      shortfall,
    });
  });

  // Our own examples: designs of several systems that are not all complete. A system counts
  // only when it carries the whole load alone, so the label never claims 2N early.
  const incomplete: Row[] = [
    { needed: 4, systems: 2, commissioned: [4, 3], label: "N (short of 2N by 1)", kind: "n", spare: 0, shortfall: 1 },
    { needed: 4, systems: 2, commissioned: [5, 3], label: "N+1 (short of 2N by 1)", kind: "n_plus", spare: 1, shortfall: 1 },
    { needed: 4, systems: 2, commissioned: [3, 3], label: "short by 1 (short of 2N by 2)", kind: "short", spare: 0, shortfall: 2 },
    { needed: 4, systems: 2, commissioned: [4], label: "N (short of 2N by 4)", kind: "n", spare: 0, shortfall: 4 },
    { needed: 4, systems: 3, commissioned: [4, 4, 0], label: "2N (short of 3N by 4)", kind: "two_n", spare: 1, shortfall: 4 },
    { needed: 4, systems: 3, commissioned: [4, 4, 4], label: "3N", kind: "two_n", spare: 2, shortfall: 0 },
    { needed: 4, systems: 2, commissioned: [5, 4], label: "2N", kind: "two_n", spare: 2, shortfall: 0 },
    { needed: 4, systems: 2, commissioned: [6, 6], label: "2(N+2)", kind: "two_n_plus", spare: 5, shortfall: 0 },
    { needed: 4, systems: 1, commissioned: [], label: "short by 4", kind: "short", spare: 0, shortfall: 4 },
  ];

  it.each(incomplete)(
    "N = $needed, $systems system(s) of $commissioned → $label",
    ({ needed, systems, commissioned, label, kind, spare, shortfall }) => {
      expect(redundancyLabel({ neededPerSystem: needed, systems, commissionedPerSystem: commissioned })).toEqual({
        label,
        kind,
        spare,
        shortfall,
      });
    },
  );

  it.each([0, -2, Number.NaN, Number.POSITIVE_INFINITY])(
    "with units needed = %s, claims no redundancy and does not throw",
    (needed) => {
      expect(redundancyLabel({ neededPerSystem: needed, systems: 1, commissionedPerSystem: [5] })).toEqual({
        label: "not assessed: units needed not set",
        kind: "short",
        spare: 0,
        shortfall: 0,
      });
    },
  );

  it("rounds a fractional duty up and fractional or negative unit counts down", () => {
    // Our own examples: 3.5 units of duty needs 4 units; 4.9 commissioned is 4 whole units
    expect(redundancyLabel({ neededPerSystem: 3.5, systems: 1, commissionedPerSystem: [4] }).label).toBe("N");
    expect(redundancyLabel({ neededPerSystem: 4, systems: 1, commissionedPerSystem: [4.9] }).label).toBe("N");
    expect(redundancyLabel({ neededPerSystem: 4, systems: 1, commissionedPerSystem: [-3] }).label).toBe("short by 4");
  });

  it("counts fewer than one system as one, and ignores counts beyond the designed systems", () => {
    expect(redundancyLabel({ neededPerSystem: 4, systems: 0, commissionedPerSystem: [5] }).label).toBe("N+1");
    expect(redundancyLabel({ neededPerSystem: 4, systems: 1, commissionedPerSystem: [4, 4] }).label).toBe("N");
  });

  const counts = fc.record({
    needed: fc.integer({ min: 1, max: 12 }),
    commissioned: fc.array(fc.integer({ min: 0, max: 20 }), { minLength: 1, maxLength: 4 }),
  });

  it("property: one more commissioned unit never lowers spare and never raises the shortfall", () => {
    fc.assert(
      fc.property(counts, fc.nat(), ({ needed, commissioned }, pick) => {
        const systems = commissioned.length;
        const before = redundancyLabel({ neededPerSystem: needed, systems, commissionedPerSystem: commissioned });
        const more = commissioned.slice();
        const index = pick % systems;
        more[index] = more[index]! + 1;
        const after = redundancyLabel({ neededPerSystem: needed, systems, commissionedPerSystem: more });
        expect(after.spare).toBeGreaterThanOrEqual(before.spare);
        expect(after.shortfall).toBeLessThanOrEqual(before.shortfall);
      }),
    );
  });

  it("property: claims two or more complete systems only when at least two carry the load alone", () => {
    fc.assert(
      fc.property(counts, ({ needed, commissioned }) => {
        const result = redundancyLabel({
          neededPerSystem: needed,
          systems: commissioned.length,
          commissionedPerSystem: commissioned,
        });
        const complete = commissioned.filter((c) => c >= needed).length;
        expect(result.kind === "two_n" || result.kind === "two_n_plus").toBe(complete >= 2);
        expect(result.kind === "short").toBe(complete === 0);
        expect(result.shortfall === 0).toBe(complete === commissioned.length);
      }),
    );
  });
});

describe("fuelBurnLitresPerHour and fuelAutonomyHours", () => {
  it("a 60 kW set at 75 % load burns 12.15 L/h and a 180 L tank lasts 14.81 h", () => {
    // Source: engineering calculator site, diesel autonomy worked example (secondary)
    expect(fuelBurnLitresPerHour({ loadKW: 60 * 0.75 })).toBeCloseTo(12.15, 10);
    expect(fuelAutonomyHours({ usableFuelLitres: 180, loadKW: 60 * 0.75 })).toBeCloseTo(14.81, 2);
  });

  it("uses 0.27 L/kWh by default", () => {
    expect(DEFAULT_SPECIFIC_FUEL_CONSUMPTION_L_PER_KWH).toBe(0.27);
    expect(fuelBurnLitresPerHour({ loadKW: 100 })).toBeCloseTo(27, 10);
    expect(fuelBurnLitresPerHour({ loadKW: 100, specificConsumptionLitresPerKWh: 0.3 })).toBeCloseTo(30, 10);
  });

  // Source: vendor fuel-consumption charts, widely reproduced (secondary; estimates only),
  // CHECKS.md "Diesel generators and fuel"; specific consumption per row derived.
  const chart = [
    { ratedKW: 1_000, loadFraction: 0.25, litresPerHour: 81.8, litresPerKWh: 0.3272 },
    { ratedKW: 1_000, loadFraction: 0.5, litresPerHour: 137.8, litresPerKWh: 0.2756 },
    { ratedKW: 1_000, loadFraction: 0.75, litresPerHour: 197.2, litresPerKWh: 0.262933 },
    { ratedKW: 1_000, loadFraction: 1, litresPerHour: 269.1, litresPerKWh: 0.2691 },
    { ratedKW: 2_000, loadFraction: 0.25, litresPerHour: 162.0, litresPerKWh: 0.324 },
    { ratedKW: 2_000, loadFraction: 0.5, litresPerHour: 273.3, litresPerKWh: 0.2733 },
    { ratedKW: 2_000, loadFraction: 0.75, litresPerHour: 391.7, litresPerKWh: 0.261133 },
    { ratedKW: 2_000, loadFraction: 1, litresPerHour: 537.1, litresPerKWh: 0.26855 },
  ];

  it.each(chart)(
    "vendor chart: $ratedKW kW set at $loadFraction load, $litresPerHour L/h → $litresPerKWh L/kWh",
    ({ ratedKW, loadFraction, litresPerHour, litresPerKWh }) => {
      const loadKW = ratedKW * loadFraction;
      const sfc = specificFuelConsumption({ litresPerHour, loadKW });
      expect(sfc).toBeCloseTo(litresPerKWh, 6);
      // With the set's own figure the burn rate reproduces the chart row.
      expect(fuelBurnLitresPerHour({ loadKW, specificConsumptionLitresPerKWh: sfc! })).toBeCloseTo(litresPerHour, 9);
    },
  );

  it("the 0.27 L/kWh default matches the charts at full load within 1 %", () => {
    // Source: vendor charts above (secondary): 269.1 L/h for 1,000 kW, 537.1 L/h for 2,000 kW
    expectWithinPercent(fuelBurnLitresPerHour({ loadKW: 1_000 }), 269.1, 1);
    expectWithinPercent(fuelBurnLitresPerHour({ loadKW: 2_000 }), 537.1, 1);
  });

  it("the default underestimates burn at quarter load, so light-load autonomy from it is optimistic", () => {
    // Source: vendor charts above (secondary): 81.8 L/h at 250 kW is 0.327 L/kWh
    expect(fuelBurnLitresPerHour({ loadKW: 250 })).toBeLessThan(81.8);
  });

  it.each([
    // Our own examples: the Aldermere 40,000 L bulk tank
    { usableFuelLitres: 40_000, loadKW: 1_500, hours: 98.765432 },
    { usableFuelLitres: 40_000, loadKW: 2_500, hours: 59.259259 },
    // Our own example: the same tank at half full and the IT load of Hall 2A and HD-1 (980 kW)
    { usableFuelLitres: 20_000, loadKW: 980, hours: 75.58579 },
    { usableFuelLitres: 0, loadKW: 980, hours: 0 },
  ])("$usableFuelLitres L at $loadKW kW lasts $hours h", ({ usableFuelLitres, loadKW, hours }) => {
    expect(fuelAutonomyHours({ usableFuelLitres, loadKW })).toBeCloseTo(hours, 5);
  });

  it("at no load the autonomy is unbounded: null, not Infinity", () => {
    expect(fuelAutonomyHours({ usableFuelLitres: 40_000, loadKW: 0 })).toBeNull();
    expect(fuelBurnLitresPerHour({ loadKW: 0 })).toBe(0);
    expect(specificFuelConsumption({ litresPerHour: 10, loadKW: 0 })).toBeNull();
  });

  it("refuses negative, zero-consumption and non-finite input with a RangeError naming the field", () => {
    expect(() => fuelAutonomyHours({ usableFuelLitres: -1, loadKW: 100 })).toThrow(/usableFuelLitres/);
    expect(() => fuelAutonomyHours({ usableFuelLitres: 100, loadKW: -5 })).toThrow(RangeError);
    expect(() => fuelBurnLitresPerHour({ loadKW: 100, specificConsumptionLitresPerKWh: 0 })).toThrow(
      /specificConsumptionLitresPerKWh/,
    );
    expect(() => fuelAutonomyHours({ usableFuelLitres: Number.NaN, loadKW: 100 })).toThrow(RangeError);
  });

  it("property: autonomy × burn rate gives back the fuel", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e6, noNaN: true }),
        fc.double({ min: 1, max: 1e4, noNaN: true }),
        fc.double({ min: 0.1, max: 0.5, noNaN: true }),
        (usableFuelLitres, loadKW, specificConsumptionLitresPerKWh) => {
          const hours = fuelAutonomyHours({ usableFuelLitres, loadKW, specificConsumptionLitresPerKWh })!;
          const burn = fuelBurnLitresPerHour({ loadKW, specificConsumptionLitresPerKWh });
          expect(hours * burn).toBeCloseTo(usableFuelLitres, 4);
        },
      ),
    );
  });
});

describe("heat carried by air", () => {
  it("10,000 m³/h at ΔT 20 K carries 67.1 kW (ρ 1.202 kg/m³, cp 1.005 kJ/(kg·K))", () => {
    // Source: Engineering ToolBox, "Air — heating and cooling load" (with ρ 1.202, cp 1.005)
    const q = airHeatRemovalKW({ airflowM3PerS: m3PerHourToM3PerS(10_000), deltaTK: 20, density: 1.202, cp: 1.005 });
    expect(q).toBeCloseTo(67.1, 1);
  });

  it("2,000 CFM at 20 °F carries 43,200 Btu/h = 12.66 kW, and the SI form agrees within 1 %", () => {
    // Source: derived from Q = 1.08 × CFM × ΔT (CHECKS.md, "Heat carried by air and water")
    const btu = airHeatBtuPerHour(2_000, 20);
    expect(btu).toBeCloseTo(43_200, 6);
    expect(heatBtuPerHourToKW(btu)).toBeCloseTo(12.66, 2);
    // Source: derived; standard air ρ 1.2 kg/m³, cp 1.006 kJ/(kg·K) (ASHRAE standard air; secondary)
    const si = airHeatRemovalKW({ airflowM3PerS: cfmToM3PerS(2_000), deltaTK: fahrenheitDifferenceToKelvin(20) });
    expectWithinPercent(si, 12.66, 1);
  });

  it("uses standard air by default: ρ 1.2 kg/m³ and cp 1.006 kJ/(kg·K)", () => {
    // Source: ASHRAE standard air (secondary): 1 m³/s at 1 K carries 1.2072 kW
    expect(airHeatRemovalKW({ airflowM3PerS: 1, deltaTK: 1 })).toBeCloseTo(1.2072, 10);
  });

  it.each([
    // Our own examples: an Aldermere supply fan moving 12 m³/s across a 12 K rise
    { airflowM3PerS: 12, deltaTK: 12, kW: 173.8368 },
    // Our own example: six such fans, the number needed, against Hall 2A's 480 kW
    { airflowM3PerS: 72, deltaTK: 12, kW: 1043.0208 },
    { airflowM3PerS: 0, deltaTK: 12, kW: 0 },
  ])("$airflowM3PerS m³/s at $deltaTK K carries $kW kW", ({ airflowM3PerS, deltaTK, kW }) => {
    expect(airHeatRemovalKW({ airflowM3PerS, deltaTK })).toBeCloseTo(kW, 6);
  });

  it("refuses a negative airflow and a non-positive density", () => {
    expect(() => airHeatRemovalKW({ airflowM3PerS: -1, deltaTK: 10 })).toThrow(/airflowM3PerS/);
    expect(() => airHeatRemovalKW({ airflowM3PerS: 1, deltaTK: 10, density: 0 })).toThrow(/density/);
    expect(() => airHeatRemovalKW({ airflowM3PerS: 1, deltaTK: Number.NaN })).toThrow(RangeError);
  });

  it("property: heat removal is linear in airflow", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 500, noNaN: true }),
        fc.double({ min: 0, max: 500, noNaN: true }),
        fc.double({ min: -30, max: 30, noNaN: true }),
        fc.double({ min: 0, max: 10, noNaN: true }),
        (a, b, deltaTK, k) => {
          const q = (airflowM3PerS: number) => airHeatRemovalKW({ airflowM3PerS, deltaTK });
          expect(q(a + b)).toBeCloseTo(q(a) + q(b), 6);
          expect(q(k * a)).toBeCloseTo(k * q(a), 6);
        },
      ),
    );
  });
});

describe("heat carried by water", () => {
  it("10 kg/s at ΔT 6 K carries 251.16 kW", () => {
    // Source: derived from Q = ṁ · cp · ΔT, cp 4.186 kJ/(kg·K) (CHECKS.md)
    expect(waterHeatRemovalKW({ massFlowKgPerS: 10, deltaTK: 6 })).toBeCloseTo(251.16, 10);
  });

  it("10 gpm at 12 °F carries 60,000 Btu/h = 5 tons of refrigeration", () => {
    // Source: IP rule Q = 500 × GPM × ΔT (secondary)
    const btu = waterHeatBtuPerHour(10, 12);
    expect(btu).toBe(60_000);
    expect(btuPerHourToTonsOfRefrigeration(btu)).toBe(5);
  });

  it("the SI form agrees with the IP rule within 1 % for 10 gpm at 12 °F", () => {
    // Source: derived; 60,000 Btu/h = 17.584 kW (NIST SP 811 Btu/h → W; secondary)
    const kgPerS = litresPerSecondToKgPerS(gpmToLitresPerSecond(10));
    const si = waterHeatRemovalKW({ massFlowKgPerS: kgPerS, deltaTK: fahrenheitDifferenceToKelvin(12) });
    expectWithinPercent(si, heatBtuPerHourToKW(60_000), 1);
  });

  it.each([
    // Our own example: one 400 kW Aldermere chiller at a 6 K chilled-water rise needs about 15.93 kg/s
    { massFlowKgPerS: 15.926, deltaTK: 6, cp: undefined, kW: 399.9974 },
    // Our own example: 30 % glycol with cp about 3.7 kJ/(kg·K) (from memory) carries less at the same flow
    { massFlowKgPerS: 15.926, deltaTK: 6, cp: 3.7, kW: 353.5572 },
  ])("$massFlowKgPerS kg/s at $deltaTK K (cp $cp) carries $kW kW", ({ massFlowKgPerS, deltaTK, cp, kW }) => {
    expect(waterHeatRemovalKW({ massFlowKgPerS, deltaTK, ...(cp === undefined ? {} : { cp }) })).toBeCloseTo(kW, 2);
  });

  it("turns litres per second into kilograms per second at 1 kg/L unless told otherwise", () => {
    // Source: water ≈ 1 kg/L (common practice)
    expect(litresPerSecondToKgPerS(12.5)).toBe(12.5);
    expect(litresPerSecondToKgPerS(10, 1.04)).toBeCloseTo(10.4, 10);
    expect(() => litresPerSecondToKgPerS(-1)).toThrow(RangeError);
  });

  it("property: heat removal is linear in flow", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 200, noNaN: true }),
        fc.double({ min: 0, max: 200, noNaN: true }),
        fc.double({ min: -15, max: 15, noNaN: true }),
        fc.double({ min: 0, max: 10, noNaN: true }),
        (a, b, deltaTK, k) => {
          const q = (massFlowKgPerS: number) => waterHeatRemovalKW({ massFlowKgPerS, deltaTK });
          expect(q(a + b)).toBeCloseTo(q(a) + q(b), 6);
          expect(q(k * a)).toBeCloseTo(k * q(a), 6);
        },
      ),
    );
  });
});

describe("compareHeatRemovalWithItLoad", () => {
  it.each([
    // Our own examples: Aldermere blocks (Hall 2A 480 kW, HD-1 500 kW)
    { removalKW: 600, itLoadKW: 480, ratio: 1.25, marginKW: 120 },
    { removalKW: 450, itLoadKW: 500, ratio: 0.9, marginKW: -50 },
    { removalKW: 50, itLoadKW: 0, ratio: null, marginKW: 50 },
  ])("$removalKW kW against $itLoadKW kW of IT load", ({ removalKW, itLoadKW, ratio, marginKW }) => {
    const result = compareHeatRemovalWithItLoad(removalKW, itLoadKW);
    if (ratio === null) expect(result.ratio).toBeNull();
    else expect(result.ratio).toBeCloseTo(ratio, 10);
    expect(result.marginKW).toBeCloseTo(marginKW, 10);
  });
});

describe("pue and dcie", () => {
  it("13,140,000 kWh over 8,760,000 kWh of IT energy is a PUE of 1.50", () => {
    // Source: derived from PUE = total facility energy / IT equipment energy (ISO/IEC 30134-2)
    expect(pue({ totalFacilityKWh: 13_140_000, itKWh: 8_760_000 })).toBeCloseTo(1.5, 12);
    expect(dcie({ totalFacilityKWh: 13_140_000, itKWh: 8_760_000 })).toBeCloseTo(66.666667, 6);
  });

  it.each([
    // Source: The Green Grid, DCiE = 1 / PUE (secondary)
    { pue: 2.0, dcie: 50 },
    { pue: 1.6, dcie: 62.5 },
    // Our own example: a facility with no overhead at all
    { pue: 1.0, dcie: 100 },
  ])("PUE $pue ↔ DCiE $dcie %", ({ pue: p, dcie: d }) => {
    expect(dcieFromPue(p)).toBeCloseTo(d, 10);
    expect(pueFromDcie(d)).toBeCloseTo(p, 10);
  });

  it("our own example: a year of Hall 2A at 480 kW with 168 kW of overhead is PUE 1.35", () => {
    const itKWh = 480 * 8_760;
    expect(pue({ totalFacilityKWh: (480 + 168) * 8_760, itKWh })).toBeCloseTo(1.35, 12);
  });

  it("gives null, not a misleading figure, when IT energy is 0 or the total is below the IT energy", () => {
    expect(pue({ totalFacilityKWh: 1_000, itKWh: 0 })).toBeNull();
    expect(dcie({ totalFacilityKWh: 1_000, itKWh: 0 })).toBeNull();
    expect(pue({ totalFacilityKWh: 900, itKWh: 1_000 })).toBeNull();
    expect(dcieFromPue(0.8)).toBeNull();
    expect(pueFromDcie(0)).toBeNull();
    expect(pueFromDcie(120)).toBeNull();
    expect(() => pue({ totalFacilityKWh: Number.NaN, itKWh: 1 })).toThrow(RangeError);
  });

  it("property: PUE × DCiE is 100 %", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1, max: 1e9, noNaN: true }),
        fc.double({ min: 0, max: 3, noNaN: true }),
        (itKWh, overheadFraction) => {
          const energy = { totalFacilityKWh: itKWh * (1 + overheadFraction), itKWh };
          expect(pue(energy)! * dcie(energy)!).toBeCloseTo(100, 9);
          expect(pue(energy)!).toBeGreaterThanOrEqual(1);
        },
      ),
    );
  });
});

describe("inletTemperatureBand", () => {
  it("uses recommended 18–27 °C and class A1 allowable 15–32 °C", () => {
    // Source: ASHRAE TC 9.9, Thermal Guidelines for Data Processing Environments, 5th ed., 2021, Table 2.1 (secondary)
    expect(ASHRAE_RECOMMENDED_INLET_C).toEqual({ min: 18, max: 27 });
    expect(ASHRAE_A1_ALLOWABLE_INLET_C).toEqual({ min: 15, max: 32 });
  });

  // Source: ASHRAE TC 9.9, Thermal Guidelines, 5th ed., 2021, Table 2.1 (secondary); ends of each range inclusive
  const boundaries: { celsius: number; band: InletTemperatureBand }[] = [
    { celsius: 14.99, band: "below_allowable" },
    { celsius: 15, band: "allowable_low" },
    { celsius: 17.99, band: "allowable_low" },
    { celsius: 18, band: "recommended" },
    { celsius: 27, band: "recommended" },
    { celsius: 27.01, band: "allowable_high" },
    { celsius: 32, band: "allowable_high" },
    { celsius: 32.01, band: "above_allowable" },
  ];
  it.each(boundaries)("$celsius °C is $band", ({ celsius, band }) => {
    expect(inletTemperatureBand(celsius)).toBe(band);
  });

  it.each([
    // Our own examples: Aldermere hall readings during integrated systems testing
    { celsius: 22.5, band: "recommended" },
    { celsius: 29.4, band: "allowable_high" },
    { celsius: 35, band: "above_allowable" },
    { celsius: 10, band: "below_allowable" },
  ] as const)("our own example: $celsius °C is $band", ({ celsius, band }) => {
    expect(inletTemperatureBand(celsius)).toBe(band);
  });

  it("refuses a temperature that is not a number", () => {
    expect(() => inletTemperatureBand(Number.NaN)).toThrow(RangeError);
  });

  it("property: a warmer inlet never falls in a cooler band", () => {
    const order: InletTemperatureBand[] = [
      "below_allowable",
      "allowable_low",
      "recommended",
      "allowable_high",
      "above_allowable",
    ];
    fc.assert(
      fc.property(
        fc.double({ min: -20, max: 60, noNaN: true }),
        fc.double({ min: -20, max: 60, noNaN: true }),
        (a, b) => {
          const [low, high] = a <= b ? [a, b] : [b, a];
          expect(order.indexOf(inletTemperatureBand(low))).toBeLessThanOrEqual(
            order.indexOf(inletTemperatureBand(high)),
          );
        },
      ),
    );
  });
});

// Our own examples: Aldermere Campus Phase 2 (invented demo scenario).
const milestones: MilestoneDates[] = [
  { id: 1, baselineFinish: "2025-03-14", forecastFinish: "2025-03-20", actualFinish: "2025-03-20" },
  { id: 2, baselineFinish: "2025-09-30", forecastFinish: "2025-10-21", actualFinish: null },
  { id: 3, baselineFinish: "2025-11-28", forecastFinish: "2025-11-14", actualFinish: null },
  { id: 4, baselineFinish: "2026-06-30", forecastFinish: null, actualFinish: null },
  { id: 5, baselineFinish: "2026-05-29", forecastFinish: "2026-07-31", actualFinish: null },
  { id: 6, baselineFinish: "2025-06-30", forecastFinish: "2025-07-04", actualFinish: "2025-07-11" },
  { id: 7, baselineFinish: "2025-08-29", forecastFinish: null, actualFinish: "2025-08-22" },
];

const hall2A: CapacityBlockInput = { id: 10, name: "Hall 2A", racks: 48, itKW: 480, dependsOn: [1, 2] };
const hd1: CapacityBlockInput = { id: 11, name: "HD-1", racks: 20, itKW: 500, dependsOn: [3] };
const hall2B: CapacityBlockInput = { id: 12, name: "Hall 2B", racks: 48, itKW: 480, dependsOn: [4, 5] };

describe("blockReadiness", () => {
  it("a block with an open milestone is not ready; its forecast is the latest actual-else-forecast", () => {
    expect(blockReadiness(hall2A, milestones)).toEqual({
      blockId: 10,
      ready: false,
      readyDate: null,
      forecastReadyDate: "2025-10-21",
      baselineReadyDate: "2025-09-30",
      slipDays: 21,
      unknownMilestoneIds: [],
    });
  });

  it("a block whose milestones all have actual finishes is ready on the latest of them", () => {
    const suite: CapacityBlockInput = { id: 13, name: "Client suite", racks: 0, itKW: 0, dependsOn: [6, 7] };
    expect(blockReadiness(suite, milestones)).toEqual({
      blockId: 13,
      ready: true,
      readyDate: "2025-08-22",
      forecastReadyDate: "2025-08-22",
      baselineReadyDate: "2025-08-29",
      slipDays: -7,
      unknownMilestoneIds: [],
    });
  });

  it("a pulled-in forecast shows as negative slip", () => {
    const result = blockReadiness(hd1, milestones);
    expect(result.forecastReadyDate).toBe("2025-11-14");
    expect(result.slipDays).toBe(-14);
  });

  it("a milestone with no forecast counts at its baseline date", () => {
    const result = blockReadiness(hall2B, milestones);
    expect(result.baselineReadyDate).toBe("2026-06-30");
    expect(result.forecastReadyDate).toBe("2026-07-31");
    expect(result.slipDays).toBe(31);
  });

  it("a block that depends on no milestone is not ready: nothing proves it is", () => {
    const empty: CapacityBlockInput = { id: 14, name: "Hall 2C", racks: 48, itKW: 480, dependsOn: [] };
    expect(blockReadiness(empty, milestones)).toEqual({
      blockId: 14,
      ready: false,
      readyDate: null,
      forecastReadyDate: null,
      baselineReadyDate: null,
      slipDays: null,
      unknownMilestoneIds: [],
    });
  });

  it("an unknown milestone keeps a block from being ready and is listed once", () => {
    const block: CapacityBlockInput = { id: 15, name: "Hall 2A annex", racks: 8, itKW: 80, dependsOn: [6, 99, 7, 99] };
    const result = blockReadiness(block, milestones);
    expect(result.ready).toBe(false);
    expect(result.readyDate).toBeNull();
    expect(result.unknownMilestoneIds).toEqual([99]);
    expect(result.forecastReadyDate).toBe("2025-08-22");
  });

  it("counts calendar days across a leap day and a year end", () => {
    // Source: the Gregorian calendar (2024 is a leap year; 2025 is not) (common practice)
    const dates: MilestoneDates[] = [
      { id: 1, baselineFinish: "2024-02-28", forecastFinish: "2024-03-01", actualFinish: null },
      { id: 2, baselineFinish: "2025-12-30", forecastFinish: "2026-01-02", actualFinish: null },
      { id: 3, baselineFinish: "2025-02-28", forecastFinish: "2025-03-01", actualFinish: null },
    ];
    const slip = (id: number) =>
      blockReadiness({ id: 1, name: "x", racks: 1, itKW: 1, dependsOn: [id] }, dates).slipDays;
    expect(slip(1)).toBe(2);
    expect(slip(2)).toBe(3);
    expect(slip(3)).toBe(1);
  });

  it.each(["2025-02-29", "2025-13-01", "2025-9-30", "30/09/2025", ""])(
    "refuses a date that is not a real YYYY-MM-DD calendar date: %j",
    (bad) => {
      const dates: MilestoneDates[] = [{ id: 1, baselineFinish: bad, forecastFinish: null, actualFinish: null }];
      expect(() => blockReadiness({ id: 1, name: "x", racks: 1, itKW: 1, dependsOn: [1] }, dates)).toThrow(RangeError);
    },
  );
});

describe("capacityRamp", () => {
  it("steps cumulative racks and kW on the baseline and the forecast, one point per date", () => {
    const noMilestones: CapacityBlockInput = { id: 14, name: "Hall 2C", racks: 48, itKW: 480, dependsOn: [] };
    // Its known milestone would date it 2025-03-20; milestone 99 might be later, so it is left out.
    const partlyUnknown: CapacityBlockInput = { id: 15, name: "Annex", racks: 8, itKW: 80, dependsOn: [1, 99] };
    const unknown: CapacityBlockInput = { id: 16, name: "Annex 2", racks: 8, itKW: 80, dependsOn: [99] };
    expect(capacityRamp([hall2B, hd1, hall2A, noMilestones, partlyUnknown, unknown], milestones)).toEqual([
      { date: "2025-09-30", baselineRacks: 48, baselineKW: 480, forecastRacks: 0, forecastKW: 0 },
      { date: "2025-10-21", baselineRacks: 48, baselineKW: 480, forecastRacks: 48, forecastKW: 480 },
      { date: "2025-11-14", baselineRacks: 48, baselineKW: 480, forecastRacks: 68, forecastKW: 980 },
      { date: "2025-11-28", baselineRacks: 68, baselineKW: 980, forecastRacks: 68, forecastKW: 980 },
      { date: "2026-06-30", baselineRacks: 116, baselineKW: 1460, forecastRacks: 68, forecastKW: 980 },
      { date: "2026-07-31", baselineRacks: 116, baselineKW: 1460, forecastRacks: 116, forecastKW: 1460 },
    ]);
  });

  it("merges baseline and forecast steps that fall on the same date", () => {
    const dates: MilestoneDates[] = [
      { id: 1, baselineFinish: "2025-09-30", forecastFinish: "2025-09-30", actualFinish: null },
      { id: 2, baselineFinish: "2025-08-29", forecastFinish: "2025-09-30", actualFinish: null },
    ];
    const blocks: CapacityBlockInput[] = [
      { id: 1, name: "Hall 2A", racks: 48, itKW: 480, dependsOn: [1] },
      { id: 2, name: "HD-1", racks: 20, itKW: 500, dependsOn: [2] },
    ];
    expect(capacityRamp(blocks, dates)).toEqual([
      { date: "2025-08-29", baselineRacks: 20, baselineKW: 500, forecastRacks: 0, forecastKW: 0 },
      { date: "2025-09-30", baselineRacks: 68, baselineKW: 980, forecastRacks: 68, forecastKW: 980 },
    ]);
  });

  it("is empty with no blocks, and refuses negative racks", () => {
    expect(capacityRamp([], milestones)).toEqual([]);
    expect(() => capacityRamp([{ ...hall2A, racks: -1 }], milestones)).toThrow(/racks/);
  });

  it("property: totals never fall, dates ascend once each, and both lines end at the same total", () => {
    const dateArb = fc
      .integer({ min: 0, max: 1_000 })
      .map((offset) => new Date(Date.UTC(2025, 0, 1) + offset * 86_400_000).toISOString().slice(0, 10));
    const milestoneArb = fc.record({
      baselineFinish: dateArb,
      forecastFinish: fc.option(dateArb, { nil: null }),
      actualFinish: fc.option(dateArb, { nil: null }),
    });
    const scenario = fc
      .array(milestoneArb, { minLength: 1, maxLength: 12 })
      .chain((ms) =>
        fc.record({
          milestones: fc.constant(ms.map((m, index) => ({ id: index + 1, ...m }))),
          blocks: fc.array(
            fc.record({
              racks: fc.integer({ min: 0, max: 100 }),
              itKW: fc.integer({ min: 0, max: 2_000 }),
              dependsOn: fc.array(fc.integer({ min: 1, max: ms.length }), { minLength: 1, maxLength: 4 }),
            }),
            { maxLength: 6 },
          ),
        }),
      );
    fc.assert(
      fc.property(scenario, ({ milestones: ms, blocks }) => {
        const input = blocks.map((b, index) => ({ id: index + 1, name: `Block ${index + 1}`, ...b }));
        const points = capacityRamp(input, ms);
        for (let i = 1; i < points.length; i++) {
          const prev = points[i - 1]!;
          const point = points[i]!;
          expect(point.date > prev.date).toBe(true);
          expect(point.baselineRacks).toBeGreaterThanOrEqual(prev.baselineRacks);
          expect(point.forecastRacks).toBeGreaterThanOrEqual(prev.forecastRacks);
          expect(point.baselineKW).toBeGreaterThanOrEqual(prev.baselineKW);
          expect(point.forecastKW).toBeGreaterThanOrEqual(prev.forecastKW);
        }
        const totalRacks = input.reduce((sum, b) => sum + b.racks, 0);
        const last = points.at(-1);
        expect(last?.baselineRacks ?? 0).toBe(totalRacks);
        expect(last?.forecastRacks ?? 0).toBe(totalRacks);
      }),
    );
  });
});
