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
  | "cost_actual_recorded"
  // Facility writes (server/facility): blocks, plant systems, their units, site features.
  | "facility_block_created"
  | "facility_block_updated"
  | "facility_block_deleted"
  | "facility_system_created"
  | "facility_system_updated"
  | "facility_system_deleted"
  | "facility_unit_created"
  | "facility_unit_updated"
  | "facility_unit_stage_changed"
  | "facility_unit_deleted"
  | "facility_feature_created"
  | "facility_feature_updated"
  | "facility_feature_deleted";

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
