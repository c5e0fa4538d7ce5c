import type { DigestArchiveCopy, DigestArchivePage, DigestArchiveQuery, DigestRunInput, DigestRunSummary, DigestUpcoming } from "#shared/schemas/digests.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { MediaService } from "../media/media.service.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { SubscribersService } from "../subscribers/subscribers.service.ts";
import { createDigestArchive, createDigestVisibility } from "./digests.archive.ts";
import { createDigestAssembler } from "./digests.assemble.ts";
import type { DigestFacilitySource } from "./digests.facility.ts";
import type { DigestRecordSource } from "./digests.record.ts";
import { createDigestPlanner } from "./digests.plan.ts";
import { createDigestPreview } from "./digests.preview.ts";
import { deliveredSubscriberIds, findRun, findRunByKey, listRuns, postsWithImmediateRun, setRunStatus, type DigestRunRecord } from "./digests.repository.ts";
import { createDigestWebCopy } from "./digests.web-copy.ts";
import { sendTimes, windowFor } from "./digests.windows.ts";

/**
 * How far ahead of the server's clock a run's `at` may be: clock skew between a browser and
 * the server, no more. A later `at` would mark subscribers' windows sent up to a moment that
 * has not come, and what is published meanwhile would never be e-mailed.
 */
export const RUN_AT_TOLERANCE_MS = 5_000;

export interface DigestsDeps {
  db: Db;
  logger: Logger;
  mailer: Mailer;
  projects: ProjectsService;
  programme: ProgrammeService;
  media: MediaService;
  /** The facility as it stood on a day: its moves in a window are news. */
  facility: DigestFacilitySource;
  /** The investor record: risks, decisions, approved budget changes and documents that moved in a window. */
  record: DigestRecordSource;
  /** Published updates: what a digest tells of. */
  posts: Pick<PostsService, "publishedBetween" | "findPublished" | "publishedSince">;
  subscribers: SubscribersService;
  publicUrl: string;
  tokenSecret: string;
  unsubscribeMailto: string | null;
  now?: () => Date;
}

export function runSummary(r: DigestRunRecord, project: { slug: string; name: string }): DigestRunSummary {
  return {
    id: r.id,
    project: { slug: project.slug, name: project.name },
    frequency: r.frequency,
    status: r.status,
    test: r.isTest,
    windowStart: r.windowStart.toISOString(),
    windowEnd: r.windowEnd.toISOString(),
    counts: r.counts,
    createdAt: r.createdAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
    durationSeconds: r.startedAt && r.finishedAt ? Math.round((r.finishedAt.getTime() - r.startedAt.getTime()) / 100) / 10 : null,
  };
}

/**
 * Digests: the office's runs (request, pause, resume, the schedule ahead), composed with the use
 * cases that do the work: planning a run (digests.plan.ts), assembling one reader's contents
 * (digests.assemble.ts), the office's preview and test send (digests.preview.ts) and the signed
 * web copy (digests.web-copy.ts).
 */
