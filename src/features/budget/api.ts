import { useQuery } from "@tanstack/react-query";
import type { BudgetChangeAnswer, BudgetChangeCreateInput, BudgetChangePatchInput, BudgetPosition, BudgetSettingsInput } from "#shared/schemas/budget.ts";
import type { Milestone } from "#shared/schemas/programme.ts";
import type { RiskAnswer } from "#shared/schemas/risks.ts";
import { api } from "../../lib/api-client.ts";
import { useQuietWrite } from "../../lib/mutations.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys } from "../../lib/query-keys.ts";

/** Keys: budget → project(slug) → kind; every write refreshes the project (a change moves the position). */
export const budgetKeys = {
  ...featureKeys("budget", ["detail", "changes", "position", "milestones", "risks"]),
  change: (id: number) => [...budgetKeys.all, "change", id] as const,
};

export const budgetProjectsQueryOptions = () => projectListQueryOptions(budgetKeys.projects());
export const budgetProjectQueryOptions = (slug: string) => projectDetailQueryOptions(budgetKeys.detail(slug), slug);

export const budgetChangesQueryOptions = (slug: string) => projectReadOptions<BudgetChangeAnswer[]>(budgetKeys.changes(slug), slug, "budget-changes");

/** The cost position today: budgets, contingency, the estimate at completion by each method, the walk. */
export const budgetPositionQueryOptions = (slug: string) => projectReadOptions<BudgetPosition>(budgetKeys.position(slug), slug, "budget");

export const budgetMilestonesQueryOptions = (slug: string) => projectReadOptions<Milestone[]>(budgetKeys.milestones(slug), slug, "milestones");
export const budgetRisksQueryOptions = (slug: string) => projectReadOptions<RiskAnswer[]>(budgetKeys.risks(slug), slug, "risks");

export const useBudgetPosition = (slug: string) => useQuery(budgetPositionQueryOptions(slug));

const useBudgetWrite = <V, R>(mutationFn: (v: V) => Promise<R>) => useQuietWrite<R, V>(budgetKeys.all, mutationFn);

export const useCreateChange = (slug: string) => useBudgetWrite((input: BudgetChangeCreateInput) => api.post<BudgetChangeAnswer>(`/api/projects/${slug}/budget-changes`, input));
export const usePatchChange = () => useBudgetWrite(({ id, patch }: { id: number; patch: BudgetChangePatchInput }) => api.patch<BudgetChangeAnswer>(`/api/budget-changes/${id}`, patch));
export const useDeleteChange = () => useBudgetWrite(({ id }: { id: number }) => api.delete<void>(`/api/budget-changes/${id}`));
export const useBudgetSettings = (slug: string) => useBudgetWrite((input: BudgetSettingsInput) => api.put<unknown>(`/api/projects/${slug}/budget/settings`, input));
