import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { MilestoneSnapshot, PostStatus, PostTag } from "#shared/schemas/posts.ts";
import type { RichTextDoc } from "#shared/schemas/rich-text.ts";

type Q = Knex | Knex.Transaction;

/** Who is reading: a visitor, an investor, or staff (admin, lead, marketing). */
export type Viewer = "public" | "investor" | "staff";

const VISIBLE: Record<Viewer, readonly Audience[]> = {
  public: ["public"],
  investor: ["public", "investor"],
  staff: ["public", "investor", "internal"],
};

/** The audiences a viewer may read. */
export function audiencesFor(viewer: Viewer): readonly Audience[] {
  return VISIBLE[viewer];
}

/**
 * The audience rule of posts, in one place: visitors read published public posts, investors
 * published public and investor posts, staff everything in every state. Every read path of
 * this repository (lists, search, pages, old addresses, feeds, sitemaps) goes through it.
 */
function visibleTo<T extends Knex.QueryBuilder>(query: T, viewer: Viewer, alias = "p"): T {
  if (viewer === "staff") return query;
  return query.where(`${alias}.status`, "published").whereIn(`${alias}.audience`, audiencesFor(viewer) as Audience[]) as T;
}

export interface PostRecord {
  id: number;
  projectId: number;
  slug: string;
  title: string;
  summary: string;
  body: RichTextDoc;
  html: string;
  plainText: string;
  audience: Audience;
  status: PostStatus;
  authorId: number | null;
  authorName: string;
  coverMediaId: number | null;
  scheduledFor: Date | null;
  publishedAt: Date | null;
  withdrawnAt: Date | null;
  reviewComment: string | null;
  version: number;
  createdAt: Date;
  updatedAt: Date;
}

/** A list row: everything but the body, its HTML and its text. */
export type PostListRecord = Omit<PostRecord, "body" | "html" | "plainText">;

const LIST_COLUMNS = [
  "p.id",
  "p.project_id",
  "p.slug",
  "p.title",
  "p.summary",
  "p.audience",
  "p.status",
  "p.author_id",
  "p.author_name",
  "p.cover_media_id",
  "p.scheduled_for",
  "p.published_at",
  "p.withdrawn_at",
  "p.review_comment",
  "p.version",
  "p.created_at",
  "p.updated_at",
];

const dateOrNull = (v: unknown): Date | null => (v === null || v === undefined ? null : new Date(v as string));

function toListRecord(r: Record<string, unknown>): PostListRecord {
  return {
    id: Number(r.id),
    projectId: Number(r.project_id),
    slug: String(r.slug),
    title: String(r.title),
    summary: String(r.summary ?? ""),
    audience: r.audience as Audience,
    status: r.status as PostStatus,
    authorId: r.author_id === null ? null : Number(r.author_id),
    authorName: String(r.author_name),
    coverMediaId: r.cover_media_id === null ? null : Number(r.cover_media_id),
    scheduledFor: dateOrNull(r.scheduled_for),
    publishedAt: dateOrNull(r.published_at),
    withdrawnAt: dateOrNull(r.withdrawn_at),
    reviewComment: r.review_comment === null || r.review_comment === undefined ? null : String(r.review_comment),
    version: Number(r.version),
    createdAt: new Date(r.created_at as string),
    updatedAt: new Date(r.updated_at as string),
  };
}

function toRecord(r: Record<string, unknown>): PostRecord {
  return { ...toListRecord(r), body: JSON.parse(String(r.body)) as RichTextDoc, html: String(r.html), plainText: String(r.plain_text) };
}

export interface PostWrite {
  slug: string;
  title: string;
  summary: string;
  body: RichTextDoc;
  html: string;
  plainText: string;
  audience: Audience;
  coverMediaId: number | null;
}

