import type { Knex } from "knex";
import { DateTime } from "luxon";
import { addDays } from "#shared/domain/calendar.ts";
import { DesignFiguresSchema, type DesignFigures, type SecurityLayer, type UnitStage } from "#shared/schemas/facility.ts";
import { insertFacilityEvents, type NewFacilityEvent } from "../facility/facility.events.repository.ts";
import {
  blockFieldsOf,
  insertBlock,
  insertFeature,
  insertSystem,
  replaceBlockMilestones,
  replaceSystemLinks,
  unitRow,
  type BlockFields,
  type FeatureFields,
  type SystemFields,
} from "../facility/facility.repository.ts";
import { demoAnchor } from "./programme.seed.ts";

/**
 * The facility of the invented demo scenario (DESIGN.md, issue 11): Aldermere Campus Phase 2's
 * capacity blocks, its plant with every unit's dated stage history, and the site features a
 * prospect asks about. Every figure is invented for the demo.
 *
 * The dates follow the seeded programme: they are placed on the programme's own anchor (the
 * Monday its nine months of history end on), so a chiller is delivered in the week the
 * programme's chiller milestone says, and nothing has passed a commissioning level the
 * programme has not reached. The programme's L1 factory witness tests are complete and its L2
 * installation verification is under way; its L3 start-up, L4 functional tests and L5
 * integrated systems test are still ahead. So no unit here is beyond L2 yet, and every
 * system's "now" label is short of its design: that is the truth of a site four months
 * before its first hall is ready for service (docs/decisions/030-demo-facility-and-tags.md).
 *
 * Idempotent like the programme seed: a project that already has a capacity block is left alone.
 */

const TZ = "Europe/London";
/** Weeks of programme history before the anchor (programme.seed.ts: HISTORY_WEEKS). */
const PROGRAMME_HISTORY_WEEKS = 39;

/** [week relative to the anchor, weekday 0 = Monday]: the programme seed's way of placing a day. */
type Day = readonly [week: number, weekday: number];

interface SeedBlock extends BlockFields {
  key: string;
  /** Starts of programme milestone names. */
  dependsOn: string[];
}

const BLOCKS: SeedBlock[] = [
  {
    key: "2a",
    name: "Hall 2A",
    racks: 48,
    itKw: 480,
    maxKwPerRack: 10,
    coolingApproach: "Air-cooled chillers with free cooling",
    containment: "hot_aisle",
    audience: "public",
    stage: "Stage 1",
    dependsOn: ["Hall 2A raised floor", "L5 integrated systems test", "Hall 2A ready for service"],
    notes: "Four rows of twelve racks at up to 10 kW each, hot-aisle containment and overhead busbar with A and B feeds to every rack.",
  },
  {
    key: "hd1",
    name: "HD-1",
    racks: 20,
    itKw: 500,
    maxKwPerRack: 25,
    coolingApproach: "Air-cooled chillers with free cooling; liquid-ready for rear-door or direct-to-chip cooling",
    containment: "cold_aisle",
    audience: "public",
    stage: "Stage 1",
    dependsOn: ["HD-1 high-density", "L5 integrated systems test", "HD-1 ready for service"],
    notes: "The high-density suite: twenty racks at up to 25 kW each in sealed containment. Liquid-ready: chilled-water branches are capped at every rack position, for rear-door heat exchangers or direct-to-chip cooling when a client needs them.",
  },
  {
    key: "2b",
    name: "Hall 2B",
    racks: 48,
    itKw: 480,
    maxKwPerRack: 10,
    coolingApproach: "Air-cooled chillers with free cooling",
    containment: "hot_aisle",
    // Public: a later stage is what a prospect planning growth reserves early (decision 030).
    audience: "public",
    stage: "Stage 2 (later)",
    dependsOn: ["Hall 2B fit-out", "Hall 2B ready for service"],
    notes: "The later stage: the shell is built with Hall 2A; fit-out follows at a client's request. Space here can be reserved now.",
  },
];

interface SeedUnit {
  label: string;
  tag: string;
  /** Stages reached, in order, each on its day; the first is the order. A note says why a step went backwards or late. */
  steps: Array<{ stage: UnitStage; on: Day; note?: string }>;
}

