import { FEATURE_STATUSES, type FeatureAnswer, type FeatureCreateInput, type FeaturePatchInput } from "#shared/schemas/facility.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { Actor } from "../core/types.ts";
import { changeDetail, conflict, invalid, type FacilityContext } from "./facility.context.ts";
import type { FigureUseCases } from "./facility.figures.ts";
import { deleteFeature, findFeature, insertFeature, updateFeature, type FeatureFields } from "./facility.repository.ts";

const fieldsOf = (f: FeatureFields): FeatureFields => ({ kind: f.kind, name: f.name, detail: f.detail, layer: f.layer, status: f.status, statusDate: f.statusDate, audience: f.audience });

/** Site features for prospects (security layers, client facilities, connectivity, certifications): entering, editing, deleting. */
export function createFeatureUseCases(ctx: FacilityContext, figures: Pick<FigureUseCases, "staffFacility">) {
  const { now, addTo, change, recordCreate, recordUpdate, recordDelete } = ctx;

  const answer = async (w: { project: Project; result: number }): Promise<FeatureAnswer> => (await figures.staffFacility(w.project)).features.find((f) => f.id === w.result)!;

  return {
    async createFeature(slug: string, input: FeatureCreateInput, actor: Actor): Promise<FeatureAnswer> {
      return answer(
        await addTo(slug, async (trx, project) => {
          const at = now();
          const id = await insertFeature(trx, project.id, fieldsOf(input), at);
          await recordCreate(trx, actor, project, { action: "facility_feature_created", subject: "feature", id, name: input.name, to: input.status, at, detail: { ...fieldsOf(input) } });
          return id;
        }),
      );
    },

    /** The kind is fixed once entered; the status and layer given are checked against it. */
    async patchFeature(id: number, input: FeaturePatchInput, actor: Actor): Promise<FeatureAnswer> {
      return answer(
        await change("feature", id, findFeature, async (trx, before, project) => {
          if (before.version !== input.version) throw conflict("feature", before);
          const { version: _version, ...given } = input;
          const next: FeatureFields = { ...fieldsOf(before), ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)) };
          const changes = changeDetail({ ...fieldsOf(before) }, { ...next });
          if (Object.keys(changes).length === 0) return id;
          const fields: Record<string, string> = {};
          if (!FEATURE_STATUSES[next.kind].includes(next.status)) fields.status = `must be one of ${FEATURE_STATUSES[next.kind].join(", ")} for ${next.kind}`;
          if (next.kind === "security" && !next.layer) fields.layer = "is required for security";
          if (next.kind !== "security" && next.layer) fields.layer = "applies to security only";
          if (Object.keys(fields).length > 0) throw invalid(fields);
          const at = now();
          if ((await updateFeature(trx, id, before.version, next, at)) === 0) throw conflict("feature", await findFeature(trx, id));
          await recordUpdate(trx, actor, project, { action: "facility_feature_updated", subject: "feature", id, name: next.name, was: { ...fieldsOf(before) }, will: { ...next }, at });
          return id;
        }),
      );
    },

    async deleteFeature(id: number, actor: Actor): Promise<void> {
      await change("feature", id, findFeature, async (trx, f, project) => {
        await deleteFeature(trx, id);
        await recordDelete(trx, actor, project, { action: "facility_feature_deleted", subject: "feature", id, name: f.name, from: f.status, detail: { feature: fieldsOf(f) } });
      });
    },
  };
}
