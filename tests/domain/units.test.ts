import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  BTU_PER_HOUR_PER_TON_OF_REFRIGERATION,
  CUBIC_METRES_PER_CUBIC_FOOT,
  KILOWATTS_PER_TON_OF_REFRIGERATION,
  LITRES_PER_US_GALLON,
  MILLIMETRES_PER_RACK_UNIT,
  WATTS_PER_BTU_PER_HOUR,
  btuPerHourToKW,
  btuPerHourToTonsOfRefrigeration,
  btuPerHourToWatts,
  celsiusToFahrenheit,
  cfmToM3PerS,
  fahrenheitDifferenceToKelvin,
  fahrenheitToCelsius,
  gpmToLitresPerSecond,
  kWToBtuPerHour,
  kWToTonsOfRefrigeration,
  kelvinDifferenceToFahrenheit,
  litresToUsGallons,
  m3PerHourToM3PerS,
  m3PerSToCfm,
  millimetresToWholeRackUnits,
  rackUnitsToMillimetres,
  tonsOfRefrigerationToKW,
  usGallonsToLitres,
  wattsToBtuPerHour,
} from "../../src/shared/domain/units.ts";

describe("heat and power units", () => {
  it("one Btu per hour is 0.29307107 W", () => {
    // Source: NIST SP 811, Appendix B.8, Btu_IT/h → W (secondary)
    expect(WATTS_PER_BTU_PER_HOUR).toBeCloseTo(0.29307107, 8);
    expect(btuPerHourToWatts(1)).toBeCloseTo(0.29307107, 8);
  });

  it("one ton of refrigeration is 12,000 Btu/h and 3.516853 kW", () => {
    // Source: NIST SP 811, Appendix B.8, ton of refrigeration (12 000 Btu_IT/h) → 3.516 853 E+03 W (secondary)
    expect(BTU_PER_HOUR_PER_TON_OF_REFRIGERATION).toBe(12_000);
    expect(KILOWATTS_PER_TON_OF_REFRIGERATION).toBeCloseTo(3.516853, 6);
    expect(tonsOfRefrigerationToKW(1)).toBeCloseTo(3.516853, 6);
    expect(btuPerHourToTonsOfRefrigeration(12_000)).toBe(1);
    expect(kWToTonsOfRefrigeration(3.516853)).toBeCloseTo(1, 6);
  });

  it.each([
    // Source: derived from NIST SP 811, Appendix B.8 (1 Btu/h = 0.29307107 W)
    { btuPerHour: 43_200, kW: 12.6607 },
    // Source: derived; 60,000 Btu/h = 5 tons × 3.516853 kW
    { btuPerHour: 60_000, kW: 17.584265 },
    // Our own example: one 400 kW chiller of the Aldermere plant, in Btu/h
    { btuPerHour: 1_364_856.65, kW: 400 },
  ])("$btuPerHour Btu/h is $kW kW", ({ btuPerHour, kW }) => {
    expect(btuPerHourToKW(btuPerHour)).toBeCloseTo(kW, 3);
    expect(kWToBtuPerHour(kW)).toBeCloseTo(btuPerHour, 0);
  });

  it("round-trips W ↔ Btu/h and kW ↔ tons without drift", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e7, max: 1e7, noNaN: true }), (watts) => {
        expect(btuPerHourToWatts(wattsToBtuPerHour(watts))).toBeCloseTo(watts, 6);
        expect(tonsOfRefrigerationToKW(kWToTonsOfRefrigeration(watts))).toBeCloseTo(watts, 6);
      }),
    );
  });
});

