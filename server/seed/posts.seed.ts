import type { Knex } from "knex";
import { DateTime } from "luxon";
import type { Viewer } from "#shared/domain/audience.ts";
import { milestoneStatus } from "#shared/domain/programme-health.ts";
import type { MediaItem } from "#shared/schemas/media.ts";
import type { PostTag } from "#shared/schemas/posts.ts";
import type { Milestone, MilestoneEventRow } from "#shared/schemas/programme.ts";
import type { RichTextDoc, RichTextNode } from "#shared/schemas/rich-text.ts";
import type { StoryItemInput } from "#shared/schemas/stories.ts";
import type { Actor } from "../core/types.ts";
import { createMediaService } from "../media/media.service.ts";
import { createLocalDiskStorage, createUploadArea } from "../media/media.storage.ts";
import { createPostsService, type ProgrammeForPosts } from "../posts/posts.service.ts";
import { createProgrammeService } from "../programme/programme.service.ts";
import { createPublishingService } from "../publishing/publishing.service.ts";
import { createProjectsService } from "../projects/projects.service.ts";
import { createStoriesService } from "../stories/stories.service.ts";
import { seedMediaDir } from "./media.seed.ts";

/**
 * The demo's updates and photo story (the invented Aldermere scenario of DESIGN.md): eight
 * published updates over nine months, one of them for investors only, one scheduled for next
 * week, one in review, and a then-and-now story of the plant yard. They go through the real
 * services and workflow — written by marketing, approved and published by the lead — each on
 * its own date, so every published update captured its milestones as the programme stood
 * that day (replayed from the programme's history) and shows "now" beside it where it moved.
 *
 * Idempotent: a project that already has updates is left alone. Photos and milestones that
 * are missing (the media or programme seed has not run) are left out of the text.
 */

const TZ = "Europe/London";

interface SeedPost {
  weeksAgo: number;
  title: string;
  summary: string;
  audience: "public" | "investor";
  cover: string;
  inline?: string;
  /** Starts of milestone names, linked and shown as blocks. */
  milestones: string[];
  tags: PostTag[];
  paragraphs: string[];
  heading?: string;
}

