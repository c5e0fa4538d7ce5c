import { stageRank } from "#shared/domain/facility-record.ts";
import {
  UNIT_STAGES,
  type Containment,
  type FeatureKind,
  type FeatureStatus,
  type PlantKind,
  type RatingUnit,
  type SecurityLayer,
  type UnitStage,
} from "#shared/schemas/facility.ts";

// One word per audience across the product (decision 056).
export { AUDIENCE_WORD } from "../../lib/words.ts";

export const KIND_WORD: Record<PlantKind, string> = {
  cooling: "Cooling",
  air_movement: "Air movement",
  power_generation: "Power generation",
  ups: "UPS",
  fuel_storage: "Fuel storage",
  electrical_distribution: "Electrical distribution",
  fire_suppression: "Fire suppression",
  security: "Security",
  other: "Other",
};

export const CONTAINMENT_WORD: Record<Containment, string> = {
  none: "None",
  hot_aisle: "Hot aisle",
  cold_aisle: "Cold aisle",
  chimney: "Chimney racks",
  enclosed_rack: "Enclosed racks",
};

export const RATING_UNIT_WORD: Record<RatingUnit, string> = { kW: "kW", kVA: "kVA", L: "L", "m3/s": "m³/s" };

export const FEATURE_KIND_WORD: Record<FeatureKind, string> = {
  security: "Security layers",
  client: "Client facilities",
  connectivity: "Connectivity",
  certification: "Standards and certifications",
};

export const FEATURE_STATUS_WORD: Record<FeatureStatus, string> = {
  planned: "Planned",
  in_progress: "In progress",
  in_place: "In place",
  contracted: "Contracted",
  in_audit: "In audit",
  certified: "Certified",
};

export const LAYER_WORD: Record<SecurityLayer, string> = { perimeter: "Perimeter", building: "Building", hall: "Hall", rack: "Rack" };

/**
 * What each stage means, in a few words. The commissioning levels follow common practice
 * (no published source: names vary by commissioning authority), as the schema says.
 */
export const STAGE_MEANING: Record<UnitStage, string> = {
  ordered: "ordered",
  delivered: "delivered to site",
  installed: "installed",
  L1: "factory witness test",
  L2: "delivered and inspected",
  L3: "installed and started",
  L4: "functional test passed",
  L5: "integrated systems test passed",
};

/** The short label printed under a unit's shape. */
export const STAGE_SHORT: Record<UnitStage, string> = {
  ordered: "Ordered",
  delivered: "Delivered",
  installed: "Installed",
  L1: "L1",
  L2: "L2",
  L3: "L3",
  L4: "L4",
  L5: "L5",
};

/** The stage after `stage`, or null at L5. */
export function nextStage(stage: UnitStage): UnitStage | null {
  return UNIT_STAGES[stageRank(stage) + 1] ?? null;
}

/** Whether moving a unit from `from` to `to` goes back, which the server refuses without a note. */
export function goesBackwards(from: UnitStage, to: UnitStage): boolean {
  return stageRank(to) < stageRank(from);
}

/** "L4, functional test passed" for a commissioning level; "Delivered" for the stages before. */
export function stageWords(stage: UnitStage): string {
  return stage.startsWith("L") ? `${stage}, ${STAGE_MEANING[stage]}` : STAGE_SHORT[stage];
}

/** "Chiller 3: commissioned to L3, installed and started": a unit's accessible name. */
export function unitStageWords(label: string, stage: UnitStage, available: boolean): string {
  const level = stage.startsWith("L") ? `commissioned to ${stageWords(stage)}` : STAGE_MEANING[stage];
  return `${label}: ${level}${available ? "; carries load" : ""}`;
}

const number = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 1 });
const whole = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 0 });

/** "1,250" / "12.5": figures for tables (one decimal at most). */
export function formatFigure(n: number | null | undefined): string {
  return n === null || n === undefined || !Number.isFinite(n) ? "—" : number.format(n);
}

/** "480 kW", "1,250 kVA", "3.5 m³/s". */
export function formatRating(value: number | null, unit: RatingUnit | null): string {
  return value === null || unit === null ? "—" : `${formatFigure(value)} ${RATING_UNIT_WORD[unit]}`;
}

/** "+12 wd" / "−3 wd" / "0 wd": slip in working days where space is short. */
export function signedWorkingDays(days: number | null): string {
  if (days === null) return "—";
  if (days === 0) return "0 wd";
  return `${days > 0 ? "+" : "−"}${whole.format(Math.abs(days))} wd`;
}

/** "14.8 h" for autonomy; a dash when it cannot be worked out. */
export function formatHours(h: number | null | undefined): string {
  return h === null || h === undefined || !Number.isFinite(h) ? "—" : `${number.format(h)} h`;
}

/** "+34.6 kW" / "−12 kW": a margin with its sign. */
export function signedKw(kw: number): string {
  return `${kw >= 0 ? "+" : "−"}${number.format(Math.abs(kw))} kW`;
}
