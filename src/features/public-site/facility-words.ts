import { daysBetween } from "#shared/domain/calendar.ts";
import { formatLongDate } from "#shared/domain/locale-dates.ts";
import type { BlockAnswer, Containment, FeatureKind, FeatureStatus, PlantKind, SecurityLayer, UnitAnswer } from "#shared/schemas/facility.ts";

const number = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 0 });
const oneDecimal = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 1 });

/** "14 May 2027" for a calendar date (never shifted by the reader's zone). */
export function longDay(date: string): string {
  return formatLongDate(date.slice(0, 10));
}

/** "1,460" */
export const whole = (n: number) => number.format(n);
/** "14.8" */
export const tenths = (n: number) => oneDecimal.format(n);

/**
 * How far one date lies after (or before) another, in the unit a person would use:
 * "3 days later", "6 weeks later", "about 3 months earlier". Calendar days, because the
 * prospect plans in calendar time; weeks from 7 days, months from 8 weeks.
 */
export function laterInWords(days: number): string {
  if (days === 0) return "on the planned date";
  const dir = days > 0 ? "later" : "earlier";
  const d = Math.abs(days);
  const plural = (n: number, w: string) => `${n} ${w}${n === 1 ? "" : "s"}`;
  if (d < 7) return `${plural(d, "day")} ${dir}`;
  if (d < 56) return `${d % 7 === 0 ? "" : "about "}${plural(Math.round(d / 7), "week")} ${dir}`;
  return `about ${plural(Math.round(d / 30.44), "month")} ${dir}`;
}

/**
 * A block's ready-for-service date in plain words against the original plan:
 * "Ready for service: forecast 14 May 2027 (planned 2 April 2027, 6 weeks later)".
 */
export function readyInWords(b: Pick<BlockAnswer, "readyForService" | "forecastReadyDate" | "baselineReadyDate">): string {
  if (b.readyForService) return b.forecastReadyDate ? `Ready for service since ${longDay(b.forecastReadyDate)}` : "Ready for service";
  if (!b.forecastReadyDate) return "Ready for service: no date yet";
  const forecast = `Ready for service: forecast ${longDay(b.forecastReadyDate)}`;
  if (!b.baselineReadyDate) return forecast;
  const slip = daysBetween(b.baselineReadyDate, b.forecastReadyDate);
  if (slip === 0) return `${forecast} (as planned)`;
  return `${forecast} (planned ${longDay(b.baselineReadyDate)}, ${laterInWords(slip)})`;
}

/** "48 racks · 480 kW IT · up to 10 kW per rack" */
export function blockFigures(b: Pick<BlockAnswer, "racks" | "itKw" | "maxKwPerRack">): string {
  return `${whole(b.racks)} racks · ${whole(b.itKw)} kW IT · up to ${tenths(b.maxKwPerRack)} kW per rack`;
}

export const PLANT_KIND_WORD: Record<PlantKind, string> = {
  cooling: "Cooling",
  air_movement: "Air movement",
  power_generation: "Standby power",
  ups: "UPS",
  fuel_storage: "Fuel storage",
  electrical_distribution: "Electrical distribution",
  fire_suppression: "Fire suppression",
  security: "Security",
  other: "Other plant",
};

export const CONTAINMENT_IN_WORDS: Record<Containment, string> = {
  none: "no aisle containment",
  hot_aisle: "hot-aisle containment",
  cold_aisle: "cold-aisle containment",
  chimney: "chimney racks",
  enclosed_rack: "enclosed racks",
};

export const FEATURE_HEADING: Record<FeatureKind, string> = {
  security: "Security, layer by layer",
  client: "For your team on site",
  connectivity: "Connectivity",
  certification: "Standards and certifications",
};

export const LAYER_IN_WORDS: Record<SecurityLayer, string> = { perimeter: "Perimeter", building: "Building", hall: "Hall", rack: "Rack" };

/** How far along a feature is, as a word and a shape: open ring (not started), half disc (under way), full disc (done). */
export const FEATURE_STATUS_LOOK: Record<FeatureStatus, { word: string; shape: "ring" | "half" | "disc" }> = {
  planned: { word: "Planned", shape: "ring" },
  in_progress: { word: "Being built", shape: "half" },
  contracted: { word: "Contracted", shape: "half" },
  in_audit: { word: "In audit", shape: "half" },
  in_place: { word: "In place", shape: "disc" },
  certified: { word: "Certified", shape: "disc" },
};

/** Where a unit stands, for the units drawing: the shape is the stage, filled once it can carry load. */
export type UnitLook = "available" | "commissioning" | "installed" | "delivered" | "ordered";

export const UNIT_LOOK_WORD: Record<UnitLook, string> = {
  available: "Commissioned, carries load",
  commissioning: "Being commissioned",
  installed: "Installed",
  delivered: "Delivered",
  ordered: "Ordered",
};

export const UNIT_LOOKS: readonly UnitLook[] = ["available", "commissioning", "installed", "delivered", "ordered"];

export function unitLook(u: Pick<UnitAnswer, "available" | "status">): UnitLook {
  if (u.available) return "available";
  return u.status === "commissioned" ? "commissioning" : u.status;
}

/** "Chiller 3: commissioned to L3" */
export function unitInWords(u: Pick<UnitAnswer, "label" | "status" | "commissioningLevel" | "available">): string {
  const where = u.status === "commissioned" ? `commissioned to L${u.commissioningLevel ?? "?"}` : u.status;
  return `${u.label}: ${where}${u.available ? ", carries load" : ""}`;
}
