import type { Knex } from "knex";
import { DateTime } from "luxon";
import { viewerOfRole, type Viewer } from "#shared/domain/audience.ts";
import {
  EDITED_AFTER_APPROVAL,
  editNeedsApproval,
  heldBackFields,
  heldBackReason,
  outsideReviewEntry,
  publicationInstant,
  stepComment,
  stepFields,
  workflowStep,
  type OutsideReview,
} from "#shared/domain/publishing-workflow.ts";
import { diffText } from "#shared/domain/text-diff.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { PostStatus, PublishingEvent, RevisionDiff, RevisionSummary, ScheduleInput, WorkflowAction, WorkflowResult } from "#shared/schemas/publishing.ts";
import { AppError, forbidden, notFound } from "../core/app-error.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { WorkflowRecord } from "./publishing.columns.ts";
import { publishingBlocked } from "./publishing.checks.ts";
import type { PublishedKind, WorkflowChanges, WorkflowItem } from "./publishing.kind.ts";
import {
  claimDue,
  findFreeSlug,
  findRedirect,
  findRevision,
  insertPublishingEvent,
  insertRevision,
  listPublishingEvents,
  listRevisions,
  moveSlug,
  type ContentTable,
  type RevisionHead,
} from "./publishing.repository.ts";

type Trx = Knex.Transaction;

/**
 * The publishing workflow, once for every kind of published content (updates, photo stories):
 * the steps (submit, approve, return, publish, schedule, withdraw) with their rules and checks,
 * the history of every step, the revisions and their diff and restore, the old addresses, and
 * the scheduler's rounds. A kind describes itself (`PublishedKind`) and gets its workflow from
 * `workflowOf`; its service keeps its own content, listing and public reads.
 */

/** The viewer the caller reads as, for the audience rule of published content. */
export function viewerOf(actor: Actor): Viewer {
  return viewerOfRole(actor.user?.role);
}

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

/**
 * What every kind's summary says of its workflow, as the API gives it (posts and stories add their
 * own fields): address, audience, state, times and author.
 */
export function workflowSummaryOf(r: WorkflowRecord) {
  return { id: r.id, slug: r.slug, title: r.title, audience: r.audience, status: r.status, publishedAt: iso(r.publishedAt), scheduledFor: iso(r.scheduledFor), authorName: r.authorName, updatedAt: r.updatedAt.toISOString() };
}
const isDuplicate = (err: unknown) => (err as { code?: string })?.code === "ER_DUP_ENTRY";

/**
 * The status a workflow step leads to for this user, or the refusal: 403 when their role may not
 * take the step, 409 when the item's state does not allow it.
 */
function checkStep(action: WorkflowAction, item: { status: PostStatus; authorId: number | null }, user: Express.User): PostStatus {
  const step = workflowStep(action, item.status, user.role, item.authorId === user.id);
  if (!step.ok) throw step.reason === "role" ? forbidden(step.message) : new AppError("invalid_transition", step.message, 409);
  return step.to;
}

