// The facility as a record: capacity blocks, the plant systems that serve them and their
// units, turned into the figures the pages and digests show (readiness for service, the
// redundancy at design and now, heat and fuel against the load served, the capacity ramp)
// and into the moves between two such computations. Pure: data in, data out. The formulas
// themselves live in facility.ts; this file decides what they are applied to.

import type { PlantKind, RatingUnit, UnitStage } from "../schemas/facility.ts";
import { daysBetween, workingDaysBetween, type WorkingCalendar } from "./calendar.ts";
import { formatShortDate } from "./locale-dates.ts";
import {
  ASHRAE_A1_ALLOWABLE_INLET_C,
  ASHRAE_RECOMMENDED_INLET_C,
  airHeatRemovalKW,
  blockReadiness,
  capacityRamp,
  compareHeatRemovalWithItLoad,
  fuelAutonomyHours,
  inletTemperatureBand,
  redundancyLabel,
  waterHeatRemovalKW,
  type InletTemperatureBand,
  type MilestoneDates,
} from "./facility.ts";

// ---------------------------------------------------------------------------------
// Units of plant: stages and availability
// ---------------------------------------------------------------------------------

/**
 * A unit's progress, in order (the same list as UNIT_STAGES in schemas/facility.ts; the
 * domain keeps its own copy so it needs no runtime schema, and a type check below keeps
 * the two equal). L1…L5 are commissioning levels.
 */
export const UNIT_STAGE_ORDER = ["ordered", "delivered", "installed", "L1", "L2", "L3", "L4", "L5"] as const;
export type UnitStageName = (typeof UNIT_STAGE_ORDER)[number];

// Compile-time guard: fails to type-check if the schema's stage list and this one part ways.
type SameStages = [UnitStageName] extends [UnitStage] ? ([UnitStage] extends [UnitStageName] ? true : never) : never;
const STAGES_MATCH: SameStages = true;
void STAGES_MATCH;

/** Position of a stage in {@link UNIT_STAGE_ORDER}: 0 (ordered) … 7 (L5). */
export function stageRank(stage: UnitStageName): number {
  const rank = UNIT_STAGE_ORDER.indexOf(stage);
  if (rank < 0) throw new RangeError(`stage must be one of ${UNIT_STAGE_ORDER.join(", ")}, got ${String(stage)}`);
  return rank;
}

/** What a page shows of a unit's stage. */
export interface UnitStatus {
  status: "ordered" | "delivered" | "installed" | "commissioned";
  /** 1 … 5 when commissioned, else null. */
  commissioningLevel: number | null;
}

/** "L3" → commissioned at level 3; "delivered" → delivered, no level. */
export function unitStatusOf(stage: UnitStageName): UnitStatus {
  const rank = stageRank(stage);
  if (rank < 3) return { status: stage as "ordered" | "delivered" | "installed", commissioningLevel: null };
  return { status: "commissioned", commissioningLevel: rank - 2 };
}

function requireLevel(availableFromLevel: number): number {
  if (!Number.isInteger(availableFromLevel) || availableFromLevel < 1 || availableFromLevel > 5) {
    throw new RangeError(`availableFromLevel must be a whole number from 1 to 5, got ${String(availableFromLevel)}`);
  }
  return availableFromLevel;
}

/**
 * Whether a unit counts as able to carry load: commissioned to at least the project's
 * level (default L4, functional test passed). Delivered or installed plant carries nothing.
 * @throws RangeError when the level is not a whole number 1…5 (a settings fault)
 */
export function isUnitAvailable(stage: UnitStageName, availableFromLevel: number): boolean {
  const level = requireLevel(availableFromLevel);
  const { commissioningLevel } = unitStatusOf(stage);
  return commissioningLevel !== null && commissioningLevel >= level;
}

// ---------------------------------------------------------------------------------
// The facility record: blocks, plant systems, units → figures for the pages
// ---------------------------------------------------------------------------------

export interface FacilityUnitInput {
  id: number;
  label: string;
  /** Which independent system (1 … independentSystems) the unit belongs to. */
  train: number;
  stage: UnitStageName;
}

