import type { Knex } from "knex";
import type { AuditEvent } from "#shared/schemas/users.ts";

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

export async function listAuditEvents(
  q: Q,
  f: { action?: string; before?: number; limit: number },
): Promise<AuditEvent[]> {
  const query = q("audit_events").orderBy("id", "desc").limit(f.limit);
  if (f.action) query.where({ action: f.action });
  if (f.before) query.where("id", "<", f.before);
  const rows = await query;
  return rows.map((r: Record<string, unknown>) => ({
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
}
