import type { Knex } from "knex";
import { slugFromTitle } from "#shared/domain/publishing-workflow.ts";
import type { Viewer } from "#shared/domain/audience.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { PostStatus, PublishingProblem } from "#shared/schemas/publishing.ts";
import type { StoryCreateInput, StoryDetail, StoryItem, StoryItemInput, StoryPatchInput, StorySummary } from "#shared/schemas/stories.ts";
import { AppError } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { photoProblems, publishingBlocked, type MediaForContent, type PhotoUse } from "../publishing/publishing.checks.ts";
import { viewerOf, workflowSummaryOf, type PublishingService } from "../publishing/publishing.service.ts";
import {
  STORIES_TABLE,
  findStoryById,
  findVisibleStoryBySlug,
  insertStory,
  itemsOf,
  listPublicStoryAddresses,
  listStories,
  replaceItems,
  storyRevisionColumns,
  storyRevisionContent,
  updateStory,
  type StoryRecord,
  type StoryRevisionContent,
  type StoryUpdate,
} from "./stories.repository.ts";

type Trx = Knex.Transaction;

const mediaIdsOf = (items: readonly StoryItemInput[]) => [...new Set(items.flatMap((i) => (i.kind === "photo" ? [i.mediaId] : [i.beforeMediaId, i.afterMediaId])))];

function usesOf(items: readonly StoryItemInput[]): PhotoUse[] {
  return items.flatMap((item, i): PhotoUse[] =>
    item.kind === "photo"
      ? [{ mediaId: item.mediaId, where: `Item ${i + 1}` }]
      : [
          { mediaId: item.beforeMediaId, where: `Item ${i + 1} (the “then” photo)` },
          { mediaId: item.afterMediaId, where: `Item ${i + 1} (the “now” photo)` },
        ],
  );
}

/** The calendar date a photo was taken on, from its camera time (`YYYY-MM-DDTHH:mm:ss…`). */
const takenOn = (p: MediaPicture | undefined) => (p?.takenAt ? p.takenAt.slice(0, 10) : null);

/**
 * A then-and-now pair must show change over time: both photos need a capture time, on
 * different dates, the "then" photo the earlier.
 */
function pairProblems(items: readonly StoryItemInput[], pictures: ReadonlyMap<number, MediaPicture>): PublishingProblem[] {
  const problems: PublishingProblem[] = [];
  items.forEach((item, i) => {
    if (item.kind !== "pair") return;
    const before = takenOn(pictures.get(item.beforeMediaId));
    const after = takenOn(pictures.get(item.afterMediaId));
    const where = `Item ${i + 1} (then-and-now of ${item.area})`;
    if (!before || !after) {
      const missing = [!before ? `#${item.beforeMediaId}` : null, !after ? `#${item.afterMediaId}` : null].filter(Boolean).join(" and ");
      problems.push({ code: "pair_dates", mediaId: !before ? item.beforeMediaId : item.afterMediaId, message: `${where}: photo ${missing} carries no capture time, so the dates cannot be shown.` });
    } else if (before === after) {
      problems.push({ code: "pair_dates", mediaId: item.afterMediaId, message: `${where}: both photos were taken on ${before}; choose two taken on different dates.` });
    } else if (before > after) {
      problems.push({ code: "pair_dates", mediaId: item.beforeMediaId, message: `${where}: the “then” photo (${before}) is later than the “now” photo (${after}); swap them.` });
    }
  });
  return problems;
}

/**
 * The story's text as a reader meets it, for comparing revisions: the title, the introduction,
 * then a line per item in order (a pair named by its area) with its caption.
 */
export function storyTextOf(story: { title: string; intro: string; items: readonly StoryItemInput[] }): string {
  const lines = story.items.map((item) => {
    const label = item.kind === "photo" ? "Photo" : `Then and now, ${item.area}`;
    return item.caption ? `${label}: ${item.caption}` : label;
  });
  return `${story.title}\n${story.intro}\n\n${lines.join("\n")}`;
}


