import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { MilestoneSnapshot, PostTag } from "#shared/schemas/posts.ts";
import type { PostStatus } from "#shared/schemas/publishing.ts";
import type { RichTextDoc } from "#shared/schemas/rich-text.ts";
import type { Viewer } from "#shared/domain/audience.ts";
import { replaceChildRows } from "../core/child-rows.ts";
import { contentFinders, visibleContent } from "../publishing/publishing.audience.ts";
import { changedColumns, newDraftColumns, toWorkflowRecord, WORKFLOW_COLUMNS, type WorkflowRecord, type WorkflowUpdate } from "../publishing/publishing.columns.ts";
import { countOf } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

/**
 * The content table of updates, for the publishing workflow's queries of its address, state and
 * schedule (server/publishing keeps the revisions, old addresses and history of every kind).
 */
export const POSTS_TABLE = "posts";

/**
 * The audience rule of posts (the rule of all published content, `visibleContent`): every read
 * path of this repository (lists, search, pages, old addresses, feeds, sitemaps) goes through it.
 */
function visibleTo<T extends Knex.QueryBuilder>(query: T, viewer: Viewer, alias = "p"): T {
  return visibleContent(query, viewer, alias);
}

export interface PostRecord extends WorkflowRecord {
  summary: string;
  body: RichTextDoc;
  html: string;
  plainText: string;
  coverMediaId: number | null;
}

/** A list row: everything but the body, its HTML and its text. */
export type PostListRecord = Omit<PostRecord, "body" | "html" | "plainText">;

const LIST_COLUMNS = [...WORKFLOW_COLUMNS, "summary", "cover_media_id"].map((c) => `p.${c}`);

function toListRecord(r: Record<string, unknown>): PostListRecord {
  return { ...toWorkflowRecord(r), summary: String(r.summary ?? ""), coverMediaId: r.cover_media_id === null ? null : Number(r.cover_media_id) };
}

function toRecord(r: Record<string, unknown>): PostRecord {
  return { ...toListRecord(r), body: JSON.parse(String(r.body)) as RichTextDoc, html: String(r.html), plainText: String(r.plain_text) };
}

/** What an update's save writes: its address, title and audience, and its own content. */
export type PostWrite = Pick<PostRecord, "slug" | "title" | "summary" | "body" | "html" | "plainText" | "audience" | "coverMediaId">;

export async function insertPost(q: Q, row: PostWrite & { projectId: number; authorId: number | null; authorName: string; at: Date }): Promise<number> {
  const [id] = await q("posts").insert({
    ...newDraftColumns(row),
    summary: row.summary,
    body: JSON.stringify(row.body),
    html: row.html,
    plain_text: row.plainText,
    cover_media_id: row.coverMediaId,
  });
  return Number(id);
}

export type PostUpdate = Partial<PostWrite> & WorkflowUpdate;

const POST_COLUMNS = { summary: "summary", body: "body", html: "html", plainText: "plain_text", coverMediaId: "cover_media_id" };

/**
 * Writes the changed fields and bumps the version. With `expectVersion`, only when the stored
 * version is still that one (optimistic concurrency); returns the rows changed (0 = stale).
 */
export async function updatePost(q: Q, id: number, expectVersion: number | null, changes: PostUpdate, at: Date): Promise<number> {
  const row = { updated_at: at, version: q.raw("version + 1"), ...changedColumns({ ...changes, body: changes.body && JSON.stringify(changes.body) }, POST_COLUMNS) };
  const query = q("posts").where({ id });
  if (expectVersion !== null) query.andWhere({ version: expectVersion });
  return query.update(row);
}

const finders = contentFinders("posts", toRecord);
export const findPostById = finders.byId;
/** The post at this address that the viewer may read. */
export const findVisiblePostBySlug = finders.visibleBySlug;

export interface ListFilter {
  page: number;
  pageSize: number;
  tag?: string;
  /** Tagged with each of these (kind and value exactly): a capacity block or plant system. */
  tagged?: ReadonlyArray<{ kind: "block" | "plant"; value: string }>;
  q?: string;
  status?: PostStatus;
  audience?: Audience;
}

