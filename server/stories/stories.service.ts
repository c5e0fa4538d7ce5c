import type { Knex } from "knex";
import { DateTime } from "luxon";
import { diffText } from "#shared/domain/text-diff.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { workflowStep, type PostStatus, type PublishingProblem, type ScheduleInput, type WorkflowAction, type WorkflowResult } from "#shared/schemas/posts.ts";
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
import { slugFromTitle, viewerOf } from "../posts/posts.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import {
  claimDueStories,
  findRedirect,
  findRevision,
  findStoryById,
  findVisibleStoryBySlug,
  insertRevision,
  insertStory,
  insertStoryEvent,
  itemsOf,
  keepOldSlug,
  listPublicStoryAddresses,
  listRevisions,
  listStories,
  listStoryEvents,
  releaseOldSlug,
  replaceItems,
  slugHolder,
  updateStory,
  type StoryRecord,
  type StoryRevisionRecord,
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
    publishedAt: iso(r.publishedAt),
    scheduledFor: iso(r.scheduledFor),
    cover,
    itemCount,
    authorName: r.authorName,
    updatedAt: r.updatedAt.toISOString(),
  });

  const revisionSummary = (r: StoryRevisionRecord): StoryRevisionSummary => ({
    number: r.number,
    createdAt: r.createdAt.toISOString(),
    authorName: r.authorName,
    title: r.title,
    status: r.status,
    note: r.note,
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

  /** Makes `slug` the story's address, keeping the old one for redirects. */
  async function moveSlug(trx: Trx, story: StoryRecord, slug: string): Promise<void> {
    const holder = await slugHolder(trx, story.projectId, slug);
    if (holder && holder.storyId !== story.id) throw slugTaken(slug);
    if (holder && !holder.current) await releaseOldSlug(trx, story.projectId, slug, story.id);
    await keepOldSlug(trx, story.projectId, story.slug, story.id);
  }

  /** A free address for a new story: the wanted one, or with -2, -3 … when it was made from the title. */
  async function freeSlug(projectId: number, wanted: string, explicit: boolean): Promise<string> {
    if (!(await slugHolder(db, projectId, wanted))) return wanted;
    if (explicit) throw slugTaken(wanted);
    for (let n = 2; n < 1000; n++) {
      const candidate = `${wanted.slice(0, 112)}-${n}`;
      if (!(await slugHolder(db, projectId, candidate))) return candidate;
    }
    throw slugTaken(wanted);
  }

  /** The changes that publish a story at `at`, with its photos opened to its audience. */
  async function publishIn(trx: Trx, story: StoryRecord, items: readonly StoryItemInput[], at: Date): Promise<StoryUpdate> {
    await media.setUsages("story", story.id, mediaIdsOf(items), story.audience, true, trx);
    return { status: "published", publishedAt: story.publishedAt ?? at, scheduledFor: null, withdrawnAt: null, reviewComment: null };
  }

  function instantOf(project: Project, at: ScheduleInput["at"]): Date {
    if (typeof at === "string") return new Date(at);
    const d = DateTime.fromISO(`${at.date}T${at.time}`, { zone: project.timeZone });
    if (!d.isValid) throw new AppError("invalid_schedule", "That date and time do not exist in the project's time zone.", 422, { at: "is not a valid time in the project's time zone" });
    return d.toJSDate();
  }

  async function transition(id: number, action: WorkflowAction, actor: Actor, extra: { comment?: string; at?: ScheduleInput["at"] } = {}): Promise<WorkflowResult> {
    const user = actor.user;
    if (!user) throw new AppError("unauthenticated", "Sign in first.", 401);
    const result = await db.transaction(async (trx) => {
      const story = await lockedStory(trx, id);
      const project = await projects.getById(story.projectId);
      const step = workflowStep(action, story.status, user.role, story.authorId === user.id);
      if (!step.ok) throw step.reason === "role" ? forbidden(step.message) : new AppError("invalid_transition", step.message, 409);
      const items = (await itemsOf(trx, [story.id])).get(story.id) ?? [];
      const at = now();
      let changes: StoryUpdate = { status: step.to };
      // The same checks at scheduling as at publication (and again when the time comes).
      if (step.to === "published" || step.to === "scheduled") {
        const problems = await problemsOf(project, story, items);
        if (problems.length) throw publishingBlocked(problems);
      }
      if (action === "publish") changes = await publishIn(trx, story, items, at);
      if (action === "schedule") {
        if (!extra.at) throw new AppError("invalid_schedule", "Say when to publish.", 422, { at: "is required" });
        const when = instantOf(project, extra.at);
        if (when.getTime() <= at.getTime()) throw new AppError("invalid_schedule", "The publication time must be in the future.", 422, { at: "must be in the future" });
        changes.scheduledFor = when;
        changes.reviewComment = null;
      }
      if (action === "return") changes.reviewComment = extra.comment ?? null;
      if (action === "return" || (action === "withdraw" && story.status === "scheduled")) changes.scheduledFor = null;
      if (action === "approve") changes.reviewComment = null;
      if (action === "withdraw" && story.status === "published") {
        changes.withdrawnAt = at;
        await media.setUsages("story", story.id, mediaIdsOf(items), story.audience, false, trx);
      }
      await updateStory(trx, story.id, changes, at);
      await insertStoryEvent(trx, {
        storyId: story.id,
        action,
        from: story.status,
        to: step.to,
        actorId: user.id,
        actorName: user.name,
        comment: action === "return" ? (extra.comment ?? null) : action === "schedule" ? `for ${changes.scheduledFor!.toISOString()}` : null,
        at,
      });
      const answer: WorkflowResult = { id: story.id, status: step.to };
      // The schedule is named when one is set or cancelled.
      if (step.to === "scheduled") answer.scheduledFor = iso(changes.scheduledFor ?? story.scheduledFor);
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
      if (input.slug && input.slug !== story.slug) await moveSlug(trx, story, input.slug);
      const audience = input.audience ?? story.audience;
      const at = now();
      const changes: StoryUpdate = { title: input.title, intro: input.intro, audience: input.audience, slug: input.slug };
      let demoted = false;
      if (!approver && (story.status === "approved" || story.status === "scheduled")) {
        changes.status = "draft";
        changes.scheduledFor = null;
        demoted = true;
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
        await insertStoryEvent(trx, { storyId: story.id, action: "edited", from: story.status, to: "draft", actorId: user.id, actorName: user.name, comment: "Edited after approval: needs approval again.", at });
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
      const storySlug = await freeSlug(project.id, input.slug ?? slugFromTitle(input.title), input.slug !== undefined);
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
      const to = await findRevision(db, id, n);
      if (!to) throw notFound("That revision");
      const fromNumber = against ?? n - 1;
      const from = fromNumber >= 1 ? await findRevision(db, id, fromNumber) : null;
      if (against !== undefined && !from) throw notFound("The revision to compare against");
      return { from: from?.number ?? 0, to: n, ...diffText(from ? storyTextOf(from) : "", storyTextOf(to)) };
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
      return listStoryEvents(db, id);
    },

    submit: (id: number, actor: Actor) => transition(id, "submit", actor),
    approve: (id: number, actor: Actor) => transition(id, "approve", actor),
    returnToDraft: (id: number, comment: string, actor: Actor) => transition(id, "return", actor, { comment }),
    publish: (id: number, actor: Actor) => transition(id, "publish", actor),
    schedule: (id: number, at: ScheduleInput["at"], actor: Actor) => transition(id, "schedule", actor, { at }),
    withdraw: (id: number, actor: Actor) => transition(id, "withdraw", actor),

    /**
     * Publishes every scheduled story that is due at `at`. Each is claimed with SKIP LOCKED, so
     * several processes share the work and none publishes a story twice. The checks run again:
     * a story that now fails them goes back to approved with the reason recorded.
     */
    async publishDue(at: Date = now()): Promise<{ published: number[]; heldBack: number[] }> {
      const published: number[] = [];
      const heldBack: number[] = [];
      for (let round = 0; round < 100; round++) {
        const claimed = await db.transaction(async (trx) => {
          const ids = await claimDueStories(trx, at, 10);
          for (const id of ids) {
            const story = (await findStoryById(trx, id))!;
            const project = await projects.getById(story.projectId);
            const items = (await itemsOf(trx, [id])).get(id) ?? [];
            const problems = await problemsOf(project, story, items);
            if (problems.length) {
              const reason = `Not published at the scheduled time: ${problems.map((p) => p.message).join(" ")}`;
              await updateStory(trx, id, { status: "approved", scheduledFor: null, reviewComment: reason }, at);
              await insertStoryEvent(trx, { storyId: id, action: "schedule_failed", from: "scheduled", to: "approved", actorId: null, actorName: null, comment: reason, at });
              heldBack.push(id);
            } else {
              const when = story.scheduledFor && story.scheduledFor < at ? story.scheduledFor : at;
              await updateStory(trx, id, await publishIn(trx, story, items, when), at);
              await insertStoryEvent(trx, { storyId: id, action: "publish", from: "scheduled", to: "published", actorId: null, actorName: "scheduler", comment: null, at });
              published.push(id);
            }
          }
          return ids.length;
        });
        if (claimed === 0) break;
      }
      if (published.length || heldBack.length) changed();
      return { published, heldBack };
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
