import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import { audiencesFor, type Viewer } from "#shared/domain/audience.ts";

type Q = Knex | Knex.Transaction;

/**
 * Queries every kind of published content (updates, photo stories) has in the same shape, for
 * repositories to call with their own tables: the posts repository passes the posts tables, the
 * stories repository the stories ones, so each table is still named by its own module only.
 * The content table has `id`, `project_id`, `slug`, `status`, `audience` and `scheduled_for`;
 * the old addresses `(project_id, slug)` unique with the owner's id in `key`; the revisions a
 * `number` per owner.
 */
export interface ContentTables {
  content: string;
  oldSlugs: string;
  revisions: string;
  /** The column naming the owner in the old addresses and revisions (`post_id`, `story_id`). */
  key: string;
}

/**
 * The audience rule of published content, in one place for every kind and read path: visitors
 * read published public items, investors published public and investor ones, staff every item
 * in every state. `alias` names the content table in the query.
 */
export function visibleContent<T extends Knex.QueryBuilder>(query: T, viewer: Viewer, alias: string): T {
  if (viewer === "staff") return query;
  return query.where(`${alias}.status`, "published").whereIn(`${alias}.audience`, audiencesFor(viewer) as Audience[]) as T;
}

/** The current address of an item that once lived at `oldSlug`, when the viewer may read it. */
async function findRedirect(q: Q, t: ContentTables, projectId: number, oldSlug: string, viewer: Viewer): Promise<string | null> {
  const r = await visibleContent(
    q(`${t.oldSlugs} as o`).join(`${t.content} as c`, "c.id", `o.${t.key}`).where({ "o.project_id": projectId, "o.slug": oldSlug }),
    viewer,
    "c",
  ).first("c.slug");
  return r ? String(r.slug) : null;
}

/** Who holds an address in a project: an item's current slug or one of its old ones. */
async function slugHolder(q: Q, t: ContentTables, projectId: number, slug: string): Promise<{ id: number; current: boolean } | null> {
  const current = await q(t.content).where({ project_id: projectId, slug }).first("id");
  if (current) return { id: Number(current.id), current: true };
  const old = await q(t.oldSlugs).where({ project_id: projectId, slug }).first(t.key);
  return old ? { id: Number(old[t.key]), current: false } : null;
}

/**
 * Makes way for `to` as the item's address, keeping its current one for redirects (the caller
 * then writes the new slug): an old address of its own is taken back. False, writing nothing,
 * when another item holds `to`.
 */
async function moveSlug(q: Q, t: ContentTables, item: { id: number; projectId: number; slug: string }, to: string): Promise<boolean> {
  const holder = await slugHolder(q, t, item.projectId, to);
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
async function findFreeSlug(q: Q, t: ContentTables, projectId: number, wanted: string, explicit: boolean): Promise<string | null> {
  if (!(await slugHolder(q, t, projectId, wanted))) return wanted;
  if (explicit) return null;
  for (let n = 2; n < 1000; n++) {
    const candidate = `${wanted.slice(0, 112)}-${n}`;
    if (!(await slugHolder(q, t, projectId, candidate))) return candidate;
  }
  return null;
}

/** The number of an item's next revision. The item's row is locked by the caller, so max + 1 cannot race. */
async function nextRevisionNumber(q: Q, t: ContentTables, id: number): Promise<number> {
  const r = await q(t.revisions).where({ [t.key]: id }).max({ n: "number" }).first();
  return Number(r?.n ?? 0) + 1;
}

/**
 * Claims due scheduled items for this transaction, oldest schedule first. Rows another process
 * is publishing are skipped (SKIP LOCKED), so several processes never publish one item twice.
 */
async function claimDue(trx: Knex.Transaction, t: ContentTables, now: Date, limit: number): Promise<number[]> {
  const rows = await trx(t.content)
    .where("status", "scheduled")
    .andWhere("scheduled_for", "<=", now)
    .orderBy("scheduled_for")
    .limit(limit)
    .forUpdate()
    .skipLocked()
    .select("id");
  return rows.map((r) => Number(r.id));
}

/** The shared queries bound to one kind's tables, for its repository to use and export. */
export function contentQueries(t: ContentTables) {
  return {
    findRedirect: (q: Q, projectId: number, oldSlug: string, viewer: Viewer) => findRedirect(q, t, projectId, oldSlug, viewer),
    moveSlug: (q: Q, item: { id: number; projectId: number; slug: string }, to: string) => moveSlug(q, t, item, to),
    freeSlug: (q: Q, projectId: number, wanted: string, explicit: boolean) => findFreeSlug(q, t, projectId, wanted, explicit),
    nextRevisionNumber: (q: Q, id: number) => nextRevisionNumber(q, t, id),
    claimDue: (trx: Knex.Transaction, now: Date, limit: number) => claimDue(trx, t, now, limit),
  };
}
