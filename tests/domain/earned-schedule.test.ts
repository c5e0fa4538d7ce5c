import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { computeEarnedSchedule } from "../../src/shared/domain/earned-schedule.ts";
import { computeEarnedValue } from "../../src/shared/domain/earned-value.ts";

describe("computeEarnedSchedule", () => {
  // Source: Lipke & Henderson, "Earned Schedule", 2006 presentation: ES = C +
  // (EV − PV_C) / (PV_{C+1} − PV_C), SV(t) = ES − AT, SPI(t) = ES / AT, IEAC(t) =
  // PD / SPI(t), TSPI = (PD − ES) / (PD − AT). Fixture values derived from the formula
  // (CHECKS.md).
  it("interpolates ES 2.75 for PV 10k/20k/40k/70k/100k, EV 35k at AT 3, PD 5", () => {
    const r = computeEarnedSchedule({
      cumulativePv: [10_000, 20_000, 40_000, 70_000, 100_000],
      ev: 35_000,
      actualTime: 3,
      plannedDuration: 5,
    });
    expect(r.es).toBeCloseTo(2.75, 10);
    expect(r.spiT).toBeCloseTo(0.916667, 6);
    expect(r.svT).toBeCloseTo(-0.25, 10);
    expect(r.ieacT).toBeCloseTo(5.4545, 4);
    expect(r.tspi).toBeCloseTo(1.125, 10);
  });

  // Source: Lipke's late-finish property (stated in the 2006 material; values derived,
  // CHECKS.md): a $1M, 10-month project finished at month 12 shows cost-based SPI 1.0
  // but ES 10, SV(t) −2, SPI(t) 0.8333, IEAC(t) 12.
  it("keeps SPI(t) below 1 at a late completion while cost-based SPI returns to 1.0", () => {
    const bac = 1_000_000;
    const cumulativePv = Array.from({ length: 10 }, (_, i) => (bac * (i + 1)) / 10);
    const atCompletion = computeEarnedValue({ pv: bac, ev: bac, bac });
    expect(atCompletion.spi).toBe(1);
    expect(atCompletion.sv).toBe(0);
    const r = computeEarnedSchedule({ cumulativePv, ev: bac, actualTime: 12, plannedDuration: 10 });
    expect(r.es).toBeCloseTo(10, 10);
    expect(r.svT).toBeCloseTo(-2, 10);
    expect(r.spiT).toBeCloseTo(0.833333, 6);
    expect(r.ieacT).toBeCloseTo(12, 10);
  });

  // Our own examples.
  it.each([
    // [cumulativePv, ev, at, pd, expected es]
    [[10, 20, 30, 40], 20, 2, 4, 2], // exactly on a period end
    [[10, 20, 30, 40], 5, 2, 4, 0.5], // inside the first period, from PV₀ = 0
    [[10, 20, 30, 40], 40, 3, 4, 4], // all earned early: ES = PD
    [[10, 20, 30, 40], 50, 3, 4, 4], // EV beyond the curve: capped at its end
    [[0, 0, 10, 20], 5, 3, 4, 2.5], // a late-rising curve
  ])("PV %j, EV %d at AT %d, PD %d → ES %d", (cumulativePv, ev, actualTime, plannedDuration, es) => {
    expect(computeEarnedSchedule({ cumulativePv, ev, actualTime, plannedDuration }).es).toBeCloseTo(es, 10);
  });

  it("on a pause in the plan at exactly today's EV, takes ES nearest AT (on plan reads SPI(t) = 1)", () => {
    // Plan: 10 in week 1, 20 by week 2, nothing in weeks 3–4, 30 by week 5.
    const cumulativePv = [10, 20, 20, 20, 30];
    const onPlan = computeEarnedSchedule({ cumulativePv, ev: 20, actualTime: 3, plannedDuration: 5 });
    expect(onPlan.es).toBe(3);
    expect(onPlan.spiT).toBe(1);
    // Earned the same by week 1: the plan reached 20 at week 2, so ES is 2 (not 4).
    expect(computeEarnedSchedule({ cumulativePv, ev: 20, actualTime: 1, plannedDuration: 5 }).es).toBe(2);
    // Still 20 at week 4.5: the plan left 20 at week 4, Lipke's C + I.
    expect(computeEarnedSchedule({ cumulativePv, ev: 20, actualTime: 4.5, plannedDuration: 5 }).es).toBe(4);
  });

  it("caps ES at PD when the last weekly period ends after the planned finish", () => {
    const r = computeEarnedSchedule({ cumulativePv: [30, 60, 100], ev: 100, actualTime: 2.5, plannedDuration: 2.5 });
    expect(r.es).toBe(2.5);
    expect(r.spiT).toBe(1);
  });

  describe("defined cases", () => {
    it("empty PV curve: every figure null", () => {
      expect(computeEarnedSchedule({ cumulativePv: [], ev: 10, actualTime: 3, plannedDuration: 5 })).toEqual({
        es: null,
        svT: null,
        spiT: null,
        ieacT: null,
        tspi: null,
      });
    });

    it("AT 0: SPI(t) and IEAC(t) null, the rest defined", () => {
      const r = computeEarnedSchedule({ cumulativePv: [10, 20], ev: 0, actualTime: 0, plannedDuration: 2 });
      expect(r.es).toBe(0);
      expect(r.svT).toBe(0);
      expect(r.spiT).toBeNull();
      expect(r.ieacT).toBeNull();
      expect(r.tspi).toBe(1);
    });

    it("PD = AT: TSPI null", () => {
      const r = computeEarnedSchedule({ cumulativePv: [10, 20, 30], ev: 20, actualTime: 3, plannedDuration: 3 });
      expect(r.tspi).toBeNull();
      expect(r.es).toBe(2);
      expect(r.ieacT).toBeCloseTo(4.5, 10);
    });

    it("EV 0 once work was due: ES 0, SPI(t) 0, IEAC(t) null", () => {
      const r = computeEarnedSchedule({ cumulativePv: [10, 20, 30], ev: 0, actualTime: 2, plannedDuration: 3 });
      expect(r.es).toBe(0);
      expect(r.spiT).toBe(0);
      expect(r.svT).toBe(-2);
      expect(r.ieacT).toBeNull();
      expect(r.tspi).toBe(3);
    });

    it("EV 0 before anything was due: on schedule", () => {
      const r = computeEarnedSchedule({ cumulativePv: [0, 0, 10], ev: 0, actualTime: 1, plannedDuration: 3 });
      expect(r.es).toBe(1);
      expect(r.spiT).toBe(1);
    });

    it("a curve that never rises (nothing planned) gives finite figures", () => {
      const r = computeEarnedSchedule({ cumulativePv: [0, 0], ev: 0, actualTime: 1, plannedDuration: 2 });
      expect(r.es).toBe(1);
      expect(Object.values(r).every((v) => v === null || Number.isFinite(v))).toBe(true);
    });

    it("negative AT (status date before the start): SPI(t) null", () => {
      expect(computeEarnedSchedule({ cumulativePv: [10], ev: 0, actualTime: -1, plannedDuration: 1 }).spiT).toBeNull();
    });
  });

  it("never returns NaN or Infinity, and ES stays within [0, PD] (property)", () => {
    const curve = fc
      .array(fc.integer({ min: 0, max: 1000 }), { minLength: 1, maxLength: 30 })
      .map((steps) => steps.reduce<number[]>((acc, s) => [...acc, (acc[acc.length - 1] ?? 0) + s], []));
    fc.assert(
      fc.property(curve, fc.integer({ min: 0, max: 40_000 }), fc.double({ min: -5, max: 40, noNaN: true }), (cumulativePv, ev, actualTime) => {
        const plannedDuration = cumulativePv.length;
        const r = computeEarnedSchedule({ cumulativePv, ev, actualTime, plannedDuration });
        for (const v of Object.values(r)) if (v !== null) expect(Number.isFinite(v)).toBe(true);
        expect(r.es).not.toBeNull();
        expect(r.es as number).toBeGreaterThanOrEqual(0);
        expect(r.es as number).toBeLessThanOrEqual(plannedDuration);
      }),
    );
  });

  it("is non-decreasing in EV (property)", () => {
    const curve = fc
      .array(fc.integer({ min: 1, max: 1000 }), { minLength: 1, maxLength: 20 })
      .map((steps) => steps.reduce<number[]>((acc, s) => [...acc, (acc[acc.length - 1] ?? 0) + s], []));
    fc.assert(
      fc.property(curve, fc.integer({ min: 0, max: 20_000 }), fc.integer({ min: 0, max: 20_000 }), (cumulativePv, a, b) => {
        const [lo, hi] = a <= b ? [a, b] : [b, a];
        const args = { cumulativePv, actualTime: 5, plannedDuration: cumulativePv.length };
        expect(computeEarnedSchedule({ ...args, ev: hi }).es as number).toBeGreaterThanOrEqual(
          computeEarnedSchedule({ ...args, ev: lo }).es as number,
        );
      }),
    );
  });
});
