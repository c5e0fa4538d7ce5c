import { DIGEST_ARCHIVE_PAGE_SIZE, type DigestArchiveCopy, type DigestArchiveItem, type DigestArchivePage, type DigestArchiveQuery } from "#shared/schemas/digests.ts";
import type { Audience } from "#shared/schemas/common.ts";
import { notFound } from "../core/app-error.ts";
import type { Db } from "../db/knex.ts";
import type { MediaService } from "../media/media.service.ts";
import type { PostsService } from "../posts/posts.service.ts";
import type { ProgrammeService } from "../programme/programme.service.ts";
import type { ProjectsService } from "../projects/projects.service.ts";
import type { DigestAudience } from "./digests.assemble.ts";
import type { DigestFacilitySource } from "./digests.facility.ts";
import { itemClass, withheldNotice, withholdItems, type DigestItemRef } from "./digests.items.ts";
import { createRecordMovesCache, type DigestRecordSource } from "./digests.record.ts";
import { personalise } from "./digests.render.ts";
import { findArchivedDelivery, findContent, listArchivedDeliveries, type ArchivedDelivery, type ContentRow } from "./digests.repository.ts";
import { localDate } from "./digests.windows.ts";

/** What a digest is checked against: the reader's audience, the project, and the window it covered. */
export interface DigestReading {
  projectId: number;
  audience: DigestAudience;
  windowStart: Date;
  windowEnd: Date;
}

export interface DigestVisibilityDeps {
  projects: Pick<ProjectsService, "sender">;
  posts: Pick<PostsService, "findPublished">;
  media: Pick<MediaService, "describeForPublishing">;
  programme: Pick<ProgrammeService, "list">;
  facility: DigestFacilitySource;
  record: DigestRecordSource;
  now: () => Date;
}

const RECORD_KINDS = new Set(["risk", "decision", "change", "document"]);

/**
 * Which of a digest's items its reader may no longer see, each asked of its own module as the
 * reader's audience sees it now: a post withdrawn or narrowed, a picture no longer cleared, a
 * milestone, block or system made internal, a record item no longer shown to investors.
 */
export function createDigestVisibility(deps: DigestVisibilityDeps) {
  const { projects, posts, media, programme, facility, record, now } = deps;

  return async function hiddenItems(refs: readonly DigestItemRef[], reading: DigestReading): Promise<DigestItemRef[]> {
    const idsOf = (kind: string) => refs.flatMap((r) => (r.kind === kind && "id" in r ? [r.id] : []));
    const hidden = new Set<string>();
    const allowed: Audience[] = reading.audience === "investor" ? ["public", "investor"] : ["public"];

    for (const id of idsOf("post")) {
      const post = await posts.findPublished(id);
      if (!post || post.projectId !== reading.projectId || !allowed.includes(post.audience)) hidden.add(itemClass({ kind: "post", id }));
    }
    const pictures = idsOf("picture");
    if (pictures.length) {
      for (const p of await media.describeForPublishing(pictures)) if (!p.exists || p.sensitivity !== "cleared") hidden.add(itemClass({ kind: "picture", id: p.id }));
    }
    const project = await projects.sender(reading.projectId);
    const milestones = idsOf("milestone");
    if (milestones.length) {
      const visible = new Set((await programme.list(project.slug, { removed: "include" }, reading.audience)).map((m) => m.id));
      for (const id of milestones) if (!visible.has(id)) hidden.add(itemClass({ kind: "milestone", id }));
    }
    const named = refs.flatMap((r) => (r.kind === "facility" ? [r.name] : []));
    if (named.length) {
      const now_ = await facility.figuresAt(reading.projectId, localDate(now(), project.timeZone), reading.audience);
      const visible = new Set([...now_.blocks.map((b) => b.name), ...now_.systems.map((s) => s.name)]);
      for (const name of named) if (!visible.has(name)) hidden.add(itemClass({ kind: "facility", name }));
    }
    if (refs.some((r) => RECORD_KINDS.has(r.kind))) {
      // The record's moves of the same window, asked again: an item no longer shown to investors is not among them.
      const moves = reading.audience === "investor" ? await createRecordMovesCache(record)(reading.projectId, reading.windowStart, reading.windowEnd) : null;
      const visible = new Set<string>(
        moves
          ? [
              ...moves.risks.map((m) => itemClass({ kind: "risk", id: m.id })),
              ...moves.decisions.map((m) => itemClass({ kind: "decision", id: m.id })),
              ...moves.changes.map((m) => itemClass({ kind: "change", id: m.id })),
              ...moves.documents.map((m) => itemClass({ kind: "document", id: m.id })),
            ]
          : [],
      );
      for (const r of refs) if (RECORD_KINDS.has(r.kind) && !visible.has(itemClass(r))) hidden.add(itemClass(r));
    }
    return refs.filter((r) => hidden.has(itemClass(r)));
  };
}
export type DigestVisibility = ReturnType<typeof createDigestVisibility>;