export function createDigestsService(deps: DigestsDeps) {
  const { db, projects, posts, subscribers, publicUrl } = deps;
  const now = deps.now ?? (() => new Date());
  const host = new URL(publicUrl).hostname || "plumbline.local";

  const assembler = createDigestAssembler({ programme: deps.programme, media: deps.media, posts, facility: deps.facility, record: deps.record, publicUrl, now });
  const planner = createDigestPlanner({ db, logger: deps.logger, projects, posts, subscribers, assembler, host, now });
  const previews = createDigestPreview({ db, mailer: deps.mailer, projects, subscribers, assembler, publicUrl, host, now });
  const visibility = createDigestVisibility({ projects, posts, media: deps.media, programme: deps.programme, facility: deps.facility, record: deps.record, now });
  const web = createDigestWebCopy({ db, media: deps.media, visibility, publicUrl, tokenSecret: deps.tokenSecret, unsubscribeMailto: deps.unsubscribeMailto, now });
  const archive = createDigestArchive({ db, projects, visibility, web });

  async function summary(id: number): Promise<DigestRunSummary> {
    const run = await findRun(db, id);
    if (!run) throw notFound("That digest run");
    return runSummary(run, await projects.getById(run.projectId));
  }

  return {
    planRun: planner.planRun,
    createRun: planner.createRun,
    assemble: assembler.assemble,
    linksFor: web.linksFor,
    verifyWebToken: web.verifyWebToken,
    webToken: web.webToken,

    /** Starts (or finds) the run of the period before `at`; the same period twice is one run. */
    async requestRun(input: DigestRunInput, actor: Actor): Promise<{ id: number; status: string; created: boolean }> {
      const project = await projects.get(input.projectSlug);
      const current = now();
      const at = input.at ? new Date(input.at) : current;
      if (at.getTime() > current.getTime() + RUN_AT_TOLERANCE_MS) {
        throw new AppError("validation", "Check at.", 400, { at: `must not be in the future (it is ${current.toISOString()} now); a run covers a period that has ended` });
      }
      // Within the tolerance `at` can still fall just past a period's end: the period it would cover has not ended.
      const w = windowFor(input.frequency, at, project.timeZone);
      if (w.end.getTime() > current.getTime()) {
        throw new AppError("validation", "Check at.", 400, { at: `names a period that has not ended yet (${input.frequency} ${w.label} ends ${w.end.toISOString()})` });
      }
      const { id, created } = await planner.createRun({ projectId: project.id, frequency: input.frequency, at, timeZone: project.timeZone, requestedBy: actor.user?.id ?? null });
      if (created) await planner.planRun(id);
      const run = await findRun(db, id);
      return { id, status: run!.status, created };
    },

    summary,
    async list(q: { project?: string; limit: number }): Promise<DigestRunSummary[]> {
      const projectId = q.project ? (await projects.get(q.project)).id : undefined;
      const runs = await listRuns(db, { projectId, limit: q.limit });
      const byId = new Map((await projects.list()).map((p) => [p.id, p]));
      // A run keeps its project (a foreign key), so every run finds its name.
      return runs.filter((r) => byId.has(r.projectId)).map((r) => runSummary(r, byId.get(r.projectId)!));
    },

    async pause(id: number): Promise<DigestRunSummary> {
      const run = await findRun(db, id);
      if (!run) throw notFound("That digest run");
      if (!(await setRunStatus(db, id, "paused", now(), ["queued", "running"]))) throw new AppError("conflict", `A ${run.status} run cannot be paused.`, 409);
      return summary(id);
    },

    async resume(id: number): Promise<DigestRunSummary> {
      const run = await findRun(db, id);
      if (!run) throw notFound("That digest run");
      // A run paused before it was planned has no deliveries yet: it goes back to the planner.
      const planned = (await deliveredSubscriberIds(db, id)).size > 0 || run.startedAt !== null;
      if (!(await setRunStatus(db, id, planned ? "running" : "queued", now(), ["paused"]))) throw new AppError("conflict", `A ${run.status} run cannot be resumed.`, 409);
      if (!planned) await planner.planRun(id);
      return summary(id);
    },

    /** The next scheduled weekly and monthly runs of every project (or one). */
    async upcoming(slug?: string): Promise<DigestUpcoming[]> {
      const list = slug ? [await projects.get(slug)] : await projects.list();
      const out: DigestUpcoming[] = [];
      for (const p of list) {
        for (const frequency of ["weekly", "monthly"] as const) {
          const at = sendTimes(frequency, now(), p.timeZone, p.settings).next;
          const w = windowFor(frequency, at, p.timeZone);
          out.push({ project: { slug: p.slug, name: p.name, timeZone: p.timeZone }, frequency, at: at.toISOString(), windowStart: w.start.toISOString(), windowEnd: w.end.toISOString(), recipients: await subscribers.countDigestRecipients(p.id, frequency) });
        }
      }
      return out.sort((a, b) => a.at.localeCompare(b.at));
    },

    /** The digests a signed preferences link's subscriber was sent (decision 045). */
    async archiveByLink(token: string, query: DigestArchiveQuery): Promise<DigestArchivePage> {
      return archive.list([await subscribers.archiveOwner(token)], query);
    },
    async archivedCopyByLink(token: string, id: number): Promise<DigestArchiveCopy> {
      return archive.copy([await subscribers.archiveOwner(token)], id);
    },
    /** The digests a signed-in investor's own subscriptions were sent ("My digests" in the investor room). */
    async archiveOfUser(userId: number, query: DigestArchiveQuery): Promise<DigestArchivePage> {
      return archive.list(await subscribers.subscriptionIdsOfUser(userId), query);
    },
    async archivedCopyOfUser(userId: number, id: number): Promise<DigestArchiveCopy> {
      return archive.copy(await subscribers.subscriptionIdsOfUser(userId), id);
    },

    preview: previews.preview,
    sendTest: previews.sendTest,
    webCopy: web.webCopy,

    findRunByKey: (projectId: number, key: string) => findRunByKey(db, projectId, key),

    /** Posts published since `since` that have no "as it happens" run yet (public or investor only), at most 100, oldest first. */
    async postsAwaitingImmediateRun(since: Date): Promise<Array<{ id: number; projectId: number; publishedAt: Date }>> {
      const published = await posts.publishedSince(since);
      const done = await postsWithImmediateRun(db, published.map((p) => p.id));
      return published.filter((p) => !done.has(p.id)).slice(0, 100);
    },
  };
}
export type DigestsService = ReturnType<typeof createDigestsService>;
