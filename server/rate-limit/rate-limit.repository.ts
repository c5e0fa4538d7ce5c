import type { ClientRateLimitInfo, Options, Store } from "express-rate-limit";
import type { Db } from "../db/knex.ts";
import { retryOnDeadlock } from "../db/retry.ts";

/**
 * A shared counter for express-rate-limit in MariaDB, so a limit holds across every app
 * process behind a load balancer (the in-memory store counts per process).
 */
export class RateLimitRepository implements Store {
  windowMs = 60_000;
  prefix: string;
  localKeys = false;

  constructor(private readonly db: Db, prefix: string) {
    this.prefix = prefix;
  }

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  private k(key: string): string {
    return `${this.prefix}:${key}`.slice(0, 255);
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const row = await this.db("rate_limit_hits").where({ key: this.k(key) }).first();
    if (!row || new Date(row.reset_at) <= new Date()) return undefined;
    return { totalHits: Number(row.hits), resetTime: new Date(row.reset_at) };
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const k = this.k(key);
    const resetAt = new Date(Date.now() + this.windowMs);
    // Assignments run left to right: `hits` must be decided before `reset_at` changes.
    await retryOnDeadlock(() => this.db.raw(
      `INSERT INTO rate_limit_hits (\`key\`, hits, reset_at) VALUES (?, 1, ?)
       ON DUPLICATE KEY UPDATE
         hits = IF(reset_at <= UTC_TIMESTAMP(3), 1, hits + 1),
         reset_at = IF(reset_at <= UTC_TIMESTAMP(3), VALUES(reset_at), reset_at)`,
      [k, resetAt],
    ));
    const row = await this.db("rate_limit_hits").where({ key: k }).first();
    return { totalHits: Number(row?.hits ?? 1), resetTime: new Date(row?.reset_at ?? resetAt) };
  }

  async decrement(key: string): Promise<void> {
    await retryOnDeadlock(() => this.db("rate_limit_hits").where({ key: this.k(key) }).andWhere("hits", ">", 0).decrement("hits", 1));
  }

  async resetKey(key: string): Promise<void> {
    await this.db("rate_limit_hits").where({ key: this.k(key) }).delete();
  }

  async resetAll(): Promise<void> {
    await this.db("rate_limit_hits").where("key", "like", `${this.prefix}:%`).delete();
  }
}