/** When a schedule step publishes: an instant, or a date and time on the project's clock; it must be after `now`. */
function scheduleInstant(project: Project, at: ScheduleInput["at"] | undefined, now: Date): Date {
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

const revisionSummary = (r: RevisionHead): RevisionSummary => ({ number: r.number, createdAt: r.createdAt.toISOString(), authorName: r.authorName, title: r.title, status: r.status, note: r.note });

export function createPublishingService(deps: { db: Db }) {
  const { db } = deps;

  /** The workflow of one kind: the steps and reads every kind serves, and the pieces its own saves use. */
  function workflowOf<Item extends WorkflowItem, Content, Detail>(spec: PublishedKind<Item, Content, Detail>) {
    const { kind, name, projects } = spec;
    const table: ContentTable = { kind, table: spec.table };
    const changed = () => spec.onChange?.();
    const missing = () => notFound(`That ${name}`);

    const slugTaken = (slug: string) =>
      new AppError("slug_taken", `The address “${slug}” is already used by another ${name} in this project.`, 409, { slug: `is already used by another ${name} in this project` });

    async function existing(id: number): Promise<Item> {
      const item = await spec.find(db, id);
      if (!item) throw missing();
      return item;
    }

    async function locked(trx: Trx, id: number): Promise<Item> {
      const item = await spec.find(trx, id, { forUpdate: true });
      if (!item) throw missing();
      return item;
    }

    /** Keeps a revision of the item as it now stands (every save does). */
    async function writeRevision(trx: Trx, id: number, actor: Actor, note: string | null, at: Date): Promise<number> {
      const item = (await spec.find(trx, id))!;
      const content = await spec.snapshot(trx, item);
      return insertRevision(
        trx,
        kind,
        id,
        { title: item.title, slug: item.slug, audience: item.audience, status: item.status, note, authorId: actor.user?.id ?? null, authorName: actor.user?.name ?? "Plumbline", at },
        spec.revisionColumns(content),
      );
    }

    const findRevisionOf = (id: number, n: number) => findRevision(db, kind, id, n, spec.revisionContent);

    /** A workflow step: the rules, the checks, the writes and the history in one transaction. */
    async function transition(id: number, action: WorkflowAction, actor: Actor, extra: { comment?: string; at?: ScheduleInput["at"] } = {}): Promise<WorkflowResult> {
      const user = actor.user;
      if (!user) throw new AppError("unauthenticated", "Sign in first.", 401);
      const result = await db.transaction(async (trx) => {
        const item = await locked(trx, id);
        const project = await projects.getById(item.projectId);
        const to = checkStep(action, item, user);
        const at = projects.now();
        // The same checks at scheduling as at publication (and again when the time comes).
        if (to === "published" || to === "scheduled") {
          const problems = await spec.problems(trx, project, item);
          if (problems.length) throw publishingBlocked(problems);
        }
        const when = action === "schedule" ? scheduleInstant(project, extra.at, at) : undefined;
        const changes: WorkflowChanges = action === "publish" ? await spec.publish(trx, project, item, at) : { status: to, ...stepFields(action, item.status, { at, when, comment: extra.comment }) };
        if (action === "withdraw" && item.status === "published") await spec.unpublish(trx, item);
        await spec.update(trx, item.id, changes, at);
        await insertPublishingEvent(trx, { ownerType: kind, ownerId: item.id, action, from: item.status, to, actorId: user.id, actorName: user.name, comment: stepComment(action, { when, comment: extra.comment }), at });
        const answer: WorkflowResult = { id: item.id, status: to };
        if (spec.answerSchedule === "always" || to === "scheduled" || item.status === "scheduled") {
          answer.scheduledFor = iso(changes.scheduledFor ?? (to === "scheduled" ? item.scheduledFor : null));
        }
        return answer;
      });
      changed();
      return result;
    }

    /** The kind's answer to a read of the item, for this caller. */
    const detailOf = async (item: Item, actor: Actor): Promise<Detail> => spec.detail(await projects.getById(item.projectId), item, actor);

    /** What every kind serves the same way: its reads, the steps, the revisions, the history, the scheduler's pass. */
    const steps = {
      /** An item by its address, or where it moved to; 404 when the caller may not read it. */
      async getBySlug(projectSlug: string, itemSlug: string, actor: Actor): Promise<Detail | { redirectTo: string }> {
        const project = await projects.get(projectSlug);
        const viewer = viewerOf(actor);
        const item = await spec.findVisible(db, project.id, itemSlug, viewer);
        if (item) return spec.detail(project, item, actor);
        const moved = await findRedirect(db, table, project.id, itemSlug, viewer);
        if (moved) return { redirectTo: moved };
        throw missing();
      },

      /** Staff: the whole item, with its version, revisions and publishing problems. */
      getById: async (id: number, actor: Actor): Promise<Detail> => detailOf(await existing(id), actor),

      submit: (id: number, actor: Actor) => transition(id, "submit", actor),
      approve: (id: number, actor: Actor) => transition(id, "approve", actor),
      returnToDraft: (id: number, comment: string, actor: Actor) => transition(id, "return", actor, { comment }),
      publish: (id: number, actor: Actor) => transition(id, "publish", actor),
      schedule: (id: number, at: ScheduleInput["at"], actor: Actor) => transition(id, "schedule", actor, { at }),
      withdraw: (id: number, actor: Actor) => transition(id, "withdraw", actor),

      async revisions(id: number): Promise<RevisionSummary[]> {
        await existing(id);
        return (await listRevisions(db, kind, id)).map(revisionSummary);
      },

      /** A word diff of the text of revision `against` (default: the one before) → revision `n`; the revision before the first is the empty text. */
      async diff(id: number, n: number, against?: number): Promise<RevisionDiff> {
        await existing(id);
        const to = await findRevisionOf(id, n);
        if (!to) throw notFound("That revision");
        const fromNumber = against ?? n - 1;
        const from = fromNumber >= 1 ? await findRevisionOf(id, fromNumber) : null;
        if (against !== undefined && !from) throw notFound("The revision to compare against");
        return { from: from?.number ?? 0, to: n, ...diffText(from ? spec.revisionText(from) : "", spec.revisionText(to)) };
      },

      /** Brings back a revision's content as a new revision; the address and audience stay. */
      async restore(id: number, n: number, actor: Actor): Promise<Detail> {
        await existing(id);
        const rev = await findRevisionOf(id, n);
        if (!rev) throw notFound("That revision");
        return spec.restore(id, rev, `Restored revision ${n}`, actor);
      },

      /**
       * One revision with its content (`"latest"`: the newest), beside the item as it now stands and
       * the number of its newest revision; null when the item or that revision is gone. For readers
       * outside the office, who are shown one exact revision (review links, server/review-links).
       */
      async revisionOf(id: number, n: number | "latest"): Promise<{ item: Item; revision: RevisionHead & Content; latest: number } | null> {
        const item = await spec.find(db, id);
        if (!item) return null;
        const latest = (await listRevisions(db, kind, id))[0]?.number ?? 0;
        const revision = latest ? await findRevisionOf(id, n === "latest" ? latest : n) : null;
        return revision ? { item, revision, latest } : null;
      },

      /**
       * Puts an outside reviewer's answer (review links, server/review-links) in the item's history,
       * inside the caller's transaction so the answer and its entry are kept together or not at all.
       * The state does not change; the row is locked so the state written is the one the answer met.
       */
      async recordOutsideReview(trx: Trx, id: number, review: OutsideReview, at: Date): Promise<void> {
        const item = await locked(trx, id);
        const entry = outsideReviewEntry(review);
        await insertPublishingEvent(trx, { ownerType: kind, ownerId: item.id, action: entry.action, from: item.status, to: item.status, actorId: null, actorName: entry.actorName, comment: entry.comment, at });
      },

      async history(id: number): Promise<PublishingEvent[]> {
        await existing(id);
        return listPublishingEvents(db, kind, id);
      },

      /**
       * Publishes every item of the kind that is due at `at`, ten at a time, each batch in its own
       * transaction. Items are claimed with SKIP LOCKED, so several processes share the work and
       * none publishes an item twice. The checks run again: an item that now fails them goes back
       * to approved with the reasons. Each outcome goes into the item's history.
       */
      async publishDue(at: Date = projects.now()): Promise<{ published: number[]; heldBack: number[] }> {
        const published: number[] = [];
        const heldBack: number[] = [];
        for (let round = 0; round < 100; round++) {
          const claimed = await db.transaction(async (trx) => {
            const ids = await claimDue(trx, table, at, 10);
            for (const id of ids) {
              const item = (await spec.find(trx, id))!;
              const project = await projects.getById(item.projectId);
              const problems = await spec.problems(trx, project, item);
              const changes = problems.length ? heldBackFields(problems) : await spec.publish(trx, project, item, publicationInstant(item.scheduledFor, at));
              await spec.update(trx, id, changes, at);
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
        if (published.length || heldBack.length) changed();
        return { published, heldBack };
      },
    };

    return {
      steps,
      changed,
      existing,
      detailOf,
      writeRevision,
      /** The item's revisions for its detail (no existence check: the caller has the item). */
      revisionList: async (id: number): Promise<RevisionSummary[]> => (await listRevisions(db, kind, id)).map(revisionSummary),
      findRedirect: (projectId: number, oldSlug: string, viewer: Viewer) => findRedirect(db, table, projectId, oldSlug, viewer),

      /**
       * Creates an item at a free address (the wanted one, or with -2, -3 … when it was made from
       * the title): `insert` writes its rows in the transaction, then its first revision is kept.
       */
      async create(projectId: number, wanted: string, explicit: boolean, actor: Actor, insert: (trx: Trx, slug: string, at: Date) => Promise<number>): Promise<{ id: number; slug: string; status: PostStatus }> {
        const slug = await findFreeSlug(db, table, projectId, wanted, explicit);
        if (!slug) throw slugTaken(wanted);
        const at = projects.now();
        const id = await db
          .transaction(async (trx) => {
            const id = await insert(trx, slug, at);
            await writeRevision(trx, id, actor, "Created", at);
            return id;
          })
          .catch((err: unknown) => {
            if (isDuplicate(err)) throw slugTaken(slug);
            throw err;
          });
        changed();
        return { id, slug, status: "draft" };
      },

      /**
       * Locks an item for a save (PATCH or restore): a stale `version` is 409 with the item as it
       * now stands (`current`), and a published item is changed by a lead or an admin only.
       */
      async openForEdit(trx: Trx, id: number, version: number | undefined, actor: Actor, current: (item: Item) => Promise<Detail>): Promise<Item> {
        const item = await locked(trx, id);
        if (version !== undefined && version !== item.version) {
          throw new AppError("conflict", `Someone else changed this ${name} since you opened it. Reload to see their changes.`, 409, undefined, { current: await current(item) });
        }
        const user = actor.user!;
        if (item.status === "published" && user.role !== "lead" && user.role !== "admin") throw forbidden(`A published ${name} is changed by a lead or an admin.`);
        return item;
      },

      /** An approval was given to the work as it stood: marketing's edit of approved or scheduled work sends it back to draft. */
      demotion: (item: Item, actor: Actor): { status: "draft"; scheduledFor: null } | null => (editNeedsApproval(item.status, actor.user!.role) ? { status: "draft", scheduledFor: null } : null),

      /** Records in the history that an edit sent approved or scheduled work back to draft. */
      recordDemotion: (trx: Trx, item: Item, actor: Actor, at: Date) =>
        insertPublishingEvent(trx, { ownerType: kind, ownerId: item.id, action: "edited", from: item.status, to: "draft", actorId: actor.user!.id, actorName: actor.user!.name, comment: EDITED_AFTER_APPROVAL, at }),

      /** Makes way for a new address, keeping the current one for redirects; 409 when another item holds it. */
      async moveSlug(trx: Trx, item: Item, to: string): Promise<void> {
        if (to !== item.slug && !(await moveSlug(trx, table, item, to))) throw slugTaken(to);
      },

      /** Runs a write that may meet another item's address (a unique key), answering 409 naming it. */
      async withUniqueSlug<T>(slug: string | undefined, write: () => Promise<T>): Promise<T> {
        try {
          return await write();
        } catch (err) {
          if (slug && isDuplicate(err)) throw slugTaken(slug);
          throw err;
        }
      },
    };
  }

  return { workflowOf };
}
export type PublishingService = ReturnType<typeof createPublishingService>;
