import { createHash, randomBytes } from "node:crypto";
import type { Audience } from "#shared/schemas/common.ts";
import type { DigestPreview, DigestRunInput, DigestRunSummary, DigestTestInput, DigestUpcoming } from "#shared/schemas/digests.ts";
import type { Frequency, Topics } from "#shared/schemas/subscribers.ts";
import { addDays } from "#shared/domain/calendar.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import { createTokenSigner, verifyLegacyToken } from "../core/signed-token.ts";
import type { Actor } from "../core/types.ts";
import type { Db } from "../db/knex.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { MediaService } from "../media/media.service.ts";
import type { PostsService, PublishedPostRecord } from "../posts/posts.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { SubscribersService } from "../subscribers/subscribers.service.ts";
import { subscriberLinks } from "../subscribers/subscribers.links.ts";
import { topicsAllow } from "../subscribers/subscribers.topics.ts";
import type { SubscriberRecord } from "../subscribers/subscribers.repository.ts";
import {
  countRecipients,
  findContent,
  findRun,
  findRunByKey,
  insertContent,
  insertDeliveries,
  insertRunOnce,
  lastFiguresOf,
  listRuns,
  postsWithImmediateRun,
  refreshCounts,
  setRunStatus,
  deliveredSubscriberIds,
  type DeliveryInsert,
  type DigestRunRecord,
} from "./digests.repository.ts";
import { hasNews, personalise, renderDigest, type DigestDocument, type DigestFigures, type PersonalLinks, type RenderedDigest } from "./digests.render.ts";
import { currentPeriodStart, localDate, sendTimes, windowFor } from "./digests.windows.ts";

type DigestAudience = "public" | "investor";

/**
 * How far ahead of the server's clock a run's `at` may be: clock skew between a browser and
 * the server, no more. A later `at` would mark subscribers' windows sent up to a moment that
 * has not come, and what is published meanwhile would never be e-mailed.
 */
export const RUN_AT_TOLERANCE_MS = 5_000;

/** Web copies of a digest stay readable this long after the run (a year, like the footer links). */
const WEB_TTL_MS = 365 * 24 * 60 * 60 * 1000;
/**
 * Investor-only pictures in a digest e-mail are signed links to the derivative that expire this
 * many days after the render (rounded up to a whole UTC day, so one run's renders share a URL).
 * The web copy, valid for a year, signs its pictures afresh whenever it is opened.
 */
export const MEDIA_LINK_TTL_DAYS = 30;
/** The web copy's pictures: long enough for a reading, rounded the same way. */
const WEB_MEDIA_LINK_TTL_DAYS = 1;
const DAY_MS = 24 * 60 * 60 * 1000;
/** Moves worth telling a reader about; progress ticks and audience changes are not news. */
const NEWS_MOVES = new Set(["removed", "restored", "completed", "reopened", "rebaselined", "later", "earlier"]);

export interface DigestsDeps {
  db: Db;
  logger: Logger;
  mailer: Mailer;
  projects: ProjectsService;
  programme: ProgrammeService;
  media: MediaService;
  /** Published updates: what a digest tells of. */
  posts: Pick<PostsService, "publishedBetween" | "findPublished" | "publishedSince">;
  subscribers: SubscribersService;
  publicUrl: string;
  tokenSecret: string;
  unsubscribeMailto: string | null;
  now?: () => Date;
}

/** The programme's audience rule applies to callers: ask as a reader of that audience would. */
function readerOf(audience: DigestAudience): Actor {
  if (audience === "public") return { user: null, ip: null };
  return { user: { id: 0, email: "", name: "", role: "investor" }, ip: null };
}

const audiencesOf = (a: DigestAudience): Audience[] => (a === "investor" ? ["public", "investor"] : ["public"]);

/** Post tags → the shape `topicsAllow` reads. */
function postTopics(p: PublishedPostRecord) {
  return { areas: p.tags.filter((t) => t.kind === "area").map((t) => t.value), systems: p.tags.filter((t) => t.kind === "system").map((t) => t.value) };
}

