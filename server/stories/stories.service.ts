import type { Knex } from "knex";
import { EDITED_AFTER_APPROVAL, editNeedsApproval, heldBackFields, publicationInstant, slugFromTitle, stepComment, stepFields } from "#shared/domain/publishing-workflow.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { PostStatus, PublishingProblem, ScheduleInput, WorkflowAction, WorkflowResult } from "#shared/schemas/posts.ts";
import type {
  PublishingEvent,
  StoryCreateInput,
  StoryDetail,
  StoryItem,
  StoryItemInput,
  StoryPatchInput,
  StoryRedirect,
  StoryRevisionDiff,
  StoryRevisionSummary,
  StorySummary,
} from "#shared/schemas/stories.ts";
import { AppError, forbidden, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { photoProblems, publishingBlocked, type MediaForContent, type PhotoUse } from "../posts/posts.checks.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { checkStep, diffRevisions, revisionSummary, scheduleInstant, viewerOf, workflowSteps, type PublishingService } from "../publishing/publishing.service.ts";
import {
  claimDueStories,
  findRedirect,
  findRevision,
  findStoryById,
  findVisibleStoryBySlug,
  freeSlug,
  insertRevision,
  insertStory,
  itemsOf,
  listPublicStoryAddresses,
  listRevisions,
  listStories,
  moveSlug,
  replaceItems,
  updateStory,
  type StoryRecord,
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

const iso = (d: Date | null) => (d ? d.toISOString() : null);

const isDuplicate = (err: unknown) => (err as { code?: string })?.code === "ER_DUP_ENTRY";

const slugTaken = (slug: string) =>
  new AppError("slug_taken", `The address “${slug}” is already used by another photo story in this project.`, 409, { slug: "is already used by another photo story in this project" });

export function createStoriesService(deps: { db: Db; projects: ProjectsService; media: MediaForContent; publishing: PublishingService; onChange?: () => void }) {
  const { db, projects, media, publishing } = deps;
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
    publishedAt: iso(r.publishedAt),
    scheduledFor: iso(r.scheduledFor),
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
      detail.revisions = (await listRevisions(db, story.id)).map(revisionSummary);
      detail.problems = await problemsOf(project, story, items);
    }
    return detail;
  }

  async function lockedStory(trx: Trx, id: number): Promise<StoryRecord> {
    const story = await findStoryById(trx, id, { forUpdate: true });
    if (!story) throw notFound("That photo story");
    return story;
  }

  /** A free address for a new story: the wanted one, or with -2, -3 … when it was made from the title. */
  async function freeSlugFor(projectId: number, wanted: string, explicit: boolean): Promise<string> {
    const slug = await freeSlug(db, projectId, wanted, explicit);
    if (!slug) throw slugTaken(wanted);
    return slug;
  }

  /** The changes that publish a story at `at`, with its photos opened to its audience. */
  async function publishIn(trx: Trx, story: StoryRecord, items: readonly StoryItemInput[], at: Date): Promise<StoryUpdate> {
    await media.setUsages("story", story.id, mediaIdsOf(items), story.audience, true, trx);
    return { status: "published", publishedAt: story.publishedAt ?? at, scheduledFor: null, withdrawnAt: null, reviewComment: null };
  }

  async function transition(id: number, action: WorkflowAction, actor: Actor, extra: { comment?: string; at?: ScheduleInput["at"] } = {}): Promise<WorkflowResult> {
    const user = actor.user;
    if (!user) throw new AppError("unauthenticated", "Sign in first.", 401);
    const result = await db.transaction(async (trx) => {
      const story = await lockedStory(trx, id);
      const project = await projects.getById(story.projectId);
      const to = checkStep(action, story, user);
      const items = (await itemsOf(trx, [story.id])).get(story.id) ?? [];
      const at = now();
      // The same checks at scheduling as at publication (and again when the time comes).
      if (to === "published" || to === "scheduled") {
        const problems = await problemsOf(project, story, items);
        if (problems.length) throw publishingBlocked(problems);
      }
      const when = action === "schedule" ? scheduleInstant(project, extra.at, at) : undefined;
      const changes: StoryUpdate = action === "publish" ? await publishIn(trx, story, items, at) : { status: to, ...stepFields(action, story.status, { at, when, comment: extra.comment }) };
      if (action === "withdraw" && story.status === "published") await media.setUsages("story", story.id, mediaIdsOf(items), story.audience, false, trx);
      await updateStory(trx, story.id, changes, at);
      await publishing.record(trx, { ownerType: "story", ownerId: story.id, action, from: story.status, to, actorId: user.id, actorName: user.name, comment: stepComment(action, { when, comment: extra.comment }), at });
      const answer: WorkflowResult = { id: story.id, status: to };
      // The schedule is named when one is set or cancelled.
      if (to === "scheduled") answer.scheduledFor = iso(changes.scheduledFor ?? story.scheduledFor);
      else if (story.status === "scheduled") answer.scheduledFor = null;
      return answer;
    });
    changed();
    return result;
  }

  async function writeRevision(trx: Trx, storyId: number, actor: Actor, note: string | null, at: Date): Promise<number> {
    const story = (await findStoryById(trx, storyId))!;
    const items = (await itemsOf(trx, [storyId])).get(storyId) ?? [];
    return insertRevision(trx, storyId, {
      title: story.title,
      intro: story.intro,
      slug: story.slug,
      audience: story.audience,
      status: story.status,
      items,
      note,
      authorId: actor.user?.id ?? null,
      authorName: actor.user?.name ?? "Plumbline",
      at,
    });
  }

  /**
   * The shared path of PATCH and restore: the same rules as updates (marketing's edit of an
   * approved or scheduled story needs approval again; a published one is changed by a lead or
   * admin only, after the checks pass again), and a new revision.
   */
  async function saveChanges(id: number, input: Omit<StoryPatchInput, "note"> & { note?: string | null }, actor: Actor): Promise<StoryDetail> {
    const user = actor.user!;
    const approver = user.role === "lead" || user.role === "admin";
    await db.transaction(async (trx) => {
      const story = await lockedStory(trx, id);
      const project = await projects.getById(story.projectId);
      if (input.version !== undefined && input.version !== story.version) {
        throw new AppError("conflict", "Someone else changed this photo story since you opened it. Reload to see their changes.", 409, undefined, { current: await detailOf(project, story, actor) });
      }
      if (story.status === "published" && !approver) throw forbidden("A published photo story is changed by a lead or an admin.");
      const items = input.items ?? (await itemsOf(trx, [story.id])).get(story.id) ?? [];
      if (input.items) await checkReferences(project, input.items);
      if (input.slug && input.slug !== story.slug && !(await moveSlug(trx, story, input.slug))) throw slugTaken(input.slug);
      const audience = input.audience ?? story.audience;
      const at = now();
      const changes: StoryUpdate = { title: input.title, intro: input.intro, audience: input.audience, slug: input.slug };
      const demoted = editNeedsApproval(story.status, user.role);
      if (demoted) {
        changes.status = "draft";
        changes.scheduledFor = null;
      }
      const published = (changes.status ?? story.status) === "published";
      if (published) {
        const problems = await problemsOf(project, { audience }, items);
        if (problems.length) throw publishingBlocked(problems);
      }
      if (input.items) await replaceItems(trx, story.id, input.items);
      await media.setUsages("story", story.id, mediaIdsOf(items), audience, published, trx);
      try {
        await updateStory(trx, story.id, changes, at);
      } catch (err) {
        if (isDuplicate(err) && input.slug) throw slugTaken(input.slug);
        throw err;
      }
      if (demoted) {
        await publishing.record(trx, { ownerType: "story", ownerId: story.id, action: "edited", from: story.status, to: "draft", actorId: user.id, actorName: user.name, comment: EDITED_AFTER_APPROVAL, at });
      }
      await writeRevision(trx, story.id, actor, input.note ?? null, at);
    });
    changed();
    const story = (await findStoryById(db, id))!;
    return detailOf(await projects.getById(story.projectId), story, actor);
  }

  async function existing(id: number): Promise<StoryRecord> {
    const story = await findStoryById(db, id);
    if (!story) throw notFound("That photo story");
    return story;
  }

  return {
    async list(slug: string, actor: Actor): Promise<StorySummary[]> {
      const project = await projects.get(slug);
      return summaries(await listStories(db, project.id, viewerOf(actor)));
    },

    /** A story by its address, or where it moved to; 404 when the caller may not read it. */
    async getBySlug(slug: string, storySlug: string, actor: Actor): Promise<StoryDetail | StoryRedirect> {
      const project = await projects.get(slug);
      const viewer = viewerOf(actor);
      const story = await findVisibleStoryBySlug(db, project.id, storySlug, viewer);
      if (story) return detailOf(project, story, actor);
      const moved = await findRedirect(db, project.id, storySlug, viewer);
      if (moved) return { redirectTo: moved };
      throw notFound("That photo story");
    },

    async getById(id: number, actor: Actor): Promise<StoryDetail> {
      const story = await existing(id);
      return detailOf(await projects.getById(story.projectId), story, actor);
    },

    async create(slug: string, input: StoryCreateInput, actor: Actor): Promise<{ id: number; slug: string; status: PostStatus }> {
      const project = await projects.get(slug);
      await checkReferences(project, input.items);
      const storySlug = await freeSlugFor(project.id, input.slug ?? slugFromTitle(input.title), input.slug !== undefined);
      const at = now();
      const id = await db
        .transaction(async (trx) => {
          const id = await insertStory(trx, { projectId: project.id, slug: storySlug, title: input.title, intro: input.intro, audience: input.audience, authorId: actor.user!.id, authorName: actor.user!.name, at });
          await replaceItems(trx, id, input.items);
          await media.setUsages("story", id, mediaIdsOf(input.items), input.audience, false, trx);
          await writeRevision(trx, id, actor, "Created", at);
          return id;
        })
        .catch((err: unknown) => {
          if (isDuplicate(err)) throw slugTaken(storySlug);
          throw err;
        });
      changed();
      return { id, slug: storySlug, status: "draft" };
    },

    /** Changes a story; `items` replaces the list. Every save keeps a revision. */
    patch: (id: number, input: StoryPatchInput, actor: Actor) => saveChanges(id, input, actor),

    async revisions(id: number): Promise<StoryRevisionSummary[]> {
      await existing(id);
      return (await listRevisions(db, id)).map(revisionSummary);
    },

    /** A word diff of the story's text in revision `against` (default: the one before) → revision `n`. */
    async diff(id: number, n: number, against?: number): Promise<StoryRevisionDiff> {
      await existing(id);
      return diffRevisions((k: number) => findRevision(db, id, k), storyTextOf, n, against);
    },

    /** Brings back a revision's title, introduction and items as a new revision; the address and audience stay. */
    async restore(id: number, n: number, actor: Actor): Promise<StoryDetail> {
      await existing(id);
      const rev = await findRevision(db, id, n);
      if (!rev) throw notFound("That revision");
      return saveChanges(id, { title: rev.title, intro: rev.intro, items: rev.items, note: `Restored revision ${n}` }, actor);
    },

    async history(id: number): Promise<PublishingEvent[]> {
      await existing(id);
      return publishing.history("story", id);
    },

    ...workflowSteps(transition),

    /**
     * Publishes every scheduled story that is due at `at`. Each is claimed with SKIP LOCKED, so
     * several processes share the work and none publishes a story twice. The checks run again:
     * a story that now fails them goes back to approved with the reason recorded.
     */
    async publishDue(at: Date = now()): Promise<{ published: number[]; heldBack: number[] }> {
      const result = await publishing.publishDue("story", at, {
        claim: (trx, limit) => claimDueStories(trx, at, limit),
        async publishOrHoldBack(trx, id) {
          const story = (await findStoryById(trx, id))!;
          const project = await projects.getById(story.projectId);
          const items = (await itemsOf(trx, [id])).get(id) ?? [];
          const problems = await problemsOf(project, story, items);
          const changes = problems.length ? heldBackFields(problems) : await publishIn(trx, story, items, publicationInstant(story.scheduledFor, at));
          await updateStory(trx, id, changes, at);
          return problems;
        },
      });
      if (result.published.length || result.heldBack.length) changed();
      return result;
    },

    publicAddresses: () => listPublicStoryAddresses(db),

    /** A published public story for link previews (Open Graph). */
    async previewOf(slug: string, storySlug: string): Promise<{ story: StorySummary; project: Project } | null> {
      const project = await projects.get(slug).catch(() => null);
      if (!project) return null;
      const story = await findVisibleStoryBySlug(db, project.id, storySlug, "public");
      return story ? { story: (await summaries([story]))[0]!, project } : null;
    },

    /** Where a public story's old page address now leads (the current slug), or null. */
    async pageRedirectOf(slug: string, storySlug: string): Promise<string | null> {
      const project = await projects.get(slug).catch(() => null);
      if (!project) return null;
      if (await findVisibleStoryBySlug(db, project.id, storySlug, "public")) return null;
      return findRedirect(db, project.id, storySlug, "public");
    },
  };
}

export type StoriesService = ReturnType<typeof createStoriesService>;
