import type { User } from "#shared/schemas/auth.ts";
import type { FacilityAnswer } from "#shared/schemas/facility.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { MitigationInput, RiskAnswer, RiskCreateInput, RiskEvent, RiskPatchInput, RiskSummary, RiskToIssueInput } from "#shared/schemas/risks.ts";
import { api } from "../../lib/api-client.ts";
import { recordApi } from "../../lib/record-api.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys, readOptions } from "../../lib/query-keys.ts";

/** A staff member who may own a risk or an action. */
export interface StaffMember {
  id: number;
  name: string;
  role: User["role"];
}

/**
 * Keys: risks → project(slug) → kind, and risks → risk(id) → events. A write refreshes the
 * whole feature: one risk's score moves the register, the summary's grid and totals, and its
 * own history at once.
 */
export const riskKeys = {
  ...featureKeys("risks", ["detail", "list", "summary", "milestones", "facility"]),
  staff: () => [...riskKeys.all, "staff"] as const,
  risk: (id: number) => [...riskKeys.all, "risk", id] as const,
  events: (id: number) => [...riskKeys.risk(id), "events"] as const,
};

export const riskProjectsQueryOptions = () => projectListQueryOptions(riskKeys.projects());
export const riskProjectQueryOptions = (slug: string) => projectDetailQueryOptions(riskKeys.detail(slug), slug);

/** Every risk and issue the caller may see (the register filters on the page). */
export const risksQueryOptions = (slug: string) => projectReadOptions<RiskAnswer[]>(riskKeys.list(slug), slug, "risks");

/** The scale, the grid of open risks and the totals. */
export const riskSummaryQueryOptions = (slug: string) => projectReadOptions<RiskSummary>(riskKeys.summary(slug), slug, "risks/summary");

/** What a risk may be linked to: milestones, and the facility's blocks and systems. */
export const riskMilestonesQueryOptions = (slug: string) => projectReadOptions<Milestone[]>(riskKeys.milestones(slug), slug, "milestones");
export const riskFacilityQueryOptions = (slug: string) => projectReadOptions<FacilityAnswer>(riskKeys.facility(slug), slug, "facility");

/** The staff who may own a risk or an action. */
export const staffQueryOptions = () => readOptions<StaffMember[]>(riskKeys.staff(), "/api/users/staff");

const record = recordApi<RiskAnswer, RiskEvent, RiskCreateInput, RiskPatchInput>("risks", riskKeys);
export const { eventsQueryOptions: riskEventsQueryOptions, useEvents: useRiskEvents, useCreate: useCreateRisk, usePatch: usePatchRisk } = record;
const useRiskWrite = record.useWrite;

export const useRiskToIssue = () => useRiskWrite(({ id, input }: { id: number; input: RiskToIssueInput }) => api.post<RiskAnswer>(`/api/risks/${id}/issue`, input));
export const useDeleteRisk = () => useRiskWrite(({ id }: { id: number }) => api.delete<void>(`/api/risks/${id}`));
export const useAddMitigation = () => useRiskWrite(({ riskId, input }: { riskId: number; input: MitigationInput }) => api.post<unknown>(`/api/risks/${riskId}/mitigations`, input));
export const usePatchMitigation = () =>
  useRiskWrite(({ id, patch }: { id: number; patch: Partial<MitigationInput> & { version: number } }) => api.patch<unknown>(`/api/mitigations/${id}`, patch));
export const useDeleteMitigation = () => useRiskWrite(({ id }: { id: number }) => api.delete<void>(`/api/mitigations/${id}`));