interface SeedSystem extends Omit<SystemFields, "design"> {
  key: string;
  /** Keys of the blocks it serves. */
  serves: string[];
  /** Only the figures given; the rest take the schema's defaults. */
  design: Partial<DesignFigures>;
  /** Starts of programme milestone names. */
  linkedMilestones: string[];
  units: SeedUnit[];
}

const DEMO_FIGURES = "Design figures invented for the demo.";
/** The day the programme's "L1 factory witness tests complete" milestone finished: the certificates of units already installed are filed then. */
const L1_FILED: Day = [-9, 4];

/**
 * A unit that went the usual way: ordered, delivered, installed, then L1 (its factory witness
 * test certificate filed against the installed unit) and, where given, L2.
 */
function unit(label: string, tag: string, ordered: Day, delivered: Day, installed?: Day, l1?: Day, l2?: Day, notes: { delivered?: string } = {}): SeedUnit {
  const steps: SeedUnit["steps"] = [{ stage: "ordered", on: ordered }];
  steps.push({ stage: "delivered", on: delivered, ...(notes.delivered ? { note: notes.delivered } : {}) });
  if (installed) steps.push({ stage: "installed", on: installed });
  if (l1) steps.push({ stage: "L1", on: l1 });
  if (l2) steps.push({ stage: "L2", on: l2 });
  return { label, tag, steps };
}

