import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from "@tanstack/react-query";
import type { z } from "zod";
import type { User } from "#shared/schemas/auth.ts";
import type {
  BaselineInput,
  BaselineVersion,
  CsvImportResult,
  CurveResponse,
  Milestone,
  MilestoneListQuerySchema,
  MilestoneMovesRow,
  MilestoneEventRow,
  MilestonePatchInput,
  MilestoneRemovalInput,
  ProgrammeHealthResponse,
  ShiftInput,
} from "#shared/schemas/programme.ts";
import type { DrivingLink } from "#shared/domain/programme-dependencies.ts";
import { api, ApiError, qs } from "../../lib/api-client.ts";
import { useRefreshingMutation } from "../../lib/mutations.ts";
import { projectDetailQueryOptions, projectListQueryOptions, projectReadOptions } from "../../lib/projects.ts";
import { featureKeys, readOptions } from "../../lib/query-keys.ts";

/** The list's filters, as the milestones route reads its query (the status date aside). */
export type MilestoneFilters = Omit<z.input<typeof MilestoneListQuerySchema>, "at">;

/** The milestones removed from the programme, on their own. */
export const REMOVED_ONLY: MilestoneFilters = { removed: "only" };

/**
 * Keys: programme → project(slug) → kind → params, and programme → milestone(id) → kind.
 * Invalidating a project's key refreshes every figure derived from its milestones.
 */
export const programmeKeys = {
  ...featureKeys("programme", ["detail", "baselines"]),
  milestones: (slug: string, f: MilestoneFilters = {}) => [...programmeKeys.project(slug), "milestones", f] as const,
  health: (slug: string, at?: string) => [...programmeKeys.project(slug), "health", at ?? "today"] as const,
  curve: (slug: string, range: { from: string; to: string }) => [...programmeKeys.project(slug), "curve", range] as const,
  moves: (slug: string, range: { from: string; to: string }) => [...programmeKeys.project(slug), "moves", range] as const,
  milestone: (id: number) => [...programmeKeys.all, "milestone", id] as const,
  events: (id: number) => [...programmeKeys.milestone(id), "events"] as const,
  drivers: (id: number) => [...programmeKeys.milestone(id), "drivers"] as const,
};

export const programmeProjectsQueryOptions = () => projectListQueryOptions(programmeKeys.projects());

export const programmeProjectQueryOptions = (slug: string) => projectDetailQueryOptions(programmeKeys.detail(slug), slug);

export const milestonesQueryOptions = (slug: string, f: MilestoneFilters = {}) =>
  queryOptions({
    queryKey: programmeKeys.milestones(slug, f),
    queryFn: () => api.get<Milestone[]>(`/api/projects/${slug}/milestones${qs({ ...f })}`),
    enabled: slug !== "",
  });

export const healthQueryOptions = (slug: string, at?: string) =>
  queryOptions({
    queryKey: programmeKeys.health(slug, at),
    queryFn: () => api.get<ProgrammeHealthResponse>(`/api/projects/${slug}/health${qs({ at })}`),
    enabled: slug !== "",
  });

export const curveQueryOptions = (slug: string, range: { from: string; to: string }) =>
  queryOptions({
    queryKey: programmeKeys.curve(slug, range),
    queryFn: () => api.get<CurveResponse>(`/api/projects/${slug}/curve${qs({ ...range, step: 7 })}`),
    enabled: slug !== "" && range.from !== "" && range.to !== "",
  });

export const movesQueryOptions = (slug: string, range: { from: string; to: string }) =>
  queryOptions({
    queryKey: programmeKeys.moves(slug, range),
    queryFn: () => api.get<MilestoneMovesRow[]>(`/api/projects/${slug}/moves${qs(range)}`),
    enabled: slug !== "",
  });

export const baselinesQueryOptions = (slug: string) => projectReadOptions<BaselineVersion[]>(programmeKeys.baselines(slug), slug, "baselines");

