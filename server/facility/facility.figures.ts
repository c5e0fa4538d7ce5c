import type { BlockAnswer, FacilityAnswer, FeatureAnswer, SystemAnswer, UnitAnswer, UnitStage } from "#shared/schemas/facility.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { audiencesFor, type Viewer } from "#shared/domain/audience.ts";
import { INDICATIVE_CAUTION } from "#shared/domain/facility.ts";
import { computeFacility, missingWords, type FacilityFigures, type FacilityOptions, type FacilityRecordInput } from "#shared/domain/facility-record.ts";
import { forbidden } from "../core/app-error.ts";
import type { MilestoneDatesAt } from "../programme/programme.service.ts";
import { viewerOf, type FacilityContext, type Reader } from "./facility.context.ts";
import { listUnitStageEvents, type UnitStageEvent } from "./facility.events.repository.ts";
import { blockFieldsOf, listBlocks, listFeatures, listSystems, listUnits, type BlockRecord, type FeatureRecord, type SystemRecord, type UnitRecord } from "./facility.repository.ts";

/** The facility's stored record with the milestones' dates, as it stood on a day. */
interface RecordAt {
  at: string;
  blocks: BlockRecord[];
  systems: SystemRecord[];
  /** Units with their stage on that day. */
  units: UnitRecord[];
  features: FeatureRecord[];
  milestones: MilestoneDatesAt[];
}

/**
 * A unit's stage on a day on site, from its history: the stage of its latest event on or
 * before the day; before its first event, the stage that event moved it from (a unit entered
 * that day was not yet ordered on the record: "ordered", so the plant keeps its design label);
 * a unit with no history at all stands at its stored stage from its stored day.
 */
export function stageOn(unit: UnitRecord, events: readonly UnitStageEvent[], day: string): UnitStage {
  let last: UnitStageEvent | undefined;
  for (const e of events) if (e.on <= day) last = e;
  if (last?.to) return last.to as UnitStage;
  const first = events.find((e) => e.on > day);
  if (first) return first.field === "stage" && first.from ? (first.from as UnitStage) : "ordered";
  return unit.stageOn <= day ? unit.stage : "ordered";
}

export const optionsOf = (project: Project): FacilityOptions => ({
  availableFromLevel: project.settings.availableFromLevel,
  calendar: { weekendDays: project.settings.weekendDays, holidays: project.settings.holidays },
});

export const inputOf = (r: Omit<RecordAt, "at" | "features">): FacilityRecordInput => ({
  blocks: r.blocks.map((b) => ({ id: b.id, name: b.name, racks: b.racks, itKw: b.itKw, dependsOn: b.dependsOn })),
  systems: r.systems.map((s) => ({
    id: s.id,
    name: s.name,
    kind: s.kind,
    serves: s.serves,
    neededPerSystem: s.neededPerSystem,
    independentSystems: s.independentSystems,
    ratingPerUnit: s.ratingPerUnit,
    ratingUnit: s.ratingUnit,
    design: s.design,
    units: r.units.filter((u) => u.systemId === s.id).map((u) => ({ id: u.id, label: u.label, train: u.train, stage: u.stage })),
  })),
  milestones: r.milestones.map((m) => ({ id: m.id, name: m.name, baselineFinish: m.baselineFinish, forecastFinish: m.forecastFinish, actualFinish: m.actualFinish })),
});

/**
 * The facility's figures — readiness, redundancy, heat, fuel, the capacity ramp — as each
 * viewer may see them, today or as the record stood on a day (staff; digests compare two days).
 */