/**
 * One page of the posts a viewer may read, newest first (or by relevance with `q`:
 * MariaDB FULLTEXT in natural-language mode over title, summary and text).
 */
export async function listPosts(q: Q, projectId: number, viewer: Viewer, f: ListFilter): Promise<{ rows: PostListRecord[]; total: number }> {
  const base = () => {
    const query = visibleTo(q("posts as p").where("p.project_id", projectId), viewer);
    if (viewer === "staff" && f.status) query.andWhere("p.status", f.status);
    if (f.audience) query.andWhere("p.audience", f.audience);
    // Topics only: a block or plant tag is asked for by kind and id (`tagged`), never by its bare number.
    if (f.tag) query.whereExists(q("post_tags as t").whereRaw("t.post_id = p.id").whereIn("t.kind", ["area", "system"]).andWhere("t.value", f.tag));
    for (const t of f.tagged ?? []) query.whereExists(q("post_tags as t").whereRaw("t.post_id = p.id").andWhere({ "t.kind": t.kind, "t.value": t.value }));
    if (f.q) query.whereRaw("MATCH (p.title, p.summary, p.plain_text) AGAINST (? IN NATURAL LANGUAGE MODE)", [f.q]);
    return query;
  };
  const total = await countOf(base());
  if (total === 0) return { rows: [], total };
  const query = base().select(LIST_COLUMNS);
  if (f.q) query.orderByRaw("MATCH (p.title, p.summary, p.plain_text) AGAINST (? IN NATURAL LANGUAGE MODE) DESC", [f.q]);
  query.orderByRaw("COALESCE(p.published_at, p.scheduled_for, p.updated_at) DESC").orderBy("p.id", "desc");
  const rows = await query.limit(f.pageSize).offset((f.page - 1) * f.pageSize);
  return { rows: rows.map(toListRecord), total };
}

/** The published posts of a project a viewer may read, with their text, newest first (search). */
export async function listSearchablePosts(q: Q, projectId: number, viewer: Viewer): Promise<Array<{ slug: string; title: string; summary: string; plainText: string }>> {
  const rows = await visibleTo(q("posts as p").where({ "p.project_id": projectId, "p.status": "published" }), viewer)
    .orderBy("p.published_at", "desc")
    .select("p.slug", "p.title", "p.summary", "p.plain_text");
  return rows.map((r: Record<string, unknown>) => ({ slug: String(r.slug), title: String(r.title), summary: String(r.summary ?? ""), plainText: String(r.plain_text ?? "") }));
}

/** Published public posts of a project, newest first (feeds). */
export async function listPublicPosts(q: Q, projectId: number, limit: number): Promise<PostRecord[]> {
  const rows = await visibleTo(q("posts as p").where("p.project_id", projectId), "public")
    .orderBy("p.published_at", "desc")
    .orderBy("p.id", "desc")
    .limit(limit)
    .select("p.*");
  return rows.map(toRecord);
}

/** Addresses of every published public post (sitemaps). */
export async function listPublicPostAddresses(q: Q): Promise<Array<{ projectId: number; slug: string; updatedAt: Date }>> {
  const rows = await visibleTo(q("posts as p"), "public").orderBy("p.project_id").orderBy("p.published_at", "desc").select("p.project_id", "p.slug", "p.updated_at");
  return rows.map((r) => ({ projectId: Number(r.project_id), slug: String(r.slug), updatedAt: new Date(r.updated_at) }));
}

/** The newest change among a project's public posts (the feed's `updated`). */
export async function latestPublicChange(q: Q, projectId: number): Promise<Date | null> {
  const r = await visibleTo(q("posts as p").where("p.project_id", projectId), "public").max({ at: "p.updated_at" }).first();
  return r?.at ? new Date(r.at) : null;
}

// Published posts for digests (the columns a digest shows, and the tags its topics read)

export interface PublishedPostRecord {
  id: number;
  projectId: number;
  slug: string;
  title: string;
  summary: string;
  audience: Audience;
  publishedAt: Date;
  coverMediaId: number | null;
  tags: PostTag[];
}