export const eventsQueryOptions = (id: number) =>
  readOptions<MilestoneEventRow[]>(programmeKeys.events(id), `/api/milestones/${id}/events`);

export const driversQueryOptions = (id: number) =>
  readOptions<DrivingLink[]>(programmeKeys.drivers(id), `/api/milestones/${id}/drivers`);

export const useMilestones = (slug: string, f: MilestoneFilters = {}) => useQuery(milestonesQueryOptions(slug, f));
export const useHealth = (slug: string, at?: string) => useQuery(healthQueryOptions(slug, at));
export const useCurve = (slug: string, range: { from: string; to: string }) => useQuery({ ...curveQueryOptions(slug, range), placeholderData: keepPreviousData });
export const useMoves = (slug: string, range: { from: string; to: string }) => useQuery(movesQueryOptions(slug, range));
export const useMilestoneEvents = (id: number) => useQuery(eventsQueryOptions(id));
export const useMilestoneDrivers = (id: number) => useQuery(driversQueryOptions(id));

/** Lead and admin keep the programme; marketing and investors read it. */
export function canEditProgramme(user: User | null | undefined): boolean {
  return user?.role === "lead" || user?.role === "admin";
}

/** The body of a 409: the milestone as it is now, so the editor can show it and reapply. */
export function conflictCurrent(e: unknown): Milestone | null {
  if (!(e instanceof ApiError) || e.status !== 409) return null;
  const body = e.body as { error?: { current?: Milestone } } | null;
  return body?.error?.current ?? null;
}

/** After milestones changed (or a change of them was refused): their project's figures and their own histories are read again. */
function refreshMilestones(qc: QueryClient, slug: string, ids: readonly number[]): void {
  void qc.invalidateQueries({ queryKey: programmeKeys.project(slug) });
  for (const id of ids) void qc.invalidateQueries({ queryKey: programmeKeys.milestone(id) });
}

export function usePatchMilestone(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, patch }: { id: number; patch: MilestonePatchInput }) => api.patch<Milestone>(`/api/milestones/${id}`, patch),
    // The editor shows conflicts and field errors beside the change itself.
    meta: { quiet: true },
    onSettled: (_data, _err, vars) => refreshMilestones(qc, slug, [vars.id]),
  });
}

export function useShiftForecasts(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ShiftInput) => api.post<Milestone[]>(`/api/projects/${slug}/milestones/shift`, input),
    onSuccess: (rows) => refreshMilestones(qc, slug, rows.map((m) => m.id)),
  });
}

export const useRebaseline = (slug: string) =>
  useRefreshingMutation(programmeKeys.all, { mutationFn: (input: BaselineInput) => api.post<{ number: number }>(`/api/projects/${slug}/baselines`, input) });

export const useImportMilestones = (slug: string) =>
  useRefreshingMutation(programmeKeys.all, { mutationFn: (csv: string) => api.post<CsvImportResult>(`/api/projects/${slug}/milestones/import`, { csv }), meta: { quiet: true } });

/**
 * Removing a milestone from the programme (with a reason) or putting it back: it stays on
 * record, so every figure and "what moved" changes; the whole project is refreshed.
 */
export function useMilestoneRemoval(slug: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, action, input }: { id: number; action: "remove" | "restore"; input: MilestoneRemovalInput }) => api.post<Milestone>(`/api/milestones/${id}/${action}`, input),
    meta: { quiet: true },
    onSettled: (_data, _err, vars) => refreshMilestones(qc, slug, [vars.id]),
  });
}

/** Deleting a milestone entered by mistake; one on record answers 409 `on_record` (remove it instead). */
export const useDeleteMilestone = (slug: string) =>
  useRefreshingMutation(programmeKeys.project(slug), { mutationFn: ({ id }: { id: number }) => api.delete<void>(`/api/milestones/${id}`), meta: { quiet: true } });

/** Where the CSV export is downloaded from (a plain link: the browser handles the file). */
export const milestonesCsvUrl = (slug: string) => `/api/projects/${slug}/milestones.csv`;
