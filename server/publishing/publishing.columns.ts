import type { Audience } from "#shared/schemas/common.ts";
import type { PostStatus } from "#shared/schemas/publishing.ts";
import { date, dateOrNull, num, numOrNull, oneOf, readRow, text, textOrNull } from "../db/rows.ts";

/**
 * The workflow's columns, which every kind's content table has (`posts`, `stories`; decision 023):
 * its address, audience, state, schedule, author and version. Each kind's repository reads and
 * writes its own table and adds its own columns; the mapping of these is written once, here.
 * Repository code: it names no table.
 */
export interface WorkflowRecord {
  id: number;
  projectId: number;
  slug: string;
  title: string;
  audience: Audience;
  status: PostStatus;
  authorId: number | null;
  authorName: string;
  scheduledFor: Date | null;
  publishedAt: Date | null;
  withdrawnAt: Date | null;
  reviewComment: string | null;
  version: number;
  createdAt: Date;
  updatedAt: Date;
}

/** The workflow's columns as a kind's list query selects them. */
export const WORKFLOW_COLUMNS = [
  "id",
  "project_id",
  "slug",
  "title",
  "audience",
  "status",
  "author_id",
  "author_name",
  "scheduled_for",
  "published_at",
  "withdrawn_at",
  "review_comment",
  "version",
  "created_at",
  "updated_at",
] as const;

export const toWorkflowRecord = readRow<WorkflowRecord>({
  id: num(), projectId: num(), slug: text(), title: text(), audience: oneOf<Audience>(), status: oneOf<PostStatus>(), authorId: numOrNull(), authorName: text(),
  scheduledFor: dateOrNull(), publishedAt: dateOrNull(), withdrawnAt: dateOrNull(), reviewComment: textOrNull(), version: num(), createdAt: date(), updatedAt: date(),
});

/** The workflow's columns of a new item: a draft by its author. */
export function newDraftColumns(row: { projectId: number; slug: string; title: string; audience: Audience; authorId: number | null; authorName: string; at: Date }): Record<string, unknown> {
  return {
    project_id: row.projectId,
    slug: row.slug,
    title: row.title,
    audience: row.audience,
    status: "draft",
    author_id: row.authorId,
    author_name: row.authorName,
    created_at: row.at,
    updated_at: row.at,
  };
}

/** The workflow's fields a save or a step may change. */
export type WorkflowUpdate = Partial<Pick<WorkflowRecord, "slug" | "title" | "audience" | "status" | "scheduledFor" | "publishedAt" | "withdrawnAt" | "reviewComment">>;

const WORKFLOW_UPDATE_COLUMNS: Record<keyof WorkflowUpdate, string> = {
  slug: "slug",
  title: "title",
  audience: "audience",
  status: "status",
  scheduledFor: "scheduled_for",
  publishedAt: "published_at",
  withdrawnAt: "withdrawn_at",
  reviewComment: "review_comment",
};

/**
 * The row of an update to an item: the changed fields (undefined = unchanged) under their columns,
 * the kind's own (`columns`, already in the form they are stored) with the workflow's.
 */
export function changedColumns<Own extends string>(changes: WorkflowUpdate & Partial<Record<NoInfer<Own>, unknown>>, columns: Record<Own, string>): Record<string, unknown> {
  const row: Record<string, unknown> = {};
  for (const [key, column] of Object.entries<string>({ ...WORKFLOW_UPDATE_COLUMNS, ...columns })) {
    const value = (changes as Record<string, unknown>)[key];
    if (value !== undefined) row[column] = value;
  }
  return row;
}
