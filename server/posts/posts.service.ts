import type { Knex } from "knex";
import type { Viewer } from "#shared/domain/audience.ts";
import { facilityTagProblem, NO_FACILITY, visibleFacilitySubject, visibleFacilityTags, type FacilityForTags, type FacilityTagKind, type FacilityTagSubject } from "#shared/domain/facility-tags.ts";
import { slugFromTitle } from "#shared/domain/publishing-workflow.ts";
import type { Audience } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { Project } from "#shared/schemas/projects.ts";
import {
  POSTS_PAGE_SIZE,
  type MilestoneSnapshot,
  type PostCreateInput,
  type PostDetail,
  type PostListQuery,
  type PostMilestone,
  type PostPatchInput,
  type PostSummary,
  type PostTag,
  type PostTagAnswer,
} from "#shared/schemas/posts.ts";
import type { PostStatus, PublishingProblem } from "#shared/schemas/publishing.ts";
import { imageIdsOf, milestoneBlockIdsOf, walkRichText, type RichTextDoc } from "#shared/schemas/rich-text.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import { photoProblems, publishingBlocked, type MediaForContent, type PhotoUse } from "../publishing/publishing.checks.ts";
import { viewerOf, workflowSummaryOf, type PublishingService } from "../publishing/publishing.service.ts";
import { milestoneProblems } from "./posts.checks.ts";
import {
  POSTS_TABLE,
  captureMilestones,
  findPostById,
  findPublishedPost,
  findVisiblePostBySlug,
  insertPost,
  latestPublicChange,
  listPosts,
  listPublicPostAddresses,
  listPublicPosts,
  listPublishedBetween,
  listPublishedSince,
  listSearchablePosts,
  milestoneLinksOf,
  postRevisionColumns,
  postRevisionContent,
  postsLinkingMilestone,
  replaceMilestoneLinks,
  replacePostMedia,
  replaceTags,
  tagsFor,
  updatePost,
  type MilestoneLinkRecord,
  type PostListRecord,
  type PostRecord,
  type PostRevisionContent,
  type PostUpdate,
  type PublishedPostRecord,
} from "./posts.repository.ts";
import { plainTextOf, renderRichText, withoutPhotos, type MilestoneBlockData, type RenderContext } from "./rich-text.ts";

type Trx = Knex.Transaction;

export type { PublishedPostRecord };

/** What posts need of the programme: the milestones a reader may see (server/programme). */
export interface ProgrammeForPosts {
  list(slug: string, query: Record<string, never>, reader: Viewer): Promise<Milestone[]>;
}

/** Who reads content of an audience: internal content is read by staff. */
const readersOf = (audience: Audience): Viewer => (audience === "internal" ? "staff" : audience);

const snapshotOf = (m: Milestone): MilestoneSnapshot => ({
  status: m.status,
  baselineFinish: m.baselineFinish,
  forecastFinish: m.forecastFinish,
  actualFinish: m.actualFinish,
  percentComplete: m.percentComplete,
});

const sameSnapshot = (a: MilestoneSnapshot, b: MilestoneSnapshot) =>
  a.status === b.status && a.forecastFinish === b.forecastFinish && a.actualFinish === b.actualFinish && a.baselineFinish === b.baselineFinish && Math.round(a.percentComplete) === Math.round(b.percentComplete);


/** The photos of a post, where each is used (for checks that name them). */
function photoUsesOf(post: { coverMediaId: number | null; body: RichTextDoc }): PhotoUse[] {
  const uses: PhotoUse[] = [];
  if (post.coverMediaId) uses.push({ mediaId: post.coverMediaId, where: "The cover" });
  let n = 0;
  walkRichText(post.body, (node) => {
    if (node.type !== "image") return;
    n += 1;
    const attrs = node.attrs as { mediaId: number; alt?: string | null };
    uses.push({ mediaId: Number(attrs.mediaId), where: `Image ${n} in the text`, altOverride: attrs.alt ?? null });
  });
  return uses;
}

const mediaIdsOf = (post: { coverMediaId: number | null; body: RichTextDoc }) => [...new Set([...(post.coverMediaId ? [post.coverMediaId] : []), ...imageIdsOf(post.body)])];

