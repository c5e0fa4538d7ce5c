import type { Knex } from "knex";
import type { AuditEvent } from "#shared/schemas/users.ts";
import { countOf } from "../db/rows.ts";

type Q = Knex | Knex.Transaction;

export interface AuditInsert {
  actorId: number | null;
  actorEmail: string | null;
  action: string;
  targetType?: string | null;
  targetId?: string | number | null;
  targetLabel?: string | null;
  ip: string | null;
  detail?: Record<string, unknown> | null;
}

export async function insertAuditEvent(q: Q, e: AuditInsert): Promise<void> {
  await q("audit_events").insert({
    actor_id: e.actorId,
    actor_email: e.actorEmail,
    action: e.action,
    target_type: e.targetType ?? null,
    target_id: e.targetId == null ? null : String(e.targetId),
    target_label: e.targetLabel ?? null,
    ip: e.ip,
    detail: e.detail ? JSON.stringify(e.detail) : null,
  });
}

/** One page of events, newest first, with how many match in all. */
export async function listAuditEvents(
  q: Q,
  f: { action?: string; before?: number },
  window: { offset: number; limit: number },
): Promise<{ items: AuditEvent[]; total: number }> {
  const matching = () => {
    const query = q("audit_events");
    if (f.action) query.where({ action: f.action });
    if (f.before) query.where("id", "<", f.before);
    return query;
  };
  const [rows, total] = await Promise.all([matching().orderBy("id", "desc").offset(window.offset).limit(window.limit), countOf(matching())]);
  const items = rows.map((r: Record<string, unknown>) => ({
    id: Number(r.id),
    at: (r.at as Date).toISOString(),
    actorEmail: (r.actor_email as string | null) ?? null,
    action: String(r.action),
    targetType: (r.target_type as string | null) ?? null,
    targetId: (r.target_id as string | null) ?? null,
    targetLabel: (r.target_label as string | null) ?? null,
    ip: (r.ip as string | null) ?? null,
    detail: r.detail ? (JSON.parse(String(r.detail)) as Record<string, unknown>) : null,
  }));
  return { items, total };
}