export interface FacilitySystemInput {
  id: number;
  name: string;
  kind: PlantKind;
  /** Ids of the blocks whose load the system serves. */
  serves: number[];
  /** N: units one system needs to carry the design load. */
  neededPerSystem: number;
  /** 1 for N+k designs, 2 for 2N and 2(N+1). */
  independentSystems: number;
  ratingPerUnit: number | null;
  ratingUnit: RatingUnit | null;
  design: {
    /** Air moved by one unit, m³/s. */
    airflowM3s: number | null;
    deltaTK: number | null;
    /** Design chilled-water mass flow of the system, kg/s. */
    chilledWaterFlowKgS: number | null;
    chilledWaterSupplyC: number | null;
    chilledWaterReturnC: number | null;
    supplyAirC: number | null;
    usableFuelLitres: number | null;
    /** L/kWh (0.27 by default). */
    specificFuelConsumption: number;
  };
  units: FacilityUnitInput[];
}

export interface FacilityBlockInput {
  id: number;
  name: string;
  racks: number;
  itKw: number;
  /** Ids of the milestones that must be complete for the block to be ready. */
  dependsOn: number[];
}

/** A milestone's dates, with its name when the caller has it (for the words of `missing`). */
export interface FacilityMilestoneInput extends MilestoneDates {
  name?: string;
}

export interface FacilityRecordInput {
  blocks: FacilityBlockInput[];
  systems: FacilitySystemInput[];
  milestones: FacilityMilestoneInput[];
}

export interface FacilityOptions {
  /** Commissioning level (1…5) from which a unit counts as available to carry load. */
  availableFromLevel: number;
  /** The project's working calendar, for slips in working days. */
  calendar: WorkingCalendar;
}

/** A system's redundancy at design and now, with the counts behind them. */
export interface SystemRedundancy {
  /** Label from the units planned, e.g. "N+1". */
  design: string;
  /** Label from the units available, e.g. "N" or "short by 1". */
  now: string;
  /** Units still to make available before the design label is reached (0 when reached). */
  shortfall: number;
  /** Units available to carry load (all trains). */
  available: number;
  /** Units planned (all trains, any stage). */
  planned: number;
  /** "design N+1 · now N (4 of 5 commissioned to L4)". */
  summary: string;
  /** At least one train has N units available: the design load is carried now. */
  carriesLoad: boolean;
}

function trainIndex(train: number, trains: number): number | null {
  // A unit placed in a train the design does not have is left out of the labels, as
  // redundancyLabel leaves out counts beyond `systems`: a miscount never adds a system.
  if (!Number.isInteger(train) || train < 1 || train > trains) return null;
  return train - 1;
}

function designedTrains(independentSystems: number): number {
  return Number.isFinite(independentSystems) && independentSystems >= 1 ? Math.floor(independentSystems) : 1;
}

/** Units planned and available in each designed train, and available in all. */
function unitsPerTrain(
  system: Pick<FacilitySystemInput, "independentSystems" | "units">,
  availableFromLevel: number,
): { trains: number; plannedPerTrain: number[]; availablePerTrain: number[]; available: number } {
  requireLevel(availableFromLevel);
  const trains = designedTrains(system.independentSystems);
  const plannedPerTrain = new Array<number>(trains).fill(0);
  const availablePerTrain = new Array<number>(trains).fill(0);
  let available = 0;
  for (const unit of system.units) {
    const isAvailable = isUnitAvailable(unit.stage, availableFromLevel);
    if (isAvailable) available += 1;
    const index = trainIndex(unit.train, trains);
    if (index === null) continue;
    plannedPerTrain[index]! += 1;
    if (isAvailable) availablePerTrain[index]! += 1;
  }
  return { trains, plannedPerTrain, availablePerTrain, available };
}

/**
 * Redundancy of one plant system at design (every unit planned, whatever its stage) and
 * now (only units commissioned to `availableFromLevel` or beyond), labelled as
 * {@link redundancyLabel} labels them.
 *
 * "Carries load" means one train has at least N available units: that train alone can
 * carry the design load, which is what a block needs to go into service. A 2N design
 * with one complete train carries the load (without its redundancy); the labels say how
 * much redundancy is missing.
 *
 * The shortfall is the fewest further units to make available, train by train, for the
 * now-label to equal the design label. It is not "planned − available": in a 2N design
 * of 5 + 4 units the design label is 2N, reached at 4 + 4.
 */