const SYSTEMS: SeedSystem[] = [
  {
    key: "chillers",
    name: "Chillers",
    kind: "cooling",
    audience: "public",
    serves: ["2a", "hd1", "2b"],
    neededPerSystem: 4,
    independentSystems: 1,
    ratingPerUnit: 400,
    ratingUnit: "kW",
    // Chilled water at 14 °C flow / 20 °C return; 64 kg/s is the whole system's design flow
    // (16 kg/s through each of the four duty chillers): 64 × 4.186 × 6 ≈ 1,607 kW, matching 4 × 400 kW.
    design: { chilledWaterFlowKgS: 64, chilledWaterSupplyC: 14, chilledWaterReturnC: 20, supplyAirC: 24 },
    linkedMilestones: ["Chillers delivered", "L4 functional performance tests"],
    notes: `Five 400 kW air-cooled chillers with free-cooling coils; four carry the design load. ${DEMO_FIGURES}`,
    units: [
      unit("Chiller 1", "CH-01", [-26, 0], [-12, 1], [-11, 2], L1_FILED, [-3, 2]),
      unit("Chiller 2", "CH-02", [-26, 0], [-12, 1], [-11, 4], L1_FILED, [-2, 2]),
      unit("Chiller 3", "CH-03", [-26, 0], [-1, 1], undefined, undefined, undefined, {
        delivered: "Delivered late: failed its first factory witness test on capacity, passed the re-test, then held at the port for ten days",
      }),
      unit("Chiller 4", "CH-04", [-26, 0], [-11, 1], [-10, 3], L1_FILED),
      unit("Chiller 5", "CH-05", [-26, 0], [-1, 1], undefined, undefined, undefined, { delivered: "Held at the port for ten days with Chiller 3" }),
    ],
  },
  {
    key: "fans",
    name: "Supply fans",
    kind: "air_movement",
    audience: "public",
    serves: ["2a", "hd1"],
    neededPerSystem: 6,
    independentSystems: 1,
    ratingPerUnit: 12,
    ratingUnit: "m3/s",
    // 12 m³/s a fan at ΔT 12 K: six duty fans carry 6 × 12 × 1.2 × 1.006 × 12 ≈ 1,043 kW against 980 kW of IT load.
    design: { airflowM3s: 12, deltaTK: 12 },
    linkedMilestones: ["Supply fans installed"],
    notes: `Eight supply fans for Hall 2A and HD-1; six carry the design airflow. ${DEMO_FIGURES}`,
    units: [
      unit("Fan 1", "SF-01", [-20, 0], [-10, 1], [-8, 2]),
      unit("Fan 2", "SF-02", [-20, 0], [-10, 1], [-8, 3]),
      unit("Fan 3", "SF-03", [-20, 0], [-10, 1], [-7, 1]),
      unit("Fan 4", "SF-04", [-20, 0], [-10, 1], [-5, 2]),
      {
        label: "Fan 5",
        tag: "SF-05",
        steps: [
          { stage: "ordered", on: [-20, 0] },
          { stage: "delivered", on: [-4, 1] },
          { stage: "installed", on: [-3, 2] },
          { stage: "delivered", on: [-2, 3], note: "Taken off its mounts again: the anti-vibration mounts were the wrong rating; refitted when the right ones arrive" },
        ],
      },
      unit("Fan 6", "SF-06", [-20, 0], [-4, 1]),
      { label: "Fan 7", tag: "SF-07", steps: [{ stage: "ordered", on: [-20, 0] }] },
      { label: "Fan 8", tag: "SF-08", steps: [{ stage: "ordered", on: [-20, 0] }] },
    ],
  },
  {
    key: "generators",
    name: "Standby generators",
    kind: "power_generation",
    audience: "public",
    serves: ["2a", "hd1", "2b"],
    neededPerSystem: 2,
    independentSystems: 1,
    ratingPerUnit: 1250,
    ratingUnit: "kVA",
    design: {},
    linkedMilestones: ["Generators delivered", "Generator commissioning"],
    notes: `Three 1,250 kVA diesel generator sets; two carry the load, the third is the spare. ${DEMO_FIGURES}`,
    units: [
      unit("Generator 1", "GEN-01", [-28, 0], [-5, 1], [-4, 3], [-4, 3], [-2, 4]),
      unit("Generator 2", "GEN-02", [-28, 0], [-5, 1], [-4, 4], [-4, 4]),
      unit("Generator 3", "GEN-03", [-28, 0], [-2, 3], [-2, 3], [-1, 2], undefined, {
        delivered: "Delivered two weeks late: held at the factory for a governor retrofit",
      }),
    ],
  },
  {
    key: "fuel",
    name: "Bulk fuel tank",
    kind: "fuel_storage",
    audience: "public",
    serves: ["2a", "hd1", "2b"],
    neededPerSystem: 1,
    independentSystems: 1,
    ratingPerUnit: 40_000,
    ratingUnit: "L",
    // 38,000 L of the 40,000 L can be used: the last 5 % lies below the transfer pumps' suction
    // (kept for sediment and water to settle) or is the ullage left free at the top.
    design: { usableFuelLitres: 38_000, specificFuelConsumption: 0.27 },
    linkedMilestones: ["Bulk fuel tank installed"],
    notes: `A 40,000 L double-skinned bulk tank with leak detection, transfer pumps and day tanks. ${DEMO_FIGURES}`,
    units: [
      {
        label: "Bulk tank",
        tag: "FT-01",
        steps: [
          { stage: "ordered", on: [-22, 0] },
          { stage: "delivered", on: [-12, 1] },
          { stage: "installed", on: [-10, 2] },
          // No factory witness test for a tank: its installation check and pressure test come first.
          { stage: "L2", on: [-8, 2], note: "No factory witness test for a tank: installation verified and both skins pressure-tested" },
        ],
      },
    ],
  },
  {
    key: "ups",
    name: "UPS modules",
    kind: "ups",
    audience: "public",
    serves: ["2a", "hd1", "2b"],
    neededPerSystem: 3,
    independentSystems: 1,
    ratingPerUnit: 500,
    ratingUnit: "kW",
    design: {},
    linkedMilestones: ["UPS modules installed"],
    notes: `Four 500 kW UPS modules, three carrying the load, with their battery strings. ${DEMO_FIGURES}`,
    units: [
      unit("UPS module 1", "UPS-01", [-20, 0], [-9, 1], [-8, 1], [-8, 1], [-1, 3]),
      unit("UPS module 2", "UPS-02", [-20, 0], [-9, 1], [-7, 2], [-7, 2]),
      unit("UPS module 3", "UPS-03", [-20, 0], [-9, 1], [-6, 3], [-6, 3]),
      unit("UPS module 4", "UPS-04", [-20, 0], [-3, 1]),
    ],
  },
  {
    key: "security",
    name: "Security control room systems",
    kind: "security",
    // Kept to staff: where the head-end sits and how it is duplicated is not for the public.
    audience: "internal",
    serves: ["2a", "hd1"],
    neededPerSystem: 1,
    independentSystems: 1,
    ratingPerUnit: null,
    ratingUnit: null,
    design: {},
    linkedMilestones: ["Access control and CCTV"],
    notes: "Access control and CCTV head-end servers, one duty and one standby.",
    units: [unit("Head-end server A", "SEC-HE-A", [-6, 0], [-2, 1]), unit("Head-end server B", "SEC-HE-B", [-6, 0], [-2, 1])],
  },
];