describe("flow and volume units", () => {
  it("one cubic foot is 0.028316846592 m³, from 1 ft = 0.3048 m exactly", () => {
    // Source: the international foot, 0.3048 m exactly (international yard and pound
    // agreement of 1959; NIST SP 811 lists the same, from memory); the cube is derived
    expect(CUBIC_METRES_PER_CUBIC_FOOT).toBeCloseTo(0.028316846592, 15);
  });

  it.each([
    // Source: derived from 1 ft = 0.3048 m: 1 ft³/min = 0.028316846592 / 60 m³/s
    { cfm: 1, m3PerS: 0.000471947443 },
    // Source: derived (CHECKS.md air example, 2,000 CFM)
    { cfm: 2_000, m3PerS: 0.943894886 },
    // Our own example: a 20,000 CFM supply fan
    { cfm: 20_000, m3PerS: 9.43894886 },
  ])("$cfm CFM is $m3PerS m³/s", ({ cfm, m3PerS }) => {
    expect(cfmToM3PerS(cfm)).toBeCloseTo(m3PerS, 8);
    expect(m3PerSToCfm(m3PerS)).toBeCloseTo(cfm, 4);
  });

  it("10,000 m³/h is 2.7778 m³/s", () => {
    // Source: Engineering ToolBox, "Air — heating and cooling load" example (10,000 m³/h)
    expect(m3PerHourToM3PerS(10_000)).toBeCloseTo(2.777778, 6);
    // Our own example: 3,600 m³/h is exactly one cubic metre a second
    expect(m3PerHourToM3PerS(3_600)).toBe(1);
  });

  it("one US gallon is 3.785411784 L exactly", () => {
    // Source: the US liquid gallon is defined as 231 in³, 1 in = 25.4 mm (common practice;
    // NIST SP 811 prints 3.785 412 E−03 m³, from memory)
    expect(LITRES_PER_US_GALLON).toBe(3.785411784);
    expect(LITRES_PER_US_GALLON).toBeCloseTo((231 * 2.54 ** 3) / 1000, 12);
    expect(usGallonsToLitres(1)).toBe(3.785411784);
    expect(litresToUsGallons(3.785411784)).toBe(1);
    // Our own example: a 40,000 L bulk tank in US gallons
    expect(litresToUsGallons(40_000)).toBeCloseTo(10_566.88, 2);
  });

  it("10 gpm is 0.6309 L/s", () => {
    // Source: derived from 1 US gal = 3.785411784 L
    expect(gpmToLitresPerSecond(10)).toBeCloseTo(0.6309020, 7);
  });
});

describe("temperature units", () => {
  it.each([
    // Source: a degree Fahrenheit is 5/9 of a kelvin (common practice; the definition of the scale)
    { deltaF: 9, deltaK: 5 },
    { deltaF: 20, deltaK: 11.111111 },
    { deltaF: 12, deltaK: 6.666667 },
    { deltaF: -18, deltaK: -10 },
  ])("a difference of $deltaF °F is $deltaK K", ({ deltaF, deltaK }) => {
    expect(fahrenheitDifferenceToKelvin(deltaF)).toBeCloseTo(deltaK, 6);
    expect(kelvinDifferenceToFahrenheit(deltaK)).toBeCloseTo(deltaF, 5);
  });

  it.each([
    // Source: fixed points of water, 32 °F = 0 °C and 212 °F = 100 °C (common practice)
    { fahrenheit: 32, celsius: 0 },
    { fahrenheit: 212, celsius: 100 },
    // Source: −40 is the same reading on both scales (derived)
    { fahrenheit: -40, celsius: -40 },
    // Source: derived; ASHRAE recommended range 18–27 °C is 64.4–80.6 °F
    { fahrenheit: 64.4, celsius: 18 },
    { fahrenheit: 80.6, celsius: 27 },
  ])("a reading of $fahrenheit °F is $celsius °C", ({ fahrenheit, celsius }) => {
    expect(fahrenheitToCelsius(fahrenheit)).toBeCloseTo(celsius, 9);
    expect(celsiusToFahrenheit(celsius)).toBeCloseTo(fahrenheit, 9);
  });

  it("treats a difference and a reading differently (no 32° offset on a ΔT)", () => {
    // Source: derived; 50 °F reads 10 °C, but a 50 °F rise is 27.78 K
    expect(fahrenheitToCelsius(50)).toBeCloseTo(10, 9);
    expect(fahrenheitDifferenceToKelvin(50)).toBeCloseTo(27.777778, 6);
  });
});

describe("rack units", () => {
  it.each([
    // Source: EIA-310, 1U = 1.75 in = 44.45 mm
    { u: 1, mm: 44.45 },
    // Source: derived from EIA-310 (CHECKS.md, racks and doors)
    { u: 42, mm: 1866.9 },
    { u: 48, mm: 2133.6 },
    // Our own example: a 2U server
    { u: 2, mm: 88.9 },
  ])("$u U of mounting space is $mm mm", ({ u, mm }) => {
    expect(rackUnitsToMillimetres(u)).toBe(mm);
    expect(millimetresToWholeRackUnits(mm)).toBe(u);
  });

  it("1U is 1.75 inches", () => {
    // Source: EIA-310 (1.75 in); 1 in = 25.4 mm exactly
    expect(MILLIMETRES_PER_RACK_UNIT).toBeCloseTo(1.75 * 25.4, 12);
  });

  it("counts only whole units in a height", () => {
    // Our own example: 2,000 mm of rail holds 44 whole units (44 × 44.45 = 1,955.8 mm)
    expect(millimetresToWholeRackUnits(2_000)).toBe(44);
    expect(millimetresToWholeRackUnits(44.44)).toBe(0);
  });

  it("converts any whole number of units to a height and back", () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 10_000 }), (u) => {
        expect(millimetresToWholeRackUnits(rackUnitsToMillimetres(u))).toBe(u);
      }),
    );
  });
});