export function createFigureUseCases(ctx: FacilityContext) {
  const { db, projects, programme } = ctx;

  /**
   * The record on a day: blocks, systems and features as they are now (their configuration),
   * units at the stage their history gives for that day, milestones' dates as they stood then.
   * Without a day: today, from the stored stages.
   */
  async function recordAt(project: Project, day?: string): Promise<RecordAt> {
    const at = day ?? projects.today(project);
    const blocks = await listBlocks(db, project.id);
    const systems = await listSystems(db, project.id);
    const stored = await listUnits(db, systems.map((s) => s.id));
    let units = stored;
    if (day !== undefined) {
      const history = await listUnitStageEvents(db, project.id);
      const byUnit = new Map<number, UnitStageEvent[]>();
      for (const e of history) byUnit.set(e.unitId, [...(byUnit.get(e.unitId) ?? []), e]);
      units = stored.map((u) => ({ ...u, stage: stageOn(u, byUnit.get(u.id) ?? [], day) }));
    }
    return { at, blocks, systems, units, features: await listFeatures(db, project.id), milestones: await programme.milestoneDatesAt(project.id, at) };
  }

  /**
   * The one place the audience rule meets the facility: readiness and labels are computed over
   * the whole record (a hidden system still holds a block back; a visible system's labels count
   * all its units), then only what the viewer may see is shown — hidden blocks, systems,
   * features and milestones are absent, and `missing` words the hidden ones without their names.
   */
  function forViewer(project: Project, record: RecordAt, viewer: Viewer): FacilityAnswer {
    const options = optionsOf(project);
    const figures = computeFacility(inputOf(record), options);
    const audiences = audiencesFor(viewer);
    const sees = (x: { audience: (typeof audiences)[number] }) => audiences.includes(x.audience);
    const blocks = record.blocks.filter(sees);
    const systems = record.systems.filter(sees);
    const milestoneIds = new Set(record.milestones.filter(sees).map((m) => m.id));
    const blockIds = new Set(blocks.map((b) => b.id));
    const systemIds = new Set(systems.map((s) => s.id));
    // The ramp of what the viewer may see: a hidden block's racks are not theirs to count.
    const ramp = computeFacility(inputOf({ ...record, blocks, systems: [] }), options).ramp;
    return {
      at: record.at,
      availableFromLevel: options.availableFromLevel,
      blocks: blocks.map((b) => blockAnswer(b, figures, { milestoneIds, systemIds, systems })),
      systems: systems.map((s) => systemAnswer(s, record.units, figures, { milestoneIds, blockIds })),
      ramp,
      features: record.features.filter(sees).map(featureAnswer),
      caution: INDICATIVE_CAUTION,
    };
  }

  return {
    /** GET /api/projects/:slug/facility: today, or (staff only) as the record stood on `at`. */
    async facility(slug: string, query: { at?: string }, reader: Reader): Promise<FacilityAnswer> {
      const viewer = viewerOf(reader);
      if (query.at !== undefined && viewer !== "staff") throw forbidden("Only staff may see the facility as it stood on another day.");
      const project = await projects.get(slug);
      return forViewer(project, await recordAt(project, query.at), viewer);
    },

    /** The facility as it stood on a day, for a viewer: digests compare a window's start and end. */
    async figuresAt(projectId: number, date: string, viewer: Viewer): Promise<FacilityAnswer> {
      const project = await projects.getById(projectId);
      return forViewer(project, await recordAt(project, date), viewer);
    },

    /** Today's facility as staff see it: what a write answers with (the written subject, with its figures). */
    async staffFacility(project: Project): Promise<FacilityAnswer> {
      return forViewer(project, await recordAt(project), "staff");
    },
  };
}

type Visible = { milestoneIds: ReadonlySet<number>; systemIds: ReadonlySet<number>; systems: readonly SystemRecord[] };

function blockAnswer(b: BlockRecord, figures: FacilityFigures, visible: Visible): BlockAnswer {
  const f = figures.blocks.find((x) => x.blockId === b.id)!;
  return {
    id: b.id,
    ...blockFieldsOf(b),
    dependsOn: b.dependsOn.filter((id) => visible.milestoneIds.has(id)),
    baselineReadyDate: f.baselineReadyDate,
    forecastReadyDate: f.forecastReadyDate,
    readyForService: f.readyForService,
    slipWorkingDays: f.slipWorkingDays,
    missing: missingWords(f.missing, visible),
    systemIds: visible.systems.filter((s) => s.serves.includes(b.id)).map((s) => s.id),
    version: b.version,
  };
}

function systemAnswer(s: SystemRecord, units: readonly UnitRecord[], figures: FacilityFigures, visible: { milestoneIds: ReadonlySet<number>; blockIds: ReadonlySet<number> }): SystemAnswer {
  const f = figures.systems.find((x) => x.systemId === s.id)!;
  const unitFigures = new Map(f.units.map((u) => [u.id, u]));
  return {
    id: s.id,
    name: s.name,
    kind: s.kind,
    audience: s.audience,
    serves: s.serves.filter((id) => visible.blockIds.has(id)),
    neededPerSystem: s.neededPerSystem,
    independentSystems: s.independentSystems,
    ratingPerUnit: s.ratingPerUnit,
    ratingUnit: s.ratingUnit,
    design: s.design,
    linkedMilestones: s.linkedMilestones.filter((id) => visible.milestoneIds.has(id)),
    notes: s.notes,
    units: units.filter((u) => u.systemId === s.id).map((u) => unitAnswer(u, unitFigures.get(u.id)!)),
    redundancy: f.redundancy,
    ...(f.heat ? { heat: f.heat } : {}),
    ...(f.fuel ? { fuel: f.fuel } : {}),
    version: s.version,
  };
}

function unitAnswer(u: UnitRecord, f: FacilityFigures["systems"][number]["units"][number]): UnitAnswer {
  return { id: u.id, label: u.label, tag: u.tag, train: u.train, status: f.status, commissioningLevel: f.commissioningLevel, stage: u.stage, available: f.available, version: u.version };
}

function featureAnswer(x: FeatureRecord): FeatureAnswer {
  return { id: x.id, kind: x.kind, name: x.name, detail: x.detail, layer: x.layer, status: x.status, statusDate: x.statusDate, audience: x.audience, version: x.version };
}

export type FigureUseCases = ReturnType<typeof createFigureUseCases>;
