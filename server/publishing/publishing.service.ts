import type { Knex } from "knex";
import { DateTime } from "luxon";
import { viewerOfRole, type Viewer } from "#shared/domain/audience.ts";
import { heldBackReason, type ContentKind } from "#shared/domain/publishing-workflow.ts";
import { diffText } from "#shared/domain/text-diff.ts";
import type { Project } from "#shared/schemas/projects.ts";
import { workflowStep, type PostRevisionSummary, type PostStatus, type PublishingProblem, type RevisionDiff, type ScheduleInput, type WorkflowAction, type WorkflowResult } from "#shared/schemas/posts.ts";
import type { PublishingEvent } from "#shared/schemas/stories.ts";
import { AppError, forbidden, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import { insertPublishingEvent, listPublishingEvents, type NewPublishingEvent } from "./publishing.repository.ts";

type Trx = Knex.Transaction;

/**
 * The publishing workflow that updates (server/posts) and photo stories (server/stories) share:
 * the history of every step (publishing_events), the scheduler's rounds, and the checks of a
 * step. Each kind keeps its own content, checks and tables; its service calls this one.
 */

/** The viewer the caller reads as, for the audience rule of published content. */
export function viewerOf(actor: Actor): Viewer {
  return viewerOfRole(actor.user?.role);
}

/**
 * The status a workflow step leads to for this user, or the refusal: 403 when their role may not
 * take the step, 409 when the item's state does not allow it.
 */
export function checkStep(action: WorkflowAction, item: { status: PostStatus; authorId: number | null }, user: Express.User): PostStatus {
  const step = workflowStep(action, item.status, user.role, item.authorId === user.id);
  if (!step.ok) throw step.reason === "role" ? forbidden(step.message) : new AppError("invalid_transition", step.message, 409);
  return step.to;
}

/** When a schedule step publishes: an instant, or a date and time on the project's clock; it must be after `now`. */
export function scheduleInstant(project: Project, at: ScheduleInput["at"] | undefined, now: Date): Date {
  if (!at) throw new AppError("invalid_schedule", "Say when to publish.", 422, { at: "is required" });
  let when: Date;
  if (typeof at === "string") when = new Date(at);
  else {
    const d = DateTime.fromISO(`${at.date}T${at.time}`, { zone: project.timeZone });
    if (!d.isValid) throw new AppError("invalid_schedule", "That date and time do not exist in the project's time zone.", 422, { at: "is not a valid time in the project's time zone" });
    when = d.toJSDate();
  }
  if (when.getTime() <= now.getTime()) throw new AppError("invalid_schedule", "The publication time must be in the future.", 422, { at: "must be in the future" });
  return when;
}

/** A row of an item's revision list. */
export function revisionSummary(r: { number: number; createdAt: Date; authorName: string; title: string; status: PostStatus; note: string | null }): PostRevisionSummary {
  return { number: r.number, createdAt: r.createdAt.toISOString(), authorName: r.authorName, title: r.title, status: r.status, note: r.note };
}

/**
 * A word diff of the text of revision `against` (default: the one before) → revision `n`, given
 * how to find a revision of the item and how to read its text. 404 when either is missing (the
 * revision before the first is the empty text).
 */
export async function diffRevisions<R extends { number: number }>(find: (n: number) => Promise<R | null>, textOf: (r: NoInfer<R>) => string, n: number, against?: number): Promise<RevisionDiff> {
  const to = await find(n);
  if (!to) throw notFound("That revision");
  const fromNumber = against ?? n - 1;
  const from = fromNumber >= 1 ? await find(fromNumber) : null;
  if (against !== undefined && !from) throw notFound("The revision to compare against");
  return { from: from?.number ?? 0, to: n, ...diffText(from ? textOf(from) : "", textOf(to)) };
}

/** A kind's workflow step: checks, writes and history in one transaction (its service's `transition`). */
export type Transition = (id: number, action: WorkflowAction, actor: Actor, extra?: { comment?: string; at?: ScheduleInput["at"] }) => Promise<WorkflowResult>;

/** The workflow steps as service methods, the same for every kind (the routers call these). */
export function workflowSteps(transition: Transition) {
  return {
    submit: (id: number, actor: Actor) => transition(id, "submit", actor),
    approve: (id: number, actor: Actor) => transition(id, "approve", actor),
    returnToDraft: (id: number, comment: string, actor: Actor) => transition(id, "return", actor, { comment }),
    publish: (id: number, actor: Actor) => transition(id, "publish", actor),
    schedule: (id: number, at: ScheduleInput["at"], actor: Actor) => transition(id, "schedule", actor, { at }),
    withdraw: (id: number, actor: Actor) => transition(id, "withdraw", actor),
  };
}

/** What the scheduler needs of one kind: claiming due items, and publishing one (or holding it back). */
export interface DueItems {
  /** Claims up to `limit` due items for this transaction, skipping those another process holds. */
  claim(trx: Trx, limit: number): Promise<number[]>;
  /** Publishes a claimed item, or holds it back when the checks now fail; the problems (none = published). */
  publishOrHoldBack(trx: Trx, id: number): Promise<PublishingProblem[]>;
}

export function createPublishingService(deps: { db: Db }) {
  const { db } = deps;
  return {
    /** Records a workflow step in the item's history, inside the caller's transaction. */
    record: (trx: Trx, e: NewPublishingEvent) => insertPublishingEvent(trx, e),

    /** An item's workflow steps, newest first. */
    history: (kind: ContentKind, id: number): Promise<PublishingEvent[]> => listPublishingEvents(db, kind, id),

    /**
     * Publishes every item of a kind that is due at `at`, ten at a time, each batch in its own
     * transaction. Items are claimed with SKIP LOCKED, so several processes share the work and
     * none publishes an item twice. Each outcome goes into the item's history: published by the
     * scheduler, or held back (back to approved) with the reasons.
     */
    async publishDue(kind: ContentKind, at: Date, items: DueItems): Promise<{ published: number[]; heldBack: number[] }> {
      const published: number[] = [];
      const heldBack: number[] = [];
      for (let round = 0; round < 100; round++) {
        const claimed = await db.transaction(async (trx) => {
          const ids = await items.claim(trx, 10);
          for (const id of ids) {
            const problems = await items.publishOrHoldBack(trx, id);
            if (problems.length) {
              await insertPublishingEvent(trx, { ownerType: kind, ownerId: id, action: "schedule_failed", from: "scheduled", to: "approved", actorId: null, actorName: null, comment: heldBackReason(problems), at });
              heldBack.push(id);
            } else {
              await insertPublishingEvent(trx, { ownerType: kind, ownerId: id, action: "publish", from: "scheduled", to: "published", actorId: null, actorName: "scheduler", comment: null, at });
              published.push(id);
            }
          }
          return ids.length;
        });
        if (claimed === 0) break;
      }
      return { published, heldBack };
    },
  };
}
export type PublishingService = ReturnType<typeof createPublishingService>;
