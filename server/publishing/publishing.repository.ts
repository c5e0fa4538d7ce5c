import type { Knex } from "knex";
import type { ContentKind } from "#shared/domain/publishing-workflow.ts";
import type { PostStatus } from "#shared/schemas/posts.ts";
import type { PublishingEvent } from "#shared/schemas/stories.ts";

type Q = Knex | Knex.Transaction;

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
