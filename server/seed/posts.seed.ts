import type { Knex } from "knex";
import { DateTime } from "luxon";
import { z } from "zod";
import type { Viewer } from "#shared/domain/audience.ts";
import { milestoneStatus } from "#shared/domain/programme-health.ts";
import type { MediaItem } from "#shared/schemas/media.ts";
import { PostTagSchema } from "#shared/schemas/posts.ts";
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
import { createAccountsService } from "../users/users.accounts.ts";
import demoUpdates from "./demo-updates.json" with { type: "json" };
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

/** One demo update as `demo-updates.json` writes it (checked when the seed loads it). */
const SeedPostSchema = z.strictObject({
  weeksAgo: z.number().int().min(0),
  title: z.string(),
  summary: z.string(),
  audience: z.enum(["public", "investor"]),
  cover: z.string(),
  inline: z.string().optional(),
  /** Starts of milestone names, linked and shown as blocks. */
  milestones: z.array(z.string()),
  tags: z.array(PostTagSchema),
  /** The text: the inline photo after the first paragraph, the heading after the last. */
  paragraphs: z.array(z.string()).min(1),
  heading: z.string().optional(),
});
type SeedPost = z.infer<typeof SeedPostSchema>;

/** The demo's updates are content, not code: they live in a data file, checked here. */
const DEMO_UPDATES = z.strictObject({ published: z.array(SeedPostSchema), scheduled: SeedPostSchema, inReview: SeedPostSchema }).parse(demoUpdates);
const POSTS = DEMO_UPDATES.published;
const SCHEDULED = DEMO_UPDATES.scheduled;
const IN_REVIEW = DEMO_UPDATES.inReview;

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
  const accounts = createAccountsService({ db });
  const project = await projects.get(projectSlug).catch(() => null);
  if (!project) return { created };
  if (await db("posts").where({ project_id: project.id }).first("id")) return { created };

  const mediaDir = opts.mediaDir ?? seedMediaDir(db);
  const limits = { maxFileBytes: 40 * 1024 * 1024, maxFiles: 20, maxPixels: 100_000_000 };
  const media = createMediaService({ db, storage: createLocalDiskStorage(mediaDir), uploads: createUploadArea(mediaDir), projects, programme: createProgrammeService({ db, projects, accounts }), accounts, limits });
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

  const programme = createProgrammeService({ db, projects, accounts });
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
