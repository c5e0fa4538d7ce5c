import type { PressUsageTerms, PressUsageTermsInput } from "#shared/schemas/press-kits.ts";
import type { AuditService } from "../audit/audit.service.ts";
import { notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { findPressUsageTerms, updatePressUsageTerms } from "./projects.repository.ts";
import type { ProjectsService } from "./projects.service.ts";

/**
 * The line of usage terms a project prints beside its press photographs (docs/decisions/062-press-kits.md):
 * public, since every public press kit carries it; set by staff, each change in the audit log.
 */
export function createProjectPressTerms(deps: { db: Db; projects: ProjectsService; audit: AuditService; onChange?: () => void }) {
  const { db, projects, audit } = deps;

  async function termsOf(projectId: number): Promise<string | null> {
    const terms = await findPressUsageTerms(db, projectId);
    if (terms === undefined) throw notFound("That project");
    return terms;
  }

  return {
    termsOf,

    async get(slug: string): Promise<PressUsageTerms> {
      const project = await projects.get(slug);
      return { usageTerms: await termsOf(project.id) };
    },

    async set(slug: string, input: PressUsageTermsInput, actor: Actor): Promise<PressUsageTerms> {
      const project = await projects.get(slug);
      // A blank line means no terms: nothing is printed rather than an empty heading.
      const next = input.usageTerms ? input.usageTerms : null;
      await db.transaction(async (trx) => {
        const before = await findPressUsageTerms(trx, project.id);
        if (before === undefined) throw notFound("That project");
        if (before === next) return;
        await updatePressUsageTerms(trx, project.id, next);
        await audit.record({ action: "press_usage_terms_changed", actor, target: { type: "project", id: project.id, label: project.name }, detail: { from: before, to: next } }, trx);
      });
      deps.onChange?.();
      return { usageTerms: next };
    },
  };
}
export type ProjectPressTerms = ReturnType<typeof createProjectPressTerms>;
