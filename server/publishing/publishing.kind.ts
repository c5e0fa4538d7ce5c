import type { Knex } from "knex";
import type { Viewer } from "#shared/domain/audience.ts";
import type { ContentKind } from "#shared/domain/publishing-workflow.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { PublishingProblem } from "#shared/schemas/publishing.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { WorkflowRecord, WorkflowUpdate } from "./publishing.columns.ts";
import type { RevisionColumns, RevisionHead } from "./publishing.repository.ts";

type Trx = Knex.Transaction;

/** What the workflow reads of every item, whatever its kind. */
export type WorkflowItem = Pick<WorkflowRecord, "id" | "projectId" | "slug" | "title" | "audience" | "status" | "authorId" | "scheduledFor" | "publishedAt" | "version">;

/** The workflow's fields of a content row, which a step writes. */
export type WorkflowChanges = Pick<WorkflowUpdate, "status" | "scheduledFor" | "publishedAt" | "withdrawnAt" | "reviewComment">;

/**
 * A kind of published content (updates: server/posts; photo stories: server/stories), as the
 * publishing workflow needs it. The workflow owns the steps, the history, the revisions, the old
 * addresses and the scheduler's rounds; the kind owns its content, its checks and how it is
 * rendered, and says so through these functions. `Content` is what a revision keeps of the
 * kind's own fields (an update's summary and text; a story's introduction and items); `Detail`
 * is the kind's answer to a read.
 */
export interface PublishedKind<Item extends WorkflowItem, Content, Detail> {
  kind: ContentKind;
  /** Its content table, named by its own repository (the workflow's queries read its address, state and schedule). */
  table: string;
  /** What people call one ("update", "photo story"), for the answers that name it. */
  name: string;
  /**
   * How a step's answer names the schedule: "always" (updates: `scheduledFor`, null when none),
   * or only when the step sets or cancels one (photo stories). Kept as each kind answered before.
   */
  answerSchedule: "always" | "when-changed";
  /** The project of an address or of an item, and the clock. */
  projects: { get(slug: string): Promise<Project>; getById(id: number): Promise<Project>; now(): Date };

  /** Reads an item by id; `forUpdate` locks its row for the caller's transaction. */
  find(q: Db | Trx, id: number, opts?: { forUpdate?: boolean }): Promise<Item | null>;
  /** The item at an address of a project, when the viewer may read it (the kind's audience rule). */
  findVisible(q: Db, projectId: number, slug: string, viewer: Viewer): Promise<Item | null>;
  /** The kind's answer to a read of the item, for this caller. */
  detail(project: Project, item: Item, actor: Actor): Promise<Detail>;
  /** Every reason the item cannot be published for its audience now (the kind's checks). */
  problems(trx: Trx, project: Project, item: Item): Promise<PublishingProblem[]>;
  /** Renders the item for publication at `at` and opens its photos to its audience: the changes that publish it. */
  publish(trx: Trx, project: Project, item: Item, at: Date): Promise<WorkflowChanges>;
  /** Closes the photos of a published item that is withdrawn. */
  unpublish(trx: Trx, item: Item): Promise<void>;
  /** Writes changes to the item's row (and moves its version on). */
  update(trx: Trx, id: number, changes: WorkflowChanges, at: Date): Promise<void>;

  /** The kind's own content of the item as it stands, for a revision. */
  snapshot(trx: Trx, item: Item): Promise<Content>;
  /** A revision's own columns, from its content (the kind's repository maps them). */
  revisionColumns(content: Content): RevisionColumns;
  /** A revision's content, from its own columns. */
  revisionContent(row: RevisionColumns): Content;
  /** The text of a revision as a reader meets it, which the diff compares. */
  revisionText(rev: RevisionHead & Content): string;
  /** Brings back a revision's title and content as a new save (the kind's edit rules apply); its detail. */
  restore(id: number, rev: RevisionHead & Content, note: string, actor: Actor): Promise<Detail>;

  /** Called after every change that readers could see (public caches drop their copies). */
  onChange?: () => void;
}