interface SeedFeature extends Omit<FeatureFields, "layer" | "statusDate"> {
  layer?: SecurityLayer;
  statusDate?: Day;
}

const FEATURES: SeedFeature[] = [
  // Security, from the fence in to the rack.
  { kind: "security", layer: "perimeter", name: "Perimeter fence and vehicle barriers", detail: "A security fence around the site, rising-arm vehicle barriers and a staffed gatehouse.", status: "in_place", statusDate: [-18, 3], audience: "public" },
  { kind: "security", layer: "building", name: "Turnstiles at the building entrance", detail: "Full-height turnstiles between reception and the secure side, one person per card.", status: "in_progress", audience: "public" },
  { kind: "security", layer: "building", name: "CCTV", detail: "Cameras covering the perimeter, every entrance and the halls, recorded and kept for 90 days.", status: "in_progress", audience: "public" },
  { kind: "security", layer: "hall", name: "Access control on every hall door", detail: "Card and PIN on every door into a data hall, with every entry logged.", status: "in_progress", audience: "public" },
  { kind: "security", layer: "hall", name: "Interlocked entry doors", detail: "Mantrap interlocks at each hall entry; zoning detail kept to staff.", status: "planned", audience: "internal" },
  { kind: "security", layer: "rack", name: "Biometric rack locks on request", detail: "Fingerprint-and-card locks on a client's racks, fitted on request.", status: "planned", audience: "public" },
  // For clients on site.
  { kind: "client", name: "Meeting room bookable by clients", detail: "Seats eight, with a screen; booked through the service desk.", status: "in_progress", audience: "public" },
  { kind: "client", name: "Breakout area", detail: "Kitchen and seating for engineers working on site.", status: "planned", audience: "public" },
  { kind: "client", name: "Demo suite", detail: "A lockable room for clients to show their equipment to their own customers.", status: "planned", audience: "public" },
  { kind: "client", name: "Loading bay", detail: "Covered, with a dock leveller, next to the build room.", status: "in_progress", audience: "public" },
  { kind: "client", name: "Goods lift", detail: "2,000 kg, from the loading bay to both hall floors.", status: "in_progress", audience: "public" },
  { kind: "client", name: "Rack delivery route doors 2.5 m × 1.8 m", detail: "Every door from the loading bay to the halls is at least 2.5 m high and 1.8 m wide: a loaded 48U rack goes through upright.", status: "in_place", statusDate: [-15, 1], audience: "public" },
  // Connectivity: invented carriers only.
  { kind: "connectivity", name: "Two diverse fibre entry routes", detail: "North and south duct routes into the building, at least 50 m apart along their whole length.", status: "in_place", statusDate: [-20, 2], audience: "public" },
  { kind: "connectivity", name: "Meet-me room A", detail: "Carrier-neutral, on the north side.", status: "in_progress", audience: "public" },
  { kind: "connectivity", name: "Meet-me room B", detail: "Carrier-neutral, on the south side.", status: "planned", audience: "public" },
  { kind: "connectivity", name: "Carrier A (contracted)", detail: "Dark fibre and wavelengths; contracted.", status: "contracted", statusDate: [-10, 1], audience: "public" },
  { kind: "connectivity", name: "Carrier B (contracted)", detail: "IP transit and wavelengths; contracted.", status: "contracted", statusDate: [-6, 3], audience: "public" },
  { kind: "connectivity", name: "Carrier C (in discussion)", detail: "Terms under discussion; not yet contracted.", status: "planned", audience: "investor" },
  // Standards being pursued (standards, not companies).
  { kind: "certification", name: "ISO/IEC 27001 information security management", detail: "Stage 1 audit done; stage 2 follows handover of Hall 2A.", status: "in_audit", statusDate: [-3, 2], audience: "public" },
  { kind: "certification", name: "ISO 50001 energy management", detail: "Planned for the first year of operation.", status: "planned", audience: "public" },
];

