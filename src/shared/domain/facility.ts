// Facility readiness: when capacity blocks are ready for service, how redundant the
// plant is, and the rough engineering figures (fuel autonomy, heat carried by air and
// water, PUE, inlet temperature band) shown beside them. Pure: data in, data out.
//
// Conventions for bad input: a number that is not finite, or a quantity that cannot be
// negative given as negative, throws a RangeError naming the field, because it is a
// data fault the schemas should have stopped and a figure computed from it would be
// wrong in silence. Where an answer is genuinely unbounded or undefined (no load, no IT
// energy) the function returns null instead, so a page never prints "Infinity" or NaN.
// The redundancy label never throws: it always returns the most cautious label the
// counts support.

import { btuPerHourToKW } from "./units.ts";

/**
 * Caution shown beside every engineering figure computed here (fuel autonomy, heat
 * removal, redundancy, PUE, inlet temperature band).
 */
export const INDICATIVE_CAUTION =
  "These figures are indicative, for planning conversations only. They come from simple " +
  "formulas and the values entered here, not from a design, a survey or a test. The design " +
  "and operation of plant are for qualified engineers working under local codes.";

function requireFinite(name: string, value: number): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number, got ${String(value)}`);
  }
  return value;
}

function requireNonNegative(name: string, value: number): number {
  requireFinite(name, value);
  if (value < 0) throw new RangeError(`${name} must not be negative, got ${value}`);
  return value;
}

function requirePositive(name: string, value: number): number {
  requireFinite(name, value);
  if (value <= 0) throw new RangeError(`${name} must be greater than zero, got ${value}`);
  return value;
}

// ---------------------------------------------------------------------------------
// Redundancy
// ---------------------------------------------------------------------------------

/**
 * What the commissioned plant actually delivers:
 * - `short`: no independent system carries the load (or the units needed are not set);
 * - `n`: one system carries the load with nothing to spare;
 * - `n_plus`: one system carries the load with k spare units (N+k);
 * - `two_n`: two or more independent systems each carry the whole load (2N, 3N);
 * - `two_n_plus`: two or more such systems, each with k spare units (2(N+k)).
 */
export type RedundancyKind = "short" | "n" | "n_plus" | "two_n" | "two_n_plus";

/** Counts for one kind of plant (chillers, fans, generator sets, UPS modules). */
export interface RedundancyInput {
  /** Units (whole) one system needs to carry the design load: N. */
  neededPerSystem: number;
  /**
   * Independent systems in the design (1 for N, N+1, N+2; 2 for 2N, 2(N+1)). Unit counts
   * alone cannot tell N+1 from 2N when N = 1, hence this input.
   */
  systems: number;
  /** Units commissioned in each system, in order; a missing entry counts as 0. */
  commissionedPerSystem: readonly number[];
}

/** The redundancy the commissioned units deliver, worded for a page. */
export interface RedundancyResult {
  /** "N", "N+1", "N+2", "2N", "2(N+1)", "short by 1", "N (short of 2N by 1)", … */
  label: string;
  /**
   * Units that could be out of service, whichever they are, with one complete system
   * still carrying the load. For one system this is the k of N+k; for 2N it is 1 (one
   * failure in each system stops both), for 2(N+1) it is 3.
   */
  spare: number;
  /**
   * Units still to commission before every designed system carries the load on its own
   * (0 when the design's level of redundancy is reached).
   */
  shortfall: number;
  /** What is actually delivered; see {@link RedundancyKind}. */
  kind: RedundancyKind;
}

function wholeUnits(value: number | undefined): number {
  // Fractions and garbage round towards fewer units: a half-commissioned unit carries no load.
  if (typeof value !== "number" || !Number.isFinite(value) || value <= 0) return 0;
  return Math.floor(value);
}

function plusLabel(spareEach: number): string {
  return spareEach === 0 ? "N" : `N+${spareEach}`;
}

/**
 * Redundancy label from unit counts, using the ANSI/TIA-942 meanings: N = meets the
 * base requirement with no redundancy; N+1 (N+k) = one (k) additional unit; 2N = two
 * complete systems for every one required; 2(N+1) = two complete N+1 systems.
 *
 * Only commissioned units count, and a system counts only when it carries the whole
 * load by itself: units in an incomplete system are not lent to another, because the
 * systems of a 2N design are independent by intent. So the label never claims more
 * than the plant delivers:
 * - two systems of 4 + 3 with N = 4 give "N (short of 2N by 1)", kind `n`, shortfall 1;
 * - three systems designed and two complete give "2N (short of 3N by …)".
 *
 * Defined answers for odd input, never a throw:
 * - `neededPerSystem` not a positive number: label "not assessed: units needed not set",
 *   kind `short`, spare 0, shortfall 0. Without N no claim of redundancy can be made,
 *   and `short` keeps the plant from being shown as adequate.
 * - a fractional N rounds up (3.5 units of duty needs 4 units); fractional, negative or
 *   non-numeric commissioned counts round down to whole units, negatives to 0;
 * - `systems` below 1 or not a number counts as 1; entries of `commissionedPerSystem`
 *   beyond `systems` are ignored, so a miscount never adds a system to the claim.
 *
 * @param input counts of units (dimensionless)
 * @returns label, spare units, shortfall in units, and kind
 */
export function redundancyLabel(input: RedundancyInput): RedundancyResult {
  const rawNeeded = input.neededPerSystem;
  if (typeof rawNeeded !== "number" || !Number.isFinite(rawNeeded) || rawNeeded <= 0) {
    return { label: "not assessed: units needed not set", spare: 0, shortfall: 0, kind: "short" };
  }
  const needed = Math.ceil(rawNeeded);
  const systems =
    typeof input.systems === "number" && Number.isFinite(input.systems) && input.systems >= 1
      ? Math.floor(input.systems)
      : 1;

  const listed = input.commissionedPerSystem.slice(0, systems).map(wholeUnits);
  const unlisted = systems - listed.length;

  let shortfall = unlisted * needed;
  for (const count of listed) shortfall += Math.max(0, needed - count);

  const complete = listed.filter((count) => count >= needed);
  // Worst-case failures survived: each complete system falls over after (count − N + 1)
  // losses, and the load is dropped only once every complete system has fallen.
  const spare = Math.max(0, complete.reduce((sum, count) => sum + count - needed + 1, 0) - 1);

  let delivered: string;
  let kind: RedundancyKind;
  if (complete.length === 0) {
    const best = listed.length > 0 ? Math.max(...listed) : 0;
    delivered = `short by ${needed - best}`;
    kind = "short";
  } else if (complete.length === 1) {
    const spareEach = complete[0]! - needed;
    delivered = plusLabel(spareEach);
    kind = spareEach === 0 ? "n" : "n_plus";
  } else {
    const spareEach = Math.min(...complete) - needed;
    delivered = spareEach === 0 ? `${complete.length}N` : `${complete.length}(${plusLabel(spareEach)})`;
    kind = spareEach === 0 ? "two_n" : "two_n_plus";
  }

  const label =
    systems > 1 && shortfall > 0 ? `${delivered} (short of ${systems}N by ${shortfall})` : delivered;
  return { label, spare, shortfall, kind };
}

// ---------------------------------------------------------------------------------
// Fuel
// ---------------------------------------------------------------------------------

/**
 * Default specific fuel consumption of a diesel set, L/kWh. It is a full-load figure
 * (widely reproduced vendor charts give 269.1 L/h for a 1,000 kW set at full load);
 * at part load a set burns more per kWh (about 0.33 L/kWh at quarter load on the same
 * charts), so autonomy at light load worked from this default is optimistic. It is
 * editable per generator for that reason.
 */
export const DEFAULT_SPECIFIC_FUEL_CONSUMPTION_L_PER_KWH = 0.27;

/** Inputs for the diesel burn rate. */
export interface FuelBurnInput {
  /** Electrical load on the set(s) drawing from the fuel, kW. */
  loadKW: number;
  /** Specific fuel consumption, L/kWh (default 0.27). */
  specificConsumptionLitresPerKWh?: number;
}

/**
 * Diesel burn rate = specific consumption × load.
 * @param input load in kW, specific consumption in L/kWh
 * @returns burn rate in L/h (0 at no load)
 * @throws RangeError when the load is negative or the consumption is not positive
 */
export function fuelBurnLitresPerHour(input: FuelBurnInput): number {
  const load = requireNonNegative("loadKW", input.loadKW);
  const sfc = requirePositive(
    "specificConsumptionLitresPerKWh",
    input.specificConsumptionLitresPerKWh ?? DEFAULT_SPECIFIC_FUEL_CONSUMPTION_L_PER_KWH,
  );
  return sfc * load;
}

/** Inputs for fuel autonomy. */
export interface FuelAutonomyInput extends FuelBurnInput {
  /**
   * Fuel that can actually be drawn, L: the tank's contents above the suction point, not
   * its nominal capacity.
   */
  usableFuelLitres: number;
}

/**
 * Fuel autonomy = usable fuel / (specific consumption × load). Where several sets share
 * one tank, pass their total load.
 * @param input usable fuel in L, load in kW, specific consumption in L/kWh
 * @returns hours of running, or null when the load is 0 (unbounded; never Infinity)
 * @throws RangeError when fuel or load is negative or the consumption is not positive
 */
export function fuelAutonomyHours(input: FuelAutonomyInput): number | null {
  const fuel = requireNonNegative("usableFuelLitres", input.usableFuelLitres);
  const burn = fuelBurnLitresPerHour(input);
  if (burn === 0) return null;
  return fuel / burn;
}

/**
 * Specific fuel consumption from one row of a maker's chart, to set a generator's own
 * figure instead of the default.
 * @param input burn rate in L/h at a given load in kW
 * @returns specific consumption in L/kWh, or null when the load is 0
 * @throws RangeError when either value is negative or not finite
 */
export function specificFuelConsumption(input: {
  litresPerHour: number;
  loadKW: number;
}): number | null {
  const burn = requireNonNegative("litresPerHour", input.litresPerHour);
  const load = requireNonNegative("loadKW", input.loadKW);
  if (load === 0) return null;
  return burn / load;
}

// ---------------------------------------------------------------------------------
// Heat carried by air and water
// ---------------------------------------------------------------------------------

/** Density of standard air, kg/m³ (ASHRAE standard air, about 1.2). */
export const STANDARD_AIR_DENSITY_KG_PER_M3 = 1.2;
/** Specific heat of dry air at constant pressure, kJ/(kg·K) (about 1.006). */
export const AIR_SPECIFIC_HEAT_KJ_PER_KG_K = 1.006;
/** Specific heat of water, kJ/(kg·K) (about 4.186). */
export const WATER_SPECIFIC_HEAT_KJ_PER_KG_K = 4.186;
/** 1.08 = 0.075 lb/ft³ × 0.24 Btu/(lb·°F) × 60 min/h: the IP air-side factor. */
export const AIR_HEAT_FACTOR_IP = 1.08;
/** 500 ≈ 8.33 lb/gal × 1 Btu/(lb·°F) × 60 min/h: the IP water-side factor. */
export const WATER_HEAT_FACTOR_IP = 500;

/** Inputs for the air-side (sensible) heat removal. */
export interface AirHeatInput {
  /** Volume flow of air, m³/s. */
  airflowM3PerS: number;
  /** Return minus supply temperature, K. */
  deltaTK: number;
  /** Air density, kg/m³ (default 1.2, standard air). */
  density?: number;
  /** Specific heat of air, kJ/(kg·K) (default 1.006). */
  cp?: number;
}

/**
 * Sensible heat carried away by air: Q = ρ · cp · V̇ · ΔT.
 * A negative ΔT gives a negative result (the air adds heat).
 * @param input airflow in m³/s, ΔT in K, density in kg/m³, cp in kJ/(kg·K)
 * @returns heat removal in kW
 * @throws RangeError on a negative airflow, a non-positive density or cp, or a non-finite value
 */
export function airHeatRemovalKW(input: AirHeatInput): number {
  const flow = requireNonNegative("airflowM3PerS", input.airflowM3PerS);
  const deltaT = requireFinite("deltaTK", input.deltaTK);
  const density = requirePositive("density", input.density ?? STANDARD_AIR_DENSITY_KG_PER_M3);
  const cp = requirePositive("cp", input.cp ?? AIR_SPECIFIC_HEAT_KJ_PER_KG_K);
  return density * cp * flow * deltaT;
}

/** Inputs for the water-side heat removal. */
export interface WaterHeatInput {
  /** Mass flow of water, kg/s. */
  massFlowKgPerS: number;
  /** Return minus supply temperature, K. */
  deltaTK: number;
  /** Specific heat of water, kJ/(kg·K) (default 4.186; lower for glycol mixtures). */
  cp?: number;
}

/**
 * Heat carried away by chilled water: Q = ṁ · cp · ΔT.
 * @param input mass flow in kg/s, ΔT in K, cp in kJ/(kg·K)
 * @returns heat removal in kW
 * @throws RangeError on a negative flow, a non-positive cp, or a non-finite value
 */
export function waterHeatRemovalKW(input: WaterHeatInput): number {
  const flow = requireNonNegative("massFlowKgPerS", input.massFlowKgPerS);
  const deltaT = requireFinite("deltaTK", input.deltaTK);
  const cp = requirePositive("cp", input.cp ?? WATER_SPECIFIC_HEAT_KJ_PER_KG_K);
  return flow * cp * deltaT;
}

/**
 * Volume flow of water to mass flow. The default density of 1.0 kg/L is common
 * practice for chilled water (about 0.9997 kg/L at 10 °C; the difference is well under
 * the precision of these figures).
 * @param litresPerSecond flow in L/s
 * @param densityKgPerLitre density in kg/L (default 1.0)
 * @returns mass flow in kg/s
 */
export function litresPerSecondToKgPerS(litresPerSecond: number, densityKgPerLitre = 1.0): number {
  requireNonNegative("litresPerSecond", litresPerSecond);
  requirePositive("densityKgPerLitre", densityKgPerLitre);
  return litresPerSecond * densityKgPerLitre;
}

/**
 * Air-side sensible heat in IP units, the rule of thumb Q = 1.08 × CFM × ΔT.
 * @param cfm airflow in ft³/min
 * @param deltaTF temperature difference in °F
 * @returns heat in Btu/h
 */
export function airHeatBtuPerHour(cfm: number, deltaTF: number): number {
  requireNonNegative("cfm", cfm);
  requireFinite("deltaTF", deltaTF);
  return AIR_HEAT_FACTOR_IP * cfm * deltaTF;
}

/**
 * Water-side heat in IP units, the rule of thumb Q = 500 × GPM × ΔT.
 * @param gpm flow in US gal/min
 * @param deltaTF temperature difference in °F
 * @returns heat in Btu/h
 */
export function waterHeatBtuPerHour(gpm: number, deltaTF: number): number {
  requireNonNegative("gpm", gpm);
  requireFinite("deltaTF", deltaTF);
  return WATER_HEAT_FACTOR_IP * gpm * deltaTF;
}

/**
 * An IP heat figure in kW, for showing beside the SI ones.
 * @param btuPerHour heat in Btu/h
 * @returns heat in kW
 */
export function heatBtuPerHourToKW(btuPerHour: number): number {
  return btuPerHourToKW(requireFinite("btuPerHour", btuPerHour));
}

/** A heat-removal figure set against the IT load it serves. */
export interface HeatAgainstLoad {
  /** Heat removal ÷ IT load (1 = exactly matched), or null when the IT load is 0. */
  ratio: number | null;
  /** Heat removal − IT load, kW (negative when the load exceeds the removal). */
  marginKW: number;
}

/**
 * Compares a heat-removal figure with a block's IT load (all IT power ends up as heat).
 * @param removalKW heat removal in kW
 * @param itLoadKW IT load in kW
 * @returns ratio (dimensionless) and margin in kW
 */
export function compareHeatRemovalWithItLoad(removalKW: number, itLoadKW: number): HeatAgainstLoad {
  const removal = requireFinite("removalKW", removalKW);
  const load = requireNonNegative("itLoadKW", itLoadKW);
  return { ratio: load === 0 ? null : removal / load, marginKW: removal - load };
}

// ---------------------------------------------------------------------------------
// Power usage effectiveness
// ---------------------------------------------------------------------------------

/** Energy metered over one period. */
export interface EnergyPeriod {
  /** Total facility energy over the period, kWh (includes the IT energy). */
  totalFacilityKWh: number;
  /** IT equipment energy over the same period, kWh. */
  itKWh: number;
}

/**
 * Power usage effectiveness (ISO/IEC 30134-2; The Green Grid): total facility energy ÷
 * IT equipment energy over the same period.
 * @param input energies in kWh
 * @returns PUE (dimensionless, ≥ 1), or null when the IT energy is 0 or less, or when
 *   the total is below the IT energy (the total includes IT, so that is a metering
 *   fault and any figure would mislead)
 * @throws RangeError on a non-finite value
 */
export function pue(input: EnergyPeriod): number | null {
  const total = requireFinite("totalFacilityKWh", input.totalFacilityKWh);
  const it = requireFinite("itKWh", input.itKWh);
  if (it <= 0 || total < it) return null;
  return total / it;
}

/**
 * Data-centre infrastructure efficiency: IT energy ÷ total facility energy, as a
 * percentage (DCiE = 100 / PUE).
 * @param input energies in kWh
 * @returns DCiE in percent (0–100), or null where {@link pue} is null
 */
export function dcie(input: EnergyPeriod): number | null {
  const value = pue(input);
  return value === null ? null : 100 / value;
}

/**
 * DCiE from a PUE.
 * @param pueValue PUE (dimensionless)
 * @returns DCiE in percent, or null when the PUE is below 1 (impossible by definition)
 */
export function dcieFromPue(pueValue: number): number | null {
  requireFinite("pue", pueValue);
  return pueValue < 1 ? null : 100 / pueValue;
}

/**
 * PUE from a DCiE.
 * @param dciePercent DCiE in percent
 * @returns PUE, or null when the percentage is not in (0, 100]
 */
export function pueFromDcie(dciePercent: number): number | null {
  requireFinite("dciePercent", dciePercent);
  return dciePercent <= 0 || dciePercent > 100 ? null : 100 / dciePercent;
}

// ---------------------------------------------------------------------------------
// Data-hall environment
// ---------------------------------------------------------------------------------

/** Where an IT inlet air temperature falls against the ASHRAE envelopes. */
export type InletTemperatureBand =
  | "below_allowable"
  | "allowable_low"
  | "recommended"
  | "allowable_high"
  | "above_allowable";

/** ASHRAE TC 9.9 recommended inlet air range, °C (5th ed., 2021, Table 2.1). */
export const ASHRAE_RECOMMENDED_INLET_C = { min: 18, max: 27 } as const;
/** ASHRAE TC 9.9 class A1 allowable inlet air range, °C (5th ed., 2021, Table 2.1). */
export const ASHRAE_A1_ALLOWABLE_INLET_C = { min: 15, max: 32 } as const;

/**
 * Band of an IT equipment inlet air temperature, using ASHRAE TC 9.9, *Thermal
 * Guidelines for Data Processing Environments*, 5th ed. (2021), Table 2.1:
 * recommended 18–27 °C, class A1 allowable 15–32 °C. Both ends of each range are inside
 * it (18 and 27 are recommended; 15 and 32 are allowable). Humidity and dew point, which
 * the guideline also bounds, are not considered here.
 * @param celsius inlet air temperature in °C
 * @returns the band
 * @throws RangeError on a non-finite temperature
 */
export function inletTemperatureBand(celsius: number): InletTemperatureBand {
  const t = requireFinite("celsius", celsius);
  if (t < ASHRAE_A1_ALLOWABLE_INLET_C.min) return "below_allowable";
  if (t < ASHRAE_RECOMMENDED_INLET_C.min) return "allowable_low";
  if (t <= ASHRAE_RECOMMENDED_INLET_C.max) return "recommended";
  if (t <= ASHRAE_A1_ALLOWABLE_INLET_C.max) return "allowable_high";
  return "above_allowable";
}

// ---------------------------------------------------------------------------------
// Capacity readiness
// ---------------------------------------------------------------------------------

/** A capacity block (hall, suite) and the milestones that make it ready for service. */
export interface CapacityBlockInput {
  id: number;
  name: string;
  /** Racks the block adds when ready. */
  racks: number;
  /** IT load the block adds when ready, kW. */
  itKW: number;
  /** Ids of the milestones that must be complete for the block to be ready for service. */
  dependsOn: number[];
}

/** The dates of one milestone that readiness needs (calendar dates, YYYY-MM-DD). */
export interface MilestoneDates {
  id: number;
  baselineFinish: string;
  forecastFinish: string | null;
  actualFinish: string | null;
}

/** Readiness of one capacity block. Dates are calendar dates, YYYY-MM-DD. */
export interface BlockReadiness {
  blockId: number;
  /** Every milestone it depends on is known and has an actual finish. */
  ready: boolean;
  /** The latest actual finish among its milestones when ready, else null. */
  readyDate: string | null;
  /**
   * The latest of each known milestone's actual finish, else forecast, else baseline;
   * null when no milestone is known.
   */
  forecastReadyDate: string | null;
  /** The latest baseline finish among its known milestones; null when none is known. */
  baselineReadyDate: string | null;
  /** forecastReadyDate − baselineReadyDate in calendar days (positive = late), or null. */
  slipDays: number | null;
  /** Ids in `dependsOn` with no matching milestone, in the order given, once each. */
  unknownMilestoneIds: number[];
}

const MS_PER_DAY = 86_400_000;

function calendarDayNumber(field: string, date: string): number {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  if (!match) throw new RangeError(`${field} must be a calendar date YYYY-MM-DD, got "${date}"`);
  const year = Number(match[1]);
  const month = Number(match[2]);
  const day = Number(match[3]);
  const ms = Date.UTC(year, month - 1, day);
  const check = new Date(ms);
  // Date.UTC rolls 2025-02-30 over to March; a round trip catches dates that do not exist.
  if (
    check.getUTCFullYear() !== year ||
    check.getUTCMonth() !== month - 1 ||
    check.getUTCDate() !== day
  ) {
    throw new RangeError(`${field} is not a real calendar date: "${date}"`);
  }
  return ms / MS_PER_DAY;
}

function latestDate(dates: readonly string[]): string | null {
  // Valid YYYY-MM-DD strings sort as text in calendar order.
  let latest: string | null = null;
  for (const date of dates) if (latest === null || date > latest) latest = date;
  return latest;
}

/**
 * Readiness for service of a capacity block, from the milestones it depends on.
 *
 * A block that depends on no milestone is NOT ready: readiness is proven by completed
 * milestones, and a block linked to none has no such proof, so calling it ready would
 * publish capacity that nobody has commissioned. A milestone id with no matching
 * milestone (deleted, or not passed in) likewise keeps the block from being ready; it
 * is listed in `unknownMilestoneIds`, and the dates are worked over the known ones.
 *
 * @param block the capacity block
 * @param milestones milestone dates (may include milestones of other blocks)
 * @returns readiness, dates as YYYY-MM-DD, slip in calendar days
 * @throws RangeError when a date used is not a real YYYY-MM-DD calendar date
 */
export function blockReadiness(
  block: CapacityBlockInput,
  milestones: readonly MilestoneDates[],
): BlockReadiness {
  const byId = new Map<number, MilestoneDates>();
  for (const milestone of milestones) if (!byId.has(milestone.id)) byId.set(milestone.id, milestone);

  const known: MilestoneDates[] = [];
  const unknownMilestoneIds: number[] = [];
  const seen = new Set<number>();
  for (const id of block.dependsOn) {
    if (seen.has(id)) continue;
    seen.add(id);
    const milestone = byId.get(id);
    if (milestone) known.push(milestone);
    else unknownMilestoneIds.push(id);
  }

  for (const m of known) {
    calendarDayNumber(`milestone ${m.id} baselineFinish`, m.baselineFinish);
    if (m.forecastFinish !== null) calendarDayNumber(`milestone ${m.id} forecastFinish`, m.forecastFinish);
    if (m.actualFinish !== null) calendarDayNumber(`milestone ${m.id} actualFinish`, m.actualFinish);
  }

  const ready =
    known.length > 0 && unknownMilestoneIds.length === 0 && known.every((m) => m.actualFinish !== null);
  const forecastReadyDate = latestDate(known.map((m) => m.actualFinish ?? m.forecastFinish ?? m.baselineFinish));
  const baselineReadyDate = latestDate(known.map((m) => m.baselineFinish));
  const slipDays =
    forecastReadyDate !== null && baselineReadyDate !== null
      ? calendarDayNumber("forecastReadyDate", forecastReadyDate) -
        calendarDayNumber("baselineReadyDate", baselineReadyDate)
      : null;

  return {
    blockId: block.id,
    ready,
    readyDate: ready ? forecastReadyDate : null,
    forecastReadyDate,
    baselineReadyDate,
    slipDays,
    unknownMilestoneIds,
  };
}

/** One step of the capacity ramp: totals ready from `date` on. */
export interface CapacityRampPoint {
  /** Calendar date, YYYY-MM-DD. */
  date: string;
  /** Racks ready by this date on the baseline (cumulative). */
  baselineRacks: number;
  /** IT kW ready by this date on the baseline (cumulative). */
  baselineKW: number;
  /** Racks ready by this date on the forecast, actuals included (cumulative). */
  forecastRacks: number;
  /** IT kW ready by this date on the forecast, actuals included (cumulative). */
  forecastKW: number;
}

/**
 * Capacity ramp: cumulative racks and kW of IT load ready for service over time, on the
 * baseline and on the forecast (a ready block's forecast date is its actual date). One
 * point per distinct date on which either line steps, sorted by date; each point holds
 * the totals from that date onwards, which a step chart draws directly.
 *
 * Blocks that depend on no milestone, or on a milestone that is not passed in, are left
 * out of both lines: their dates cannot be known, and drawing them would show capacity
 * earlier than anyone can support. {@link blockReadiness} says which they are.
 *
 * @param blocks capacity blocks (racks, kW)
 * @param milestones milestone dates
 * @returns step points sorted by date; racks and kW cumulative
 * @throws RangeError on negative or non-finite racks or kW, or a date that is not real
 */
export function capacityRamp(
  blocks: readonly CapacityBlockInput[],
  milestones: readonly MilestoneDates[],
): CapacityRampPoint[] {
  interface Step {
    baselineRacks: number;
    baselineKW: number;
    forecastRacks: number;
    forecastKW: number;
  }
  const steps = new Map<string, Step>();
  const stepAt = (date: string): Step => {
    let step = steps.get(date);
    if (!step) {
      step = { baselineRacks: 0, baselineKW: 0, forecastRacks: 0, forecastKW: 0 };
      steps.set(date, step);
    }
    return step;
  };

  for (const block of blocks) {
    const racks = requireNonNegative(`block ${block.id} racks`, block.racks);
    const kW = requireNonNegative(`block ${block.id} itKW`, block.itKW);
    const readiness = blockReadiness(block, milestones);
    if (readiness.unknownMilestoneIds.length > 0) continue;
    if (readiness.baselineReadyDate === null || readiness.forecastReadyDate === null) continue;
    const baseline = stepAt(readiness.baselineReadyDate);
    baseline.baselineRacks += racks;
    baseline.baselineKW += kW;
    const forecast = stepAt(readiness.forecastReadyDate);
    forecast.forecastRacks += racks;
    forecast.forecastKW += kW;
  }

  const points: CapacityRampPoint[] = [];
  const running: Step = { baselineRacks: 0, baselineKW: 0, forecastRacks: 0, forecastKW: 0 };
  for (const date of [...steps.keys()].sort()) {
    const step = steps.get(date)!;
    running.baselineRacks += step.baselineRacks;
    running.baselineKW += step.baselineKW;
    running.forecastRacks += step.forecastRacks;
    running.forecastKW += step.forecastKW;
    points.push({ date, ...running });
  }
  return points;
}

// ---------------------------------------------------------------------------------
// Site facts for prospects
// ---------------------------------------------------------------------------------

/**
 * Mean air velocity in a rectangular duct or opening: V̇ / (width × height).
 * @param flowM3s airflow in m³/s
 * @param widthM inside width in m
 * @param heightM inside height in m
 * @returns velocity in m/s
 * @throws RangeError on a negative flow or a side that is not greater than zero
 */
export function ductVelocityMs(flowM3s: number, widthM: number, heightM: number): number {
  const flow = requireNonNegative("flowM3s", flowM3s);
  return flow / (requirePositive("widthM", widthM) * requirePositive("heightM", heightM));
}

/**
 * Whether a rack passes through a door standing upright: its height under the door's
 * clear height, and its narrower plan side (width or depth, whichever way it is turned)
 * within the clear width. Pass the rack as delivered (on its casters or skates, loaded);
 * the door as its clear opening, frame and closers taken off.
 * @throws RangeError on a dimension that is not greater than zero
 */
export function rackFitsThroughDoor(
  door: { doorHeightM: number; doorWidthM: number },
  rack: { rackHeightM: number; rackWidthM: number; rackDepthM: number },
): boolean {
  const doorHeight = requirePositive("doorHeightM", door.doorHeightM);
  const doorWidth = requirePositive("doorWidthM", door.doorWidthM);
  const height = requirePositive("rackHeightM", rack.rackHeightM);
  const narrower = Math.min(requirePositive("rackWidthM", rack.rackWidthM), requirePositive("rackDepthM", rack.rackDepthM));
  return height <= doorHeight && narrower <= doorWidth;
}
