/**
 * A statement or transaction that lost a lock race: InnoDB chose it as a deadlock's victim
 * (a Galera certification conflict is reported the same way), so it was rolled back whole and
 * can simply run again.
 */
export function isDeadlock(err: unknown): boolean {
  const e = err as { code?: unknown; errno?: unknown } | null;
  return e?.code === "ER_LOCK_DEADLOCK" || e?.errno === 1213;
}

/**
 * Runs `work` (one statement, or a whole `db.transaction`) and runs it again, after a short
 * growing wait with jitter, when it was a deadlock's victim. `work` must be safe to repeat as a
 * whole: a rolled-back transaction wrote nothing. Any other error, or the last attempt's
 * deadlock, is thrown as it came.
 */
export async function retryOnDeadlock<T>(work: () => Promise<T>, opts: { attempts?: number; baseMs?: number } = {}): Promise<T> {
  const attempts = opts.attempts ?? 5;
  const baseMs = opts.baseMs ?? 15;
  for (let attempt = 1; ; attempt += 1) {
    try {
      return await work();
    } catch (err) {
      if (!isDeadlock(err) || attempt >= attempts) throw err;
      const wait = baseMs * 2 ** (attempt - 1);
      await new Promise((resolve) => setTimeout(resolve, wait / 2 + Math.random() * wait));
    }
  }
}