/** Explicit links first, then milestones that only appear as blocks in the text. */
function linksOf(explicit: readonly number[], body: RichTextDoc): Array<{ milestoneId: number; explicit: boolean }> {
  const ids = [...new Set(explicit)];
  const links = ids.map((milestoneId) => ({ milestoneId, explicit: true }));
  for (const id of milestoneBlockIdsOf(body)) if (!ids.includes(id)) links.push({ milestoneId: id, explicit: false });
  return links;
}

export interface PostsDeps {
  db: Db;
  projects: ProjectsService;
  programme: ProgrammeForPosts;
  media: MediaForContent;
  /** The publishing workflow (server/publishing): the steps, revisions, history and schedule. */
  publishing: PublishingService;
  /** The facility's blocks and systems, for block and plant tags (without it, none can be tagged). */
  facility?: FacilityForTags;
  /** Called after every change that readers could see (public caches drop their copies). */
  onChange?: () => void;
}

const FACILITY_KINDS: readonly FacilityTagKind[] = ["block", "plant"];

/** The block and plant tags a reader may see, each with its name; the others left out. Area and system tags as they are. */
function tagsForReader(tags: readonly PostTag[], subjects: readonly FacilityTagSubject[], viewer: Viewer): PostTagAnswer[] {
  const visible = visibleFacilityTags(tags, subjects, viewer);
  return tags.flatMap((t) => {
    if (t.kind !== "block" && t.kind !== "plant") return [t];
    const s = visible.find((x) => x.kind === t.kind && String(x.id) === t.value);
    return s ? [{ ...t, name: s.name }] : [];
  });
}

