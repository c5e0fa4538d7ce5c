import type { Db } from "../db/knex.ts";
import { retryOnDeadlock } from "../db/retry.ts";
import { SignInDelayRepository } from "./sign-in-delays.repository.ts";

/** The longest wait between two attempts at one account from one address (seconds). */
export const MAX_SIGN_IN_WAIT_SECONDS = 300;

/**
 * Seconds the next attempt from the same address must wait after the `failures`-th failed
 * sign-in at an account: none before `free` failures, then 2, 4, 8 … up to `cap`.
 */
export function signInWaitSeconds(failures: number, free: number, cap = MAX_SIGN_IN_WAIT_SECONDS): number {
  if (failures < free) return 0;
  return Math.min(2 ** (failures - free + 1), cap);
}

export interface SignInDelays {
  /**
   * Call before checking a password. While the pair must wait, answers the seconds left and
   * counts nothing; otherwise counts the attempt as a failure in advance (so simultaneous
   * guesses are counted too) and answers 0.
   */
  begin(account: string, address: string): Promise<number>;
  /** The password was right: the pair starts afresh (other addresses keep their waits). */
  succeeded(account: string, address: string): Promise<void>;
}

/**
 * Slows password guessing at one account from one address without ever locking the owner
 * out: the wait belongs to the (account, address) pair, so the right password from another
 * address is never refused. A pair is forgotten `forgetAfterMs` after its last attempt.
 */
export function createSignInDelays(deps: { db: Db; freeFailures: number; forgetAfterMs: number; maxWaitSeconds?: number }): SignInDelays {
  const repo = new SignInDelayRepository(deps.db);
  const cap = deps.maxWaitSeconds ?? MAX_SIGN_IN_WAIT_SECONDS;
  // Never forget a pair while it still has to wait.
  const forgetAfterSeconds = Math.max(Math.ceil(deps.forgetAfterMs / 1000), cap);
  const key = (account: string) => account.trim().toLowerCase();

  return {
    async begin(account, address) {
      // Simultaneous sign-ins insert and lock neighbouring rows of one index: InnoDB may pick one as
      // a deadlock's victim, which rolled back whole and runs again (never a 500 for a right password).
      const wait = await retryOnDeadlock(() => deps.db.transaction(async (trx) => {
        const pair = await repo.lockPair(trx, key(account), address, forgetAfterSeconds);
        if (pair.waitSeconds > 0) return pair.waitSeconds;
        const failures = pair.failures + 1;
        await repo.recordFailure(trx, key(account), address, failures, signInWaitSeconds(failures, deps.freeFailures, cap), forgetAfterSeconds);
        return 0;
      }));
      // Tidying only: a sweep that loses a lock race is left to the next sign-in.
      if (wait === 0) await repo.sweepExpired(50).catch(() => undefined);
      return wait;
    },
    async succeeded(account, address) {
      await retryOnDeadlock(() => repo.forget(key(account), address));
    },
  };
}
