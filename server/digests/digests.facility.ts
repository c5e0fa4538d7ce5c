import type { FacilityAnswer, PlantKind } from "#shared/schemas/facility.ts";
import type { System } from "#shared/schemas/programme.ts";
import { addDays } from "#shared/domain/calendar.ts";
import { facilityMoves, type FacilityMovesInput } from "#shared/domain/facility-record.ts";
import { createRunMemo } from "./digests.run-memo.ts";

/**
 * One facility move as a digest tells it. Names are the block's or the system's; dates are
 * calendar dates (YYYY-MM-DD); labels are redundancy labels as the facility page words them.
 */
export type DigestFacilityItem =
  | { kind: "block_forecast_moved"; name: string; from: string; to: string; days: number }
  | { kind: "block_ready"; name: string; on: string | null }
  | { kind: "system_label"; name: string; from: string; to: string; design: string; reachedDesign: boolean }
  /** `now`: the system's label after them, unless a `system_label` item of the same system says it. */
  | { kind: "units_commissioned"; name: string; units: string[]; now: string | null };

/** A facility item with the topics it reports under (areas: block names; systems: the programme's). */
export interface TopicalFacilityItem {
  item: DigestFacilityItem;
  topics: { areas: string[]; systems: System[] };
}

/** Who reads the facility for a digest: a visitor or an investor, never staff. */
type DigestViewer = "public" | "investor";

/** What digests ask of the facility module: the record as it stood at the end of a day, as a viewer sees it. */
export interface DigestFacilitySource {
  figuresAt(projectId: number, date: string, viewer: DigestViewer): Promise<FacilityAnswer>;
}

/**
 * The programme's topics a plant kind reports under, so a subscriber who follows "cooling"
 * hears of the chillers and the supply fans. A system also reports under the areas (blocks) it
 * serves; one with neither is general news and reaches every reader.
 */
const TOPICS_OF_KIND: Record<PlantKind, System[]> = {
  cooling: ["cooling"],
  air_movement: ["cooling"],
  power_generation: ["power"],
  ups: ["power"],
  electrical_distribution: ["power"],
  fuel_storage: ["fuel"],
  fire_suppression: ["building"],
  security: ["security"],
  other: [],
};

const movesInputOf = (a: FacilityAnswer): FacilityMovesInput => ({
  blocks: a.blocks.map((b) => ({ blockId: b.id, forecastReadyDate: b.forecastReadyDate, readyForService: b.readyForService })),
  systems: a.systems.map((s) => ({ systemId: s.id, redundancy: s.redundancy, units: s.units })),
});

/**
 * The facility's moves between two answers for the same viewer (the record at a window's
 * start and at its end), as digest items. Both answers are already filtered by the viewer's
 * audience, so a block or system the viewer may not see is in neither and gives no item.
 * A forecast that appears or vanishes (a block linked to its first milestone, or unlinked from
 * its last) is a change of the record's links rather than a move, and is not reported; nor is
 * the forecast of a block that became ready, whose own item gives the day.
 */
export function facilityItems(before: FacilityAnswer, after: FacilityAnswer): TopicalFacilityItem[] {
  const blocks = new Map(after.blocks.map((b) => [b.id, b]));
  const systems = new Map(after.systems.map((s) => [s.id, s]));
  const moves = facilityMoves(movesInputOf(before), movesInputOf(after));
  const relabelled = new Set(moves.flatMap((m) => (m.kind === "system_label" ? [m.systemId] : [])));
  const nowReady = new Set(moves.flatMap((m) => (m.kind === "block_ready" ? [m.blockId] : [])));
  const out: TopicalFacilityItem[] = [];
  for (const m of moves) {
    if (m.kind === "block_forecast_moved" || m.kind === "block_ready") {
      const block = blocks.get(m.blockId)!;
      const topics = { areas: [block.name], systems: [] };
      if (m.kind === "block_ready") out.push({ item: { kind: "block_ready", name: block.name, on: m.on }, topics });
      else if (m.from !== null && m.to !== null && m.days !== null && !nowReady.has(m.blockId)) out.push({ item: { kind: "block_forecast_moved", name: block.name, from: m.from, to: m.to, days: m.days }, topics });
      continue;
    }
    const system = systems.get(m.systemId)!;
    const topics = { areas: system.serves.flatMap((id) => blocks.get(id)?.name ?? []), systems: TOPICS_OF_KIND[system.kind] };
    if (m.kind === "system_label") {
      out.push({ item: { kind: "system_label", name: system.name, from: m.from, to: m.to, design: system.redundancy.design, reachedDesign: m.reachedDesign }, topics });
    } else {
      const labels = new Map(system.units.map((u) => [u.id, u.label]));
      const units = m.unitIds.map((id) => labels.get(id) ?? `Unit ${id}`);
      out.push({ item: { kind: "units_commissioned", name: system.name, units, now: relabelled.has(system.id) ? null : system.redundancy.now }, topics });
    }
  }
  return out;
}

/**
 * The facility moves of a run, worked out once per (project, viewer, window) and shared by
 * every reader of that window: a run of thousands of subscribers asks the facility for a few
 * days' figures, not for each reader. The record at a window's start is as it stood at the end
 * of the day before its first day; at its end, at the end of its last day (the days the
 * programme's moves cover too).
 */
export function createFacilityMovesCache(source: DigestFacilitySource) {
  const figures = createRunMemo<FacilityAnswer>();
  const moves = createRunMemo<TopicalFacilityItem[]>();
  const figuresOn = (projectId: number, day: string, viewer: DigestViewer) => figures(`${projectId}|${viewer}|${day}`, () => source.figuresAt(projectId, day, viewer));

  /** Moves over the days `firstDay` … `lastDay` (inclusive, in the project's zone). */
  return function movesIn(projectId: number, viewer: DigestViewer, firstDay: string, lastDay: string): Promise<TopicalFacilityItem[]> {
    return moves(`${projectId}|${viewer}|${firstDay}|${lastDay}`, async () => facilityItems(await figuresOn(projectId, addDays(firstDay, -1), viewer), await figuresOn(projectId, lastDay, viewer)));
  };
}
export type FacilityMovesCache = ReturnType<typeof createFacilityMovesCache>;
