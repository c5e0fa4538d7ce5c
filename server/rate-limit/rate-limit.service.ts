import type { Store } from "express-rate-limit";
import type { Db } from "../db/knex.ts";
import { RateLimitRepository } from "./rate-limit.repository.ts";

/**
 * A request limit's counter shared by every app process (MariaDB), under its own prefix. Routers
 * take it as express-rate-limit's `Store`; only this module knows where the counts live.
 */
// `get` and `resetAll` are optional in Store; ours has both (tests read and reset the counts).
export function createRateLimitStore(db: Db, prefix: string): Store & Required<Pick<Store, "get" | "resetAll">> {
  return new RateLimitRepository(db, prefix);
}