const POSTS: SeedPost[] = [
  {
    weeksAgo: 36,
    title: "Ground broken on Phase 2",
    summary: "Enabling works are under way: the plant-yard slab is poured and the chiller bases set out.",
    audience: "public",
    cover: "plant-yard-slab.jpg",
    milestones: ["Ground works"],
    tags: [{ kind: "area", value: "Plant yard" }, { kind: "system", value: "building" }],
    heading: "What happens next",
    paragraphs: [
      "Phase 2 at Aldermere Campus has started on site. The compound, hoarding and welfare cabins are in, and the escorted visitor route is marked.",
      "In the plant yard the drainage runs are laid and the slab for the chillers is poured. The diverted HV and water services come next.",
    ],
  },
  {
    weeksAgo: 31,
    title: "Hall 2A steel goes up",
    summary: "Primary steel for Hall 2A is rising; cladding will follow from the west end.",
    audience: "public",
    cover: "hall-2a-frame.jpg",
    inline: "plant-yard-slab.jpg",
    milestones: ["Steel frame topped out", "Ground works"],
    tags: [{ kind: "area", value: "Hall 2A" }, { kind: "system", value: "building" }],
    paragraphs: [
      "The portal frames of Hall 2A are going up two bays a week. The same crew moves on to the HD-1 suite and the Hall 2B shell once Hall 2A is topped out.",
      "Ground works are finishing a week later than planned after the utility diversions; the frame was not held up.",
    ],
  },
  {
    weeksAgo: 21,
    title: "Weathertight: roof and cladding complete",
    summary: "The halls are dry, so fit-out can start; the roof plant is lifted in.",
    audience: "public",
    cover: "roof-plant.jpg",
    inline: "hall-2a-frame.jpg",
    milestones: ["Roof and cladding weathertight", "Steel frame topped out"],
    tags: [{ kind: "area", value: "Hall 2A" }, { kind: "system", value: "building" }, { kind: "system", value: "cooling" }],
    heading: "Why weathertight matters",
    paragraphs: [
      "Raised floors, busbar and racks cannot go into a wet building. With the roof membrane and cladding complete, Hall 2A is ready for its fit-out trades.",
      "The roof plant and its louvres were lifted in over two weekends with the road closed.",
    ],
  },
  {
    weeksAgo: 17,
    title: "Bulk fuel tank installed and tested",
    summary: "The 40,000 L double-skinned tank is on its bund and has passed its pressure test.",
    audience: "public",
    cover: "fuel-tank.jpg",
    milestones: ["Bulk fuel tank installed"],
    tags: [{ kind: "area", value: "Plant yard" }, { kind: "system", value: "fuel" }],
    paragraphs: [
      "The bulk tank holds the fuel the generators would burn in a long mains failure. It is double-skinned, with leak detection between the skins, and sits in a bund.",
      "Transfer pumps and the day tanks in the energy centre are connected next. Any autonomy figure we quote is indicative: the design is for the engineers under local codes.",
    ],
  },
  {
    weeksAgo: 13,
    title: "Three generator sets on site",
    summary: "All three 1,250 kVA sets are delivered and set; two carry the load and the third is the spare (N+1).",
    audience: "public",
    cover: "generator-hall.jpg",
    inline: "fuel-tank.jpg",
    milestones: ["Generators delivered"],
    tags: [{ kind: "area", value: "Energy centre" }, { kind: "system", value: "power" }],
    paragraphs: [
      "The generator sets arrived on low loaders and were skated into the generator hall. Each stands on its own plinth with its exhaust stack through the roof.",
      "Commissioning, including a load bank test of each set at full load, follows once the fuel system is proven.",
    ],
  },
  {
    weeksAgo: 10,
    title: "Chillers on their plinths",
    summary: "Four of the five 400 kW chillers are set; the fifth follows the crane.",
    audience: "public",
    cover: "chiller-row.jpg",
    inline: "roof-plant.jpg",
    milestones: ["Chillers delivered", "Hall 2A ready for service"],
    tags: [{ kind: "area", value: "Plant yard" }, { kind: "system", value: "cooling" }],
    heading: "N+1 cooling",
    paragraphs: [
      "Four chillers carry the design load; the fifth is the spare, so one can be maintained or fail without the halls warming up.",
      "The fifth chiller's delivery slipped with the crane booking. We show the forecast below as it stood when we wrote this, and today's beside it.",
    ],
  },
  {
    weeksAgo: 7,
    title: "Investor briefing: energy centre and UPS",
    summary: "The energy centre is complete and UPS installation has begun; the forecast for the UPS modules has moved.",
    audience: "investor",
    cover: "ups-room.jpg",
    inline: "generator-hall.jpg",
    milestones: ["Energy centre building complete", "UPS modules installed"],
    tags: [{ kind: "area", value: "Energy centre" }, { kind: "system", value: "power" }],
    paragraphs: [
      "For our investors: the energy centre building is complete and weathertight, and the first UPS modules and battery strings are going in.",
      "The UPS forecast has moved with the battery delivery; the programme's float absorbs it for now. Detail is in the investor room.",
    ],
  },
  {
    weeksAgo: 1,
    title: "HD-1 containment goes up",
    summary: "Sealed containment is up over the first rack row of the high-density suite.",
    audience: "public",
    cover: "hd1-containment.jpg",
    inline: "chiller-row.jpg",
    milestones: ["HD-1 high-density", "HD-1 ready for service"],
    tags: [{ kind: "area", value: "HD-1" }, { kind: "system", value: "fit-out" }],
    paragraphs: [
      "HD-1 takes 20 racks at up to 25 kW each. Its containment is sealed so that the cold air goes through the equipment and nowhere else.",
      "Dual busbar follows. Ready-for-service dates are shown as forecast today.",
    ],
  },
];

const SCHEDULED: SeedPost = {
  weeksAgo: 0,
  title: "Integrated systems testing: what to expect",
  summary: "Before Hall 2A is ready for service, every system is tested together under heat load.",
  audience: "public",
  cover: "chiller-row.jpg",
  milestones: ["L5 integrated systems test", "Hall 2A ready for service"],
  tags: [{ kind: "area", value: "Hall 2A" }, { kind: "system", value: "commissioning" }],
  paragraphs: [
    "The integrated systems test (commissioning level 5) proves that the plant works as one: the mains supply is cut, the generators start, the UPS carries the load in between and the cooling restarts, with heat-load banks standing in for the racks.",
  ],
};

