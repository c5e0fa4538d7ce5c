/**
 * Earned schedule (W. Lipke and K. Henderson, "Earned Schedule", 2006): schedule
 * performance measured in time rather than in value, so that it stays meaningful to
 * the end of a late project (cost-based SPI returns to 1.0 at completion however late
 * it is; SPI(t) does not).
 */

export interface EarnedScheduleInput {
  /**
   * Cumulative planned value at the end of each period of the baseline: index 0 is the
   * end of period 1. The curve starts from 0 at time 0 and must not fall.
   */
  cumulativePv: readonly number[];
  /** Earned value at the status date, in the unit of `cumulativePv`. */
  ev: number;
  /** Actual time AT: periods from the start to the status date (fractions allowed). */
  actualTime: number;
  /** Planned duration PD: periods from the start to the baseline finish. */
  plannedDuration: number;
}

/** Earned-schedule results, in periods; null where a figure is undefined (never NaN). */
export interface EarnedSchedule {
  /** Earned schedule ES: the time at which the baseline reached today's EV; null with no PV curve. */
  es: number | null;
  /** SV(t) = ES − AT (negative: behind). */
  svT: number | null;
  /** SPI(t) = ES / AT; null when AT ≤ 0. */
  spiT: number | null;
  /** Independent estimate at completion IEAC(t) = PD / SPI(t); null when SPI(t) is null or 0. */
  ieacT: number | null;
  /** To-complete schedule performance index TSPI = (PD − ES) / (PD − AT); null when PD = AT. */
  tspi: number | null;
}

function finiteOrNull(value: number): number | null {
  if (!Number.isFinite(value)) return null;
  return value === 0 ? 0 : value; // no −0 in results
}

/**
 * The stretch [earliest, latest] of times at which the piecewise-linear PV curve
 * through (0, 0), (1, PV₁), …, (n, PVₙ) equals `ev` (or its end, when EV ≥ PVₙ).
 * `latest` is Lipke and Henderson's ES = C + (EV − PV_C) / (PV_{C+1} − PV_C), C the
 * last whole period with PV_C ≤ EV; the two differ only where the curve is flat.
 *
 * PV and EV are sums of many products, so an EV "equal" to a flat stretch of the
 * curve can differ from it in the last bits; values within a relative 1e-9 count as
 * equal, or such noise would throw ES to one end of the flat stretch or the other.
 */
function timesReaching(pv: readonly number[], ev: number): { earliest: number; latest: number } {
  const n = pv.length;
  const at = (k: number): number => (k === 0 ? 0 : (pv[k - 1] as number));
  const tolerance = 1e-9 * Math.max(1, Math.abs(ev), Math.abs(at(n)));
  const fraction = (from: number, to: number): number => Math.min(1, Math.max(0, (ev - from) / (to - from)));

  // Latest: C = last k in 0..n with PV_k ≤ EV.
  let c = -1;
  for (let k = 0; k <= n; k += 1) if (at(k) <= ev + tolerance) c = k;
  let latest: number;
  if (c === -1) latest = 0; // EV below zero: nothing earned
  else if (c === n) latest = n;
  else latest = c + fraction(at(c), at(c + 1)); // PV_{C+1} > EV + tolerance ≥ PV_C

  // Earliest: first k with PV_k ≥ EV, interpolated back into period k.
  let earliest = n;
  if (ev - tolerance <= 0) earliest = 0;
  else {
    for (let k = 1; k <= n; k += 1) {
      if (at(k) >= ev - tolerance) {
        earliest = k - 1 + fraction(at(k - 1), at(k)); // PV_{k−1} < EV − tolerance ≤ PV_k
        break;
      }
    }
  }
  return { earliest: Math.min(earliest, latest), latest };
}

/**
 * Earned schedule and its indices, in periods (the unit of `actualTime`).
 *
 * ES follows Lipke and Henderson's interpolation. Two refinements keep the figure
 * honest on a real baseline: (1) where the baseline is flat at exactly today's EV (a
 * pause in the plan), every time on the flat is an equally valid ES, and the one
 * nearest AT is taken, so a programme exactly on plan reads SPI(t) = 1 rather than
 * a spurious lead or lag; (2) ES never exceeds PD, since the plan is complete at PD
 * (with weekly sampling the last period can end after PD).
 *
 * Defined cases: an empty PV curve gives all nulls; EV ≤ 0 gives ES = AT while the
 * baseline still stands at 0 (nothing was due yet), else the time its rise began;
 * AT ≤ 0 gives SPI(t) and IEAC(t) null; PD = AT gives TSPI null.
 */
export function computeEarnedSchedule(input: EarnedScheduleInput): EarnedSchedule {
  const { cumulativePv, ev, actualTime, plannedDuration } = input;
  if (cumulativePv.length === 0 || !Number.isFinite(ev) || !Number.isFinite(actualTime) || !Number.isFinite(plannedDuration)) {
    return { es: null, svT: null, spiT: null, ieacT: null, tspi: null };
  }
  const { earliest, latest } = timesReaching(cumulativePv, ev);
  let es = Math.min(Math.max(actualTime, earliest), latest);
  es = Math.min(es, Math.max(plannedDuration, 0));
  const svT = finiteOrNull(es - actualTime);
  const spiT = actualTime > 0 ? finiteOrNull(es / actualTime) : null;
  const ieacT = spiT === null || spiT === 0 ? null : finiteOrNull(plannedDuration / spiT);
  const tspi = plannedDuration === actualTime ? null : finiteOrNull((plannedDuration - es) / (plannedDuration - actualTime));
  return { es: finiteOrNull(es), svT, spiT, ieacT, tspi };
}
