import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { ContentKind } from "#shared/domain/publishing-workflow.ts";
import type { PostStatus, PublishingEvent } from "#shared/schemas/publishing.ts";
import type { Viewer } from "#shared/domain/audience.ts";
import { visibleContent } from "./publishing.audience.ts";
import { date, num, oneOf, readRow, text, textOrNull } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

/**
 * The workflow's own records of every kind of published content: the history of steps
 * (`publishing_events`), the revisions (`post_revisions`, `story_revisions`) and the old
 * addresses (`post_slugs`, `story_slugs`), all named here only. The content rows themselves
 * (`posts`, `stories`) belong to their modules: a kind passes its content table in, named by its
 * own repository, for the queries that read its address, status and schedule.
 */
const TABLES: Readonly<Record<ContentKind, { revisions: string; oldSlugs: string; key: string }>> = {
  post: { revisions: "post_revisions", oldSlugs: "post_slugs", key: "post_id" },
  story: { revisions: "story_revisions", oldSlugs: "story_slugs", key: "story_id" },
};

/**
 * A kind of content as these queries see it: its kind, and its content table (`id`,
 * `project_id`, `slug`, `status`, `audience`, `scheduled_for`), named by its own repository.
 */
export interface ContentTable {
  kind: ContentKind;
  table: string;
}

// History

/** A workflow step (or the scheduler's) of one update or photo story. */
export interface NewPublishingEvent {
  ownerType: ContentKind;
  ownerId: number;
  action: string;
  from: PostStatus;
  to: PostStatus;
  actorId: number | null;
  actorName: string | null;
  comment: string | null;
  at: Date;
}