const IN_REVIEW: SeedPost = {
  weeksAgo: 0,
  title: "Hall 2A corridor: second fix",
  summary: "Lighting and finishes in the Hall 2A corridor.",
  audience: "public",
  cover: "hd1-containment.jpg",
  inline: "hall-2a-corridor.jpg",
  milestones: ["Hall 2A raised floor"],
  tags: [{ kind: "area", value: "Hall 2A" }, { kind: "system", value: "fit-out" }],
  paragraphs: ["Second-fix lighting is complete in the corridor that leads to Hall 2A. (Waiting for the lead: the corridor photo still needs its alt text.)"],
};

/** The titles the demo's updates carry, by what the seed does with them. */
export const DEMO_UPDATE_TITLES = {
  published: POSTS.map((p) => p.title),
  investorOnly: POSTS.filter((p) => p.audience === "investor").map((p) => p.title),
  scheduled: SCHEDULED.title,
  inReview: IN_REVIEW.title,
};

const paragraph = (s: string): RichTextNode => ({ type: "paragraph", content: [{ type: "text", text: s }] });

/**
 * The programme as it stood on `date`: today's milestones with every later change of their
 * dates and progress undone from the events history, and their status worked out for that date.
 */
function programmeAsAt(
  current: (slug: string, reader: Viewer) => Promise<Milestone[]>,
  eventsOf: (id: number) => Promise<MilestoneEventRow[]>,
  settings: Parameters<typeof milestoneStatus>[2],
  date: string,
  endOfDay: Date,
): ProgrammeForPosts {
  return {
    async list(slug, _query, reader) {
      const out: Milestone[] = [];
      for (const m of await current(slug, reader)) {
        const then = { ...m };
        for (const e of await eventsOf(m.id)) {
          if (new Date(e.at) <= endOfDay) continue;
          if (e.field === "forecast_finish") then.forecastFinish = e.from;
          if (e.field === "actual_finish") then.actualFinish = e.from;
          if (e.field === "baseline_finish" && e.from) then.baselineFinish = e.from;
          if (e.field === "percent_complete") then.percentComplete = Number(e.from ?? 0);
        }
        then.status = milestoneStatus(
          { id: then.id, name: then.name, weight: then.weight, percentComplete: then.percentComplete, plannedStart: then.plannedStart, baselineFinish: then.baselineFinish, forecastFinish: then.forecastFinish, actualFinish: then.actualFinish, budget: null, dependsOn: [] },
          date,
          settings,
        );
        out.push(then);
      }
      return out;
    },
  };
}