const PUBLISHED_COLUMNS = ["id", "project_id", "slug", "title", "summary", "audience", "published_at", "cover_media_id"];

async function toPublished(q: Q, rows: Array<Record<string, unknown>>): Promise<PublishedPostRecord[]> {
  const tags = await tagsFor(q, rows.map((r) => Number(r.id)));
  return rows.map((r) => ({
    id: Number(r.id),
    projectId: Number(r.project_id),
    slug: String(r.slug),
    title: String(r.title),
    summary: String(r.summary ?? ""),
    audience: r.audience as Audience,
    publishedAt: new Date(r.published_at as string),
    coverMediaId: r.cover_media_id == null ? null : Number(r.cover_media_id),
    tags: tags.get(Number(r.id)) ?? [],
  }));
}

/** Published posts of a project in the given audiences with `published_at` in [from, before), oldest first. */
export async function listPublishedBetween(q: Q, projectId: number, audiences: readonly Audience[], from: Date, before: Date): Promise<PublishedPostRecord[]> {
  const rows = await q("posts")
    .where({ project_id: projectId, status: "published" })
    .whereIn("audience", [...audiences])
    .andWhere("published_at", ">=", from)
    .andWhere("published_at", "<", before)
    .orderBy("published_at")
    .orderBy("id")
    .select(PUBLISHED_COLUMNS);
  return toPublished(q, rows);
}

/** One published post, of any audience (the caller decides who may read it). */
export async function findPublishedPost(q: Q, id: number): Promise<PublishedPostRecord | null> {
  const r = await q("posts").where({ id, status: "published" }).first(PUBLISHED_COLUMNS);
  return r ? (await toPublished(q, [r]))[0]! : null;
}

/** Public and investor posts published at or after `since`, oldest first (without their tags). */
export async function listPublishedSince(q: Q, since: Date): Promise<Array<{ id: number; projectId: number; publishedAt: Date }>> {
  const rows = await q("posts")
    .where("status", "published")
    .whereIn("audience", ["public", "investor"])
    .andWhere("published_at", ">=", since)
    .orderBy("published_at")
    .orderBy("id")
    .select("id", "project_id", "published_at");
  return rows.map((r) => ({ id: Number(r.id), projectId: Number(r.project_id), publishedAt: new Date(r.published_at) }));
}

// Tags

// The rows a post owns are replaced by whole primary keys (replaceChildRows), so that two posts
// saved at the same moment never deadlock on each other's gap locks.

export async function replaceTags(q: Q, postId: number, tags: readonly PostTag[]): Promise<void> {
  const seen = new Set<string>();
  const rows = tags
    .filter((t) => {
      const key = `${t.kind}\u0000${t.value.toLowerCase()}`;
      if (seen.has(key)) return false;
      seen.add(key);
      return true;
    })
    .map((t) => ({ post_id: postId, kind: t.kind, value: t.value }));
  await replaceChildRows(q, "post_tags", { post_id: postId }, ["kind", "value"], rows);
}

export async function tagsFor(q: Q, postIds: readonly number[]): Promise<Map<number, PostTag[]>> {
  const out = new Map<number, PostTag[]>(postIds.map((id) => [id, []]));
  if (!postIds.length) return out;
  const rows = await q("post_tags").whereIn("post_id", [...postIds]).orderBy(["post_id", "kind", "value"]);
  for (const r of rows) out.get(Number(r.post_id))?.push({ kind: r.kind, value: String(r.value) });
  return out;
}

// Photos

export async function replacePostMedia(q: Q, postId: number, coverId: number | null, inlineIds: readonly number[]): Promise<void> {
  const rows = [
    ...(coverId ? [{ post_id: postId, media_id: coverId, role: "cover", sort_order: 0 }] : []),
    ...inlineIds.map((id, i) => ({ post_id: postId, media_id: id, role: "inline", sort_order: i })),
  ];
  await replaceChildRows(q, "post_media", { post_id: postId }, ["role", "media_id"], rows);
}

// Linked milestones

