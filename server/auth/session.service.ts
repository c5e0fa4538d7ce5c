import type { Db } from "../db/knex.ts";
import { SessionRepository } from "./session.repository.ts";

/**
 * The sign-in sessions in MariaDB, shared by every web process: express-session's store, the
 * auth service's "end this user's sessions", and the sweep of expired rows a worker runs.
 * `idleMs` is the lifetime of a session whose cookie carries no expiry of its own.
 */
export function createSessionStore(db: Db, idleMs: number): SessionRepository {
  return new SessionRepository(db, idleMs);
}