export function systemRedundancy(
  system: Pick<FacilitySystemInput, "neededPerSystem" | "independentSystems" | "units">,
  availableFromLevel: number,
): SystemRedundancy {
  const { trains, plannedPerTrain, availablePerTrain, available } = unitsPerTrain(system, availableFromLevel);
  const label = (counts: readonly number[]) =>
    redundancyLabel({ neededPerSystem: system.neededPerSystem, systems: trains, commissionedPerSystem: counts });

  const design = label(plannedPerTrain);
  const now = label(availablePerTrain);

  // Fewest units per train that still give the design label. Lowering one train's count
  // never raises the label, so lowering each train in turn while the label holds finds it.
  const target = [...plannedPerTrain];
  for (let t = 0; t < trains; t += 1) {
    while (target[t]! > 0) {
      target[t]! -= 1;
      if (label(target).label !== design.label) {
        target[t]! += 1;
        break;
      }
    }
  }
  let shortfall = 0;
  for (let t = 0; t < trains; t += 1) shortfall += Math.max(0, target[t]! - availablePerTrain[t]!);

  const planned = system.units.length;
  return {
    design: design.label,
    now: now.label,
    shortfall,
    available,
    planned,
    summary: `design ${design.label} · now ${now.label} (${available} of ${planned} commissioned to L${availableFromLevel})`,
    carriesLoad: now.kind !== "short",
  };
}

/** Something that stands between a block and service. */
export type MissingItem =
  /** A milestone it depends on is not complete, or is not known. */
  | { kind: "milestone"; milestoneId: number; name?: string; forecast?: string | null }
  /** A system serving it has fewer than N units available in every train. */
  | { kind: "system"; systemId: number; name: string; now: string; needed: number; available: number }
  /** It depends on no milestone, so readiness cannot be proven. */
  | { kind: "no_milestones" };

export interface BlockFigures {
  blockId: number;
  baselineReadyDate: string | null;
  forecastReadyDate: string | null;
  /** Every milestone complete and every system serving it carrying the load. */
  readyForService: boolean;
  milestonesComplete: boolean;
  /** Working days from baseline to forecast ready date (negative when early), or null. */
  slipWorkingDays: number | null;
  missing: MissingItem[];
}

export interface HeatFigures {
  removalKw: number;
  loadKw: number;
  marginKw: number;
  method: "air" | "water" | "rating";
  /** The supply air figure's inlet band in words, when a figure is given. */
  inletBand: string | null;
}

export interface FuelFigures {
  usableLitres: number;
  specificFuelConsumption: number;
  /** IT load of the blocks the tank serves, kW. */
  designLoadKw: number;
  /** N × rating of the generator systems serving the same blocks, kW; null when none. */
  fullLoadKw: number | null;
  autonomyHoursAtDesignLoad: number | null;
  autonomyHoursAtFullLoad: number | null;
}

export interface SystemFigures {
  systemId: number;
  redundancy: SystemRedundancy;
  heat?: HeatFigures;
  fuel?: FuelFigures;
  units: { id: number; status: UnitStatus["status"]; commissioningLevel: number | null; available: boolean }[];
}

export interface RampPoint {
  date: string;
  racksBaseline: number;
  racksForecast: number;
  kwBaseline: number;
  kwForecast: number;
}

export interface FacilityFigures {
  blocks: BlockFigures[];
  systems: SystemFigures[];
  ramp: RampPoint[];
}

/**
 * Power factor at which a standby diesel set's kVA rating is taken as kW. Common practice
 * (no published source here): standby sets are rated at 0.8 lagging.
 */
export const GENERATOR_POWER_FACTOR = 0.8;

const INLET_BAND_WORDS: Record<InletTemperatureBand, string> = {
  below_allowable: `below the allowable range (under ${ASHRAE_A1_ALLOWABLE_INLET_C.min} °C)`,
  allowable_low: `allowable, cooler than recommended (${ASHRAE_A1_ALLOWABLE_INLET_C.min}–${ASHRAE_RECOMMENDED_INLET_C.min} °C)`,
  recommended: `in the recommended range (${ASHRAE_RECOMMENDED_INLET_C.min}–${ASHRAE_RECOMMENDED_INLET_C.max} °C)`,
  allowable_high: `allowable, warmer than recommended (${ASHRAE_RECOMMENDED_INLET_C.max}–${ASHRAE_A1_ALLOWABLE_INLET_C.max} °C)`,
  above_allowable: `above the allowable range (over ${ASHRAE_A1_ALLOWABLE_INLET_C.max} °C)`,
};

/** An inlet band in plain words, e.g. "in the recommended range (18–27 °C)". */
export function inletBandWords(band: InletTemperatureBand): string {
  return INLET_BAND_WORDS[band];
}

