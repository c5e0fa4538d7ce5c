import { randomBytes, timingSafeEqual } from "node:crypto";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { Project } from "#shared/schemas/projects.ts";
import type { PostStatus } from "#shared/schemas/publishing.ts";
import type { ReviewAnswerInput, ReviewContentKind, ReviewCopy, ReviewLink, ReviewLinkCreated, ReviewLinkInput, ReviewRevisionQuery } from "#shared/schemas/review-links.ts";
import type { StoryItem } from "#shared/schemas/stories.ts";
import { AppError, notFound } from "../core/app-error.ts";
import type { Logger } from "../core/logger.ts";
import { createTokenSigner } from "../core/signed-token.ts";
import type { Actor } from "../core/types.ts";
import type { AuditService } from "../audit/audit.service.ts";
import type { Db } from "../db/knex.ts";
import type { Mailer } from "../mail/mail.service.ts";
import type { MediaService } from "../media/media.service.ts";
import type { ReadableFile } from "../media/media.links.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { StoriesService } from "../stories/stories.service.ts";
import type { AccountsService } from "../users/users.accounts.ts";
import { reviewAnswerNotification } from "./review-links.mail.ts";
import { eventsOfLinks, findReviewLink, insertReviewLink, insertReviewLinkEvent, listReviewLinks, markRevoked, type ReviewLinkRecord } from "./review-links.repository.ts";

/** Where a reviewer's request came from: kept with each opening and answer. */
export interface ReviewClient {
  ip: string | null;
  userAgent: string | null;
}

/** Content a link may be made for: work not yet approved (decision 060). */
const OPEN_FOR_REVIEW: readonly PostStatus[] = ["draft", "in_review"];
/** A reviewer may change their mind, not fill an author's inbox. */
const MAX_ANSWERS_PER_LINK = 20;
const NONCE = /^[A-Za-z0-9_-]{43}$/;
const DAY_MS = 24 * 60 * 60 * 1000;

const KIND_NAMES: Record<ReviewContentKind, string> = { post: "update", story: "photo story" };
const EDITOR_PATHS: Record<ReviewContentKind, string> = { post: "/office/updates", story: "/office/stories" };

/** Every refusal a reviewer can meet, each with a page of its own on the client. */
const linkNotFound = () => new AppError("review_link_not_found", "This review link is not valid. Check that the whole address was copied, or ask the sender for a new link.", 404);
const linkExpired = () => new AppError("review_link_expired", "This review link has expired. Ask the person who sent it for a new one.", 410);
const linkRevoked = () => new AppError("review_link_revoked", "This review link has been withdrawn by the team that sent it.", 410);
const contentGone = () => new AppError("review_content_gone", "The draft this link was made for is no longer available for review.", 410);

interface CopyOfContent {
  item: { id: number; status: PostStatus; authorId: number | null; projectId: number };
  project: Project;
  number: number;
  latest: number;
  title: string;
  audience: ReviewCopy["audience"];
  summary?: string;
  html?: string;
  cover?: MediaPicture | null;
  intro?: string;
  items?: StoryItem[];
}

export interface ReviewLinksDeps {
  db: Db;
  logger: Logger;
  posts: Pick<PostsService, "revisionOf" | "reviewCopy" | "recordOutsideReview">;
  stories: Pick<StoriesService, "revisionOf" | "reviewCopy" | "recordOutsideReview">;
  media: Pick<MediaService, "describeForPublishing" | "pictureFor" | "readVariant">;
  accounts: Pick<AccountsService, "findById" | "namesOf">;
  audit: AuditService;
  mailer: Mailer;
  publicUrl: string;
  tokenSecret: string;
  now?: () => Date;
}

/**
 * Review links (issue #15 item 1, decision 060): staff give a named outside reviewer a signed,
 * expiring, revocable link to one revision of a post or story in draft or in review. The reviewer
 * reads it without an account, with its photos served under the same link, and may answer
 * "looks right" or "needs changes"; every opening and answer is kept and audited, and the answer
 * goes into the content's publishing history and reaches the author by e-mail. The link's URL is
 * shown once, to its maker, and kept nowhere.
 */
