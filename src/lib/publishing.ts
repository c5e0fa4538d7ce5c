import { queryOptions, useMutation, useQuery, useQueryClient, type QueryKey } from "@tanstack/react-query";
import type { Role } from "#shared/schemas/common.ts";
import type { PostStatus, PublishingEvent, PublishingProblem, RevisionDiff, ScheduleInput, WorkflowAction, WorkflowResult } from "#shared/schemas/publishing.ts";
import { api, ApiError, qs } from "./api-client.ts";
import { formatInstant } from "./format.ts";

/**
 * Updates and photo stories go through one publishing workflow with the same routes under
 * their own base path (`/api/posts/:id/…`, `/api/stories/:id/…`): saves that keep revisions,
 * restore, the workflow steps and the publishing history. Each feature keeps its own key
 * factory (features never import each other) and makes its hooks here.
 */

/** The keys of one kind of published item, from its feature's key factory. */
export interface PublishingKeys {
  project: (slug: string) => QueryKey;
  detail: (id: number) => QueryKey;
  revisions: (id: number) => QueryKey;
  diff: (id: number, n: number, against?: number) => QueryKey;
  history: (id: number) => QueryKey;
}

/** One workflow step as the editor asks for it: returning needs a comment, scheduling a time. */
export type WorkflowInput = { action: Exclude<WorkflowAction, "return" | "schedule"> } | { action: "return"; comment: string } | { action: "schedule"; at: ScheduleInput["at"] };

/** The body each step's route takes. */
function workflowBody(input: WorkflowInput): object {
  return input.action === "return" ? { comment: input.comment } : input.action === "schedule" ? { at: input.at } : {};
}

/**
 * The queries and hooks of the workflow for one kind (`posts` or `stories`), whose items live
 * under `/api/<kind>/:id` and are created in `/api/projects/:slug/<kind>`.
 * `TDetail` is the item as the API answers with it; `TPatch` what a save sends;
 * `TRevision` a row of its revision list; `TCreate` what creating one sends.
 */
export function publishingApi<TDetail extends { projectSlug: string }, TPatch, TRevision, TCreate>(kind: "posts" | "stories", keys: PublishingKeys) {
  const base = `/api/${kind}`;
  const revisionsQueryOptions = (id: number) => queryOptions({ queryKey: keys.revisions(id), queryFn: () => api.get<TRevision[]>(`${base}/${id}/revisions`), enabled: id > 0 });

  const diffQueryOptions = (id: number, n: number, against?: number) =>
    queryOptions({
      queryKey: keys.diff(id, n, against),
      queryFn: () => api.get<RevisionDiff>(`${base}/${id}/revisions/${n}/diff${qs({ against })}`),
      enabled: id > 0 && n > 0,
    });

  const historyQueryOptions = (id: number) => queryOptions({ queryKey: keys.history(id), queryFn: () => api.get<PublishingEvent[]>(`${base}/${id}/history`), enabled: id > 0 });

  /** After a save or a restore: the item as answered, and what its change makes stale. */
  function useTakeIn(id: number) {
    const qc = useQueryClient();
    return (item: TDetail) => {
      qc.setQueryData(keys.detail(id), item);
      void qc.invalidateQueries({ queryKey: keys.revisions(id) });
      void qc.invalidateQueries({ queryKey: keys.history(id) });
      void qc.invalidateQueries({ queryKey: keys.project(item.projectSlug) });
    };
  }

  return {
    revisionsQueryOptions,
    diffQueryOptions,
    historyQueryOptions,
    useRevisions: (id: number) => useQuery(revisionsQueryOptions(id)),
    useDiff: (id: number, n: number, against?: number) => useQuery(diffQueryOptions(id, n, against)),
    useHistory: (id: number) => useQuery(historyQueryOptions(id)),

    /** Creates a draft in the project; the project's lists go stale. */
    useCreate(slug: string) {
      const qc = useQueryClient();
      return useMutation({
        mutationFn: (input: TCreate) => api.post<{ id: number; slug: string; status: PostStatus }>(`/api/projects/${slug}/${kind}`, input),
        meta: { quiet: true },
        onSuccess: () => qc.invalidateQueries({ queryKey: keys.project(slug) }),
      });
    },

    /** Saves the item (a new revision). */
    useSave(id: number) {
      const takeIn = useTakeIn(id);
      return useMutation({
        mutationFn: (patch: TPatch) => api.patch<TDetail>(`${base}/${id}`, patch),
        // The editor shows conflicts and field errors beside the fields themselves.
        meta: { quiet: true },
        onSuccess: takeIn,
      });
    },

    /** Brings back a revision as a new one; the editor takes in the item it answers. */
    useRestore(id: number) {
      const takeIn = useTakeIn(id);
      return useMutation({
        mutationFn: (n: number) => api.post<TDetail>(`${base}/${id}/revisions/${n}/restore`),
        // A refusal (a published item whose restored photos fail the checks) is shown by the editor.
        meta: { quiet: true },
        onSuccess: takeIn,
      });
    },

    /** Takes one workflow step. */
    useWorkflow(id: number, slug: string) {
      const qc = useQueryClient();
      return useMutation({
        mutationFn: (input: WorkflowInput) => api.post<WorkflowResult>(`${base}/${id}/${input.action}`, workflowBody(input)),
        // Refusals are shown on what they name (the photo, the cover, the milestone).
        meta: { quiet: true },
        onSettled: () => {
          void qc.invalidateQueries({ queryKey: keys.detail(id) });
          void qc.invalidateQueries({ queryKey: keys.project(slug) });
        },
      });
    },
  };
}

/** The problems of a 422 refusal (`publishing_blocked`), or null for any other error. */
export function publishingProblemsOf(e: unknown): PublishingProblem[] | null {
  if (!(e instanceof ApiError) || e.status !== 422) return null;
  const body = e.body as { error?: { problems?: PublishingProblem[] } } | null;
  return body?.error?.problems ?? null;
}

/** When an item went, or will go, out; else when it was last touched (for the office's lists). */
export function publishingWhen(item: { status: PostStatus; scheduledFor: string | null; publishedAt: string | null; updatedAt: string }, zone: string): string {
  if (item.status === "scheduled" && item.scheduledFor) return `goes out ${formatInstant(item.scheduledFor, zone)}`;
  if (item.publishedAt && (item.status === "published" || item.status === "withdrawn")) return `published ${formatInstant(item.publishedAt, zone)}`;
  return `edited ${formatInstant(item.updatedAt, zone)}`;
}

/**
 * What the editor shell shows of an item, the same for every kind: its state, when it goes out
 * (on the project's clock), where it is published (`publishedBase` + its address), whether it is
 * saved yet, the reviewer's comment, and whether the person editing wrote it.
 */
export function editorStateOf(
  item: { status: PostStatus; scheduledFor: string | null; slug: string; authorName: string; reviewComment?: string | null } | null,
  me: { role: Role; name: string },
  zone: string,
  publishedBase: string,
) {
  return {
    status: item?.status ?? "draft",
    goesOut: item?.status === "scheduled" && item.scheduledFor ? formatInstant(item.scheduledFor, zone) : null,
    publishedHref: item?.status === "published" ? `${publishedBase}/${item.slug}` : null,
    saved: Boolean(item),
    reviewComment: item?.reviewComment,
    role: me.role,
    ownWork: !item || item.authorName === me.name,
  };
}
