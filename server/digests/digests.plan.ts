import { createHash, randomBytes } from "node:crypto";
import type { Frequency } from "#shared/schemas/subscribers.ts";
import { AppError } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import type { Db } from "../db/knex.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { SubscribersService } from "../subscribers/subscribers.service.ts";
import type { DigestAssembler, PreviousFigures } from "./digests.assemble.ts";
import {
  deliveredSubscriberIds,
  findRun,
  insertContent,
  insertDeliveries,
  insertRunOnce,
  lastFiguresOf,
  refreshCounts,
  setRunStatus,
  type DeliveryInsert,
  type DigestRunRecord,
} from "./digests.repository.ts";
import { hasNews, itemRefsOf, renderDigest, type RenderedDigest } from "./digests.render.ts";
import { windowFor } from "./digests.windows.ts";

export interface DigestPlannerDeps {
  db: Db;
  logger: Logger;
  projects: Pick<ProjectsService, "sender">;
  posts: Pick<PostsService, "findPublished">;
  subscribers: Pick<SubscribersService, "digestRecipients">;
  assembler: DigestAssembler;
  /** The host part of every Message-ID. */
  host: string;
  now: () => Date;
}

/** The same reader's contents are rendered once per (audience, topics, window, last figures) in a run. */
function contentKeyOf(parts: { audience: string; topicsKey: string; windowStart: Date; windowEnd: Date; previous: PreviousFigures }): string {
  return createHash("sha256")
    .update(JSON.stringify([parts.audience, parts.topicsKey, parts.windowStart.toISOString(), parts.windowEnd.toISOString(), parts.previous?.percentComplete ?? null, parts.previous?.forecastReady ?? null]))
    .digest("hex");
}

/** The window a subscriber's digest covers in a run: from the end of their last one (else the run's own start). */
function windowStartOf(s: { lastDigestAt: Date | null }, run: Pick<DigestRunRecord, "windowStart" | "windowEnd" | "frequency">): Date {
  if (run.frequency === "immediate" || !s.lastDigestAt) return run.windowStart;
  return s.lastDigestAt < run.windowEnd ? s.lastDigestAt : run.windowEnd;
}

/** Runs, their windows, and who gets what in each. */
export function createDigestPlanner(deps: DigestPlannerDeps) {
  const { db, logger, projects, posts, subscribers, assembler, host, now } = deps;

  const newMessageId = (runId: number, subscriberId: number) => `<digest.${runId}.${subscriberId}.${randomBytes(6).toString("hex")}@${host}>`;

  /**
   * Plans a queued run: one delivery per recipient (unique per run and subscriber), each
   * pointing at a content rendered once per (audience, topics, window, last figures).
   * Safe to repeat and to run in several processes at once; then the run is sending.
   */
  async function planRun(runId: number): Promise<void> {
    const run = await findRun(db, runId);
    if (!run || run.status !== "queued") return;
    const project = await projects.sender(run.projectId);
    const recipients = run.isTest ? [] : await subscribers.digestRecipients(run.projectId, run.frequency);
    const already = await deliveredSubscriberIds(db, run.id);
    const todo = recipients.filter((s) => !already.has(s.id));
    const previous = run.frequency === "immediate" ? new Map() : await lastFiguresOf(db, todo.map((s) => s.id));
    const contents = new Map<string, { id: number; empty: boolean }>();
    const runCache = assembler.newRunCache();
    const rows: DeliveryInsert[] = [];
    for (const s of todo) {
      const windowStart = windowStartOf(s, run);
      if (run.frequency !== "immediate" && windowStart >= run.windowEnd) {
        rows.push({ subscriberId: s.id, contentId: null, contentKey: null, windowStart, status: "skipped", messageId: newMessageId(run.id, s.id), error: "this window was already sent" });
        continue;
      }
      const prev = previous.get(s.id) ?? null;
      const key = contentKeyOf({ audience: s.audience, topicsKey: s.topicsKey, windowStart, windowEnd: run.windowEnd, previous: prev });
      let content = contents.get(key);
      if (!content) {
        const doc = await assembler.assemble({ project, frequency: run.frequency, audience: s.audience, topics: s.topics, windowStart, windowEnd: run.windowEnd, previous: prev, postId: run.postId, runCache });
        const news = hasNews(doc);
        const rendered: RenderedDigest = news ? await renderDigest(doc) : { subject: "", preheader: "", html: "", text: "" };
        const id = await insertContent(db, run.id, {
          contentKey: key,
          audience: s.audience,
          topicsKey: s.topicsKey,
          empty: !news,
          ...rendered,
          percentComplete: doc.figures.percentComplete,
          forecastReady: doc.figures.forecastReady,
          itemRefs: news ? itemRefsOf(doc) : [],
        });
        content = { id, empty: !news };
        contents.set(key, content);
      }
      rows.push({
        subscriberId: s.id,
        contentId: content.id,
        contentKey: key,
        windowStart,
        status: content.empty ? "skipped" : "queued",
        messageId: newMessageId(run.id, s.id),
        error: content.empty ? "nothing to say" : null,
      });
    }
    await insertDeliveries(db, run.id, rows, now());
    await refreshCounts(db, run.id);
    await setRunStatus(db, run.id, "running", now(), ["queued"]);
    logger.info({ runId: run.id, deliveries: rows.length, renders: contents.size }, "digest run planned");
  }

  /** The run of a period (or of one published post): one per run key, whoever asks first. */
  async function createRun(input: { projectId: number; frequency: Frequency; at: Date; timeZone: string; postId?: number; requestedBy?: number | null }): Promise<{ id: number; created: boolean }> {
    if (input.frequency === "immediate") {
      if (!input.postId) throw new AppError("validation", "An as-it-happens run needs a post.", 400);
      const post = await posts.findPublished(input.postId);
      const at = post?.publishedAt ?? input.at;
      return insertRunOnce(db, { projectId: input.projectId, frequency: "immediate", runKey: `immediate:post:${input.postId}`, windowStart: at, windowEnd: new Date(at.getTime() + 1), postId: input.postId, requestedBy: input.requestedBy });
    }
    const w = windowFor(input.frequency, input.at, input.timeZone);
    return insertRunOnce(db, { projectId: input.projectId, frequency: input.frequency, runKey: `${input.frequency}:${w.label}`, windowStart: w.start, windowEnd: w.end, requestedBy: input.requestedBy });
  }

  return { planRun, createRun };
}