export async function insertPost(q: Q, row: PostWrite & { projectId: number; authorId: number | null; authorName: string; at: Date }): Promise<number> {
  const [id] = await q("posts").insert({
    project_id: row.projectId,
    slug: row.slug,
    title: row.title,
    summary: row.summary,
    body: JSON.stringify(row.body),
    html: row.html,
    plain_text: row.plainText,
    audience: row.audience,
    status: "draft",
    author_id: row.authorId,
    author_name: row.authorName,
    cover_media_id: row.coverMediaId,
    created_at: row.at,
    updated_at: row.at,
  });
  return Number(id);
}

export interface PostUpdate {
  slug?: string;
  title?: string;
  summary?: string;
  body?: RichTextDoc;
  html?: string;
  plainText?: string;
  audience?: Audience;
  coverMediaId?: number | null;
  status?: PostStatus;
  scheduledFor?: Date | null;
  publishedAt?: Date | null;
  withdrawnAt?: Date | null;
  reviewComment?: string | null;
}

const UPDATE_COLUMNS: Record<keyof PostUpdate, string> = {
  slug: "slug",
  title: "title",
  summary: "summary",
  body: "body",
  html: "html",
  plainText: "plain_text",
  audience: "audience",
  coverMediaId: "cover_media_id",
  status: "status",
  scheduledFor: "scheduled_for",
  publishedAt: "published_at",
  withdrawnAt: "withdrawn_at",
  reviewComment: "review_comment",
};

/**
 * Writes the changed fields and bumps the version. With `expectVersion`, only when the stored
 * version is still that one (optimistic concurrency); returns the rows changed (0 = stale).
 */
export async function updatePost(q: Q, id: number, expectVersion: number | null, changes: PostUpdate, at: Date): Promise<number> {
  const row: Record<string, unknown> = { updated_at: at, version: q.raw("version + 1") };
  for (const [key, column] of Object.entries(UPDATE_COLUMNS) as Array<[keyof PostUpdate, string]>) {
    if (changes[key] === undefined) continue;
    row[column] = key === "body" ? JSON.stringify(changes.body) : changes[key];
  }
  const query = q("posts").where({ id });
  if (expectVersion !== null) query.andWhere({ version: expectVersion });
  return query.update(row);
}

export async function findPostById(q: Q, id: number, opts: { forUpdate?: boolean } = {}): Promise<PostRecord | null> {
  const query = q("posts as p").where("p.id", id).first("p.*");
  if (opts.forUpdate) query.forUpdate();
  const r = await query;
  return r ? toRecord(r) : null;
}

/** The post at this address that the viewer may read. */
export async function findVisiblePostBySlug(q: Q, projectId: number, slug: string, viewer: Viewer): Promise<PostRecord | null> {
  const r = await visibleTo(q("posts as p").where({ "p.project_id": projectId, "p.slug": slug }), viewer).first("p.*");
  return r ? toRecord(r) : null;
}

/** The current address of a post that once lived at `oldSlug`, when the viewer may read it. */
export async function findRedirect(q: Q, projectId: number, oldSlug: string, viewer: Viewer): Promise<string | null> {
  const r = await visibleTo(
    q("post_slugs as s").join("posts as p", "p.id", "s.post_id").where({ "s.project_id": projectId, "s.slug": oldSlug }),
    viewer,
  ).first("p.slug");
  return r ? String(r.slug) : null;
}

/** Who holds an address in a project: a post's current slug or one of its old ones. */
export async function slugHolder(q: Q, projectId: number, slug: string): Promise<{ postId: number; current: boolean } | null> {
  const current = await q("posts").where({ project_id: projectId, slug }).first("id");
  if (current) return { postId: Number(current.id), current: true };
  const old = await q("post_slugs").where({ project_id: projectId, slug }).first("post_id");
  return old ? { postId: Number(old.post_id), current: false } : null;
}

export async function keepOldSlug(q: Q, projectId: number, slug: string, postId: number): Promise<void> {
  await q("post_slugs").insert({ project_id: projectId, slug, post_id: postId }).onConflict(["project_id", "slug"]).merge({ post_id: postId });
}