function servedLoadKw(system: FacilitySystemInput, blocksById: ReadonlyMap<number, FacilityBlockInput>): number {
  let load = 0;
  for (const id of new Set(system.serves)) load += blocksById.get(id)?.itKw ?? 0;
  return load;
}

function neededUnits(system: FacilitySystemInput): number {
  return Number.isFinite(system.neededPerSystem) && system.neededPerSystem > 0 ? Math.ceil(system.neededPerSystem) : 0;
}

/**
 * Heat one system removes at design, against the IT load it serves:
 * - air movement: ρ·cp·V̇·ΔT over the air N units move (the design airflow is what N
 *   units move; spare units add redundancy, not capacity). The per-unit airflow is the
 *   design figure, else a rating given in m³/s;
 * - cooling with a chilled-water flow and both temperatures: ṁ·cp·(return − supply); a
 *   return no warmer than the supply is not a cooling figure and falls to the rating;
 * - cooling with a rating in kW: N × rating.
 * Other kinds, or no figure to work from: undefined.
 */
function heatFigures(system: FacilitySystemInput, loadKw: number): HeatFigures | undefined {
  const d = system.design;
  const n = neededUnits(system);
  let removal: { kw: number; method: HeatFigures["method"] } | null = null;
  if (system.kind === "air_movement") {
    const perUnit = d.airflowM3s ?? (system.ratingUnit === "m3/s" ? system.ratingPerUnit : null);
    if (perUnit !== null && d.deltaTK !== null) {
      removal = { kw: airHeatRemovalKW({ airflowM3PerS: n * perUnit, deltaTK: d.deltaTK }), method: "air" };
    }
  } else if (system.kind === "cooling") {
    const { chilledWaterFlowKgS: flow, chilledWaterSupplyC: supply, chilledWaterReturnC: back } = d;
    if (flow !== null && supply !== null && back !== null && back > supply) {
      removal = { kw: waterHeatRemovalKW({ massFlowKgPerS: flow, deltaTK: back - supply }), method: "water" };
    } else if (system.ratingUnit === "kW" && system.ratingPerUnit !== null) {
      removal = { kw: n * system.ratingPerUnit, method: "rating" };
    }
  }
  if (removal === null) return undefined;
  const { marginKW } = compareHeatRemovalWithItLoad(removal.kw, loadKw);
  return {
    removalKw: removal.kw,
    loadKw,
    marginKw: marginKW,
    method: removal.method,
    inletBand: d.supplyAirC === null ? null : inletBandWords(inletTemperatureBand(d.supplyAirC)),
  };
}

/** Full load of one generator system in kW: N × rating, kVA at {@link GENERATOR_POWER_FACTOR}. */
function generatorFullLoadKw(system: FacilitySystemInput): number | null {
  if (system.ratingPerUnit === null) return null;
  const n = neededUnits(system);
  if (system.ratingUnit === "kW") return n * system.ratingPerUnit;
  if (system.ratingUnit === "kVA") return n * system.ratingPerUnit * GENERATOR_POWER_FACTOR;
  return null;
}

/**
 * Fuel autonomy of a tank. The design load is the IT load of the blocks it serves, so the
 * hours are optimistic: the sets also carry cooling and losses. Full load is the N sets
 * of each generator system serving any of the same blocks, at their rating.
 */
function fuelFigures(
  tank: FacilitySystemInput,
  systems: readonly FacilitySystemInput[],
  designLoadKw: number,
): FuelFigures | undefined {
  const usable = tank.design.usableFuelLitres;
  if (usable === null) return undefined;
  const sfc = tank.design.specificFuelConsumption;
  const served = new Set(tank.serves);
  let fullLoadKw: number | null = null;
  for (const system of systems) {
    if (system.kind !== "power_generation" || !system.serves.some((id) => served.has(id))) continue;
    const kw = generatorFullLoadKw(system);
    if (kw !== null) fullLoadKw = (fullLoadKw ?? 0) + kw;
  }
  const autonomy = (loadKW: number) =>
    fuelAutonomyHours({ usableFuelLitres: usable, loadKW, specificConsumptionLitresPerKWh: sfc });
  return {
    usableLitres: usable,
    specificFuelConsumption: sfc,
    designLoadKw,
    fullLoadKw,
    autonomyHoursAtDesignLoad: autonomy(designLoadKw),
    autonomyHoursAtFullLoad: fullLoadKw === null ? null : autonomy(fullLoadKw),
  };
}


