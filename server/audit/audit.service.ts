import type { Knex } from "knex";
import { pageWindow } from "#shared/schemas/paging.ts";
import type { AuditAction, AuditQuery } from "#shared/schemas/users.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { insertAuditEvent, listAuditEvents } from "./audit.repository.ts";

export type { AuditAction };

export interface AuditService {
  record(
    e: { action: AuditAction; actor: Actor; actorEmail?: string; target?: { type: string; id?: string | number; label?: string }; detail?: Record<string, unknown> },
    trx?: Knex.Transaction,
  ): Promise<void>;
  /** One page of events, newest first, and how many match in all. */
  list(f: AuditQuery): ReturnType<typeof listAuditEvents>;
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
    list: ({ page, pageSize, ...filter }) => listAuditEvents(db, filter, pageWindow({ page, pageSize })),
  };
}
