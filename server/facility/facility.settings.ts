import type { FacilitySettings, FacilitySettingsInput } from "#shared/schemas/facility.ts";
import type { AuditService } from "../audit/audit.service.ts";
import { createAuditService } from "../audit/audit.service.ts";
import type { Actor } from "../core/types.ts";
import type { FacilityContext } from "./facility.context.ts";

/**
 * The facility's one setting: the commissioning level from which a unit counts as carrying its
 * load (L4 unless the lead says otherwise). It changes every redundancy "now" label and every
 * block's readiness at once, so a change is the lead's or an admin's, under the project's lock,
 * with its from and to in the audit log.
 */
export function createFacilitySettingsUseCases(ctx: FacilityContext, audit: AuditService = createAuditService(ctx.db)) {
  const { db, projects } = ctx;
  return {
    async putSettings(slug: string, input: FacilitySettingsInput, actor: Actor): Promise<FacilitySettings> {
      const project = await projects.get(slug);
      await db.transaction(async (trx) => {
        await projects.lockForWrite(trx, project.id);
        const before = await projects.availableFromLevel(trx, project.id);
        if (before === input.availableFromLevel) return;
        await projects.writeAvailableFromLevel(trx, project.id, input.availableFromLevel);
        await audit.record(
          { action: "facility_settings_changed", actor, target: { type: "project", id: project.id, label: project.name }, detail: { availableFromLevel: { from: before, to: input.availableFromLevel } } },
          trx,
        );
      });
      return { availableFromLevel: input.availableFromLevel };
    },
  };
}