/**
 * The programme's anchor: its first baseline was agreed on the first day of its history,
 * 39 weeks before the anchor. A project without that baseline (no demo programme) uses the
 * seed's own Monday.
 */
async function programmeAnchor(db: Knex, projectId: number, today?: string): Promise<string> {
  const first = (await db("baselines").where({ project_id: projectId, number: 1 }).first("at")) as { at: Date } | undefined;
  if (!first) return demoAnchor(today);
  const agreed = DateTime.fromJSDate(new Date(first.at)).setZone(TZ).toISODate()!;
  return addDays(agreed, 7 * PROGRAMME_HISTORY_WEEKS);
}

/**
 * Writes the demo facility into a project that has no capacity block yet, in one
 * transaction, and tags a few of the demo's photos and updates with blocks and systems.
 * Returns what it made.
 */
export async function seedFacility(db: Knex, projectId: number, opts: { byUserId: number | null; today?: string }): Promise<{ created: string[] }> {
  if (await db("capacity_blocks").where({ project_id: projectId }).first("id")) return { created: [] };
  const anchor = await programmeAnchor(db, projectId, opts.today);
  const day = (d: Day) => addDays(anchor, 7 * d[0] + d[1]);
  const instant = (date: string, hour: number) => DateTime.fromISO(`${date}T${String(hour).padStart(2, "0")}:00`, { zone: TZ }).toJSDate();
  const milestones = (await db("milestones").where({ project_id: projectId }).select("id", "name")) as Array<{ id: number; name: string }>;
  const milestoneIds = (starts: string[]) =>
    starts.map((s) => milestones.find((m) => m.name.startsWith(s))).filter((m): m is { id: number; name: string } => m !== undefined).map((m) => Number(m.id));

  return db.transaction(async (trx) => {
    // Entered through the facility's repository, as a lead's writes are; the units' stage
    // history is written as it happened, so their rows and events carry the demo's own days.
    const createdAt = instant(addDays(anchor, -7 * 30), 9);
    const blockIds = new Map<string, number>();
    for (const b of BLOCKS) {
      const id = await insertBlock(trx, projectId, blockFieldsOf(b), createdAt);
      blockIds.set(b.key, id);
      await replaceBlockMilestones(trx, id, milestoneIds(b.dependsOn));
    }

    const events: NewFacilityEvent[] = [];
    const systemIds = new Map<string, number>();
    let unitCount = 0;
    for (const s of SYSTEMS) {
      const systemId = await insertSystem(trx, projectId, { ...s, design: DesignFiguresSchema.parse(s.design) }, createdAt);
      systemIds.set(s.key, systemId);
      await replaceSystemLinks(trx, systemId, { serves: s.serves.map((k) => blockIds.get(k)!), linkedMilestones: milestoneIds(s.linkedMilestones) });

      for (const [j, u] of s.units.entries()) {
        const last = u.steps.at(-1)!;
        const [unitId] = await trx("plant_units").insert({
          ...unitRow({ label: u.label, tag: u.tag, train: 1, stage: last.stage, stageOn: day(last.on) }),
          system_id: systemId,
          sort_order: j + 1,
          // One version a stage written, like the programme's milestones.
          version: u.steps.length,
          created_at: instant(day(u.steps[0]!.on), 15),
          updated_at: instant(day(last.on), 15),
        });
        unitCount += 1;
        u.steps.forEach((step, k) => {
          events.push({
            projectId,
            subject: "unit",
            subjectId: Number(unitId),
            subjectName: u.label,
            field: "stage",
            from: k === 0 ? null : u.steps[k - 1]!.stage,
            to: step.stage,
            on: day(step.on),
            // Recorded at the end of the site walk that day.
            at: instant(day(step.on), 15 + (j % 3)),
            byUserId: opts.byUserId,
            note: step.note ?? null,
          });
        });
      }
    }
    events.sort((a, b) => a.at.getTime() - b.at.getTime());
    await insertFacilityEvents(trx, events);

    for (const f of FEATURES) {
      await insertFeature(trx, projectId, { ...f, layer: f.layer ?? null, statusDate: f.statusDate ? day(f.statusDate) : null }, createdAt);
    }

    const tagged = await tagDemoContent(trx, projectId, blockIds, systemIds);
    return {
      created: [
        `facility: ${BLOCKS.length} capacity blocks, ${SYSTEMS.length} plant systems of ${unitCount} units (${events.length} stage events), ${FEATURES.length} site features`,
        ...(tagged > 0 ? [`${tagged} facility tags on the demo's photos and updates`] : []),
      ],
    };
  });
}