export function createStoriesService(deps: { db: Db; projects: ProjectsService; media: MediaForContent; publishing: PublishingService; onChange?: () => void }) {
  const { db, projects, media, publishing } = deps;
  const itemsIn = async (q: Db | Trx, id: number) => (await itemsOf(q, [id])).get(id) ?? [];

  /** A photo story as the publishing workflow sees it: its checks, its publication, what a revision keeps. */
  const workflow = publishing.workflowOf<StoryRecord, StoryRevisionContent, StoryDetail>({
    kind: "story",
    table: STORIES_TABLE,
    name: "photo story",
    // Story answers name `scheduledFor` only when a schedule is set or cancelled (decision 013).
    answerSchedule: "when-changed",
    projects,
    find: findStoryById,
    findVisible: findVisibleStoryBySlug,
    detail: detailOf,
    problems: async (trx, project, story) => problemsOf(project, story, await itemsIn(trx, story.id)),
    publish: async (trx, _project, story, at) => publishIn(trx, story, await itemsIn(trx, story.id), at),
    unpublish: async (trx, story) => media.setUsages("story", story.id, mediaIdsOf(await itemsIn(trx, story.id)), story.audience, false, trx),
    update: updateStory,
    snapshot: async (trx, story) => ({ intro: story.intro, items: await itemsIn(trx, story.id) }),
    revisionColumns: storyRevisionColumns,
    revisionContent: storyRevisionContent,
    revisionText: storyTextOf,
    // Restoring brings back the title, introduction and items; the address and audience stay.
    restore: (id, rev, note, actor) => saveChanges(id, { title: rev.title, intro: rev.intro, items: rev.items, note }, actor),
    onChange: deps.onChange,
  });

  async function problemsOf(project: Project, story: { audience: Audience }, items: readonly StoryItemInput[]): Promise<PublishingProblem[]> {
    if (!items.length) return [{ code: "no_items", message: "Add at least one photo or then-and-now pair." }];
    const problems = await photoProblems(media, project.id, usesOf(items), story.audience);
    problems.push(...pairProblems(items, await media.pictureFor(mediaIdsOf(items))));
    return problems;
  }

  async function checkReferences(project: Project, items: readonly StoryItemInput[]) {
    const ids = mediaIdsOf(items);
    if (!ids.length) return;
    const unknown = (await media.describeForPublishing(ids)).filter((d) => !d.exists || d.projectId !== project.id).map((d) => `#${d.id}`);
    if (unknown.length) throw new AppError("invalid_story", `Check items: photo ${unknown.join(", ")} is not in this project's media library.`, 422, { items: `photo ${unknown.join(", ")} is not in this project's media library` });
  }

  function present(items: readonly StoryItemInput[], pictures: ReadonlyMap<number, MediaPicture>, staff: boolean): StoryItem[] {
    const pic = (id: number) => pictures.get(id) ?? null;
    const out: StoryItem[] = [];
    for (const item of items) {
      if (item.kind === "photo") {
        const media = pic(item.mediaId);
        if (media || staff) out.push({ kind: "photo", mediaId: item.mediaId, media, caption: item.caption });
      } else {
        const before = pic(item.beforeMediaId);
        const after = pic(item.afterMediaId);
        if ((before && after) || staff) out.push({ kind: "pair", area: item.area, beforeMediaId: item.beforeMediaId, afterMediaId: item.afterMediaId, before, after, caption: item.caption });
      }
    }
    return out;
  }

  /** The story's hero: its first photo (a pair's "now" photo). */
  const coverIdOf = (items: readonly StoryItemInput[]) => {
    const first = items[0];
    return first ? (first.kind === "photo" ? first.mediaId : first.afterMediaId) : null;
  };

  /** Summaries for a reader: a cover their browser can no longer load is left out (decision 070). */
  async function summaries(rows: readonly StoryRecord[], viewer: Viewer): Promise<StorySummary[]> {
    const items = await itemsOf(db, rows.map((r) => r.id));
    const covers = rows.map((r) => coverIdOf(items.get(r.id) ?? [])).filter((id): id is number => id !== null);
    const pictures = await media.loadableBy(viewer, covers);
    return rows.map((r) => {
      const list = items.get(r.id) ?? [];
      const coverId = coverIdOf(list);
      return summaryOf(r, list.length, coverId ? (pictures.get(coverId) ?? null) : null);
    });
  }

  const summaryOf = (r: StoryRecord, itemCount: number, cover: MediaPicture | null): StorySummary => ({ ...workflowSummaryOf(r), intro: r.intro, cover, itemCount });

  async function detailOf(project: Project, story: StoryRecord, actor: Actor): Promise<StoryDetail> {
    const viewer = viewerOf(actor);
    const staff = viewer === "staff";
    const items = (await itemsOf(db, [story.id])).get(story.id) ?? [];
    // Readers outside staff are not shown a photo withdrawn since publication, nor its item (decision 070).
    const pictures = await media.loadableBy(viewer, mediaIdsOf(items));
    const coverId = coverIdOf(items);
    const detail: StoryDetail = {
      ...summaryOf(story, items.length, coverId ? (pictures.get(coverId) ?? null) : null),
      projectSlug: project.slug,
      items: present(items, pictures, staff),
    };
    if (staff) {
      detail.version = story.version;
      detail.reviewComment = story.reviewComment;
      detail.revisions = await workflow.revisionList(story.id);
      detail.problems = await problemsOf(project, story, items);
    }
    return detail;
  }

  /** The changes that publish a story at `at`, with its photos opened to its audience. */
  async function publishIn(trx: Trx, story: StoryRecord, items: readonly StoryItemInput[], at: Date): Promise<StoryUpdate> {
    await media.setUsages("story", story.id, mediaIdsOf(items), story.audience, true, trx);
    return { status: "published", publishedAt: story.publishedAt ?? at, scheduledFor: null, withdrawnAt: null, reviewComment: null };
  }

  /**
   * The shared path of PATCH and restore: the same rules as updates (marketing's edit of an
   * approved or scheduled story needs approval again; a published one is changed by a lead or
   * admin only, after the checks pass again), and a new revision.
   */
  async function saveChanges(id: number, input: Omit<StoryPatchInput, "note"> & { note?: string | null }, actor: Actor): Promise<StoryDetail> {
    await db.transaction(async (trx) => {
      const story = await workflow.openForEdit(trx, id, input.version, actor, (s) => workflow.detailOf(s, actor));
      const project = await projects.getById(story.projectId);
      const items = input.items ?? (await itemsIn(trx, story.id));
      if (input.items) await checkReferences(project, input.items);
      if (input.slug) await workflow.moveSlug(trx, story, input.slug);
      const audience = input.audience ?? story.audience;
      const at = projects.now();
      const demoted = workflow.demotion(story, actor);
      const changes: StoryUpdate = { title: input.title, intro: input.intro, audience: input.audience, slug: input.slug, ...demoted };
      const published = (changes.status ?? story.status) === "published";
      if (published) {
        const problems = await problemsOf(project, { audience }, items);
        if (problems.length) throw publishingBlocked(problems);
      }
      if (input.items) await replaceItems(trx, story.id, input.items);
      await media.setUsages("story", story.id, mediaIdsOf(items), audience, published, trx);
      await workflow.withUniqueSlug(input.slug, () => updateStory(trx, story.id, changes, at));
      if (demoted) await workflow.recordDemotion(trx, story, actor, at);
      await workflow.writeRevision(trx, story.id, actor, input.note ?? null, at);
    });
    workflow.changed();
    const story = (await findStoryById(db, id))!;
    return workflow.detailOf(story, actor);
  }

  return {
    async list(slug: string, actor: Actor): Promise<StorySummary[]> {
      const project = await projects.get(slug);
      const viewer = viewerOf(actor);
      return summaries(await listStories(db, project.id, viewer), viewer);
    },

    async create(slug: string, input: StoryCreateInput, actor: Actor): Promise<{ id: number; slug: string; status: PostStatus }> {
      const project = await projects.get(slug);
      await checkReferences(project, input.items);
      return workflow.create(project.id, input.slug ?? slugFromTitle(input.title), input.slug !== undefined, actor, async (trx, storySlug, at) => {
        const id = await insertStory(trx, { projectId: project.id, slug: storySlug, title: input.title, intro: input.intro, audience: input.audience, authorId: actor.user!.id, authorName: actor.user!.name, at });
        await replaceItems(trx, id, input.items);
        await media.setUsages("story", id, mediaIdsOf(input.items), input.audience, false, trx);
        return id;
      });
    },

    /** Changes a story; `items` replaces the list. Every save keeps a revision. */
    patch: (id: number, input: StoryPatchInput, actor: Actor) => saveChanges(id, input, actor),

    /** The workflow steps, revisions (diff, restore), history and the scheduler's pass, as every kind has them. */
    ...workflow.steps,

    publicAddresses: () => listPublicStoryAddresses(db),

    /**
     * One revision of a story as an outside reviewer reads it (server/review-links), with the
     * photos `pictures` gives for its ids (an item whose photo it leaves out keeps its place,
     * without the photo); null when gone.
     */
    async reviewCopy(id: number, n: number | "latest", pictures: (ids: number[]) => Promise<Map<number, MediaPicture>>) {
      const found = await workflow.steps.revisionOf(id, n);
      if (!found) return null;
      const { item, revision, latest } = found;
      const project = await projects.getById(item.projectId);
      const shown = await pictures(mediaIdsOf(revision.items));
      return { item, project, number: revision.number, latest, title: revision.title, audience: revision.audience, intro: revision.intro, items: present(revision.items, shown, true) };
    },

    /** A published public story for link previews (Open Graph). */
    async previewOf(slug: string, storySlug: string): Promise<{ story: StorySummary; project: Project } | null> {
      const project = await projects.get(slug).catch(() => null);
      if (!project) return null;
      const story = await findVisibleStoryBySlug(db, project.id, storySlug, "public");
      return story ? { story: (await summaries([story], "public"))[0]!, project } : null;
    },

    /** Where a public story's old page address now leads (the current slug), or null. */
    async pageRedirectOf(slug: string, storySlug: string): Promise<string | null> {
      const project = await projects.get(slug).catch(() => null);
      if (!project) return null;
      if (await findVisibleStoryBySlug(db, project.id, storySlug, "public")) return null;
      return workflow.findRedirect(project.id, storySlug, "public");
    },

    /**
     * A story's photos in reading order (a pair's "then" before its "now"), for press kits: by id
     * for staff (any state), by address for visitors (published public stories only). Null when
     * the project has no such story this reader may see.
     */
    async photosOf(projectId: number, story: { id: number } | { slug: string; viewer: Viewer }): Promise<{ id: number; slug: string; title: string; mediaIds: number[] } | null> {
      const record = "id" in story ? await findStoryById(db, story.id) : await findVisibleStoryBySlug(db, projectId, story.slug, story.viewer);
      if (!record || record.projectId !== projectId) return null;
      return { id: record.id, slug: record.slug, title: record.title, mediaIds: mediaIdsOf(await itemsIn(db, record.id)) };
    },
  };
}

export type StoriesService = ReturnType<typeof createStoriesService>;
