import type { Knex } from "knex";
import type { Db } from "../db/knex.ts";

/** A personal feed that has not been revoked: whose it is and for which project. */
export interface LiveFeedRecord {
  id: number;
  userId: number;
  projectId: number;
  createdAt: Date;
}

/** Revokes every live feed of a user for a project; the number revoked. */
export async function revokeFeeds(db: Db | Knex.Transaction, userId: number, projectId: number, at: Date): Promise<number> {
  return db("calendar_feeds").where({ user_id: userId, project_id: projectId }).whereNull("revoked_at").update({ revoked_at: at });
}

export async function insertFeed(trx: Knex.Transaction, feed: { userId: number; projectId: number; tokenHash: string; at: Date }): Promise<void> {
  await trx("calendar_feeds").insert({ user_id: feed.userId, project_id: feed.projectId, token_hash: feed.tokenHash, created_at: feed.at });
}

/** The live feed a token's hash names, if any. */
export async function findLiveFeed(db: Db, tokenHash: string): Promise<LiveFeedRecord | null> {
  const r = await db("calendar_feeds").where({ token_hash: tokenHash }).whereNull("revoked_at").first();
  if (!r) return null;
  return { id: Number(r.id), userId: Number(r.user_id), projectId: Number(r.project_id), createdAt: r.created_at as Date };
}
