import { queryOptions, useQuery } from "@tanstack/react-query";
import type { BudgetChangeAnswer, BudgetChangeCreateInput, BudgetChangePatchInput, BudgetPosition, BudgetSettingsInput } from "#shared/schemas/budget.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { RiskAnswer } from "#shared/schemas/risks.ts";
import { api } from "../../lib/api-client.ts";
import { useRefreshingMutation } from "../../lib/mutations.ts";
import { projectDetailQueryOptions, projectListQueryOptions } from "../../lib/projects.ts";
import { featureKeys } from "../../lib/query-keys.ts";

/** Keys: budget → project(slug) → kind; every write refreshes the project (a change moves the position). */
export const budgetKeys = {
  ...featureKeys("budget"),
  detail: (slug: string) => [...budgetKeys.project(slug), "detail"] as const,
  changes: (slug: string) => [...budgetKeys.project(slug), "changes"] as const,
  position: (slug: string) => [...budgetKeys.project(slug), "position"] as const,
  milestones: (slug: string) => [...budgetKeys.project(slug), "milestones"] as const,
  risks: (slug: string) => [...budgetKeys.project(slug), "risks"] as const,
  change: (id: number) => [...budgetKeys.all, "change", id] as const,
};

export const budgetProjectsQueryOptions = () => projectListQueryOptions(budgetKeys.projects());
export const budgetProjectQueryOptions = (slug: string) => projectDetailQueryOptions(budgetKeys.detail(slug), slug);

export const budgetChangesQueryOptions = (slug: string) =>
  queryOptions({ queryKey: budgetKeys.changes(slug), queryFn: () => api.get<BudgetChangeAnswer[]>(`/api/projects/${slug}/budget-changes`), enabled: slug !== "" });

/** The cost position today: budgets, contingency, the estimate at completion by each method, the walk. */
export const budgetPositionQueryOptions = (slug: string) =>
  queryOptions({ queryKey: budgetKeys.position(slug), queryFn: () => api.get<BudgetPosition>(`/api/projects/${slug}/budget`), enabled: slug !== "" });

export const budgetMilestonesQueryOptions = (slug: string) =>
  queryOptions({ queryKey: budgetKeys.milestones(slug), queryFn: () => api.get<Milestone[]>(`/api/projects/${slug}/milestones`), enabled: slug !== "" });
export const budgetRisksQueryOptions = (slug: string) =>
  queryOptions({ queryKey: budgetKeys.risks(slug), queryFn: () => api.get<RiskAnswer[]>(`/api/projects/${slug}/risks`), enabled: slug !== "" });

export const useBudgetPosition = (slug: string) => useQuery(budgetPositionQueryOptions(slug));

const useBudgetWrite = <V, R>(mutationFn: (v: V) => Promise<R>) => useRefreshingMutation<R, V>(budgetKeys.all, { mutationFn, meta: { quiet: true } });

export const useCreateChange = (slug: string) => useBudgetWrite((input: BudgetChangeCreateInput) => api.post<BudgetChangeAnswer>(`/api/projects/${slug}/budget-changes`, input));
export const usePatchChange = () => useBudgetWrite(({ id, patch }: { id: number; patch: BudgetChangePatchInput }) => api.patch<BudgetChangeAnswer>(`/api/budget-changes/${id}`, patch));
export const useDeleteChange = () => useBudgetWrite(({ id }: { id: number }) => api.delete<void>(`/api/budget-changes/${id}`));
export const useBudgetSettings = (slug: string) => useBudgetWrite((input: BudgetSettingsInput) => api.put<unknown>(`/api/projects/${slug}/budget/settings`, input));