export async function releaseOldSlug(q: Q, projectId: number, slug: string, postId: number): Promise<void> {
  await q("post_slugs").where({ project_id: projectId, slug, post_id: postId }).delete();
}

export async function oldSlugsOf(q: Q, postId: number): Promise<string[]> {
  return (await q("post_slugs").where({ post_id: postId }).orderBy("created_at").select("slug")).map((r) => String(r.slug));
}

export interface ListFilter {
  page: number;
  pageSize: number;
  tag?: string;
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
    if (f.tag) query.whereExists(q("post_tags as t").whereRaw("t.post_id = p.id").andWhere("t.value", f.tag));
    if (f.q) query.whereRaw("MATCH (p.title, p.summary, p.plain_text) AGAINST (? IN NATURAL LANGUAGE MODE)", [f.q]);
    return query;
  };
  const countRow = await base().count({ n: "*" }).first();
  const total = Number(countRow?.n ?? 0);
  if (total === 0) return { rows: [], total };
  const query = base().select(LIST_COLUMNS);
  if (f.q) query.orderByRaw("MATCH (p.title, p.summary, p.plain_text) AGAINST (? IN NATURAL LANGUAGE MODE) DESC", [f.q]);
  query.orderByRaw("COALESCE(p.published_at, p.scheduled_for, p.updated_at) DESC").orderBy("p.id", "desc");
  const rows = await query.limit(f.pageSize).offset((f.page - 1) * f.pageSize);
  return { rows: rows.map(toListRecord), total };
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

// Tags

