/**
 * Earned value management (EVM) indices, as summarised in the PMI PMBOK Guide's
 * earned value calculations table. Units are whatever the inputs use (weight units or
 * money in minor units); the results keep full precision and are rounded only for
 * display.
 */

export interface EarnedValueInput {
  /** Planned value at the status date. */
  pv: number;
  /** Earned value at the status date. */
  ev: number;
  /** Actual cost to the status date; omit (or null) when costs are not tracked. */
  ac?: number | null;
  /** Budget at completion. */
  bac: number;
}

/**
 * EVM results. A ratio whose denominator is zero, or a figure built on such a ratio,
 * is `null` rather than NaN or Infinity; every cost figure is `null` without an AC.
 */
export interface EarnedValue {
  /** Schedule variance SV = EV − PV. */
  sv: number;
  /** Schedule performance index SPI = EV / PV; null when PV = 0. */
  spi: number | null;
  /** Cost variance CV = EV − AC. */
  cv: number | null;
  /** Cost performance index CPI = EV / AC; null when AC = 0. */
  cpi: number | null;
  /** Estimate at completion EAC = BAC / CPI; null when CPI is null or 0. */
  eac: number | null;
  /** Estimate to complete ETC = EAC − AC. */
  etc: number | null;
  /** Variance at completion VAC = BAC − EAC. */
  vac: number | null;
  /** To-complete performance index TCPI = (BAC − EV) / (BAC − AC); null when BAC = AC. */
  tcpi: number | null;
}

/** Division that answers null instead of NaN or ±Infinity, and never −0. */
function ratio(numerator: number, denominator: number): number | null {
  if (denominator === 0 || !Number.isFinite(numerator) || !Number.isFinite(denominator)) return null;
  const value = numerator / denominator;
  if (!Number.isFinite(value)) return null;
  return value === 0 ? 0 : value;
}

/**
 * Computes SV, SPI, CV, CPI, EAC, ETC, VAC and TCPI from PV, EV, AC and BAC (all in
 * the same unit).
 *
 * EAC is computed as BAC × AC / EV, which is BAC / CPI without first rounding CPI to
 * a float: a BAC of 500,000 at CPI 150,000/162,000 gives 540,000 exactly.
 */
export function computeEarnedValue(input: EarnedValueInput): EarnedValue {
  const { pv, ev, bac } = input;
  const ac = input.ac ?? null;
  const sv = ev - pv;
  const spi = ratio(ev, pv);
  if (ac === null) {
    return { sv, spi, cv: null, cpi: null, eac: null, etc: null, vac: null, tcpi: null };
  }
  const cv = ev - ac;
  const cpi = ratio(ev, ac);
  const eac = cpi === null || cpi === 0 ? null : ratio(bac * ac, ev);
  const etc = eac === null ? null : eac - ac;
  const vac = eac === null ? null : bac - eac;
  const tcpi = ratio(bac - ev, bac - ac);
  return { sv, spi, cv, cpi, eac, etc, vac, tcpi };
}