export async function seedPosts(db: Knex, projectSlug: string, opts: { mediaDir?: string; today?: DateTime } = {}): Promise<{ created: string[] }> {
  const created: string[] = [];
  const projects = createProjectsService(db);
  const project = await projects.get(projectSlug).catch(() => null);
  if (!project) return { created };
  if (await db("posts").where({ project_id: project.id }).first("id")) return { created };

  const mediaDir = opts.mediaDir ?? seedMediaDir(db);
  const limits = { maxFileBytes: 40 * 1024 * 1024, maxFiles: 20, maxPixels: 100_000_000 };
  const media = createMediaService({ db, storage: createLocalDiskStorage(mediaDir), uploads: createUploadArea(mediaDir), projects, programme: createProgrammeService({ db, projects }), limits });
  const photos = new Map<string, MediaItem>(
    (await media.list({ project: projectSlug, page: 1, pageSize: 100 })).items.filter((i) => i.status === "ready").map((i) => [i.name, i]),
  );
  // Without photos no update passes its checks: wait for a run after the media seed.
  if (photos.size === 0) return { created };

  const actorFor = async (email: string, role: "marketing" | "lead"): Promise<Actor> => {
    const u = (await db("users").where({ email }).first("id", "name")) as { id: number; name: string } | undefined;
    return { user: u ? { id: Number(u.id), email, name: String(u.name), role } : null, ip: null };
  };
  const marketing = await actorFor("marketing@kestrel.example", "marketing");
  const lead = await actorFor("lead@kestrel.example", "lead");
  if (!marketing.user || !lead.user) return { created };

  const programme = createProgrammeService({ db, projects });
  const publishing = createPublishingService({ db });
  const milestones = await programme.list(projectSlug, {}, lead);
  const eventCache = new Map<number, MilestoneEventRow[]>();
  const eventsOf = async (id: number) => {
    if (!eventCache.has(id)) eventCache.set(id, await programme.events(id, lead));
    return eventCache.get(id)!;
  };
  const settings = {
    toleranceWorkingDays: project.settings.toleranceWorkingDays,
    behindWorkingDays: project.settings.behindWorkingDays,
    calendar: { weekendDays: project.settings.weekendDays, holidays: project.settings.holidays },
  };
  const milestoneIds = (starts: string[]) => starts.map((s) => milestones.find((m) => m.name.startsWith(s))?.id).filter((id): id is number => id !== undefined);
  const photoId = (name: string | undefined) => (name ? photos.get(name)?.id : undefined);

  const bodyOf = (p: SeedPost): RichTextDoc => {
    const content: RichTextNode[] = [paragraph(p.paragraphs[0]!)];
    const inline = photoId(p.inline);
    if (inline) content.push({ type: "image", attrs: { mediaId: inline, caption: null } });
    for (const s of p.paragraphs.slice(1)) content.push(paragraph(s));
    if (p.heading) content.push({ type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: p.heading }] });
    for (const id of milestoneIds(p.milestones)) content.push({ type: "milestone", attrs: { milestoneId: id } });
    return { type: "doc", content };
  };
  const inputOf = (p: SeedPost) => ({ title: p.title, summary: p.summary, body: bodyOf(p), audience: p.audience, coverMediaId: photoId(p.cover) ?? null, milestoneIds: milestoneIds(p.milestones), tags: p.tags });

  /** The services as they would have run on a past day: its clock, and its programme. */
  const servicesAt = (when: DateTime) => {
    const at = createProjectsService(db, { now: () => when.toJSDate() });
    const date = when.toISODate()!;
    const endOfDay = when.endOf("day").toJSDate();
    const past = programmeAsAt((slug, actor) => programme.list(slug, { at: date }, actor), eventsOf, settings, date, endOfDay);
    return { posts: createPostsService({ db, projects: at, programme: past, media, publishing }), stories: createStoriesService({ db, projects: at, media, publishing }) };
  };

  const today = (opts.today ?? DateTime.now()).setZone(TZ).startOf("day");
  for (const [i, p] of POSTS.entries()) {
    const when = today.minus({ weeks: p.weeksAgo }).set({ hour: 10 + (i % 4), minute: (i * 13) % 60 });
    const { posts } = servicesAt(when);
    const post = await posts.create(projectSlug, inputOf(p), marketing);
    await posts.submit(post.id, marketing);
    await posts.approve(post.id, lead);
    // Should a photo have been left unreviewed, the update stays approved rather than published unchecked.
    const published = await posts.publish(post.id, lead).then(
      () => true,
      () => false,
    );
    created.push(published ? `update “${p.title}”` : `update “${p.title}” (approved; its checks did not pass)`);
  }

  const live = servicesAt(DateTime.now().setZone(TZ));
  const scheduled = await live.posts.create(projectSlug, inputOf(SCHEDULED), lead);
  const nextMonday = today.plus({ weeks: 1 }).startOf("week");
  await live.posts.schedule(scheduled.id, { date: nextMonday.toISODate()!, time: "09:00" }, lead).catch(() => undefined);
  created.push(`update “${SCHEDULED.title}” scheduled for ${nextMonday.toISODate()} 09:00`);
  const review = await live.posts.create(projectSlug, inputOf(IN_REVIEW), marketing);
  await live.posts.submit(review.id, marketing);
  created.push(`update “${IN_REVIEW.title}” in review`);

  // The then-and-now story: the plant yard from its slab (38 weeks ago) to its chillers (11).
  const slab = photoId("plant-yard-slab.jpg");
  const chillers = photoId("chiller-row.jpg");
  if (slab && chillers) {
    const items: StoryItemInput[] = [
      { kind: "pair", area: "Plant yard", beforeMediaId: slab, afterMediaId: chillers, caption: "From a bare slab to five chillers (four duty, one spare)." },
    ];
    for (const [name, caption] of [
      ["fuel-tank.jpg", "The bulk fuel tank beside the yard, on its bund."],
      ["generator-hall.jpg", "The generators the fuel serves, in the energy centre."],
    ] as const) {
      const id = photoId(name);
      if (id) items.push({ kind: "photo", mediaId: id, caption });
    }
    const { stories } = servicesAt(today.minus({ weeks: 9 }).set({ hour: 11 }));
    const story = await stories.create(projectSlug, { title: "The plant yard, then and now", intro: "Seven months of the plant yard: the slab, the tank, the generators and the chillers that will cool Hall 2A and HD-1.", audience: "public", items }, marketing);
    await stories.submit(story.id, marketing);
    await stories.approve(story.id, lead);
    await stories.publish(story.id, lead).catch(() => undefined);
    created.push("photo story “The plant yard, then and now”");
  }
  return { created };
}