export async function replaceTags(q: Q, postId: number, tags: readonly PostTag[]): Promise<void> {
  await q("post_tags").where({ post_id: postId }).delete();
  const seen = new Set<string>();
  const rows = tags
    .filter((t) => {
      const key = `${t.kind}\u0000${t.value.toLowerCase()}`;
      if (seen.has(key)) return false;
      seen.add(key);
      return true;
    })
    .map((t) => ({ post_id: postId, kind: t.kind, value: t.value }));
  if (rows.length) await q("post_tags").insert(rows);
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
  await q("post_media").where({ post_id: postId }).delete();
  const rows = [
    ...(coverId ? [{ post_id: postId, media_id: coverId, role: "cover", sort_order: 0 }] : []),
    ...inlineIds.map((id, i) => ({ post_id: postId, media_id: id, role: "inline", sort_order: i })),
  ];
  if (rows.length) await q("post_media").insert(rows);
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

/** Sets the post's links; links kept from before keep what they captured at publication. */
export async function replaceMilestoneLinks(q: Q, postId: number, links: ReadonlyArray<{ milestoneId: number; explicit: boolean }>): Promise<void> {
  const ids = links.map((l) => l.milestoneId);
  const drop = q("post_milestones").where({ post_id: postId });
  if (ids.length) drop.whereNotIn("milestone_id", ids);
  await drop.delete();
  for (const [i, l] of links.entries()) {
    await q("post_milestones")
      .insert({ post_id: postId, milestone_id: l.milestoneId, sort_order: i, linked_explicitly: l.explicit })
      .onConflict(["post_id", "milestone_id"])
      .merge({ sort_order: i, linked_explicitly: l.explicit });
  }
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

// Revisions

export interface RevisionRecord {
  number: number;
  title: string;
  summary: string;
  slug: string;
  audience: Audience;
  status: PostStatus;
  body: RichTextDoc;
  plainText: string;
  coverMediaId: number | null;
  milestoneIds: number[];
  tags: PostTag[];
  note: string | null;
  authorName: string;
  createdAt: Date;
}

export async function insertRevision(
  q: Q,
  postId: number,
  rev: Omit<RevisionRecord, "number" | "createdAt"> & { authorId: number | null; at: Date },
): Promise<number> {
  // The post row is locked by the caller, so max + 1 cannot race.
  const r = await q("post_revisions").where({ post_id: postId }).max({ n: "number" }).first();
  const number = Number(r?.n ?? 0) + 1;
  await q("post_revisions").insert({
    post_id: postId,
    number,
    title: rev.title,
    summary: rev.summary,
    slug: rev.slug,
    audience: rev.audience,
    status: rev.status,
    body: JSON.stringify(rev.body),
    plain_text: rev.plainText,
    cover_media_id: rev.coverMediaId,
    milestone_ids: JSON.stringify(rev.milestoneIds),
    tags: JSON.stringify(rev.tags),
    note: rev.note,
    author_id: rev.authorId,
    author_name: rev.authorName,
    created_at: rev.at,
  });
  return number;
}

function toRevision(r: Record<string, unknown>): RevisionRecord {
  return {
    number: Number(r.number),
    title: String(r.title),
    summary: String(r.summary),
    slug: String(r.slug),
    audience: r.audience as Audience,
    status: r.status as PostStatus,
    body: r.body === undefined ? ({ type: "doc", content: [] } as RichTextDoc) : (JSON.parse(String(r.body)) as RichTextDoc),
    plainText: r.plain_text === undefined ? "" : String(r.plain_text),
    coverMediaId: r.cover_media_id === null ? null : Number(r.cover_media_id),
    milestoneIds: JSON.parse(String(r.milestone_ids)) as number[],
    tags: JSON.parse(String(r.tags)) as PostTag[],
    note: r.note === null ? null : String(r.note),
    authorName: String(r.author_name),
    createdAt: new Date(r.created_at as string),
  };
}

export async function listRevisions(q: Q, postId: number): Promise<RevisionRecord[]> {
  const rows = await q("post_revisions")
    .where({ post_id: postId })
    .orderBy("number", "desc")
    .select("number", "title", "summary", "slug", "audience", "status", "cover_media_id", "milestone_ids", "tags", "note", "author_name", "created_at");
  return rows.map(toRevision);
}

export async function findRevision(q: Q, postId: number, number: number): Promise<RevisionRecord | null> {
  const r = await q("post_revisions").where({ post_id: postId, number }).first();
  return r ? toRevision(r) : null;
}

// Workflow history

export async function insertPublishingEvent(
  q: Q,
  e: { ownerType: "post" | "story"; ownerId: number; action: string; from: PostStatus; to: PostStatus; actorId: number | null; actorName: string | null; comment: string | null; at: Date },
): Promise<void> {
  await q("publishing_events").insert({
    owner_type: e.ownerType,
    owner_id: e.ownerId,
    action: e.action,
    from_status: e.from,
    to_status: e.to,
    actor_id: e.actorId,
    actor_name: e.actorName,
    comment: e.comment,
    at: e.at,
  });
}

export async function listPublishingEvents(q: Q, ownerType: "post" | "story", ownerId: number) {
  const rows = await q("publishing_events").where({ owner_type: ownerType, owner_id: ownerId }).orderBy("id", "desc");
  return rows.map((r) => ({
    action: String(r.action),
    from: r.from_status as PostStatus,
    to: r.to_status as PostStatus,
    by: r.actor_name === null ? null : String(r.actor_name),
    comment: r.comment === null ? null : String(r.comment),
    at: new Date(r.at).toISOString(),
  }));
}

// The scheduler

/**
 * Claims due scheduled posts for this transaction. Rows another process is publishing are
 * skipped (SKIP LOCKED), so several processes never publish one post twice.
 */
export async function claimDuePosts(trx: Knex.Transaction, now: Date, limit: number): Promise<number[]> {
  const rows = await trx("posts")
    .where("status", "scheduled")
    .andWhere("scheduled_for", "<=", now)
    .orderBy("scheduled_for")
    .limit(limit)
    .forUpdate()
    .skipLocked()
    .select("id");
  return rows.map((r) => Number(r.id));
}