/** A content as its reader may read it now: the stored HTML less hidden items, or nothing if its items were never recorded. */
export async function readableCopy(
  visibility: DigestVisibility,
  content: ContentRow,
  reading: DigestReading,
): Promise<{ html: string | null; withheld: { count: number; whole: boolean; notice: string } | null }> {
  if (content.itemRefs === null) {
    return { html: null, withheld: { count: 0, whole: true, notice: "This digest was sent before Plumbline kept a list of what each digest holds, so it cannot be checked against what you may see now, and it is withheld." } };
  }
  const hidden = await visibility(content.itemRefs, reading);
  if (hidden.length === 0) return { html: content.html, withheld: null };
  return { html: withholdItems(content.html, hidden), withheld: { count: hidden.length, whole: false, notice: withheldNotice(hidden.length) } };
}

/**
 * Every subscriber's archive: the digests they were sent, newest first, and each one as it was
 * sent less what has since become hidden from them (decision 045). The caller names the
 * subscriptions (a signed preferences link names one; an investor's account names its own).
 */
export function createDigestArchive(deps: { db: Db; projects: Pick<ProjectsService, "senders">; visibility: DigestVisibility; web: { linksFor(contentId: number, subscriberId: number): { webUrl: string; preferencesUrl: string; unsubscribeUrl: string } } }) {
  const { db, projects, visibility, web } = deps;

  async function itemsOf(rows: readonly ArchivedDelivery[]): Promise<DigestArchiveItem[]> {
    const senders = await projects.senders([...new Set(rows.map((r) => r.projectId))]);
    return rows.flatMap((r) => {
      const p = senders.get(r.projectId);
      if (!p) return [];
      return [
        {
          id: r.id,
          project: { slug: p.slug, name: p.name },
          frequency: r.frequency,
          subject: r.subject,
          sentAt: r.sentAt.toISOString(),
          windowStart: r.windowStart.toISOString(),
          windowEnd: r.windowEnd.toISOString(),
          firstDay: localDate(r.windowStart, p.timeZone),
          lastDay: localDate(new Date(r.windowEnd.getTime() - 1), p.timeZone),
          webUrl: r.unrecorded ? null : web.linksFor(r.contentId, r.subscriberId).webUrl,
        },
      ];
    });
  }

  return {
    async list(subscriberIds: readonly number[], query: DigestArchiveQuery): Promise<DigestArchivePage> {
      const { rows, total } = await listArchivedDeliveries(db, subscriberIds, { limit: DIGEST_ARCHIVE_PAGE_SIZE, offset: (query.page - 1) * DIGEST_ARCHIVE_PAGE_SIZE });
      return { items: await itemsOf(rows), total, page: query.page, pageSize: DIGEST_ARCHIVE_PAGE_SIZE };
    },

    async copy(subscriberIds: readonly number[], id: number): Promise<DigestArchiveCopy> {
      const delivery = await findArchivedDelivery(db, subscriberIds, id);
      const content = delivery ? await findContent(db, delivery.contentId) : null;
      if (!delivery || !content) throw notFound("That digest");
      const [item] = await itemsOf([delivery]);
      if (!item) throw notFound("That digest");
      const copy = await readableCopy(visibility, content, { projectId: delivery.projectId, audience: content.audience, windowStart: delivery.windowStart, windowEnd: delivery.windowEnd });
      const links = web.linksFor(content.id, delivery.subscriberId);
      return { ...item, html: copy.html === null ? null : personalise(copy.html, links), withheld: copy.withheld };
    },
  };
}
export type DigestArchive = ReturnType<typeof createDigestArchive>;
