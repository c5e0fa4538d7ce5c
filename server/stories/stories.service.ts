import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { workflowStep, type PostStatus, type PublishingProblem, type WorkflowAction } from "#shared/schemas/posts.ts";
import type { StoryCreateInput, StoryDetail, StoryItem, StoryItemInput, StoryPatchInput, StorySummary } from "#shared/schemas/stories.ts";
import { AppError, forbidden, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { photoProblems, publishingBlocked, type MediaForContent, type PhotoUse } from "../posts/posts.checks.ts";
import { slugFromTitle, viewerOf } from "../posts/posts.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import {
  findStoryById,
  findVisibleStoryBySlug,
  insertStory,
  insertStoryEvent,
  itemsOf,
  listPublicStoryAddresses,
  listStories,
  replaceItems,
  storySlugTaken,
  updateStory,
  type StoryRecord,
  type StoryUpdate,
} from "./stories.repository.ts";

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

const slugTaken = (slug: string) =>
  new AppError("slug_taken", `The address “${slug}” is already used by another photo story in this project.`, 409, { slug: "is already used by another photo story in this project" });

export function createStoriesService(deps: { db: Db; projects: ProjectsService; media: MediaForContent; onChange?: () => void }) {
  const { db, projects, media } = deps;
  const now = () => projects.now();
  const changed = () => deps.onChange?.();

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

  async function summaries(rows: readonly StoryRecord[]): Promise<StorySummary[]> {
    const items = await itemsOf(db, rows.map((r) => r.id));
    const covers = rows.map((r) => coverIdOf(items.get(r.id) ?? [])).filter((id): id is number => id !== null);
    const pictures = await media.pictureFor(covers);
    return rows.map((r) => {
      const list = items.get(r.id) ?? [];
      const coverId = coverIdOf(list);
      return summaryOf(r, list.length, coverId ? (pictures.get(coverId) ?? null) : null);
    });
  }

  const summaryOf = (r: StoryRecord, itemCount: number, cover: MediaPicture | null): StorySummary => ({
    id: r.id,
    slug: r.slug,
    title: r.title,
    intro: r.intro,
    audience: r.audience,
    status: r.status,
    publishedAt: r.publishedAt?.toISOString() ?? null,
    cover,
    itemCount,
    authorName: r.authorName,
    updatedAt: r.updatedAt.toISOString(),
  });

  async function detailOf(project: Project, story: StoryRecord, actor: Actor): Promise<StoryDetail> {
    const staff = viewerOf(actor) === "staff";
    const items = (await itemsOf(db, [story.id])).get(story.id) ?? [];
    const pictures = await media.pictureFor(mediaIdsOf(items));
    const coverId = coverIdOf(items);
    const detail: StoryDetail = {
      ...summaryOf(story, items.length, coverId ? (pictures.get(coverId) ?? null) : null),
      projectSlug: project.slug,
      items: present(items, pictures, staff),
    };
    if (staff) {
      detail.version = story.version;
      detail.reviewComment = story.reviewComment;
      detail.problems = await problemsOf(project, story, items);
    }
    return detail;
  }

  async function transition(id: number, action: WorkflowAction, actor: Actor, comment?: string): Promise<{ id: number; status: PostStatus }> {
    const user = actor.user;
    if (!user) throw new AppError("unauthenticated", "Sign in first.", 401);
    const result = await db.transaction(async (trx) => {
      const story = await findStoryById(trx, id, { forUpdate: true });
      if (!story) throw notFound("That photo story");
      const project = await projects.getById(story.projectId);
      const step = workflowStep(action, story.status, user.role, story.authorId === user.id);
      if (!step.ok) throw step.reason === "role" ? forbidden(step.message) : new AppError("invalid_transition", step.message, 409);
      const items = (await itemsOf(trx, [story.id])).get(story.id) ?? [];
      const at = now();
      const changes: StoryUpdate = { status: step.to };
      if (step.to === "published") {
        const problems = await problemsOf(project, story, items);
        if (problems.length) throw publishingBlocked(problems);
        changes.publishedAt = story.publishedAt ?? at;
        changes.withdrawnAt = null;
        changes.reviewComment = null;
      }
      if (action === "return") changes.reviewComment = comment ?? null;
      if (action === "approve") changes.reviewComment = null;
      if (step.to === "withdrawn") changes.withdrawnAt = at;
      await media.setUsages("story", story.id, mediaIdsOf(items), story.audience, step.to === "published", trx);
      await updateStory(trx, story.id, changes, at);
      await insertStoryEvent(trx, { storyId: story.id, action, from: story.status, to: step.to, actorId: user.id, actorName: user.name, comment: comment ?? null, at });
      return { id: story.id, status: step.to };
    });
    changed();
    return result;
  }

  return {
    async list(slug: string, actor: Actor): Promise<StorySummary[]> {
      const project = await projects.get(slug);
      return summaries(await listStories(db, project.id, viewerOf(actor)));
    },

    async getBySlug(slug: string, storySlug: string, actor: Actor): Promise<StoryDetail> {
      const project = await projects.get(slug);
      const story = await findVisibleStoryBySlug(db, project.id, storySlug, viewerOf(actor));
      if (!story) throw notFound("That photo story");
      return detailOf(project, story, actor);
    },

    async getById(id: number, actor: Actor): Promise<StoryDetail> {
      const story = await findStoryById(db, id);
      if (!story) throw notFound("That photo story");
      return detailOf(await projects.getById(story.projectId), story, actor);
    },

    async create(slug: string, input: StoryCreateInput, actor: Actor): Promise<{ id: number; slug: string; status: PostStatus }> {
      const project = await projects.get(slug);
      await checkReferences(project, input.items);
      let storySlug = input.slug ?? slugFromTitle(input.title);
      if (await storySlugTaken(db, project.id, storySlug)) {
        if (input.slug) throw slugTaken(storySlug);
        const base = storySlug.slice(0, 112);
        let n = 2;
        while (await storySlugTaken(db, project.id, `${base}-${n}`)) n++;
        storySlug = `${base}-${n}`;
      }
      const at = now();
      const id = await db
        .transaction(async (trx) => {
          const id = await insertStory(trx, { projectId: project.id, slug: storySlug, title: input.title, intro: input.intro, audience: input.audience, authorId: actor.user!.id, authorName: actor.user!.name, at });
          await replaceItems(trx, id, input.items);
          await media.setUsages("story", id, mediaIdsOf(input.items), input.audience, false, trx);
          return id;
        })
        .catch((err: unknown) => {
          if ((err as { code?: string })?.code === "ER_DUP_ENTRY") throw slugTaken(storySlug);
          throw err;
        });
      changed();
      return { id, slug: storySlug, status: "draft" };
    },

    /**
     * Changes a story; `items` replaces the list. The same rules as updates: marketing's edit of
     * an approved story needs approval again, and a published one is changed by a lead or admin
     * only, after the checks pass again.
     */
    async patch(id: number, input: StoryPatchInput, actor: Actor): Promise<StoryDetail> {
      const user = actor.user!;
      const approver = user.role === "lead" || user.role === "admin";
      await db.transaction(async (trx) => {
        const story = await findStoryById(trx, id, { forUpdate: true });
        if (!story) throw notFound("That photo story");
        const project = await projects.getById(story.projectId);
        if (input.version !== undefined && input.version !== story.version) {
          throw new AppError("conflict", "Someone else changed this photo story since you opened it. Reload to see their changes.", 409, undefined, { current: await detailOf(project, story, actor) });
        }
        if (story.status === "published" && !approver) throw forbidden("A published photo story is changed by a lead or an admin.");
        const items = input.items ?? (await itemsOf(trx, [story.id])).get(story.id) ?? [];
        if (input.items) await checkReferences(project, input.items);
        if (input.slug && input.slug !== story.slug && (await storySlugTaken(trx, project.id, input.slug, story.id))) throw slugTaken(input.slug);
        const audience = input.audience ?? story.audience;
        const changes: StoryUpdate = { title: input.title, intro: input.intro, audience: input.audience, slug: input.slug };
        if (!approver && story.status === "approved") changes.status = "draft";
        const published = (changes.status ?? story.status) === "published";
        if (published) {
          const problems = await problemsOf(project, { audience }, items);
          if (problems.length) throw publishingBlocked(problems);
        }
        if (input.items) await replaceItems(trx, story.id, input.items);
        await media.setUsages("story", story.id, mediaIdsOf(items), audience, published, trx);
        await updateStory(trx, story.id, changes, now());
      });
      changed();
      return this.getById(id, actor);
    },

    submit: (id: number, actor: Actor) => transition(id, "submit", actor),
    approve: (id: number, actor: Actor) => transition(id, "approve", actor),
    returnToDraft: (id: number, comment: string, actor: Actor) => transition(id, "return", actor, comment),
    publish: (id: number, actor: Actor) => transition(id, "publish", actor),
    withdraw: (id: number, actor: Actor) => transition(id, "withdraw", actor),

    publicAddresses: () => listPublicStoryAddresses(db),

    /** A published public story for link previews (Open Graph). */
    async previewOf(slug: string, storySlug: string): Promise<{ story: StorySummary; project: Project } | null> {
      const project = await projects.get(slug).catch(() => null);
      if (!project) return null;
      const story = await findVisibleStoryBySlug(db, project.id, storySlug, "public");
      return story ? { story: (await summaries([story]))[0]!, project } : null;
    },
  };
}

export type StoriesService = ReturnType<typeof createStoriesService>;