export interface MilestoneLinkRecord {
  milestoneId: number;
  sortOrder: number;
  /** Linked in the post's fields (true) or only through a milestone block in the text (false). */
  explicit: boolean;
  name: string | null;
  then: MilestoneSnapshot | null;
  capturedAt: Date | null;
}

export async function milestoneLinksOf(q: Q, postId: number): Promise<MilestoneLinkRecord[]> {
  const rows = await q("post_milestones").where({ post_id: postId }).orderBy("sort_order");
  return rows.map((r) => ({
    milestoneId: Number(r.milestone_id),
    sortOrder: Number(r.sort_order),
    explicit: Boolean(r.linked_explicitly),
    name: r.name === null ? null : String(r.name),
    then:
      r.captured_at === null
        ? null
        : {
            status: r.then_status,
            baselineFinish: r.then_baseline_finish ?? null,
            forecastFinish: r.then_forecast_finish ?? null,
            actualFinish: r.then_actual_finish ?? null,
            percentComplete: Number(r.then_percent_complete ?? 0),
          },
    capturedAt: r.captured_at === null ? null : new Date(r.captured_at),
  }));
}

/** Updates of any state that link the milestone, in their fields or by a block in the text (the programme asks before a delete). */
export async function postsLinkingMilestone(q: Q, milestoneId: number): Promise<Array<{ id: number; title: string }>> {
  const rows = await q("post_milestones as pm").join("posts as p", "p.id", "pm.post_id").where("pm.milestone_id", milestoneId).orderBy("p.id").select("p.id", "p.title");
  return (rows as Array<{ id: number; title: string }>).map((r) => ({ id: Number(r.id), title: String(r.title) }));
}

/** Sets the post's links; links kept from before keep what they captured at publication. */
export async function replaceMilestoneLinks(q: Q, postId: number, links: ReadonlyArray<{ milestoneId: number; explicit: boolean }>): Promise<void> {
  const rows = links.map((l, i) => ({ post_id: postId, milestone_id: l.milestoneId, sort_order: i, linked_explicitly: l.explicit }));
  await replaceChildRows(q, "post_milestones", { post_id: postId }, ["milestone_id"], rows);
}

/** Records "then" for links that have not captured anything yet. */
export async function captureMilestones(q: Q, postId: number, snapshots: ReadonlyMap<number, MilestoneSnapshot & { name: string }>, at: Date): Promise<void> {
  for (const [milestoneId, s] of snapshots) {
    await q("post_milestones").where({ post_id: postId, milestone_id: milestoneId }).whereNull("captured_at").update({
      name: s.name,
      then_status: s.status,
      then_baseline_finish: s.baselineFinish,
      then_forecast_finish: s.forecastFinish,
      then_actual_finish: s.actualFinish,
      then_percent_complete: s.percentComplete,
      captured_at: at,
    });
  }
}

// Revisions (stored by server/publishing; these are the columns of an update's own content)

/** What a revision keeps of an update's own content. */
export interface PostRevisionContent {
  summary: string;
  body: RichTextDoc;
  plainText: string;
  coverMediaId: number | null;
  milestoneIds: number[];
  tags: PostTag[];
}

export function postRevisionColumns(c: PostRevisionContent): Record<string, unknown> {
  return {
    summary: c.summary,
    body: JSON.stringify(c.body),
    plain_text: c.plainText,
    cover_media_id: c.coverMediaId,
    milestone_ids: JSON.stringify(c.milestoneIds),
    tags: JSON.stringify(c.tags),
  };
}

export function postRevisionContent(r: Readonly<Record<string, unknown>>): PostRevisionContent {
  return {
    summary: String(r.summary),
    body: r.body === undefined ? ({ type: "doc", content: [] } as RichTextDoc) : (JSON.parse(String(r.body)) as RichTextDoc),
    plainText: r.plain_text === undefined ? "" : String(r.plain_text),
    coverMediaId: r.cover_media_id === null || r.cover_media_id === undefined ? null : Number(r.cover_media_id),
    milestoneIds: JSON.parse(String(r.milestone_ids)) as number[],
    tags: JSON.parse(String(r.tags)) as PostTag[],
  };
}
