import type { DecisionAnswer, DecisionCreateInput, DecisionEvent, DecisionOutcomeInput, DecisionPatchInput } from "#shared/schemas/decisions.ts";
import type { DocumentAnswer } from "#shared/schemas/documents.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { RiskAnswer } from "#shared/schemas/risks.ts";
import { api } from "../../lib/api-client.ts";
import { recordApi } from "../../lib/record-api.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys } from "../../lib/query-keys.ts";

/** Keys: decisions → project(slug) → kind, and decisions → decision(id) → events. */
export const decisionKeys = {
  ...featureKeys("decisions", ["detail", "list", "milestones", "risks", "documents"]),
  decision: (id: number) => [...decisionKeys.all, "decision", id] as const,
  events: (id: number) => [...decisionKeys.decision(id), "events"] as const,
};

export const decisionProjectsQueryOptions = () => projectListQueryOptions(decisionKeys.projects());
export const decisionProjectQueryOptions = (slug: string) => projectDetailQueryOptions(decisionKeys.detail(slug), slug);

/** The decisions the caller may see, as the server orders them: open first, overdue first, then by needed-by. */
export const decisionsQueryOptions = (slug: string) => projectReadOptions<DecisionAnswer[]>(decisionKeys.list(slug), slug, "decisions");

/** What a decision may be linked to or carry: milestones, risks, documents of the library. */
export const decisionMilestonesQueryOptions = (slug: string) => projectReadOptions<Milestone[]>(decisionKeys.milestones(slug), slug, "milestones");
export const decisionRisksQueryOptions = (slug: string) => projectReadOptions<RiskAnswer[]>(decisionKeys.risks(slug), slug, "risks");
export const decisionDocumentsQueryOptions = (slug: string) => projectReadOptions<DocumentAnswer[]>(decisionKeys.documents(slug), slug, "documents");

const record = recordApi<DecisionAnswer, DecisionEvent, DecisionCreateInput, DecisionPatchInput>("decisions", decisionKeys);
export const { eventsQueryOptions: decisionEventsQueryOptions, useEvents: useDecisionEvents, useCreate: useCreateDecision, usePatch: usePatchDecision } = record;
const useDecisionWrite = record.useWrite;

export const useRecordOutcome = () => useDecisionWrite(({ id, input }: { id: number; input: DecisionOutcomeInput }) => api.post<DecisionAnswer>(`/api/decisions/${id}/outcome`, input));
export const useWithdrawDecision = () => useDecisionWrite(({ id, reason, version }: { id: number; reason: string; version: number }) => api.post<DecisionAnswer>(`/api/decisions/${id}/withdraw`, { reason, version }));
