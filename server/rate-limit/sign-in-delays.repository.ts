import type { Knex } from "knex";

type Q = Knex | Knex.Transaction;

export interface PairState {
  /** Failed attempts counted for the pair (0 when the record had expired). */
  failures: number;
  /** Whole seconds until the next attempt is allowed; 0 when allowed now. */
  waitSeconds: number;
}

/** The sign_in_delays table. Every time comparison uses the database's clock, the one clock all processes share. */
export class SignInDelayRepository {
  constructor(private readonly db: Knex) {}

  /**
   * Locks the pair's row for the transaction, creating it (or wiping it when expired) first,
   * so two simultaneous attempts at one pair are counted one after the other.
   */
  async lockPair(trx: Knex.Transaction, account: string, address: string, forgetAfterSeconds: number): Promise<PairState> {
    // Assignments run left to right: failures and blocked_until read expires_at before it changes.
    await trx.raw(
      `INSERT INTO sign_in_delays (account, address, failures, blocked_until, expires_at)
       VALUES (?, ?, 0, NULL, DATE_ADD(UTC_TIMESTAMP(3), INTERVAL ? SECOND))
       ON DUPLICATE KEY UPDATE
         failures = IF(expires_at <= UTC_TIMESTAMP(3), 0, failures),
         blocked_until = IF(expires_at <= UTC_TIMESTAMP(3), NULL, blocked_until),
         expires_at = IF(expires_at <= UTC_TIMESTAMP(3), VALUES(expires_at), expires_at)`,
      [account, address, forgetAfterSeconds],
    );
    const [rows] = (await trx.raw(
      `SELECT failures,
              GREATEST(0, CEIL(TIMESTAMPDIFF(MICROSECOND, UTC_TIMESTAMP(3), COALESCE(blocked_until, UTC_TIMESTAMP(3))) / 1000000)) AS wait_seconds
         FROM sign_in_delays WHERE account = ? AND address = ? FOR UPDATE`,
      [account, address],
    )) as [Array<{ failures: number; wait_seconds: number | string }>];
    const row = rows[0];
    return { failures: Number(row?.failures ?? 0), waitSeconds: Number(row?.wait_seconds ?? 0) };
  }

  /** Counts one more failure for the pair; the next attempt waits `waitSeconds` (0: none). */
  async recordFailure(trx: Knex.Transaction, account: string, address: string, failures: number, waitSeconds: number, forgetAfterSeconds: number): Promise<void> {
    await trx.raw(
      `UPDATE sign_in_delays
          SET failures = ?,
              blocked_until = IF(? > 0, DATE_ADD(UTC_TIMESTAMP(3), INTERVAL ? SECOND), NULL),
              expires_at = DATE_ADD(UTC_TIMESTAMP(3), INTERVAL ? SECOND)
        WHERE account = ? AND address = ?`,
      [failures, waitSeconds, waitSeconds, forgetAfterSeconds, account, address],
    );
  }

  async forget(account: string, address: string, q: Q = this.db): Promise<void> {
    await q("sign_in_delays").where({ account, address }).delete();
  }

  /** Removes up to `limit` expired records (they count for nothing, but would pile up). */
  async sweepExpired(limit: number): Promise<void> {
    await this.db.raw("DELETE FROM sign_in_delays WHERE expires_at <= UTC_TIMESTAMP(3) LIMIT ?", [limit]);
  }
}