/**
 * Every figure the facility pages show, from the record as it stands.
 *
 * A block is ready for service only when every milestone it depends on is complete and
 * every system serving it carries the load now (one train with N units available); its
 * `missing` lists each condition not met: the milestones not complete (or not known), the
 * systems short of N, or that it depends on no milestone. Dates come from
 * {@link blockReadiness}; the slip is in working days on the project's calendar. The ramp
 * is {@link capacityRamp}'s, from milestone dates only: plant is not dated.
 *
 * @throws RangeError on a date that is not real, negative racks or kW, or a commissioning
 *   level that is not 1…5 (faults the schemas stop)
 */
export function computeFacility(record: FacilityRecordInput, options: FacilityOptions): FacilityFigures {
  const level = requireLevel(options.availableFromLevel);
  const blocksById = new Map(record.blocks.map((b) => [b.id, b]));
  const milestonesById = new Map<number, FacilityMilestoneInput>();
  for (const m of record.milestones) if (!milestonesById.has(m.id)) milestonesById.set(m.id, m);

  const redundancyById = new Map<number, SystemRedundancy>();
  const systems: SystemFigures[] = record.systems.map((system) => {
    const redundancy = systemRedundancy(system, level);
    redundancyById.set(system.id, redundancy);
    const loadKw = servedLoadKw(system, blocksById);
    const heat = heatFigures(system, loadKw);
    const fuel = system.kind === "fuel_storage" ? fuelFigures(system, record.systems, loadKw) : undefined;
    return {
      systemId: system.id,
      redundancy,
      ...(heat ? { heat } : {}),
      ...(fuel ? { fuel } : {}),
      units: system.units.map((unit) => ({
        id: unit.id,
        ...unitStatusOf(unit.stage),
        available: isUnitAvailable(unit.stage, level),
      })),
    };
  });

  const blocks: BlockFigures[] = record.blocks.map((block) => {
    const readiness = blockReadiness({ ...block, itKW: block.itKw }, record.milestones);
    const missing: MissingItem[] = [];
    if (block.dependsOn.length === 0) missing.push({ kind: "no_milestones" });
    for (const id of new Set(block.dependsOn)) {
      const milestone = milestonesById.get(id);
      if (milestone === undefined) missing.push({ kind: "milestone", milestoneId: id });
      else if (milestone.actualFinish === null) {
        missing.push({
          kind: "milestone",
          milestoneId: id,
          ...(milestone.name === undefined ? {} : { name: milestone.name }),
          forecast: milestone.forecastFinish ?? milestone.baselineFinish,
        });
      }
    }
    let plantCarries = true;
    for (const system of record.systems) {
      if (!system.serves.includes(block.id)) continue;
      const redundancy = redundancyById.get(system.id)!;
      if (redundancy.carriesLoad) continue;
      plantCarries = false;
      missing.push({
        kind: "system",
        systemId: system.id,
        name: system.name,
        now: redundancy.now,
        needed: neededUnits(system),
        available: Math.max(...unitsPerTrain(system, level).availablePerTrain),
      });
    }
    const { baselineReadyDate, forecastReadyDate } = readiness;
    return {
      blockId: block.id,
      baselineReadyDate,
      forecastReadyDate,
      readyForService: readiness.ready && plantCarries,
      milestonesComplete: readiness.ready,
      slipWorkingDays:
        baselineReadyDate !== null && forecastReadyDate !== null
          ? workingDaysBetween(baselineReadyDate, forecastReadyDate, options.calendar)
          : null,
      missing,
    };
  });

  const ramp = capacityRamp(
    record.blocks.map((b) => ({ ...b, itKW: b.itKw })),
    record.milestones,
  ).map((p) => ({
    date: p.date,
    racksBaseline: p.baselineRacks,
    racksForecast: p.forecastRacks,
    kwBaseline: p.baselineKW,
    kwForecast: p.forecastKW,
  }));

  return { blocks, systems, ramp };
}

function countWords(count: number, one: string, many: string): string {
  return count === 1 ? `1 ${one}` : `${count} ${many}`;
}

/**
 * `missing` in plain words for a page. A milestone or system the reader may not see is
 * worded without its name or figures, and counted ("2 internal milestones not yet
 * complete"), so the page says that something stands in the way without saying what.
 */