export function createReviewLinksService(deps: ReviewLinksDeps) {
  const { db, logger, media, accounts, audit, mailer } = deps;
  const signer = createTokenSigner(deps.tokenSecret);
  const base = deps.publicUrl.replace(/\/+$/, "");
  const clock = deps.now ?? (() => new Date());
  const content = (kind: ReviewContentKind) => (kind === "post" ? deps.posts : deps.stories);

  /** The content as it stands, for staff's own requests: 404 when there is no such post or story. */
  async function existing(kind: ReviewContentKind, id: number) {
    const found = await content(kind).revisionOf(id, "latest");
    if (!found) throw notFound(`That ${KIND_NAMES[kind]}`);
    return found;
  }

  /** The link a token names, if it is authentic, live and not revoked; else the refusal the reviewer sees. */
  async function linkOf(token: string, now: Date): Promise<ReviewLinkRecord> {
    const checked = signer.verify("reviewLink", token, now, (c) =>
      Object.keys(c).length === 2 && Number.isSafeInteger(c.l) && (c.l as number) > 0 && typeof c.n === "string" && NONCE.test(c.n) ? { l: c.l as number, n: c.n } : null,
    );
    if (!checked.ok) throw checked.reason === "expired" ? linkExpired() : linkNotFound();
    const link = await findReviewLink(db, checked.claims.l);
    if (!link || !timingSafeEqual(Buffer.from(link.nonce), Buffer.from(checked.claims.n))) throw linkNotFound();
    if (link.revokedAt) throw linkRevoked();
    if (link.expiresAt.getTime() <= now.getTime()) throw linkExpired();
    return link;
  }

  /**
   * Which photos a link shows: its own project's, never restricted ones, and unreviewed ones only
   * on a link a lead or an admin made (they may judge a photo before it is cleared).
   */
  async function allowedPhotos(link: ReviewLinkRecord, ids: number[]): Promise<number[]> {
    const unreviewedToo = link.createdByRole === "lead" || link.createdByRole === "admin";
    return (await media.describeForPublishing(ids))
      .filter((d) => d.exists && d.projectId === link.projectId && (d.sensitivity === "cleared" || (unreviewedToo && d.sensitivity === "unreviewed")))
      .map((d) => d.id);
  }

  /** The pictures a link shows, their files addressed under the link itself (so revoking it ends them too). */
  function picturesFor(link: ReviewLinkRecord, token: string) {
    const prefix = `/api/review/${token}/media/`;
    return async (ids: number[]): Promise<Map<number, MediaPicture>> => {
      const pictures = await media.pictureFor(await allowedPhotos(link, ids));
      for (const p of pictures.values()) {
        for (const list of Object.values(p.sources)) for (const v of list) v.url = v.url.replace(/^\/media\/v\//, prefix);
      }
      return pictures;
    };
  }

  /** The revision a reviewer reads, as rendered for them; 410 when the content was deleted or withdrawn. */
  async function copyOf(link: ReviewLinkRecord, revision: number | "latest", pictures: (ids: number[]) => Promise<Map<number, MediaPicture>>): Promise<CopyOfContent> {
    const copy: CopyOfContent | null = await content(link.contentKind).reviewCopy(link.contentId, revision, pictures);
    if (!copy || copy.item.projectId !== link.projectId || copy.item.status === "withdrawn") throw contentGone();
    return copy;
  }

  const revisionAsked = (link: ReviewLinkRecord, query: ReviewRevisionQuery) => (query.revision === "latest" ? "latest" : link.revisionNumber);

  async function answersOf(linkId: number): Promise<ReviewCopy["answers"]> {
    const events = (await eventsOfLinks(db, [linkId])).get(linkId) ?? [];
    return events.filter((e) => e.kind === "answered").map((e) => ({ verdict: e.verdict!, comment: e.comment, revisionNumber: e.revisionNumber, at: e.at.toISOString() }));
  }

  const stateOf = (link: ReviewLinkRecord, now: Date): ReviewLink["state"] => (link.revokedAt ? "revoked" : link.expiresAt.getTime() <= now.getTime() ? "expired" : "live");

  return {
    /** Makes a link for the content's newest revision; the URL is in this answer only. */
    async create(kind: ReviewContentKind, id: number, input: ReviewLinkInput, actor: Actor): Promise<ReviewLinkCreated> {
      const user = actor.user!;
      if (user.role !== "admin" && user.role !== "lead" && user.role !== "marketing") throw new AppError("forbidden", "Your role may not do this.", 403);
      const { item, revision } = await existing(kind, id);
      if (!OPEN_FOR_REVIEW.includes(item.status)) {
        throw new AppError("not_open_for_review", `A review link is made for a ${KIND_NAMES[kind]} in draft or in review; this one is ${item.status.replace("_", " ")}.`, 409);
      }
      const now = clock();
      const expiresAt = new Date(now.getTime() + input.days * DAY_MS);
      const nonce = randomBytes(32).toString("base64url");
      const linkId = await db.transaction(async (trx) => {
        const linkId = await insertReviewLink(trx, {
          projectId: item.projectId,
          contentKind: kind,
          contentId: id,
          revisionNumber: revision.number,
          reviewerName: input.name,
          reviewerEmail: input.email,
          reviewerOrganisation: input.organisation ?? null,
          nonce,
          expiresAt,
          createdBy: user.id,
          createdByRole: user.role as ReviewLinkRecord["createdByRole"],
          createdAt: now,
        });
        // Who may read what, and until when; never the link itself.
        await audit.record(
          {
            action: "review_link_created",
            actor,
            target: { type: kind, id, label: item.title },
            detail: { reviewLinkId: linkId, reviewer: input.name, organisation: input.organisation ?? null, revision: revision.number, expiresAt: expiresAt.toISOString() },
          },
          trx,
        );
        return linkId;
      });
      const token = signer.sign("reviewLink", { l: linkId, n: nonce }, expiresAt);
      return { id: linkId, url: `${base}/review/${token}` };
    },

    /** The content's links with their state and what their reviewers did; never a token or URL. */
    async list(kind: ReviewContentKind, id: number): Promise<{ links: ReviewLink[] }> {
      await existing(kind, id);
      const now = clock();
      const links = await listReviewLinks(db, kind, id);
      const [events, names] = await Promise.all([eventsOfLinks(db, links.map((l) => l.id)), accounts.namesOf([...new Set(links.flatMap((l) => (l.createdBy === null ? [] : [l.createdBy])))])]);
      return {
        links: links.map((l) => ({
          id: l.id,
          contentKind: l.contentKind,
          contentId: l.contentId,
          revisionNumber: l.revisionNumber,
          reviewer: { name: l.reviewerName, email: l.reviewerEmail, organisation: l.reviewerOrganisation },
          createdBy: { id: l.createdBy, name: (l.createdBy !== null && names.get(l.createdBy)) || "A former user" },
          createdAt: l.createdAt.toISOString(),
          expiresAt: l.expiresAt.toISOString(),
          revokedAt: l.revokedAt?.toISOString() ?? null,
          state: stateOf(l, now),
          events: (events.get(l.id) ?? []).map((e) => ({ kind: e.kind, verdict: e.verdict, comment: e.comment, revisionNumber: e.revisionNumber, ip: e.ip, at: e.at.toISOString() })),
        })),
      };
    },

    /** Ends a link at once (its photos with it). Revoking a revoked link changes nothing. */
    async revoke(linkId: number, actor: Actor): Promise<void> {
      const now = clock();
      await db.transaction(async (trx) => {
        const link = await findReviewLink(trx, linkId, { forUpdate: true });
        if (!link) throw notFound("That review link");
        if (link.revokedAt) return;
        await markRevoked(trx, link.id, actor.user?.id ?? null, now);
        await audit.record({ action: "review_link_revoked", actor, target: { type: link.contentKind, id: link.contentId }, detail: { reviewLinkId: link.id, reviewer: link.reviewerName } }, trx);
      });
    },

    /** The reviewer's read: the revision, rendered, with the newest revision's number when it is newer. Each read is kept. */
    async open(token: string, query: ReviewRevisionQuery, client: ReviewClient, now: Date = clock()): Promise<ReviewCopy> {
      const link = await linkOf(token, now);
      const copy = await copyOf(link, revisionAsked(link, query), picturesFor(link, token));
      await db.transaction(async (trx) => {
        await insertReviewLinkEvent(trx, { reviewLinkId: link.id, kind: "opened", verdict: null, comment: null, revisionNumber: copy.number, ip: client.ip, userAgent: client.userAgent, at: now });
        await audit.record(
          { action: "review_link_opened", actor: { user: null, ip: client.ip }, actorEmail: link.reviewerEmail, target: { type: link.contentKind, id: link.contentId, label: copy.title }, detail: { reviewLinkId: link.id, revision: copy.number } },
          trx,
        );
      });
      return {
        kind: link.contentKind,
        projectName: copy.project.name,
        reviewerName: link.reviewerName,
        expiresAt: link.expiresAt.toISOString(),
        revisionNumber: copy.number,
        linkRevision: link.revisionNumber,
        newerRevision: copy.latest > copy.number ? copy.latest : null,
        title: copy.title,
        audience: copy.audience,
        summary: copy.summary ?? null,
        html: copy.html ?? null,
        cover: copy.cover ?? null,
        intro: copy.intro ?? null,
        items: copy.items ?? [],
        answers: await answersOf(link.id),
      };
    },

    /** The reviewer's answer on the revision they read: kept, audited, put in the content's history, and sent to the author. */
    async answer(token: string, query: ReviewRevisionQuery, input: ReviewAnswerInput, client: ReviewClient, now: Date = clock()): Promise<{ answers: ReviewCopy["answers"] }> {
      const link = await linkOf(token, now);
      const copy = await copyOf(link, revisionAsked(link, query), async () => new Map());
      const comment = input.comment?.trim() || null;
      await db.transaction(async (trx) => {
        const locked = (await findReviewLink(trx, link.id, { forUpdate: true }))!;
        if (locked.revokedAt) throw linkRevoked();
        const answered = ((await eventsOfLinks(trx, [link.id])).get(link.id) ?? []).filter((e) => e.kind === "answered").length;
        if (answered >= MAX_ANSWERS_PER_LINK) throw new AppError("too_many_answers", `This link has taken its ${MAX_ANSWERS_PER_LINK} answers. Write to the person who sent it.`, 429);
        await insertReviewLinkEvent(trx, { reviewLinkId: link.id, kind: "answered", verdict: input.verdict, comment, revisionNumber: copy.number, ip: client.ip, userAgent: client.userAgent, at: now });
        // The answer is also a line of the content's publishing history, beside the team's own steps.
        await content(link.contentKind).recordOutsideReview(
          trx,
          link.contentId,
          { reviewerName: link.reviewerName, organisation: link.reviewerOrganisation, verdict: input.verdict, comment, revisionNumber: copy.number },
          now,
        );
        await audit.record(
          { action: "review_link_answered", actor: { user: null, ip: client.ip }, actorEmail: link.reviewerEmail, target: { type: link.contentKind, id: link.contentId, label: copy.title }, detail: { reviewLinkId: link.id, revision: copy.number, verdict: input.verdict } },
          trx,
        );
      });
      await notifyAuthor(link, copy, input.verdict, comment);
      return { answers: await answersOf(link.id) };
    },

    /**
     * A photo file of the revision a link was made for, or of the newest one, while the link
     * lives: null when the name is not one of those photos' files or the link may not show it.
     */
    async photoFile(token: string, name: string, now: Date = clock()): Promise<ReadableFile | null> {
      const link = await linkOf(token, now);
      const urls = new Set<string>();
      const collect = async (ids: number[]) => {
        for (const p of (await media.pictureFor(await allowedPhotos(link, ids))).values()) for (const list of Object.values(p.sources)) for (const v of list) urls.add(v.url);
        return new Map<number, MediaPicture>();
      };
      await copyOf(link, link.revisionNumber, collect);
      await copyOf(link, "latest", collect);
      return urls.has(`/media/v/${name}`) ? media.readVariant(name, "staff") : null;
    },
  };

  async function notifyAuthor(link: ReviewLinkRecord, copy: CopyOfContent, verdict: ReviewAnswerInput["verdict"], comment: string | null): Promise<void> {
    const author = copy.item.authorId === null ? null : await accounts.findById(copy.item.authorId);
    if (!author || author.disabledAt) return;
    const mail = reviewAnswerNotification({
      reviewer: { name: link.reviewerName, organisation: link.reviewerOrganisation },
      kindName: KIND_NAMES[link.contentKind],
      title: copy.title,
      verdict,
      comment,
      revisionNumber: copy.number,
      url: `${base}${EDITOR_PATHS[link.contentKind]}/${link.contentId}`,
    });
    try {
      await mailer.send({ to: author.email, ...mail });
    } catch (err) {
      // The answer is kept and shown in the editor: a mail that fails costs the author the note, not the answer.
      logger.error({ err, reviewLinkId: link.id }, "could not e-mail the author about a review answer");
    }
  }
}

export type ReviewLinksService = ReturnType<typeof createReviewLinksService>;
