import type { Knex } from "knex";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { insertAuditEvent, listAuditEvents } from "./audit.repository.ts";

export type AuditAction =
  | "sign_in"
  | "sign_in_failed"
  | "sign_out"
  | "invitation_sent"
  | "invitation_accepted"
  | "password_reset_requested"
  | "password_reset"
  | "role_changed"
  | "user_disabled"
  | "user_enabled"
  // Programme writes (server/programme): who changed the record, and what.
  | "milestone_created"
  | "milestone_updated"
  | "milestone_removed"
  | "milestone_restored"
  | "milestone_deleted"
  | "milestones_shifted"
  | "programme_rebaselined"
  | "programme_imported"
  | "cost_actual_recorded";

export interface AuditService {
  record(
    e: { action: AuditAction; actor: Actor; actorEmail?: string; target?: { type: string; id?: string | number; label?: string }; detail?: Record<string, unknown> },
    trx?: Knex.Transaction,
  ): Promise<void>;
  list(f: { action?: string; before?: number; limit: number }): ReturnType<typeof listAuditEvents>;
}

export function createAuditService(db: Db): AuditService {
  return {
    async record(e, trx) {
      await insertAuditEvent(trx ?? db, {
        actorId: e.actor.user?.id ?? null,
        actorEmail: e.actorEmail ?? e.actor.user?.email ?? null,
        action: e.action,
        targetType: e.target?.type ?? null,
        targetId: e.target?.id ?? null,
        targetLabel: e.target?.label ?? null,
        ip: e.actor.ip,
        detail: e.detail ?? null,
      });
    },
    list: (f) => listAuditEvents(db, f),
  };
}