export function createPostsService(deps: PostsDeps) {
  const { db, projects, programme, media, publishing } = deps;
  const facility = deps.facility ?? NO_FACILITY;
  const now = () => projects.now();

  /** An update as the publishing workflow sees it: its checks, its rendering for publication, what a revision keeps. */
  const workflow = publishing.workflowOf<PostRecord, PostRevisionContent, PostDetail>({
    kind: "post",
    table: POSTS_TABLE,
    name: "update",
    answerSchedule: "always",
    projects,
    find: findPostById,
    findVisible: findVisiblePostBySlug,
    detail: detailOf,
    problems: async (trx, project, post) => problemsOf(project, post, (await milestoneLinksOf(trx, post.id)).map((l) => l.milestoneId)),
    publish: publishIn,
    unpublish: (trx, post) => media.setUsages("post", post.id, mediaIdsOf(post), post.audience, false, trx),
    update: async (trx, id, changes, at) => void (await updatePost(trx, id, null, changes, at)),
    async snapshot(trx, post) {
      const links = await milestoneLinksOf(trx, post.id);
      const tags = (await tagsFor(trx, [post.id])).get(post.id) ?? [];
      return { summary: post.summary, body: post.body, plainText: post.plainText, coverMediaId: post.coverMediaId, milestoneIds: links.filter((l) => l.explicit).map((l) => l.milestoneId), tags };
    },
    revisionColumns: postRevisionColumns,
    revisionContent: postRevisionContent,
    revisionText: (r) => `${r.title}\n${r.summary}\n\n${r.plainText}`,
    // Restoring brings back the content (title, summary, text, cover, milestones, tags); the address and audience stay.
    restore: (id, rev, note, actor) => saveChanges(id, { title: rev.title, summary: rev.summary, body: rev.body, coverMediaId: rev.coverMediaId, milestoneIds: rev.milestoneIds, tags: rev.tags, note }, actor),
    onChange: deps.onChange,
  });

  async function milestonesFor(project: Project, reader: Viewer): Promise<Map<number, Milestone>> {
    return new Map((await programme.list(project.slug, {}, reader)).map((m) => [m.id, m]));
  }

  /** What a milestone block shows: "then" where captured, otherwise today's figures as the audience sees them. */
  function blockData(links: readonly MilestoneLinkRecord[], current: ReadonlyMap<number, Milestone>): Map<number, MilestoneBlockData> {
    const out = new Map<number, MilestoneBlockData>();
    for (const [id, m] of current) out.set(id, { name: m.name, ...snapshotOf(m) });
    for (const l of links) if (l.then && l.name) out.set(l.milestoneId, { name: l.name, ...l.then });
    return out;
  }

  async function renderFor(project: Project, post: { body: RichTextDoc; audience: Audience; coverMediaId: number | null }, links: readonly MilestoneLinkRecord[]) {
    const [pictures, current] = await Promise.all([media.pictureFor(mediaIdsOf(post)), milestonesFor(project, readersOf(post.audience))]);
    const ctx: RenderContext = { pictures, milestones: blockData(links, current) };
    return { html: renderRichText(post.body, ctx), plainText: plainTextOf(post.body, ctx) };
  }

  /** Every reason the post cannot be published for its audience now. */
  async function problemsOf(project: Project, post: { body: RichTextDoc; audience: Audience; coverMediaId: number | null }, milestoneIds: readonly number[]): Promise<PublishingProblem[]> {
    const problems: PublishingProblem[] = [];
    if (!post.coverMediaId) problems.push({ code: "no_cover", message: "Choose a cover photo." });
    problems.push(...(await photoProblems(media, project.id, photoUsesOf(post), post.audience)));
    if (milestoneIds.length) {
      const [all, visible] = await Promise.all([milestonesFor(project, readersOf("internal")), milestonesFor(project, readersOf(post.audience))]);
      problems.push(...milestoneProblems(milestoneIds, all, new Set(visible.keys()), post.audience));
    }
    return problems;
  }

  /**
   * Refuses media, milestones, blocks and plant systems that are not this project's, and blocks
   * and systems the post's audience may not see, before anything is written. A tag the post
   * already had whose block or system has since been deleted is let be.
   */
  async function checkReferences(
    project: Project,
    input: { coverMediaId: number | null; body: RichTextDoc },
    milestoneIds: readonly number[],
    tagging: { tags: readonly PostTag[]; audience: Audience; had: readonly PostTag[] } | null = null,
  ) {
    const fields: Record<string, string> = {};
    if (tagging && tagging.tags.some((t) => t.kind === "block" || t.kind === "plant")) {
      const subjects = await facility.tagSubjects(project.id);
      const problems = FACILITY_KINDS.flatMap((kind) => {
        const exists = (id: number) => subjects.some((s) => s.kind === kind && s.id === id);
        const hadIt = (id: number) => tagging.had.some((t) => t.kind === kind && t.value === String(id));
        const ids = tagging.tags.filter((t) => t.kind === kind).map((t) => Number(t.value));
        const problem = facilityTagProblem(kind, ids.filter((id) => exists(id) || !hadIt(id)), subjects, tagging.audience);
        return problem ? [problem] : [];
      });
      if (problems.length) fields.tags = problems.join("; ");
    }
    const ids = mediaIdsOf(input);
    if (ids.length) {
      const described = await media.describeForPublishing(ids);
      const unknown = described.filter((d) => !d.exists || d.projectId !== project.id).map((d) => d.id);
      if (input.coverMediaId && unknown.includes(input.coverMediaId)) fields.coverMediaId = `photo #${input.coverMediaId} is not in this project's media library`;
      const inline = unknown.filter((id) => imageIdsOf(input.body).includes(id));
      if (inline.length) fields.body = `photo ${inline.map((id) => `#${id}`).join(", ")} is not in this project's media library`;
    }
    if (milestoneIds.length) {
      const all = await milestonesFor(project, readersOf("internal"));
      const unknown = milestoneIds.filter((id) => !all.has(id));
      if (unknown.length) fields.milestoneIds = `milestone ${unknown.map((id) => `#${id}`).join(", ")} is not in this project's programme`;
    }
    if (Object.keys(fields).length) {
      throw new AppError("invalid_post", `Check ${Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join("; ")}.`, 422, fields);
    }
  }

  const loadableBy = (viewer: Viewer, ids: readonly number[]) => media.loadableBy(viewer, ids);

  /** Published rows for digests (read outside the office): a cover no longer cleared is left out, as on the page (decision 070). */
  async function withLoadableCovers<T extends { coverMediaId: number | null }>(rows: T[]): Promise<T[]> {
    const loadable = await loadableBy("public", rows.flatMap((r) => (r.coverMediaId ? [r.coverMediaId] : [])));
    return rows.map((r) => (r.coverMediaId && !loadable.has(r.coverMediaId) ? { ...r, coverMediaId: null } : r));
  }

  /** Rows of one project as summaries for a reader. */
  async function summaries(projectId: number, rows: readonly PostListRecord[], viewer: Viewer): Promise<PostSummary[]> {
    const ids = rows.map((r) => r.id);
    const [tags, pictures, subjects] = await Promise.all([
      tagsFor(db, ids),
      loadableBy(viewer, rows.flatMap((r) => (r.coverMediaId ? [r.coverMediaId] : []))),
      facility.tagSubjects(projectId),
    ]);
    return rows.map((r) => summaryOf(r, tagsForReader(tags.get(r.id) ?? [], subjects, viewer), r.coverMediaId ? (pictures.get(r.coverMediaId) ?? null) : null));
  }

  function summaryOf(r: PostListRecord, tags: PostTagAnswer[], cover: MediaPicture | null): PostSummary {
    return { ...workflowSummaryOf(r), summary: r.summary, cover, tags };
  }

  async function detailOf(project: Project, post: PostRecord, actor: Actor): Promise<PostDetail> {
    const viewer = viewerOf(actor);
    const links = await milestoneLinksOf(db, post.id);
    const inline = imageIdsOf(post.body);
    const [tags, pictures, current, subjects] = await Promise.all([tagsFor(db, [post.id]), loadableBy(viewer, mediaIdsOf(post)), milestonesFor(project, viewer), facility.tagSubjects(project.id)]);
    const milestones: PostMilestone[] = [];
    for (const l of links) {
      const now = current.get(l.milestoneId);
      const name = l.name ?? now?.name;
      if (!name) continue; // neither captured nor visible to this caller: say nothing of it
      const nowSnap = now ? snapshotOf(now) : null;
      milestones.push({ id: l.milestoneId, name, then: l.then, now: nowSnap, changed: Boolean(l.then && nowSnap && !sameSnapshot(l.then, nowSnap)) });
    }
    // Published HTML is the record of what was published; staff previews of unpublished work render afresh.
    // A photo of the record that this reader can no longer load is shown as the "not available" figure.
    const html =
      viewer === "staff" && post.status !== "published" ? (await renderFor(project, post, links)).html : withoutPhotos(post.html, inline.filter((id) => !pictures.has(id)));
    const detail: PostDetail = {
      ...summaryOf(post, tagsForReader(tags.get(post.id) ?? [], subjects, viewer), post.coverMediaId ? (pictures.get(post.coverMediaId) ?? null) : null),
      projectSlug: project.slug,
      html,
      milestones,
      images: inline.flatMap((id) => (pictures.has(id) ? [pictures.get(id)!] : [])),
      coverMediaId: post.coverMediaId,
      milestoneIds: links.filter((l) => l.explicit).map((l) => l.milestoneId),
    };
    if (viewer === "staff") {
      const revisions = await workflow.revisionList(post.id);
      detail.body = post.body;
      detail.version = post.version;
      detail.reviewComment = post.reviewComment;
      detail.revisions = revisions;
      detail.problems = await problemsOf(project, post, links.map((l) => l.milestoneId));
    }
    return detail;
  }

  /** Publishes inside the caller's transaction: captures "then", renders the record, opens the photos to the audience. */
  async function publishIn(trx: Trx, project: Project, post: PostRecord, at: Date): Promise<PostUpdate> {
    const links = await milestoneLinksOf(trx, post.id);
    const current = await milestonesFor(project, readersOf(post.audience));
    const snapshots = new Map<number, MilestoneSnapshot & { name: string }>();
    for (const l of links) {
      const m = current.get(l.milestoneId);
      if (!l.capturedAt && m) snapshots.set(l.milestoneId, { name: m.name, ...snapshotOf(m) });
    }
    await captureMilestones(trx, post.id, snapshots, at);
    const captured = await milestoneLinksOf(trx, post.id);
    const { html, plainText } = await renderFor(project, post, captured);
    await media.setUsages("post", post.id, mediaIdsOf(post), post.audience, true, trx);
    return { status: "published", html, plainText, publishedAt: post.publishedAt ?? at, scheduledFor: null, withdrawnAt: null, reviewComment: null };
  }

  /** The shared path of PATCH and restore: the content rules, a new revision, and the checks for live posts. */
  async function saveChanges(id: number, input: Omit<PostPatchInput, "note"> & { note?: string | null }, actor: Actor): Promise<PostDetail> {
    const saved = await db.transaction(async (trx) => {
      const post = await workflow.openForEdit(trx, id, input.version, actor, (p) => workflow.detailOf(p, actor));
      const project = await projects.getById(post.projectId);
      const oldLinks = await milestoneLinksOf(trx, post.id);
      const next = {
        title: input.title ?? post.title,
        summary: input.summary ?? post.summary,
        body: input.body ?? post.body,
        audience: input.audience ?? post.audience,
        coverMediaId: input.coverMediaId === undefined ? post.coverMediaId : input.coverMediaId,
        slug: input.slug ?? post.slug,
      };
      const explicit = input.milestoneIds ?? oldLinks.filter((l) => l.explicit).map((l) => l.milestoneId);
      const links = linksOf(explicit, next.body);
      const had = input.tags || input.audience ? ((await tagsFor(trx, [post.id])).get(post.id) ?? []) : [];
      await checkReferences(project, next, input.milestoneIds ?? [], input.tags || input.audience ? { tags: input.tags ?? had, audience: next.audience, had } : null);
      await workflow.moveSlug(trx, post, next.slug);
      await replaceMilestoneLinks(trx, post.id, links);
      if (input.tags) await replaceTags(trx, post.id, input.tags);
      await replacePostMedia(trx, post.id, next.coverMediaId, imageIdsOf(next.body));

      const at = now();
      // An approval was given to the text as it stood; marketing's later edits need a new one.
      const demoted = workflow.demotion(post, actor);
      const changes: PostUpdate = { ...next, ...demoted };
      const status = changes.status ?? post.status;
      if (status === "published") {
        const problems = await problemsOf(project, next, links.map((l) => l.milestoneId));
        if (problems.length) throw publishingBlocked(problems);
        Object.assign(changes, await publishIn(trx, project, { ...post, ...next }, post.publishedAt ?? at));
        delete changes.publishedAt;
      } else {
        Object.assign(changes, await renderFor(project, next, await milestoneLinksOf(trx, post.id)));
        await media.setUsages("post", post.id, mediaIdsOf(next), next.audience, false, trx);
      }
      await workflow.withUniqueSlug(next.slug, () => updatePost(trx, post.id, null, changes, at));
      if (demoted) await workflow.recordDemotion(trx, post, actor, at);
      await workflow.writeRevision(trx, post.id, actor, input.note ?? null, at);
      return post.id;
    });
    workflow.changed();
    const post = (await findPostById(db, saved))!;
    return workflow.detailOf(post, actor);
  }

  return {
    /** One page of the posts the caller may see, with the total for X-Total-Count. */
    async list(slug: string, query: PostListQuery, actor: Actor): Promise<{ items: PostSummary[]; total: number }> {
      const project = await projects.get(slug);
      const viewer = viewerOf(actor);
      // A block or system the reader may not see is not found, so the filter tells nothing of it.
      const subjects = query.block || query.plant ? await facility.tagSubjects(project.id) : [];
      if (query.block && !visibleFacilitySubject("block", query.block, subjects, viewer)) throw notFound("That capacity block");
      if (query.plant && !visibleFacilitySubject("plant", query.plant, subjects, viewer)) throw notFound("That plant system");
      const { rows, total } = await listPosts(db, project.id, viewer, {
        page: query.page,
        pageSize: POSTS_PAGE_SIZE,
        tag: query.tag,
        tagged: [
          ...(query.block ? [{ kind: "block" as const, value: String(query.block) }] : []),
          ...(query.plant ? [{ kind: "plant" as const, value: String(query.plant) }] : []),
        ],
        q: query.q,
        status: viewer === "staff" ? query.status : undefined,
        audience: query.audience,
      });
      return { items: await summaries(project.id, rows, viewer), total };
    },

    async create(slug: string, input: PostCreateInput, actor: Actor): Promise<{ id: number; slug: string; status: PostStatus }> {
      const project = await projects.get(slug);
      const user = actor.user!;
      const coverMediaId = input.coverMediaId ?? null;
      const milestoneIds = input.milestoneIds ?? [];
      await checkReferences(project, { coverMediaId, body: input.body }, milestoneIds, { tags: input.tags ?? [], audience: input.audience, had: [] });
      const { html, plainText } = await renderFor(project, { body: input.body, audience: input.audience, coverMediaId }, []);
      return workflow.create(project.id, input.slug ?? slugFromTitle(input.title), input.slug !== undefined, actor, async (trx, postSlug, at) => {
        const id = await insertPost(trx, {
          projectId: project.id,
          slug: postSlug,
          title: input.title,
          summary: input.summary,
          body: input.body,
          html,
          plainText,
          audience: input.audience,
          coverMediaId,
          authorId: user.id,
          authorName: user.name,
          at,
        });
        await replaceTags(trx, id, input.tags ?? []);
        await replacePostMedia(trx, id, coverMediaId, imageIdsOf(input.body));
        await replaceMilestoneLinks(trx, id, linksOf(milestoneIds, input.body));
        await media.setUsages("post", id, mediaIdsOf({ coverMediaId, body: input.body }), input.audience, false, trx);
        return id;
      });
    },

    patch: (id: number, input: PostPatchInput, actor: Actor) => saveChanges(id, input, actor),

    /** The workflow steps, revisions (diff, restore), history and the scheduler's pass, as every kind has them. */
    ...workflow.steps,

    /**
     * One revision of an update as an outside reviewer reads it (server/review-links): rendered
     * afresh with the photos `pictures` gives for its ids (one it leaves out reads as not
     * available), milestone blocks as the revision's audience sees them today; null when gone.
     */
    async reviewCopy(id: number, n: number | "latest", pictures: (ids: number[]) => Promise<Map<number, MediaPicture>>) {
      const found = await workflow.steps.revisionOf(id, n);
      if (!found) return null;
      const { item, revision, latest } = found;
      const project = await projects.getById(item.projectId);
      const shown = await pictures(mediaIdsOf(revision));
      const html = renderRichText(revision.body, { pictures: shown, milestones: blockData([], await milestonesFor(project, readersOf(revision.audience))) });
      const cover = revision.coverMediaId ? (shown.get(revision.coverMediaId) ?? null) : null;
      return { item, project, number: revision.number, latest, title: revision.title, audience: revision.audience, summary: revision.summary, html, cover };
    },

    /** Published public posts of a project for its feed, newest first, with the newest change. */
    async feedOf(slug: string, limit = 50) {
      const project = await projects.get(slug);
      const posts = await listPublicPosts(db, project.id, limit);
      const updated = await latestPublicChange(db, project.id);
      const [tags, subjects, loadable] = await Promise.all([
        tagsFor(db, posts.map((p) => p.id)),
        facility.tagSubjects(project.id),
        loadableBy("public", posts.flatMap((p) => [...(p.coverMediaId ? [p.coverMediaId] : []), ...imageIdsOf(p.body)])),
      ]);
      // A photo sent back to review since publication is left out of the feed as of the page (decision 070).
      return {
        project,
        updated,
        posts: posts.map((p) => ({
          ...p,
          coverMediaId: p.coverMediaId && loadable.has(p.coverMediaId) ? p.coverMediaId : null,
          html: withoutPhotos(p.html, imageIdsOf(p.body).filter((id) => !loadable.has(id))),
          tags: tagsForReader(tags.get(p.id) ?? [], subjects, "public"),
        })),
      };
    },

    /** Published posts of a project in these audiences with `publishedAt` in [from, before), oldest first, with their tags (digests). */
    publishedBetween: async (projectId: number, audiences: readonly Audience[], from: Date, before: Date) => withLoadableCovers(await listPublishedBetween(db, projectId, audiences, from, before)),

    /** A published post of any audience, with its tags, or null: the caller decides who may read it (digests). */
    findPublished: async (id: number) => {
      const post = await findPublishedPost(db, id);
      return post ? ((await withLoadableCovers([post]))[0] ?? null) : null;
    },

    /** Public and investor posts published at or after `since`, oldest first (as-it-happens digests). */
    publishedSince: (since: Date) => listPublishedSince(db, since),

    /** Updates of any state that link a milestone (the programme keeps such a milestone on record). */
    linkingMilestone: (milestoneId: number) => postsLinkingMilestone(db, milestoneId),

    /** The published posts of a project a viewer may read, with their text (search). */
    searchable: (projectId: number, viewer: Viewer) => listSearchablePosts(db, projectId, viewer),

    /** Every published public post's address (sitemap). */
    publicAddresses: () => listPublicPostAddresses(db),

    /** A published public post for link previews (Open Graph), or where its old address leads. */
    async previewOf(slug: string, postSlug: string): Promise<{ post: PostSummary; project: Project } | { redirectTo: string } | null> {
      const project = await projects.get(slug).catch(() => null);
      if (!project) return null;
      const post = await findVisiblePostBySlug(db, project.id, postSlug, "public");
      if (post) return { post: (await summaries(project.id, [post], "public"))[0]!, project };
      const moved = await workflow.findRedirect(project.id, postSlug, "public");
      return moved ? { redirectTo: moved } : null;
    },
  };
}

export type PostsService = ReturnType<typeof createPostsService>;