export function missingWords(
  items: readonly MissingItem[],
  visible: { milestoneIds: ReadonlySet<number>; systemIds: ReadonlySet<number> },
): string[] {
  const words: string[] = [];
  let hiddenMilestones = 0;
  let hiddenSystems = 0;
  for (const item of items) {
    if (item.kind === "no_milestones") {
      words.push("Not linked to any milestone yet, so readiness cannot be shown");
    } else if (item.kind === "milestone") {
      if (!visible.milestoneIds.has(item.milestoneId)) {
        hiddenMilestones += 1;
        continue;
      }
      const name = item.name ?? `Milestone ${item.milestoneId}`;
      const when = item.forecast ? ` (forecast ${formatShortDate(item.forecast)})` : "";
      words.push(`${name} not yet complete${when}`);
    } else {
      if (!visible.systemIds.has(item.systemId)) {
        hiddenSystems += 1;
        continue;
      }
      words.push(
        `${item.name}: now ${item.now}, needs ${countWords(item.needed, "unit", "units")} available to carry the load (${item.available} available)`,
      );
    }
  }
  if (hiddenMilestones > 0) {
    words.push(`${countWords(hiddenMilestones, "internal milestone", "internal milestones")} not yet complete`);
  }
  if (hiddenSystems > 0) {
    words.push(
      hiddenSystems === 1
        ? "A plant system not yet carrying its load"
        : `${hiddenSystems} plant systems not yet carrying their load`,
    );
  }
  return words;
}

/** A change in the facility's figures between two computations, for digests. */
export type FacilityMove =
  /** `days`: calendar days, positive when later; null when either date is unknown. */
  | { kind: "block_forecast_moved"; blockId: number; from: string | null; to: string | null; days: number | null }
  /**
   * `on`: the day its last milestone finished. When the plant was the last condition to
   * be met the block went into service later, within the window; the plant has no dates here.
   */
  | { kind: "block_ready"; blockId: number; on: string | null }
  | { kind: "system_label"; systemId: number; from: string; to: string; reachedDesign: boolean }
  | { kind: "units_commissioned"; systemId: number; unitIds: number[] };

/**
 * What {@link facilityMoves} reads of a computation: {@link FacilityFigures} fits, and so does
 * an audience's answer once its ids are named as here (digests diff two such answers, so a
 * reader only hears of blocks and systems they may see).
 */
export interface FacilityMovesInput {
  blocks: readonly Pick<BlockFigures, "blockId" | "forecastReadyDate" | "readyForService">[];
  systems: readonly { systemId: number; redundancy: Pick<SystemRedundancy, "now" | "shortfall">; units: readonly Pick<SystemFigures["units"][number], "id" | "available">[] }[];
}

/**
 * What moved between two computations of the same record (as it stood at a window's
 * start and at its end). Blocks and systems that did not exist at the start have nothing
 * to move from and give no moves; their arrival is news of another kind. Units
 * commissioned are those available at the end and not at the start (a unit added in the
 * window and already available counts).
 */
export function facilityMoves(before: FacilityMovesInput, after: FacilityMovesInput): FacilityMove[] {
  const moves: FacilityMove[] = [];
  const blocksBefore = new Map(before.blocks.map((b) => [b.blockId, b]));
  for (const block of after.blocks) {
    const was = blocksBefore.get(block.blockId);
    if (was === undefined) continue;
    if (was.forecastReadyDate !== block.forecastReadyDate) {
      moves.push({
        kind: "block_forecast_moved",
        blockId: block.blockId,
        from: was.forecastReadyDate,
        to: block.forecastReadyDate,
        days:
          was.forecastReadyDate !== null && block.forecastReadyDate !== null
            ? daysBetween(was.forecastReadyDate, block.forecastReadyDate)
            : null,
      });
    }
    if (!was.readyForService && block.readyForService) {
      moves.push({ kind: "block_ready", blockId: block.blockId, on: block.forecastReadyDate });
    }
  }
  const systemsBefore = new Map(before.systems.map((s) => [s.systemId, s]));
  for (const system of after.systems) {
    const was = systemsBefore.get(system.systemId);
    if (was === undefined) continue;
    if (was.redundancy.now !== system.redundancy.now) {
      moves.push({
        kind: "system_label",
        systemId: system.systemId,
        from: was.redundancy.now,
        to: system.redundancy.now,
        reachedDesign: system.redundancy.shortfall === 0,
      });
    }
    const availableBefore = new Set(was.units.filter((u) => u.available).map((u) => u.id));
    const unitIds = system.units.filter((u) => u.available && !availableBefore.has(u.id)).map((u) => u.id);
    if (unitIds.length > 0) moves.push({ kind: "units_commissioned", systemId: system.systemId, unitIds });
  }
  return moves;
}
