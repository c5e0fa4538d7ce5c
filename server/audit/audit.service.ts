import type { Knex } from "knex";
import { pageWindow } from "#shared/schemas/paging.ts";
import type { AuditQuery } from "#shared/schemas/users.ts";
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
  | "facility_feature_deleted"
  // The site plan (server/site-plan): its areas.
  | "site_area_created"
  | "site_area_updated"
  | "site_area_deleted"
  // Risks and issues register (server/risks): entries, the risk → issue step, mitigation actions.
  | "risk_created"
  | "risk_updated"
  | "risk_deleted"
  | "risk_became_issue"
  | "issue_created"
  | "issue_updated"
  | "issue_deleted"
  | "risk_mitigation_added"
  | "risk_mitigation_updated"
  | "risk_mitigation_deleted"
  // Decisions needed (server/decisions): requests, their outcome or withdrawal.
  | "decision_created"
  | "decision_updated"
  | "decision_decided"
  | "decision_withdrawn"
  // Budget writes (server/budget): changes, and the contingency and projected final cost settings.
  | "budget_change_created"
  | "budget_change_updated"
  | "budget_change_deleted"
  | "budget_settings_changed"
  // Investor organisations (server/users).
  | "organisation_created"
  | "user_organisation_changed"
  // The document library (server/documents): documents, their versions.
  | "document_created"
  | "document_version_added"
  | "document_updated"
  | "document_deleted"
  // Monthly investor reports (server/reports): drafts, commentary, issue, corrections.
  | "report_drafted"
  | "report_updated"
  | "report_issued"
  | "report_correction_drafted"
  // The project's hero photograph (server/projects/projects.hero.ts).
  | "project_hero_changed"
  // Press kits (server/press-kits): the project's usage terms, and staff downloads of a kit.
  | "press_usage_terms_changed"
  | "press_kit_downloaded"
  // Review links (server/review-links): made, revoked, and each opening and answer by the outside reviewer.
  | "review_link_created"
  | "review_link_revoked"
  | "review_link_opened"
  | "review_link_answered";

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
