import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { computeEarnedValue } from "../../src/shared/domain/earned-value.ts";

/** Equal to about 12 significant figures: the figures run to trillions of minor units. */
function expectRelativelyClose(actual: number, expected: number, scale = Math.abs(expected)): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-12 * Math.max(1, scale));
}

describe("computeEarnedValue", () => {
  // Source: Schwalbe, Information Technology Project Management, ch. 7, exercise 1
  // (secondary, via CHECKS.md); formulas from the PMI PMBOK Guide, "Earned Value
  // Calculations Summary Table", Table 7-1 (secondary). ETC, VAC and TCPI derived.
  it("matches the textbook exercise PV 23,000 / EV 20,000 / AC 25,000 / BAC 120,000", () => {
    const r = computeEarnedValue({ pv: 23_000, ev: 20_000, ac: 25_000, bac: 120_000 });
    expect(r.cv).toBe(-5_000);
    expect(r.sv).toBe(-3_000);
    expect(r.cpi).toBe(0.8);
    expect(r.spi).toBeCloseTo(0.869565, 6);
    expect(r.eac).toBe(150_000);
    expect(r.etc).toBe(125_000);
    expect(r.vac).toBe(-30_000);
    expect(r.tcpi).toBeCloseTo(1.052632, 6);
  });

  // Source: an online EVM tutorial (secondary, via CHECKS.md): BAC 8, PV 2.4, EV 1.6,
  // AC 3 → TCPI 1.28. The page prints SPI 0.6; 1.6 / 2.4 is 0.6667, so the page is wrong.
  it("gives SPI 0.6667 (not the tutorial's printed 0.6) and TCPI 1.28 for BAC 8 / PV 2.4 / EV 1.6 / AC 3", () => {
    const r = computeEarnedValue({ pv: 2.4, ev: 1.6, ac: 3, bac: 8 });
    expect(r.spi).toBeCloseTo(0.666667, 6);
    expect(r.spi).not.toBeCloseTo(0.6, 2);
    expect(r.tcpi).toBeCloseTo(1.28, 10);
  });

  // Source: a PMP study guide (secondary, via CHECKS.md): BAC 500,000, EV 150,000,
  // AC 162,000 → CPI 0.925926; the guide rounds CPI to .93 first and prints EAC 538,344.
  // At full precision EAC is 540,000 exactly.
  it("gives EAC 540,000 exactly for BAC 500,000 / EV 150,000 / AC 162,000", () => {
    const r = computeEarnedValue({ pv: 150_000, ev: 150_000, ac: 162_000, bac: 500_000 });
    expect(r.cpi).toBeCloseTo(0.925926, 6);
    expect(r.eac).toBe(540_000);
    expect(r.eac).not.toBe(538_344);
    expect(r.etc).toBe(378_000);
    expect(r.vac).toBe(-40_000);
  });

  // Source: trade press article, 2006 (secondary, via CHECKS.md): BAC 200, EV 50, AC 60;
  // the article prints 240.96 after rounding CPI. At full precision EAC = 240 exactly.
  it("gives EAC 240 exactly for BAC 200 / EV 50 / AC 60", () => {
    const r = computeEarnedValue({ pv: 50, ev: 50, ac: 60, bac: 200 });
    expect(r.eac).toBe(240);
    expect(r.cpi).toBeCloseTo(0.833333, 6);
  });

  // Our own examples: the undefined ratios are null, never NaN or Infinity.
  it.each([
    [{ pv: 0, ev: 0, ac: 0, bac: 100 }, { spi: null, cpi: null, eac: null, etc: null, vac: null, tcpi: 1, sv: 0, cv: 0 }],
    [{ pv: 0, ev: 10, ac: 5, bac: 100 }, { spi: null, cpi: 2, eac: 50, etc: 45, vac: 50 }],
    [{ pv: 10, ev: 0, ac: 5, bac: 100 }, { spi: 0, cpi: 0, eac: null, etc: null, vac: null }],
    [{ pv: 10, ev: 10, ac: 0, bac: 100 }, { spi: 1, cpi: null, eac: null, cv: 10 }],
    [{ pv: 100, ev: 100, ac: 100, bac: 100 }, { spi: 1, cpi: 1, eac: 100, etc: 0, vac: 0, tcpi: null }],
  ])("defined results for %j", (input, expected) => {
    const r = computeEarnedValue(input);
    for (const [key, value] of Object.entries(expected)) expect(r[key as keyof typeof r]).toBe(value);
  });

  it("leaves every cost figure null when no actual cost is given", () => {
    expect(computeEarnedValue({ pv: 40, ev: 30, bac: 100 })).toEqual({
      sv: -10,
      spi: 0.75,
      cv: null,
      cpi: null,
      eac: null,
      etc: null,
      vac: null,
      tcpi: null,
    });
    expect(computeEarnedValue({ pv: 40, ev: 30, ac: null, bac: 100 }).cpi).toBeNull();
  });

  it("never returns NaN or Infinity (property)", () => {
    const amount = fc.oneof(fc.constant(0), fc.double({ min: 0, max: 1e9, noNaN: true }));
    fc.assert(
      fc.property(amount, amount, amount, amount, (pv, ev, ac, bac) => {
        for (const value of Object.values(computeEarnedValue({ pv, ev, ac, bac }))) {
          if (value !== null) expect(Number.isFinite(value)).toBe(true);
        }
      }),
    );
  });

  it("keeps EAC = BAC / CPI and ETC + AC = EAC (property)", () => {
    const positive = fc.integer({ min: 1, max: 10_000_000 });
    fc.assert(
      fc.property(positive, positive, positive, positive, (pv, ev, ac, bac) => {
        const r = computeEarnedValue({ pv, ev, ac, bac });
        expectRelativelyClose(r.eac as number, bac / (ev / ac));
        expectRelativelyClose((r.etc as number) + ac, r.eac as number, ac);
        expectRelativelyClose((r.vac as number) + (r.eac as number), bac, r.eac as number);
      }),
    );
  });
});
