import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { User } from "#shared/schemas/auth.ts";
import type {
  BlockAnswer,
  BlockCreateInput,
  BlockPatchInput,
  FacilityAnswer,
  FacilityEvent,
  FeatureAnswer,
  FeatureCreateInput,
  FeaturePatchInput,
  SystemAnswer,
  SystemCreateInput,
  SystemPatchInput,
  UnitAnswer,
  UnitCreateInput,
  UnitPatchInput,
  UnitStageInput,
  FacilitySettings,
  FacilitySettingsInput,
} from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import { api, ApiError } from "../../lib/api-client.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys, readOptions } from "../../lib/query-keys.ts";

/**
 * Keys: facility → project(slug) → kind, and facility → unit(id) → events. Every write
 * invalidates the project's key: one unit's stage changes its system's label and the
 * readiness of every block the system serves, so nothing narrower is safe.
 */
export const facilityKeys = {
  ...featureKeys("facility", ["detail", "facility", "milestones", "events"]),
  unit: (id: number) => [...facilityKeys.all, "unit", id] as const,
  unitEvents: (id: number) => [...facilityKeys.unit(id), "events"] as const,
};

export const facilityProjectsQueryOptions = () => projectListQueryOptions(facilityKeys.projects());

export const facilityProjectQueryOptions = (slug: string) => projectDetailQueryOptions(facilityKeys.detail(slug), slug);

export const facilityQueryOptions = (slug: string) => projectReadOptions<FacilityAnswer>(facilityKeys.facility(slug), slug, "facility");

/** The programme's milestones: what a block may depend on, and the dates its readiness is worked from. */
export const facilityMilestonesQueryOptions = (slug: string) => projectReadOptions<Milestone[]>(facilityKeys.milestones(slug), slug, "milestones");

export const facilityEventsQueryOptions = (slug: string) => projectReadOptions<FacilityEvent[]>(facilityKeys.events(slug), slug, "facility/events");

export const unitEventsQueryOptions = (id: number) =>
  readOptions<FacilityEvent[]>(facilityKeys.unitEvents(id), `/api/facility/units/${id}/events`);

export const useFacilityEvents = (slug: string) => useQuery(facilityEventsQueryOptions(slug));
export const useUnitEvents = (id: number) => useQuery(unitEventsQueryOptions(id));

/** Lead and admin keep the facility; marketing reads it. */
export function canEditFacility(user: User | null | undefined): boolean {
  return user?.role === "lead" || user?.role === "admin";
}

/** The body of a 409: the row as it is now, so a form can say what changed. */
export function conflictCurrent<T>(e: unknown): T | null {
  if (!(e instanceof ApiError) || e.status !== 409) return null;
  const body = e.body as { error?: { current?: T } } | null;
  return body?.error?.current ?? null;
}

/** A write to the facility of `slug`: forms show their own errors, and the whole facility is read again after it. */
function useFacilityWrite<V, R>(slug: string, write: (vars: V) => Promise<R>, unitOf?: (vars: V) => number | undefined) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: write,
    meta: { quiet: true },
    onSettled: (_data, _err, vars) => {
      void qc.invalidateQueries({ queryKey: facilityKeys.project(slug) });
      const unit = unitOf?.(vars);
      if (unit !== undefined) void qc.invalidateQueries({ queryKey: facilityKeys.unit(unit) });
    },
  });
}

export const useCreateBlock = (slug: string) => useFacilityWrite(slug, (input: BlockCreateInput) => api.post<BlockAnswer>(`/api/projects/${slug}/facility/blocks`, input));
export const usePatchBlock = (slug: string) => useFacilityWrite(slug, ({ id, patch }: { id: number; patch: BlockPatchInput }) => api.patch<BlockAnswer>(`/api/facility/blocks/${id}`, patch));
export const useDeleteBlock = (slug: string) => useFacilityWrite(slug, ({ id }: { id: number }) => api.delete<void>(`/api/facility/blocks/${id}`));

export const useCreateSystem = (slug: string) => useFacilityWrite(slug, (input: SystemCreateInput) => api.post<SystemAnswer>(`/api/projects/${slug}/facility/systems`, input));
export const usePatchSystem = (slug: string) => useFacilityWrite(slug, ({ id, patch }: { id: number; patch: SystemPatchInput }) => api.patch<SystemAnswer>(`/api/facility/systems/${id}`, patch));
export const useDeleteSystem = (slug: string) => useFacilityWrite(slug, ({ id }: { id: number }) => api.delete<void>(`/api/facility/systems/${id}`));

export const useCreateUnit = (slug: string) =>
  useFacilityWrite(slug, ({ systemId, input }: { systemId: number; input: UnitCreateInput }) => api.post<UnitAnswer>(`/api/facility/systems/${systemId}/units`, input));
export const usePatchUnit = (slug: string) =>
  useFacilityWrite(slug, ({ id, patch }: { id: number; patch: UnitPatchInput }) => api.patch<UnitAnswer>(`/api/facility/units/${id}`, patch), (v) => v.id);
export const useSetUnitStage = (slug: string) =>
  useFacilityWrite(slug, ({ id, input }: { id: number; input: UnitStageInput }) => api.post<UnitAnswer>(`/api/facility/units/${id}/stage`, input), (v) => v.id);

export const usePutFacilitySettings = (slug: string) =>
  useFacilityWrite(slug, (input: FacilitySettingsInput) => api.put<FacilitySettings>(`/api/projects/${slug}/facility/settings`, input));

export const useCreateFeature = (slug: string) => useFacilityWrite(slug, (input: FeatureCreateInput) => api.post<FeatureAnswer>(`/api/projects/${slug}/facility/features`, input));
export const usePatchFeature = (slug: string) => useFacilityWrite(slug, ({ id, patch }: { id: number; patch: FeaturePatchInput }) => api.patch<FeatureAnswer>(`/api/facility/features/${id}`, patch));
export const useDeleteFeature = (slug: string) => useFacilityWrite(slug, ({ id }: { id: number }) => api.delete<void>(`/api/facility/features/${id}`));