export async function insertPublishingEvent(q: Q, e: NewPublishingEvent): Promise<void> {
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

/** An item's workflow steps, newest first. */
export async function listPublishingEvents(q: Q, ownerType: ContentKind, ownerId: number): Promise<PublishingEvent[]> {
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

// Revisions: the columns every kind's revisions have, and the kind's own ones (mapped by its repository)

/** What every revision records besides the kind's own content. */
export interface RevisionHead {
  number: number;
  title: string;
  slug: string;
  audience: Audience;
  status: PostStatus;
  note: string | null;
  authorName: string;
  createdAt: Date;
}

export interface NewRevision {
  title: string;
  slug: string;
  audience: Audience;
  status: PostStatus;
  note: string | null;
  authorId: number | null;
  authorName: string;
  at: Date;
}

/** The columns of a revision row a kind's repository maps to and from its own content. */
export type RevisionColumns = Readonly<Record<string, unknown>>;

/** Stores the next revision of an item. The item's row is locked by the caller, so max + 1 cannot race. */
export async function insertRevision(q: Q, kind: ContentKind, ownerId: number, rev: NewRevision, columns: RevisionColumns): Promise<number> {
  const t = TABLES[kind];
  const last = await q(t.revisions).where({ [t.key]: ownerId }).max({ n: "number" }).first();
  const number = Number(last?.n ?? 0) + 1;
  await q(t.revisions).insert({
    ...columns,
    [t.key]: ownerId,
    number,
    title: rev.title,
    slug: rev.slug,
    audience: rev.audience,
    status: rev.status,
    note: rev.note,
    author_id: rev.authorId,
    author_name: rev.authorName,
    created_at: rev.at,
  });
  return number;
}

const toHead = readRow<RevisionHead>({ number: num(), title: text(), slug: text(), audience: oneOf<Audience>(), status: oneOf<PostStatus>(), note: textOrNull(), authorName: text(), createdAt: date() });

/** An item's revisions, newest first, without their content (the list of revisions). */
export async function listRevisions(q: Q, kind: ContentKind, ownerId: number): Promise<RevisionHead[]> {
  const t = TABLES[kind];
  const rows = await q(t.revisions)
    .where({ [t.key]: ownerId })
    .orderBy("number", "desc")
    .select("number", "title", "slug", "audience", "status", "note", "author_name", "created_at");
  return rows.map(toHead);
}

/** One revision with its content, read by `contentOf` (the kind's own columns). */
export async function findRevision<C>(q: Q, kind: ContentKind, ownerId: number, number: number, contentOf: (row: RevisionColumns) => C): Promise<(RevisionHead & C) | null> {
  const t = TABLES[kind];
  const r = await q(t.revisions).where({ [t.key]: ownerId, number }).first();
  return r ? { ...contentOf(r), ...toHead(r) } : null;
}

// Addresses: an item's current slug is on its content row; the ones it had are kept for redirects

/** The current address of an item that once lived at `oldSlug`, when the viewer may read it. */
export async function findRedirect(q: Q, c: ContentTable, projectId: number, oldSlug: string, viewer: Viewer): Promise<string | null> {
  const t = TABLES[c.kind];
  const r = await visibleContent(
    q(`${t.oldSlugs} as o`).join(`${c.table} as c`, "c.id", `o.${t.key}`).where({ "o.project_id": projectId, "o.slug": oldSlug }),
    viewer,
    "c",
  ).first("c.slug");
  return r ? String(r.slug) : null;
}

/** Who holds an address in a project: an item's current slug or one of its old ones. */
async function slugHolder(q: Q, c: ContentTable, projectId: number, slug: string): Promise<{ id: number; current: boolean } | null> {
  const t = TABLES[c.kind];
  const current = await q(c.table).where({ project_id: projectId, slug }).first("id");
  if (current) return { id: Number(current.id), current: true };
  const old = await q(t.oldSlugs).where({ project_id: projectId, slug }).first(t.key);
  return old ? { id: Number(old[t.key]), current: false } : null;
}

/**
 * Makes way for `to` as the item's address, keeping its current one for redirects (the caller
 * then writes the new slug): an old address of its own is taken back. False, writing nothing,
 * when another item holds `to`.
 */
export async function moveSlug(q: Q, c: ContentTable, item: { id: number; projectId: number; slug: string }, to: string): Promise<boolean> {
  const t = TABLES[c.kind];
  const holder = await slugHolder(q, c, item.projectId, to);
  if (holder && holder.id !== item.id) return false;
  if (holder && !holder.current) await q(t.oldSlugs).where({ project_id: item.projectId, slug: to, [t.key]: item.id }).delete();
  await q(t.oldSlugs)
    .insert({ project_id: item.projectId, slug: item.slug, [t.key]: item.id })
    .onConflict(["project_id", "slug"])
    .merge({ [t.key]: item.id });
  return true;
}

/**
 * A free address for a new item: the wanted one, or (when it was made from the title rather
 * than asked for) the first free of `-2`, `-3` … ; null when there is none.
 */
export async function findFreeSlug(q: Q, c: ContentTable, projectId: number, wanted: string, explicit: boolean): Promise<string | null> {
  if (!(await slugHolder(q, c, projectId, wanted))) return wanted;
  if (explicit) return null;
  for (let n = 2; n < 1000; n++) {
    const candidate = `${wanted.slice(0, 112)}-${n}`;
    if (!(await slugHolder(q, c, projectId, candidate))) return candidate;
  }
  return null;
}

// The scheduler

/**
 * Claims due scheduled items for this transaction, oldest schedule first. Rows another process
 * is publishing are skipped (SKIP LOCKED), so several processes never publish one item twice.
 */
export async function claimDue(trx: Knex.Transaction, c: ContentTable, now: Date, limit: number): Promise<number[]> {
  const rows = await trx(c.table)
    .where("status", "scheduled")
    .andWhere("scheduled_for", "<=", now)
    .orderBy("scheduled_for")
    .limit(limit)
    .forUpdate()
    .skipLocked()
    .select("id");
  return rows.map((r) => Number(r.id));
}
