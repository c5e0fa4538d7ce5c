/**
 * The effect of a unit's new stage before it is saved: the facility's figures computed in
 * the browser by the same pure function the server answers with, over the loaded record
 * before and after the change, so the lead sees a label move ("now N → N+1") and a block
 * become ready for service while standing by the unit.
 */
import type { FacilityAnswer, UnitStage } from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { WorkingCalendar } from "#shared/domain/calendar.ts";
import { computeFacility, missingWords, type FacilityFigures, type FacilityRecordInput, type SystemRedundancy } from "#shared/domain/facility-record.ts";

/**
 * The loaded facility and programme as the computation's input (the answers carry every
 * field it reads), with one unit's stage replaced when asked.
 */
export function recordOf(facility: FacilityAnswer, milestones: readonly Milestone[], change?: { unitId: number; stage: UnitStage }): FacilityRecordInput {
  const systems = change ? facility.systems.map((s) => ({ ...s, units: s.units.map((u) => (u.id === change.unitId ? { ...u, stage: change.stage } : u)) })) : facility.systems;
  return { blocks: facility.blocks, systems, milestones: [...milestones] };
}

export interface BlockEffect {
  id: number;
  name: string;
  before: { ready: boolean; missing: string[] };
  after: { ready: boolean; missing: string[] };
}

export interface StagePreview {
  systemId: number;
  systemName: string;
  before: SystemRedundancy;
  after: SystemRedundancy;
  unit: { before: boolean; after: boolean };
  /** Every block the unit's system serves, before and after. */
  blocks: BlockEffect[];
  /** Set when the change cannot be computed (it names the fault); the figures are then the current ones. */
  error: string | null;
}

/**
 * The unit's system and each block it serves, before and after moving the unit to `stage`.
 * Staff see every milestone and system, so every missing condition is worded by name.
 */
export function previewStage(facility: FacilityAnswer, milestones: readonly Milestone[], calendar: WorkingCalendar, unitId: number, stage: UnitStage): StagePreview | null {
  const system = facility.systems.find((s) => s.units.some((u) => u.id === unitId));
  if (!system) return null;
  const options = { availableFromLevel: facility.availableFromLevel, calendar };
  const before = computeFacility(recordOf(facility, milestones), options);
  let after: FacilityFigures = before;
  let error: string | null = null;
  try {
    after = computeFacility(recordOf(facility, milestones, { unitId, stage }), options);
  } catch (e) {
    error = e instanceof Error ? e.message : "The change cannot be computed.";
  }
  const visible = { milestoneIds: new Set(milestones.map((m) => m.id)), systemIds: new Set(facility.systems.map((s) => s.id)) };
  const systemOf = (f: FacilityFigures) => f.systems.find((s) => s.systemId === system.id)!;
  const blockOf = (f: FacilityFigures, id: number) => {
    const b = f.blocks.find((x) => x.blockId === id)!;
    return { ready: b.readyForService, missing: missingWords(b.missing, visible) };
  };
  const unitOf = (f: FacilityFigures) => systemOf(f).units.find((u) => u.id === unitId)?.available ?? false;
  return {
    systemId: system.id,
    systemName: system.name,
    before: systemOf(before).redundancy,
    after: systemOf(after).redundancy,
    unit: { before: unitOf(before), after: unitOf(after) },
    blocks: facility.blocks.filter((b) => system.serves.includes(b.id)).map((b) => ({ id: b.id, name: b.name, before: blockOf(before, b.id), after: blockOf(after, b.id) })),
    error,
  };
}
