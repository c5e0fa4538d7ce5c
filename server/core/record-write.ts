import type { Knex } from "knex";
import type { Actor } from "./types.ts";

/**
 * How a write to the facility or the investor record (risks, decisions, budget, documents) leaves
 * its trace, in the write's transaction: its events, each stamped with the project and the person
 * who wrote, in the module's own event table, and one audit entry naming the project. Each module
 * says what its events are, which table takes them (its repository) and what the entry is about.
 */

/** The audit log as a write uses it (server/audit keeps it; core names no module). */
export interface WriteAudit<Action extends string> {
  record(e: { action: Action; actor: Actor; target?: { type: string; id?: string | number; label?: string }; detail?: Record<string, unknown> }, trx?: Knex.Transaction): Promise<void>;
}

/** What every event of a write carries from the write itself. */
export interface WriteStamp {
  projectId: number;
  byUserId: number | null;
}

export interface RecordWrite<Action extends string, E> {
  action: Action;
  /** What the audit entry is about. */
  target: { type: string; id: number; label: string };
  /** The events, without the project and the writer (stamped here). */
  events: readonly E[];
  detail: Record<string, unknown>;
}

/**
 * A module's `recordWrite`: `insertEvents` is its repository's insert into its event table. The
 * events go first, then the audit entry, both in `trx`, so a write that fails leaves neither.
 */
export function recordWriter<Action extends string, E extends WriteStamp>(audit: WriteAudit<Action>, insertEvents: (trx: Knex.Transaction, events: readonly E[]) => Promise<void>) {
  return async function recordWrite(trx: Knex.Transaction, actor: Actor, project: { id: number; slug: string }, w: RecordWrite<Action, Omit<E, keyof WriteStamp>>): Promise<void> {
    const stamp: WriteStamp = { projectId: project.id, byUserId: actor.user?.id ?? null };
    // An event without its stamp, stamped, is the event again (TypeScript cannot see that of an unknown E).
    await insertEvents(
      trx,
      w.events.map((e) => ({ ...e, ...stamp }) as E),
    );
    await audit.record({ action: w.action, actor, target: w.target, detail: { project: project.slug, ...w.detail } }, trx);
  };
}