export function runSummary(r: DigestRunRecord): DigestRunSummary {
  return {
    id: r.id,
    project: { slug: r.projectSlug, name: r.projectName },
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

export function createDigestsService(deps: DigestsDeps) {
  const { db, logger, projects, programme, media, posts, subscribers, publicUrl, tokenSecret } = deps;
  const now = deps.now ?? (() => new Date());
  const host = new URL(publicUrl).hostname || "plumbline.local";

  const signer = createTokenSigner(tokenSecret);
  const webClaims = (c: Record<string, unknown>) => (Number.isSafeInteger(c.c) && Number.isSafeInteger(c.s) ? { c: c.c as number, s: c.s as number } : null);

  function webToken(contentId: number, subscriberId: number, expiresAt: Date): string {
    return signer.sign("digestWebCopy", { c: contentId, s: subscriberId }, expiresAt);
  }

  /** 400 for an altered, non-canonical, forged or other-purpose token; 410 for an authentic expired one. */
  function verifyWebToken(token: string): { contentId: number; subscriberId: number } {
    let result = signer.verify("digestWebCopy", token, now(), webClaims);
    // Web copies linked before decision 016 keep working until their own expiry.
    if (!result.ok && result.reason === "forged") result = verifyLegacyToken(tokenSecret, "digestWebCopy", token, now(), webClaims);
    if (!result.ok) {
      if (result.reason === "expired") throw new AppError("token_expired", "This link has expired.", 410);
      throw new AppError("token_invalid", "This link is not valid. Use the link in your latest digest.", 400);
    }
    return { contentId: result.claims.c, subscriberId: result.claims.s };
  }

  /** The personal links of one reader of one content: cheap HMACs, no database. */
  function linksFor(contentId: number, subscriberId: number): PersonalLinks & { headers: Record<string, string> } {
    const at = now();
    const l = subscriberLinks({ publicUrl, secret: tokenSecret, mailto: deps.unsubscribeMailto, subscriberId, now: at });
    return { webUrl: `${publicUrl}/api/digests/web/${webToken(contentId, subscriberId, new Date(at.getTime() + WEB_TTL_MS))}`, preferencesUrl: l.preferencesUrl, unsubscribeUrl: l.unsubscribeUrl, headers: l.headers };
  }

  /** `days` from now, rounded up to the next UTC midnight. */
  const expiryAfter = (days: number) => new Date(Math.ceil((now().getTime() + days * DAY_MS) / DAY_MS) * DAY_MS);

  /**
   * Each post's cover picture by post id, as an absolute URL for e-mail: a public post's is the
   * public derivative; an investor post's (in an investor digest only) a signed, expiring link, since
   * no mail client is signed in. A public digest never asks for an investor picture.
   */
  async function posterUrls(rows: PublishedPostRecord[], audience: DigestAudience): Promise<Map<number, { url: string; alt: string }>> {
    const shown = rows.filter((p) => p.coverMediaId !== null && (p.audience === "public" || (p.audience === "investor" && audience === "investor")));
    const out = new Map<number, { url: string; alt: string }>();
    if (shown.length === 0) return out;
    const pictures = await media.pictureFor(shown.map((p) => p.coverMediaId!));
    const expiresAt = expiryAfter(MEDIA_LINK_TTL_DAYS);
    for (const post of shown) {
      const pic = pictures.get(post.coverMediaId!);
      const jpegs = pic?.sources.jpeg ?? [];
      const pick = jpegs.find((v) => v.width >= 600) ?? jpegs[jpegs.length - 1];
      if (!pic || !pick) continue;
      const path = post.audience === "public" ? pick.url : media.signedVariantUrl(pick.url, expiresAt);
      out.set(post.id, { url: new URL(path, publicUrl).toString(), alt: pic.altText ?? "" });
    }
    return out;
  }

  /**
   * What one reader's digest holds: posts published in the window that the audience and
   * topics allow, the programme's moves in the window, milestones due in the next 30 days,
   * and the headline figures against those of the reader's last digest.
   */
  async function assemble(p: {
    project: { id: number; slug: string; name: string; operatorName: string; postalAddress: string | null; timeZone: string };
    frequency: Frequency;
    audience: DigestAudience;
    topics: Topics | null;
    windowStart: Date;
    windowEnd: Date;
    soFar?: boolean;
    previous: { percentComplete: number | null; forecastReady: string | null } | null;
    postId?: number | null;
  }): Promise<DigestDocument> {
    const { project, audience, topics } = p;
    const reader = readerOf(audience);
    const allowed = audiencesOf(audience);
    let postRows: PublishedPostRecord[];
    if (p.frequency === "immediate") {
      const one = p.postId ? await posts.findPublished(p.postId) : null;
      postRows = one && one.projectId === project.id && allowed.includes(one.audience) ? [one] : [];
    } else {
      postRows = await posts.publishedBetween(project.id, allowed, p.windowStart, p.windowEnd);
    }
    postRows = postRows.filter((x) => allowed.includes(x.audience) && topicsAllow(topics, postTopics(x)));
    const pictures = await posterUrls(postRows, audience);
    const projectUrl = `${publicUrl}/projects/${project.slug}`;
    const doc: DigestDocument = {
      project: { name: project.name, slug: project.slug, operatorName: project.operatorName, postalAddress: project.postalAddress, timeZone: project.timeZone },
      frequency: p.frequency,
      windowStart: p.windowStart,
      windowEnd: p.windowEnd,
      soFar: p.soFar ?? false,
      projectUrl,
      posts: postRows.map((x) => ({
        title: x.title,
        summary: x.summary,
        url: `${projectUrl}/updates/${x.slug}`,
        publishedAt: x.publishedAt,
        image: pictures.get(x.id) ?? null,
      })),
      moves: [],
      dueSoon: [],
      figures: { percentComplete: null, forecastReady: null, previousPercent: null, previousForecast: null },
    };
    if (p.frequency === "immediate") return doc;

    // Removed milestones too: their removal is news to the readers who could see them.
    const listed = await programme.list(project.slug, { removed: "include" }, reader);
    const milestones = listed.filter((m) => m.removal === null);
    const byId = new Map(listed.map((m) => [m.id, m]));
    const within = (id: number) => {
      const m = byId.get(id);
      return m ? topicsAllow(topics, { areas: m.area ? [m.area] : [], systems: [m.system] }) : false;
    };
    const lastDay = localDate(new Date(p.windowEnd.getTime() - 1), project.timeZone);
    const moves = await programme.moves(project.slug, { from: localDate(p.windowStart, project.timeZone), to: lastDay }, reader);
    doc.moves = moves
      .filter((row) => within(row.milestoneId))
      .flatMap((row) =>
        row.moves
          .filter((m) => NEWS_MOVES.has(m.kind))
          .map((m) => ({ milestoneName: row.milestoneName, kind: m.kind, days: m.days, from: m.from, to: m.to, ...(m.kind === "removed" || m.kind === "restored" ? { reason: m.notes.join("; ") } : {}) })),
      );
    const today = localDate(p.windowEnd, project.timeZone);
    const horizon = addDays(today, 30);
    doc.dueSoon = milestones
      .filter((m) => m.status !== "complete" && within(m.id))
      .map((m) => ({ name: m.name, date: m.forecastFinish ?? m.baselineFinish, status: m.status }))
      .filter((m) => m.date >= today && m.date <= horizon)
      .sort((a, b) => a.date.localeCompare(b.date) || a.name.localeCompare(b.name));
    const health = await programme.health(project.slug, {}, reader);
    const figures: DigestFigures = {
      percentComplete: milestones.length ? Math.round(health.percentComplete * 10) / 10 : null,
      forecastReady: health.forecastCompletion,
      previousPercent: p.previous?.percentComplete ?? null,
      previousForecast: p.previous?.forecastReady ?? null,
    };
    doc.figures = figures;
    return doc;
  }

  function contentKeyOf(parts: { audience: string; topicsKey: string; windowStart: Date; windowEnd: Date; previous: { percentComplete: number | null; forecastReady: string | null } | null }): string {
    return createHash("sha256")
      .update(JSON.stringify([parts.audience, parts.topicsKey, parts.windowStart.toISOString(), parts.windowEnd.toISOString(), parts.previous?.percentComplete ?? null, parts.previous?.forecastReady ?? null]))
      .digest("hex");
  }

  const newMessageId = (runId: number, subscriberId: number) => `<digest.${runId}.${subscriberId}.${randomBytes(6).toString("hex")}@${host}>`;

  /** The window a subscriber's digest covers in a run: from the end of their last one (else the run's own start). */
  function windowStartOf(s: Pick<SubscriberRecord, "lastDigestAt">, run: Pick<DigestRunRecord, "windowStart" | "windowEnd" | "frequency">): Date {
    if (run.frequency === "immediate" || !s.lastDigestAt) return run.windowStart;
    return s.lastDigestAt < run.windowEnd ? s.lastDigestAt : run.windowEnd;
  }

  async function projectRow(projectId: number) {
    const r = await db("projects").where({ id: projectId }).first("id", "slug", "name", "operator_name", "postal_address", "time_zone");
    if (!r) throw notFound("That project");
    return { id: Number(r.id), slug: String(r.slug), name: String(r.name), operatorName: String(r.operator_name), postalAddress: r.postal_address ?? null, timeZone: String(r.time_zone) };
  }

  /**
   * Plans a queued run: one delivery per recipient (unique per run and subscriber), each
   * pointing at a content rendered once per (audience, topics, window, last figures).
   * Safe to repeat and to run in several processes at once; then the run is sending.
   */
  async function planRun(runId: number): Promise<void> {
    const run = await findRun(db, runId);
    if (!run || run.status !== "queued") return;
    const project = await projectRow(run.projectId);
    const recipients = run.isTest ? [] : await subscribers.digestRecipients(run.projectId, run.frequency);
    const already = await deliveredSubscriberIds(db, run.id);
    const todo = recipients.filter((s) => !already.has(s.id));
    const previous = run.frequency === "immediate" ? new Map() : await lastFiguresOf(db, todo.map((s) => s.id));
    const contents = new Map<string, { id: number; empty: boolean }>();
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
        const doc = await assemble({ project, frequency: run.frequency, audience: s.audience, topics: s.topics, windowStart, windowEnd: run.windowEnd, previous: prev, postId: run.postId });
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

  async function summary(id: number): Promise<DigestRunSummary> {
    const run = await findRun(db, id);
    if (!run) throw notFound("That digest run");
    return runSummary(run);
  }

  return {
    planRun,
    createRun,
    assemble,
    linksFor,
    verifyWebToken,
    webToken,

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
      const { id, created } = await createRun({ projectId: project.id, frequency: input.frequency, at, timeZone: project.timeZone, requestedBy: actor.user?.id ?? null });
      if (created) await planRun(id);
      const run = await findRun(db, id);
      return { id, status: run!.status, created };
    },

    summary,
    async list(q: { project?: string; limit: number }): Promise<DigestRunSummary[]> {
      const projectId = q.project ? (await projects.get(q.project)).id : undefined;
      return (await listRuns(db, { projectId, limit: q.limit })).map(runSummary);
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
      if (!planned) await planRun(id);
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
          out.push({ project: { slug: p.slug, name: p.name, timeZone: p.timeZone }, frequency, at: at.toISOString(), windowStart: w.start.toISOString(), windowEnd: w.end.toISOString(), recipients: await countRecipients(db, p.id, frequency) });
        }
      }
      return out.sort((a, b) => a.at.localeCompare(b.at));
    },

    /** What a subscriber would receive if their digest ran now: their window to now, their audience and topics. */
    async preview(subscriberId: number): Promise<DigestPreview> {
      const s = await db("subscribers").where({ id: subscriberId }).first();
      if (!s) throw notFound("That subscriber");
      const project = await projectRow(Number(s.project_id));
      const audience = s.audience as DigestAudience;
      const topics = s.topics ? (JSON.parse(String(s.topics)) as Topics) : null;
      const frequency = s.frequency as Frequency;
      const end = now();
      // Their next digest as it stands: from where their last one ended (else from the start of
      // the period in progress, as the run would) to now.
      const periodStart = currentPeriodStart(frequency === "monthly" ? "monthly" : "weekly", end, project.timeZone);
      const windowStart = s.last_digest_at ? new Date(s.last_digest_at) : frequency === "immediate" ? new Date(end.getTime() - 7 * 86_400_000) : periodStart;
      const previous = (await lastFiguresOf(db, [subscriberId])).get(subscriberId) ?? null;
      // The preview shows a digest's contents, so "as it happens" subscribers see a week's worth.
      const doc = await assemble({ project, frequency: frequency === "immediate" ? "weekly" : frequency, audience, topics, windowStart, windowEnd: end, soFar: true, previous });
      const rendered = await renderDigest(doc);
      const links = { webUrl: "#", preferencesUrl: "#", unsubscribeUrl: "#" };
      return {
        subscriber: { id: subscriberId, email: String(s.email), audience, frequency },
        windowStart: windowStart.toISOString(),
        windowEnd: end.toISOString(),
        wouldSend: hasNews(doc),
        subject: rendered.subject,
        preheader: rendered.preheader,
        html: personalise(rendered.html, links),
        text: personalise(rendered.text, links),
      };
    },

    /** Sends the current week's digest so far (Monday 00:00 in the project's zone to now) to the signed-in member of staff, at once. */
    async sendTest(input: DigestTestInput, actor: Actor): Promise<{ messageId: string }> {
      if (!actor.user) throw new AppError("unauthenticated", "Sign in first.", 401);
      const project = await projects.get(input.projectSlug);
      const end = now();
      const start = currentPeriodStart("weekly", end, project.timeZone);
      const doc = await assemble({ project: await projectRow(project.id), frequency: "weekly", audience: input.audience, topics: null, windowStart: start, windowEnd: end, soFar: true, previous: null });
      const r = await renderDigest(doc);
      const links = { webUrl: `${publicUrl}/office/digests`, preferencesUrl: `${publicUrl}/office/digests`, unsubscribeUrl: `${publicUrl}/office/digests` };
      const messageId = `<digest.test.${randomBytes(8).toString("hex")}@${host}>`;
      await deps.mailer.send({ to: actor.user.email, subject: `[Test] ${r.subject}`, html: personalise(r.html, links), text: personalise(r.text, links), headers: { "Message-ID": messageId } });
      return { messageId };
    },

    /** The web copy behind "view in the browser": only the content its reader was sent. */
    async webCopy(token: string): Promise<string> {
      const { contentId, subscriberId } = verifyWebToken(token);
      const content = await findContent(db, contentId);
      const owner = await db("digest_deliveries").where({ content_id: contentId, subscriber_id: subscriberId }).first("id");
      if (!content || !owner || content.empty) throw notFound("That digest");
      const l = linksFor(contentId, subscriberId);
      // The copy outlives its e-mail's picture links: an investor's pictures are signed again for this reading.
      const html = media.refreshSignedUrls(content.html, expiryAfter(WEB_MEDIA_LINK_TTL_DAYS));
      return personalise(html, { webUrl: `${publicUrl}/api/digests/web/${token}`, preferencesUrl: l.preferencesUrl, unsubscribeUrl: l.unsubscribeUrl });
    },

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