/** Photos (by file name) and updates (by title start) of the demo that show a block or a system. */
const PHOTO_TAGS: Array<{ file: string; blocks?: string[]; systems?: string[] }> = [
  { file: "chiller-row.jpg", systems: ["chillers"] },
  { file: "plant-yard-slab.jpg", systems: ["chillers"] },
  { file: "generator-hall.jpg", systems: ["generators"] },
  { file: "fuel-tank.jpg", systems: ["fuel"] },
  { file: "ups-room.jpg", systems: ["ups"] },
  { file: "roof-plant.jpg", blocks: ["2a"], systems: ["fans"] },
  { file: "hall-2a-frame.jpg", blocks: ["2a"] },
  { file: "hall-2a-cladding.jpg", blocks: ["2a"] },
  { file: "hall-2a-corridor.jpg", blocks: ["2a"] },
  { file: "cable-tray.jpg", blocks: ["2a"] },
  { file: "hd1-containment.jpg", blocks: ["hd1"] },
  // Restricted photo of the entry doors: tagged for staff, never shown outside.
  { file: "security-doors.jpg", blocks: ["2a"], systems: ["security"] },
];

/**
 * Adds block and plant tags to the demo's photos and to the updates whose titles are about them.
 * Written straight to the media and posts modules' tag tables (the seed may; decision 015): the
 * tags are added after the updates' revisions were kept, as a lead tagging them later would.
 */
async function tagDemoContent(trx: Knex.Transaction, projectId: number, blockIds: Map<string, number>, systemIds: Map<string, number>): Promise<number> {
  let count = 0;
  const tagRows = (t: { blocks?: string[]; systems?: string[] }) => [
    ...(t.blocks ?? []).map((k) => ({ kind: "block", value: String(blockIds.get(k)!) })),
    ...(t.systems ?? []).map((k) => ({ kind: "plant", value: String(systemIds.get(k)!) })),
  ];
  const photos = (await trx("media_items").where({ project_id: projectId }).select("id", "original_name")) as Array<{ id: number; original_name: string }>;
  for (const t of PHOTO_TAGS) {
    const photo = photos.find((p) => p.original_name === t.file);
    if (!photo) continue;
    const rows = tagRows(t).map((r) => ({ media_id: Number(photo.id), ...r }));
    await trx("media_tags").insert(rows).onConflict(["media_id", "kind", "value"]).ignore();
    count += rows.length;
  }

  const posts = (await trx("posts").where({ project_id: projectId }).select("id", "title")) as Array<{ id: number; title: string }>;
  const postTags = (words: RegExp) => posts.filter((p) => words.test(p.title));
  const plans: Array<{ match: RegExp; blocks?: string[]; systems?: string[] }> = [
    { match: /chiller/i, systems: ["chillers"] },
    { match: /generator/i, systems: ["generators"] },
    { match: /fuel tank/i, systems: ["fuel"] },
    { match: /UPS/, systems: ["ups"] },
    { match: /HD-1/, blocks: ["hd1"] },
  ];
  for (const plan of plans) {
    for (const post of postTags(plan.match)) {
      const rows = tagRows(plan);
      await trx("post_tags").insert(rows.map((r) => ({ post_id: Number(post.id), ...r }))).onConflict(["post_id", "kind", "value"]).ignore();
      count += rows.length;
    }
  }
  return count;
}
