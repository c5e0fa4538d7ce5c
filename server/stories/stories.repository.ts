import type { Knex } from "knex";
import type { Audience } from "#shared/schemas/common.ts";
import type { StoryItemInput } from "#shared/schemas/stories.ts";
import type { Viewer } from "#shared/domain/audience.ts";
import { contentFinders, visibleContent } from "../publishing/publishing.audience.ts";
import { changedColumns, newDraftColumns, toWorkflowRecord, type WorkflowRecord, type WorkflowUpdate } from "../publishing/publishing.columns.ts";

type Q = Knex | Knex.Transaction;

/**
 * The content table of photo stories, for the publishing workflow's queries of its address,
 * state and schedule (server/publishing keeps the revisions, old addresses and history).
 */
export const STORIES_TABLE = "stories";

/**
 * The audience rule of photo stories (the rule of all published content, `visibleContent`):
 * visitors read published public stories, investors published public and investor ones, staff
 * all of them in every state.
 */
function visibleTo<T extends Knex.QueryBuilder>(query: T, viewer: Viewer): T {
  return visibleContent(query, viewer, "s");
}

export interface StoryRecord extends WorkflowRecord {
  intro: string;
}

function toRecord(r: Record<string, unknown>): StoryRecord {
  return { ...toWorkflowRecord(r), intro: String(r.intro ?? "") };
}

export async function insertStory(
  q: Q,
  row: { projectId: number; slug: string; title: string; intro: string; audience: Audience; authorId: number | null; authorName: string; at: Date },
): Promise<number> {
  const [id] = await q("stories").insert({ ...newDraftColumns(row), intro: row.intro });
  return Number(id);
}

export type StoryUpdate = WorkflowUpdate & { intro?: string };

export async function updateStory(q: Q, id: number, changes: StoryUpdate, at: Date): Promise<void> {
  await q("stories")
    .where({ id })
    .update({ updated_at: at, version: q.raw("version + 1"), ...changedColumns(changes, { intro: "intro" }) });
}

const finders = contentFinders("stories", toRecord);
export const findStoryById = finders.byId;
export const findVisibleStoryBySlug = finders.visibleBySlug;

export async function listStories(q: Q, projectId: number, viewer: Viewer): Promise<StoryRecord[]> {
  const rows = await visibleTo(q("stories as s").where("s.project_id", projectId), viewer)
    .orderByRaw("COALESCE(s.published_at, s.scheduled_for, s.updated_at) DESC")
    .orderBy("s.id", "desc")
    .select("s.*");
  return rows.map(toRecord);
}

export async function listPublicStoryAddresses(q: Q): Promise<Array<{ projectId: number; slug: string; updatedAt: Date }>> {
  const rows = await visibleTo(q("stories as s"), "public").select("s.project_id", "s.slug", "s.updated_at");
  return rows.map((r) => ({ projectId: Number(r.project_id), slug: String(r.slug), updatedAt: new Date(r.updated_at) }));
}

// Items

export type StoredItem = StoryItemInput;

export async function replaceItems(q: Q, storyId: number, items: readonly StoryItemInput[]): Promise<void> {
  // Deleted by primary key: a delete by story_id, even of no rows, takes a gap lock that
  // deadlocks with another story's items being written at the same moment. The story row is
  // locked by the caller (or new), so no other writer adds items to it meanwhile.
  const old = await q("story_items").where({ story_id: storyId }).pluck("id");
  if (old.length) await q("story_items").whereIn("id", old).delete();
  if (!items.length) return;
  await q("story_items").insert(
    items.map((item, position) =>
      item.kind === "photo"
        ? { story_id: storyId, position, kind: "photo", media_id: item.mediaId, after_media_id: null, area: null, caption: item.caption }
        : { story_id: storyId, position, kind: "pair", media_id: item.beforeMediaId, after_media_id: item.afterMediaId, area: item.area, caption: item.caption },
    ),
  );
}

export async function itemsOf(q: Q, storyIds: readonly number[]): Promise<Map<number, StoredItem[]>> {
  const out = new Map<number, StoredItem[]>(storyIds.map((id) => [id, []]));
  if (!storyIds.length) return out;
  const rows = await q("story_items").whereIn("story_id", [...storyIds]).orderBy(["story_id", "position"]);
  for (const r of rows) {
    const item: StoredItem =
      r.kind === "photo"
        ? { kind: "photo", mediaId: Number(r.media_id), caption: String(r.caption ?? "") }
        : { kind: "pair", area: String(r.area ?? ""), beforeMediaId: Number(r.media_id), afterMediaId: Number(r.after_media_id), caption: String(r.caption ?? "") };
    out.get(Number(r.story_id))?.push(item);
  }
  return out;
}

// Revisions (stored by server/publishing; these are the columns of a story's own content)

/** What a revision keeps of a story's own content. */
export interface StoryRevisionContent {
  intro: string;
  items: StoredItem[];
}

export function storyRevisionColumns(c: StoryRevisionContent): Record<string, unknown> {
  return { intro: c.intro, items: JSON.stringify(c.items) };
}

export function storyRevisionContent(r: Readonly<Record<string, unknown>>): StoryRevisionContent {
  return { intro: String(r.intro ?? ""), items: r.items === undefined ? [] : (JSON.parse(String(r.items)) as StoredItem[]) };
}
