import session from "express-session";
import type { SessionData } from "express-session";
import type { Db } from "../db/knex.ts";

type Cb<T = void> = (err?: unknown, value?: T) => void;

/**
 * express-session store in MariaDB, so several app processes share sign-ins. Each row
 * carries the signed-in user's id, which lets a role change or a disable end that
 * user's sessions at once.
 */
export class SessionRepository extends session.Store {
  constructor(private readonly db: Db, private readonly defaultTtlMs: number) {
    super();
  }

  private expiry(sess: SessionData): Date {
    const exp = sess.cookie?.expires;
    return exp ? new Date(exp) : new Date(Date.now() + this.defaultTtlMs);
  }

  override get(sid: string, cb: Cb<SessionData | null>): void {
    this.db("sessions")
      .select("sess")
      .where({ sid })
      .andWhere("expires_at", ">", new Date())
      .first()
      .then((row: { sess: string } | undefined) => cb(null, row ? (JSON.parse(row.sess) as SessionData) : null))
      .catch((err: unknown) => cb(err));
  }

  override set(sid: string, sess: SessionData, cb?: Cb): void {
    const userId = (sess as SessionData & { passport?: { user?: number } }).passport?.user ?? null;
    this.db("sessions")
      .insert({ sid, sess: JSON.stringify(sess), expires_at: this.expiry(sess), user_id: userId })
      .onConflict("sid")
      .merge()
      .then(() => cb?.())
      .catch((err: unknown) => cb?.(err));
  }

  override touch(sid: string, sess: SessionData, cb?: Cb): void {
    this.db("sessions")
      .where({ sid })
      .update({ expires_at: this.expiry(sess) })
      .then(() => cb?.())
      .catch((err: unknown) => cb?.(err));
  }

  override destroy(sid: string, cb?: Cb): void {
    this.db("sessions")
      .where({ sid })
      .delete()
      .then(() => cb?.())
      .catch((err: unknown) => cb?.(err));
  }

  /** Ends every session of one user, optionally sparing one (the caller's own). */
  async destroyForUser(userId: number, exceptSid?: string): Promise<number> {
    const q = this.db("sessions").where({ user_id: userId });
    if (exceptSid) q.whereNot({ sid: exceptSid });
    return q.delete();
  }

  /** Deletes the sessions that have expired by `at`; how many went. (A worker's sweep calls it.) */
  async deleteExpired(at: Date = new Date()): Promise<number> {
    return this.db("sessions").where("expires_at", "<=", at).delete();
  }
}
